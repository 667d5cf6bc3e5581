package numeric

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

func TestRelDiff(t *testing.T) {
	for _, c := range []struct {
		a, b complex128
		want float64
	}{
		{1, 1, 0},
		{0, 0, 0},
		{2, 1, 0.5},
		{1i, -1i, 2},
		{0, 3e-20, 3e-20}, // an exact zero against residue: absolute
		{4, 0, 4},
	} {
		if got := RelDiff(c.a, c.b); got != c.want {
			t.Errorf("RelDiff(%v, %v) = %g, want %g", c.a, c.b, got, c.want)
		}
	}
	if !math.IsNaN(RelDiff(cmplx.Inf(), 1)) || !math.IsNaN(RelDiff(1, cmplx.NaN())) {
		t.Error("RelDiff of a value that is not finite must be NaN")
	}
}

func TestWrap180(t *testing.T) {
	for in, want := range map[float64]float64{0: 0, 180: 180, -180: 180, 190: -170, -190: 170, 540: 180, 721: 1, -0.5: -0.5} {
		if got := Wrap180(in); got != want {
			t.Errorf("Wrap180(%g) = %g, want %g", in, got, want)
		}
	}
}

// Log agrees with the logarithm of the number's decimal form, taken where
// math.Log has no trouble (a mantissa in [1, 10) and a power of ten), from
// the smallest subnormal to the largest number; and a grid spaced by it
// starts and ends where it was asked to, on every platform.
func TestLogSubnormal(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	xs := []float64{math.SmallestNonzeroFloat64, 1e-320, math.Float64frombits(0x000fffffffffffff), 0x1p-1022, 1, math.MaxFloat64}
	for range 2000 {
		xs = append(xs, math.Float64frombits(1+rng.Uint64N(0x7ff0000000000000-1)))
	}
	for _, x := range xs {
		s := strconv.FormatFloat(x, 'e', -1, 64) // reads back as x exactly
		i := strings.IndexByte(s, 'e')
		m, _ := strconv.ParseFloat(s[:i], 64)
		e, _ := strconv.Atoi(s[i+1:])
		want := math.Log(m) + float64(e)*math.Ln10
		// The decimal form is x to within half an ulp, which for a
		// subnormal is a large part of it.
		tol := 1e-13 + math.Abs(math.Log1p(math.Nextafter(x, math.Inf(1))/x-1))
		if got := Log(x); math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
			t.Errorf("Log(%v) = %v, want %v", x, got, want)
		}
	}
	g := LogSpan(make([]float64, 5), 1e-320, 1e8)
	if g[0] != 1e-320 || math.Abs(g[4]/1e8-1) > 1e-13 || !(g[1] > g[0] && g[2] > g[1]) {
		t.Errorf("LogSpan from 1e-320: %v", g)
	}
}

// Brent's method on functions whose roots are known in closed form or to
// full precision from elsewhere.
func TestBrentKnownRoots(t *testing.T) {
	for _, c := range []struct {
		name string
		g    func(float64) float64
		a, b float64
		want float64
	}{
		// √2, the positive root of x² − 2.
		{"x²−2", func(x float64) float64 { return x*x - 2 }, 0, 2, math.Sqrt2},
		// Newton's own example x³ − 2x − 5 = 0 (Wallis): the real root,
		// 2.0945514815423265 (to double precision, by the cubic formula
		// below).
		{"x³−2x−5", func(x float64) float64 { return x*x*x - 2*x - 5 }, 2, 3, cardano(-2, -5)},
		// The Dottie number, cos x = x, checked below by its definition.
		{"cos x − x", func(x float64) float64 { return math.Cos(x) - x }, 0, 1, 0.7390851332151607},
		// ln x = 0 at 1, over a wide, lopsided bracket.
		{"ln x", math.Log, 1e-6, 1e6, 1},
		// A root of multiplicity three, where interpolation is slow and
		// bisection must take over: (x − 1/3)³.
		{"(x−⅓)³", func(x float64) float64 { d := x - 1.0/3; return d * d * d }, -1, 2, 1.0 / 3},
		// A step: no root, but a sign change at 0.5, which the bracket
		// must close on.
		{"step", func(x float64) float64 {
			if x < 0.5 {
				return -1
			}
			return 1
		}, 0, 1, 0.5},
	} {
		t.Run(c.name, func(t *testing.T) {
			g := func(x float64) (float64, bool) { return c.g(x), true }
			r := Brent(c.a, c.b, c.g(c.a), c.g(c.b), 1e-13, g)
			if !r.OK {
				t.Fatalf("not OK: %+v", r)
			}
			lo, hi := math.Min(r.X, r.Other), math.Max(r.X, r.Other)
			tol := 2*(2*eps*math.Abs(r.X)+1e-13) + 1e-15
			if math.Abs(r.X-c.want) > tol {
				t.Errorf("root %.17g, want %.17g (|Δ| %g > %g), %d evaluations", r.X, c.want, math.Abs(r.X-c.want), tol, r.Evals)
			}
			if c.want < lo-1e-15 || c.want > hi+1e-15 {
				t.Errorf("final bracket [%.17g, %.17g] misses the root %.17g", lo, hi, c.want)
			}
			if r.GX != 0 && (r.GX > 0) == (r.GOther > 0) {
				t.Errorf("final bracket ends have the same sign: g(%g) = %g, g(%g) = %g", r.X, r.GX, r.Other, r.GOther)
			}
			// Never much more than bisection's log2((b − a)/tol) ≈ 45
			// steps: the triple root, where interpolation keeps proposing
			// short steps, takes the most (about 2.5 times).
			if bis := math.Log2((c.b - c.a) / 1e-13); float64(r.Evals) > 3*bis {
				t.Errorf("%d evaluations, more than three times bisection's %.0f", r.Evals, bis)
			}
		})
	}
	if d := math.Cos(0.7390851332151607) - 0.7390851332151607; math.Abs(d) > 2e-16 {
		t.Errorf("the Dottie number check itself is off by %g", d)
	}
}

