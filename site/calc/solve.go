package calc

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/solve"
	"zport/engine/value"
	"zport/site/plot"
	"zport/site/view"
)

// solveTarget is the "Design to a target" section under each calculator:
// the value of one part at which a margin, an impedance, the gain or a
// closed-loop figure reaches a target (the engine's "solve" key). It runs
// on request — a search analyzes the circuit some sixty times — so the
// analysis has no Ask or Section: its script (site/assets/solve.js)
// renders the settings (SolveForm), runs the search in slices
// (StartSolve, SolveOutputOf) and applies a value it found (a stage's
// input, or ApplyValue's rewrite of circuit text), through the bridge.
// Its settings travel in the share link under "solve." (see
// SolveSettings); a link's are checked when it is read (Check).
var solveTarget = Analysis{
	Key:    solveKey,
	Title:  "Design to a target",
	Accept: func(name string) bool { return slices.Contains(SolveSettings, name) },
	Check: func(c *Context) *api.ErrorBody {
		req, bad := solveRequest(*c.Form, c.Values)
		if bad != nil {
			return bad
		}
		if err := api.CheckSolve(req); err != nil {
			body := api.Body(err)
			return &body
		}
		return nil
	},
}

const solveKey = "solve"

// SolveSettings are the settings of a solve, as the link names them
// ("solve.part=Cf&solve.quantity=pm&solve.value=45"): the part, the
// quantity and its port, the target value, the range and the series.
var SolveSettings = []string{"part", "quantity", "port", "value", "from", "to", "series"}

// solveField is the contract path of each setting, which the engine's
// errors name and the form's inputs carry as data-param.
var solveField = map[string]string{
	"part": "solve.part", "quantity": "solve.target.quantity", "port": "solve.target.port",
	"value": "solve.target.value", "from": "solve.range.from", "to": "solve.range.to", "series": "solve.series",
}

// SolveInput is what a page sends for a solve: the calculator's form,
// whose Settings["solve"] are the solve's settings and whose ID prefixes
// the element ids.
type SolveInput struct {
	Form Form `json:"form"`
}

// SolveOutput is a rendered piece of the solve section, or the error
// that stopped it.
type SolveOutput struct {
	// HTML is the settings form (SolveForm) or the results (SolveOutputOf).
	HTML string `json:"html,omitempty"`
	// Parts identifies what the form lists (the parts, the quantities); a
	// page renders the form again when it changes.
	Parts string `json:"parts,omitempty"`
	// Done and Total count a run's evaluations (Total an estimate until
	// it finishes).
	Done  int            `json:"done,omitempty"`
	Total int            `json:"total,omitempty"`
	Error *api.ErrorBody `json:"error,omitempty"`
}

// spot returns the form with a stage's defaults filled in and no sweep,
// pins or link: the circuit a solve works on, at the spot frequency.
func (in SolveInput) spot() (Form, *api.CatalogEntry, *api.ErrorBody) {
	f := in.Form
	var entry *api.CatalogEntry
	if f.Topology != "" {
		e, ok := api.LookupEntry(f.Topology)
		if !ok {
			return f, nil, &api.ErrorBody{Param: "topology", Message: fmt.Sprintf("no stage %q in the catalog", f.Topology)}
		}
		f, entry = f.withDefaults(e), &e
	}
	f.Fragment, f.Sweep, f.Pins = nil, SweepForm{}, nil
	return f, entry, nil
}

