package noise

import (
	"math"
	"math/cmplx"
	"sort"
	"strconv"

	"zport/engine/mna"
	"zport/engine/numeric"
)

// Analysis is a noise analysis of one circuit: its noise sources at one
// temperature, and optionally the input source the output noise is
// referred to.
type Analysis struct {
	Sources []Source
	// Input is the right-hand side of a unit of the input source (a
	// gain's vsource or isource), nil when the noise is not referred to
	// an input.
	Input []mna.Term

	// Sources that enter the equations alike (the same right-hand side,
	// no gain in the way: resistors between the same two nodes) have
	// the same transfer, so the transfer is found once per group: a
	// pasted circuit may hold thousands of resistors on a few nodes.
	groups []group
	of     []int     // source → its group
	h2     []float64 // |transfer|² of each group, at the last frequency
}

// group is a set of sources with one transfer: their common RHS and
// Through, and the sums of their white levels² and of levels²·corner, so
// that the group's power density is |H|²·(white + flicker/f).
type group struct {
	rhs            []mna.Term
	through        func(float64) complex128
	white, flicker float64
}

// New is the noise analysis of the circuit whose equations are sys, at
// temperature T in kelvin, referred to the input whose unit right-hand
// side is input (nil for none).
func New(sys *mna.System, T float64, input []mna.Term) *Analysis {
	n := &Analysis{Sources: Sources(sys, T), Input: input}
	n.group()
	return n
}

// group sorts the sources into groups of one transfer.
func (n *Analysis) group() {
	n.of = make([]int, len(n.Sources))
	index := map[string]int{}
	var key []byte
	for k := range n.Sources {
		s := &n.Sources[k]
		g := -1
		if s.Through == nil {
			key = key[:0]
			for _, t := range s.RHS {
				key = strconv.AppendInt(key, int64(t.I), 10)
				key = append(key, ':')
				key = strconv.AppendFloat(key, t.V, 'g', -1, 64)
				key = append(key, ';')
			}
			if i, ok := index[string(key)]; ok {
				g = i
			} else {
				index[string(key)] = len(n.groups)
			}
		}
		if g < 0 {
			g = len(n.groups)
			n.groups = append(n.groups, group{rhs: s.RHS, through: s.Through})
		}
		l2 := s.Density.Level * s.Density.Level
		n.groups[g].white += l2
		n.groups[g].flicker += l2 * s.Density.Corner
		n.of[k] = g
	}
	n.h2 = make([]float64, len(n.groups))
}

// transfers finds |H|² of every group at f from the adjoint solution z,
// into n.h2, and returns the input's transfer (0 without an Input).
func (n *Analysis) transfers(z []complex128, f float64) (gain complex128) {
	for g := range n.groups {
		gr := &n.groups[g]
		var re, im float64
		for _, t := range gr.rhs {
			re += t.V * real(z[t.I])
			im += t.V * imag(z[t.I])
		}
		if gr.through != nil {
			h := complex(re, im) * gr.through(f)
			re, im = real(h), imag(h)
		}
		n.h2[g] = re*re + im*im
	}
	if n.Input != nil {
		gain = mna.Dot(n.Input, z)
	}
	return gain
}

// At writes each source's power density at the output at f > 0 into dst
// (len Sources; V²/Hz for a voltage output), from the adjoint solution z
// for that output, and returns the input's transfer to the output (0
// without an Input). The output density is the sum of dst: the sources
// are uncorrelated.
func (n *Analysis) At(dst []float64, z []complex128, f float64) (gain complex128) {
	gain = n.transfers(z, f)
	for k := range n.Sources {
		dst[k] = n.h2[n.of[k]] * n.Sources[k].Density.PSD(f)
	}
	return gain
}

// Total is the output's power density at f > 0 (V²/Hz for a voltage
// output), the sum of every source's, from the adjoint solution z; and
// the input's transfer (0 without an Input). It costs one transfer per
// group of sources, not one per source.
func (n *Analysis) Total(z []complex128, f float64) (psd float64, gain complex128) {
	gain = n.transfers(z, f)
	for g := range n.groups {
		gr := &n.groups[g]
		psd += n.h2[g] * (gr.white + gr.flicker/f)
	}
	return psd, gain
}

