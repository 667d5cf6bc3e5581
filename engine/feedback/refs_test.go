package feedback_test

import (
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

func analyzer(t *testing.T, text, ref string, ports [][3]string, gain *[3]string) *feedback.Analyzer {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	var ps []feedback.Port
	for _, p := range ports {
		a, _ := c.Node(p[1])
		b, _ := c.Node(p[2])
		ps = append(ps, feedback.Port{Name: p[0], A: a, B: b})
	}
	var g *feedback.Gain
	if gain != nil {
		src := -1
		for i, p := range c.Parts {
			if p.Name == gain[0] {
				src = i
			}
		}
		oa, _ := c.Node(gain[1])
		ob, _ := c.Node(gain[2])
		g = &feedback.Gain{Source: src, OutA: oa, OutB: ob, SourceName: gain[0], OutputName: gain[1]}
	}
	a, err := feedback.New(c, ref, ps, g)
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	return a
}

func near(t *testing.T, what string, got complex128, want float64, rel float64) {
	t.Helper()
	if d := cmplx.Abs(got-complex(want, 0)) / math.Abs(want); !(d <= rel) {
		t.Errorf("%s = %.12g%+.3gi, want %.12g (rel diff %.2g > %.0g)", what, real(got), imag(got), want, d, rel)
	}
}

// Non-inverting amplifier with rd, ro and finite a: S. Franco, "Design with
// Operational Amplifiers and Analog Integrated Circuits", 3rd ed., ch. 1;
// check values [derived] in REFERENCES.md §3.
func TestNonInvertingFranco(t *testing.T) {
	a := analyzer(t, `
vsource Vin in gnd 1
opamp U1 in fb out a0=150k rid=1M ro=50
resistor R1 fb gnd 2k
resistor R2 out fb 98k
port in in gnd
port out out gnd
`, "U1", [][3]string{{"in", "in", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out", "gnd"})
	p, err := a.At(0)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "A", p.Gain.G, 49.9832979, 1e-9)
	near(t, "Adirect", p.Gain.GDirect, 49.9832979, 1e-9)
	near(t, "Ri", p.Ports[0].Z, 2.99950271e9, 1e-9)
	near(t, "Ri z0", p.Ports[0].Z0, 1.00196002e6, 1e-9)
	near(t, "Ri Tsc", p.Ports[0].TShort, 2992.635125, 1e-9)
	if cmplx.Abs(p.Ports[0].TOpen) > 1e-12 {
		t.Errorf("Ri Toc = %v, want 0", p.Ports[0].TOpen)
	}
	near(t, "Ro", p.Ports[1].Z, 16.69375505e-3, 1e-9)
	near(t, "Ro direct", p.Ports[1].ZDirect, 16.69375505e-3, 1e-9)
	near(t, "Ro z0", p.Ports[1].Z0, 49.9750115, 1e-9)
	near(t, "Ro Toc", p.Ports[1].TOpen, 2992.635125, 1e-9)
	t.Logf("%+v", p)
}
