package solve

import (
	"math"
	"testing"

	"zport/engine/numeric"
)

// relClose reports whether got is within tol of want, relatively.
func relClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Abs(want)
}

func TestFindMonotonic(t *testing.T) {
	// q = √x crosses 3 at x = 9.
	n := 0
	f := Find(func(x float64) float64 { n++; return math.Sqrt(x) }, 1e-3, 1e3, 3, false, 0)
	if len(f.Solutions) != 1 || !relClose(f.Solutions[0].X, 9, 1e-9) {
		t.Fatalf("solutions %v, want x = 9", f.Solutions)
	}
	if f.Best != nil || len(f.Jumps) != 0 || len(f.Undefined) != 0 {
		t.Errorf("unexpected: best %v, jumps %v, undefined %v", f.Best, f.Jumps, f.Undefined)
	}
	if len(f.Curve) != GridPoints(1e-3, 1e3)+1 {
		t.Errorf("curve has %d points, want the grid's %d and the solution", len(f.Curve), GridPoints(1e-3, 1e3))
	}
	for i := 1; i < len(f.Curve); i++ {
		if f.Curve[i].X <= f.Curve[i-1].X {
			t.Fatalf("curve not ascending at %d: %v", i, f.Curve[i-1:i+1])
		}
	}
	// The grid, plus a handful of Brent steps from a bracket 1/6 decade wide.
	if grid := GridPoints(1e-3, 1e3); n > grid+10 {
		t.Errorf("%d evaluations: the grid's %d and more than 10 to refine", n, grid)
	}
}

// A target crossed twice gives two solutions: a bump ln²-shaped in ln x,
// q = 1/(1 + (ln x)²), equals ½ at x = e and 1/e.
func TestFindTwice(t *testing.T) {
	q := func(x float64) float64 { l := math.Log(x); return 1 / (1 + l*l) }
	f := Find(q, 1e-3, 1e3, 0.5, false, 0)
	if len(f.Solutions) != 2 || !relClose(f.Solutions[0].X, 1/math.E, 1e-9) || !relClose(f.Solutions[1].X, math.E, 1e-9) {
		t.Fatalf("solutions %v, want 1/e and e", f.Solutions)
	}
	for _, s := range f.Solutions {
		if math.Abs(s.Q-0.5) > 1e-9 {
			t.Errorf("achieved %v at %g, want 0.5", s.Q, s.X)
		}
	}
}

// A narrow peak between two grid points that just reaches past the target
// is found by the minimizer, with both solutions: q = 1/(1 + 400(ln x)²)
// reaches 1 at x = 1, between grid points 0.4 apart in ln x, where the
// grid sees at most 0.02.
func TestFindNarrowPeak(t *testing.T) {
	q := func(x float64) float64 { l := math.Log(x) - 0.07; return 1 / (1 + 400*l*l) }
	// Solutions of 1/(1 + 400 l²) = ½: l = ±1/20.
	f := Find(q, math.Exp(-6), math.Exp(6), 0.5, false, 31)
	want := []float64{math.Exp(0.07 - 0.05), math.Exp(0.07 + 0.05)}
	if len(f.Solutions) != 2 || !relClose(f.Solutions[0].X, want[0], 1e-9) || !relClose(f.Solutions[1].X, want[1], 1e-9) {
		t.Fatalf("solutions %v, want %v", f.Solutions, want)
	}
}

// Nothing reaches the target: Best is the closest approach, refined.
func TestFindUnreachable(t *testing.T) {
	// q = 2 + (ln x − 1)² has its least value 2 at x = e; the target 1 is
	// never reached.
	q := func(x float64) float64 { l := math.Log(x) - 1; return 2 + l*l }
	f := Find(q, 1e-2, 1e2, 1, false, 0)
	if len(f.Solutions) != 0 || f.Best == nil {
		t.Fatalf("solutions %v, best %v", f.Solutions, f.Best)
	}
	if !relClose(f.Best.X, math.E, 1e-6) || math.Abs(f.Best.Q-2) > 1e-12 {
		t.Errorf("best %v, want q = 2 at x = e", *f.Best)
	}
	// Monotonic and short of the target: the best is at the range's end.
	f = Find(math.Sqrt, 1, 100, 20, false, 0)
	if len(f.Solutions) != 0 || f.Best == nil || f.Best.X != 100 || f.Best.Q != 10 {
		t.Errorf("best %v, want the end of the range (100, 10)", f.Best)
	}
}

// A step across the target is a jump, not a solution.
func TestFindJump(t *testing.T) {
	q := func(x float64) float64 {
		if x < 3 {
			return 0
		}
		return 10
	}
	f := Find(q, 1, 10, 5, false, 0)
	if len(f.Solutions) != 0 || len(f.Jumps) != 1 || !relClose(f.Jumps[0].X, 3, 1e-9) {
		t.Fatalf("solutions %v, jumps %v: want one jump at 3", f.Solutions, f.Jumps)
	}
}

// An angle is compared with its difference wrapped: an angle passing
// through 180° to −180° near the target is no jump, and the wrap opposite
// the target is one.
func TestFindAngular(t *testing.T) {
	// The angle 170° + 20·ln x, wrapped: 179° at ln x = 0.45, and on
	// through 180° to −170° without a jump in its distance from 179°.
	q := func(x float64) float64 { return numeric.Wrap180(170 + 20*math.Log(x)) }
	f := Find(q, math.Exp(-1), math.Exp(1), 179, true, 0)
	if len(f.Solutions) != 1 || !relClose(f.Solutions[0].X, math.Exp(0.45), 1e-9) || len(f.Jumps) != 0 {
		t.Fatalf("solutions %v, jumps %v; want e^0.45 and no jump", f.Solutions, f.Jumps)
	}
	// −40° + 100°·ln x: 0° at ln x = 0.4, and 180° (opposite the
	// target, where the wrapped distance jumps) at ln x = 2.2.
	q = func(x float64) float64 { return numeric.Wrap180(-40 + 100*math.Log(x)) }
	f = Find(q, math.Exp(-0.5), math.Exp(2.5), 0, true, 0)
	if len(f.Solutions) != 1 || !relClose(f.Solutions[0].X, math.Exp(0.4), 1e-9) {
		t.Fatalf("solutions %v, want e^0.4", f.Solutions)
	}
	if len(f.Jumps) != 1 || !relClose(f.Jumps[0].X, math.Exp(2.2), 1e-9) {
		t.Errorf("jumps %v, want one at e^2.2", f.Jumps)
	}
}

// Undefined stretches are gone round and reported; a negative range works
// on |x|.
func TestFindUndefinedAndNegative(t *testing.T) {
	q := func(x float64) float64 {
		if x > -0.1 {
			return math.NaN()
		}
		return -x
	}
	f := Find(q, -100, -0.01, 2, false, 0)
	if len(f.Solutions) != 1 || !relClose(f.Solutions[0].X, -2, 1e-9) {
		t.Fatalf("solutions %v, want −2", f.Solutions)
	}
	if len(f.Undefined) != 1 || f.Undefined[0][1] != -0.01 || !(f.Undefined[0][0] > -0.1) {
		t.Errorf("undefined %v, want one run ending at −0.01", f.Undefined)
	}
}

func TestFindPanics(t *testing.T) {
	for _, r := range [][2]float64{{-1, 1}, {0, 1}, {1, math.NaN()}} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("range %v: no panic", r)
				}
			}()
			Find(math.Sqrt, r[0], r[1], 1, false, 0)
		}()
	}
}
