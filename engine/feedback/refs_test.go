package feedback_test

import (
	"fmt"
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

func nearC(t *testing.T, what string, got, want complex128, rel float64) {
	t.Helper()
	if d := cmplx.Abs(got-want) / cmplx.Abs(want); !(d <= rel) {
		t.Errorf("%s = %v, want %v (rel diff %.2g > %.0g)", what, got, want, d, rel)
	}
}

// Inverting amplifier, rd = 1 MΩ, ro = 50 Ω, a = 150 000, R1 = 10 kΩ,
// R2 = 47 kΩ: Franco 3rd ed. ch. 1 formulas; values [derived] in
// REFERENCES.md §3.
func TestInvertingFranco(t *testing.T) {
	a := analyzer(t, `
vsource Vin src gnd 1
resistor R1 src n 10k
resistor R2 n out 47k
opamp U1 gnd n out a0=150k rid=1M ro=50
port in src gnd
port out out gnd
port sum n gnd
`, "U1", [][3]string{{"in", "src", "gnd"}, {"out", "out", "gnd"}, {"sum", "n", "gnd"}}, &[3]string{"Vin", "out", "gnd"})
	p, err := a.At(0)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "A", p.Gain.G, -4.699819743, 1e-9)
	near(t, "Ri", p.Ports[0].Z, 10.00031366e3, 1e-9)
	near(t, "Ri Z0", p.Ports[0].Z0, 54.93577193e3, 1e-9)
	near(t, "Ri Tsc", p.Ports[0].TShort, 26077.65927, 1e-9)
	near(t, "Ri Toc", p.Ports[0].TOpen, 143259.6342, 1e-9)
	near(t, "Ro", p.Ports[1].Z, 1.915593209e-3, 1e-9)
	near(t, "Zsum", p.Ports[2].Z, 0.313654639, 1e-8)
	for i, pr := range p.Ports {
		if !(pr.Agreement < 1e-10) {
			t.Errorf("port %d: Blackman vs direct %g", i, pr.Agreement)
		}
	}
}

// With rd = ∞: Ri = R1 + (R2 + ro)/(1 + a) (Franco 3rd ed., ch. 1).
func TestInvertingIdealInput(t *testing.T) {
	a := analyzer(t, `
vsource Vin src gnd 1
resistor R1 src n 10k
resistor R2 n out 47k
opamp U1 gnd n out a0=150k ro=50
`, "U1", [][3]string{{"in", "src", "gnd"}}, nil)
	p, _ := a.At(0)
	near(t, "Ri", p.Ports[0].Z, 10e3+(47e3+50)/(1+150e3), 1e-12)
}

