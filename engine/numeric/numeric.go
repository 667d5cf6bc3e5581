// Package numeric holds the few scalar helpers that the engine and the
// pages share, so that each has one meaning everywhere: which numbers are
// finite, how two results are compared, how an angle is wrapped, and the
// logarithm a frequency grid is spaced by.
package numeric

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/floats"
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

// Log is math.Log, the same on every platform down to the smallest
// subnormal. Go's assembly log on amd64 reads a subnormal's exponent
// without normalizing it first (math.Log(1e-320) gives −709.09 there and
// −736.83 in WebAssembly, where the pure Go code runs), so the engine in a
// page and on the command line would space a sweep from 1e-320 Hz
// differently. A subnormal is scaled into the normal range by an exact
// power of two first.
func Log(x float64) float64 {
	if x > 0 && x < 0x1p-1022 {
		return math.Log(x*0x1p52) - 52*math.Ln2
	}
	return math.Log(x)
}

// LogSpan is gonum's floats.LogSpan by Log: dst filled with len(dst) ≥ 2
// numbers from l to u (both above 0) spaced equally in ratio, bit for bit
// the same as floats.LogSpan wherever l and u are normal numbers.
func LogSpan(dst []float64, l, u float64) []float64 {
	floats.Span(dst, Log(l), Log(u))
	for i := range dst {
		dst[i] = math.Exp(dst[i])
	}
	return dst
}
