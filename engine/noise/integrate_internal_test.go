package noise

import (
	"math"
	"testing"
)

// The tabulated Gauss–Kronrod constants, checked by what they must do:
// K15 integrates x^m exactly on [−1, 1] for m ≤ 22 (3·7 + 1), G7 for
// m ≤ 13; and the nodes of G7 are the zeros of the Legendre polynomial
// P7.
func TestGaussKronrodExact(t *testing.T) {
	for m := 0; m <= 23; m++ {
		want := 0.0
		if m%2 == 0 {
			want = 2 / float64(m+1)
		}
		k, g := gkW[7]*math.Pow(0, float64(m)), gW[3]*math.Pow(0, float64(m))
		for j := 0; j < 7; j++ {
			s := math.Pow(gkX[j], float64(m)) + math.Pow(-gkX[j], float64(m))
			k += gkW[j] * s
			if j%2 == 1 {
				g += gW[j/2] * s
			}
		}
		if m <= 22 && math.Abs(k-want) > 1e-15 {
			t.Errorf("K15 on x^%d: %.17g, want %.17g", m, k, want)
		}
		if m <= 13 && math.Abs(g-want) > 1e-15 {
			t.Errorf("G7 on x^%d: %.17g, want %.17g", m, g, want)
		}
		if m == 14 && math.Abs(g-want) < 1e-6 {
			t.Errorf("G7 on x^14 is exact (%.17g): the check cannot tell a wrong rule", g)
		}
	}
	// P7(x) = (429x⁷ − 693x⁵ + 315x³ − 35x)/16.
	for j := 1; j < 8; j += 2 {
		x := gkX[j]
		if p := (429*math.Pow(x, 7) - 693*math.Pow(x, 5) + 315*math.Pow(x, 3) - 35*x) / 16; math.Abs(p) > 1e-13 { // rounding of terms near 100
			t.Errorf("P7(%g) = %g, want 0", x, p)
		}
	}
}

// The adaptive rule on integrands with known integrals, including one
// with a sharp peak that the first panels straddle: the estimate it
// reports bounds the error it makes.
func TestQuadrature(t *testing.T) {
	for _, c := range []struct {
		name   string
		f      func(float64) float64
		a, b   float64
		panels int
		want   float64
	}{
		{"exp", math.Exp, 0, 3, 1, math.Exp(3) - 1},
		{"Lorentzian", func(x float64) float64 { return 1 / (1 + 1e6*(x-0.3)*(x-0.3)) }, 0, 1, 2, (math.Atan(700) + math.Atan(300)) / 1e3},
		{"1/x over six decades of ln", func(x float64) float64 { return math.Exp(-x) }, 0, 14, 6, 1 - math.Exp(-14)},
	} {
		q := quadrature{dim: 1, ctrl: 1, rtol: 1e-10, maxEval: 5000,
			f: func(x float64, v []float64) error { v[0] = c.f(x); return nil }}
		r, err := q.integrate(c.a, c.b, c.panels)
		if err != nil || !r.Converged {
			t.Fatalf("%s: %v, converged %v", c.name, err, r.Converged)
		}
		if d := math.Abs(r.I[0] - c.want); d > r.E[0] || d > 1e-10*math.Abs(c.want) {
			t.Errorf("%s: %.15g, want %.15g (error %.2g, estimate %.2g)", c.name, r.I[0], c.want, d, r.E[0])
		}
	}
}
