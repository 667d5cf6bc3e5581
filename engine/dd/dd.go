package dd

import "math"

// U is the unit roundoff of float64, 2⁻⁵³; U2 = U² is the scale of a
// double-double operation's relative error.
const (
	U  = 0x1p-53
	U2 = 0x1p-106
)

// Float is the double-double number Hi + Lo, normalized so that Hi is Hi + Lo
// rounded to float64.
type Float struct{ Hi, Lo float64 }

// F returns x as a Float.
func F(x float64) Float { return Float{x, 0} }

// TwoSum returns s = fl(a + b) and e with s + e = a + b exactly.
func TwoSum(a, b float64) (s, e float64) {
	s = a + b
	bb := s - a
	e = (a - (s - bb)) + (b - bb)
	return s, e
}

// fastTwoSum is TwoSum for |a| ≥ |b| (or a = 0).
func fastTwoSum(a, b float64) (s, e float64) {
	s = a + b
	e = b - (s - a)
	return s, e
}

// splitter is 2²⁷ + 1, Veltkamp's constant for splitting a float64 into two
// halves of 26 bits.
const splitter = 0x1p27 + 1

// twoProdSplit is TwoProd by Dekker's method, without an FMA.
func twoProdSplit(a, b float64) (p, e float64) {
	p = a * b
	c := splitter * a
	ah := c - (c - a)
	al := a - ah
	c = splitter * b
	bh := c - (c - b)
	bl := b - bh
	e = ((ah*bh - p) + ah*bl + al*bh) + al*bl
	return p, e
}

// twoProdFMA is TwoProd with a fused multiply-add.
func twoProdFMA(a, b float64) (p, e float64) {
	p = a * b
	return p, math.FMA(a, b, -p)
}

// Add returns x + y (the accurate algorithm: both parts summed error-free).
func (x Float) Add(y Float) Float {
	s, e := TwoSum(x.Hi, y.Hi)
	t, f := TwoSum(x.Lo, y.Lo)
	e += t
	s, e = fastTwoSum(s, e)
	e += f
	s, e = fastTwoSum(s, e)
	return Float{s, e}
}

// AddF returns x + y for a float64 y.
func (x Float) AddF(y float64) Float {
	s, e := TwoSum(x.Hi, y)
	e += x.Lo
	s, e = fastTwoSum(s, e)
	return Float{s, e}
}

// Neg returns −x.
func (x Float) Neg() Float { return Float{-x.Hi, -x.Lo} }

// Sub returns x − y.
func (x Float) Sub(y Float) Float { return x.Add(y.Neg()) }

// Mul returns x · y.
func (x Float) Mul(y Float) Float {
	p, e := TwoProd(x.Hi, y.Hi)
	e += x.Hi*y.Lo + x.Lo*y.Hi
	p, e = fastTwoSum(p, e)
	return Float{p, e}
}

// MulF returns x · y for a float64 y.
func (x Float) MulF(y float64) Float {
	p, e := TwoProd(x.Hi, y)
	e += x.Lo * y
	p, e = fastTwoSum(p, e)
	return Float{p, e}
}

// Div returns x / y.
func (x Float) Div(y Float) Float {
	q1 := x.Hi / y.Hi
	r := x.Sub(y.MulF(q1))
	q2 := r.Hi / y.Hi
	r = r.Sub(y.MulF(q2))
	q3 := r.Hi / y.Hi
	q1, q2 = fastTwoSum(q1, q2)
	return Float{q1, q2}.AddF(q3)
}

// Recip returns 1/x for a float64 x: its float64 quotient and the exact
// remainder's share, so that a conductance 1/R is known to twice the
// working precision.
func Recip(x float64) Float {
	q := 1 / x
	p, e := TwoProd(q, x)
	// 1 − q·x = (1 − p) − e; 1 − p is exact (p is within an ulp of 1).
	return Float{q, ((1 - p) - e) / x}
}

// Float64 returns x rounded to float64.
func (x Float) Float64() float64 { return x.Hi + x.Lo }

// Abs returns |x|.
func (x Float) Abs() Float {
	if x.Hi < 0 || x.Hi == 0 && x.Lo < 0 {
		return x.Neg()
	}
	return x
}

// Complex is a complex number with double-double parts.
type Complex struct{ Re, Im Float }

// C returns z as a Complex.
func C(z complex128) Complex { return Complex{F(real(z)), F(imag(z))} }

// Complex128 returns z rounded to complex128.
func (z Complex) Complex128() complex128 { return complex(z.Re.Float64(), z.Im.Float64()) }

// Add returns z + w.
func (z Complex) Add(w Complex) Complex { return Complex{z.Re.Add(w.Re), z.Im.Add(w.Im)} }

// Sub returns z − w.
func (z Complex) Sub(w Complex) Complex { return Complex{z.Re.Sub(w.Re), z.Im.Sub(w.Im)} }

// Neg returns −z.
func (z Complex) Neg() Complex { return Complex{z.Re.Neg(), z.Im.Neg()} }

// Mul returns z · w.
func (z Complex) Mul(w Complex) Complex {
	return Complex{z.Re.Mul(w.Re).Sub(z.Im.Mul(w.Im)), z.Re.Mul(w.Im).Add(z.Im.Mul(w.Re))}
}

// Scale returns x · z for a real double-double x.
func (z Complex) Scale(x Float) Complex { return Complex{z.Re.Mul(x), z.Im.Mul(x)} }

// ScaleF returns x · z for a float64 x.
func (z Complex) ScaleF(x float64) Complex { return Complex{z.Re.MulF(x), z.Im.MulF(x)} }

// MulJ returns j·z.
func (z Complex) MulJ() Complex { return Complex{z.Im.Neg(), z.Re} }

// Div returns z / w.
func (z Complex) Div(w Complex) Complex {
	d := w.Re.Mul(w.Re).Add(w.Im.Mul(w.Im))
	re := z.Re.Mul(w.Re).Add(z.Im.Mul(w.Im))
	im := z.Im.Mul(w.Re).Sub(z.Re.Mul(w.Im))
	return Complex{re.Div(d), im.Div(d)}
}

// Abs1 returns |Re z| + |Im z| rounded to float64: within a factor √2 of
// |z|, and what error bounds built on it use.
func (z Complex) Abs1() float64 { return math.Abs(z.Re.Float64()) + math.Abs(z.Im.Float64()) }
