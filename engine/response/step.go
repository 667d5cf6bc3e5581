package response

import (
	"math"
	"math/cmplx"

	"zport/engine/numeric"
)

// expm returns e^(Ã·t) for the augmented matrix Ã = [A b; 0 0] of size
// m+1: its last column holds ξ(t) = ∫₀ᵗ e^(Aτ)dτ·b and its top-left block
// e^(At) (C. Van Loan, "Computing integrals involving the matrix
// exponential", IEEE Trans. Automatic Control 23(3), 1978 [memory]). The
// exponential is the Padé approximant with scaling and squaring (expm).
func (md *model) expm(t float64) []float64 {
	m1 := md.m + 1
	a := make([]float64, m1*m1)
	for i := 0; i < md.m; i++ {
		for j := 0; j < md.m; j++ {
			a[i*m1+j] = md.a[i*md.m+j] * t
		}
		a[i*m1+md.m] = md.b[i] * t
	}
	return expm(a, m1)
}

// series returns the step response at t = 0, h, 2h, … (points values),
// propagated exactly from one sample to the next: ζₖ₊₁ = e^(Ãh)·ζₖ with
// ζ = [ξ; 1], so each sample carries only the rounding of the steps before
// it, whatever the poles. y(0) is the value just after the step, d.
func (md *model) series(h float64, points int) []float64 {
	y := make([]float64, points)
	m, m1 := md.m, md.m+1
	if m == 0 {
		for i := range y {
			y[i] = md.d
		}
		return y
	}
	E := md.expm(h)
	z := make([]float64, m1)
	next := make([]float64, m1)
	z[m] = 1
	for k := range y {
		s := md.d
		for i := 0; i < m; i++ {
			s += md.c[i] * z[i]
		}
		y[k] = s
		for i := 0; i < m1; i++ {
			v := 0.0
			for j := 0; j < m1; j++ {
				v += E[i*m1+j] * z[j]
			}
			next[i] = v
		}
		z, next = next, z
	}
	return y
}

// stepAt is the step response at one time, exactly (one exponential).
func (md *model) stepAt(t float64) float64 {
	if md.m == 0 || t == 0 {
		return md.d
	}
	E := md.expm(t)
	m1 := md.m + 1
	s := md.d
	for i := 0; i < md.m; i++ {
		s += md.c[i] * E[i*m1+md.m]
	}
	return s
}

// slopeAt is the step response's derivative cᵀe^(At)b at one time.
func (md *model) slopeAt(t float64) float64 {
	if md.m == 0 {
		return 0
	}
	E := md.expm(t)
	m1 := md.m + 1
	s := 0.0
	for i := 0; i < md.m; i++ {
		for j := 0; j < md.m; j++ {
			s += md.c[i] * E[i*m1+j] * md.b[j]
		}
	}
	return s
}

// fractions is the step response as a sum of modes,
// y(t) = g(0) + Σᵢ ρᵢ·e^(pᵢt), ρᵢ = rᵢ/pᵢ with rᵢ the residue of g at pᵢ:
// cheap at any t, and exact while the poles are simple.
type fractions struct {
	g0  float64
	p   []complex128
	rho []complex128
}

func (f *fractions) at(t float64) float64 {
	s := f.g0
	for i, p := range f.p {
		s += real(f.rho[i] * cmplx.Exp(p*complex(t, 0)))
	}
	return s
}

// series samples the sum at t = 0, h, 2h, … (points values), each mode
// advanced by its factor e^(pᵢh) from one sample to the next rather than
// exponentiated anew: n samples carry a relative error of about n·ε,
// which decides nothing (the figures are refined with at).
func (f *fractions) series(h float64, points int) []float64 {
	z := append([]complex128(nil), f.rho...)
	step := make([]complex128, len(f.p))
	for i, p := range f.p {
		step[i] = cmplx.Exp(p * complex(h, 0))
	}
	y := make([]float64, points)
	for k := range y {
		s := f.g0
		for i := range z {
			s += real(z[i])
			z[i] *= step[i]
		}
		y[k] = s
	}
	return y
}

// slope is the derivative Σᵢ ρᵢpᵢ·e^(pᵢt).
func (f *fractions) slope(t float64) float64 {
	s := 0.0
	for i, p := range f.p {
		s += real(f.rho[i] * p * cmplx.Exp(p*complex(t, 0)))
	}
	return s
}

// figures are the time-domain figures of a settling step response,
// measured on y(t)/final.
type figures struct {
	overshoot         float64 // percent of the final value
	peak, peakTime    float64 // NaN without overshoot
	rise10, rise90    float64
	settle1, settle01 float64
	complete          bool // the response settles within ±0.1 % inside the grid
}

// evaluator is a way of computing the step response: samples on a
// uniform grid, and the value and slope at any time.
type evaluator struct {
	series    func(h float64, points int) []float64
	at, slope func(t float64) float64
}

// measure finds the figures of y (normalized by final) on a uniform grid
// of n points over [0, span], each refined between its samples by false
// position on t/span with the evaluator's exact value and slope.
func measure(ev evaluator, final, span float64, n int) figures {
	at, slopeAt := ev.at, ev.slope
	h := span / float64(n-1)
	yn := ev.series(h, n)
	for k := range yn {
		yn[k] /= final
	}
	cross := func(k int, level float64) float64 {
		// A zero of yn − level in [t_k, t_k+1], in units of span.
		g := func(x float64) (float64, bool) { return at(x*span)/final - level, true }
		return span * numeric.Root(float64(k)*h/span, float64(k+1)*h/span, yn[k]-level, yn[k+1]-level, g)
	}
	first := func(from int, level float64) (float64, int) {
		if yn[from] >= level {
			return float64(from) * h, from
		}
		for k := from; k+1 < n; k++ {
			if yn[k+1] >= level {
				return cross(k, level), k
			}
		}
		return math.NaN(), n - 1
	}
	var f figures
	var k10 int
	f.rise10, k10 = first(0, 0.1)
	f.rise90, _ = first(k10, 0.9)

	f.peak, f.peakTime = math.NaN(), math.NaN()
	top := 0
	for k := range yn {
		if yn[k] > yn[top] {
			top = k
		}
	}
	if yn[top] > 1 && top+1 < n {
		// The peak: where the slope changes sign around the largest sample.
		lo, hi := max(top-1, 0), top+1
		slope := func(x float64) (float64, bool) { return slopeAt(x*span) / final, true }
		tp := float64(top) * h
		if lo < top {
			sa, _ := slope(float64(lo) * h / span)
			sb, _ := slope(float64(hi) * h / span)
			if sa > 0 && sb < 0 {
				tp = span * numeric.Root(float64(lo)*h/span, float64(hi)*h/span, sa, sb, slope)
			}
		}
		f.peakTime = tp
		f.peak = at(tp)
		f.overshoot = 100 * (f.peak/final - 1)
	}
	settle := func(band float64) float64 {
		last := -1
		for k := n - 1; k >= 0; k-- {
			if math.Abs(yn[k]-1) > band {
				last = k
				break
			}
		}
		switch {
		case last < 0:
			return 0
		case last == n-1:
			return math.NaN()
		}
		level := 1 + band
		if yn[last] < 1 {
			level = 1 - band
		}
		return cross(last, level)
	}
	f.settle1, f.settle01 = settle(0.01), settle(0.001)
	f.complete = !math.IsNaN(f.settle01)
	return f
}
