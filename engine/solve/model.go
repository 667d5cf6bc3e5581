package solve

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/floats"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/numeric"
	"zport/engine/response"
)

// Model is a circuit with one number to vary, and the quantity to read
// from it. Build gives the circuit for each value of the number; the
// reference, the port and the gain are named, and looked up in each
// circuit Build returns, so that a value may add or remove a part (a
// stage's optional capacitor going from absent to present).
type Model struct {
	// Build returns the circuit with the number at x. It may return the
	// same circuit each time, changed: the model is done with the previous
	// one when it calls Build again.
	Build     func(x float64) (*circuit.Circuit, error)
	Reference string
	Quantity  Quantity
	// Port names the port of ZMag, ZRe and ZPhase by its nodes.
	Port *PortNodes
	// Gain names the gain of GainMag and the response's quantities.
	Gain *GainNodes
	// Frequency is the spot frequency of the port's and the gain's
	// quantities, in hertz.
	Frequency float64

	// Counts tallies the work done, for benchmarks and the answer.
	Counts Counts
}

// PortNodes is a port: its name and its nodes (A the + side).
type PortNodes struct{ Name, A, B string }

// GainNodes is a gain: the independent source's name and the output node
// pair (B "gnd" for a single node).
type GainNodes struct{ Source, A, B string }

// Counts tallies a model's work: the circuits analyzed (one per value of
// the number), the return ratios computed for the loop's quantities, and
// the closed-loop responses computed.
type Counts struct {
	Circuits, ReturnRatios, Responses int
}

// LoopGrid is where the loop's quantities look for the crossings of |T|
// and of ∠T: 1 mHz to 1 THz, eight points a decade, each crossing refined
// between grid points by Brent's method on the circuit itself. Eight
// points a decade keep the phase unwrapped — between two of them a single
// pole turns the phase by less than 9°, a complex pair by less than 180° —
// at four fifths of the cost of ten, which matters: the return ratios on
// this grid are nearly all of a margin target's work.
func LoopGrid() []float64 { return floats.LogSpan(make([]float64, 121), 1e-3, 1e12) }

// loopGrid is LoopGrid, made once.
var loopGrid = LoopGrid()

// At analyzes the circuit at x and returns the quantity, NaN where it is
// undefined there (no crossover for a phase margin, an unstable loop for a
// bandwidth); the error says why the circuit itself cannot be analyzed.
func (m *Model) At(x float64) (float64, error) {
	m.Counts.Circuits++
	c, err := m.Build(x)
	if err != nil {
		return math.NaN(), err
	}
	var ports []feedback.Port
	if m.Quantity.NeedsPort() {
		if m.Port == nil {
			panic("solve: a port quantity without a port")
		}
		a, okA := c.Node(m.Port.A)
		b, okB := c.Node(m.Port.B)
		if !okA || !okB {
			return math.NaN(), fmt.Errorf("port %s: its nodes %s and %s are not both in the circuit", m.Port.Name, m.Port.A, m.Port.B)
		}
		ports = []feedback.Port{{Name: m.Port.Name, A: a, B: b}}
	}
	var gain *feedback.Gain
	if m.Quantity.NeedsGain() {
		if m.Gain == nil {
			panic("solve: a gain quantity without a gain")
		}
		src, okS := c.PartIndex(m.Gain.Source)
		a, okA := c.Node(m.Gain.A)
		b, okB := c.Node(m.Gain.B)
		if !okS || !okA || !okB {
			return math.NaN(), fmt.Errorf("the gain from %s to %s,%s is not in the circuit", m.Gain.Source, m.Gain.A, m.Gain.B)
		}
		gain = &feedback.Gain{Source: src, OutA: a, OutB: b, SourceName: m.Gain.Source, OutputName: m.Gain.A}
	}
	an, err := feedback.New(c, m.Reference, ports, gain)
	if err != nil {
		return math.NaN(), err
	}
	switch q := m.Quantity; {
	case q.Loop():
		return m.loop(an)
	case q.Response():
		return m.response(an)
	}
	pt, err := an.At(m.Frequency)
	if err != nil {
		return math.NaN(), err
	}
	var z complex128
	if m.Quantity == GainMag {
		z = finiteOr(pt.Gain.G, pt.Gain.GDirect)
	} else {
		z = finiteOr(pt.Ports[0].Z, pt.Ports[0].ZDirect)
	}
	switch m.Quantity {
	case ZRe:
		return real(z), nil
	case ZPhase:
		if z == 0 {
			return math.NaN(), nil
		}
		return cmplx.Phase(z) * 180 / math.Pi, nil
	}
	return cmplx.Abs(z), nil
}

// finiteOr returns a when it is finite, else b when it is, else NaN:
// Blackman's value, or the direct solution where that is not finite.
func finiteOr(a, b complex128) complex128 {
	if numeric.Finite(a) {
		return a
	}
	if numeric.Finite(b) {
		return b
	}
	return cmplx.NaN()
}

// loop reads the governing phase margin, the smallest gain margin or the
// governing crossover, as the page's margins do (feedback.Margins).
func (m *Model) loop(an *feedback.Analyzer) (float64, error) {
	eval := func(f float64) (complex128, error) {
		m.Counts.ReturnRatios++
		return an.ReturnRatio(f)
	}
	T := make([]complex128, len(loopGrid))
	for i, f := range loopGrid {
		t, err := eval(f)
		if err != nil {
			return math.NaN(), err
		}
		T[i] = t
	}
	r := feedback.Margins(loopGrid, T, eval)
	switch m.Quantity {
	case PhaseMargin:
		return r.PhaseMargin, nil
	case GainMargin:
		return r.GainMargin, nil
	}
	return r.Crossover, nil
}

// response reads the closed-loop peaking, bandwidth or overshoot of the
// gain. A stable low-pass response without peaking has 0 dB of it; an
// unstable one has none of the three.
func (m *Model) response(an *feedback.Analyzer) (float64, error) {
	m.Counts.Responses++
	g := an.Gain
	r, err := response.Analyze(an.Sys, g.Source, g.OutA, g.OutB, response.Options{})
	if err != nil {
		return math.NaN(), err
	}
	if r.Stability != response.Stable {
		return math.NaN(), nil
	}
	switch m.Quantity {
	case Peaking:
		if math.IsNaN(r.PeakingDB) && r.Kind == "low-pass" {
			return 0, nil
		}
		return r.PeakingDB, nil
	case Bandwidth:
		return r.Bandwidth, nil
	}
	return r.Overshoot, nil
}
