package topology

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats"

	"zport/engine/feedback"
)

// The booster loop's margins are searched by the walk like the op-amp
// stages' extras: they must match a dense sweep (50 points a decade over
// the walk's span, crossings refined by feedback.Margins) at the stage's
// defaults and with a slow and a fast booster (invented values).
func TestBoosterLoopMatchesDenseSweep(t *testing.T) {
	st, _ := Lookup("boostedcascode")
	for _, params := range []map[string]string{nil, {"gbwb": "1M"}, {"gbwb": "1G"}} {
		v, err := st.Values(params)
		if err != nil {
			t.Fatal(err)
		}
		text := bcText(v, true)
		m, err := loopMargins(text, "A1", v.Kelvin())
		if err != nil {
			t.Fatal(err)
		}
		a, err := loopAnalyzer(text, "A1", v.Kelvin(), "", "")
		if err != nil {
			t.Fatal(err)
		}
		grid := floats.LogSpan(make([]float64, 701), walkLo, walkHi)
		T := make([]complex128, len(grid))
		for i, f := range grid {
			if T[i], err = a.ReturnRatio(f); err != nil {
				T[i] = cmplx.NaN()
			}
		}
		s := feedback.Margins(grid, T, a.ReturnRatio)
		if math.IsNaN(s.PhaseMargin) || math.Abs(m.PhaseMargin-s.PhaseMargin) > 1e-6 || math.Abs(m.Crossover-s.Crossover) > 1e-9*s.Crossover {
			t.Errorf("%v: walked PM %.12g° at %.12g Hz, swept %.12g° at %.12g Hz", params, m.PhaseMargin, m.Crossover, s.PhaseMargin, s.Crossover)
		}
	}
}
