package api

import (
	"errors"
	"fmt"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

// Inspection is what a piece of circuit text offers an analysis, for a
// page that lets the user pick the reference element, the ports and the
// gain: the candidates in the order the text has them, or every problem
// the parser found.
type Inspection struct {
	// References are the parts that can be the reference element:
	// controlled sources and opamps.
	References []InspectedPart `json:"references"`
	// Sources are the independent sources a gain can start from.
	Sources []InspectedPart `json:"sources"`
	// Ports are the text's port lines.
	Ports []InspectedPort `json:"ports"`
	// Nodes are the node names other than gnd, in order of first use.
	Nodes []string `json:"nodes"`
	// Errors lists every problem in the text, in text order, each with
	// its 1-based line and column (characters). The parser stops after
	// circuit.MaxErrors problems and says so in a last entry.
	Errors []ErrorBody `json:"errors"`
	// Limit, when set, says why the circuit parses but is too large to
	// analyze (more than feedback.MaxNodes nodes); the candidate lists are
	// then left empty, since no analysis can use them.
	Limit string `json:"limit,omitempty"`
}

// InspectedPart is one part of the text: its name, its kind (the line's
// first word) and its line.
type InspectedPart struct {
	Name string `json:"name"`
	Kind string `json:"kind"`
	Line int    `json:"line"`
}

// InspectedPort is one port line: its name and its two nodes.
type InspectedPort struct {
	Name string `json:"name"`
	A    string `json:"a"`
	B    string `json:"b"`
	Line int    `json:"line"`
}

// Inspect reads circuit text the way Prepare does and lists what it
// offers. Text with problems gives their list and no candidates. Every
// slice of the result is non-nil, so it encodes as [] rather than null.
func Inspect(text string) Inspection {
	in, _ := InspectParsed(text)
	return in
}

// InspectParsed is Inspect that also returns the parsed circuit, for
// PrepareParsed; it is nil when the text has problems or is over the node
// limit.
func InspectParsed(text string) (Inspection, *circuit.Circuit) {
	in := Inspection{References: []InspectedPart{}, Sources: []InspectedPart{}, Ports: []InspectedPort{}, Nodes: []string{}, Errors: []ErrorBody{}}
	if p := sizeProblem(text); p != nil {
		in.Errors = append(in.Errors, ErrorBody{Line: p.Line, Column: p.Column, Message: p.Msg})
		return in, nil
	}
	c, err := circuit.Parse(text)
	if err != nil {
		var list circuit.ErrorList
		if errors.As(err, &list) {
			for _, e := range list {
				in.Errors = append(in.Errors, ErrorBody{Line: e.Line, Column: e.Column, Message: e.Msg})
			}
		} else {
			in.Errors = append(in.Errors, ErrorBody{Line: 1, Column: 1, Message: err.Error()})
		}
		return in, nil
	}
	if n := len(c.Nodes) - 1; n > feedback.MaxNodes {
		in.Limit = fmt.Sprintf("the circuit has %d nodes; zport analyzes up to %d so the page stays responsive", n, feedback.MaxNodes)
		return in, nil
	}
	for _, p := range c.Parts {
		ip := InspectedPart{Name: p.Name, Kind: p.Kind.String(), Line: p.Line}
		switch {
		case p.Kind.Controlled():
			in.References = append(in.References, ip)
		case p.Kind == circuit.VSource || p.Kind == circuit.ISource:
			in.Sources = append(in.Sources, ip)
		}
	}
	for _, p := range c.Ports {
		in.Ports = append(in.Ports, InspectedPort{Name: p.Name, A: c.Nodes[p.A], B: c.Nodes[p.B], Line: p.Line})
	}
	in.Nodes = append(in.Nodes, c.Nodes[circuit.Gnd+1:]...)
	return in, c
}