// solveRequest is the engine request of form f (its spot analysis) with
// the "solve" key of settings v, each bad setting named by its field.
func solveRequest(f Form, v Values) (api.Request, *api.ErrorBody) {
	f.Sweep, f.Pins = SweepForm{}, nil
	req, bad := f.request()
	if bad != nil {
		return req, bad
	}
	get := func(k string) string { return strings.TrimSpace(v[k]) }
	bad1 := func(k, msg string) (api.Request, *api.ErrorBody) {
		return req, &api.ErrorBody{Param: solveField[k], Message: msg}
	}
	q := api.SolveRequest{Part: get("part"), Series: get("series")}
	qty, ok := solve.ParseQuantity(get("quantity"))
	if !ok {
		return bad1("quantity", "choose what to reach: "+strings.Join(solve.Quantities(), ", "))
	}
	q.Target.Quantity, q.Target.Port = qty.String(), get("port")
	text := strings.Replace(get("value"), "−", "-", 1)
	for _, suffix := range []string{"°", "%", "dB"} {
		text = strings.TrimSpace(strings.TrimSuffix(text, suffix))
	}
	if text == "" {
		return bad1("value", "give the value to reach")
	}
	x, err := value.Parse(text, qty.Unit(""))
	if err != nil {
		return bad1("value", err.Error())
	}
	q.Target.Value = &x
	if from, to := get("from"), get("to"); from != "" || to != "" {
		unit := ""
		if parts, err := api.SolvableParts(req); err == nil {
			for _, p := range parts {
				if p.Name == q.Part {
					unit = p.Unit
				}
			}
		}
		q.Range = &api.SolveRange{}
		for _, e := range []struct {
			key, text string
			dst       **float64
		}{{"from", from, &q.Range.From}, {"to", to, &q.Range.To}} {
			if e.text == "" {
				continue
			}
			r, err := value.Parse(strings.Replace(e.text, "−", "-", 1), unit)
			if err != nil {
				return bad1(e.key, err.Error())
			}
			*e.dst = &r
		}
	}
	api.Solve.Ask(&req, &q)
	return req, nil
}

// ---- the settings form ----

// solveQuantity is one choice of what to reach: the setting's quantity
// and port, and its text.
type solveQuantity struct{ quantity, port, text string }

// quantities lists what a solve of the circuit in ai can reach.
func (ai aidInfo) quantities() []solveQuantity {
	qs := []solveQuantity{{"pm", "", "phase margin (°)"}, {"gm", "", "gain margin (dB)"}, {"crossover", "", "crossover frequency (Hz)"}}
	for _, p := range ai.Ports {
		qs = append(qs, solveQuantity{"z", p.Name, "|Z| at " + p.Name + " (Ω)"},
			solveQuantity{"r", p.Name, "Re Z at " + p.Name + " (Ω)"},
			solveQuantity{"phase", p.Name, "∠Z at " + p.Name + " (°)"})
	}
	if ai.Gain != "" {
		qs = append(qs, solveQuantity{"g", "", "|g| (" + ai.Gain + ")"},
			solveQuantity{"peaking", "", "closed-loop peaking (dB)"},
			solveQuantity{"bandwidth", "", "closed-loop −3 dB bandwidth (Hz)"},
			solveQuantity{"overshoot", "", "step overshoot (%)"})
	}
	return qs
}

// SolveForm renders the solve section's settings for the circuit of in,
// filled in from its settings (a stage's last network part and a 60°
// phase margin by default), with an empty area for the results. Nothing
// is computed but the lists of parts and quantities.
func SolveForm(in SolveInput) (out SolveOutput) {
	defer recoverSolve(&out)
	f, entry, bad := in.spot()
	if bad != nil {
		return SolveOutput{Error: bad}
	}
	req, bad := f.request()
	if bad != nil {
		return SolveOutput{Error: bad}
	}
	parts, err := api.SolvableParts(req)
	if err != nil {
		body := api.Body(err)
		return SolveOutput{Error: &body}
	}
	ai, bad := info(req, entry)
	if bad != nil {
		return SolveOutput{Error: bad}
	}
	if len(parts) == 0 {
		return SolveOutput{Error: &api.ErrorBody{Param: "solve.part", Message: "this circuit has no part value to solve for"}}
	}
	v := f.Settings[solveKey]
	id := in.Form.ID
	if id == "" {
		id = "calc"
	}
	sf := &solveForm{id: id, v: v, parts: parts, qs: ai.quantities(), entry: entry}
	sf.write()
	key := ai.key()
	for _, p := range parts {
		key += "|" + p.Name + " " + view.Num(p.Nominal)
	}
	return SolveOutput{HTML: sf.w.String(), Parts: key}
}

