package calc

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
)

func solveIn(f Form, v Values) SolveInput {
	f.ID = "s"
	f.Settings = map[string]Values{solveKey: v}
	return SolveInput{Form: f}
}

// The page's path — settings as typed, a run in slices — gives the
// engine's one-shot answer, rendered; the panel's numbers carry the
// engine's values, and its buttons the values to apply.
func TestSolvePanelFromSlices(t *testing.T) {
	in := solveIn(Form{Topology: "capload"}, Values{"part": "Riso", "quantity": "pm", "value": "82°", "series": "E24"})
	run, bad := StartSolve(in)
	if bad != nil {
		t.Fatal(bad)
	}
	for steps := 0; ; steps++ {
		if _, _, done := run.Step(5); done {
			break
		}
		if steps > 100 {
			t.Fatal("the run does not end")
		}
	}
	out := SolveOutputOf(run, Layout{ID: "s"})
	x := 82.0
	req := api.Request{Topology: "capload", Frequency: 1e4}
	api.Solve.Ask(&req, &api.SolveRequest{Part: "Riso", Target: api.SolveTarget{Quantity: "pm", Value: &x}, Series: "E24"})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	r := api.Solve.Result(resp)
	if out.HTML != SolvePanel(r, Layout{ID: "s"}) || out.Done != r.Evaluations || out.Total != out.Done {
		t.Fatalf("the sliced run's panel differs from the one-shot panel (done %d of %d, %d evaluations)", out.Done, out.Total, r.Evaluations)
	}
	if len(r.Solutions) != 2 {
		t.Fatalf("%d solutions, want the two on either side of the margin's peak", len(r.Solutions))
	}
	for i, s := range r.Solutions {
		want := `data-solve="solution" data-stat="value" data-value="` + strconv.FormatFloat(s.Value, 'g', -1, 64) + `"`
		if !strings.Contains(out.HTML, want) {
			t.Errorf("solution %d: no %s", i, want)
		}
		text := ApplyText(s.Value, false)
		if !strings.Contains(out.HTML, `data-text="`+text+`"`) {
			t.Errorf("no button applying %q", text)
		}
	}
	for _, sv := range r.Standard {
		for _, p := range []api.SolvePoint{sv.Below, sv.Above} {
			if !strings.Contains(out.HTML, `data-text="`+Syntax(p.Value)+`"`) {
				t.Errorf("no button applying the standard value %g", p.Value)
			}
		}
	}
	if !strings.Contains(out.HTML, `class="zplot zplot-curve"`) || !strings.Contains(out.HTML, "not monotonic") {
		t.Error("the panel lacks its curve or its note")
	}
}

// A solution is applied within 5·10⁻⁸, a standard value exactly.
func TestApplyText(t *testing.T) {
	for _, c := range []struct {
		x     float64
		exact bool
		want  string
	}{
		{1.38325850079699e-12, false, "1.3832585p"},
		{1.2e-12, true, "1.2p"},
		{4700, true, "4.7k"},
		{8.578503272952187, false, "8.578503"},
		{-2.5e6, false, "-2.5M"},
	} {
		if got := ApplyText(c.x, c.exact); got != c.want {
			t.Errorf("ApplyText(%g, %v) = %q, want %q", c.x, c.exact, got, c.want)
		}
	}
}

// The form lists the stage's parameters (a stage's last network part
// chosen by default) and what can be reached at its ports and gain; what
// the user typed comes back as typed.
func TestSolveForm(t *testing.T) {
	out := SolveForm(solveIn(Form{Topology: "transimpedance"}, nil))
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	for _, want := range []string{`value="Cf" selected`, `value="z:in"`, `value="phase:out"`, `value="overshoot"`, `data-param="solve.target.value"`,
		`value="E12" selected`, `data-from="0.1f"`, `data-to="1m"`} {
		if !strings.Contains(out.HTML, want) {
			t.Errorf("the form lacks %s", want)
		}
	}
	out = SolveForm(solveIn(Form{Circuit: "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M\nresistor RL out gnd 1k\n", Reference: "U1", Frequency: "1k"},
		Values{"part": "U1.gbw", "quantity": "z", "port": "", "value": `"><b>`, "series": "E96"}))
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	for _, want := range []string{`value="U1.gbw" selected`, `value="RL"`, `value="&#34;&gt;&lt;b&gt;"`, `value="E96" selected`} {
		if !strings.Contains(out.HTML, want) {
			t.Errorf("the circuit's form lacks %s", want)
		}
	}
	if strings.Contains(out.HTML, `value="overshoot"`) {
		t.Error("a circuit without a gain is offered the response's quantities")
	}
}

