package topology

import (
	"math"
	"math/cmplx"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

// Extras that report what a variant of a stage really gives (the phase
// margin and crossover of a TIA with a suggested Cf, of a capacitive-load
// driver without its isolation resistor, a TIA's closed-loop bandwidth) are
// found on the engine's model of the variant, on every recompute of a page.
// They are bracketed root searches, not sweeps: a walk up in ln f, a decade
// a step wherever the response turns slowly, brackets each crossing, and
// Brent's method on ln f (feedback.Refine) closes it: 20 to 30
// samples for the catalog's defaults, where a sweep took 701, and the same
// numbers (TestMarginExtrasMatchDenseSweep).
//
// A search from a closed-form estimate of the crossover alone would be
// cheaper still, but a loop can cross unity more than once — a capacitive-
// load driver whose in-loop Cf is too small dips below 1 well before its
// estimated crossover, with the smallest margin there — so the walk covers
// the whole span.

// The span walked: as wide as any crossing the parameter ranges allow.
const (
	walkLo = 1e-2 // Hz
	walkHi = 1e12 // Hz
)

// The walk's step: at most a decade, halved while the response turns by
// more than walkTurn degrees in a step. A real pole turns the phase by at
// most 55° over a decade and 31° over half of one; a pair of complex zeros
// (the in-loop compensation's notch) turns it fast, and gets short steps.
// Successive samples differ in phase by far less than 180°, so the phase
// unwraps unambiguously along them, and a notch is sampled through, not
// stepped over.
const (
	walkStep    = math.Ln10 // in ln f
	walkTurn    = 30.0
	walkMinStep = 1e-6
)

// walk samples h from walkLo upward in ln f, calling visit with each
// sample, until visit returns false or walkHi is reached. A sample where h
// cannot be evaluated (ok false) is passed on as NaN, and the step is
// kept.
func walk(h func(f float64) (complex128, bool), visit func(f float64, v complex128) bool) {
	x, end := math.Log(walkLo), math.Log(walkHi)
	f := walkLo
	v, ok := h(f)
	if !ok {
		v = cmplx.NaN()
	}
	if !visit(f, v) {
		return
	}
	step := walkStep
	for x < end {
		nx := math.Min(x+step, end)
		nf := math.Exp(nx)
		if nx == end {
			nf = walkHi
		}
		nv, ok := h(nf)
		if !ok {
			nv = cmplx.NaN()
		}
		// The phase of the quotient is the turn, wrapped to (−180°, 180°].
		turn := math.Abs(cmplx.Phase(nv/v)) * 180 / math.Pi
		if turn > walkTurn && step > walkMinStep {
			step /= 2
			continue
		}
		if !visit(nf, nv) {
			return
		}
		x, v = nx, nv
		if turn < walkTurn/4 || cmplx.IsNaN(nv) {
			step = math.Min(2*step, walkStep)
		}
	}
}

// loopAnalyzer parses circuit text at kelvin and returns its analyzer for
// the reference ref, with the gain from the source named src to the node
// out when src is not empty.
func loopAnalyzer(text, ref string, kelvin float64, src, out string) (*feedback.Analyzer, error) {
	c, err := circuit.ParseWith(text, circuit.Options{Temperature: kelvin})
	if err != nil {
		return nil, err
	}
	var gain *feedback.Gain
	if src != "" {
		g := &feedback.Gain{Source: -1, SourceName: src, OutputName: out, OutB: circuit.Gnd}
		if i, ok := c.PartIndex(src); ok {
			g.Source = i
		}
		g.OutA, _ = c.Node(out)
		gain = g
	}
	return feedback.New(c, ref, nil, gain)
}

// loopMargins analyzes the loop of circuit text for the reference ref,
// parsed at kelvin, and returns its margins, evaluated by the engine itself
// on the walk's samples. Extras use it on variants of a stage (a different
// Cf, Riso removed …); it never goes through Forms, so it cannot recurse.
func loopMargins(text, ref string, kelvin float64) (feedback.MarginResult, error) {
	a, err := loopAnalyzer(text, ref, kelvin, "", "")
	if err != nil {
		return feedback.MarginResult{}, err
	}
	var grid []float64
	var T []complex128
	walk(func(f float64) (complex128, bool) {
		t, err := a.ReturnRatio(f)
		return t, err == nil
	}, func(f float64, t complex128) bool {
		grid, T = append(grid, f), append(T, t)
		return true
	})
	return feedback.Margins(grid, T, a.ReturnRatio), nil
}

// opmMarginExtras reports the governing phase margin and crossover of a
// variant's loop as two Extras (NaN values when there is no crossover or the
// variant cannot be analyzed).
func opmMarginExtras(text, label, note, source string) []Extra {
	pm, fc := math.NaN(), math.NaN()
	if m, err := loopMargins(text, "U1", circuit.DefaultTemperature); err == nil {
		pm, fc = m.PhaseMargin, m.Crossover
	}
	return []Extra{
		{Name: "phase margin " + label, Value: pm, Unit: "°", Note: note, Source: source},
		{Name: "crossover " + label, Value: fc, Unit: "Hz", Note: "where |T| = 1 for the same variant", Source: source},
	}
}

const opmSrcEngine = "computed by zport's engine on the stage with the value substituted (return ratio walked in frequency, crossings refined)"