// Voltage follower, a = 150 000, rd = 1 MΩ, ro = 50 Ω: Franco ch. 1; values
// [derived] in REFERENCES.md §3.
func TestFollowerFranco(t *testing.T) {
	a := analyzer(t, `
vsource Vin in gnd 1
opamp U1 in out out a0=150k rid=1M ro=50
`, "U1", [][3]string{{"in", "in", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out", "gnd"})
	p, _ := a.At(0)
	near(t, "A", p.Gain.G, 0.999993333378, 1e-11)
	near(t, "Ri", p.Ports[0].Z, 150.00100005e9, 1e-10)
	near(t, "Ro", p.Ports[1].Z, 0.333331111e-3, 1e-8)
}

// Output impedance rising with frequency as ro/(1 + a(jf)β): Franco 3rd ed.
// ch. 6; check values [derived] in REFERENCES.md §3.
func TestOutputImpedanceInductiveRise(t *testing.T) {
	a := analyzer(t, `
vsource Vin in gnd 1
opamp U1 in fb out a0=100k gbw=1M ro=100
resistor R1 fb gnd 2k
resistor R2 out fb 18k
`, "U1", [][3]string{{"out", "out", "gnd"}}, nil)
	for _, c := range []struct{ f, mag, deg float64 }{{1e3, 0.99989902, 88.8513}, {100e3, 70.530597, 44.8543}} {
		p, _ := a.At(c.f)
		z := p.Ports[0].Z
		near(t, "|Zo|", complex(cmplx.Abs(z), 0), c.mag, 1e-7)
		if d := math.Abs(cmplx.Phase(z)*180/math.Pi - c.deg); d > 1e-4 {
			t.Errorf("∠Zo at %g Hz = %.5f°, want %.4f°", c.f, cmplx.Phase(z)*180/math.Pi, c.deg)
		}
	}
}

// Source-degenerated transistor: Rout = rO + RS + gm·rO·RS, Z0 = rO + RS,
// T_sc = gm(RS ∥ rO), T_oc = 0 (standard result, e.g. B. Razavi, Design of
// Analog CMOS Integrated Circuits, 2nd ed., ch. 3 [memory]); values
// [derived] in REFERENCES.md §3.
func TestDegeneratedTransistor(t *testing.T) {
	a := analyzer(t, `
vccs Gm1 d s sense=gnd,s gm=1m
resistor ro1 d s 100k
resistor RS s gnd 1k
port out d gnd
`, "Gm1", [][3]string{{"out", "d", "gnd"}}, nil)
	p, _ := a.At(0)
	near(t, "Z0", p.Ports[0].Z0, 101e3, 1e-12)
	near(t, "Tsc", p.Ports[0].TShort, 0.9900990099, 1e-9)
	if cmplx.Abs(p.Ports[0].TOpen) > 1e-12 {
		t.Errorf("Toc = %v, want 0", p.Ports[0].TOpen)
	}
	near(t, "Rout", p.Ports[0].Z, 201e3, 1e-12)
	near(t, "Rout direct", p.Ports[0].ZDirect, 201e3, 1e-12)
}

// Howland current pump, R1 = R3 = 15 kΩ, R2 = 4.5 kΩ, a = 100 000, with
// R4/R3 = (R2/R1)(1 − ε): Ro → R1/ε (Franco 3rd ed., ch. 2) and the
// Blackman closed form [derived], REFERENCES.md §3.
func TestHowland(t *testing.T) {
	for _, c := range []struct{ eps, want float64 }{{0, 266.2756509e6}, {0.04, 374.4823024e3}, {-0.04, -375.5386857e3}} {
		r4 := 15e3 * (4.5e3 / 15e3) * (1 - c.eps)
		text := fmt.Sprintf(`
vsource Vin src gnd 1
resistor R1 src p 15k
resistor R2 p out 4.5k
resistor R3 n gnd 15k
resistor R4 n out %.17g
opamp U1 p n out a0=100k
port load p gnd
`, r4)
		a := analyzer(t, text, "U1", [][3]string{{"load", "p", "gnd"}}, nil)
		p, _ := a.At(0)
		near(t, fmt.Sprintf("Ro(ε=%g)", c.eps), p.Ports[0].Z, c.want, 1e-9)
		bN, bP := 15e3/(15e3+r4), 15e3/(15e3+4.5e3)
		closed := (15e3 * 4.5e3 / 19.5e3) * (1 + 1e5*bN) / (1 + 1e5*(bN-bP))
		near(t, "Blackman closed form", p.Ports[0].Z, closed, 1e-12)
		if c.eps != 0 {
			near(t, "R1/ε", p.Ports[0].Z, 15e3/c.eps, 0.002)
		}
	}
}

// Scaling: a0 = 1e9 with 1 mΩ and 1 TΩ in one circuit must still give
// Blackman/direct agreement better than 1e-9 (the engine issue's target).
func TestExtremeScaling(t *testing.T) {
	a := analyzer(t, `
vsource Vin in gnd 1
opamp U1 in fb out a0=1G gbw=10M rid=1T rcm=1T ro=1m
resistor R1 fb gnd 1k
resistor R2 out fb 99k
resistor RL out gnd 1T
capacitor CL out gnd 1p
`, "U1", [][3]string{{"in", "in", "gnd"}, {"out", "out", "gnd"}, {"fb", "fb", "gnd"}}, &[3]string{"Vin", "out", "gnd"})
	for _, f := range []float64{0, 1, 1e3, 1e6, 1e9} {
		p, err := a.At(f)
		if err != nil {
			t.Fatal(err)
		}
		for i, pr := range p.Ports {
			if !(pr.Agreement < 1e-9) {
				t.Errorf("f=%g port %d: Blackman %v vs direct %v: %g", f, i, pr.Z, pr.ZDirect, pr.Agreement)
			}
		}
		if !(p.Gain.Agreement < 1e-9) {
			t.Errorf("f=%g gain agreement %g", f, p.Gain.Agreement)
		}
	}
}

// Transimpedance input with a = ωt/s: Zin ≈ (Zf + ro)/(1 + a), which looks
// like an inductor L = Rf/(2π·gbw) well inside the loop bandwidth [derived],
// REFERENCES.md §3. Here Rf = 1 MΩ, gbw = 10 MHz → L = 15.915 mH.
func TestTransimpedanceInputInductive(t *testing.T) {
	a := analyzer(t, `
isource Iin gnd n 1u
resistor Rf n out 1M
opamp U1 gnd n out a0=1G gbw=10M
`, "U1", [][3]string{{"in", "n", "gnd"}}, nil)
	f := 1e3
	p, _ := a.At(f)
	z := p.Ports[0].Z
	L := imag(z) / (2 * math.Pi * f)
	near(t, "L", complex(L, 0), 1e6/(2*math.Pi*10e6), 1e-6)
	// Exact form (Zf + ro)/(1 + a) with ro = 0.
	s := complex(0, 2*math.Pi*f)
	aa := 1e9 / (1 + s/complex(2*math.Pi*10e6/1e9, 0))
	nearC(t, "Zin", z, 1e6/(1+aa), 1e-12)
}
