package numeric

import "math"

// Root finds a zero of g between xa and xb, where ga = g(xa) and gb = g(xb)
// have opposite signs (or one is zero), by false position with the
// Illinois modification: after two steps on one side, the function value
// kept at the other end is halved, which restores superlinear convergence
// where plain false position stalls. It stops when the bracket is narrower
// than 1e-14·max(1, |x|), after 100 steps, or when g reports !ok (the
// current x is then returned). Callers scale x so that this tolerance
// means what they need: log f for a frequency, t/span for a time.
func Root(xa, xb, ga, gb float64, g func(x float64) (float64, bool)) float64 {
	if ga == 0 {
		return xa
	}
	if gb == 0 {
		return xb
	}
	side := 0
	for iter := 0; iter < 100; iter++ {
		x := (xa*gb - xb*ga) / (gb - ga)
		if !(x > math.Min(xa, xb) && x < math.Max(xa, xb)) {
			x = (xa + xb) / 2
		}
		gx, ok := g(x)
		if !ok || gx == 0 || math.Abs(xb-xa) < 1e-14*math.Max(1, math.Abs(x)) {
			return x
		}
		if (gx > 0) == (gb > 0) {
			xb, gb = x, gx
			if side == -1 {
				ga /= 2
			}
			side = -1
		} else {
			xa, ga = x, gx
			if side == 1 {
				gb /= 2
			}
			side = 1
		}
	}
	return (xa + xb) / 2
}