// The settings travel in the share link under "solve." and come back;
// a link's bad setting is refused, naming it.
func TestSolveSettingsInTheLink(t *testing.T) {
	e, _ := api.LookupEntry("transimpedance")
	f := Form{Topology: "transimpedance", Settings: map[string]Values{solveKey: {"part": "Cf", "quantity": "pm", "value": "45", "series": "E24"}}}
	out := Compute(f)
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	for _, want := range []string{"solve.part=Cf", "solve.quantity=pm", "solve.value=45", "solve.series=E24"} {
		if !strings.Contains(out.State, want) {
			t.Errorf("state %q lacks %s", out.State, want)
		}
	}
	g, err := ReadFragment(out.State, DefaultForm(e), e)
	if err != nil || g.Settings[solveKey]["value"] != "45" || g.Settings[solveKey]["part"] != "Cf" {
		t.Fatalf("read back %v, %v", g.Settings, err)
	}
	// A setting the target cannot do without takes the solve's other
	// settings with it: a part without a target, or a target without a
	// part, is no setting at all.
	all := "solve.part solve.quantity solve.value"
	for _, c := range []struct{ frag, culprit, refused string }{
		{"solve.part=Cx&solve.quantity=pm&solve.value=45", "solve.part", all},
		{"solve.part=Cf&solve.quantity=pm&solve.value=400", "solve.value", all},
		{"solve.part=Cf&solve.quantity=z&solve.value=4", "", all},
		{"solve.part=Cf&solve.quantity=pm&solve.value=4x", "solve.value", all},
		{"solve.part=Cf&solve.quantity=pm&solve.value=4&solve.to=1", "solve.to", "solve.to"},
		{"solve.part=Cf&solve.quantity=pm&solve.value=4&solve.nope=1", "solve.nope", "solve.nope"},
	} {
		s := c.frag
		out := Compute(Form{Topology: "transimpedance", Fragment: &s})
		if out.Error != nil || refusedKeys(out.Refused) != c.refused {
			t.Errorf("%s: %+v, %+v, want %s refused and the rest used", c.frag, out.Error, out.Refused, c.refused)
			continue
		}
		// The culprit is refused for its own fault, the others for theirs.
		for _, r := range out.Refused {
			if r.Key == c.culprit && strings.Contains(r.Message, "name the part") {
				t.Errorf("%s: %s refused for another's fault: %s", c.frag, r.Key, r.Message)
			}
		}
	}
}

// ApplyValue rewrites the value token, and says why when it cannot.
func TestApplyValue(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M\nresistor RL out gnd 1k  # load\n"
	out := ApplyValue(ApplyInput{Circuit: text, Part: "U1.gbw", Text: "2.5M"})
	if out.Error != nil || out.Circuit != strings.Replace(text, "gbw=1M", "gbw=2.5M", 1) {
		t.Errorf("%+v", out)
	}
	out = ApplyValue(ApplyInput{Circuit: text, Part: "Vin", Text: "2"})
	if out.Error == nil || out.Error.Param != "solve.part" || !regexp.MustCompile(`Vin`).MatchString(out.Error.Message) {
		t.Errorf("applying to a source: %+v", out)
	}
}

// The transimpedance page's classic Cf is named with the margin it gives,
// so its name differs between designs; a pin's value is still compared,
// by its place in the list.
func TestDesignValueNamedWithAFigureIsCompared(t *testing.T) {
	out := Compute(Form{Topology: "transimpedance", Pins: []Pin{{Name: "bigger diode", Slot: 1, Params: map[string]string{"Cd": "40p"}}}})
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	re := regexp.MustCompile(`data-compare="extra:(\d+)" data-pin="1" data-stat="value"[^>]*data-value="([^"]+)"`)
	var cf string
	for _, m := range re.FindAllStringSubmatch(out.HTML, -1) {
		if m[1] == "2" { // Ci, L, then the classic Cf
			cf = m[2]
		}
	}
	if !strings.Contains(out.HTML, "Cf (classic “45°” formula, gives") || cf == "" {
		t.Fatalf("no pin value compared for the classic Cf")
	}
	// Cf = √(Ci/(2π·Rf·gbw)) with the pin's Ci = 40p + 4p.
	if v, _ := strconv.ParseFloat(cf, 64); math.Abs(v-math.Sqrt(44e-12/(2*math.Pi*1e6*10e6))) > 1e-9*v {
		t.Errorf("the pin's classic Cf %s", cf)
	}
}
