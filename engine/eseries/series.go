package eseries

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Series is one IEC 60063 preferred number series. Use the package variables
// E6 … E192 or ByName; the zero Series holds no values and its methods panic.
type Series struct {
	// Name is the series' name as the standard writes it, "E24".
	Name string

	// Tolerance is the tolerance customarily paired with the series, as a
	// fraction: 0.05 for E24's ±5 %.
	Tolerance float64

	// mant holds the mantissas scaled to integers, 10…91 for E24 and
	// 100…976 for E96, so that the tables are exact.
	mant []int16

	// digits is the number of decimals in a mantissa: 1 for the two-digit
	// series, 2 for the three-digit ones. mant[i] / 10^digits is in [1, 10).
	digits int
}

// IEC 60063 tables, scaled to integers. Two tables are enough: E6 and E12
// are every fourth and second E24 value, E48 and E96 every fourth and second
// E192 value.
var (
	e24 = []int16{
		10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
		33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
	}
	// e192[185] is 920 as the standard has it; round(100·10^(185/192)) is 919.
	e192 = []int16{
		100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120,
		121, 123, 124, 126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145,
		147, 149, 150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176,
		178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213,
		215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258,
		261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312,
		316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379,
		383, 388, 392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459,
		464, 470, 475, 481, 487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556,
		562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673,
		681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768, 777, 787, 796, 806, 816,
		825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965, 976, 988,
	}
)

// series lists every series, coarse to fine. ByName and All read it, so a
// caller who changes an exported variable changes only that copy.
var series = [...]Series{
	{Name: "E6", Tolerance: 0.20, mant: every(4, e24), digits: 1},
	{Name: "E12", Tolerance: 0.10, mant: every(2, e24), digits: 1},
	{Name: "E24", Tolerance: 0.05, mant: e24, digits: 1},
	{Name: "E48", Tolerance: 0.02, mant: every(4, e192), digits: 2},
	{Name: "E96", Tolerance: 0.01, mant: every(2, e192), digits: 2},
	{Name: "E192", Tolerance: 0.005, mant: e192, digits: 2},
}

// The IEC 60063 series.
var (
	E6   = series[0]
	E12  = series[1]
	E24  = series[2]
	E48  = series[3]
	E96  = series[4]
	E192 = series[5]
)

func every(step int, m []int16) []int16 {
	out := make([]int16, 0, len(m)/step)
	for i := 0; i < len(m); i += step {
		out = append(out, m[i])
	}
	return out
}

// ByName returns the series with the given name, compared without regard to
// case ("E24", "e24"). ok is false for any other name.
func ByName(name string) (s Series, ok bool) {
	for _, s := range series {
		if strings.EqualFold(s.Name, name) {
			return s, true
		}
	}
	return Series{}, false
}

// All returns every series, from E6 to E192.
func All() []Series {
	return append([]Series(nil), series[:]...)
}

// Values returns the series' mantissas, ascending, in [1, 10): for E24,
// 1.0, 1.1, … 9.1. Each is the float64 nearest the decimal mantissa. The slice
// is the caller's.
func (s Series) Values() []float64 {
	s.mustValid()
	v := make([]float64, len(s.mant))
	for i, m := range s.mant {
		v[i] = scaled(int(m), -s.digits)
	}
	return v
}

// Bracket returns the series values, at whatever decade, nearest to x from
// below and above: lo ≤ x ≤ hi with no series value between them. When x is a
// series value, lo == hi == x. Each value is the float64 nearest the decimal
// it stands for, so E24.Bracket(4.6e-12) gives lo == 4.3e-12, hi == 4.7e-12
// exactly as those literals. Next to the ends of float64's range hi may be
// +Inf, and below the normal range values round to the nearest subnormal.
//
// Bracket panics if x is not positive and finite.
func (s Series) Bracket(x float64) (lo, hi float64) {
	s.mustValid()
	if !(x > 0) || math.IsInf(x, 1) {
		panic(fmt.Sprintf("eseries: %s.Bracket(%g): value must be positive and finite", s.Name, x))
	}
	k := decade(x)
	n := len(s.mant)
	// The first value of decade k is 10^k ≤ x, so i ≥ 1.
	i := sort.Search(n, func(i int) bool { return s.at(i, k) > x })
	lo = s.at(i-1, k)
	if lo == x {
		return x, x
	}
	if i < n {
		return lo, s.at(i, k)
	}
	return lo, s.at(0, k+1)
}

// Nearest returns the series value nearest to x in ratio: lo from Bracket if
// x/lo ≤ hi/x, otherwise hi. Two neighbouring series values are never exactly
// equidistant from any x (no product of neighbours is a perfect square), so
// the rule "a tie goes to the lower value" only settles rounding.
//
// Nearest panics if x is not positive and finite.
func (s Series) Nearest(x float64) float64 {
	lo, hi := s.Bracket(x)
	if x/lo <= hi/x {
		return lo
	}
	return hi
}

func (s Series) mustValid() {
	if len(s.mant) == 0 {
		panic("eseries: zero Series; use E6 … E192 or ByName")
	}
}

// at returns the i-th value of decade k, the decade [10^k, 10^(k+1)).
func (s Series) at(i, k int) float64 {
	return scaled(int(s.mant[i]), k-s.digits)
}

// decade returns k with 10^k ≤ x < 10^(k+1), for x positive and finite.
func decade(x float64) int {
	k := int(math.Floor(math.Log10(x)))
	// Log10 can be off by one next to a power of ten, and by more for
	// subnormal x. Outside float64's range scaled gives 0 or +Inf, which
	// ends both loops.
	for x < scaled(1, k) {
		k--
	}
	for x >= scaled(1, k+1) {
		k++
	}
	return k
}

// pow10 holds the powers of ten that float64 represents exactly.
var pow10 = [...]float64{
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
}

// scaled returns the float64 nearest to m·10^e. With both factors exact a
// single multiplication or division rounds correctly; outside that range
// strconv does the rounding.
func scaled(m, e int) float64 {
	switch {
	case e >= 0 && e < len(pow10):
		return float64(m) * pow10[e]
	case e < 0 && -e < len(pow10):
		return float64(m) / pow10[-e]
	}
	f, _ := strconv.ParseFloat(strconv.Itoa(m)+"e"+strconv.Itoa(e), 64)
	return f // ±Inf or 0 beyond float64's range, as ParseFloat gives
}
