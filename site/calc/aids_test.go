package calc

import (
	"maps"
	"reflect"
	"slices"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/fragment"
	"zport/site/internal/sitetest"
	"zport/site/view"
)

// aidIn is the design aids' input for form f with id and study st.
func aidIn(f Form, id string, st Study) AidsInput {
	f.ID = id
	f.Settings = map[string]Values{aidsKey: st.Values()}
	return AidsInput{Form: f}
}

// The page's path — a Study as typed, run in slices of any size — gives
// exactly the panel of the one-shot request: the draws depend only on the
// seed and the trial number.
func TestSlicedStudyEqualsOneShot(t *testing.T) {
	in := aidIn(Form{Topology: "inverting", Params: map[string]string{"R2": "100k"}}, "s", Study{
		Tolerance: "G", Parts: map[string]string{"Rp": "none", "RL": "10%"}, Amps: map[string]AmpStudy{"U1": {GBWMin: "700k"}},
		Distribution: "normal", Seed: "99", Trials: "640", Targets: []TargetStudy{{Quantity: "phase", Port: "out", Op: ">", Value: "89.5°"}},
	})
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
	sliced := ToleranceOutput(run, Layout{ID: "s"})
	req := sitetest.Inverting(t)
	req.Params = map[string]string{"R2": "100k"}
	want := view.TolerancePanel(sitetest.Tolerance(t, req, `{"default": "G", "parts": {"Rp": "none", "RL": "10%"}, "amps": {"U1": {"gbwMin": "700k"}},
		"distribution": "normal", "seed": 99, "trials": 640, "targets": [{"quantity": "phase", "port": "out", "op": ">", "value": 89.5}]}`), "s", 0)
	if sliced.HTML != want {
		t.Errorf("the sliced run's panel differs from the one-shot panel")
	}
	// R1 and R2 at G, RL at 10 %, the gbw spread (Rp held): four varying
	// parts, all 2⁴ corners.
	if sliced.Done != sliced.Total || sliced.Total != 640+16 {
		t.Errorf("done %d of %d, want 656 units (640 trials, 16 corners)", sliced.Done, sliced.Total)
	}
}

// What the user typed (a share link may carry anything printable) shows
// in the settings form as attribute values only.
func TestAidsFormEscapesHostileText(t *testing.T) {
	out := AidsForm(aidIn(Form{Topology: "inverting"}, "f", Study{Tolerance: hostile, Seed: hostile, Trials: hostile,
		Parts: map[string]string{"R1": hostile}, Amps: map[string]AmpStudy{"U1": {A0Min: hostile}},
		Targets: []TargetStudy{{Quantity: "z", Port: "out", Op: ">", Value: hostile}}}))
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	sitetest.CheckInert(t, "form", out.HTML)
	vals := 0
	for _, e := range sitetest.ParseLoose(t, out.HTML) {
		if e.Name == "input" && e.Attrs["value"] == hostile {
			vals++
		}
	}
	if vals != 6 { // default tolerance, R1's, a0 minimum, seed, trials, the target's value
		t.Errorf("%d inputs hold the typed text as their value, want 6", vals)
	}
}

