package feedback_test

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/feedback"
)

// Without a reference element the analyzer gives the direct solution
// alone. An RC low-pass (our values) against its circuit-theory closed
// forms: Z seen by the source R + 1/(sC), Z at the output R ∥ 1/(sC), gain
// 1/(1 + sRC) — common textbook results.
func TestNoReference(t *testing.T) {
	const r, c = 1e3, 1e-6
	a := analyzer(t, `
vsource Vin in gnd 1
resistor R in out 1k
capacitor C out gnd 1u
`, "", [][3]string{{"in", "in", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out", "gnd"})
	if a.Ref != -1 {
		t.Fatalf("Ref = %d, want −1", a.Ref)
	}
	if _, err := a.ReturnRatio(1e3); !errors.Is(err, feedback.ErrNoReference) {
		t.Errorf("ReturnRatio: %v, want ErrNoReference", err)
	}
	for _, f := range []float64{0, 10, 159.15494309189535, 1e5} {
		pt, err := a.At(f)
		if err != nil {
			t.Fatal(err)
		}
		s := complex(0, 2*math.Pi*f)
		checks := []struct {
			what      string
			got, want complex128
		}{
			{"gain", pt.Gain.GDirect, 1 / (1 + s*r*c)},
			{"Z out", pt.Ports[1].ZDirect, 1 / (1/complex(r, 0) + s*c)},
		}
		if f > 0 {
			checks = append(checks, struct {
				what      string
				got, want complex128
			}{"Z in", pt.Ports[0].ZDirect, complex(r, 0) + 1/(s*c)})
		}
		for _, x := range checks {
			if d := cmplx.Abs(x.got-x.want) / cmplx.Abs(x.want); d > 1e-13 {
				t.Errorf("f=%g: %s = %v, want %v", f, x.what, x.got, x.want)
			}
		}
		if !cmplx.IsNaN(pt.T) || !cmplx.IsNaN(pt.Gain.G) || !cmplx.IsNaN(pt.Ports[1].Z) || !cmplx.IsNaN(pt.Ports[1].Z0) {
			t.Errorf("f=%g: T %v, G %v, Z %v, Z₀ %v: without a reference these are not defined", f, pt.T, pt.Gain.G, pt.Ports[1].Z, pt.Ports[1].Z0)
		}
	}
}
