package render

import (
	"encoding/json"
	"fmt"
	"strconv"
	"strings"

	"zport/engine/aids"
	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/value"
)

// This file renders the design-aid section of a calculator: the settings
// form (AidsForm), the fast panels (AidsPanels: standard values and
// sensitivity) and the tolerance study run in slices (StartTolerance and
// TolerancePanel). Page script sends an AidsInput and inserts the HTML of
// an AidsOutput; the bridge (zport/wasm) exposes each as one function.

// AidsInput is what a page sends for the design aids: the circuit — a
// calculator's Form, or an engine Request for a circuit of the page's own —
// the study settings, and the prefix of the element ids.
type AidsInput struct {
	Form    *Form        `json:"form,omitempty"`
	Request *api.Request `json:"request,omitempty"`
	Study   Study        `json:"study"`
	ID      string       `json:"id,omitempty"`
	// Fragment, when set, is read as the study (ReadStudy) in place of
	// Study: a page restoring its settings from a share link.
	Fragment *string `json:"fragment,omitempty"`
	// Only limits AidsPanels to one panel, "standard" or "sensitivity",
	// so that a page can compute them in separate short tasks.
	Only string `json:"only,omitempty"`
}

// AidsOutput is a rendered piece of the design-aid section, or the error
// that stopped it. Which fields are set depends on the call.
type AidsOutput struct {
	// HTML is the settings form (AidsForm) or the tolerance panel.
	HTML string `json:"html,omitempty"`
	// Standard and Sensitivity are the fast panels (AidsPanels); each may
	// instead carry its own error in StandardError or SensitivityError.
	Standard         string         `json:"standard,omitempty"`
	StandardError    *api.ErrorBody `json:"standardError,omitempty"`
	Sensitivity      string         `json:"sensitivity,omitempty"`
	SensitivityError *api.ErrorBody `json:"sensitivityError,omitempty"`
	// Parts identifies what the settings form lists (parts, nominal
	// values, opamps, ports); a page re-renders the form when it changes.
	Parts string `json:"parts,omitempty"`
	// Study is the study the call used, State the same as URL fragment
	// pairs ("aid.tol=F&…").
	Study *Study `json:"study,omitempty"`
	State string `json:"state,omitempty"`
	// Done and Total count a tolerance run's units of work.
	Done  int            `json:"done,omitempty"`
	Total int            `json:"total,omitempty"`
	Error *api.ErrorBody `json:"error,omitempty"`
}

func errOut(param, format string, args ...any) AidsOutput {
	return AidsOutput{Error: &api.ErrorBody{Param: param, Message: fmt.Sprintf(format, args...)}}
}

// base returns the engine request of in without any design-aid key or
// sweep (the aids work at the spot frequency), and the catalog entry when
// it is a catalog stage.
func (in AidsInput) base() (api.Request, *api.CatalogEntry, *api.ErrorBody) {
	switch {
	case in.Form != nil && in.Request != nil:
		return api.Request{}, nil, &api.ErrorBody{Message: "give the circuit as “form” or as “request”, not both"}
	case in.Form != nil:
		f := *in.Form
		var entry *api.CatalogEntry
		if f.Topology != "" {
			e, ok := api.LookupEntry(f.Topology)
			if !ok {
				return api.Request{}, nil, &api.ErrorBody{Param: "topology", Message: fmt.Sprintf("no stage %q in the catalog", f.Topology)}
			}
			f, entry = f.withDefaults(e), &e
		}
		f.Fragment, f.Sweep, f.Study = nil, SweepForm{}, nil
		req, bad := f.request()
		return req, entry, bad
	case in.Request != nil:
		req := *in.Request
		req.Sweep, req.Tolerance, req.StandardValues, req.Sensitivity = nil, nil, nil, nil
		var entry *api.CatalogEntry
		if req.Topology != "" {
			if e, ok := api.LookupEntry(req.Topology); ok {
				entry = &e
			}
		}
		return req, entry, nil
	}
	return api.Request{}, nil, &api.ErrorBody{Message: "no circuit: give a calculator “form” or an engine “request”"}
}

