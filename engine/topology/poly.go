package topology

import (
	"math"
	"math/cmplx"
	"sort"
)

// poly is a real polynomial in s, coefficients in ascending powers. The
// transistor-level stages use it to write a transfer function's numerator
// and denominator exactly, and to find its poles and zeros.
type poly []float64

func (p poly) add(q poly) poly {
	out := make(poly, max(len(p), len(q)))
	for i := range out {
		if i < len(p) {
			out[i] += p[i]
		}
		if i < len(q) {
			out[i] += q[i]
		}
	}
	return out
}

func (p poly) mul(q poly) poly {
	if len(p) == 0 || len(q) == 0 {
		return nil
	}
	out := make(poly, len(p)+len(q)-1)
	for i, a := range p {
		for j, b := range q {
			out[i+j] += a * b
		}
	}
	return out
}

func (p poly) scale(k float64) poly {
	out := make(poly, len(p))
	for i, a := range p {
		out[i] = k * a
	}
	return out
}

// at evaluates p at s by Horner's rule.
func (p poly) at(s complex128) complex128 {
	var v complex128
	for i := len(p) - 1; i >= 0; i-- {
		v = v*s + complex(p[i], 0)
	}
	return v
}

// trim drops leading coefficients that are zero: a capacitance left out
// makes its term exactly zero.
func (p poly) trim() poly {
	n := len(p)
	for n > 0 && p[n-1] == 0 {
		n--
	}
	return p[:n]
}

// roots returns the roots of p, sorted by magnitude, by the Weierstrass
// (Durand–Kerner) simultaneous iteration on p scaled to roots of order one,
// each root then polished by Newton's method on p itself (E. Durand, 1960;
// I. O. Kerner, 1966 [memory]). It returns nil when p is constant or has a
// root at 0 (a transfer function of these stages has neither).
func (p poly) roots() []complex128 {
	p = p.trim()
	n := len(p) - 1
	if n < 1 || p[0] == 0 {
		return nil
	}
	// Scale s = σ·t so that the product of the roots has magnitude one.
	sigma := math.Pow(math.Abs(p[0]/p[n]), 1/float64(n))
	q := make([]complex128, n+1) // monic in t
	for i := range q {
		q[i] = complex(p[i]*math.Pow(sigma, float64(i))/(p[n]*math.Pow(sigma, float64(n))), 0)
	}
	eval := func(t complex128) complex128 {
		var v complex128
		for i := n; i >= 0; i-- {
			v = v*t + q[i]
		}
		return v
	}
	z := make([]complex128, n)
	for i := range z {
		z[i] = cmplx.Pow(complex(0.4, 0.9), complex(float64(i), 0)) // the customary start, not on a symmetry line
	}
	for iter := 0; iter < 500; iter++ {
		moved := 0.0
		for i := range z {
			den := complex(1, 0)
			for j := range z {
				if j != i {
					den *= z[i] - z[j]
				}
			}
			if den == 0 {
				den = 1e-12
			}
			d := eval(z[i]) / den
			z[i] -= d
			moved = math.Max(moved, cmplx.Abs(d)/math.Max(1, cmplx.Abs(z[i])))
		}
		if moved < 1e-15 {
			break
		}
	}
	dp := make(poly, n)
	for i := 1; i <= n; i++ {
		dp[i-1] = float64(i) * p[i]
	}
	out := make([]complex128, n)
	for i := range z {
		r := z[i] * complex(sigma, 0)
		for k := 0; k < 3; k++ {
			if d := dp.at(r); d != 0 {
				r -= p.at(r) / d
			}
		}
		if math.Abs(imag(r)) <= 1e-12*cmplx.Abs(r) {
			r = complex(real(r), 0)
		}
		out[i] = r
	}
	sort.Slice(out, func(i, j int) bool { return cmplx.Abs(out[i]) < cmplx.Abs(out[j]) })
	return out
}

// rootPhase is the phase in degrees of Π(1 − s/zᵢ)/Π(1 − s/pₖ) at s = jω,
// continuous in ω from 0: the imaginary part of each factor 1 − jω/r keeps
// one sign for ω > 0, so each angle stays in one half-plane and the sum
// needs no unwrapping.
func rootPhase(w float64, zeros, poles []complex128) float64 {
	s := complex(0, w)
	ph := 0.0
	for _, z := range zeros {
		ph += cmplx.Phase(1 - s/z)
	}
	for _, p := range poles {
		ph -= cmplx.Phase(1 - s/p)
	}
	return ph * 180 / math.Pi
}
