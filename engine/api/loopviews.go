package api

import (
	"math"
	"math/cmplx"
)

// This file adds the loop views to the margins of a swept answer: the
// reference element's own gain A(f) beside A/T, the noise gain 1/β the
// loop sees, and the rate at which their magnitudes close at the
// crossover.

// Closure is the rate of closure at the governing crossover: how steeply
// |A| and |A/T| = 1/β approach each other where they meet (|T| = 1), in
// dB per decade.
type Closure struct {
	Frequency float64 `json:"frequency"`
	// Rate is NoiseGainSlope − OpenLoopSlope, which is −d(20·log10|T|)/
	// d(log10 f) at the crossover.
	Rate           float64 `json:"rate"`
	OpenLoopSlope  float64 `json:"openLoopSlope"`
	NoiseGainSlope float64 `json:"noiseGainSlope"`
	// Verdict is "safe" (about 20 dB/decade), "marginal" (about 40) or
	// "steep" (more): common practice reads stability from it so.
	Verdict string `json:"verdict"`
}

// Rates of closure dividing the verdicts, dB/decade: between the 20 of a
// single-pole loop and the 40 of a two-pole one, and beyond 40 (common
// practice).
const (
	closureSafe     = 30.0
	closureMarginal = 50.0
)

// loopViews fills m's OpenLoop, NoiseGain and Closure from the sweep's
// return ratios.
func (p *Prepared) loopViews(s *SweepResult, m *Margins) {
	a := p.Analyzer
	ref := p.Circuit.Parts[a.Ref]
	n := len(s.Frequency)
	m.OpenLoop = make([]*Complex, n)
	m.NoiseGain = make([]*Complex, n)
	for i, f := range s.Frequency {
		k := ref.Gain(f)
		m.OpenLoop[i] = C(k)
		if t := s.ReturnRatio[i]; t != nil && t.Value() != 0 {
			m.NoiseGain[i] = C(k / t.Value())
		}
	}
	if m.Crossover == nil {
		return
	}
	fc := *m.Crossover
	// Slopes by central differences over ±0.001 decade (their error,
	// about 10⁻⁶ of the second derivative, is far below what a designer
	// reads off a dB/decade figure).
	const h = 1e-3
	lo, hi := fc*math.Pow(10, -h), fc*math.Pow(10, h)
	tLo, err1 := a.ReturnRatio(lo)
	tHi, err2 := a.ReturnRatio(hi)
	if err1 != nil || err2 != nil || tLo == 0 || tHi == 0 {
		return
	}
	db := func(z complex128) float64 { return 20 * math.Log10(cmplx.Abs(z)) }
	kLo, kHi := ref.Gain(lo), ref.Gain(hi)
	c := &Closure{Frequency: fc,
		OpenLoopSlope:  (db(kHi) - db(kLo)) / (2 * h),
		NoiseGainSlope: (db(kHi/tHi) - db(kLo/tLo)) / (2 * h),
	}
	c.Rate = c.NoiseGainSlope - c.OpenLoopSlope
	switch {
	case c.Rate < closureSafe:
		c.Verdict = "safe"
	case c.Rate < closureMarginal:
		c.Verdict = "marginal"
	default:
		c.Verdict = "steep"
	}
	m.Closure = c
}