// Of is source k's power density at the output at f, from the transfers
// of the last At or Total (at that f).
func (n *Analysis) Of(k int, f float64) float64 {
	return n.h2[n.of[k]] * n.Sources[k].Density.PSD(f)
}

// Accuracy of Band: the relative error the integration aims at for the
// total noise power and for ∫|G|²df, and the evaluations it may spend.
const (
	BandTolerance  = 1e-6
	MaxEvaluations = 3000
)

// Band is the noise integrated over a frequency band.
type Band struct {
	From, To float64
	// Power is each source's noise power at the output over the band
	// (V² for a voltage output), Total their sum and Error the
	// integration's estimate of Total's absolute error.
	Power        []float64
	Total, Error float64
	// Gain2 is ∫|G|²df over the band, G the input's transfer to the
	// output, and Peak the largest |G| in the band, at PeakAt; all zero
	// without an input.
	Gain2, Peak, PeakAt float64
	// Evaluations counts the frequencies solved; Converged says whether
	// the error estimates met BandTolerance within MaxEvaluations.
	Evaluations int
	Converged   bool
}

// RMS is the output noise over the band (V rms for a voltage output).
func (b *Band) RMS() float64 { return math.Sqrt(b.Total) }

// Bandwidth is the equivalent noise bandwidth of the input's transfer
// over the band, ∫|G|²df / max|G|², in hertz: the width of the ideal
// band-pass filter with G's peak gain that passes the same white noise
// power (the usual definition, relative to the peak power gain [memory]).
// NaN without an input or with G zero throughout.
func (b *Band) Bandwidth() float64 {
	if !(b.Peak > 0) {
		return math.NaN()
	}
	return b.Gain2 / (b.Peak * b.Peak)
}

// Band integrates the noise over [from, to] (0 < from < to). adjoint
// solves the adjoint system of the full circuit at a frequency into a
// vector of length size (feedback.Analyzer.AdjointAt).
//
// The integral runs over ln f, where a circuit's densities are smooth and
// a decade is a decade wherever it lies: ∫S df = ∫S(e^u)·e^u du. It starts
// with one 15-point Gauss–Kronrod panel per decade and halves the panel
// whose error estimate (|Kronrod − Gauss|, which overstates the Kronrod
// result's error) weighs most until the total power and ∫|G|²df are both
// within BandTolerance. The nodes depend on the band and the circuit only,
// so the answer does not depend on any sweep. It integrates |H|² and
// |H|²/f of each group of sources that share a transfer, so a source's
// power with its 1/f corner follows exactly, and thousands of resistors
// on a few nodes cost a few transfers. The peak of |G| is the
// largest over the nodes and the band's ends, refined by golden-section
// search between the neighbours of the largest.
func (n *Analysis) Band(adjoint func(f float64, z []complex128) error, size int, from, to float64) (Band, error) {
	G := len(n.groups)
	z := make([]complex128, size)
	type node struct{ u, g2 float64 }
	var seen []node
	// g2 evaluates |G|² alone, for the peak's search.
	g2 := func(u float64) (float64, error) {
		if err := adjoint(math.Exp(u), z); err != nil {
			return 0, err
		}
		g := mna.Dot(n.Input, z)
		return real(g)*real(g) + imag(g)*imag(g), nil
	}
	// Per group, ∫|H|²df and ∫|H|²/f df: a source's power is then
	// level²·(∫|H|²df + corner·∫|H|²/f df), exactly.
	q := quadrature{dim: 2 + 2*G, ctrl: 2, rtol: BandTolerance, maxEval: MaxEvaluations,
		f: func(u float64, v []float64) error {
			f := math.Exp(u)
			if err := adjoint(f, z); err != nil {
				return err
			}
			total, g := n.Total(z, f)
			for i, h2 := range n.h2 {
				v[2+2*i], v[3+2*i] = h2*f, h2
			}
			v[0] = total * f
			gg := real(g)*real(g) + imag(g)*imag(g)
			v[1] = gg * f
			seen = append(seen, node{u, gg})
			return nil
		}}
	// numeric.Log: a band may start at a subnormal frequency, which
	// amd64's math.Log gets wrong; a panel a decade, but never more
	// panels than the evaluations allow (a band from 1e-320 Hz has 328
	// decades).
	a, b := numeric.Log(from), numeric.Log(to)
	panels := min(MaxEvaluations/15, max(1, int(math.Ceil((b-a)/math.Ln10-1e-9))))
	r, err := q.integrate(a, b, panels)
	if err != nil {
		return Band{}, err
	}
	band := Band{From: from, To: to, Power: make([]float64, len(n.Sources)), Total: r.I[0], Error: r.E[0], Gain2: r.I[1],
		Evaluations: r.Evaluations, Converged: r.Converged}
	for k, s := range n.Sources {
		g := n.of[k]
		band.Power[k] = s.Density.Level * s.Density.Level * (r.I[2+2*g] + s.Density.Corner*r.I[3+2*g])
	}
	if n.Input == nil {
		return band, nil
	}
	for _, u := range [2]float64{a, b} {
		v, err := g2(u)
		if err != nil {
			return Band{}, err
		}
		seen = append(seen, node{u, v})
		band.Evaluations++
	}
	sort.Slice(seen, func(i, j int) bool { return seen[i].u < seen[j].u })
	best := 0
	for i, s := range seen {
		if s.g2 > seen[best].g2 {
			best = i
		}
	}
	lo, hi := seen[max(0, best-1)].u, seen[min(len(seen)-1, best+1)].u
	peakU, peak, evals, err := goldenMax(g2, lo, hi, seen[best].u, seen[best].g2)
	if err != nil {
		return Band{}, err
	}
	band.Evaluations += evals
	band.Peak, band.PeakAt = math.Sqrt(peak), math.Exp(peakU)
	return band, nil
}

