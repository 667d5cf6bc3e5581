package aids_test

import (
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/aids"
	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/topology"
)

// circuitModel builds a model of circuit text with every part's number as
// a parameter, the named ports (`port` lines) and, when src is not empty,
// the gain from src to node out.
func circuitModel(t testing.TB, text, ref string, ports []string, src, out string, f float64) *aids.Model {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	m := &aids.Model{Circuit: c, Reference: ref, Frequency: f, Params: aids.CircuitParams(c)}
	for _, name := range ports {
		p, ok := c.Port(name)
		if !ok {
			t.Fatalf("no port %q", name)
		}
		m.Ports = append(m.Ports, feedback.Port{Name: p.Name, A: p.A, B: p.B})
	}
	if src != "" {
		m.Gain = gainOf(t, c, src, out)
	}
	return m
}

func gainOf(t testing.TB, c *circuit.Circuit, src, out string) *feedback.Gain {
	t.Helper()
	i, ok := c.PartIndex(src)
	if !ok {
		t.Fatalf("no source %q", src)
	}
	o, ok := c.Node(out)
	if !ok {
		t.Fatalf("no node %q", out)
	}
	return &feedback.Gain{Source: i, OutA: o, OutB: circuit.Gnd, SourceName: src, OutputName: out}
}

// stageModel builds the model of a catalog stage at params over its
// defaults, with all its ports and its gain, as the api does.
func stageModel(t testing.TB, id string, params map[string]string, f float64) *aids.Model {
	t.Helper()
	st, ok := topology.Lookup(id)
	if !ok {
		t.Fatalf("no stage %q", id)
	}
	v, err := st.Values(params)
	if err != nil {
		t.Fatal(err)
	}
	c, err := circuit.Parse(st.Circuit(v))
	if err != nil {
		t.Fatal(err)
	}
	m := &aids.Model{Circuit: c, Reference: st.Reference, Frequency: f}
	m.Params, m.Rebuild = aids.StageParams(st, v, c)
	for _, pd := range st.Ports {
		p, ok := c.Port(pd.Name)
		if !ok {
			t.Fatalf("stage %s: no port %q", id, pd.Name)
		}
		m.Ports = append(m.Ports, feedback.Port{Name: p.Name, A: p.A, B: p.B})
	}
	if g := st.Gain; g != nil {
		m.Gain = gainOf(t, c, g.Source, g.Output)
	}
	return m
}

// spreadsOf gives every Default passive parameter of m tolerance tol and
// the named op-amp parameters (a0, gbw …) a min–typ spread at the given
// fraction of typ.
func spreadsOf(m *aids.Model, tol float64, ampMin map[string]float64) []aids.Spread {
	var s []aids.Spread
	for j, p := range m.Params {
		switch {
		case p.Class == aids.Passive && p.Default:
			s = append(s, aids.Tolerance(j, p.Nominal, tol))
		case p.Class == aids.AmpSpread:
			if frac, ok := ampMin[p.Name]; ok {
				s = append(s, aids.MinTyp(j, frac*p.Nominal, p.Nominal))
			}
		}
	}
	return s
}

// analyzeText is an independent evaluation for checks: circuit text
// analyzed by the engine directly, Z of the named port and the gain.
func analyzeText(t testing.TB, text, ref, port string, f float64, src, out string) (z, g complex128) {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	p, ok := c.Port(port)
	if !ok {
		t.Fatalf("no port %q", port)
	}
	var gain *feedback.Gain
	if src != "" {
		gain = gainOf(t, c, src, out)
	}
	a, err := feedback.New(c, ref, []feedback.Port{{Name: p.Name, A: p.A, B: p.B}}, gain)
	if err != nil {
		t.Fatal(err)
	}
	pt, err := a.At(f)
	if err != nil {
		t.Fatal(err)
	}
	g = cmplx.NaN()
	if pt.Gain != nil {
		g = pt.Gain.G
	}
	return pt.Ports[0].Z, g
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got/want - 1)
}

func quantityIndex(t testing.TB, qs []aids.Quantity, id string) int {
	t.Helper()
	for i, q := range qs {
		if q.ID == id {
			return i
		}
	}
	t.Fatalf("no quantity %q", id)
	return -1
}

// stageText returns a generator of stage id's circuit text for parameter
// values x of its model: the topology's own generator, not the aids' path.
func stageText(t testing.TB, id string) func(x []float64, m *aids.Model) string {
	t.Helper()
	st, _ := topology.Lookup(id)
	v, err := st.Values(nil)
	if err != nil {
		t.Fatal(err)
	}
	return func(x []float64, m *aids.Model) string {
		w := topology.Values{}
		for k, val := range v {
			w[k] = val
		}
		for j, p := range m.Params {
			w[p.Name] = x[j]
		}
		return st.Circuit(w)
	}
}
