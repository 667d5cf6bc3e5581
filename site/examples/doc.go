// Package examples holds the example circuits of the custom-circuit page:
// small linear circuits in zport's circuit text (package
// zport/engine/circuit), each an invented design scenario of our own and
// labelled as one, with the analysis it is meant to be read with — the
// reference element, the ports, the gain and the frequencies.
//
//	for _, e := range examples.All() {
//		fmt.Println(e.ID, e.Title)   // twopole, cable, degenerated, twostage, cfa
//		req := e.Request()           // an api.Request ready for api.Analyze
//		_ = req
//	}
//
// The site builder lists them on the page and pre-renders the first; the
// package's tests analyze every one of them with the engine and hold its
// numbers against closed forms from published sources where those exist,
// each check naming its source.
//
// Element values are our own. The texts are meant to be read: every part
// has a comment saying what it stands for, because a user starts from an
// example and edits it into their own circuit.
package examples
