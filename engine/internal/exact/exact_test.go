package exact

import (
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/circuit"
)

func parse(t *testing.T, text string) *circuit.Circuit {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func node(t *testing.T, c *circuit.Circuit, name string) int {
	t.Helper()
	n, ok := c.Node(name)
	if !ok {
		t.Fatalf("no node %s", name)
	}
	return n
}

func part(t *testing.T, c *circuit.Circuit, name string) int {
	t.Helper()
	i, ok := c.PartIndex(name)
	if !ok {
		t.Fatalf("no part %s", name)
	}
	return i
}

func near(t *testing.T, what string, got *Complex, want complex128, tol float64) {
	t.Helper()
	if got == nil {
		t.Errorf("%s: undefined, want %v", what, want)
		return
	}
	g := got.Complex128()
	d := cmplx.Abs(g - want)
	if want != 0 {
		d /= cmplx.Abs(want)
	}
	if !(d <= tol) {
		t.Errorf("%s = %.12g, want %.12g (difference %.2g)", what, g, want, d)
	}
}

// Franco's exact op-amp stages at DC, against the check values of
// REFERENCES.md §3 [derived: a 50-digit nodal solution agreeing with
// Franco's formulas, "Design with Operational Amplifiers", 3rd ed., ch. 1],
// which carry ten digits.
func TestFrancoStages(t *testing.T) {
	// Non-inverting: rd = 1 MΩ, ro = 50 Ω, a = 150 000, R1 = 2 kΩ, R2 = 98 kΩ.
	c := parse(t, "vsource Vin in gnd 1\nopamp U1 in fb out a0=150k rid=1M ro=50\nresistor R1 fb gnd 2k\nresistor R2 out fb 98k\n")
	u1, in, out := part(t, c, "U1"), node(t, c, "in"), node(t, c, "out")
	r := Analyze(c, u1, 0, []Port{{out, circuit.Gnd}, {in, circuit.Gnd}}, &Gain{Source: part(t, c, "Vin"), OutA: out})
	near(t, "A", r.Gain.G, 49.9832979, 1e-9)
	near(t, "Ro Z0", r.Ports[0].Z0, 49.9750115, 1e-9)
	near(t, "Ro T_sc", r.Ports[0].TShort, 0, 1e-30)
	near(t, "Ro T_oc", r.Ports[0].TOpen, 2992.635125, 1e-9)
	near(t, "Ro", r.Ports[0].Z, 16.69375505e-3, 1e-9)
	near(t, "Ro by Blackman", r.Ports[0].Blackman(), 16.69375505e-3, 1e-9)
	near(t, "Ri Z0", r.Ports[1].Z0, 1.00196002e6, 1e-9)
	near(t, "Ri T_sc", r.Ports[1].TShort, 2992.635125, 1e-9)
	near(t, "Ri T_oc", r.Ports[1].TOpen, 0, 1e-30)
	near(t, "Ri", r.Ports[1].Z, 2.99950271e9, 1e-9)
	// The ideal gain of the asymptotic model: 1 + R2/R1 (the nullor).
	near(t, "G∞", r.Gain.GInf, 50, 1e-60)

	// Inverting: R1 = 10 kΩ from the source, R2 = 47 kΩ.
	c = parse(t, "vsource Vin src gnd 1\nresistor R1 src n 10k\nopamp U1 gnd n out a0=150k rid=1M ro=50\nresistor R2 out n 47k\n")
	u1, out = part(t, c, "U1"), node(t, c, "out")
	src := node(t, c, "src")
	r = Analyze(c, u1, 0, []Port{{src, circuit.Gnd}, {out, circuit.Gnd}, {node(t, c, "n"), circuit.Gnd}}, &Gain{Source: part(t, c, "Vin"), OutA: out})
	near(t, "A", r.Gain.G, -4.699819743, 1e-9)
	near(t, "Ri Z0", r.Ports[0].Z0, 54.93577193e3, 1e-9)
	near(t, "Ri T_sc", r.Ports[0].TShort, 26077.65927, 1e-9)
	near(t, "Ri T_oc", r.Ports[0].TOpen, 143259.6342, 1e-9)
	near(t, "Ri", r.Ports[0].Z, 10.00031366e3, 1e-9)
	near(t, "Ro", r.Ports[1].Z, 1.915593209e-3, 1e-9)
	near(t, "summing node", r.Ports[2].Z, 0.313654639, 1e-9)

	// Follower: Ri = rd(1+a) + ro … exactly, with ro behind the output.
	c = parse(t, "vsource Vin in gnd 1\nopamp U1 in out out a0=150k rid=1M ro=50\n")
	u1, in = part(t, c, "U1"), node(t, c, "in")
	r = Analyze(c, u1, 0, []Port{{in, circuit.Gnd}}, nil)
	near(t, "follower Ri", r.Ports[0].Z, 150.00100005e9, 1e-9)
}

// Output impedance versus frequency (REFERENCES.md §3 [derived]): the
// non-inverting stage, R1 = 2 kΩ, R2 = 18 kΩ, a0 = 100 000, gbw = 1 MHz,
// ro = 100 Ω, rd = ∞.
func TestOutputImpedanceVersusFrequency(t *testing.T) {
	c := parse(t, "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=100\nresistor R1 fb gnd 2k\nresistor R2 out fb 18k\n")
	u1, out := part(t, c, "U1"), node(t, c, "out")
	for _, x := range []struct{ f, mag, deg float64 }{{1e3, 0.99989902, 88.8513}, {1e5, 70.530597, 44.8543}} {
		r := Analyze(c, u1, x.f, []Port{{out, circuit.Gnd}}, nil)
		z := r.Ports[0].Z.Complex128()
		if math.Abs(cmplx.Abs(z)/x.mag-1) > 1e-7 || math.Abs(cmplx.Phase(z)*180/math.Pi-x.deg) > 1e-4 {
			t.Errorf("f = %g: |Zo| = %.8g ∠ %.4f°, want %.8g ∠ %.4f°", x.f, cmplx.Abs(z), cmplx.Phase(z)*180/math.Pi, x.mag, x.deg)
		}
	}
}

// The degenerated transistor stage (REFERENCES.md §3, Razavi ch. 3
// [memory], check [derived]): a vccs gm from gate-source with rO and RS.
func TestDegenerated(t *testing.T) {
	c := parse(t, "vccs G1 d s sense=gnd,s gm=1m\nresistor rO d s 100k\nresistor RS s gnd 1k\n")
	r := Analyze(c, part(t, c, "G1"), 0, []Port{{node(t, c, "d"), circuit.Gnd}}, nil)
	near(t, "Z0", r.Ports[0].Z0, 101e3, 1e-12)
	near(t, "T_sc", r.Ports[0].TShort, 0.9900990099, 1e-9)
	near(t, "Rout", r.Ports[0].Z, 201e3, 1e-12)
	near(t, "Rout by Blackman", r.Ports[0].Blackman(), 201e3, 1e-12)
}
