package calc

import (
	"encoding/json"
	"fmt"
	"slices"
	"strings"
	"time"

	"zport/engine/api"
	"zport/engine/circuit"
)

// Output is a rendered panel, or the error that stopped it.
type Output struct {
	HTML     string `json:"html,omitempty"`
	Markdown string `json:"markdown,omitempty"`
	// CSV is the sweep as comma-separated values, when Form.CSV asked.
	CSV string `json:"csv,omitempty"`
	// State is the form as a URL fragment: a topology's (see Form.State),
	// or a circuit's settings without its text (see Form.CircuitState).
	State string `json:"state,omitempty"`
	// Form is the form that was computed, with every default filled in;
	// a page reading a fragment fills its inputs from it.
	Form *Form `json:"form,omitempty"`
	// SweepCut, when set, says that the sweep was shortened to fit
	// Form.Budget.
	SweepCut *SweepCut `json:"sweepCut,omitempty"`
	// Refused lists the settings of the form's link (Form.Fragment) that
	// were not used, and Notice says so in a sentence for the page; the
	// rest of the link is in Form.
	Refused []Refusal `json:"refused,omitempty"`
	Notice  string    `json:"notice,omitempty"`
	// Error names the field at fault (Param) or the place in circuit text.
	Error *api.ErrorBody `json:"error,omitempty"`
}

// Compute analyzes a form and renders its panel. It never panics: a panic
// inside the engine or the renderer becomes an internal error in Output.
func Compute(f Form) Output { return compute(f, nil) }

// compute is Compute; parsed, when not nil, is the form's circuit text
// parsed already (see ComputeCircuit).
func compute(f Form, parsed *circuit.Circuit) (out Output) {
	defer func() {
		if r := recover(); r != nil {
			out = Output{Error: &api.ErrorBody{Message: fmt.Sprintf("internal error: %v (please report the settings that caused it)", r)}}
		}
	}()
	var entry *api.CatalogEntry
	if f.Topology != "" {
		e, ok := api.LookupEntry(f.Topology)
		if !ok {
			return Output{Error: &api.ErrorBody{Param: "topology", Message: fmt.Sprintf("no stage %q in the catalog", f.Topology)}}
		}
		entry = &e
		f = f.withDefaults(e)
	}
	if f.Fragment != nil {
		// A link stands on the page's defaults, not on what the page showed
		// before it: a setting it leaves out or that is refused takes its
		// default.
		base := f
		if entry != nil {
			base = DefaultForm(*entry)
			base.ID, base.Budget, base.CSV = f.ID, f.Budget, f.CSV
		}
		var refused []Refusal
		f, refused = readLink(*f.Fragment, base, entry, parsed)
		f.Fragment = nil
		defer func() { out.Refused, out.Notice = refused, LinkNotice(refused, entry == nil) }()
	}
	if bad := checkPins(f.Pins); bad != nil {
		return Output{Error: bad}
	}
	f.Pins = slices.Clone(f.Pins)
	if entry != nil {
		for i := range f.Pins {
			f.Pins[i].Params = f.design(f.Pins[i]).withDefaults(*entry).Params
		}
	}
	req, bad := f.ask(entry)
	if bad != nil {
		return Output{Error: bad}
	}
	resp, cut, err := analyzeWithin(req, time.Duration(f.Budget*float64(time.Millisecond)), parsed)
	if err != nil {
		body := api.Body(err)
		return Output{Error: &body}
	}
	pins := analyzePins(&f, entry, effectiveSweep(req.Sweep, cut))
	out = Output{
		HTML:     Panel(&f, entry, resp, pins...),
		Markdown: CopyText(&f, entry, resp, pins...),
		Form:     &f,
		SweepCut: cut,
	}
	if f.CSV {
		out.CSV = CSV(&f, entry, resp)
		f.CSV = false
	}
	f.Link = ""
	if entry != nil {
		out.State = f.State(*entry)
	} else {
		out.State = f.CircuitState()
	}
	return out
}

// Request is the engine request a calculator sends for f, a form with its
// defaults filled in (as Output.Form has it): the base request and what
// every analysis asks. A test that holds a page to the native engine
// builds its request the same way.
func (f Form) Request() (api.Request, *api.ErrorBody) {
	var entry *api.CatalogEntry
	if f.Topology != "" {
		e, ok := api.LookupEntry(f.Topology)
		if !ok {
			return api.Request{}, &api.ErrorBody{Param: "topology", Message: fmt.Sprintf("no stage %q in the catalog", f.Topology)}
		}
		entry = &e
	}
	return f.ask(entry)
}

// ask turns the form into the engine's request: its own fields, then each
// analysis's Ask; an error names the field or setting at fault.
func (f Form) ask(entry *api.CatalogEntry) (api.Request, *api.ErrorBody) {
	req, bad := f.request()
	if bad != nil {
		return req, bad
	}
	for _, a := range Analyses {
		if a.Ask != nil {
			if bad := a.Ask(&req, a.context(&f, entry, nil)); bad != nil {
				return req, bad
			}
		}
	}
	return req, nil
}

// ComputeJSON is Compute on JSON: a Form in, an Output out. It never
// panics and always returns a JSON object.
func ComputeJSON(in []byte) []byte {
	var f Form
	dec := json.NewDecoder(strings.NewReader(string(in)))
	dec.DisallowUnknownFields()
	var out Output
	if err := dec.Decode(&f); err != nil {
		out = Output{Error: &api.ErrorBody{Message: "the calculator's request is not valid: " + err.Error()}}
	} else {
		out = Compute(f)
	}
	// The page parses the answer with JSON.parse, not as HTML, so the
	// markup need not be escaped as \u003c: that only makes it longer.
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(out); err != nil {
		b.Reset()
		_ = enc.Encode(Output{Error: &api.ErrorBody{Message: "internal error: " + err.Error()}})
	}
	return []byte(strings.TrimSuffix(b.String(), "\n"))
}
