package value

import (
	"math"
	"math/big"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// shown reads back what Format wrote: the number it stands for, exactly,
// and the power of ten of its last significant digit. It fails t on
// anything but a mantissa of sig significant digits (an integer part of
// one to three digits with an SI prefix, or of one digit before a power of
// ten), followed by unit.
func shown(t *testing.T, s, unit string, sig int) (x *big.Float, last int) {
	t.Helper()
	body, ok := strings.CutSuffix(s, unit)
	if !ok {
		t.Fatalf("%q does not end in %q", s, unit)
	}
	body = strings.TrimSpace(body)
	neg := strings.HasPrefix(body, "−")
	body = strings.TrimPrefix(body, "−")
	exp, power := 0, false
	if m, e, ok := strings.Cut(body, "×10^"); ok {
		n, err := strconv.Atoi(e)
		if err != nil || len(strings.TrimLeft(e, "+-")) < 2 || !strings.ContainsAny(e[:1], "+-") {
			t.Fatalf("%q: exponent %q", s, e)
		}
		body, exp, power = m, n, true
	} else {
		for _, p := range formatPrefixes {
			if p.sym != "" && strings.HasSuffix(body, p.sym) {
				body, exp = strings.TrimSpace(strings.TrimSuffix(body, p.sym)), p.exp
				break
			}
		}
	}
	whole, frac, _ := strings.Cut(body, ".")
	switch {
	case strings.Trim(whole+frac, "0123456789") != "" || whole == "" || whole[0] == '0':
		t.Fatalf("%q: mantissa %q", s, body)
	case power && len(whole) != 1, len(whole) > 3:
		t.Fatalf("%q: %d digits before the point", s, len(whole))
	case len(frac) > 0 && len(whole)+len(frac) != sig, len(frac) == 0 && len(whole) < sig:
		t.Fatalf("%q: not %d significant digits", s, sig)
	}
	x, _, err := big.ParseFloat(body+"e"+strconv.Itoa(exp), 10, 4000, big.ToNearestEven)
	if err != nil {
		t.Fatalf("%q: %v", s, err)
	}
	if neg {
		x.Neg(x)
	}
	return x, exp + len(whole) - sig
}

// pow10 is 10^k as an exact big.Float.
func pow10(k int) *big.Float {
	p := new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(max(k, -k))), nil)
	x := new(big.Float).SetPrec(4000).SetInt(p)
	if k < 0 {
		x.Quo(new(big.Float).SetPrec(4000).SetInt64(1), x)
	}
	return x
}

// Format writes every float64 — the subnormals below 2.2e-308, the
// largest, and a seeded sample of the whole range — with the digits asked
// for, an SI prefix or a power of ten, and a value within half a unit of
// its last digit of the exact value (math/big at 4000 bits, an exact
// reference of its own). It never writes NaN or Inf.
func TestFormatWholeRange(t *testing.T) {
	values := []float64{
		math.SmallestNonzeroFloat64, 2 * math.SmallestNonzeroFloat64, 1e-320, 1.23456e-315,
		math.Float64frombits(0x000fffffffffffff), // the largest subnormal
		0x1p-1022,                                // the smallest normal
		1e-300, 9.9996e-16, 1e-15, 999.96e12, 1e15, 300, 0.15, math.MaxFloat64, 9.999e307,
	}
	rng := rand.New(rand.NewPCG(17, 17))
	for range 2000 {
		// Uniform over the bit patterns of positive finite numbers: every
		// binary exponent equally often, the subnormals included.
		values = append(values, math.Float64frombits(1+rng.Uint64N(0x7ff0000000000000-1)))
	}
	for _, v := range values {
		for sig := 1; sig <= 6; sig++ {
			for _, x := range []float64{v, -v} {
				s := Format(x, "Hz", sig)
				if strings.Contains(s, "NaN") || strings.Contains(s, "Inf") || strings.Contains(s, "—") {
					t.Fatalf("Format(%v, Hz, %d) = %q", x, sig, s)
				}
				got, last := shown(t, s, "Hz", sig)
				diff := new(big.Float).SetPrec(4000).Sub(got, new(big.Float).SetPrec(4000).SetFloat64(x))
				diff.Abs(diff)
				// Half a unit, and the rounding of the shortest decimal (at
				// most half an ulp of x, far below it for sig ≤ 6).
				half := pow10(last)
				half.Mul(half, big.NewFloat(0.5000001))
				if diff.Cmp(half) > 0 {
					t.Errorf("Format(%v, Hz, %d) = %q: off by %s, more than half a unit", x, sig, s, diff.Text('g', 4))
				}
			}
		}
	}
}

// The smallest values are written from their exact value, not from their
// shortest decimal ("5e-324"), and a value whose rounding reaches the next
// decade moves to the next prefix or power.
func TestFormatTiny(t *testing.T) {
	for _, c := range []struct {
		v    float64
		sig  int
		want string
	}{
		{math.SmallestNonzeroFloat64, 4, "4.941×10^-324 Hz"},
		{math.SmallestNonzeroFloat64, 1, "5×10^-324 Hz"},
		{1e-320, 4, "1.000×10^-320 Hz"}, // 9.99989e-321 exactly
		{1e-320, 6, "9.99989×10^-321 Hz"},
		{2.2250738585072014e-308, 3, "2.23×10^-308 Hz"},
		{9.9996e-16, 3, "1.00 fHz"},
		{1e-16, 3, "1.00×10^-16 Hz"},
		{math.MaxFloat64, 4, "1.798×10^+308 Hz"},
		{math.MaxFloat64, 1, "2×10^+308 Hz"},
		{-1e-320, 2, "−1.0×10^-320 Hz"},
	} {
		if got := Format(c.v, "Hz", c.sig); got != c.want {
			t.Errorf("Format(%v, Hz, %d) = %q, want %q", c.v, c.sig, got, c.want)
		}
	}
}
