package calc

import (
	"encoding/json"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/site/fragment"
)

// Fragment keys of a circuit form (the custom-circuit page). The circuit
// text itself travels under keyCircuit, compressed by the page's script
// (deflate-raw, then base64url), which takes it out before the rest of the
// fragment reaches ReadCircuitFragment.
const (
	keyCircuit   = "c"
	keyReference = "ref"
	keyPort      = "port" // repeated, one per port, in order
	keySource    = "src"
	keyOutput    = "out"
)

// maxFragmentPorts bounds the ports a circuit fragment may list.
const maxFragmentPorts = 32

// CircuitState writes the settings of a circuit form, everything but the
// circuit text, as a URL fragment (without "#"): the reference, each port,
// the gain's source and output, the spot frequency and the sweep, then the
// analyses' settings, e.g.
//
//	ref=U1&port=out&port=in&src=Vin&out=out&f=100k&from=10&to=100M&points=400
//
// The page puts the compressed circuit text in front, under the key c.
func (f Form) CircuitState() string {
	var p fragment.Pairs
	if f.Reference != "" {
		p.Add(keyReference, f.Reference)
	}
	for _, port := range f.Ports {
		p.Add(keyPort, port)
	}
	if f.Gain != nil && f.Gain.Source != "" {
		p.Add(keySource, f.Gain.Source)
		p.Add(keyOutput, f.Gain.Output)
	}
	f.analysisState(&p)
	f.circuitPinState(&p)
	return p.Encode()
}

// choices collects what a circuit's link says of a design's reference,
// ports and gain (the keys ref, port, src and out), the current design's
// or a pin's.
type choices struct {
	ref      *string
	ports    []string // nil: not given; one empty port value gives none
	src, out *string
}

// read takes the pair k=v, whose key in the link is key (for messages):
// false when k is none of the choices' keys, an error when the link lists
// more ports than it may; what names the design ("the link", "pin 2").
func (c *choices) read(k, v, key, what string) (bool, error) {
	switch k {
	case keyReference:
		c.ref = &v
	case keyPort:
		if len(c.ports) == maxFragmentPorts {
			return true, &fragment.Error{Key: key, Msg: what + " lists more than " + strconv.Itoa(maxFragmentPorts) + " ports"}
		}
		if c.ports == nil {
			c.ports = []string{}
		}
		if v != "" {
			c.ports = append(c.ports, v)
		}
	case keySource:
		c.src = &v
	case keyOutput:
		c.out = &v
	default:
		return false, nil
	}
	return true, nil
}

// apply puts the choices the link gave over f's; the gain's src and out
// come together (gain names the gain in the message).
func (c *choices) apply(f *Form, gain string) error {
	if (c.src == nil) != (c.out == nil) {
		return &fragment.Error{Msg: gain + " needs both “src” and “out”"}
	}
	if c.ref != nil {
		f.Reference = *c.ref
	}
	if c.ports != nil {
		f.Ports = c.ports
	}
	if c.src != nil {
		f.Gain = nil
		if *c.src != "" {
			f.Gain = &api.GainSpec{Source: *c.src, Output: *c.out}
		}
	}
	return nil
}

// CircuitLinkState is the circuit-form state that reproduces a topology's
// analysis on the custom-circuit page: the topology's reference, ports and
// gain, the response's spot frequency and its sweep. It is "" for a
// response that is not a topology's.
func CircuitLinkState(resp *api.Response) string {
	t := resp.Topology
	if t == nil {
		return ""
	}
	f := Form{Reference: t.Reference, Ports: t.Ports, Gain: t.Gain, Frequency: Syntax(resp.Frequency)}
	if s := resp.Sweep; s != nil && len(s.Frequency) > 1 {
		f.Sweep = SweepForm{From: Syntax(s.Frequency[0]), To: Syntax(s.Frequency[len(s.Frequency)-1]), Points: strconv.Itoa(len(s.Frequency))}
	}
	return f.CircuitState()
}

