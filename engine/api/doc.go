// Package api is zport's one JSON contract: the request and response types
// that the analyze command, the page bridge and the tests exchange, and
// Analyze, which answers a request from circuit text or from a catalog
// stage.
//
// A request names a circuit (or a topology with parameters), the reference
// element, the ports, a spot frequency and optionally a gain and a sweep:
//
//	{"circuit": "...", "reference": "U1", "ports": ["in", "out"],
//	 "frequency": 1000, "gain": {"source": "Vin", "output": "out"},
//	 "sweep": {"from": 10, "to": 1e8, "points": 400}}
//
// The reference is optional for circuit text: without one the answer is the
// direct solution (a passive network's), with a note. Any other key is an
// analysis registered with Register — the design aids, and "noise" (the
// output and input-referred noise over the sweep, its rms over a band and
// each source's share; noise.go) — decoded strictly, answered under the
// same key.
//
// The response carries every complex number as {"re": x, "im": y}, and null
// where a value is not finite, with a note saying why; it never carries NaN
// or Inf. Bad input gives an ErrorResponse with the line and column in the
// circuit text, or the name of the parameter or field at fault.
//
// Inspect lists what a piece of circuit text offers a page's pickers — the
// reference candidates, the independent sources, the port lines and the
// nodes — or every problem in it with its line and column; InspectParsed
// and PrepareParsed let a page that does both on every edit parse the text
// once.
package api
