package calc

import (
	"fmt"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/eseries"
	"zport/engine/topology"
	"zport/engine/value"
	"zport/site/view"
)

// ---- the settings form ----

// termSymbol is a glossary term's symbol as plain text (package topology
// writes a subscript as "_x").
func termSymbol(id string) string {
	t, _ := topology.LookupTerm(id)
	return strings.ReplaceAll(t.Symbol, "_", "")
}

// AidsForm renders the design-aid section's settings for the circuit of
// in, filled in from its study, with empty result areas for the page to
// fill: the tolerance study's inputs and Run/Cancel controls, the
// standard-value series, and the sensitivity area. Nothing is computed
// but the list of parts.
func AidsForm(in AidsInput) (out AidsOutput) {
	defer recoverAids(&out)
	req, entry, st, bad := in.base()
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	ai, bad := info(req, entry)
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	f := &aidForm{id: in.id(), st: st, ai: ai}
	f.write()
	return AidsOutput{HTML: f.w.String(), Parts: ai.key()}
}

type aidForm struct {
	w  view.Writer
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
	w.Open("div", "class", "aids-body", "id", f.id+"-aids-body")
	w.Open("p", "class", "explain")
	w.Text("Three questions after “what is the impedance”: how far it spreads with part tolerances, which standard values to buy, and which part it depends on most. Everything is computed at the calculator’s spot frequency; the tolerance study runs only when you press Run.")
	w.Close("p")
	f.tolerance()
	f.standard()
	f.sensitivity()
	w.Close("div")
}

// field writes one labelled text input of the study.
func (f *aidForm) field(key, label, hint, val, param string, extra ...string) {
	formField(&f.w, f.id+"-aid-"+key, "data-study", key, label, hint, val, param, extra...)
}

func (f *aidForm) selectField(key, label, param string, options [][2]string, selected string) {
	formSelect(&f.w, f.id+"-aid-"+key, "data-study", key, label, param, options, selected)
}

// formField writes one labelled text input of an on-request form (the
// design aids', a solve's): id is its element id, attr="key" the data
// attribute by which the page's script reads it ("data-study"), param the
// contract path that the engine's errors name, so that a message lands
// beside it; extra are further attributes of the input.
func formField(w *view.Writer, id, attr, key, label, hint, val, param string, extra ...string) {
	w.Open("div", "class", "field")
	w.Elem("label", label, "for", id)
	attrs := append([]string{"id", id, "type", "text", "value", val, attr, key, "data-param", param,
		"spellcheck", "false", "autocapitalize", "off", "autocomplete", "off", "aria-describedby", id + "-hint " + id + "-msg"}, extra...)
	w.Open("span", "class", "input-unit")
	w.Open("input", attrs...)
	w.Close("span")
	w.Elem("span", hint, "class", "range", "id", id+"-hint")
	w.Elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.Close("div")
}