// study returns the study of in: Study, or the one read from Fragment.
func (in AidsInput) study() (Study, *api.ErrorBody) {
	if in.Fragment == nil {
		return in.Study, nil
	}
	s, err := ReadStudy(*in.Fragment)
	if err != nil {
		return Study{}, &api.ErrorBody{Param: FieldFragment, Message: err.Error()}
	}
	return s, nil
}

func (in AidsInput) id() string {
	if in.ID == "" {
		return "calc"
	}
	return in.ID
}

// ---- what the form lists ----

// aidPart is a passive part that can take a tolerance.
type aidPart struct {
	Name, Unit, Meaning string
	Nominal             float64
	// Default parts take the default tolerance; the others (a stage's
	// source and load) are held at nominal unless given one.
	Default bool
}

// aidAmp is an opamp whose a0 and gbw can get a min–typ spread; a zero
// typical value means the opamp has no such number.
type aidAmp struct {
	Name    string
	A0, GBW float64
}

type aidInfo struct {
	Parts []aidPart
	Amps  []aidAmp
	Ports []api.PortInfo
	// Gain is the gain's unit ("V/V", "V/A"), "" without a gain.
	Gain string
}

// key identifies what the form shows, for AidsOutput.Parts.
func (ai aidInfo) key() string {
	var b strings.Builder
	for _, p := range ai.Parts {
		fmt.Fprintf(&b, "%s %s %t %s;", p.Name, p.Unit, p.Default, num(p.Nominal))
	}
	b.WriteByte('|')
	for _, a := range ai.Amps {
		fmt.Fprintf(&b, "%s %s %s;", a.Name, num(a.A0), num(a.GBW))
	}
	b.WriteByte('|')
	for _, p := range ai.Ports {
		b.WriteString(p.Name + ";")
	}
	b.WriteString("|" + ai.Gain)
	return b.String()
}

// info lists what the design aids can vary and read for req, by the rules
// of the contract (DEVELOPERS.md, "Design aids in the JSON contract").
func info(req api.Request, entry *api.CatalogEntry) (aidInfo, *api.ErrorBody) {
	p, err := api.Prepare(req)
	if err != nil {
		body := api.Body(err)
		return aidInfo{}, &body
	}
	var params []aids.Param
	meaning := map[string]string{}
	if p.Stage != nil {
		params, _ = aids.StageParams(p.Stage, p.Values, p.Circuit)
		if entry != nil {
			for _, pi := range entry.Params {
				meaning[pi.Name] = pi.Meaning
			}
		}
	} else {
		params = aids.CircuitParams(p.Circuit)
	}
	var ai aidInfo
	amps := map[int]int{} // circuit part → index in ai.Amps
	for _, par := range params {
		switch par.Class {
		case aids.Passive:
			ai.Parts = append(ai.Parts, aidPart{Name: par.Name, Unit: par.Unit, Nominal: par.Nominal, Default: par.Default, Meaning: meaning[par.Name]})
		case aids.AmpSpread:
			if par.Part < 0 || p.Circuit.Parts[par.Part].Kind != circuit.OpAmp {
				continue
			}
			i, ok := amps[par.Part]
			if !ok {
				i = len(ai.Amps)
				amps[par.Part] = i
				ai.Amps = append(ai.Amps, aidAmp{Name: p.Circuit.Parts[par.Part].Name})
			}
			switch par.Field {
			case aids.FieldA0:
				ai.Amps[i].A0 = par.Nominal
			case aids.FieldGBW:
				ai.Amps[i].GBW = par.Nominal
			}
		}
	}
	for _, pt := range p.Analyzer.Ports {
		pi := api.PortInfo{Name: pt.Name}
		if entry != nil {
			for _, e := range entry.Ports {
				if e.Name == pt.Name {
					pi.Title = e.Title
				}
			}
		}
		ai.Ports = append(ai.Ports, pi)
	}
	if g := p.Analyzer.Gain; g != nil {
		ai.Gain = "V/V"
		if src, ok := p.Circuit.Part(g.SourceName); ok && src.Kind == circuit.ISource {
			ai.Gain = "V/A"
		}
	}
	return ai, nil
}

