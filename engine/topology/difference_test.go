package topology_test

import (
	"math"
	"math/cmplx"
	"strconv"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

// cfCase is one parameter set of a stage, checked closed form against engine.
type cfCase struct {
	name   string
	params map[string]string
	f      float64
}

// cfAgree holds every closed form of stage id against the engine for each
// case, exercising the optional parts the shared suite leaves at their
// defaults.
func cfAgree(t *testing.T, id string, cases []cfCase) {
	t.Helper()
	cfAgreeAt(t, id, 0, cases)
}

// cfAgreeAt is cfAgree at the analysis temperature kelvin (0: the
// default), given to the engine as the request's and to the closed forms
// in their Values.
func cfAgreeAt(t *testing.T, id string, kelvin float64, cases []cfCase) {
	t.Helper()
	st, ok := topology.Lookup(id)
	if !ok {
		t.Fatalf("no stage %s", id)
	}
	for _, c := range cases {
		req := api.Request{Topology: id, Params: c.params, Frequency: c.f}
		if kelvin > 0 {
			req.Temperature = &kelvin
		}
		resp, err := api.Analyze(req)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		v, err := st.Values(c.params)
		if err != nil {
			t.Fatal(err)
		}
		if kelvin > 0 {
			v[topology.TemperatureKey] = kelvin
		}
		fs := st.Forms(v, c.f)
		cmp := func(what string, f *topology.Formula, eng *api.Complex) {
			t.Helper()
			if f == nil {
				t.Errorf("%s: %s: no closed form", c.name, what)
				return
			}
			tol := 1e-9
			if f.Tol > 0 {
				tol = f.Tol
			}
			if eng == nil || cmplx.IsNaN(f.Value) || cmplx.IsInf(f.Value) {
				if (eng == nil) != (cmplx.IsNaN(f.Value) || cmplx.IsInf(f.Value)) {
					t.Errorf("%s: %s: closed form %v, engine %v", c.name, what, f.Value, eng.Value())
				}
				return
			}
			// An exact zero (e.g. T_oc of a stage with no path back) meets
			// the engine's rounding residue, not a relative tolerance.
			if f.Value == 0 && cmplx.Abs(eng.Value()) < 1e-12 {
				return
			}
			if d := rel(f.Value, eng.Value()); d > tol {
				t.Errorf("%s: %s: closed form %v, engine %v (rel %.2g)", c.name, what, f.Value, eng.Value(), d)
			}
		}
		cmp("T", fs.T, resp.ReturnRatio)
		if resp.Gain != nil {
			cmp("gain", fs.Gain, resp.Gain.GDirect)
		}
		for i, pf := range fs.Ports {
			p := resp.Ports[i]
			if p.Name != pf.Name {
				t.Fatalf("%s: port order %s vs %s", c.name, p.Name, pf.Name)
			}
			cmp(p.Name+".z0", pf.Z0, p.Z0)
			cmp(p.Name+".tShort", pf.TShort, p.TShort)
			cmp(p.Name+".tOpen", pf.TOpen, p.TOpen)
			cmp(p.Name+".z", pf.Z, p.ZDirect)
		}
	}
}

// near checks got against want to a relative tolerance.
func cfNear(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if d := math.Abs(got-want) / math.Abs(want); !(d <= tol) {
		t.Errorf("%s = %.12g, want %.12g (rel %.2g > %.0g)", what, got, want, d, tol)
	}
}

func cfExtra(t *testing.T, fs topology.Forms, prefix string) float64 {
	t.Helper()
	for _, x := range fs.Extras {
		if len(x.Name) >= len(prefix) && x.Name[:len(prefix)] == prefix {
			return x.Value
		}
	}
	t.Fatalf("no extra %q", prefix)
	return math.NaN()
}

func TestDifferenceAgainstEngine(t *testing.T) {
	cfAgree(t, "difference", []cfCase{
		{"defaults", nil, 1e3},
		{"all optional parts", map[string]string{"Rs1": "50", "Rs2": "75", "p2": "5M", "rcm": "1G", "rid": "1M", "CL": "1n"}, 37e3},
		{"bare op amp", map[string]string{"gbw": "", "rid": "", "rcm": "", "CL": "", "ro": "0"}, 0},
		{"ro zero, high frequency", map[string]string{"ro": "0", "rcm": "10M"}, 2e6},
		{"DC", map[string]string{"rcm": "100M", "Rs1": "1k"}, 0},
	})
}

// The ideal difference-amplifier law vO = (1 + R2/R1)·R4/(R3+R4)·v2 −
// (R2/R1)·v1 (S. Franco, Design with Operational Amplifiers and Analog
// Integrated Circuits, 3rd ed., ch. 2 [memory], REFERENCES.md §3), reached by
// the exact forms and by the engine as a0 → 1e12 with rid, rcm absent.
func TestDifferenceIdealLaw(t *testing.T) {
	params := map[string]string{"a0": "1T", "gbw": "", "rid": "", "rcm": "", "ro": "10",
		"R1": "4.7k", "R2": "22k", "R3": "5.1k", "R4": "24k", "CL": ""}
	st, _ := topology.Lookup("difference")
	v, _ := st.Values(params)
	wantA2 := (1 + 22e3/4.7e3) * 24e3 / (5.1e3 + 24e3)
	wantA1 := -22e3 / 4.7e3
	fs := st.Forms(v, 0)
	cfNear(t, "closed-form A2", real(fs.Gain.Value), wantA2, 1e-9)
	cfNear(t, "extra ideal A2", cfExtra(t, fs, "ideal op amp: coefficient of v2"), wantA2, 1e-12)
	cfNear(t, "extra ideal A1", cfExtra(t, fs, "ideal op amp: coefficient of v1"), wantA1, 1e-12)

	resp, err := api.Analyze(api.Request{Topology: "difference", Params: params, Frequency: 0})
	if err != nil {
		t.Fatal(err)
	}
	cfNear(t, "engine A2", real(resp.Gain.GDirect.Value()), wantA2, 1e-9)
	resp1, err := api.Analyze(api.Request{Topology: "difference", Params: params, Frequency: 0,
		Gain: &api.GainSpec{Source: "V1", Output: "out"}})
	if err != nil {
		t.Fatal(err)
	}
	cfNear(t, "engine A1", real(resp1.Gain.GDirect.Value()), wantA1, 1e-9)
}

// The differential/common-mode extras equal the engine's two single-source
// gains combined: vd = v2 − v1, vcm = (v1+v2)/2 ⇒ A_d = (A2 − A1)/2,
// A_cm = A1 + A2 (definitions, common practice).
func TestDifferenceCMRRFromEngine(t *testing.T) {
	params := map[string]string{"Rs1": "25", "p2": "8M"}
	f := 20e3
	st, _ := topology.Lookup("difference")
	v, _ := st.Values(params)
	fs := st.Forms(v, f)
	g := func(src string) complex128 {
		resp, err := api.Analyze(api.Request{Topology: "difference", Params: params, Frequency: f,
			Gain: &api.GainSpec{Source: src, Output: "out"}})
		if err != nil {
			t.Fatal(err)
		}
		return resp.Gain.GDirect.Value()
	}
	a1, a2 := g("V1"), g("V2")
	cfNear(t, "|A1|", cfExtra(t, fs, "A1 = vO/v1"), cmplx.Abs(a1), 1e-9)
	cfNear(t, "|A_d|", cfExtra(t, fs, "differential gain"), cmplx.Abs((a2-a1)/2), 1e-9)
	cfNear(t, "|A_cm|", cfExtra(t, fs, "common-mode gain"), cmplx.Abs(a1+a2), 1e-8)
	cfNear(t, "CMRR dB", cfExtra(t, fs, "CMRR = "), 20*math.Log10(cmplx.Abs((a2-a1)/2/(a1+a2))), 1e-8)
}

// Worst-case CMRR ≈ (1 + R2/R1)/(4p) for resistor tolerance p (Franco,
// ch. 2 [memory]; REFERENCES.md §3): with every resistor at the unfavourable
// edge of ±p and a near-ideal op amp, the exact CMRR lands within the first-
// order error (a few p, relative) of the estimate.
func TestDifferenceWorstCaseCMRR(t *testing.T) {
	for _, p := range []float64{0.001, 0.01} {
		k := 10.0
		R := func(x float64) string { return cfTestNum(x) }
		params := map[string]string{"a0": "1T", "gbw": "", "rid": "", "rcm": "", "ro": "0", "CL": "",
			"R1": R(10e3 * (1 + p)), "R2": R(k * 10e3 * (1 - p)), "R3": R(10e3 * (1 - p)), "R4": R(k * 10e3 * (1 + p))}
		st, _ := topology.Lookup("difference")
		v, err := st.Values(params)
		if err != nil {
			t.Fatal(err)
		}
		fs := st.Forms(v, 0)
		got := math.Pow(10, cfExtra(t, fs, "CMRR = ")/20)
		want := (1 + k) / (4 * p)
		cfNear(t, "worst-case CMRR", got, want, 3*p)
		cfNear(t, "resistor-only CMRR", math.Pow(10, cfExtra(t, fs, "CMRR from the resistor mismatch")/20), got, 1e-6)
	}
}

func cfTestNum(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