// formSelect writes one labelled choice of an on-request form, as
// formField does an input; options are value and text pairs.
func formSelect(w *view.Writer, id, attr, key, label, param string, options [][2]string, selected string) {
	w.Open("div", "class", "field")
	w.Elem("label", label, "for", id)
	w.Open("select", "id", id, attr, key, "data-param", param, "aria-describedby", id+"-msg")
	for _, o := range options {
		sel := ""
		if o[0] == selected {
			sel = "selected"
		}
		w.Elem("option", o[1], "value", o[0], "selected?", sel)
	}
	w.Close("select")
	w.Elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.Close("div")
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
	w.Open("section", "class", "aid aid-tol", "aria-labelledby", h)
	w.Elem("h3", "Tolerance spread", "id", h)
	w.Elem("p", "Monte Carlo trials draw every part within its tolerance (and the op amp between its minimum and typical a0 and gbw); the worst-case corners put every part at a limit. Both report each port’s |Z| and phase, the gain and the phase margin.", "class", "explain")
	list := f.id + "-aid-codes"
	w.Open("datalist", "id", list)
	for _, c := range tolCodes {
		w.Elem("option", c.text, "value", c.letter)
	}
	w.Close("datalist")
	w.Open("form", "class", "aid-form", "data-role", "tolerance-form", "novalidate?", "yes", "autocomplete", "off")

	w.Open("fieldset", "class", "aid-set aid-parts-set")
	w.Elem("legend", "Part tolerances")
	f.field("tolerance", "Default tolerance", "IEC 60062 letter (B 0.1 %, C 0.25 %, D 0.5 %, F 1 %, G 2 %, J 5 %, K 10 %, M 20 %), a percentage such as 0.5%, or none", or(st.Tolerance, DefaultTolerance), "tolerance.default", "list", list)
	if len(f.ai.Parts) > 0 {
		w.Open("div", "class", "table-wrap")
		w.Open("table", "class", "aid-parts")
		w.Elem("caption", "Per-part tolerance (empty: the default for the network’s parts; parts of the source and load stay at their nominal values unless given one)")
		w.Open("thead")
		w.Open("tr")
		w.Elem("th", "Part", "scope", "col")
		w.Elem("th", "Nominal", "scope", "col")
		w.Elem("th", "Tolerance", "scope", "col")
		w.Close("tr")
		w.Close("thead")
		w.Open("tbody")
		for _, p := range f.ai.Parts {
			id := f.id + "-aid-part-" + cleanID(p.Name)
			w.Open("tr", "data-part", p.Name)
			w.Open("th", "scope", "row")
			w.Elem("label", p.Name, "for", id, "class", "port-name")
			if p.Meaning != "" {
				w.Elem("span", p.Meaning, "class", "hint")
			}
			w.Close("th")
			w.Elem("td", view.Magnitude(p.Nominal, p.Unit), "class", "num")
			w.Open("td")
			ph := "default"
			if !p.Default {
				ph = "held"
			}
			w.Open("input", "id", id, "type", "text", "value", st.Parts[p.Name], "placeholder", ph, "list", list,
				"data-study", "part", "data-name", p.Name, "data-param", "tolerance.parts."+p.Name,
				"spellcheck", "false", "autocapitalize", "off", "autocomplete", "off", "aria-describedby", id+"-msg", "size", "7")
			w.Elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
			w.Close("td")
			w.Close("tr")
		}
		w.Close("tbody")
		w.Close("table")
		w.Close("div")
	} else {
		w.Elem("p", "This circuit has no resistor, capacitor or inductor to give a tolerance.", "class", "hint")
	}
	w.Close("fieldset")

	if len(f.ai.Amps) > 0 {
		w.Open("fieldset", "class", "aid-set")
		w.Elem("legend", "Op amp spread (guaranteed minimum to typical)")
		for _, a := range f.ai.Amps {
			as := st.Amps[a.Name]
			if a.A0 > 0 {
				f.field("a0Min-"+cleanID(a.Name), a.Name+" "+termSymbol("a0")+" minimum", "typical "+view.Plain(a.A0)+"; empty: fixed at typical",
					as.A0Min, "tolerance.amps."+a.Name+".a0Min", "data-name", a.Name, "placeholder", "fixed")
			}
			if a.GBW > 0 {
				f.field("gbwMin-"+cleanID(a.Name), a.Name+" "+termSymbol("gbw")+" minimum", "typical "+value.Format(a.GBW, "Hz", view.Sig)+"; empty: fixed at typical",
					as.GBWMin, "tolerance.amps."+a.Name+".gbwMin", "data-name", a.Name, "placeholder", "fixed")
			}
		}
		w.Close("fieldset")
	}

	w.Open("fieldset", "class", "aid-set")
	w.Elem("legend", "Trials")
	f.selectField("distribution", "Distribution", FieldDistribution,
		[][2]string{{"uniform", "uniform between the limits"}, {"normal", "normal, tolerance = 3σ"}}, or(st.Distribution, "uniform"))
	w.Open("div", "class", "field seed-field")
	id := f.id + "-aid-seed"
	w.Elem("label", "Seed", "for", id)
	w.Open("span", "class", "input-unit")
	w.Open("input", "id", id, "type", "text", "inputmode", "numeric", "value", or(st.Seed, DefaultSeed), "data-study", "seed", "data-param", FieldSeed,
		"spellcheck", "false", "autocomplete", "off", "aria-describedby", id+"-hint "+id+"-msg")
	w.Elem("button", "New", "type", "button", "class", "quiet", "data-aid-action", "new-seed", "aria-label", "Draw a new seed")
	w.Close("span")
	w.Elem("span", "the same seed gives the same trials; it goes into the link", "class", "range", "id", id+"-hint")
	w.Elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.Close("div")
	f.field("trials", "Trials", "1 to "+strconv.Itoa(api.MaxTrials), or(st.Trials, DefaultTrials), FieldTrials, "inputmode", "numeric")
	w.Close("fieldset")

	w.Open("fieldset", "class", "aid-set aid-targets")
	w.Elem("legend", "Targets: a trial misses when …")
	w.Open("ol", "class", "target-list", "data-role", "targets")
	for i, t := range st.Targets {
		f.targetRow(i, t)
	}
	w.Close("ol")
	w.Open("template", "data-role", "target-row")
	def := TargetStudy{Quantity: "pm", Op: "<", Value: "45"}
	if len(f.ai.Ports) > 0 {
		def = TargetStudy{Quantity: "z", Port: f.ai.Ports[len(f.ai.Ports)-1].Name, Op: ">", Value: ""}
	}
	f.targetRow(-1, def)
	w.Close("template")
	w.Elem("button", "Add a target", "type", "button", "class", "quiet", "data-aid-action", "add-target")
	w.Close("fieldset")

	runControls(w, "data-aid-action", "Run the study", "Trials run", "tolerance")
	w.Close("section")
}

