package topology

import (
	"math"
	"math/cmplx"
	"slices"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/numeric"
	"zport/engine/solve"
)

// opmSrcSolve is the source of a value found by the solver.
const opmSrcSolve = "found by zport's solver on the stage's full model: the margin scanned against the part around the estimate, the crossing refined by Brent's method to 1e-9 (Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4 [memory])"

// opmSolvePM returns the value of the part called name (a parameter of
// stage id, and a part of its generated circuit with that name) at which
// the loop of the stage at v has a phase margin of pm: the search of
// package zport/engine/solve over guess/3 … 3·guess (within the
// parameter's allowed range), guess being an estimate from a simpler
// model. Where several values there give pm, it returns the smallest;
// where none does, NaN. (The stage is looked up by id when Forms run, as
// a stage's own variable cannot name itself inside its Forms.)
//
// It runs on every recompute of the stage's page, so it is frugal: it
// follows one crossover from value to value — a few return ratios between
// half and twice its last frequency, starting from fc, the simpler
// model's crossover at guess, with ∠T taken on the branch of a lagging
// loop (−360°, 0°] and then unwrapped from value to value — falling back
// on the full loop grid (solve.LoopGrid and feedback.Margins) where the
// crossover leaves that window. The answer is then checked on the full
// grid, which catches a crossover the following missed (NaN then).
func opmSolvePM(id string, v Values, name string, pm, guess, fc float64) float64 {
	t, ok := Lookup(id)
	if !ok {
		panic("topology: opmSolvePM of an unknown stage " + id)
	}
	i := slices.IndexFunc(t.Params, func(p Param) bool { return p.Name == name })
	if i < 0 || !(guess > 0) || math.IsInf(guess, 0) {
		return math.NaN()
	}
	lo, hi := math.Max(guess/3, t.Params[i].Min), math.Min(guess*3, t.Params[i].Max)
	if !(lo < hi) {
		return math.NaN()
	}
	c, err := circuit.ParseWith(t.Circuit(opmWith(v, map[string]float64{name: guess})), circuit.Options{Temperature: v.Kelvin()})
	if err != nil {
		return math.NaN()
	}
	part, ok := c.PartIndex(name)
	if !ok {
		return math.NaN()
	}
	analyzer := func(x float64) *feedback.Analyzer {
		c.Parts[part].Value = x
		a, err := feedback.New(c, t.Reference, nil, nil)
		if err != nil {
			return nil
		}
		return a
	}
	phase := math.NaN() // ∠T at the crossover followed, fc (unwrapped, degrees)
	full := func(a *feedback.Analyzer) float64 {
		grid := solve.LoopGrid()
		T := make([]complex128, len(grid))
		for k, f := range grid {
			T[k], _ = a.ReturnRatio(f)
		}
		m := feedback.Margins(grid, T, a.ReturnRatio)
		fc, phase = m.Crossover, m.PhaseMargin-180
		return m.PhaseMargin
	}
	q := func(x float64) float64 {
		a := analyzer(x)
		if a == nil {
			return math.NaN()
		}
		if !(fc > 0) {
			return full(a)
		}
		g := func(u float64) (float64, bool) {
			T, err := a.ReturnRatio(math.Exp(u))
			if err != nil || !numeric.Finite(T) || T == 0 {
				return math.NaN(), false
			}
			return math.Log(cmplx.Abs(T)), true
		}
		ua, ub := math.Log(fc/2), math.Log(fc*2)
		ga, okA := g(ua)
		gb, okB := g(ub)
		if !okA || !okB || !(ga > 0 && gb < 0) {
			return full(a)
		}
		u := numeric.Root(ua, ub, ga, gb, g)
		T, _ := a.ReturnRatio(math.Exp(u))
		fc = math.Exp(u)
		p := cmplx.Phase(T) * 180 / math.Pi
		if math.IsNaN(phase) {
			phase = p - 360*math.Ceil(p/360) // in (−360°, 0°]
		} else {
			phase += numeric.Wrap180(p - phase)
		}
		return 180 + phase
	}
	f := solve.Find(q, lo, hi, pm, false, 5)
	if len(f.Solutions) == 0 {
		return math.NaN()
	}
	x := f.Solutions[0].X
	if a := analyzer(x); a == nil || !(math.Abs(full(a)-pm) < 1e-6) {
		return math.NaN()
	}
	return x
}

// idealPM is the phase margin and crossover (Hz) of a loop T(ω) whose |T|
// falls through 1 once between 1 mHz and 1 PHz, with ∠T given unwrapped
// by phase (degrees): the crossover by Brent's method on ln|T| against
// ln ω.
func idealPM(T func(w float64) complex128, phase func(w float64) float64) (pm, fc float64) {
	g := func(x float64) (float64, bool) { return math.Log(cmplx.Abs(T(math.Exp(x)))), true }
	lo, hi := math.Log(2*math.Pi*1e-3), math.Log(2*math.Pi*1e15)
	glo, _ := g(lo)
	ghi, _ := g(hi)
	if !(glo > 0 && ghi < 0) {
		return math.NaN(), math.NaN()
	}
	w := math.Exp(numeric.Root(lo, hi, glo, ghi, g))
	return 180 + phase(w), w / (2 * math.Pi)
}

// firstRoot returns the smallest x in [lo, hi] where f(x) = 0, looked for
// on a grid of n points in ln x and refined by Brent's method; NaN when f
// does not change sign there.
func firstRoot(lo, hi float64, n int, f func(x float64) float64) float64 {
	g := func(u float64) (float64, bool) { v := f(math.Exp(u)); return v, !math.IsNaN(v) }
	a, b := math.Log(lo), math.Log(hi)
	prev, gp := a, f(lo)
	for k := 1; k < n; k++ {
		u := a + (b-a)*float64(k)/float64(n-1)
		gu, _ := g(u)
		if gp == 0 {
			return math.Exp(prev)
		}
		if gp*gu < 0 {
			return math.Exp(numeric.Root(prev, u, gp, gu, g))
		}
		prev, gp = u, gu
	}
	return math.NaN()
}
