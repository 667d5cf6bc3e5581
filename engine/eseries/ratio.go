package eseries

import (
	"fmt"
	"math"
)

// BestRatio returns the series values num and den, each in [lo, hi], whose
// quotient num/den is closest to ratio, and the relative error
// relErr = |num/den/ratio − 1| of that choice.
//
// Many pairs can share the smallest error: for ratio 7.5 in E24,
// 750/100, 7.5k/1k, 75k/10k … are all exact. The tie goes to the pair whose
// geometric mean √(num·den) is nearest (in ratio) to the middle of the range,
// √(lo·hi), and if that too is equal, to the pair with the larger den. Pairs
// that differ by a whole number of decades have exactly equal errors, so the
// choice does not hang on rounding.
//
// The caller states the circuit's need as a ratio: for a non-inverting gain
// G = 1 + R2/R1, ask for ratio G − 1 and read R2 = num, R1 = den.
//
// BestRatio returns an error, naming the parameter, if ratio, lo or hi is not
// positive and finite, if lo > hi, or if no series value lies in [lo, hi].
// It takes time linear in the number of series values in the range.
func (s Series) BestRatio(ratio, lo, hi float64) (num, den, relErr float64, err error) {
	s.mustValid()
	switch {
	case !positiveFinite(ratio):
		return 0, 0, 0, fmt.Errorf("eseries: ratio %g must be positive and finite", ratio)
	case !positiveFinite(lo):
		return 0, 0, 0, fmt.Errorf("eseries: lower bound %g must be positive and finite", lo)
	case !positiveFinite(hi):
		return 0, 0, 0, fmt.Errorf("eseries: upper bound %g must be positive and finite", hi)
	case lo > hi:
		return 0, 0, 0, fmt.Errorf("eseries: lower bound %g is above upper bound %g", lo, hi)
	}
	c := s.span(lo, hi)
	if len(c) == 0 {
		return 0, 0, 0, fmt.Errorf("eseries: no %s value lies in [%g, %g]", s.Name, lo, hi)
	}

	mid := math.Log(lo) + math.Log(hi)
	offset := func(n, d member) float64 { // |log(num·den) − log(lo·hi)|
		return math.Abs(math.Log(n.v) + math.Log(d.v) - mid)
	}
	var (
		bn, bd  member
		bestErr float64
		bestOff float64 // offset(bn, bd), valid if offOK
		found   bool
		offOK   bool
	)
	consider := func(n, d member) {
		e := math.Abs(quotient(n, d)/ratio - 1)
		if found && e > bestErr {
			return
		}
		if found && e == bestErr {
			if !offOK {
				bestOff, offOK = offset(bn, bd), true
			}
			off := offset(n, d)
			if off > bestOff || off == bestOff && d.v <= bd.v {
				return
			}
			bn, bd, bestOff = n, d, off
			return
		}
		bn, bd, bestErr, found, offOK = n, d, e, true, false
	}
	// As den grows so does the wanted num, so the index j of the first value
	// at or above ratio·den only moves forward: the search is one pass.
	j := 0
	for _, d := range c {
		t := ratio * d.v
		for j < len(c) && c[j].v < t {
			j++
		}
		if j > 0 {
			consider(c[j-1], d)
		}
		if j < len(c) {
			consider(c[j], d)
		}
	}
	return bn.v, bd.v, bestErr, nil
}

// member is a series value m·10^e with m the table's integer mantissa.
type member struct {
	m, e int
	v    float64
}

// quotient returns a.v/b.v computed from the integer mantissas, so that pairs
// differing by whole decades give bit-identical quotients.
func quotient(a, b member) float64 {
	return float64(a.m) / float64(b.m) * math.Pow10(a.e-b.e)
}

// span returns the series values in [lo, hi], ascending.
func (s Series) span(lo, hi float64) []member {
	klo, khi := decade(lo), decade(hi)
	c := make([]member, 0, (khi-klo+1)*len(s.mant))
	for k := klo; k <= khi; k++ {
		e := k - s.digits
		for _, m := range s.mant {
			v := scaled(int(m), e)
			if v > hi {
				return c
			}
			if v >= lo {
				c = append(c, member{int(m), e, v})
			}
		}
	}
	return c
}

func positiveFinite(x float64) bool { return x > 0 && !math.IsInf(x, 1) }
