package aids_test

import (
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/aids"
	"zport/engine/topology"
)

// TestStageParams: for every catalog stage, a variant evaluated through
// the aids (written into the circuit, or rebuilt where a parameter is not
// one number of it) equals the stage's own generator's text analyzed by the
// engine, for seeded random values within 5 % of the defaults.
func TestStageParams(t *testing.T) {
	for _, st := range topology.Catalog() {
		t.Run(st.ID, func(t *testing.T) {
			m := stageModel(t, st.ID, nil, st.Frequency)
			var spreads []aids.Spread
			for j, p := range m.Params {
				if p.Nominal > 0 {
					spreads = append(spreads, aids.Tolerance(j, p.Nominal, 0.05))
				}
			}
			mc, err := aids.NewMonteCarlo(m, spreads, aids.Options{Seed: 11, Trials: 4})
			if err != nil {
				t.Fatal(err)
			}
			mc.Step(4)
			text := stageText(t, st.ID)
			qs := mc.Quantities()
			for i := range 4 {
				x := mc.Draws(i)
				tx := text(x, m)
				for _, port := range m.Ports {
					z, _ := analyzeText(t, tx, m.Reference, port.Name, m.Frequency, "", "")
					got := mc.Samples(quantityIndex(t, qs, "z:"+port.Name))[i]
					if e := relErr(got, cmplx.Abs(z)); !(e < 1e-12) && !(math.IsNaN(got) && !finiteC(z)) {
						t.Errorf("trial %d, port %s: |Z| %g through the aids, %g from the text (rebuild %v)", i, port.Name, got, cmplx.Abs(z), m.Rebuild != nil)
					}
				}
			}
		})
	}
}

func finiteC(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }
