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
	return p.Encode()
}

// ReadCircuitFragment reads a URL fragment written by CircuitState (with
// or without "#") over base: settings the fragment leaves out keep base's
// values; port keys, when present, replace base's ports; src and out come
// together. Like ReadFragment, it refuses the whole fragment when any part
// of it is malformed or unknown, returning base unchanged. The keys p (the
// single-file export's page) and c (the circuit text, read by the page's
// script) are skipped.
func ReadCircuitFragment(frag string, base Form) (Form, error) {
	pairs, err := fragment.Parse(frag, fragment.Repeatable(keyPort), fragment.Skip(keyCircuit, keyPage))
	if err != nil {
		return base, err
	}
	f := base
	settings := settingsRead{}
	var ports []string
	var src, out *string
	for _, pr := range pairs {
		k, v := pr.Key, pr.Value
		switch k {
		case keyPort:
			if len(ports) == maxFragmentPorts {
				return base, &fragment.Error{Key: k, Msg: "the link lists more than " + strconv.Itoa(maxFragmentPorts) + " ports"}
			}
			ports = append(ports, v)
		case keyReference:
			f.Reference = v
		case keySource:
			src = &v
		case keyOutput:
			out = &v
		case keyFrequency:
			f.Frequency = v
		case keyFrom:
			f.Sweep.From = v
		case keyTo:
			f.Sweep.To = v
		case keyPoints:
			f.Sweep.Points = v
		default:
			if !settings.read(k, v) {
				return base, &fragment.Error{Key: k, Msg: "unknown setting " + strconv.Quote(k) + " for a circuit"}
			}
		}
	}
	if (src == nil) != (out == nil) {
		return base, &fragment.Error{Msg: "the gain needs both “src” and “out”"}
	}
	if ports != nil {
		f.Ports = ports
	}
	if src != nil {
		f.Gain = nil
		if *src != "" {
			f.Gain = &api.GainSpec{Source: *src, Output: *out}
		}
	}
	f.Settings = settings.over(base.Settings)
	return f, nil
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
}

// Offered is what the custom page's pickers showed.
type Offered struct {
	References []string `json:"references"`
	Ports      []string `json:"ports"`
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
	// A circuit without a controlled source has no reference (Fit leaves
	// it empty): it gets the direct solution and its noise.
	f := req.Form.Fit(ins, req.Offered)
	if f.Fragment != nil {
		g, err := ReadCircuitFragment(*f.Fragment, f)
		f.Fragment, g.Fragment = nil, nil
		if err != nil {
			f.Circuit = ""
			out.Form = &f
			out.Output = &Output{Error: &api.ErrorBody{Param: FieldFragment, Message: err.Error()}}
			return out
		}
		f = g
	}
	o := compute(f, c)
	// The page has the text; echoing it twice would only make the answer
	// longer (a pasted file is up to api.MaxCircuitBytes).
	f.Circuit = ""
	if o.Form != nil {
		o.Form.Circuit = ""
	}
	out.Form, out.Output = &f, &o
	return out
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
//   - a gain whose source or output node is gone is dropped.
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
	return f
}
