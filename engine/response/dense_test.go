package response

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// expm against closed forms — a rotation generator gives the rotation,
// [[cos wt, −sin wt], [sin wt, cos wt]]; a Jordan block λI + N gives
// e^λ(I + N) — and against gonum's mat.Dense.Exp (the same method of
// Higham's, an independent implementation) on seeded random matrices of
// norm 10⁻³ to 10³.
func TestExpm(t *testing.T) {
	for _, w := range []float64{1e-3, 0.7, 3, 40} {
		e := expm([]float64{0, -w, w, 0}, 2)
		want := []float64{math.Cos(w), -math.Sin(w), math.Sin(w), math.Cos(w)}
		for i := range e {
			if math.Abs(e[i]-want[i]) > 1e-13*math.Max(1, w) {
				t.Errorf("rotation by %g: e = %v, want %v", w, e, want)
				break
			}
		}
	}
	for _, l := range []float64{-30, -1, 0.5} {
		e := expm([]float64{l, 1, 0, l}, 2)
		x := math.Exp(l)
		want := []float64{x, x, 0, x}
		for i := range e {
			if math.Abs(e[i]-want[i]) > 1e-14*math.Max(1, math.Abs(l))*x {
				t.Errorf("Jordan block at %g: e = %v, want %v", l, e, want)
				break
			}
		}
	}
	rng := rand.New(rand.NewPCG(5, 8))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(12)
		a := make([]float64, n*n)
		for i := range a {
			a[i] = rng.NormFloat64()
		}
		scale := math.Pow(10, -3+6*rng.Float64()) / norm1M(a, n)
		for i := range a {
			a[i] *= scale
		}
		got := expm(a, n)
		var ref mat.Dense
		ref.Exp(mat.NewDense(n, n, append([]float64(nil), a...)))
		want := ref.RawMatrix().Data
		diff, size := 0.0, 0.0
		for i := range got {
			diff = math.Max(diff, math.Abs(got[i]-want[i]))
			size = math.Max(size, math.Abs(want[i]))
		}
		// The exponential's own condition grows with ‖a‖: allow rounding
		// times the norm.
		if tol := 1e-13 * math.Max(1, norm1M(a, n)); diff > tol*size {
			t.Errorf("trial %d (n = %d, ‖a‖ = %.3g): differs from gonum by %.1e of the largest entry", trial, n, norm1M(a, n), diff/size)
		}
	}
}
