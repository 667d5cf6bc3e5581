package feedback

import (
	"fmt"
	"math"
	"math/cmplx"

	"zport/engine/numeric"
)

// Crossover is one frequency where |T| crosses 1.
type Crossover struct {
	F           float64
	PhaseMargin float64 // degrees, 180° + ∠T with ∠T unwrapped from the lowest frequency
	Falling     bool    // |T| falls through 1 as f rises
}

// PhaseCrossing is one frequency where the unwrapped ∠T crosses −180°
// (mod 360°).
type PhaseCrossing struct {
	F          float64
	GainMargin float64 // dB, −20·log10|T|
}

// Verdicts.
const (
	NoCrossover = "no crossover"
	Stable      = "stable"
	LowMargin   = "margin below 45°"
	Unstable    = "unstable"
)

// MarginResult summarizes the loop over a sweep.
type MarginResult struct {
	Crossovers     []Crossover
	PhaseCrossings []PhaseCrossing
	// Governing values: the crossover with the smallest phase margin and
	// the smallest gain margin; NaN when there is none.
	Crossover, PhaseMargin, GainMargin float64
	Verdict, Detail                    string
}

// TargetPM is the phase margin below which the verdict warns: 45°, with 60°
// the usual design aim (common practice).
const TargetPM = 45.0