type solveForm struct {
	w     view.Writer
	id    string
	v     Values
	parts []api.SolvablePart
	qs    []solveQuantity
	entry *api.CatalogEntry
}

// defaultPart is the part the form offers first: a stage's last network
// parameter (its compensation or isolation part: Cf, Riso), or the first
// part of circuit text.
func (sf *solveForm) defaultPart() string {
	if sf.entry != nil {
		for i := len(sf.entry.Params) - 1; i >= 0; i-- {
			if p := sf.entry.Params[i]; p.Group == "network" {
				return p.Name
			}
		}
	}
	return sf.parts[0].Name
}

func (sf *solveForm) get(k, def string) string {
	if x := strings.TrimSpace(sf.v[k]); x != "" {
		return x
	}
	return def
}

func (sf *solveForm) write() {
	w := &sf.w
	field := func(key, label, hint, val string, extra ...string) {
		formField(w, sf.id+"-solve-"+key, "data-solve", key, label, hint, val, solveField[key], extra...)
	}
	meaning := map[string]string{}
	if sf.entry != nil {
		for _, p := range sf.entry.Params {
			meaning[p.Name] = p.Meaning
		}
	}
	part := sf.get("part", sf.defaultPart())

	w.Open("div", "class", "solve-body", "id", sf.id+"-solve-body")
	w.Elem("p", "Which value of one part gives the margin, impedance, gain or response you want? Every value in the part’s range that does, the standard values on either side of each, and the curve of the quantity against the part. The search analyzes the circuit some sixty times, so it runs when you press Solve.", "class", "explain")
	w.Open("form", "class", "aid-form solve-form", "data-role", "solve-form", "novalidate?", "yes", "autocomplete", "off")

	w.Open("fieldset", "class", "aid-set")
	w.Elem("legend", "Target")
	id := sf.id + "-solve-part"
	w.Open("div", "class", "field")
	w.Elem("label", "Part to solve for", "for", id)
	w.Open("select", "id", id, "data-solve", "part", "data-param", solveField["part"], "aria-describedby", id+"-msg")
	for _, p := range sf.parts {
		text := p.Name
		if m := meaning[p.Name]; m != "" {
			text += " — " + m
		}
		if math.IsNaN(p.Nominal) {
			text += " (now absent)"
		} else {
			text += " (" + view.Magnitude(p.Nominal, p.Unit) + ")"
		}
		sel := ""
		if p.Name == part {
			sel = "selected"
		}
		w.Elem("option", text, "value", p.Name, "selected?", sel, "data-unit", p.Unit,
			"data-from", SyntaxWithin(p.From, 1e-6), "data-to", SyntaxWithin(p.To, 1e-6))
	}
	w.Close("select")
	w.Elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.Close("div")

	q := sf.get("quantity", "pm")
	port := sf.get("port", "")
	id = sf.id + "-solve-quantity"
	w.Open("div", "class", "field")
	w.Elem("label", "Quantity", "for", id)
	w.Open("select", "id", id, "data-solve", "quantity", "data-param", solveField["quantity"], "aria-describedby", id+"-msg")
	for _, o := range sf.qs {
		val := o.quantity
		if o.port != "" {
			val += ":" + o.port
		}
		sel := ""
		if o.quantity == q && o.port == port {
			sel = "selected"
		}
		w.Elem("option", o.text, "value", val, "selected?", sel)
	}
	w.Close("select")
	w.Elem("span", "", "class", "field-msg", "id", id+"-msg", "data-role", "msg")
	w.Close("div")
	field("value", "Target value", "in the quantity’s unit: 45 for 45°, 1 for 1 Ω, 3 for 3 dB or 3 %", sf.get("value", "60"), "inputmode", "decimal")
	w.Close("fieldset")

	w.Open("fieldset", "class", "aid-set")
	w.Elem("legend", "Where to look")
	var from, to string
	for _, p := range sf.parts {
		if p.Name == part {
			from, to = SyntaxWithin(p.From, 1e-6), SyntaxWithin(p.To, 1e-6)
		}
	}
	field("from", "Range from", "empty: the part’s least allowed value, or a thousandth of its value in circuit text", sf.v["from"], "placeholder", from)
	field("to", "Range to", "empty: the part’s largest allowed value, or a thousand times its value", sf.v["to"], "placeholder", to)
	var series [][2]string
	for _, s := range eseries.All() {
		series = append(series, [2]string{s.Name, s.Name + " (±" + strconv.FormatFloat(s.Tolerance*100, 'g', -1, 64) + " %)"})
	}
	formSelect(w, sf.id+"-solve-series", "data-solve", "series", "Standard values (IEC 60063)", solveField["series"], series, sf.get("series", api.DefaultSolveSeries))
	w.Close("fieldset")

	runControls(w, "data-solve-action", "Solve", "Circuits analyzed", "solve")
	w.Close("div")
}

