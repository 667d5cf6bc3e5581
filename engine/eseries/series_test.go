package eseries_test

import (
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"testing"

	"zport/engine/eseries"
)

// IEC 60063:2015 E24, as tabulated in REFERENCES.md §6 [found: several
// independent tables].
var refE24 = []float64{
	1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
	3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1,
}

// IEC 60063:2015 E96 mantissas ×100, as tabulated in REFERENCES.md §6 [found].
var refE96 = []int{
	100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130,
	133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169, 174,
	178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232,
	237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
	316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412,
	422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549,
	562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732,
	750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
}

func refE96Values() []float64 {
	v := make([]float64, len(refE96))
	for i, m := range refE96 {
		v[i] = float64(m) / 100 // one correctly rounded division: the literal m/100
	}
	return v
}

func everyNth(n int, v []float64) []float64 {
	var out []float64
	for i := 0; i < len(v); i += n {
		out = append(out, v[i])
	}
	return out
}

// formula returns round(10^digits·10^(i/n)) / 10^digits, the geometric
// series rounded to 1+digits significant figures.
func formula(n, i, digits int) float64 {
	scale := math.Pow10(digits)
	return math.Round(scale*math.Pow(10, float64(i)/float64(n))) / scale
}

func TestTables(t *testing.T) {
	for _, tc := range []struct {
		s      eseries.Series
		want   []float64
		tol    float64
		source string
	}{
		{eseries.E24, refE24, 0.05, "IEC 60063:2015 E24 as tabulated in REFERENCES.md §6 [found]"},
		{eseries.E12, everyNth(2, refE24), 0.10, "E12 is every second E24 value, REFERENCES.md §6 [found]"},
		{eseries.E6, everyNth(4, refE24), 0.20, "E6 is every fourth E24 value, REFERENCES.md §6 [found]"},
		{eseries.E96, refE96Values(), 0.01, "IEC 60063:2015 E96 as tabulated in REFERENCES.md §6 [found]"},
		{eseries.E48, everyNth(2, refE96Values()), 0.02, "E48 is every second E96 value, REFERENCES.md §6 [found]"},
	} {
		t.Run(tc.s.Name, func(t *testing.T) {
			if got := tc.s.Values(); !slices.Equal(got, tc.want) {
				t.Errorf("Values() = %v\nwant %v (%s)", got, tc.want, tc.source)
			}
			// Tolerances per series: REFERENCES.md §6 [found].
			if tc.s.Tolerance != tc.tol {
				t.Errorf("Tolerance = %g, want %g (REFERENCES.md §6)", tc.s.Tolerance, tc.tol)
			}
		})
	}
}

// REFERENCES.md §6 [found]: E96 is round(100·10^(i/96)) with no exception.
// This also checks the literal list above against its own description.
func TestE96IsFormula(t *testing.T) {
	v := eseries.E96.Values()
	for i := range 96 {
		if want := formula(96, i, 2); v[i] != want {
			t.Errorf("E96[%d] = %g, formula gives %g", i, v[i], want)
		}
	}
}

// REFERENCES.md §6 [found]: E192 is round(100·10^(i/192)) except index 185,
// where the standard has 9.20 and the formula 9.19.
func TestE192AgainstFormula(t *testing.T) {
	v := eseries.E192.Values()
	if len(v) != 192 {
		t.Fatalf("len(E192) = %d, want 192", len(v))
	}
	for i := range 192 {
		want := formula(192, i, 2)
		if i == 185 {
			if want != 9.19 {
				t.Fatalf("formula at 185 = %g, want 9.19 (REFERENCES.md §6)", want)
			}
			want = 9.20
		}
		if v[i] != want {
			t.Errorf("E192[%d] = %g, want %g", i, v[i], want)
		}
	}
	if w := everyNth(2, v); !slices.Equal(w, refE96Values()) {
		t.Errorf("every second E192 value = %v, want E96 %v", w, refE96Values())
	}
}