// ---- the settings form ----

// AidsForm renders the design-aid section's settings for the circuit of
// in, filled in from its study, with empty result areas for the page to
// fill: the tolerance study's inputs and Run/Cancel controls, the
// standard-value series, and the sensitivity area. Nothing is computed
// but the list of parts.
func AidsForm(in AidsInput) (out AidsOutput) {
	defer recoverAids(&out)
	req, entry, bad := in.base()
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	st, bad := in.study()
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	ai, bad := info(req, entry)
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	f := &aidForm{id: in.id(), st: st, ai: ai}
	f.write()
	return AidsOutput{HTML: f.w.String(), Parts: ai.key(), Study: &st, State: st.State()}
}

type aidForm struct {
	w  writer
	id string
	st Study
	ai aidInfo
}

// tolCodes are the IEC 60062 tolerance letters the form offers.
var tolCodes = []struct{ letter, text string }{
	{"B", "±0.1 %"}, {"C", "±0.25 %"}, {"D", "±0.5 %"}, {"F", "±1 %"},
	{"G", "±2 %"}, {"J", "±5 %"}, {"K", "±10 %"}, {"M", "±20 %"}, {"none", "held at nominal"},
}

func (f *aidForm) write() {
	w := &f.w
	w.open("div", "class", "aids-body", "id", f.id+"-aids-body")
	w.open("p", "class", "explain")
	w.text("Three questions after “what is the impedance”: how far it spreads with part tolerances, which standard values to buy, and which part it depends on most. Everything is computed at the calculator’s spot frequency; the tolerance study runs only when you press Run.")
	w.close("p")
	f.tolerance()
	f.standard()
	f.sensitivity()
	w.close("div")
}

// field writes one labelled text input of the study.
func (f *aidForm) field(key, label, hint, val, param string, extra ...string) {
	w := &f.w
	id := f.id + "-aid-" + key
	w.open("div", "class", "field")
	w.elem("label", label, "for", id)
	attrs := append([]string{"id", id, "type", "text", "value", val, "data-study", key, "data-param", param,
		"spellcheck", "false", "autocapitalize", "off", "autocomplete", "off", "aria-describedby", id + "-hint " + id + "-msg"}, extra...)
	w.open("span", "class", "input-unit")
	w.open("input", attrs...)
	w.close("span")
	w.elem("span", hint, "class", "range", "id", id+"-hint")
	w.elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.close("div")
}

func (f *aidForm) selectField(key, label, param string, options [][2]string, selected string) {
	w := &f.w
	id := f.id + "-aid-" + key
	w.open("div", "class", "field")
	w.elem("label", label, "for", id)
	w.open("select", "id", id, "data-study", key, "data-param", param, "aria-describedby", id+"-msg")
	for _, o := range options {
		sel := ""
		if o[0] == selected {
			sel = "selected"
		}
		w.elem("option", o[1], "value", o[0], "selected?", sel)
	}
	w.close("select")
	w.elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.close("div")
}

func or(s, def string) string {
	if strings.TrimSpace(s) == "" {
		return def
	}
	return s
}