// CircuitRequest is one edit on the custom-circuit page: the form as the
// page holds it, and what its pickers offered before the edit.
type CircuitRequest struct {
	Form
	// Offered lists the references and port lines the pickers showed
	// before the edit, so that Fit can tell what is new in the text. Nil
	// means that the form's choices are exact (an example's or a link's
	// settings): nothing new is chosen for the user.
	Offered *Offered `json:"offered"`
	// PinCircuits are the texts of a link's pins, by slot ("1" … "4"), as
	// the page read them from pinN.c; a pin without one has the link's
	// main text.
	PinCircuits map[string]string `json:"pinCircuits,omitempty"`
}

// Offered is what the custom page's pickers showed.
type Offered struct {
	References []string `json:"references"`
	Ports      []string `json:"ports"`
	// Sources are the independent sources the gain picker offered; nil
	// when the page does not say.
	Sources []string `json:"sources,omitempty"`
}

// CircuitOutput is the answer to a CircuitRequest.
type CircuitOutput struct {
	// Inspection is what the text offers, or every problem in it.
	Inspection api.Inspection `json:"inspection"`
	// Form is the request's form fitted to the text (see Form.Fit), with
	// the link's settings read when it carried a Fragment; the page sets
	// its pickers from it. Nil when the text cannot be analyzed. Here and
	// in Output.Form the circuit text is left out: the page has it.
	Form *Form `json:"form,omitempty"`
	// Output is the analysis of Form; nil when the text cannot be
	// analyzed.
	Output *Output `json:"output,omitempty"`
}

// ComputeCircuit answers one edit of the custom-circuit page: it parses
// the text once, lists what it offers, fits the form's choices to it,
// reads a link's settings over them, and analyzes. It never panics.
func ComputeCircuit(req CircuitRequest) (out CircuitOutput) {
	defer func() {
		if r := recover(); r != nil {
			out.Form = nil
			out.Output = &Output{Error: &api.ErrorBody{Message: fmt.Sprintf("internal error: %v (please report this circuit)", r)}}
		}
	}()
	ins, c := api.InspectParsed(req.Circuit)
	out.Inspection = ins
	if c == nil {
		return out
	}
	if req.Fragment != nil {
		// A link's settings stand on the circuit's defaults, not on what
		// the page showed before: its choices are made afresh for the text.
		req.Reference, req.Ports, req.Gain, req.Offered = "", nil, nil, &Offered{}
		req.Frequency, req.Sweep, req.Settings = circuitDefaults.Frequency, circuitDefaults.Sweep, nil
	}
	// A circuit without a controlled source has no reference (Fit leaves
	// it empty): it gets the direct solution and its noise.
	f := req.Form.Fit(ins, req.Offered)
	var refused []Refusal
	if f.Fragment != nil {
		f, refused = readLink(*f.Fragment, f, nil, c)
		f.Fragment = nil
		for i := range f.Pins {
			if t, ok := req.PinCircuits[strconv.Itoa(f.Pins[i].Slot)]; ok {
				f.Pins[i].Circuit = t
			}
		}
	}
	o := compute(f, c)
	o.Refused, o.Notice = refused, LinkNotice(refused, true)
	// The page has the text; echoing it twice would only make the answer
	// longer (a pasted file is up to api.MaxCircuitBytes).
	f = withoutTexts(f)
	if o.Form != nil {
		g := withoutTexts(*o.Form)
		o.Form = &g
	}
	out.Form, out.Output = &f, &o
	return out
}

// withoutTexts is f without its circuit text and its pins' texts.
func withoutTexts(f Form) Form {
	f.Circuit = ""
	if len(f.Pins) > 0 {
		f.Pins = slices.Clone(f.Pins)
		for i := range f.Pins {
			f.Pins[i].Circuit = ""
		}
	}
	return f
}

