package response

import (
	"math"
	"math/cmplx"
	"slices"

	"zport/engine/numeric"
)

// band is what the frequency response's figures are measured against,
// and the figures themselves; frequencies in rad/s, NaN where there is
// none.
type band struct {
	kind   string  // "low-pass", "band-pass", "high-pass" or "flat"
	ref    float64 // |g| the figures are measured against
	refAt  float64 // where: 0 for the low-frequency gain
	peak   float64 // |g| at the peak, NaN without peaking
	peakAt float64
	upper  float64 // the −3 dB corner above the reference (the bandwidth)
	lower  float64 // the −3 dB corner below it, for band-pass and high-pass gains
}

// flatTol is the relative rise of |g| above its low-frequency value below
// which a response counts as without peaking (1e-5, about 0.0001 dB).
const flatTol = 1e-5

// shape measures |g(jω)| from its samples on a log grid over the poles'
// range, refining each figure between samples: the peak where
// d|g|²/dω changes sign, each corner where |g|² crosses ref²/2, both by
// false position on ln ω. g evaluates the gain at s and its derivative
// (nil when only the value is wanted). g0 and gInf are the gain at s = 0
// and as s → ∞ (NaN when not finite).
func shape(g func(s complex128, slope *complex128) complex128, g0, gInf float64, lo, hi float64, poles []complex128) band {
	// The grid: 40 points a decade, plus each pole's frequency, where a
	// narrow peak sits.
	grid := []float64{}
	nd := math.Log10(hi / lo)
	steps := max(int(math.Ceil(40*nd)), 2)
	for k := 0; k <= steps; k++ {
		grid = append(grid, lo*math.Pow(hi/lo, float64(k)/float64(steps)))
	}
	for _, p := range poles {
		for _, w := range []float64{math.Abs(imag(p)), cmplx.Abs(p)} {
			if w > lo && w < hi {
				grid = append(grid, w)
			}
		}
	}
	slices.Sort(grid)
	grid = slices.Compact(grid)
	mag := make([]float64, len(grid))
	top := 0
	for i, w := range grid {
		mag[i] = cmplx.Abs(g(complex(0, w), nil))
		if mag[i] > mag[top] {
			top = i
		}
	}
	b := band{peak: math.NaN(), peakAt: math.NaN(), upper: math.NaN(), lower: math.NaN()}
	// The slope of |g|² in ln ω: ω·2·Re(conj(g)·dg/dω), dg/dω = j·dg/ds.
	slope := func(x float64) (float64, bool) {
		w := math.Exp(x)
		var d complex128
		v := g(complex(0, w), &d)
		return w * 2 * real(cmplx.Conj(v)*complex(0, 1)*d), true
	}
	refinePeak := func(i int) (float64, float64) {
		if i == 0 || i == len(grid)-1 {
			return mag[i], grid[i]
		}
		sa, _ := slope(math.Log(grid[i-1]))
		sb, _ := slope(math.Log(grid[i+1]))
		if !(sa > 0 && sb < 0) {
			return mag[i], grid[i]
		}
		w := math.Exp(numeric.Root(math.Log(grid[i-1]), math.Log(grid[i+1]), sa, sb, slope))
		return cmplx.Abs(g(complex(0, w), nil)), w
	}
	crossing := func(i int, level float64) float64 {
		// |g|² − level² between grid[i] and grid[i+1].
		f := func(x float64) (float64, bool) {
			v := cmplx.Abs(g(complex(0, math.Exp(x)), nil))
			return v*v - level*level, true
		}
		return math.Exp(numeric.Root(math.Log(grid[i]), math.Log(grid[i+1]), mag[i]*mag[i]-level*level, mag[i+1]*mag[i+1]-level*level, f))
	}
	upper := func(from int, level float64) float64 {
		for i := from; i+1 < len(grid); i++ {
			if mag[i+1] < level {
				return crossing(i, level)
			}
		}
		return math.NaN()
	}
	lower := func(from int, level float64) float64 {
		for i := from; i > 0; i-- {
			if mag[i-1] < level {
				return crossing(i-1, level)
			}
		}
		return math.NaN()
	}
	largest := mag[top]
	switch {
	case !(largest > 0):
		b.kind = "flat"
		return b
	case numeric.FiniteReal(g0) && math.Abs(g0) > 1e-6*largest:
		b.kind = "low-pass"
		b.ref, b.refAt = math.Abs(g0), 0
		if top == len(grid)-1 {
			// Rising to the end of the grid: no peak, no corner.
			return b
		}
		if largest > b.ref*(1+flatTol) {
			b.peak, b.peakAt = refinePeak(top)
		}
		from := 0
		if !math.IsNaN(b.peakAt) {
			from = top
		}
		b.upper = upper(from, b.ref/math.Sqrt2)
	case top == len(grid)-1 && numeric.FiniteReal(gInf) && math.Abs(gInf) > 0:
		b.kind = "high-pass"
		b.ref, b.refAt = math.Abs(gInf), math.Inf(1)
		b.lower = lower(top, b.ref/math.Sqrt2)
	default:
		b.kind = "band-pass"
		b.ref, b.refAt = refinePeak(top)
		b.upper = upper(top, b.ref/math.Sqrt2)
		b.lower = lower(top, b.ref/math.Sqrt2)
	}
	return b
}