// The settings form names every input by the path the engine's errors
// use, so that a message lands beside its input.
func TestAidsFormParamsMatchEngineErrors(t *testing.T) {
	out := AidsForm(aidIn(Form{Topology: "inverting"}, "f", Study{Targets: []TargetStudy{{Quantity: "pm", Op: "<", Value: "45"}}}))
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	params := map[string]bool{}
	parts := map[string]string{}
	for _, e := range sitetest.ParseLoose(t, out.HTML) {
		if p := e.Attrs["data-param"]; p != "" {
			params[p] = true
		}
		if e.Attrs["data-study"] == "part" {
			parts[e.Attrs["data-name"]] = e.Attrs["placeholder"]
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
		{Targets: []TargetStudy{{Quantity: "z", Port: "nowhere", Op: "<", Value: "1"}}},
	} {
		_, bad := StartTolerance(aidIn(Form{Topology: "inverting"}, "", st))
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

// A study goes into the calculator's share link as its settings and comes
// back the same; a setting the study does not know, or cannot read, is
// refused by name.
func TestStudySettings(t *testing.T) {
	st := Study{Tolerance: "J", Parts: map[string]string{"R1": "0.5%", "Rp": "none"}, Amps: map[string]AmpStudy{"U1": {A0Min: "100k", GBWMin: "700k"}},
		Distribution: "normal", Seed: "9007199254740991", Trials: "500", Series: "E96", CapSeries: "E6",
		Targets: []TargetStudy{{Quantity: "pm", Op: "<", Value: "45"}, {Quantity: "z", Port: "out", Op: ">", Value: "1k"}, {Quantity: "r", Port: "a,b", Op: "<", Value: "-1"}}}
	e, _ := api.LookupEntry("inverting")
	f := DefaultForm(e)
	f.Settings = map[string]Values{aidsKey: st.Values()}
	frag := f.State(e)
	for _, want := range []string{"aid.tol=J", "aid.tol.R1=0.5%25", "aid.a0.U1=100k", "aid.dist=normal", "aid.seed=9007199254740991", "aid.t1=pm%3C45", "aid.t2=z%3Aout%3E1k"} {
		if !strings.Contains(frag, want) {
			t.Errorf("fragment %s lacks %s", frag, want)
		}
	}
	g, refused := ReadFragment(frag, Form{Topology: "inverting"}, e)
	if len(refused) > 0 {
		t.Fatal(refused)
	}
	back, bad := studyOf(g.Settings[aidsKey])
	if bad != nil || !reflect.DeepEqual(back, st) {
		t.Errorf("round trip: %+v, %v\nwant %+v", back, bad, st)
	}
	if g, _ := ReadFragment(DefaultForm(e).State(e), Form{Topology: "inverting"}, e); len(g.Settings[aidsKey]) != 0 {
		t.Errorf("a link without aid settings gives %v", g.Settings)
	}
	for _, bad := range []string{"aid.x=1", "aid.t0=pm%3C1", "aid.t9=pm%3C1", "aid.t01=pm%3C1", "aid.tol.=J", "aid.seed=1&aid.seed=2",
		"aid.tol=" + strings.Repeat("x", 65), "aid.tol=%0A"} {
		if _, refused := ReadFragment(bad, Form{Topology: "inverting"}, e); len(refused) != 1 || !strings.HasPrefix(refused[0].Key, "aid.") {
			t.Errorf("ReadFragment(%q): refused %+v", bad, refused)
		}
	}
	// Targets that cannot be read are refused, naming the setting; the
	// calculator refuses it as it reads the link, and uses the rest.
	for _, bad := range []string{"pm45", "zz<1", "z<1", "pm:out<1", "pm<"} {
		if _, err := studyOf(Values{"t1": bad}); err == nil || err.Param != "aid.t1" {
			t.Errorf("target %q: %v", bad, err)
		}
		frag := "aid.t1=" + fragment.Escape(bad) + "&aid.n=500"
		out := Compute(Form{Topology: "inverting", Fragment: &frag})
		if out.Error != nil || len(out.Refused) != 1 || out.Refused[0].Key != "aid.t1" || out.Form.Settings[aidsKey]["n"] != "500" {
			t.Errorf("link with target %q: %+v, %+v", bad, out.Error, out.Refused)
		}
	}
}

// The study's own checks, and the conversion of typed values.
func TestStudyToleranceKey(t *testing.T) {
	_, bad := Study{Seed: " 42 ", Trials: "1e3"}.ToleranceKey()
	if bad == nil || bad.Param != FieldTrials {
		t.Errorf("trials 1e3: %v", bad)
	}
	tr, bad := Study{Targets: []TargetStudy{{Quantity: "r", Port: "out", Op: "<", Value: "−1k"}, {Quantity: "pm", Op: "<", Value: "45°"}}}.ToleranceKey()
	if bad != nil {
		t.Fatal(bad)
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

// Standard values: the panel shows the engine's choices; the checks are
// IEC 60063 values (E24 and E96 tables in REFERENCES.md).
func TestStandardPanel(t *testing.T) {
	in := aidIn(Form{Topology: "inverting", Params: map[string]string{"R2": "50k"}}, "d", Study{})
	in.Only = "standard"
	out := AidsPanels(in)
	if out.Error != nil || out.StandardError != nil || out.Sensitivity != "" {
		t.Fatalf("%+v", out)
	}
	got := sitetest.AidNumbers(t, sitetest.Parse(t, out.Standard))
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
	in = aidIn(Form{Topology: "inverting", Params: map[string]string{"R2": "50k"}}, "d", Study{Series: "E96"})
	in.Only = "standard"
	e96 := AidsPanels(in)
	if g := sitetest.AidNumbers(t, sitetest.Parse(t, e96.Standard))["standard|R2|value||nearest|"]; g != "49900" {
		t.Errorf("R2 = 50 k in E96: %s, want 49900", g)
	}
	bad := AidsPanels(aidIn(Form{Topology: "inverting"}, "d", Study{Series: "E7"}))
	if bad.StandardError == nil || bad.StandardError.Param != "standardValues.series" || bad.Sensitivity == "" {
		t.Errorf("series E7: %+v", bad.StandardError)
	}
	// A circuit without resistors or capacitors has no standard values,
	// and says so, while its sensitivities still show.
	c := AidsPanels(aidIn(Form{Circuit: "vsource V1 a gnd 1\nvcvs E1 b gnd sense=a,b gain=1000\ninductor L1 b gnd 1m\nport p b gnd\n",
		Reference: "E1", Ports: []string{"p"}, Frequency: "1k"}, "c", Study{}))
	if c.Error != nil || c.Sensitivity == "" {
		t.Errorf("inductor circuit: %+v", c)
	}
	if c.StandardError == nil && !strings.Contains(c.Standard, "std-panel") {
		t.Errorf("inductor circuit: neither standard values nor their error")
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
			in := aidIn(f, "e", Study{Trials: "40"})
			form := AidsForm(in)
			if form.Error != nil {
				t.Fatalf("form: %v", form.Error)
			}
			sitetest.ParseLoose(t, form.HTML)
			p := AidsPanels(in)
			if p.Error != nil || p.StandardError != nil || p.SensitivityError != nil {
				t.Fatalf("panels: %v %v %v", p.Error, p.StandardError, p.SensitivityError)
			}
			sitetest.Parse(t, p.Standard)
			sitetest.Parse(t, p.Sensitivity)
			run, bad := StartTolerance(in)
			if bad != nil {
				t.Fatalf("tolerance: %v", bad)
			}
			run.Step(run.Total())
			out := ToleranceOutput(run, Layout{ID: "e"})
			if out.Error != nil || out.Done != out.Total {
				t.Fatalf("tolerance panel: %+v", out.Error)
			}
			if n := len(sitetest.AidNumbers(t, sitetest.Parse(t, out.HTML))); n < 10 {
				t.Errorf("only %d numbers on the tolerance panel", n)
			}
		})
	}
}

func fmtParams(p map[string]string) string {
	var s []string
	for _, k := range slices.Sorted(maps.Keys(p)) {
		s = append(s, k+"="+p[k])
	}
	if len(s) == 0 {
		return ""
	}
	return "/" + strings.Join(s, ",")
}
