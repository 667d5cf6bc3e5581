package numeric

import "math"

// Bracket is where a root search ended: X is the best estimate of the
// root, the end of the final bracket where |g| is least, with GX = g(X);
// Other and GOther are the bracket's other end, where g has the opposite
// sign (or X is an exact zero), so a root of a continuous g lies between
// them. Evals counts the evaluations of g the search made. OK is false
// when g reported that it could not be evaluated; X and Other are then
// the last bracket known.
type Bracket struct {
	X, GX         float64
	Other, GOther float64
	Evals         int
	OK            bool
}

// Width is the length of the final bracket, |X − Other|.
func (b Bracket) Width() float64 { return math.Abs(b.X - b.Other) }

// eps is the unit roundoff of float64, 2⁻⁵³.
const eps = 0x1p-53

// Brent finds a zero of g between a and b, where ga = g(a) and gb = g(b)
// have opposite signs (or one is zero), by Brent's method: inverse
// quadratic interpolation or the secant step where they make progress,
// bisection where they would not shrink the bracket fast enough, so that
// it is never much slower than bisection (a triple root, the worst case
// here, takes about two and a half times its steps) and converges
// superlinearly on a smooth g
// (R. P. Brent, Algorithms for Minimization without Derivatives,
// Prentice-Hall, 1973, ch. 4, procedure zero [memory]). It stops when the
// bracket's half-width is at most 2ε|x| + tol (ε = 2⁻⁵³), so tol is the
// absolute accuracy wanted in x; when g(x) is exactly zero; when g
// reports !ok; or after 200 evaluations, which a bracket of any float64
// width does not need.
//
// Brent panics when ga and gb have the same sign: the caller must bracket
// the root. NaN values of ga or gb are misuse too.
func Brent(a, b, ga, gb, tol float64, g func(x float64) (float64, bool)) Bracket {
	if math.IsNaN(ga) || math.IsNaN(gb) || ga > 0 && gb > 0 || ga < 0 && gb < 0 {
		panic("numeric: Brent needs g(a) and g(b) of opposite signs")
	}
	if ga == 0 {
		return Bracket{X: a, GX: 0, Other: a, OK: true}
	}
	if gb == 0 {
		return Bracket{X: b, GX: 0, Other: b, OK: true}
	}
	// b is the best estimate, a the previous one, c the contrapoint with
	// g of the sign opposite to b's; d is the step just taken and e the
	// one before it.
	c, gc := a, ga
	d := b - a
	e := d
	evals := 0
	for {
		if math.Abs(gc) < math.Abs(gb) {
			a, b, c = b, c, b
			ga, gb, gc = gb, gc, gb
		}
		t := 2*eps*math.Abs(b) + tol
		m := (c - b) / 2
		if math.Abs(m) <= t || gb == 0 || evals >= 200 {
			return Bracket{X: b, GX: gb, Other: c, GOther: gc, Evals: evals, OK: true}
		}
		if math.Abs(e) < t || math.Abs(ga) <= math.Abs(gb) {
			// The last steps shrank too slowly, or went the wrong way:
			// bisect.
			d, e = m, m
		} else {
			var p, q float64
			s := gb / ga
			if a == c {
				// Two points only: the secant step.
				p, q = 2*m*s, 1-s
			} else {
				// Inverse quadratic interpolation through a, b and c.
				qa, r := ga/gc, gb/gc
				p = s * (2*m*qa*(qa-r) - (b-a)*(r-1))
				q = (qa - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			// Take the interpolated step only if it falls well inside the
			// bracket and is less than half the step before last;
			// otherwise bisect.
			if s := e; 2*p < 3*m*q-math.Abs(t*q) && p < math.Abs(s*q/2) {
				e, d = d, p/q
			} else {
				d, e = m, m
			}
		}
		a, ga = b, gb
		switch {
		case math.Abs(d) > t:
			b += d
		case m > 0:
			b += t
		default:
			b -= t
		}
		var ok bool
		gb, ok = g(b)
		evals++
		if !ok || math.IsNaN(gb) {
			// The last bracket known is [a, c] with a the best end.
			return Bracket{X: a, GX: ga, Other: c, GOther: gc, Evals: evals, OK: false}
		}
		if gb > 0 && gc > 0 || gb <= 0 && gc <= 0 {
			c, gc = a, ga
			d = b - a
			e = d
		}
	}
}

// Root finds a zero of g between xa and xb, where ga = g(xa) and
// gb = g(xb) have opposite signs (or one is zero), by Brent's method to
// an absolute accuracy of 10⁻¹⁴ in x plus 2ε|x|, and returns it; when g
// reports !ok it returns the best estimate so far. Callers scale x so
// that this accuracy means what they need: log f for a frequency, t/span
// for a time.
func Root(xa, xb, ga, gb float64, g func(x float64) (float64, bool)) float64 {
	return Brent(xa, xb, ga, gb, 1e-14, g).X
}

// Minimum is where a minimum search ended: X with F = f(X), the least
// value found, and the number of evaluations. OK is false when f
// reported that it could not continue (or stop asked it to stop); X and
// F are then the least value found so far.
type Minimum struct {
	X, F  float64
	Evals int
	OK    bool
}

// golden is (3 − √5)/2, the golden-section fraction of an interval.
var golden = (3 - math.Sqrt(5)) / 2

// Minimize finds a local minimum of f in [a, b] (a < b) by Brent's method:
// golden-section search, with a parabola through the three best points
// taken instead wherever it falls inside the interval and shrinks it
// fast enough (Brent, 1973, ch. 5, procedure localmin [memory]). It
// stops when x is known to within 2·(√ε|x| + tol), after 200
// evaluations, or when f reports !ok (to stop early, say when a value
// below some level has been seen). On a unimodal f it finds the minimum;
// otherwise a local one. The ends themselves are not evaluated.
func Minimize(a, b, tol float64, f func(x float64) (float64, bool)) Minimum {
	if !(a < b) {
		panic("numeric: Minimize needs a < b")
	}
	rel := math.Sqrt(2 * eps)
	x := a + golden*(b-a)
	w, v := x, x
	var d, e float64
	fx, ok := f(x)
	evals := 1
	if !ok {
		return Minimum{X: x, F: fx, Evals: evals}
	}
	fw, fv := fx, fx
	for evals < 200 {
		m := (a + b) / 2
		t := rel*math.Abs(x) + tol
		t2 := 2 * t
		if math.Abs(x-m) <= t2-(b-a)/2 {
			break
		}
		var p, q, r float64
		if math.Abs(e) > t {
			// A parabola through x, w and v.
			r = (x - w) * (fx - fv)
			q = (x - v) * (fx - fw)
			p = (x-v)*q - (x-w)*r
			q = 2 * (q - r)
			if q > 0 {
				p = -p
			}
			q = math.Abs(q)
			r, e = e, d
		}
		if math.Abs(p) < math.Abs(q*r/2) && p > q*(a-x) && p < q*(b-x) {
			d = p / q
			if u := x + d; u-a < t2 || b-u < t2 {
				d = t
				if x >= m {
					d = -t
				}
			}
		} else {
			// A golden-section step into the larger part.
			if x < m {
				e = b - x
			} else {
				e = a - x
			}
			d = golden * e
		}
		u := x + d
		switch {
		case math.Abs(d) >= t:
		case d > 0:
			u = x + t
		default:
			u = x - t
		}
		fu, ok := f(u)
		evals++
		if !ok {
			if fu < fx {
				x, fx = u, fu
			}
			return Minimum{X: x, F: fx, Evals: evals}
		}
		if fu <= fx {
			if u < x {
				b = x
			} else {
				a = x
			}
			v, fv = w, fw
			w, fw = x, fx
			x, fx = u, fu
			continue
		}
		if u < x {
			a = u
		} else {
			b = u
		}
		if fu <= fw || w == x {
			v, fv = w, fw
			w, fw = u, fu
		} else if fu <= fv || v == x || v == w {
			v, fv = u, fu
		}
	}
	return Minimum{X: x, F: fx, Evals: evals, OK: true}
}