// ---- the run ----

// StartSolve prepares the solve of in, to be run in slices with Step and
// rendered with SolveOutputOf.
func StartSolve(in SolveInput) (run *api.SolveRun, bad *api.ErrorBody) {
	defer func() {
		if r := recover(); r != nil {
			run, bad = nil, internalError(r)
		}
	}()
	f, _, bad := in.spot()
	if bad != nil {
		return nil, bad
	}
	req, bad := solveRequest(f, f.Settings[solveKey])
	if bad != nil {
		return nil, bad
	}
	run, err := api.StartSolve(req)
	if err != nil {
		body := api.Body(err)
		return nil, &body
	}
	return run, nil
}

// SolveOutputOf renders what run has found, laid out as l says, with its
// progress.
func SolveOutputOf(run *api.SolveRun, l Layout) (out SolveOutput) {
	defer recoverSolve(&out)
	if l.ID == "" {
		l.ID = "calc"
	}
	done, total, _ := run.Step(0)
	return SolveOutput{HTML: SolvePanel(run.Result(), l), Done: done, Total: total}
}

func recoverSolve(out *SolveOutput) {
	if r := recover(); r != nil {
		*out = SolveOutput{Error: internalError(r)}
	}
}

// ---- the results ----

// quantityText writes a value of the solve's quantity.
func quantityText(x *float64, unit string) string {
	if x == nil {
		return "—"
	}
	switch unit {
	case "°", "dB", "%":
		s := strconv.FormatFloat(*x, 'f', 2, 64)
		if strings.HasPrefix(s, "-") {
			s = "−" + s[1:]
		}
		if unit == "°" {
			return s + "°"
		}
		return s + " " + unit
	}
	return view.MagnitudeN(*x, unit, 4)
}

// ApplyText is how a page writes a value it applies to an input or to
// circuit text: a solution with the fewest digits that stay within
// 5·10⁻⁸ of it (seven or eight; its quantity then meets the target to
// that fraction of its slope), a standard value exactly.
func ApplyText(x float64, exact bool) string {
	if exact {
		return Syntax(x)
	}
	return SyntaxWithin(x, 5e-8)
}

