package aids

import (
	"math"
	"math/rand/v2"
	"testing"

	"zport/engine/circuit"
	"zport/engine/topology"
)

func stage(t testing.TB, id string) *Model {
	t.Helper()
	st, _ := topology.Lookup(id)
	v, err := st.Values(nil)
	if err != nil {
		t.Fatal(err)
	}
	c, err := circuit.Parse(st.Circuit(v))
	if err != nil {
		t.Fatal(err)
	}
	m := &Model{Circuit: c, Reference: st.Reference, Frequency: st.Frequency}
	m.Params, m.Rebuild = StageParams(st, v, c)
	return m
}

// TestSecantMatchesSweep: the fast crossover search gives the phase margin
// and crossover that the sweep with feedback.Margins gives, for seeded
// variants within 10 % of the defaults — a stage with one crossover and
// one with two.
func TestSecantMatchesSweep(t *testing.T) {
	for _, id := range []string{"inverting", "capload", "shuntfeedback"} {
		if _, ok := topology.Lookup(id); !ok {
			continue
		}
		m := stage(t, id)
		ev, _, _, err := nominal(m)
		if err != nil {
			t.Fatal(err)
		}
		if ev.loop == nil {
			t.Fatalf("%s: no crossover", id)
		}
		rng := rand.New(rand.NewPCG(4, 4))
		for trial := range 20 {
			x := m.Nominal()
			for j := range x {
				x[j] *= 1 + 0.1*(2*rng.Float64()-1)
			}
			a, err := ev.analyzer(x)
			if err != nil {
				t.Fatal(err)
			}
			pm1, fc1, ok := ev.loop.searched(a)
			pm2, fc2 := ev.loop.sweep(a)
			if !ok {
				t.Errorf("%s trial %d: the secant search failed (sweep: %g° at %g Hz)", id, trial, pm2, fc2)
				continue
			}
			if math.Abs(pm1-pm2) > 1e-7 || math.Abs(fc1/fc2-1) > 1e-9 {
				t.Errorf("%s trial %d: secant %.10g° at %.10g Hz, sweep %.10g° at %.10g Hz", id, trial, pm1, fc1, pm2, fc2)
			}
		}
	}
}

func benchLoop(b *testing.B, fast bool) {
	m := stage(b, "inverting")
	ev, _, _, err := nominal(m)
	if err != nil {
		b.Fatal(err)
	}
	x := m.Nominal()
	x[0] *= 1.01
	a, err := ev.analyzer(x)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if fast {
			if _, _, ok := ev.loop.searched(a); !ok {
				b.Fatal("search failed")
			}
		} else {
			ev.loop.sweep(a)
		}
	}
}

// BenchmarkCrossoverSecant and BenchmarkCrossoverSweep200 time one
// variant's phase margin by the two paths (inverting stage).
func BenchmarkCrossoverSecant(b *testing.B)   { benchLoop(b, true) }
func BenchmarkCrossoverSweep200(b *testing.B) { benchLoop(b, false) }

// BenchmarkEval times one trial's analysis (analyzer, spot point, phase
// margin) of the inverting stage.
func BenchmarkEvalInverting(b *testing.B) {
	m := stage(b, "inverting")
	ev, s, _, err := nominal(m)
	if err != nil {
		b.Fatal(err)
	}
	x := m.Nominal()
	b.ReportAllocs()
	for b.Loop() {
		if err := ev.eval(x, &s); err != nil {
			b.Fatal(err)
		}
	}
}
