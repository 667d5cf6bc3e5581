package noise_test

import (
	"math"
	"testing"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/mna"
	"zport/engine/noise"
)

// setup is a circuit ready for noise: its analyzer with the adjoint
// read-out of node out (to gnd), and its noise analysis at T kelvin,
// referred to the source named input ("" for none).
type setup struct {
	c *circuit.Circuit
	a *feedback.Analyzer
	n *noise.Analysis
}

func newSetup(t *testing.T, text, ref, out, input string, T float64) *setup {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	o, ok := c.Node(out)
	if !ok {
		t.Fatalf("no node %s", out)
	}
	var gain *feedback.Gain
	if input != "" {
		i, ok := c.PartIndex(input)
		if !ok {
			t.Fatalf("no source %s", input)
		}
		gain = &feedback.Gain{Source: i, OutA: o, SourceName: input, OutputName: out}
	}
	a, err := feedback.New(c, ref, nil, gain)
	if err != nil {
		t.Fatal(err)
	}
	a.Adjoint = []mna.Term{{I: mna.NodeVar(o), V: 1}}
	in := a.InputRHS()
	return &setup{c: c, a: a, n: noise.New(a.Sys, T, in)}
}

// density is the output density at f (V/√Hz), each source's power density
// by name, and the input's transfer.
func (s *setup) density(t *testing.T, f float64) (float64, map[string]float64, complex128) {
	t.Helper()
	z := make([]complex128, s.a.Sys.N)
	if err := s.a.AdjointAt(f, z); err != nil {
		t.Fatal(err)
	}
	parts := make([]float64, len(s.n.Sources))
	g := s.n.At(parts, z, f)
	by := map[string]float64{}
	total := 0.0
	for k, p := range parts {
		by[s.n.Sources[k].Name] = p
		total += p
	}
	return math.Sqrt(total), by, g
}

func (s *setup) band(t *testing.T, from, to float64) noise.Band {
	t.Helper()
	b, err := s.n.Band(s.a.AdjointAt, s.a.Sys.N, from, to)
	if err != nil {
		t.Fatal(err)
	}
	if !b.Converged {
		t.Errorf("band %g–%g Hz did not converge in %d evaluations (error %.2g of %.6g)", from, to, b.Evaluations, b.Error, b.Total)
	}
	return b
}

func rel(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

func within(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if d := rel(got, want); !(d <= tol) {
		t.Errorf("%s = %.12g, want %.12g (relative difference %.2g > %.0g)", what, got, want, d, tol)
	}
}
