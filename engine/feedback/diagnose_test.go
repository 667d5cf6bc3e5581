package feedback_test

import (
	"errors"
	"math/cmplx"
	"strings"
	"testing"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

// Singular circuits give an error naming the nodes or parts involved.
func TestSingularDiagnostics(t *testing.T) {
	cases := []struct {
		name, text string
		f          float64
		want       []string
	}{
		{"floating node", `
vcvs E1 out gnd sense=in,gnd gain=2
resistor R1 in gnd 1k
resistor R2 a b 1k
`, 1e3, []string{"nodes a, b float"}},
		{"current source only", `
vcvs E1 out gnd sense=in,gnd gain=2
resistor R1 in gnd 1k
isource I1 gnd x 1m
`, 1e3, []string{"node x floats"}},
		{"capacitors at DC", `
vcvs E1 out gnd sense=in,gnd gain=2
resistor R1 in gnd 1k
capacitor C1 in mid 1n
capacitor C2 mid out 1n
`, 0, []string{"at DC", "node mid", "C1, C2"}},
		{"voltage loop", `
vsource V1 a gnd 1
vcvs E1 a gnd sense=b,gnd gain=2
resistor R1 a b 1k
resistor R2 b gnd 1k
`, 1e3, []string{"E1, V1", "loop of voltage sources"}},
		{"inductor loop at DC", `
vsource V1 a gnd 1
inductor L1 a gnd 1m
vcvs E1 b gnd sense=a,gnd gain=1
resistor R1 b gnd 1k
`, 0, []string{"L1, V1", "inductors"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ci, err := circuit.Parse(c.text)
			if err != nil {
				t.Fatal(err)
			}
			a, err := feedback.New(ci, "E1", nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			_, err = a.At(c.f)
			var se *feedback.SingularError
			if !errors.As(err, &se) {
				t.Fatalf("err = %v, want a SingularError", err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("message %q lacks %q", err, w)
				}
			}
			if strings.Contains(err.Error(), "singular matrix") {
				t.Errorf("message %q says only \"singular matrix\"", err)
			}
		})
	}
}

// A port with no path at zero gain: the follower's input with rid absent.
// Z₀ is infinite, so the Blackman terms are null with a note; the direct
// solution is infinite too.
func TestPortWithoutPathAtZeroGain(t *testing.T) {
	a := analyzer(t, "vsource Vin in gnd 1\nopamp U1 in out out a0=100k\n", "U1",
		[][3]string{{"in", "in", "gnd"}, {"out", "out", "gnd"}}, nil)
	p, err := a.At(1e3)
	if err != nil {
		t.Fatal(err)
	}
	in := p.Ports[0]
	if !cmplx.IsNaN(in.Z0) || !cmplx.IsNaN(in.Z) || !cmplx.IsNaN(in.ZDirect) {
		t.Errorf("input: Z0 %v Z %v Zdirect %v; want all not finite", in.Z0, in.Z, in.ZDirect)
	}
	found := false
	for _, n := range p.Notes {
		found = found || strings.Contains(n, "port in") && strings.Contains(n, "Z₀ is infinite")
	}
	if !found {
		t.Errorf("no note explains the infinite Z₀: %q", p.Notes)
	}
	// With ro absent the output is an ideal source: Z₀ = 0 and Z = 0, while
	// T short is undefined (the short meets a 0 V source).
	if out := p.Ports[1]; out.Z0 != 0 || out.Z != 0 || out.ZDirect != 0 {
		t.Errorf("output: Z0 %v Z %v Zdirect %v; want 0", out.Z0, out.Z, out.ZDirect)
	}
}

// 1 + T open = 0: a vccs whose return ratio with the port open is exactly
// −1 makes the port impedance infinite; the admittance form answers.
func TestAdmittanceForm(t *testing.T) {
	// Node x: 1 kΩ to gnd, and G1 drawing gm·V(x) out of x with gm = −1 mS
	// (i.e. injecting): T open = gm·R = −1.
	// Vx is the port's driver, so the circuit itself is solvable; with the
	// driver removed the port is open and its impedance infinite.
	a := analyzer(t, "vsource Vx x gnd 0\nresistor R1 x gnd 1k\nvccs G1 x gnd sense=x,gnd gm=-1m\n", "G1",
		[][3]string{{"x", "x", "gnd"}}, nil)
	p, err := a.At(0)
	if err != nil {
		t.Fatal(err)
	}
	pr := p.Ports[0]
	near(t, "T open", pr.TOpen, -1, 1e-15)
	if !cmplx.IsNaN(pr.Z) || cmplx.Abs(pr.Y) > 1e-15 {
		t.Errorf("Z %v Y %v: want Z not finite and Y = 0", pr.Z, pr.Y)
	}
}
