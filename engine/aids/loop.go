package aids

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/floats"

	"zport/engine/feedback"
	"zport/engine/numeric"
)

// loop finds the governing phase margin of each variant of a circuit.
//
// The nominal circuit's margins come from feedback.Margins over the full
// grid. A variant whose parts moved by a tolerance has its crossovers near
// the nominal ones, so each of the variant's crossovers is found by the
// secant method on g(x) = ln|T(eˣ)|, x = ln f, started from the nominal
// crossover with the nominal slope there: three to five evaluations of T
// instead of a sweep. The governing margin is the smallest over the
// crossovers, as feedback.Margins reports it. When a search fails — T not
// finite, no convergence in maxSecant steps, a root more than three decades
// away, or two searches landing on one root (a pair of crossings that
// merged and vanished) — the variant gets a sweep over a coarse grid and
// feedback.Margins, which finds every crossing afresh. Fast and Slow count
// the two paths.
type loop struct {
	cross  []crossing // the nominal crossovers
	track  bool       // every nominal crossover has a usable slope
	coarse []float64
	t      []complex128
	roots  []float64
	// Fast and Slow count the variants whose margin came from the secant
	// searches and from the sweep.
	Fast, Slow int
}

// crossing is a nominal crossover: its frequency, the slope of ln|T| in
// ln f there, and its unwrapped phase in degrees.
type crossing struct{ fc, slope, phase float64 }

const (
	maxSecant  = 12
	maxWander  = 6.907755278982137 // ln 1000: three decades
	coarseSize = 200
	sameRoot   = 1e-6 // in ln f: two searches that end this close found one root
)

// newLoop reads the nominal margins of a over grid. It returns nil when the
// loop has no unity crossing there, and an error only when m's Context
// stopped the sweep.
func newLoop(m *Model, a *feedback.Analyzer, grid []float64) (*loop, feedback.MarginResult, error) {
	T := make([]complex128, len(grid))
	for i, f := range grid {
		if err := m.stopped(i, len(grid), "frequencies of the crossover search"); err != nil {
			return nil, feedback.MarginResult{}, err
		}
		t, err := a.ReturnRatio(f)
		if err != nil {
			t = cmplx.NaN()
		}
		T[i] = t
	}
	mr := feedback.Margins(grid, T, a.ReturnRatio)
	if len(mr.Crossovers) == 0 || math.IsNaN(mr.Crossover) {
		return nil, mr, nil
	}
	l := &loop{track: true}
	const d = 0.01
	for _, c := range mr.Crossovers {
		k := crossing{fc: c.F, phase: c.PhaseMargin - 180}
		tp, errp := a.ReturnRatio(c.F * math.Exp(d))
		tm, errm := a.ReturnRatio(c.F * math.Exp(-d))
		if errp == nil && errm == nil && numeric.Finite(tp) && numeric.Finite(tm) && tp != 0 && tm != 0 {
			k.slope = (math.Log(cmplx.Abs(tp)) - math.Log(cmplx.Abs(tm))) / (2 * d)
		}
		if k.slope == 0 || math.IsNaN(k.slope) {
			l.track = false
		}
		l.cross = append(l.cross, k)
	}
	l.coarse = grid
	if len(grid) > coarseSize {
		l.coarse = floats.LogSpan(make([]float64, coarseSize), grid[0], grid[len(grid)-1])
	}
	l.t = make([]complex128, len(l.coarse))
	l.roots = make([]float64, len(l.cross))
	return l, mr, nil
}

// margin returns the governing phase margin (degrees) and crossover (Hz)
// of a, NaN when there is no crossover.
func (l *loop) margin(a *feedback.Analyzer) (pm, fc float64) {
	if l.track {
		if pm, fc, ok := l.searched(a); ok {
			l.Fast++
			return pm, fc
		}
	}
	l.Slow++
	return l.sweep(a)
}

// searched runs the secant search from every nominal crossover.
func (l *loop) searched(a *feedback.Analyzer) (pm, fc float64, ok bool) {
	pm, fc = math.NaN(), math.NaN()
	for i, c := range l.cross {
		p, f, ok := secant(a, c)
		if !ok {
			return 0, 0, false
		}
		x := math.Log(f)
		for _, r := range l.roots[:i] {
			if math.Abs(x-r) < sameRoot {
				return 0, 0, false
			}
		}
		l.roots[i] = x
		if math.IsNaN(pm) || p < pm {
			pm, fc = p, f
		}
	}
	return pm, fc, true
}

// sweep is the slow path: T over the coarse grid, then feedback.Margins.
func (l *loop) sweep(a *feedback.Analyzer) (pm, fc float64) {
	for i, f := range l.coarse {
		t, err := a.ReturnRatio(f)
		if err != nil {
			t = cmplx.NaN()
		}
		l.t[i] = t
	}
	m := feedback.Margins(l.coarse, l.t, a.ReturnRatio)
	return m.PhaseMargin, m.Crossover
}

// secant solves ln|T(f)| = 0 from the nominal crossover c.
func secant(a *feedback.Analyzer, c crossing) (pm, fc float64, ok bool) {
	g := func(x float64) (complex128, float64, bool) {
		t, err := a.ReturnRatio(math.Exp(x))
		if err != nil || !numeric.Finite(t) || t == 0 {
			return 0, 0, false
		}
		return t, math.Log(cmplx.Abs(t)), true
	}
	start := math.Log(c.fc)
	x0 := start
	t0, g0, ok := g(x0)
	if !ok {
		return 0, 0, false
	}
	if math.Abs(g0) < 1e-13 {
		return pmOf(t0, c.phase), c.fc, true
	}
	x1 := x0 - g0/c.slope
	for range maxSecant {
		if !(math.Abs(x1-start) < maxWander) {
			return 0, 0, false
		}
		t1, g1, ok := g(x1)
		if !ok {
			return 0, 0, false
		}
		if math.Abs(g1) < 1e-13 || math.Abs(x1-x0) < 1e-14*math.Max(1, math.Abs(x1)) {
			return pmOf(t1, c.phase), math.Exp(x1), true
		}
		if g1 == g0 {
			return 0, 0, false
		}
		x0, x1, g0 = x1, x1-g1*(x1-x0)/(g1-g0), g1
	}
	return 0, 0, false
}

// pmOf is the phase margin 180° + ∠T at a crossover, with ∠T on the branch
// nearest ref, the nominal crossover's unwrapped phase — the convention of
// feedback.Margins, which unwraps from the lowest frequency.
func pmOf(t complex128, ref float64) float64 {
	return 180 + ref + numeric.Wrap180(cmplx.Phase(t)*180/math.Pi-ref)
}
