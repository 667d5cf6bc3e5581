package render

import (
	"encoding/json"
	"encoding/xml"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
)

// aidNumbers collects the numbers of a design-aid panel by their data
// attributes: data-aid|data-quantity|data-stat|data-parameter|data-variant|data-index.
func aidNumbers(t *testing.T, els []*element) map[string]string {
	t.Helper()
	out := map[string]string{}
	for _, e := range els {
		a := e.attrs
		if a["data-aid"] == "" || a["data-value"] == "" {
			continue
		}
		k := strings.Join([]string{a["data-aid"], a["data-quantity"], a["data-stat"], a["data-parameter"], a["data-variant"], a["data-index"]}, "|")
		if _, dup := out[k]; dup {
			t.Errorf("two numbers carry %s", k)
		}
		out[k] = a["data-value"]
	}
	return out
}

// parseLoose reads HTML with void elements (input) and bare boolean
// attributes (selected, hidden), as the settings form has them.
func parseLoose(t *testing.T, html string) []*element {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(html))
	d.Strict = false
	d.AutoClose = xml.HTMLAutoClose
	d.Entity = xml.HTMLEntity
	return elements(t, d)
}

// analyzeTolerance is the engine's one-shot answer to a tolerance key.
func analyzeTolerance(t *testing.T, req api.Request, tol string) *api.ToleranceResult {
	t.Helper()
	req.Tolerance = json.RawMessage(tol)
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	return resp.Tolerance.(*api.ToleranceResult)
}

func inverting(t *testing.T) api.Request {
	t.Helper()
	e, ok := api.LookupEntry("inverting")
	if !ok {
		t.Fatal("no inverting stage")
	}
	return api.Request{Topology: "inverting", Frequency: e.Frequency}
}

// Every number of the tolerance panel is the engine's, written in full
// (data-value), and the percentiles are the engine's stat.Quantile values.
func TestTolerancePanelShowsTheEnginesNumbers(t *testing.T) {
	res := analyzeTolerance(t, inverting(t), `{"default": "F", "amps": {"U1": {"a0Min": "100k"}}, "seed": 3, "trials": 700,
		"targets": [{"quantity": "pm", "op": "<", "value": 88.2}, {"quantity": "z", "port": "out", "op": ">", "value": 0.45}]}`)
	els := parse(t, TolerancePanel(res, "t"))
	got := aidNumbers(t, els)
	n := 0
	check := func(key string, v *float64) {
		t.Helper()
		if v == nil {
			return
		}
		n++
		if g, ok := got[key]; !ok || g != strconv.FormatFloat(*v, 'g', -1, 64) {
			t.Errorf("%s: panel %q, engine %v", key, g, *v)
		}
	}
	for _, q := range res.Quantities {
		if q.Quantity == "r" {
			// Re Z of the inverting stage's ports stays positive: left out.
			if _, ok := got["tolerance|"+q.ID+"|p50|||"]; ok {
				t.Errorf("%s is listed though it never reaches zero", q.ID)
			}
			continue
		}
		if len(q.Percentiles) != 5 {
			t.Fatalf("%s: %d percentiles", q.ID, len(q.Percentiles))
		}
		for _, p := range q.Percentiles {
			check("tolerance|"+q.ID+"|p"+strconv.FormatFloat(p.P, 'g', -1, 64)+"|||", p.Value)
		}
		check("tolerance|"+q.ID+"|nominal|||", q.Nominal)
		check("tolerance|"+q.ID+"|min|||", q.Min)
		check("tolerance|"+q.ID+"|max|||", q.Max)
		check("tolerance|"+q.ID+"|cornerMin|||", q.Corners.Min)
		check("tolerance|"+q.ID+"|cornerMax|||", q.Corners.Max)
	}
	for i, tg := range res.Targets {
		f := tg.Fraction
		check("tolerance|target|fraction|||"+strconv.Itoa(i), &f)
	}
	if n < 70 {
		t.Errorf("only %d numbers checked", n)
	}
	hists := 0
	for _, e := range els {
		if e.name == "svg" && strings.Contains(e.attrs["class"], "zplot-hist") {
			hists++
		}
	}
	if want := len(res.Quantities) - 3; hists != want { // all but the three Re Z
		t.Errorf("%d histograms, want %d", hists, want)
	}
}