// SolvePanel renders a solve's answer: the solutions with the quantity
// each achieves and their standard values, each with a button that
// applies it (data-solve-apply, data-part and data-text: the value as the
// page writes it), the value as given, the closest approach when nothing
// meets the target, the curve and the notes.
func SolvePanel(r *api.SolveResult, l Layout) string {
	var w view.Writer
	qu := r.QuantityUnit
	part := func(x float64) string { return view.MagnitudeN(x, r.Unit, 4) }
	w.Open("div", "class", "aid-panel solve-panel", "id", l.ID+"-solve-panel", "data-aid", "solve",
		"data-part", r.Part, "data-quantity", r.Quantity, "data-target", view.Num(r.Target), "data-evaluations", strconv.Itoa(r.Evaluations))
	head := fmt.Sprintf("%s of %s by %s, from %s to %s: ", capitalize(r.Title), quantityText(&r.Target, qu), r.Part, part(r.Range.From), part(r.Range.To))
	switch n := len(r.Solutions); n {
	case 0:
		head += "no value meets it."
	case 1:
		head += "one value meets it."
	default:
		head += strconv.Itoa(n) + " values meet it."
	}
	w.Elem("p", head+" ("+strconv.Itoa(r.Evaluations)+" analyses of the circuit.)", "class", "aid-head")

	apply := func(x float64, exact bool, label string) {
		text := part(x)
		if exact {
			text = standardText(x, r.Unit)
		}
		w.Elem("button", label, "type", "button", "class", "quiet apply", "data-solve-apply", "", "data-part", r.Part,
			"data-text", ApplyText(x, exact), "data-value", view.Num(x), "aria-label", "Set "+r.Part+" to "+text,
			"title", "Set "+r.Part+" to "+text+" in the calculator")
	}
	row := func(kind, label string, p api.SolvePoint, exact bool, idx int, button string) {
		w.Open("tr", "data-solve", kind, "data-index", strconv.Itoa(idx))
		w.Elem("th", label, "scope", "row")
		w.Open("td", "class", "num", "data-label", r.Part)
		v := p.Value
		text := part(v)
		if exact {
			text = standardText(v, r.Unit)
		}
		w.NumSpan(text, &v, "data-solve", kind, "data-stat", "value")
		w.Close("td")
		w.Open("td", "class", "num", "data-label", r.Title)
		w.NumSpan(quantityText(p.Achieved, qu), p.Achieved, "data-solve", kind, "data-stat", "achieved")
		w.Close("td")
		w.Open("td")
		if button != "" {
			apply(v, exact, button)
		}
		w.Close("td")
		w.Close("tr")
	}
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "aid-small solve-table")
	w.Elem("caption", "Values of "+r.Part+" and the "+r.Title+" each gives")
	w.Open("thead")
	w.Open("tr")
	for _, h := range []string{"", r.Part, r.Title, ""} {
		w.Elem("th", h, "scope", "col")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for i, s := range r.Solutions {
		label := "Solution"
		if len(r.Solutions) > 1 {
			label += " " + strconv.Itoa(i+1)
		}
		row("solution", label, s, false, i, "Use")
		if i < len(r.Standard) {
			sv := r.Standard[i]
			if sv.Below.Value == sv.Above.Value {
				row("standard", r.Series+" value (exact)", sv.Below, true, i, "Use")
				continue
			}
			row("below", r.Series+" below", sv.Below, true, i, "Use")
			row("above", r.Series+" above", sv.Above, true, i, "Use")
		}
	}
	if b := r.Best; b != nil {
		row("best", "Closest", *b, false, 0, "Use")
	}
	if n := r.Nominal; n != nil {
		row("nominal", "As given", *n, false, 0, "")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
	w.Notes("aid-notes", r.Notes)

	// The curve, the target and each solution marked.
	xs := r.Curve.Values
	ys := make([]float64, len(xs))
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, q := range r.Curve.Quantities {
		ys[i] = math.NaN()
		if q != nil {
			ys[i] = *q
			if *q > 0 {
				lo, hi = math.Min(lo, *q), math.Max(hi, *q)
			}
		}
	}
	// Magnitudes and frequencies spanning more than a decade read best
	// on a log axis.
	ylog := (qu == "Ω" && r.Quantity == "z" || r.Quantity == "g" || qu == "Hz") && hi > 10*lo
	c := plot.Curve{ID: l.ID + "-solve-curve", Title: capitalize(r.Title) + " against " + r.Part,
		X: xs, XUnit: r.Unit, XLabel: r.Part, Unit: qu, YLabel: capitalize(r.Title) + unitSuffix(qu), YLog: ylog,
		Series: []plot.Series{{Name: r.Title, Class: "g", Values: ys}},
		HLines: []plot.HLine{{Value: r.Target, Label: "target " + quantityText(&r.Target, qu), Class: "target"}}}
	for _, s := range r.Solutions {
		if s.Achieved != nil {
			c.Points = append(c.Points, plot.Mark{X: s.Value, Y: *s.Achieved, Label: part(s.Value), Class: "solution"})
		}
	}
	if b := r.Best; b != nil && b.Achieved != nil {
		c.Points = append(c.Points, plot.Mark{X: b.Value, Y: *b.Achieved, Label: "closest " + part(b.Value), Class: "best"})
	}
	if n := r.Nominal; n != nil {
		c.Markers = append(c.Markers, plot.Marker{Freq: n.Value, Label: "as given", Class: "nominal"})
	}
	c.Width, c.Height = l.chartSize(640, 340)
	c.NoStyle = true
	w.Figure(c.SVG(), "plot solve-curve")
	w.Close("div")
	return w.String()
}

// standardText writes a series value with the digits it has (39 Ω,
// 4.7 kΩ, 1.37 pF), not padded to four.
func standardText(x float64, unit string) string {
	for sig := 1; sig < 4; sig++ {
		if r, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', sig, 64), 64); r == x {
			return value.Format(x, unit, sig)
		}
	}
	return view.MagnitudeN(x, unit, 4)
}

