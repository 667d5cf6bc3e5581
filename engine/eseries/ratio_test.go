package eseries_test

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"zport/engine/eseries"
)

// bruteRatio tries every pair of series values in [lo, hi] and returns the
// smallest relative error |num/den/ratio − 1| and the set of values seen.
func bruteRatio(s eseries.Series, ratio, lo, hi float64) (best float64, in map[float64]bool) {
	k0 := int(math.Floor(math.Log10(lo))) - 1
	k1 := int(math.Floor(math.Log10(hi))) + 1
	var v []float64
	in = map[float64]bool{}
	for _, x := range members(s, k0, k1) {
		if lo <= x && x <= hi {
			v = append(v, x)
			in[x] = true
		}
	}
	best = math.Inf(1)
	for _, n := range v {
		for _, d := range v {
			best = math.Min(best, math.Abs(n/d/ratio-1))
		}
	}
	return best, in
}

// checkOptimal holds one BestRatio answer against the brute-force optimum.
// The two compute the quotient by different float64 paths, so they may differ
// by a few units in the last place.
func checkOptimal(t *testing.T, s eseries.Series, ratio, lo, hi float64) (num, den, relErr float64) {
	t.Helper()
	num, den, relErr, err := s.BestRatio(ratio, lo, hi)
	if err != nil {
		t.Fatalf("%s.BestRatio(%g, %g, %g): %v", s.Name, ratio, lo, hi, err)
	}
	best, in := bruteRatio(s, ratio, lo, hi)
	ulps := 1e-15 * (1 + best) // the error can be large when the ratio is out of reach
	if !in[num] || !in[den] {
		t.Errorf("%s.BestRatio(%g, %g, %g) = %g/%g: not both series values in range", s.Name, ratio, lo, hi, num, den)
	}
	if got := math.Abs(num/den/ratio - 1); math.Abs(got-relErr) > ulps {
		t.Errorf("%s.BestRatio(%g, %g, %g) = %g/%g reports relErr %g, the pair has %g", s.Name, ratio, lo, hi, num, den, relErr, got)
	}
	if relErr > best+ulps {
		t.Errorf("%s.BestRatio(%g, %g, %g) = %g/%g with relErr %g; brute force finds %g", s.Name, ratio, lo, hi, num, den, relErr, best)
	}
	return num, den, relErr
}

// Exact pairs: 7.5, 1.0, 3.3, 3.6, 2.2 and 1.5 are E24 values and 4.99, 1.00
// E96 values (REFERENCES.md §6 [found]); the pair chosen among the exact ones
// is the documented tie rule.
func TestBestRatioExact(t *testing.T) {
	for _, tc := range []struct {
		s                eseries.Series
		ratio, lo, hi    float64
		wantNum, wantDen float64
	}{
		{eseries.E24, 7.5, 1e3, 10e3, 7.5e3, 1e3},          // the only exact pair in range
		{eseries.E24, 7.5, 100, 1e6, 27e3, 3.6e3},          // 7.5k/1k, 12k/1.6k, 27k/3.6k … all exact; 27k·3.6k is nearest 10k²
		{eseries.E24, 10, 1e3, 100e3, 33e3, 3.3e3},         // gain 11 = 1 + 10: centred on √(1k·100k)
		{eseries.E24, 1, 1e3, 1e3, 1e3, 1e3},               // a range of one value
		{eseries.E24, 1.5 / 2.2, 1, 10, 1.5, 2.2},          // below 1
		{eseries.E96, 4.99, 1e-12, 1e-11, 4.99e-12, 1e-12}, // pF scale
	} {
		num, den, relErr := checkOptimal(t, tc.s, tc.ratio, tc.lo, tc.hi)
		if num != tc.wantNum || den != tc.wantDen || relErr != 0 {
			t.Errorf("%s.BestRatio(%g, %g, %g) = %g/%g (relErr %g), want %g/%g exactly",
				tc.s.Name, tc.ratio, tc.lo, tc.hi, num, den, relErr, tc.wantNum, tc.wantDen)
		}
	}
}

// A ratio with no exact E12 pair: the answer must still be the best of all
// pairs (brute force), and its error must not be zero.
func TestBestRatioNoExactPair(t *testing.T) {
	for _, ratio := range []float64{2, math.Pi, 0.3, 6.5} {
		_, _, relErr := checkOptimal(t, eseries.E12, ratio, 100, 1e6)
		if relErr == 0 {
			t.Errorf("E12.BestRatio(%g) found an exact pair; the E12 table has none", ratio)
		}
	}
}

// Seeded random ratios and ranges, every series, against brute force.
func TestBestRatioBruteForce(t *testing.T) {
	rnd := rand.New(rand.NewPCG(1, 1))
	for _, s := range eseries.All() {
		cases := 40
		if len(s.Values()) == 192 {
			cases = 8 // brute force over ~600² pairs each
		}
		for range cases {
			ratio := math.Pow(10, -3+6*rnd.Float64())
			lo := math.Pow(10, -1+3*rnd.Float64())
			hi := lo * math.Pow(10, 0.5+2.5*rnd.Float64())
			checkOptimal(t, s, ratio, lo, hi)
		}
	}
}

// A ratio outside what the range can reach gets the extreme pair.
func TestBestRatioOutOfReach(t *testing.T) {
	num, den, _ := checkOptimal(t, eseries.E24, 1e6, 1e3, 10e3)
	if num != 10e3 || den != 1e3 {
		t.Errorf("E24.BestRatio(1e6, 1k, 10k) = %g/%g, want 10k/1k", num, den)
	}
}

func TestBestRatioErrors(t *testing.T) {
	for _, tc := range []struct {
		name          string
		ratio, lo, hi float64
		want          string
	}{
		{"zero ratio", 0, 1, 10, "ratio 0 must be positive"},
		{"negative ratio", -2, 1, 10, "ratio -2 must be positive"},
		{"NaN ratio", math.NaN(), 1, 10, "ratio NaN must be positive"},
		{"infinite ratio", math.Inf(1), 1, 10, "ratio +Inf must be positive"},
		{"zero lower bound", 2, 0, 10, "lower bound 0 must be positive"},
		{"infinite upper bound", 2, 1, math.Inf(1), "upper bound +Inf must be positive"},
		{"bounds swapped", 2, 10, 1, "lower bound 10 is above upper bound 1"},
		{"no value in range", 2, 1.05, 1.06, "no E24 value lies in [1.05, 1.06]"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, _, err := eseries.E24.BestRatio(tc.ratio, tc.lo, tc.hi)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("BestRatio(%g, %g, %g) error = %v, want one containing %q", tc.ratio, tc.lo, tc.hi, err, tc.want)
			}
		})
	}
}

func benchmarkBestRatio(b *testing.B, s eseries.Series) {
	b.ReportAllocs()
	// 100 Ω … 1 MΩ is four decades; the ratios have no exact pair.
	ratios := []float64{math.Pi, 6.37, 0.0421, 17.9}
	for i := 0; b.Loop(); i++ {
		if _, _, _, err := s.BestRatio(ratios[i%len(ratios)], 100, 1e6); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkBestRatioE24Decades4(b *testing.B)  { benchmarkBestRatio(b, eseries.E24) }
func BenchmarkBestRatioE96Decades4(b *testing.B)  { benchmarkBestRatio(b, eseries.E96) }
func BenchmarkBestRatioE192Decades4(b *testing.B) { benchmarkBestRatio(b, eseries.E192) }