// REFERENCES.md §6 [found]: E24 departs from round(10^(i/24)) at exactly
// 2.7 3.0 3.3 3.6 3.9 4.3 4.7 8.2.
func TestE24DepartsFromFormula(t *testing.T) {
	var differ []float64
	for i, v := range eseries.E24.Values() {
		if v != formula(24, i, 1) {
			differ = append(differ, v)
		}
	}
	want := []float64{2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2}
	if !slices.Equal(differ, want) {
		t.Errorf("E24 departs from the formula at %v, want %v", differ, want)
	}
}

func TestByName(t *testing.T) {
	for _, tc := range []struct {
		name string
		want string
		ok   bool
	}{
		{"E6", "E6", true}, {"E12", "E12", true}, {"E24", "E24", true},
		{"e24", "E24", true}, {"E48", "E48", true}, {"e96", "E96", true},
		{"E192", "E192", true},
		{"E3", "", false}, {"E 24", "", false}, {"24", "", false}, {"", "", false},
	} {
		s, ok := eseries.ByName(tc.name)
		if ok != tc.ok || s.Name != tc.want {
			t.Errorf("ByName(%q) = %q, %t; want %q, %t", tc.name, s.Name, ok, tc.want, tc.ok)
		}
	}
	var names []string
	for _, s := range eseries.All() {
		names = append(names, s.Name)
	}
	if want := []string{"E6", "E12", "E24", "E48", "E96", "E192"}; !slices.Equal(names, want) {
		t.Errorf("All() names = %v, want %v", names, want)
	}
}

func TestValuesIsACopy(t *testing.T) {
	v := eseries.E24.Values()
	v[0] = 99
	if got := eseries.E24.Values()[0]; got != 1.0 {
		t.Errorf("after changing a returned slice, E24.Values()[0] = %g, want 1", got)
	}
}

// Expected values are series members from the tables above; which neighbour
// is nearer was worked by hand in ratio (common practice: the series are
// evenly spaced in ratio, so nearness is judged in ratio).
func TestNearest(t *testing.T) {
	for _, tc := range []struct {
		s       eseries.Series
		x, want float64
		lo, hi  float64
	}{
		{eseries.E24, 0.99, 1.0, 0.91, 1.0},               // decade edge from below
		{eseries.E24, 9.6, 10, 9.1, 10},                   // 10/9.6 < 9.6/9.1: next decade
		{eseries.E24, 9.5, 9.1, 9.1, 10},                  // √91 ≈ 9.54 is the midpoint
		{eseries.E24, 1, 1, 1, 1},                         // a member is its own nearest
		{eseries.E24, 4.6e-12, 4.7e-12, 4.3e-12, 4.7e-12}, // pF scale
		{eseries.E24, 1e-12, 1e-12, 1e-12, 1e-12},
		{eseries.E24, 0.99e-12, 1e-12, 0.91e-12, 1e-12},
		{eseries.E24, 8.2e-9, 8.2e-9, 8.2e-9, 8.2e-9},
		{eseries.E96, 1e6, 1e6, 1e6, 1e6}, // MΩ scale
		{eseries.E96, 1.234e6, 1.24e6, 1.21e6, 1.24e6},
		{eseries.E96, 4.99e6, 4.99e6, 4.99e6, 4.99e6},
		{eseries.E96, 5000, 4990, 4990, 5110},
		{eseries.E192, 9.19, 9.20, 9.09, 9.20}, // the standard's 9.20, not 9.19
		{eseries.E192, 9.9e3, 9.88e3, 9.88e3, 10e3},
		{eseries.E6, 3.0, 3.3, 2.2, 3.3},
		{eseries.E6, 8.2, 6.8, 6.8, 10}, // √68 ≈ 8.25
		{eseries.E6, 8.3, 10, 6.8, 10},
		{eseries.E12, 1e-15, 1e-15, 1e-15, 1e-15},
		{eseries.E12, 2.0e30, 2.2e30, 1.8e30, 2.2e30}, // beyond the exact powers of ten
	} {
		lo, hi := tc.s.Bracket(tc.x)
		if lo != tc.lo || hi != tc.hi {
			t.Errorf("%s.Bracket(%g) = %g, %g; want %g, %g", tc.s.Name, tc.x, lo, hi, tc.lo, tc.hi)
		}
		if got := tc.s.Nearest(tc.x); got != tc.want {
			t.Errorf("%s.Nearest(%g) = %g, want %g", tc.s.Name, tc.x, got, tc.want)
		}
	}
}