// Margins finds the crossovers and margins of T sampled on grid (ascending),
// refining each crossing with eval, which must return T at any frequency.
//
// The phase margin at a crossover is 180° + ∠T with ∠T unwrapped
// continuously from the lowest frequency and not wrapped again: a loop that
// has lagged past −180° there has a negative margin, and one whose |T| rises
// through 1 with phase lead (a feedforward path) has a margin above 180°,
// far from −1. The verdict takes the smallest margin, and calls a loop with
// T < −1 at the lowest frequency unstable (positive feedback).
func Margins(grid []float64, T []complex128, eval func(f float64) (complex128, error)) MarginResult {
	m := MarginResult{Crossover: math.NaN(), PhaseMargin: math.NaN(), GainMargin: math.NaN()}
	n := len(grid)
	ph := make([]float64, n) // unwrapped phase in degrees; NaN where T is not finite
	prev := math.NaN()
	for i, t := range T {
		if !numeric.Finite(t) || t == 0 {
			ph[i] = math.NaN()
			continue
		}
		a := deg(cmplx.Phase(t))
		if math.IsNaN(prev) {
			ph[i] = a
		} else {
			ph[i] = prev + numeric.Wrap180(a-prev)
		}
		prev = ph[i]
	}
	// unwrapNear puts the phase of t on the branch nearest ref.
	unwrapNear := func(t complex128, ref float64) float64 {
		a := deg(cmplx.Phase(t))
		return ref + numeric.Wrap180(a-ref)
	}
	evalOK := func(f float64) (complex128, bool) {
		t, err := eval(f)
		return t, err == nil && numeric.Finite(t) && t != 0
	}
	above, below := false, false
	for i := 0; i < n; i++ {
		if math.IsNaN(ph[i]) {
			continue
		}
		if cmplx.Abs(T[i]) >= 1 {
			above = true
		} else {
			below = true
		}
		if i+1 >= n || math.IsNaN(ph[i+1]) {
			continue
		}
		la, lb := math.Log(cmplx.Abs(T[i])), math.Log(cmplx.Abs(T[i+1]))
		if la >= 0 && lb < 0 || la < 0 && lb >= 0 {
			fc := Refine(grid[i], grid[i+1], la, lb, func(f float64) (float64, bool) {
				t, ok := evalOK(f)
				return math.Log(cmplx.Abs(t)), ok
			})
			t, ok := evalOK(fc)
			if !ok {
				continue
			}
			ref := interpPhase(grid[i], grid[i+1], ph[i], ph[i+1], fc)
			p := unwrapNear(t, ref)
			m.Crossovers = append(m.Crossovers, Crossover{F: fc, PhaseMargin: 180 + p, Falling: lb < la})
		}
		// −180° crossings: (φ + 180)/360 passes an integer.
		qa, qb := (ph[i]+180)/360, (ph[i+1]+180)/360
		lo, hi := math.Min(qa, qb), math.Max(qa, qb)
		for k := math.Ceil(lo); k <= hi; k++ {
			if k == lo && k != qa { // counted at the previous interval
				continue
			}
			target := 360*k - 180
			fa, fb := grid[i], grid[i+1]
			da, db := ph[i]-target, ph[i+1]-target
			if da == 0 && i > 0 && !math.IsNaN(ph[i-1]) && (ph[i-1]-target)*db <= 0 {
				continue
			}
			f180 := Refine(fa, fb, da, db, func(f float64) (float64, bool) {
				t, ok := evalOK(f)
				if !ok {
					return 0, false
				}
				return unwrapNear(t, interpPhase(fa, fb, ph[i], ph[i+1], f)) - target, true
			})
			t, ok := evalOK(f180)
			if !ok {
				continue
			}
			m.PhaseCrossings = append(m.PhaseCrossings, PhaseCrossing{F: f180, GainMargin: -20 * math.Log10(cmplx.Abs(t))})
		}
	}
	for _, c := range m.Crossovers {
		if math.IsNaN(m.PhaseMargin) || c.PhaseMargin < m.PhaseMargin {
			m.PhaseMargin, m.Crossover = c.PhaseMargin, c.F
		}
	}
	for _, p := range m.PhaseCrossings {
		if math.IsNaN(m.GainMargin) || p.GainMargin < m.GainMargin {
			m.GainMargin = p.GainMargin
		}
	}
	span := ""
	if n > 0 {
		span = fmt.Sprintf("from %s to %s", fmtHz(grid[0]), fmtHz(grid[n-1]))
	}
	// T negative, flat and beyond 1 at the lowest frequency is positive
	// feedback: 1 + T < 0 there, and a closed-loop pole sits on the positive
	// real axis. (A double integrator also starts near −180°, but with |T|
	// falling 40 dB a decade, not flat.)
	first := -1
	for i := range T {
		if !math.IsNaN(ph[i]) {
			first = i
			break
		}
	}
	positive := false
	if first >= 0 && first+1 < n && !math.IsNaN(ph[first+1]) {
		flat := math.Abs(cmplx.Abs(T[first+1])/cmplx.Abs(T[first])-1) < 0.02
		positive = flat && math.Abs(ph[first]) > 160 && cmplx.Abs(T[first]) > 1
	}
	switch {
	case positive:
		m.Verdict = Unstable
		m.Detail = fmt.Sprintf("T = %s at %s: negative and larger than 1, so the loop is positive feedback and latches or oscillates; check the reference element and its sign.", fmtC(T[first]), fmtHz(grid[first]))
	case len(m.Crossovers) == 0 && !above && !below:
		m.Verdict, m.Detail = NoCrossover, "T is not finite over the sweep, so no margins can be read."
	case len(m.Crossovers) == 0 && above:
		m.Verdict, m.Detail = NoCrossover, "|T| stays above 1 "+span+"; widen the sweep to find the crossover."
	case len(m.Crossovers) == 0:
		m.Verdict, m.Detail = NoCrossover, "|T| stays below 1 "+span+": the loop never reaches unity gain, so it has little feedback and no phase margin to speak of."
	case m.PhaseMargin <= 0:
		m.Verdict = Unstable
		m.Detail = fmt.Sprintf("Phase margin %.1f° at %s: the loop has no margin and the closed loop is expected to oscillate.", m.PhaseMargin, fmtHz(m.Crossover))
	case m.PhaseMargin < TargetPM:
		m.Verdict = LowMargin
		m.Detail = fmt.Sprintf("Phase margin %.1f° at %s: stable, but expect ringing and peaking; 45° is the usual minimum and 60° the usual aim (common practice).", m.PhaseMargin, fmtHz(m.Crossover))
	default:
		m.Verdict = Stable
		m.Detail = fmt.Sprintf("Phase margin %.1f° at %s.", m.PhaseMargin, fmtHz(m.Crossover))
	}
	if len(m.Crossovers) > 1 {
		m.Detail += fmt.Sprintf(" |T| crosses 1 %d times; the verdict uses the smallest margin, and a loop like this deserves a Nyquist look.", len(m.Crossovers))
	}
	if m.Verdict != Unstable && m.Verdict != NoCrossover {
		for _, p := range m.PhaseCrossings {
			if p.GainMargin < 0 && p.F < m.Crossover {
				m.Detail += fmt.Sprintf(" ∠T reaches −180° at %s while |T| > 1: the loop is conditionally stable and may oscillate if its gain drops.", fmtHz(p.F))
				break
			}
		}
	}
	return m
}

// Refine finds the root of g between the frequencies fa and fb, where g
// takes the values ga and gb of opposite sign (or one of them zero), by
// Brent's method on ln f (numeric.Root), to about 1e-14 in ln f. When g
// cannot be evaluated (ok false) it returns the best estimate so far.
func Refine(fa, fb, ga, gb float64, g func(f float64) (float64, bool)) float64 {
	if ga == 0 {
		return fa
	}
	if gb == 0 {
		return fb
	}
	return math.Exp(numeric.Root(math.Log(fa), math.Log(fb), ga, gb, func(x float64) (float64, bool) { return g(math.Exp(x)) }))
}

func fmtC(z complex128) string {
	return fmt.Sprintf("%.4g ∠ %.1f°", cmplx.Abs(z), deg(cmplx.Phase(z)))
}

func interpPhase(fa, fb, pa, pb, f float64) float64 {
	t := (math.Log(f) - math.Log(fa)) / (math.Log(fb) - math.Log(fa))
	return pa + t*(pb-pa)
}

func deg(r float64) float64 { return r * 180 / math.Pi }
