// Package exact computes what zport reports for a circuit — Bode's return
// ratio of the reference element, Blackman's three terms and the port
// impedance, the asymptotic gain model's terms and the direct gain — from
// their definitions, in 256-bit math/big arithmetic, independently of the
// engine (it shares only the parsed circuit).
//
// It is the reference the engine's accuracy tests hold it against: each
// quantity is the solution of its own set of nodal equations, written here
// from the parts (modified nodal analysis, every configuration assembled
// afresh) and solved by Gaussian elimination with partial pivoting on
// complex numbers whose parts are big.Float with 256-bit significands.
// Element values are taken exactly as parsed (binary64), so the reference
// answers for the circuit the engine is given; at 256 bits its own
// rounding is some 60 orders below anything a test compares.
//
// The definitions (Bode, "Network Analysis and Feedback Amplifier Design",
// 1945; Blackman, BSTJ 1943; the asymptotic gain model of Middlebrook,
// 1964, and Rosenstark, 1986):
//
//	T      = −k·c, c the control signal returned when the reference's
//	         output is replaced by an independent source of value 1 and
//	         every independent source is zeroed
//	Z₀     = the port impedance with the reference's gain at zero
//	T short, T open = T with the port shorted, open
//	Z      = the port impedance of the full circuit
//	G₀     = the gain with the reference's gain at zero
//	G∞     = the gain with the reference's control signal held at zero by
//	         its output (a nullor)
//	G      = the gain of the full circuit
//
// A voltage source wired exactly across a port is the port's driver: it is
// removed (an open circuit) for the open port and for impedances, and kept
// at zero volts (a short) for T short, as the engine defines them.
package exact

import (
	"errors"
	"math/big"
)

// Prec is the significand precision in bits.
const Prec = 256

// pi to 80 digits.
const piText = "3.1415926535897932384626433832795028841971693993751058209749445923078164062862090"

// Complex is a complex number with big.Float parts.
type Complex struct{ Re, Im *big.Float }

func newF() *big.Float { return new(big.Float).SetPrec(Prec) }

func cf(re, im float64) Complex {
	return Complex{newF().SetFloat64(re), newF().SetFloat64(im)}
}

func zero() Complex { return Complex{newF(), newF()} }

func (z Complex) isZero() bool { return z.Re.Sign() == 0 && z.Im.Sign() == 0 }

func add(a, b Complex) Complex { return Complex{newF().Add(a.Re, b.Re), newF().Add(a.Im, b.Im)} }
func sub(a, b Complex) Complex { return Complex{newF().Sub(a.Re, b.Re), newF().Sub(a.Im, b.Im)} }
func neg(a Complex) Complex    { return Complex{newF().Neg(a.Re), newF().Neg(a.Im)} }

func mul(a, b Complex) Complex {
	t := newF()
	re := newF().Mul(a.Re, b.Re)
	re.Sub(re, t.Mul(a.Im, b.Im))
	im := newF().Mul(a.Re, b.Im)
	im.Add(im, t.Mul(a.Im, b.Re))
	return Complex{re, im}
}

func quo(a, b Complex) Complex {
	d := newF().Mul(b.Re, b.Re)
	d.Add(d, newF().Mul(b.Im, b.Im))
	t := newF()
	re := newF().Mul(a.Re, b.Re)
	re.Add(re, t.Mul(a.Im, b.Im))
	im := newF().Mul(a.Im, b.Re)
	im.Sub(im, t.Mul(a.Re, b.Im))
	return Complex{re.Quo(re, d), im.Quo(im, d)}
}

// abs1 is |re| + |im|, for pivoting.
func abs1(z Complex) *big.Float {
	a := newF().Abs(z.Re)
	return a.Add(a, newF().Abs(z.Im))
}

// Complex128 rounds z to complex128.
func (z Complex) Complex128() complex128 {
	re, _ := z.Re.Float64()
	im, _ := z.Im.Float64()
	return complex(re, im)
}

// ErrSingular reports equations without a unique solution.
var ErrSingular = errors.New("exact: singular equations")

// singularBelow is the pivot, relative to its row-equilibrated matrix,
// below which solve calls the equations singular: far below anything a
// circuit's values produce (they span some 40 decades), far above the
// 2⁻²⁵⁶ residue that elimination leaves where two columns are equal.
var singularBelow = new(big.Float).SetPrec(Prec).SetFloat64(1e-50)

// solve solves the dense n×n a·x = b in place by Gaussian elimination with
// partial pivoting, rows first scaled to largest entry 1, skipping zeros.
func solve(a [][]Complex, b []Complex) ([]Complex, error) {
	n := len(b)
	for i := 0; i < n; i++ {
		m := newF()
		for _, v := range a[i] {
			if x := abs1(v); x.Cmp(m) > 0 {
				m = x
			}
		}
		if m.Sign() == 0 {
			return nil, ErrSingular
		}
		inv := Complex{newF().Quo(newF().SetFloat64(1), m), newF()}
		for j := range a[i] {
			if !a[i][j].isZero() {
				a[i][j] = mul(a[i][j], inv)
			}
		}
		b[i] = mul(b[i], inv)
	}
	for k := 0; k < n; k++ {
		p := -1
		var pm *big.Float
		for i := k; i < n; i++ {
			if a[i][k].isZero() {
				continue
			}
			if m := abs1(a[i][k]); p < 0 || m.Cmp(pm) > 0 {
				p, pm = i, m
			}
		}
		if p < 0 || pm.Cmp(singularBelow) < 0 {
			return nil, ErrSingular
		}
		a[k], a[p] = a[p], a[k]
		b[k], b[p] = b[p], b[k]
		for i := k + 1; i < n; i++ {
			if a[i][k].isZero() {
				continue
			}
			l := quo(a[i][k], a[k][k])
			for j := k + 1; j < n; j++ {
				if !a[k][j].isZero() {
					a[i][j] = sub(a[i][j], mul(l, a[k][j]))
				}
			}
			a[i][k] = zero()
			if !b[k].isZero() {
				b[i] = sub(b[i], mul(l, b[k]))
			}
		}
	}
	x := make([]Complex, n)
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for j := i + 1; j < n; j++ {
			if !a[i][j].isZero() {
				s = sub(s, mul(a[i][j], x[j]))
			}
		}
		x[i] = quo(s, a[i][i])
	}
	return x, nil
}