// The page's path — a Study as typed, run in slices of any size — gives
// exactly the panel of the one-shot request: the draws depend only on the
// seed and the trial number.
func TestSlicedStudyEqualsOneShot(t *testing.T) {
	in := AidsInput{Form: &Form{Topology: "inverting", Params: map[string]string{"R2": "100k"}}, ID: "s", Study: Study{
		Tolerance: "G", Parts: map[string]string{"Rp": "none", "RL": "10%"}, Amps: map[string]AmpStudy{"U1": {GBWMin: "700k"}},
		Distribution: "normal", Seed: "99", Trials: "640", Targets: []TargetStudy{{Quantity: "phase", Port: "out", Op: ">", Value: "89.5°"}},
	}}
	run, bad := StartTolerance(in)
	if bad != nil {
		t.Fatal(bad)
	}
	for steps := 0; ; steps++ {
		if done, total := run.Step(37); done == total {
			break
		}
		if steps > 100 {
			t.Fatal("the run does not end")
		}
	}
	sliced := ToleranceOutput(run, "s")
	req := inverting(t)
	req.Params = map[string]string{"R2": "100k"}
	want := TolerancePanel(analyzeTolerance(t, req, `{"default": "G", "parts": {"Rp": "none", "RL": "10%"}, "amps": {"U1": {"gbwMin": "700k"}},
		"distribution": "normal", "seed": 99, "trials": 640, "targets": [{"quantity": "phase", "port": "out", "op": ">", "value": 89.5}]}`), "s")
	if sliced.HTML != want {
		t.Errorf("the sliced run's panel differs from the one-shot panel")
	}
	// R1 and R2 at G, RL at 10 %, the gbw spread (Rp held): four varying
	// parts, all 2⁴ corners.
	if sliced.Done != sliced.Total || sliced.Total != 640+16 {
		t.Errorf("done %d of %d, want 656 units (640 trials, 16 corners)", sliced.Done, sliced.Total)
	}
}

// A Howland pump without its load has a signed output resistance that
// swings through zero with 1 % resistors (Re Z → R1/ε changes sign with
// the mismatch ε, Franco 3rd ed., ch. 2, as in REFERENCES.md): the panel
// lists Re Z, bins |Z| in ratio, and says where Monte Carlo passes the
// corners (|Z| peaks at balance, inside the tolerance box).
func TestTolerancePanelHowland(t *testing.T) {
	res := analyzeTolerance(t, api.Request{Topology: "howland", Frequency: 100, Params: map[string]string{"RL": ""}}, `{"seed": 5, "trials": 1000}`)
	var q, r api.QuantitySpread
	for _, x := range res.Quantities {
		switch x.ID {
		case "z:out":
			q = x
		case "r:out":
			r = x
		}
	}
	if r.Min == nil || *r.Min >= 0 || r.Max == nil || *r.Max <= 0 {
		t.Fatalf("Re Z at out spans %v … %v; the test wants it to change sign", r.Min, r.Max)
	}
	html := TolerancePanel(res, "h")
	got := aidNumbers(t, parse(t, html))
	if got["tolerance|r:out|p50|||"] == "" {
		t.Error("Re Z at out is not listed though it changes sign")
	}
	if q.Histogram == nil || q.Histogram.Scale != "log" {
		t.Fatalf("|Z| at out histogram: %+v, want log bins", q.Histogram)
	}
	if !strings.Contains(html, `class="hint corner-beyond"`) {
		t.Error("no note that Monte Carlo reaches past the corners")
	}
}