// goldenMax finds the largest value of f on [lo, hi], starting from the
// best value known (at x0, f0), by golden-section search to 1e-5 in x —
// at a smooth maximum that leaves the value good to about 1e-10.
func goldenMax(f func(float64) (float64, error), lo, hi, x0, f0 float64) (x, fx float64, evals int, err error) {
	x, fx = x0, f0
	const r = 0.6180339887498949 // (√5 − 1)/2
	c, d := hi-r*(hi-lo), lo+r*(hi-lo)
	fc, err := f(c)
	if err != nil {
		return x, fx, evals, err
	}
	fd, err := f(d)
	if err != nil {
		return x, fx, evals, err
	}
	evals = 2
	for hi-lo > 1e-5 {
		if fc > fd {
			hi, d, fd = d, c, fc
			c = hi - r*(hi-lo)
			if fc, err = f(c); err != nil {
				return x, fx, evals, err
			}
		} else {
			lo, c, fc = c, d, fd
			d = lo + r*(hi-lo)
			if fd, err = f(d); err != nil {
				return x, fx, evals, err
			}
		}
		evals++
	}
	for _, p := range [2][2]float64{{c, fc}, {d, fd}} {
		if p[1] > fx {
			x, fx = p[0], p[1]
		}
	}
	return x, fx, evals, nil
}

// NoiseGain is the noise gain of the reference opamp at one frequency —
// the gain from a voltage in series with its input, V+ − V− as its gain
// source sees it, to the output, with the opamp's gain taken to infinity:
// 1 + Zf/Zi for the inverting family, 1/β. From the adjoint solution: h is
// the output's response to a unit in the reference's gain-source branch
// (z at that branch), T the return ratio and k the opamp's gain A(s).
// The closed-loop transfer of its en is k·h, and since the branch is the
// reference's own injection r, M⁻¹r = M₀⁻¹r/(1 + T) (Sherman–Morrison on
// M = M₀ − k·r·cᵀ), so k·h = k·v_r/(1 + T) with T = −k·c_r: as k → ∞
// this tends to −v_r/c_r = k·h·(1 + T)/T [derived]. NaN where T is zero or
// not finite.
func NoiseGain(h, T, k complex128) complex128 {
	if T == 0 || cmplx.IsNaN(T) || cmplx.IsInf(T) {
		return cmplx.NaN()
	}
	return k * h * (1 + T) / T
}
