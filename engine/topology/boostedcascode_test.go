package topology_test

import (
	"math"
	"math/cmplx"
	"strconv"
	"testing"

	"zport/engine/api"
)

// bcNoCaps is the gain-boosted cascode with its capacitances left out and
// a flat booster, the model of the textbook formula.
func bcNoCaps(extra map[string]string) map[string]string {
	p := map[string]string{"Cgs2": "", "Cgd2": "", "Cx": "", "gbwb": ""}
	for k, v := range extra {
		p[k] = v
	}
	return p
}

func bcEngine(t *testing.T, params map[string]string, f float64) *api.Response {
	t.Helper()
	r, err := api.Analyze(api.Request{Topology: "boostedcascode", Params: params, Frequency: f})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// The gain-boosted cascode's output resistance, Rout ≈ gm2·ro2·ro1·(1 + A)
// (B. Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., 2017,
// ch. 9 [memory]; REFERENCES.md §11), against the engine. The exact value
// for the model is ro1 + ro2 + gm2(1 + A)·ro1·ro2 [derived: the node
// equations, as in the stage's closed forms], so the textbook form is short
// by (ro1 + ro2)/(gm2(1 + A)·ro1·ro2) relative: it holds where
// gm2·ro·(1 + A) ≫ 2, within 1 % once that product passes 200 — checked
// here over A from 1 to 10⁵ and gm·ro from 10 to 1000.
func TestBoostedCascodeRazavi(t *testing.T) {
	const id = 100e-6
	for _, a := range []float64{1, 10, 100, 1e3, 1e5} {
		for _, c := range []struct{ vov2, lambda float64 }{{0.2, 0.1}, {0.1, 0.02}, {0.5, 0.2}, {0.2, 0.5}} {
			params := bcNoCaps(map[string]string{"Ab": strconv.FormatFloat(a, 'g', -1, 64),
				"Vov2": strconv.FormatFloat(c.vov2, 'g', -1, 64), "lambda": strconv.FormatFloat(c.lambda, 'g', -1, 64)})
			r := bcEngine(t, params, 0)
			got := real(r.Ports[0].ZDirect.Value())
			gm, ro := 2*id/c.vov2, 1/(c.lambda*id)
			exact := 2*ro + gm*(1+a)*ro*ro
			razavi := gm * ro * ro * (1 + a)
			if tol := math.Max(1e-9, 50*0x1p-53**r.Condition); math.Abs(got-exact) > tol*exact {
				t.Errorf("A=%g gm·ro=%g: Rout %.10g, exact %.10g", a, gm*ro, got, exact)
			}
			bound := 2 / (gm * ro * (1 + a))
			if d := math.Abs(razavi/exact - 1); d > bound {
				t.Errorf("A=%g gm·ro=%g: gm2·ro2·ro1·(1 + A) is %.3g off, more than the %.3g the dropped terms allow", a, gm*ro, d, bound)
			} else if gm*ro*(1+a) >= 200 && d > 0.01 {
				t.Errorf("A=%g gm·ro=%g: the textbook form is %.3g off inside its range", a, gm*ro, d)
			}
		}
	}
	// With body effect: the exact form adds gmb2·ro1·ro2, which the
	// textbook's gm2 stands in for (gm2 → gm2 + gmb2 in the cascode term).
	r := bcEngine(t, bcNoCaps(map[string]string{"gmb2": "0.2m"}), 0)
	gm, ro, a := 1e-3, 100e3, 1000.0
	cfNear(t, "Rout with gmb2", real(r.Ports[0].ZDirect.Value()), 2*ro+(gm*(1+a)+0.2e-3)*ro*ro, 1e-9)
}

// Blackman's terms with the booster as the reference [derived from the
// node equations; REFERENCES.md §1 for the formula]: with the booster off
// the sink is a plain cascode, Z₀ = ro1 + ro2 + gm2·ro1·ro2; with the drain
// shorted the booster sees x through ro1 ∥ ro2 against M2's source:
// T_sc = A·gm2·(ro1 ∥ ro2)/(1 + gm2·(ro1 ∥ ro2)); with the drain open no
// current can change, T_oc = 0. Z = Z₀(1 + T_sc) is the boosted Rout.
func TestBoostedCascodeBlackmanTerms(t *testing.T) {
	r := bcEngine(t, bcNoCaps(nil), 0)
	p := r.Ports[0]
	gm, ro, a := 1e-3, 100e3, 1000.0
	par := ro / 2
	cfNear(t, "Z₀", real(p.Z0.Value()), 2*ro+gm*ro*ro, 1e-9)
	cfNear(t, "T short", real(p.TShort.Value()), a*gm*par/(1+gm*par), 1e-9)
	if cmplx.Abs(p.TOpen.Value()) > 1e-9 {
		t.Errorf("T open = %v, want 0", p.TOpen.Value())
	}
	cfNear(t, "Z", real(p.Z.Value()), 2*ro+gm*(1+a)*ro*ro, 1e-9)
	if r.Reference != "A1" {
		t.Errorf("reference %s, want the booster A1", r.Reference)
	}
}

// The boost fades with the booster's gain: with A(s) = A_b/(1 + s·A_b/ωb),
// the same node equations give Rout(s) = ro1 + ro2 + gm2(1 + A(s))·ro1·ro2
// when the capacitances are left out [derived], so |Rout| follows
// gm2·ro2·ro1·|1 + A(jω)| (the textbook form with the booster's A(s),
// Razavi ch. 9 [memory]) and falls as 1/f above the booster's pole.
func TestBoostedCascodeBoostFades(t *testing.T) {
	params := bcNoCaps(map[string]string{"gbwb": "200M"})
	gm, ro, ab, gbw := 1e-3, 100e3, 1000.0, 200e6
	fp := gbw / ab
	for _, f := range []float64{1, fp / 10, fp, 10 * fp, 100 * fp, gbw / 10} {
		r := bcEngine(t, params, f)
		a := complex(ab, 0) / (1 + complex(0, f/fp))
		want := complex(2*ro, 0) + complex(gm*ro*ro, 0)*(1+a)
		if got := r.Ports[0].ZDirect.Value(); cmplx.Abs(got-want) > 1e-9*cmplx.Abs(want) {
			t.Errorf("%g Hz: Rout %v, want %v", f, got, want)
		}
	}
	lo := bcEngine(t, params, fp/100).Ports[0].ZDirect.Value()
	hi := bcEngine(t, params, 100*fp).Ports[0].ZDirect.Value()
	if ratio := cmplx.Abs(lo) / cmplx.Abs(hi); ratio < 90 || ratio > 110 {
		t.Errorf("|Rout| falls by %.4g over two decades above the booster's pole, want about 100", ratio)
	}
}