// members returns the series values in decades k0…k1, each parsed from its
// decimal so that the test does not share the package's arithmetic.
func members(s eseries.Series, k0, k1 int) []float64 {
	var v []float64
	for k := k0; k <= k1; k++ {
		for _, m := range s.Values() {
			f, err := strconv.ParseFloat(strconv.FormatFloat(m, 'f', -1, 64)+"e"+strconv.Itoa(k), 64)
			if err != nil {
				panic(err)
			}
			v = append(v, f)
		}
	}
	return v
}

// Nearest against a brute-force search in ratio over neighbouring decades,
// at seeded random points from 1e-13 to 1e7.
func TestNearestBruteForce(t *testing.T) {
	rnd := rand.New(rand.NewPCG(1, 1))
	for _, s := range eseries.All() {
		for range 2000 {
			x := math.Pow(10, -13+20*rnd.Float64())
			k := int(math.Floor(math.Log10(x)))
			best, bestD, second := 0.0, math.Inf(1), math.Inf(1)
			for _, v := range members(s, k-1, k+1) {
				d := math.Abs(math.Log(v / x))
				if d < bestD {
					best, bestD, second = v, d, bestD
				} else if d < second {
					second = d
				}
			}
			if second-bestD < 1e-12 {
				continue // too close to a midpoint to judge in float64
			}
			if got := s.Nearest(x); got != best {
				t.Errorf("%s.Nearest(%g) = %g, brute force %g", s.Name, x, got, best)
			}
			if lo, hi := s.Bracket(x); !(lo <= x && x <= hi) || (best != lo && best != hi) {
				t.Errorf("%s.Bracket(%g) = %g, %g; nearest is %g", s.Name, x, lo, hi, best)
			}
		}
	}
}

// Nearest's doc relies on this: for no two neighbours a < b (including the
// last value and the next decade's first) is a·b a perfect square in the
// table's integer units, so no x lies exactly midway in ratio.
func TestNoExactMidpoints(t *testing.T) {
	for _, s := range eseries.All() {
		scale := 10.0
		if len(s.Values()) > 24 {
			scale = 100
		}
		v := append(s.Values(), 10)
		for i := 1; i < len(v); i++ {
			p := int64(math.Round(v[i-1]*scale)) * int64(math.Round(v[i]*scale))
			if r := int64(math.Sqrt(float64(p))); r*r == p || (r+1)*(r+1) == p {
				t.Errorf("%s: %g·%g is a perfect square in units of 1/%g", s.Name, v[i-1], v[i], scale)
			}
		}
	}
}

// Values at the ends of float64's range must not crash: the decade search
// has to cope with Log10 being far off for subnormals.
func TestBracketExtremes(t *testing.T) {
	for _, s := range eseries.All() {
		for _, x := range []float64{math.MaxFloat64, 1e300, 1e-300, 0x1p-1022, 1e-310, math.SmallestNonzeroFloat64} {
			lo, hi := s.Bracket(x)
			if !(lo <= x && x <= hi) {
				t.Errorf("%s.Bracket(%g) = %g, %g; want lo ≤ x ≤ hi", s.Name, x, lo, hi)
			}
			if n := s.Nearest(x); n != lo && n != hi {
				t.Errorf("%s.Nearest(%g) = %g, not %g or %g", s.Name, x, n, lo, hi)
			}
		}
	}
}

func TestNearestPanics(t *testing.T) {
	for _, tc := range []struct {
		name string
		s    eseries.Series
		x    float64
	}{
		{"zero", eseries.E24, 0},
		{"negative", eseries.E24, -4.7},
		{"NaN", eseries.E24, math.NaN()},
		{"Inf", eseries.E24, math.Inf(1)},
		{"zero Series", eseries.Series{}, 1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Errorf("Nearest(%g) on %q did not panic", tc.x, tc.s.Name)
				}
			}()
			tc.s.Nearest(tc.x)
		})
	}
}

func BenchmarkNearestE192(b *testing.B) {
	b.ReportAllocs()
	x := 0.0
	for i := 0; b.Loop(); i++ {
		x += eseries.E192.Nearest(1234.5 + float64(i%1000))
	}
	_ = x
}