// cardano returns the one real root of x³ + px + q (4p³ + 27q² > 0).
func cardano(p, q float64) float64 {
	d := math.Sqrt(q*q/4 + p*p*p/27)
	return math.Cbrt(-q/2+d) + math.Cbrt(-q/2-d)
}

// On smooth functions Brent's method converges superlinearly: far fewer
// evaluations than bisection.
func TestBrentSuperlinear(t *testing.T) {
	n := 0
	g := func(x float64) (float64, bool) { n++; return math.Exp(x) - 10, true }
	r := Brent(0, 10, g0(g, 0), g0(g, 10), 1e-14, g)
	n -= 2
	if math.Abs(r.X-math.Log(10)) > 1e-13 || r.Evals != n {
		t.Fatalf("root %.17g (want ln 10), evals %d counted %d", r.X, r.Evals, n)
	}
	if r.Evals > 15 {
		t.Errorf("%d evaluations for e^x = 10 on [0, 10]; bisection would take 50, Brent's method about 10", r.Evals)
	}
}

func g0(g func(float64) (float64, bool), x float64) float64 { v, _ := g(x); return v }

func TestBrentEndsAndStops(t *testing.T) {
	g := func(x float64) (float64, bool) { return x - 1, true }
	if r := Brent(1, 3, 0, 2, 1e-12, g); r.X != 1 || r.Evals != 0 {
		t.Errorf("a root at the first end: %+v", r)
	}
	if r := Brent(-1, 1, -2, 0, 1e-12, g); r.X != 1 || r.Evals != 0 {
		t.Errorf("a root at the second end: %+v", r)
	}
	// g failing part-way returns the last bracket, not OK.
	calls := 0
	h := func(x float64) (float64, bool) {
		calls++
		return x*x*x - 0.027, calls < 3
	}
	r := Brent(0, 1, -0.027, 0.973, 1e-12, h)
	if r.OK || r.Evals != 3 || !(math.Min(r.X, r.Other) <= 0.3 && 0.3 <= math.Max(r.X, r.Other)) {
		t.Errorf("a failing g: %+v", r)
	}
	defer func() {
		if recover() == nil {
			t.Error("Brent without a sign change must panic")
		}
	}()
	Brent(0, 1, 1, 2, 1e-12, g)
}

func TestRootIsBrent(t *testing.T) {
	g := func(x float64) (float64, bool) { return x*x - 2, true }
	if x := Root(1, 2, -1, 2, g); math.Abs(x-math.Sqrt2) > 4e-16 {
		t.Errorf("Root = %.17g, want √2", x)
	}
}

func TestMinimize(t *testing.T) {
	for _, c := range []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
	}{
		{"parabola", func(x float64) float64 { return (x - 2) * (x - 2) }, 0, 5, 2},
		{"cos", math.Cos, 2, 4, math.Pi},
		// x ln x has its minimum at 1/e.
		{"x ln x", func(x float64) float64 { return x * math.Log(x) }, 0.05, 1, 1 / math.E},
		// Not smooth at the minimum: |x − 0.3|, which only the golden
		// sections can find.
		{"|x−0.3|", func(x float64) float64 { return math.Abs(x - 0.3) }, -1, 1, 0.3},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := Minimize(c.a, c.b, 1e-10, func(x float64) (float64, bool) { return c.f(x), true })
			// A smooth minimum is located to about √ε of its position (the
			// function is flat there); a corner to the tolerance.
			if !m.OK || math.Abs(m.X-c.want) > 1e-7 {
				t.Errorf("minimum at %.12g, want %.12g, %d evaluations, OK %v", m.X, c.want, m.Evals, m.OK)
			}
			if m.F != c.f(m.X) {
				t.Errorf("F = %g is not f(X) = %g", m.F, c.f(m.X))
			}
		})
	}
	// Stopping early: f reports !ok once it sees a value below 0.5.
	m := Minimize(0, 5, 1e-10, func(x float64) (float64, bool) { v := (x - 2) * (x - 2); return v, v >= 0.5 })
	if m.OK || m.F >= 0.5 {
		t.Errorf("stopped search: %+v", m)
	}
}