func (f *aidForm) tolerance() {
	w := &f.w
	st := f.st
	h := f.id + "-aid-tol-h"
	w.open("section", "class", "aid aid-tol", "aria-labelledby", h)
	w.elem("h3", "Tolerance spread", "id", h)
	w.elem("p", "Monte Carlo trials draw every part within its tolerance (and the op amp between its minimum and typical a0 and gbw); the worst-case corners put every part at a limit. Both report each port’s |Z| and phase, the gain and the phase margin.", "class", "explain")
	list := f.id + "-aid-codes"
	w.open("datalist", "id", list)
	for _, c := range tolCodes {
		w.elem("option", c.text, "value", c.letter)
	}
	w.close("datalist")
	w.open("form", "class", "aid-form", "data-role", "tolerance-form", "novalidate?", "yes", "autocomplete", "off")

	w.open("fieldset", "class", "aid-set aid-parts-set")
	w.elem("legend", "Part tolerances")
	f.field("tolerance", "Default tolerance", "IEC 60062 letter (B 0.1 %, C 0.25 %, D 0.5 %, F 1 %, G 2 %, J 5 %, K 10 %, M 20 %), a percentage such as 0.5%, or none", or(st.Tolerance, DefaultTolerance), "tolerance.default", "list", list)
	if len(f.ai.Parts) > 0 {
		w.open("div", "class", "table-wrap")
		w.open("table", "class", "aid-parts")
		w.elem("caption", "Per-part tolerance (empty: the default for the network’s parts; parts of the source and load stay at their nominal values unless given one)")
		w.open("thead")
		w.open("tr")
		w.elem("th", "Part", "scope", "col")
		w.elem("th", "Nominal", "scope", "col")
		w.elem("th", "Tolerance", "scope", "col")
		w.close("tr")
		w.close("thead")
		w.open("tbody")
		for _, p := range f.ai.Parts {
			id := f.id + "-aid-part-" + cleanID(p.Name)
			w.open("tr", "data-part", p.Name)
			w.open("th", "scope", "row")
			w.elem("label", p.Name, "for", id, "class", "port-name")
			if p.Meaning != "" {
				w.elem("span", p.Meaning, "class", "hint")
			}
			w.close("th")
			w.elem("td", magnitude(p.Nominal, p.Unit), "class", "num")
			w.open("td")
			ph := "default"
			if !p.Default {
				ph = "held"
			}
			w.open("input", "id", id, "type", "text", "value", st.Parts[p.Name], "placeholder", ph, "list", list,
				"data-study", "part", "data-name", p.Name, "data-param", "tolerance.parts."+p.Name,
				"spellcheck", "false", "autocapitalize", "off", "autocomplete", "off", "aria-describedby", id+"-msg", "size", "7")
			w.elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
			w.close("td")
			w.close("tr")
		}
		w.close("tbody")
		w.close("table")
		w.close("div")
	} else {
		w.elem("p", "This circuit has no resistor, capacitor or inductor to give a tolerance.", "class", "hint")
	}
	w.close("fieldset")

	if len(f.ai.Amps) > 0 {
		w.open("fieldset", "class", "aid-set")
		w.elem("legend", "Op amp spread (guaranteed minimum to typical)")
		for _, a := range f.ai.Amps {
			as := st.Amps[a.Name]
			if a.A0 > 0 {
				f.field("a0Min-"+cleanID(a.Name), a.Name+" a₀ minimum", "typical "+plain(a.A0)+"; empty: fixed at typical",
					as.A0Min, "tolerance.amps."+a.Name+".a0Min", "data-name", a.Name, "placeholder", "fixed")
			}
			if a.GBW > 0 {
				f.field("gbwMin-"+cleanID(a.Name), a.Name+" GBW minimum", "typical "+value.Format(a.GBW, "Hz", sig)+"; empty: fixed at typical",
					as.GBWMin, "tolerance.amps."+a.Name+".gbwMin", "data-name", a.Name, "placeholder", "fixed")
			}
		}
		w.close("fieldset")
	}

	w.open("fieldset", "class", "aid-set")
	w.elem("legend", "Trials")
	f.selectField("distribution", "Distribution", FieldDistribution,
		[][2]string{{"uniform", "uniform between the limits"}, {"normal", "normal, tolerance = 3σ"}}, or(st.Distribution, "uniform"))
	w.open("div", "class", "field seed-field")
	id := f.id + "-aid-seed"
	w.elem("label", "Seed", "for", id)
	w.open("span", "class", "input-unit")
	w.open("input", "id", id, "type", "text", "inputmode", "numeric", "value", or(st.Seed, DefaultSeed), "data-study", "seed", "data-param", FieldSeed,
		"spellcheck", "false", "autocomplete", "off", "aria-describedby", id+"-hint "+id+"-msg")
	w.elem("button", "New", "type", "button", "class", "quiet", "data-aid-action", "new-seed", "aria-label", "Draw a new seed")
	w.close("span")
	w.elem("span", "the same seed gives the same trials; it goes into the link", "class", "range", "id", id+"-hint")
	w.elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.close("div")
	f.field("trials", "Trials", "1 to "+strconv.Itoa(api.MaxTrials), or(st.Trials, DefaultTrials), FieldTrials, "inputmode", "numeric")
	w.close("fieldset")

	w.open("fieldset", "class", "aid-set aid-targets")
	w.elem("legend", "Targets: a trial misses when …")
	w.open("ol", "class", "target-list", "data-role", "targets")
	for i, t := range st.Targets {
		f.targetRow(i, t)
	}
	w.close("ol")
	w.open("template", "data-role", "target-row")
	def := TargetStudy{Quantity: "pm", Op: "<", Value: "45"}
	if len(f.ai.Ports) > 0 {
		def = TargetStudy{Quantity: "z", Port: f.ai.Ports[len(f.ai.Ports)-1].Name, Op: ">", Value: ""}
	}
	f.targetRow(-1, def)
	w.close("template")
	w.elem("button", "Add a target", "type", "button", "class", "quiet", "data-aid-action", "add-target")
	w.close("fieldset")

	w.open("div", "class", "aid-run")
	w.elem("button", "Run the study", "type", "submit", "data-aid-action", "run")
	w.elem("button", "Cancel", "type", "button", "class", "quiet", "data-aid-action", "cancel", "disabled?", "yes")
	w.open("progress", "data-role", "progress", "max", "1", "value", "0", "hidden?", "yes", "aria-label", "Trials run")
	w.close("progress")
	w.elem("span", "", "class", "run-status", "data-role", "run-status", "role", "status")
	w.close("div")
	w.elem("p", "", "class", "calc-notice", "data-role", "tolerance-msg", "role", "alert", "hidden?", "yes")
	w.close("form")
	w.elem("div", "", "class", "aid-results", "data-role", "tolerance-results")
	w.close("section")
}