// runControls ends an on-request form: the Run button (a submit) and
// Cancel, marked with the data attribute action ("run", "cancel"), a
// progress bar labelled progress, the run's status, the form's notice
// (data-role ROLE-msg) and, after the form, the results' place
// (ROLE-results).
func runControls(w *view.Writer, action, run, progress, role string) {
	w.Open("div", "class", "aid-run")
	w.Elem("button", run, "type", "submit", action, "run")
	w.Elem("button", "Cancel", "type", "button", "class", "quiet", action, "cancel", "disabled?", "yes")
	w.Open("progress", "data-role", "progress", "max", "1", "value", "0", "hidden?", "yes", "aria-label", progress)
	w.Close("progress")
	w.Elem("span", "", "class", "run-status", "data-role", "run-status", "role", "status")
	w.Close("div")
	w.Elem("p", "", "class", "calc-notice", "data-role", role+"-msg", "role", "alert", "hidden?", "yes")
	w.Close("form")
	w.Elem("div", "", "class", "aid-results", "data-role", role+"-results")
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
	w.Open("li", "class", "target-row", "data-role", "target")
	w.Open("select", "data-study", "target-quantity", "data-param", param("quantity"), "aria-label", "Quantity")
	for _, o := range f.targetQuantities() {
		sel := ""
		if o[0] == q {
			sel = "selected"
		}
		w.Elem("option", o[1], "value", o[0], "selected?", sel)
	}
	w.Close("select")
	w.Open("select", "data-study", "target-op", "data-param", param("op"), "aria-label", "Condition")
	for _, o := range [][2]string{{"<", "is below"}, {">", "is above"}} {
		sel := ""
		if o[0] == t.Op {
			sel = "selected"
		}
		w.Elem("option", o[1], "value", o[0], "selected?", sel)
	}
	w.Close("select")
	w.Open("input", "type", "text", "value", t.Value, "data-study", "target-value", "data-param", param("value"),
		"aria-label", "Value", "placeholder", "value", "size", "8", "spellcheck", "false", "autocomplete", "off")
	w.Elem("button", "Remove", "type", "button", "class", "quiet", "data-aid-action", "remove-target", "aria-label", "Remove this target")
	w.Elem("span", "", "class", "field-msg", "data-role", "msg")
	w.Close("li")
}

func (f *aidForm) standard() {
	w := &f.w
	h := f.id + "-aid-std-h"
	w.Open("section", "class", "aid aid-std", "aria-labelledby", h)
	w.Elem("h3", "Standard values", "id", h)
	w.Elem("p", "Each resistor and capacitor snapped to the nearest value of an IEC 60063 series, and the resistor pairs that set a ratio chosen together; then the circuit is analyzed again with those values.", "class", "explain")
	var opts [][2]string
	for _, s := range eseries.All() {
		opts = append(opts, [2]string{s.Name, s.Name})
	}
	w.Open("div", "class", "aid-form aid-series")
	f.selectField("series", "Resistors", "standardValues.series", opts, or(f.st.Series, DefaultSeries))
	f.selectField("capSeries", "Capacitors", "standardValues.capacitorSeries", opts, or(f.st.CapSeries, DefaultCapSeries))
	w.Close("div")
	w.Elem("div", "", "class", "aid-results", "data-role", "standard-results")
	w.Close("section")
}

func (f *aidForm) sensitivity() {
	w := &f.w
	h := f.id + "-aid-sens-h"
	w.Open("section", "class", "aid aid-sens", "aria-labelledby", h)
	w.Elem("h3", "Sensitivity", "id", h)
	w.Elem("p", "Which part each port impedance, the gain and the phase margin depend on: the normalized sensitivity ∂ln|Q|/∂ln p of every parameter p, largest first. A sensitivity of −1 means a 1 % rise of p lowers |Q| by about 1 %.", "class", "explain")
	w.Elem("div", "", "class", "aid-results", "data-role", "sensitivity-results")
	w.Close("section")
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
