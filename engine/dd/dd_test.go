package dd

import (
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// The reference is math/big at 300 bits: exact for sums and products of
// two float64, and far beyond double-double for the rest.
const prec = 300

func bf(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }

func bdd(x Float) *big.Float { return bf(x.Hi).Add(bf(x.Hi), bf(x.Lo)) }

// relErr is |got − want|/|want| (absolute when want is 0).
func relErr(got Float, want *big.Float) float64 {
	d := new(big.Float).SetPrec(prec).Sub(bdd(got), want)
	if want.Sign() != 0 {
		d.Quo(d, want)
	}
	f, _ := d.Float64()
	return math.Abs(f)
}

// randFloat draws a float64 of random sign and exponent over ±2⁻⁶⁰…2⁶⁰,
// full random significand.
func randFloat(rng *rand.Rand) float64 {
	m := 1 + rng.Float64()
	x := math.Ldexp(m, rng.IntN(121)-60)
	if rng.IntN(2) == 0 {
		x = -x
	}
	return x
}

func randDD(rng *rand.Rand) Float {
	hi := randFloat(rng)
	lo := hi * 0x1p-54 * (2*rng.Float64() - 1)
	s, e := fastTwoSum(hi, lo)
	return Float{s, e}
}

// TwoSum and both TwoProds are error-free: the pair sums to the exact
// result (Knuth; Dekker 1971).
func TestErrorFreeTransformations(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for i := 0; i < 20000; i++ {
		a, b := randFloat(rng), randFloat(rng)
		if i%7 == 0 {
			b = -a * (1 + 0x1p-40*rng.Float64()) // heavy cancellation
		}
		s, e := TwoSum(a, b)
		want := bf(a).Add(bf(a), bf(b))
		if got := bf(s).Add(bf(s), bf(e)); got.Cmp(want) != 0 || s != a+b {
			t.Fatalf("TwoSum(%g, %g) = %g + %g, want %s", a, b, s, e, want.Text('g', 40))
		}
		want = bf(a).Mul(bf(a), bf(b))
		for name, f := range map[string]func(a, b float64) (float64, float64){"FMA": twoProdFMA, "split": twoProdSplit, "TwoProd": TwoProd} {
			p, e := f(a, b)
			if got := bf(p).Add(bf(p), bf(e)); got.Cmp(want) != 0 || p != a*b {
				t.Fatalf("TwoProd %s(%g, %g) = %g + %g, want %s", name, a, b, p, e, want.Text('g', 40))
			}
		}
	}
}

// Each operation's relative error against math/big stays within a small
// multiple of U2 (the constants of Joldes, Muller and Popescu, 2017
// [memory], with room).
func TestArithmetic(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 3))
	worst := map[string]float64{}
	for i := 0; i < 20000; i++ {
		x, y := randDD(rng), randDD(rng)
		if i%5 == 0 {
			y = x.Neg().Add(Float{x.Hi * 0x1p-30 * rng.Float64(), 0}) // cancellation in Add
		}
		bx, by := bdd(x), bdd(y)
		z := new(big.Float).SetPrec(prec)
		check := func(name string, got Float, want *big.Float, limit float64) {
			e := relErr(got, want) / U2
			worst[name] = math.Max(worst[name], e)
			if e > limit {
				t.Fatalf("%s: x = %v, y = %v: relative error %.3g·U2, want ≤ %g·U2", name, x, y, e, limit)
			}
		}
		check("Add", x.Add(y), z.Add(bx, by), 4)
		check("AddF", x.AddF(y.Hi), new(big.Float).SetPrec(prec).Add(bx, bf(y.Hi)), 4)
		check("Mul", x.Mul(y), new(big.Float).SetPrec(prec).Mul(bx, by), 6)
		check("MulF", x.MulF(y.Hi), new(big.Float).SetPrec(prec).Mul(bx, bf(y.Hi)), 4)
		if y.Hi != 0 {
			check("Div", x.Div(y), new(big.Float).SetPrec(prec).Quo(bx, by), 12)
			check("Recip", Recip(y.Hi), new(big.Float).SetPrec(prec).Quo(bf(1), bf(y.Hi)), 4)
		}
	}
	t.Logf("worst relative errors in units of U2: %v", worst)
}

func TestComplex(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 5))
	rc := func() Complex { return Complex{randDD(rng), randDD(rng)} }
	for i := 0; i < 2000; i++ {
		z, w := rc(), rc()
		zr, zi, wr, wi := bdd(z.Re), bdd(z.Im), bdd(w.Re), bdd(w.Im)
		nb := func() *big.Float { return new(big.Float).SetPrec(prec) }
		// Mul: (zr·wr − zi·wi) + j(zr·wi + zi·wr); judged against the
		// larger partial product, as cancellation between them is the
		// inputs' business.
		m := z.Mul(w)
		re := nb().Sub(nb().Mul(zr, wr), nb().Mul(zi, wi))
		im := nb().Add(nb().Mul(zr, wi), nb().Mul(zi, wr))
		scale := math.Max(math.Abs(z.Re.Hi*w.Re.Hi)+math.Abs(z.Im.Hi*w.Im.Hi), math.Abs(z.Re.Hi*w.Im.Hi)+math.Abs(z.Im.Hi*w.Re.Hi))
		for _, c := range []struct {
			got  Float
			want *big.Float
		}{{m.Re, re}, {m.Im, im}} {
			d, _ := nb().Sub(bdd(c.got), c.want).Float64()
			if math.Abs(d) > 16*U2*scale {
				t.Fatalf("Mul(%v, %v): error %g, scale %g", z, w, d, scale)
			}
		}
		// Div: w·(z/w) returns z.
		q := z.Div(w).Mul(w)
		for _, p := range [][2]Float{{q.Re, z.Re}, {q.Im, z.Im}} {
			d := math.Abs(p[0].Sub(p[1]).Float64())
			if d > 64*U2*(z.Abs1()+0) {
				t.Fatalf("Div(%v, %v)·w − z = %g", z, w, d)
			}
		}
	}
	if got := (Complex{F(1), F(2)}).MulJ(); got.Complex128() != complex(-2, 1) {
		t.Errorf("MulJ(1 + 2j) = %v, want −2 + 1j", got.Complex128())
	}
}

func ExampleFloat_Add() {
	// 50 Ω and 1 TΩ meeting at one node: float64 keeps the small
	// conductance to six digits, double-double to all of them.
	big, small := Recip(50), Recip(1e12)
	fmt.Printf("%.12g\n", (big.Hi+small.Hi)-big.Hi)
	fmt.Printf("%.12g\n", big.Add(small).Sub(big).Float64())
	// Output:
	// 9.99998694962e-13
	// 1e-12
}