// targetQuantities lists the quantities a target can name, as select
// options: value "z:PORT" etc.
func (f *aidForm) targetQuantities() [][2]string {
	var opts [][2]string
	for _, p := range f.ai.Ports {
		opts = append(opts, [2]string{"z:" + p.Name, "|Z| at " + p.Name + " (Ω)"},
			[2]string{"phase:" + p.Name, "∠Z at " + p.Name + " (°)"},
			[2]string{"r:" + p.Name, "Re Z at " + p.Name + " (Ω)"})
	}
	if f.ai.Gain != "" {
		opts = append(opts, [2]string{"g", "|g| (" + f.ai.Gain + ")"})
	}
	return append(opts, [2]string{"pm", "phase margin (°)"})
}

// targetRow writes one target; i < 0 for the template the page copies.
func (f *aidForm) targetRow(i int, t TargetStudy) {
	w := &f.w
	param := func(field string) string {
		if i < 0 {
			return ""
		}
		return TargetField(i, field)
	}
	q := t.Quantity
	if t.Port != "" {
		q += ":" + t.Port
	}
	w.open("li", "class", "target-row", "data-role", "target")
	w.open("select", "data-study", "target-quantity", "data-param", param("quantity"), "aria-label", "Quantity")
	for _, o := range f.targetQuantities() {
		sel := ""
		if o[0] == q {
			sel = "selected"
		}
		w.elem("option", o[1], "value", o[0], "selected?", sel)
	}
	w.close("select")
	w.open("select", "data-study", "target-op", "data-param", param("op"), "aria-label", "Condition")
	for _, o := range [][2]string{{"<", "is below"}, {">", "is above"}} {
		sel := ""
		if o[0] == t.Op {
			sel = "selected"
		}
		w.elem("option", o[1], "value", o[0], "selected?", sel)
	}
	w.close("select")
	w.open("input", "type", "text", "value", t.Value, "data-study", "target-value", "data-param", param("value"),
		"aria-label", "Value", "placeholder", "value", "size", "8", "spellcheck", "false", "autocomplete", "off")
	w.elem("button", "Remove", "type", "button", "class", "quiet", "data-aid-action", "remove-target", "aria-label", "Remove this target")
	w.elem("span", "", "class", "field-msg", "data-role", "msg")
	w.close("li")
}

