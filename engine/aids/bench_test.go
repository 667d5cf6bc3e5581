package aids_test

import (
	"testing"

	"zport/engine/aids"
	"zport/engine/circuit"
)

// benchMC times a whole study as a page waits for it: the nominal
// analysis (with the crossover search grid), optional corners, and the
// trials.
func benchMC(b *testing.B, m *aids.Model, spreads []aids.Spread, trials int, corners bool) {
	b.ReportAllocs()
	for b.Loop() {
		mc, err := aids.NewMonteCarlo(m, spreads, aids.Options{Seed: 1, Trials: trials, Corners: corners})
		if err != nil {
			b.Fatal(err)
		}
		mc.Step(mc.Total())
		if _, err := mc.Result(0, nil); err != nil {
			b.Fatal(err)
		}
	}
}

func invertingSpreads(b *testing.B) (*aids.Model, []aids.Spread) {
	m := stageModel(b, "inverting", nil, 1e3)
	return m, spreadsOf(m, 0.01, map[string]float64{"a0": 0.5, "gbw": 0.7})
}

// BenchmarkMonteCarlo2000Inverting: the catalog's inverting stage (three
// ports, gain, phase margin), 1 % network and a0/gbw spreads.
func BenchmarkMonteCarlo2000Inverting(b *testing.B) {
	m, s := invertingSpreads(b)
	benchMC(b, m, s, 2000, false)
}

// BenchmarkMonteCarlo2000InvertingCorners adds the 2⁵ = 32 corners.
func BenchmarkMonteCarlo2000InvertingCorners(b *testing.B) {
	m, s := invertingSpreads(b)
	benchMC(b, m, s, 2000, true)
}

// BenchmarkMonteCarlo2000InvertingRebuild forces the slow path that
// regenerates and parses the stage's text for every trial.
func BenchmarkMonteCarlo2000InvertingRebuild(b *testing.B) {
	m, s := invertingSpreads(b)
	text := stageText(b, "inverting")
	m.Rebuild = func(x []float64) (*circuit.Circuit, error) { return circuit.Parse(text(x, m)) }
	benchMC(b, m, s, 2000, false)
}

// BenchmarkMonteCarlo2000Howland: circuit text, one port, no gain, no
// crossover search needed beyond the nominal one (a0 flat).
func BenchmarkMonteCarlo2000Howland(b *testing.B) {
	m := circuitModel(b, howland, "U1", []string{"out"}, "", "", 0)
	benchMC(b, m, spreadsOf(m, 0.01, nil), 2000, true)
}

// BenchmarkMonteCarlo2000ShuntFeedback: a transistor stage whose
// parameters need the rebuild path and whose loop crosses unity twice.
func BenchmarkMonteCarlo2000ShuntFeedback(b *testing.B) {
	m := stageModel(b, "shuntfeedback", nil, 1e3)
	benchMC(b, m, spreadsOf(m, 0.01, nil), 2000, false)
}

// BenchmarkSensitivityInverting: every parameter (13) of the inverting
// stage, three ports, gain and phase margin: 6 evaluations per parameter.
func BenchmarkSensitivityInverting(b *testing.B) {
	m := stageModel(b, "inverting", nil, 1e3)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := aids.Sensitivities(m, nil, 0); err != nil {
			b.Fatal(err)
		}
	}
}
