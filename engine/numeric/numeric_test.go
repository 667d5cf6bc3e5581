package numeric

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

func TestRelDiff(t *testing.T) {
	for _, c := range []struct {
		a, b complex128
		want float64
	}{
		{1, 1, 0},
		{0, 0, 0},
		{2, 1, 0.5},
		{1i, -1i, 2},
		{0, 3e-20, 3e-20}, // an exact zero against residue: absolute
		{4, 0, 4},
	} {
		if got := RelDiff(c.a, c.b); got != c.want {
			t.Errorf("RelDiff(%v, %v) = %g, want %g", c.a, c.b, got, c.want)
		}
	}
	if !math.IsNaN(RelDiff(cmplx.Inf(), 1)) || !math.IsNaN(RelDiff(1, cmplx.NaN())) {
		t.Error("RelDiff of a value that is not finite must be NaN")
	}
}

func TestWrap180(t *testing.T) {
	for in, want := range map[float64]float64{0: 0, 180: 180, -180: 180, 190: -170, -190: 170, 540: 180, 721: 1, -0.5: -0.5} {
		if got := Wrap180(in); got != want {
			t.Errorf("Wrap180(%g) = %g, want %g", in, got, want)
		}
	}
}

// Log agrees with the logarithm of the number's decimal form, taken where
// math.Log has no trouble (a mantissa in [1, 10) and a power of ten), from
// the smallest subnormal to the largest number; and a grid spaced by it
// starts and ends where it was asked to, on every platform.
func TestLogSubnormal(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	xs := []float64{math.SmallestNonzeroFloat64, 1e-320, math.Float64frombits(0x000fffffffffffff), 0x1p-1022, 1, math.MaxFloat64}
	for range 2000 {
		xs = append(xs, math.Float64frombits(1+rng.Uint64N(0x7ff0000000000000-1)))
	}
	for _, x := range xs {
		s := strconv.FormatFloat(x, 'e', -1, 64) // reads back as x exactly
		i := strings.IndexByte(s, 'e')
		m, _ := strconv.ParseFloat(s[:i], 64)
		e, _ := strconv.Atoi(s[i+1:])
		want := math.Log(m) + float64(e)*math.Ln10
		// The decimal form is x to within half an ulp, which for a
		// subnormal is a large part of it.
		tol := 1e-13 + math.Abs(math.Log1p(math.Nextafter(x, math.Inf(1))/x-1))
		if got := Log(x); math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
			t.Errorf("Log(%v) = %v, want %v", x, got, want)
		}
	}
	g := LogSpan(make([]float64, 5), 1e-320, 1e8)
	if g[0] != 1e-320 || math.Abs(g[4]/1e8-1) > 1e-13 || !(g[1] > g[0] && g[2] > g[1]) {
		t.Errorf("LogSpan from 1e-320: %v", g)
	}
}