func (f *aidForm) standard() {
	w := &f.w
	h := f.id + "-aid-std-h"
	w.open("section", "class", "aid aid-std", "aria-labelledby", h)
	w.elem("h3", "Standard values", "id", h)
	w.elem("p", "Each resistor and capacitor snapped to the nearest value of an IEC 60063 series, and the resistor pairs that set a ratio chosen together; then the circuit is analyzed again with those values.", "class", "explain")
	var opts [][2]string
	for _, s := range eseries.All() {
		opts = append(opts, [2]string{s.Name, s.Name})
	}
	w.open("div", "class", "aid-form aid-series")
	f.selectField("series", "Resistors", "standardValues.series", opts, or(f.st.Series, DefaultSeries))
	f.selectField("capSeries", "Capacitors", "standardValues.capacitorSeries", opts, or(f.st.CapSeries, DefaultCapSeries))
	w.close("div")
	w.elem("div", "", "class", "aid-results", "data-role", "standard-results")
	w.close("section")
}

func (f *aidForm) sensitivity() {
	w := &f.w
	h := f.id + "-aid-sens-h"
	w.open("section", "class", "aid aid-sens", "aria-labelledby", h)
	w.elem("h3", "Sensitivity", "id", h)
	w.elem("p", "Which part each port impedance, the gain and the phase margin depend on: the normalized sensitivity ∂ln|Q|/∂ln p of every parameter p, largest first. A sensitivity of −1 means a 1 % rise of p lowers |Q| by about 1 %.", "class", "explain")
	w.elem("div", "", "class", "aid-results", "data-role", "sensitivity-results")
	w.close("section")
}

// cleanID keeps the characters of s that are safe in an element id.
func cleanID(s string) string {
	var b strings.Builder
	for _, r := range s {
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' {
			b.WriteRune(r)
		} else {
			fmt.Fprintf(&b, "_%x", r)
		}
	}
	return b.String()
}

// ---- the fast panels ----

// AidsPanels computes and renders the standard values and the
// sensitivities of the circuit of in (or the one in.Only names). Each
// panel has its own error field, so one can fail (a circuit with no
// resistor has no standard values) while the other shows.
func AidsPanels(in AidsInput) (out AidsOutput) {
	defer recoverAids(&out)
	std, sens := in.Only == "" || in.Only == "standard", in.Only == "" || in.Only == "sensitivity"
	if !std && !sens {
		return errOut("only", "%q: ask for \"standard\" or \"sensitivity\", or leave it out for both", in.Only)
	}
	req, entry, bad := in.base()
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	st, bad := in.study()
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	out = AidsOutput{Study: &st, State: st.State()}
	if std {
		sreq := req
		sreq.StandardValues = st.StandardKey()
		if resp, err := api.Analyze(sreq); err != nil {
			body := api.Body(err)
			out.StandardError = &body
		} else if sv, ok := resp.StandardValues.(*api.StandardValuesResult); ok {
			out.Standard = StandardPanel(sv, in.id(), partUnits(req, entry))
		}
	}
	if sens {
		req.Sensitivity = json.RawMessage("true")
		if resp, err := api.Analyze(req); err != nil {
			body := api.Body(err)
			out.SensitivityError = &body
		} else if sr, ok := resp.Sensitivity.(*api.SensitivityResult); ok {
			out.Sensitivity = SensitivityPanel(sr, in.id())
		}
	}
	return out
}

// partUnits gives the unit of each part of req by name: from the catalog
// for a stage, else from the circuit's parts.
func partUnits(req api.Request, entry *api.CatalogEntry) map[string]string {
	units := map[string]string{}
	if entry != nil {
		for _, p := range entry.Params {
			units[p.Name] = p.Unit
		}
		return units
	}
	if ai, bad := info(req, nil); bad == nil {
		for _, p := range ai.Parts {
			units[p.Name] = p.Unit
		}
	}
	return units
}

// ---- the tolerance study ----