// Text from the engine and from the user is escaped everywhere in the
// design-aid HTML.
func TestAidsEscapeHostileText(t *testing.T) {
	f := func(x float64) *float64 { return &x }
	res := &api.ToleranceResult{Distribution: hostile, Seed: 1, Frequency: 1e3, Trials: 2, Done: 2,
		Parts: []api.TolerancedPart{{Name: hostile, Kind: "resistor", Unit: "Ω", Nominal: 1e3, Tolerance: f(0.01), Low: 990, High: 1010}},
		Quantities: []api.QuantitySpread{{ID: hostile, Quantity: "z", Port: hostile, Title: hostile, Unit: "Ω", Nominal: f(1),
			Samples: 2, Mean: f(1), StdDev: f(0), Min: f(1), Max: f(2),
			Percentiles: []api.PercentileValue{{P: 50, Value: f(1.5)}},
			Histogram:   &api.HistogramResult{Scale: "linear", Edges: []float64{1, 2}, Counts: []int{2}},
			Corners:     &api.CornerRange{Min: f(0.5), Max: f(2.5), MonteCarloShortMin: true}}},
		Targets: []api.TargetResult{{Quantity: "z", Port: hostile, Op: "<", Value: 1, Misses: 1, Fraction: 0.5}},
		Notes:   []string{hostile}}
	sens := &api.SensitivityResult{Frequency: 1e3, Step: 1e-3, Method: hostile, Notes: []string{hostile},
		Quantities: []api.SensitivityQuantity{{ID: hostile, Quantity: "z", Port: hostile, Title: hostile, Value: &api.Complex{Re: 1},
			Entries: []api.SensitivityEntry{{Parameter: hostile, Unit: "Ω", Nominal: 1, Value: f(-1), Error: f(1e-13), Phase: f(0)}}}}}
	std := &api.StandardValuesResult{Frequency: 1e3, Series: hostile, CapacitorSeries: "E12", Notes: []string{hostile},
		Ratios: []api.RatioResult{{Title: hostile, Num: hostile, Den: "R1", Wanted: 2, NumValue: 2e3, DenValue: 1e3, Gain: 2}},
		Variants: []api.SnapVariant{{Name: hostile, Values: []api.SnappedValue{{Name: hostile, Series: "E24", Nominal: 1, Value: 1}},
			Ports: []api.SnapCompare{{Name: hostile, Nominal: &api.Complex{Re: 1}, Snapped: &api.Complex{Re: 1}, MagnitudeError: f(0), PhaseDifference: f(0)}}}}}
	for name, html := range map[string]string{
		"tolerance":   TolerancePanel(res, `x"><script>`),
		"sensitivity": SensitivityPanel(sens, "s"),
		"standard":    StandardPanel(std, "d", map[string]string{hostile: "Ω"}),
	} {
		checkInert(t, name, html)
		parse(t, html) // well-formed
	}
	// The form shows what the user typed (a share link may carry anything
	// printable) as attribute values only.
	out := AidsForm(AidsInput{Form: &Form{Topology: "inverting"}, ID: "f", Study: Study{Tolerance: hostile, Seed: hostile, Trials: hostile,
		Parts: map[string]string{"R1": hostile}, Amps: map[string]AmpStudy{"U1": {A0Min: hostile}},
		Targets: []TargetStudy{{Quantity: "z", Port: "out", Op: ">", Value: hostile}}}})
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	checkInert(t, "form", out.HTML)
	vals := 0
	for _, e := range parseLoose(t, out.HTML) {
		if e.name == "input" && e.attrs["value"] == hostile {
			vals++
		}
	}
	if vals != 6 { // default tolerance, R1's, a0 minimum, seed, trials, the target's value
		t.Errorf("%d inputs hold the typed text as their value, want 6", vals)
	}
}

func checkInert(t *testing.T, name, html string) {
	t.Helper()
	for _, bad := range []string{"<img", "<script", "onerror=alert(1)>"} {
		if strings.Contains(html, bad) {
			t.Errorf("%s: contains %q unescaped", name, bad)
		}
	}
	if !strings.Contains(html, "&lt;img src=x onerror=alert(1)&gt;") {
		t.Errorf("%s: the hostile text is not shown as text", name)
	}
}