// ComputeCircuitJSON is ComputeCircuit on JSON: a CircuitRequest in, a
// CircuitOutput out. It never panics and always returns a JSON object.
func ComputeCircuitJSON(in []byte) []byte {
	var req CircuitRequest
	dec := json.NewDecoder(strings.NewReader(string(in)))
	dec.DisallowUnknownFields()
	var out CircuitOutput
	if err := dec.Decode(&req); err != nil {
		out = CircuitOutput{Inspection: api.Inspect(""), Output: &Output{Error: &api.ErrorBody{Message: "the page's request is not valid: " + err.Error()}}}
	} else {
		out = ComputeCircuit(req)
	}
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false) // read with JSON.parse, never as HTML
	if err := enc.Encode(out); err != nil {
		b.Reset()
		_ = enc.Encode(CircuitOutput{Inspection: api.Inspect(""), Output: &Output{Error: &api.ErrorBody{Message: "internal error: " + err.Error()}}})
	}
	return []byte(strings.TrimSuffix(b.String(), "\n"))
}

// Fit returns the form with its choices fitted to the circuit text that
// in describes, so that an edit of the text never leaves the pickers
// naming parts that are gone:
//
//   - a reference that is gone is replaced by a reference new in the text
//     (a part just added or renamed), else by the first;
//   - port lines stay ticked or unticked by name, a port line new in the
//     text is ticked, and a "NODE" or "NODE,NODE" port stays while its
//     nodes do;
//   - a gain whose source or output node is gone is dropped;
//   - with no gain, a text with exactly one independent source that is new
//     in it (offered lists the sources) gets the gain from that source to
//     the node "out", else to the + node of its last port line.
//
// What is new is what offered does not list; with offered nil nothing is
// new, and the form's own choices are kept exactly where they still fit.
func (f Form) Fit(in api.Inspection, offered *Offered) Form {
	var o Offered
	if offered != nil {
		o = *offered
	}
	isNew := func(list []string, name string) bool { return offered != nil && !slices.Contains(list, name) }

	var refs []string
	for _, r := range in.References {
		refs = append(refs, r.Name)
	}
	if !slices.Contains(refs, f.Reference) {
		f.Reference = ""
		for _, r := range refs {
			if isNew(o.References, r) {
				f.Reference = r
				break
			}
		}
		if f.Reference == "" && len(refs) > 0 {
			f.Reference = refs[0]
		}
	}

	nodes := map[string]bool{"gnd": true}
	for _, n := range in.Nodes {
		nodes[n] = true
	}
	nodePort := func(p string) bool {
		a, b, pair := strings.Cut(p, ",")
		a, b = strings.TrimSpace(a), strings.TrimSpace(b)
		if !pair {
			return a != "gnd" && nodes[a]
		}
		return a != b && nodes[a] && nodes[b]
	}
	var lines []string
	ports := []string{}
	for _, p := range in.Ports {
		lines = append(lines, p.Name)
		if slices.Contains(f.Ports, p.Name) || isNew(o.Ports, p.Name) {
			ports = append(ports, p.Name)
		}
	}
	for _, p := range f.Ports {
		if !slices.Contains(lines, p) && nodePort(p) && !slices.Contains(ports, p) {
			ports = append(ports, p)
		}
	}
	f.Ports = ports

	if g := f.Gain; g != nil {
		found := false
		for _, s := range in.Sources {
			found = found || s.Name == g.Source
		}
		if !found || !nodePort(g.Output) {
			f.Gain = nil
		}
	}
	// Sources nil: the page did not say what it offered (no choice made).
	if f.Gain == nil && len(in.Sources) == 1 && o.Sources != nil && isNew(o.Sources, in.Sources[0].Name) {
		out := ""
		switch {
		case nodes["out"]:
			out = "out"
		case len(in.Ports) > 0 && in.Ports[len(in.Ports)-1].A != "gnd":
			out = in.Ports[len(in.Ports)-1].A
		}
		if out != "" {
			f.Gain = &api.GainSpec{Source: in.Sources[0].Name, Output: out}
		}
	}
	return f
}