// ToleranceRequest is the engine request for the tolerance study of in:
// the circuit at its spot frequency with the study's "tolerance" key. A
// page passes it to api.StartTolerance; `analyze` gives the same numbers.
func ToleranceRequest(in AidsInput) (api.Request, *api.ErrorBody) {
	req, _, bad := in.base()
	if bad != nil {
		return req, bad
	}
	st, bad := in.study()
	if bad != nil {
		return req, bad
	}
	key, bad := st.ToleranceKey()
	if bad != nil {
		return req, bad
	}
	req.Tolerance = key
	return req, nil
}

// StartTolerance prepares the tolerance study of in, to be run in slices
// with Step and rendered with TolerancePanel.
func StartTolerance(in AidsInput) (run *api.ToleranceRun, bad *api.ErrorBody) {
	defer func() {
		if r := recover(); r != nil {
			run, bad = nil, internalError(r)
		}
	}()
	req, bad := ToleranceRequest(in)
	if bad != nil {
		return nil, bad
	}
	run, err := api.StartTolerance(req)
	if err != nil {
		body := api.Body(err)
		return nil, &body
	}
	return run, nil
}

// ToleranceOutput renders what run has computed so far as the tolerance
// panel, with its progress.
func ToleranceOutput(run *api.ToleranceRun, id string) (out AidsOutput) {
	defer recoverAids(&out)
	if id == "" {
		id = "calc"
	}
	res := run.Result()
	done, total := run.Step(0)
	return AidsOutput{HTML: TolerancePanel(res, id), Done: done, Total: total}
}

func internalError(r any) *api.ErrorBody {
	return &api.ErrorBody{Message: fmt.Sprintf("internal error: %v (please report the settings that caused it)", r)}
}

func recoverAids(out *AidsOutput) {
	if r := recover(); r != nil {
		*out = AidsOutput{Error: internalError(r)}
	}
}

// ---- JSON ----

// decodeAids reads an AidsInput strictly.
func decodeAids(in []byte) (AidsInput, *api.ErrorBody) {
	var a AidsInput
	dec := json.NewDecoder(strings.NewReader(string(in)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&a); err != nil {
		return a, &api.ErrorBody{Message: "the design-aid request is not valid: " + err.Error()}
	}
	return a, nil
}

// EncodeAids writes an AidsOutput as JSON, markup unescaped (the page
// reads it with JSON.parse). It never fails.
func EncodeAids(out AidsOutput) []byte {
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(out); err != nil {
		b.Reset()
		_ = enc.Encode(AidsOutput{Error: &api.ErrorBody{Message: "internal error: " + err.Error()}})
	}
	return []byte(strings.TrimSuffix(b.String(), "\n"))
}

// AidsFormJSON is AidsForm on JSON: an AidsInput in, an AidsOutput out.
func AidsFormJSON(in []byte) []byte {
	a, bad := decodeAids(in)
	if bad != nil {
		return EncodeAids(AidsOutput{Error: bad})
	}
	return EncodeAids(AidsForm(a))
}

// AidsPanelsJSON is AidsPanels on JSON.
func AidsPanelsJSON(in []byte) []byte {
	a, bad := decodeAids(in)
	if bad != nil {
		return EncodeAids(AidsOutput{Error: bad})
	}
	return EncodeAids(AidsPanels(a))
}

// StartToleranceJSON is StartTolerance on JSON; on bad input the run is
// nil and errJSON is an AidsOutput with its Error.
func StartToleranceJSON(in []byte) (run *api.ToleranceRun, id string, errJSON []byte) {
	a, bad := decodeAids(in)
	if bad == nil {
		run, bad = StartTolerance(a)
	}
	if bad != nil {
		return nil, "", EncodeAids(AidsOutput{Error: bad})
	}
	return run, a.id(), nil
}

// StudyJSON converts between a study and its URL fragment pairs: given
// {"study": {...}} it answers {"study", "state"}; given {"fragment": "…"}
// it reads the study from the fragment (or answers the error).
func StudyJSON(in []byte) []byte {
	a, bad := decodeAids(in)
	if bad != nil {
		return EncodeAids(AidsOutput{Error: bad})
	}
	st, bad := a.study()
	if bad != nil {
		return EncodeAids(AidsOutput{Error: bad})
	}
	return EncodeAids(AidsOutput{Study: &st, State: st.State()})
}