// The settings form names every input by the path the engine's errors
// use, so that a message lands beside its input.
func TestAidsFormParamsMatchEngineErrors(t *testing.T) {
	out := AidsForm(AidsInput{Form: &Form{Topology: "inverting"}, ID: "f", Study: Study{Targets: []TargetStudy{{Quantity: "pm", Op: "<", Value: "45"}}}})
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	params := map[string]bool{}
	parts := map[string]string{}
	for _, e := range parseLoose(t, out.HTML) {
		if p := e.attrs["data-param"]; p != "" {
			params[p] = true
		}
		if e.attrs["data-study"] == "part" {
			parts[e.attrs["data-name"]] = e.attrs["placeholder"]
		}
	}
	// Network parts take the default, source and load are held (DEVELOPERS.md, "Design aids in the JSON contract").
	want := map[string]string{"R1": "default", "R2": "default", "Rp": "default", "Rs": "held", "RL": "held", "CL": "held"}
	if !reflect.DeepEqual(parts, want) {
		t.Errorf("parts %v, want %v", parts, want)
	}
	for _, st := range []Study{
		{Parts: map[string]string{"R1": "Q"}},
		{Tolerance: "7x"},
		{Amps: map[string]AmpStudy{"U1": {A0Min: "300k"}}},
		{Amps: map[string]AmpStudy{"U1": {GBWMin: "1k7k"}}},
		{Seed: "-1"},
		{Trials: "0"},
		{Distribution: "log"},
		{Targets: []TargetStudy{{Quantity: "pm", Op: "<", Value: "4k5k"}}},
		{Targets: []TargetStudy{{Quantity: "pm", Op: "=", Value: "45"}}},
		{Targets: []TargetStudy{{Quantity: "z", Port: "nowhere", Op: "<", Value: "1"}}},
	} {
		_, bad := StartTolerance(AidsInput{Form: &Form{Topology: "inverting"}, Study: st})
		if bad == nil {
			t.Errorf("%+v: no error", st)
			continue
		}
		p := bad.Param
		if strings.HasSuffix(p, "].port") {
			p = strings.TrimSuffix(p, "port") + "quantity" // the quantity select names the port too
		}
		if !params[p] && !strings.HasPrefix(p, "tolerance.targets[") {
			t.Errorf("%+v: the error names %q, which no input of the form carries (%q)", st, bad.Param, bad.Message)
		}
		if strings.HasPrefix(p, "tolerance.targets[0]") && !params[p] {
			t.Errorf("%+v: %q is not on the target row", st, p)
		}
	}
	if !params["standardValues.series"] || !params["standardValues.capacitorSeries"] {
		t.Error("the series selects carry no data-param")
	}
}

// A study goes into the URL fragment and comes back the same; anything
// malformed refuses the whole study.
func TestStudyFragment(t *testing.T) {
	st := Study{Tolerance: "J", Parts: map[string]string{"R1": "0.5%", "Rp": "none"}, Amps: map[string]AmpStudy{"U1": {A0Min: "100k", GBWMin: "700k"}},
		Distribution: "normal", Seed: "9007199254740991", Trials: "500", Series: "E96", CapSeries: "E6",
		Targets: []TargetStudy{{Quantity: "pm", Op: "<", Value: "45"}, {Quantity: "z", Port: "out", Op: ">", Value: "1k"}, {Quantity: "r", Port: "a,b", Op: "<", Value: "-1"}}}
	frag := st.State()
	for _, want := range []string{"aid.tol=J", "aid.tol.R1=0.5%25", "aid.a0.U1=100k", "aid.dist=normal", "aid.seed=9007199254740991", "aid.t1=pm%3C45", "aid.t2=z%3Aout%3E1k"} {
		if !strings.Contains(frag, want) {
			t.Errorf("fragment %s lacks %s", frag, want)
		}
	}
	back, err := ReadStudy(frag)
	if err != nil || !reflect.DeepEqual(back, st) {
		t.Errorf("round trip: %+v, %v\nwant %+v", back, err, st)
	}
	// Through the calculator's own fragment, after its settings.
	e, _ := api.LookupEntry("inverting")
	f := DefaultForm(e)
	f.Study = &st
	g, err := ReadFragment(f.State(e), Form{Topology: "inverting"}, e)
	if err != nil || g.Study == nil || !reflect.DeepEqual(*g.Study, st) {
		t.Errorf("calculator fragment round trip: %+v, %v", g.Study, err)
	}
	if s := (&Study{}).State(); s != "" {
		t.Errorf("empty study writes %q", s)
	}
	if g, _ := ReadFragment(DefaultForm(e).State(e), Form{Topology: "inverting"}, e); g.Study != nil {
		t.Errorf("a link without aid settings gives a study %+v", g.Study)
	}
	for _, bad := range []string{"aid.x=1", "aid.t0=pm%3C1", "aid.t9=pm%3C1", "aid.t01=pm%3C1", "aid.t1=pm45", "aid.t1=zz%3C1", "aid.t1=z%3C1",
		"aid.t1=pm:out%3C1", "aid.t1=pm%3C", "aid.tol.=J", "aid.seed=1&aid.seed=2", "aid.tol=" + strings.Repeat("x", 65), "aid.tol=%0A"} {
		if _, err := ReadStudy(bad); err == nil {
			t.Errorf("ReadStudy(%q) accepted it", bad)
		}
		if _, err := ReadFragment(bad, Form{Topology: "inverting"}, e); err == nil {
			t.Errorf("ReadFragment(%q) accepted it", bad)
		}
	}
}

