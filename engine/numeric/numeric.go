// Package numeric holds the few scalar helpers that the engine and the
// pages share, so that each has one meaning everywhere: which numbers are
// finite, how two results are compared, and how an angle is wrapped.
package numeric

import (
	"math"
	"math/cmplx"
)

// Finite reports whether z has neither a NaN nor an infinite part.
func Finite(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }

// FiniteReal reports whether x is neither NaN nor infinite.
func FiniteReal(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// RelDiff is |a − b| / max(|a|, |b|), the relative difference by which two
// computations of one value are compared. Where either is exactly zero it
// is |a − b| itself: an exact zero (Blackman's product when Z₀ = 0, a hand
// formula's structural zero) against the rounding residue of the other
// would otherwise always read 1. Two exact zeros agree exactly (0). It is
// NaN when either is not finite.
func RelDiff(a, b complex128) float64 {
	if !Finite(a) || !Finite(b) {
		return math.NaN()
	}
	d := cmplx.Abs(a - b)
	if a == 0 || b == 0 {
		return d
	}
	return d / math.Max(cmplx.Abs(a), cmplx.Abs(b))
}

// Wrap180 wraps d degrees into (−180°, 180°].
func Wrap180(d float64) float64 {
	d = math.Mod(d, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	return d
}
