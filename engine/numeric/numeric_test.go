package numeric

import (
	"math"
	"math/cmplx"
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