// The study's own checks, and the conversion of typed values.
func TestStudyToleranceKey(t *testing.T) {
	raw, bad := Study{Seed: " 42 ", Trials: "1e3"}.ToleranceKey()
	if bad == nil || bad.Param != FieldTrials {
		t.Errorf("trials 1e3: %v %v", string(raw), bad)
	}
	raw, bad = Study{Targets: []TargetStudy{{Quantity: "r", Port: "out", Op: "<", Value: "−1k"}, {Quantity: "pm", Op: "<", Value: "45°"}}}.ToleranceKey()
	if bad != nil {
		t.Fatal(bad)
	}
	var tr api.ToleranceRequest
	if err := json.Unmarshal(raw, &tr); err != nil {
		t.Fatal(err)
	}
	if tr.Default != "F" || *tr.Seed != 1 || tr.Trials != 2000 || tr.Targets[0].Value != -1000 || tr.Targets[1].Value != 45 {
		t.Errorf("defaults and values: %+v", tr)
	}
	for _, c := range []struct {
		st    Study
		param string
	}{
		{Study{Seed: "9007199254740992"}, FieldSeed},
		{Study{Seed: "x"}, FieldSeed},
		{Study{Trials: "100001"}, FieldTrials},
		{Study{Distribution: "triangular"}, FieldDistribution},
		{Study{Targets: []TargetStudy{{}, {Quantity: "g", Op: "<", Value: "1..2"}}}, "tolerance.targets[0].value"},
	} {
		if _, bad := c.st.ToleranceKey(); bad == nil || bad.Param != c.param {
			t.Errorf("%+v: error %+v, want one naming %s", c.st, bad, c.param)
		}
	}
}

// Sensitivities on the panel are the engine's, in its order (largest
// first), each quantity with its bar chart.
func TestSensitivityPanel(t *testing.T) {
	req := inverting(t)
	req.Sensitivity = json.RawMessage("true")
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	sr := resp.Sensitivity.(*api.SensitivityResult)
	els := parse(t, SensitivityPanel(sr, "s"))
	got := aidNumbers(t, els)
	for _, q := range sr.Quantities {
		var order []string
		for _, e := range els {
			if e.attrs["data-aid"] == "sensitivity" && e.attrs["data-quantity"] == q.ID && e.attrs["data-stat"] == "value" {
				order = append(order, e.attrs["data-parameter"])
			}
		}
		for i, en := range q.Entries {
			if i >= len(order) || order[i] != en.Parameter {
				t.Errorf("%s: row %d is %v, want %s", q.ID, i, order, en.Parameter)
				break
			}
			if g := got["sensitivity|"+q.ID+"|value|"+en.Parameter+"||"]; g != strconv.FormatFloat(*en.Value, 'g', -1, 64) {
				t.Errorf("%s/%s: %s, engine %v", q.ID, en.Parameter, g, *en.Value)
			}
		}
	}
	bars := 0
	for _, e := range els {
		if e.name == "svg" && strings.Contains(e.attrs["class"], "zplot-bars") {
			bars++
		}
	}
	if bars != len(sr.Quantities) {
		t.Errorf("%d bar charts for %d quantities", bars, len(sr.Quantities))
	}
}