func unitSuffix(unit string) string {
	if unit == "" {
		return ""
	}
	return " (" + unit + ")"
}

func capitalize(s string) string {
	if s == "" || s[0] < 'a' || s[0] > 'z' {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// chartSize is Context.ChartSize for a panel drawn outside a recompute.
func (l Layout) chartSize(w, h int) (int, int) {
	if l.ChartWidth > 0 && l.ChartWidth < w {
		return l.ChartWidth, h + 40
	}
	return w, h
}

// ---- applying a value to circuit text ----

// ApplyInput asks for one number of circuit text to be set: Part names
// it as a solve does ("Cf", "U1.gbw"), Text is the value as the page
// writes it.
type ApplyInput struct {
	Circuit string `json:"circuit"`
	Part    string `json:"part"`
	Text    string `json:"text"`
}

// ApplyOutput is the circuit text with the number set, or why not.
type ApplyOutput struct {
	Circuit string         `json:"circuit,omitempty"`
	Error   *api.ErrorBody `json:"error,omitempty"`
}

// ApplyValue sets one number of circuit text, keeping the rest of the
// text as the user typed it (circuit.SetNumber).
func ApplyValue(in ApplyInput) ApplyOutput {
	out, err := circuit.SetNumber(in.Circuit, in.Part, in.Text)
	if err != nil {
		return ApplyOutput{Error: &api.ErrorBody{Param: "solve.part", Message: err.Error()}}
	}
	return ApplyOutput{Circuit: out}
}

// ---- JSON ----

// SolveFormJSON is SolveForm on JSON: a SolveInput in, a SolveOutput out.
func SolveFormJSON(in []byte) []byte {
	var s SolveInput
	if bad := decodeStrict(in, &s, "solve"); bad != nil {
		return encode(SolveOutput{Error: bad})
	}
	return encode(SolveForm(s))
}

// StartSolveJSON is StartSolve on JSON; on bad input the run is nil and
// errJSON is a SolveOutput with its Error.
func StartSolveJSON(in []byte) (run *api.SolveRun, l Layout, errJSON []byte) {
	var s SolveInput
	bad := decodeStrict(in, &s, "solve")
	if bad == nil {
		run, bad = StartSolve(s)
	}
	if bad != nil {
		return nil, Layout{}, encode(SolveOutput{Error: bad})
	}
	id := s.Form.ID
	if id == "" {
		id = "calc"
	}
	return run, Layout{ID: id, ChartWidth: s.Form.ChartWidth}, nil
}

// EncodeSolve writes a SolveOutput as JSON.
func EncodeSolve(out SolveOutput) []byte { return encode(out) }

// ApplyValueJSON is ApplyValue on JSON.
func ApplyValueJSON(in []byte) []byte {
	var a ApplyInput
	if bad := decodeStrict(in, &a, "apply"); bad != nil {
		return encode(ApplyOutput{Error: bad})
	}
	return encode(ApplyValue(a))
}