// Standard values: the panel shows the engine's choices; the checks are
// IEC 60063 values (E24 and E96 tables in REFERENCES.md).
func TestStandardPanel(t *testing.T) {
	out := AidsPanels(AidsInput{Form: &Form{Topology: "inverting", Params: map[string]string{"R2": "50k"}}, ID: "d", Only: "standard"})
	if out.Error != nil || out.StandardError != nil || out.Sensitivity != "" {
		t.Fatalf("%+v", out)
	}
	got := aidNumbers(t, parse(t, out.Standard))
	for k, want := range map[string]string{
		"standard|R2|value||nearest|": "51000", // 50 k between E24's 47 k and 51 k: 51 k is nearer in ratio
		"standard|Rp|value||nearest|": "9100",  // 8.87 k between 8.2 k and 9.1 k
		"standard|R1|value||nearest|": "10000",
	} {
		if got[k] != want {
			t.Errorf("%s = %q, want %s", k, got[k], want)
		}
	}
	// The pair is the engine's choice (eseries.BestRatio, tested there):
	// here, that it is shown with its error.
	if got["standard|ratio|num|||0"] == "" || got["standard|ratio|gainRelErr|||0"] == "" {
		t.Error("the ratio pair and its gain error are not shown")
	}
	e96 := AidsPanels(AidsInput{Form: &Form{Topology: "inverting", Params: map[string]string{"R2": "50k"}}, Study: Study{Series: "E96"}, Only: "standard"})
	if g := aidNumbers(t, parse(t, e96.Standard))["standard|R2|value||nearest|"]; g != "49900" {
		t.Errorf("R2 = 50 k in E96: %s, want 49900", g)
	}
	bad := AidsPanels(AidsInput{Form: &Form{Topology: "inverting"}, Study: Study{Series: "E7"}})
	if bad.StandardError == nil || bad.StandardError.Param != "standardValues.series" || bad.Sensitivity == "" {
		t.Errorf("series E7: %+v", bad.StandardError)
	}
	// A circuit without resistors or capacitors has no standard values,
	// and says so, while its sensitivities still show.
	c := AidsPanels(AidsInput{Request: &api.Request{Circuit: "vsource V1 a gnd 1\nvcvs E1 b gnd sense=a,b gain=1000\ninductor L1 b gnd 1m\nport p b gnd\n",
		Reference: "E1", Ports: []string{"p"}, Frequency: 1e3}})
	if c.Error != nil || c.Sensitivity == "" {
		t.Errorf("inductor circuit: %+v", c)
	}
	if c.StandardError == nil && !strings.Contains(c.Standard, "std-panel") {
		t.Errorf("inductor circuit: neither standard values nor their error")
	}
}

// Numbers whose percentiles lie close together get the digits that keep
// them apart.
func TestSpreadFormat(t *testing.T) {
	f := spreadFormat("°", 90, 3e-5)
	if a, b := f(90.00136742), f(90.00139860); a == b || !strings.HasSuffix(a, "°") {
		t.Errorf("phase margins %s and %s", a, b)
	}
	g := spreadFormat("Ω", 1000, 6)
	if a, b := g(996.745), g(1002.56); a == b || !strings.Contains(b, "kΩ") {
		t.Errorf("impedances %s and %s", a, b)
	}
	if s := spreadFormat("", 1, 0)(0.5); s != plain(0.5) {
		t.Errorf("no spread: %s", s)
	}
	if s := percent(-0.0851); s != "−8.51 %" {
		t.Errorf("percent: %s", s)
	}
	if s := fixedDegrees(-0.0000001, 3); s != "0.000°" {
		t.Errorf("−0 degrees: %s", s)
	}
}

// Every stage of the catalog gets its design aids at its defaults, and
// with an optional part of a ratio left empty.
func TestAidsEveryStage(t *testing.T) {
	forms := []Form{{Topology: "capload", Params: map[string]string{"R1": ""}}, {Topology: "integrator", Params: map[string]string{"R2": ""}}}
	for _, e := range api.Catalog() {
		forms = append(forms, Form{Topology: e.ID})
	}
	for _, f := range forms {
		t.Run(f.Topology+fmtParams(f.Params), func(t *testing.T) {
			in := AidsInput{Form: &f, ID: "e", Study: Study{Trials: "40"}}
			form := AidsForm(in)
			if form.Error != nil {
				t.Fatalf("form: %v", form.Error)
			}
			parseLoose(t, form.HTML)
			p := AidsPanels(in)
			if p.Error != nil || p.StandardError != nil || p.SensitivityError != nil {
				t.Fatalf("panels: %v %v %v", p.Error, p.StandardError, p.SensitivityError)
			}
			parse(t, p.Standard)
			parse(t, p.Sensitivity)
			run, bad := StartTolerance(in)
			if bad != nil {
				t.Fatalf("tolerance: %v", bad)
			}
			run.Step(run.Total())
			out := ToleranceOutput(run, "e")
			if out.Error != nil || out.Done != out.Total {
				t.Fatalf("tolerance panel: %+v", out.Error)
			}
			if n := len(aidNumbers(t, parse(t, out.HTML))); n < 10 {
				t.Errorf("only %d numbers on the tolerance panel", n)
			}
		})
	}
}

func fmtParams(p map[string]string) string {
	var s []string
	for _, k := range sortedNames(p) {
		s = append(s, k+"="+p[k])
	}
	if len(s) == 0 {
		return ""
	}
	return "/" + strings.Join(s, ",")
}
