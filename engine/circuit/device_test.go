package circuit

import (
	"math"
	"strings"
	"testing"
)

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol*math.Abs(want) {
		t.Errorf("%s = %.10g, want %.10g (tolerance %.1g relative)", what, got, want, tol)
	}
}

// VT = kT/q with the exact SI constants (BIPM SI Brochure, 9th ed., 2019;
// REFERENCES.md §6): 25.851 999 8 mV at 300 K, 25.6926 mV at 298.15 K
// [derived]; to the 25.852 mV the issue states.
func TestThermalVoltage(t *testing.T) {
	near(t, "VT(300 K)", ThermalVoltage(300), 25.8519998e-3, 1e-8)
	near(t, "VT(298.15 K)", ThermalVoltage(298.15), 25.6926e-3, 2e-6)
	if math.Abs(ThermalVoltage(300)-25.852e-3) > 0.5e-6 {
		t.Errorf("VT(300 K) = %.7g V, not 25.852 mV to the stated digits", ThermalVoltage(300))
	}
}

// The hybrid-π values a bjt line derives (Gray, Hurst, Lewis, Meyer, 5th
// ed., ch. 1 [memory]; REFERENCES.md §11): gm = IC/VT — 38.6817 mS for
// 1 mA at 300 K [derived] — rπ = β/gm, ro = VA/IC, Cπ = gm/(2π·fT) − Cμ;
// and the square-law mos (Razavi, 2nd ed., ch. 2 [memory]): gm = 2·ID/Vov,
// ro = 1/(λ·ID).
func TestDeviceValues(t *testing.T) {
	c, err := Parse(`# invented values
bjt Q1 c b e ic=1m beta=120 va=60 ft=400M cmu=0.5p rb=150
bjt Q2 c b gnd gm=20m
mos M1 d g s id=200u vov=0.25 lambda=0.08 cgs=40f cgd=5f gmb=0.3m b=sub
mos M2 d g gnd gm=1m ro=50k gamma=1.2
resistor R1 e gnd 1k
resistor R2 s gnd 1k
resistor R3 sub gnd 1k
`)
	if err != nil {
		t.Fatal(err)
	}
	q1, _ := c.Part("Q1")
	d := q1.Dev
	gm := 1e-3 / ThermalVoltage(300)
	near(t, "Q1 gm", d.Gm, 38.6817e-3, 1e-6)
	near(t, "Q1 gm = Ic/VT", d.Gm, gm, 1e-15)
	near(t, "Q1 value", q1.Value, gm, 0)
	near(t, "Q1 rπ", d.Rpi, 120/gm, 1e-15)
	near(t, "Q1 ro", d.Ro, 60e3, 1e-15)
	near(t, "Q1 Cπ", d.Cpi, gm/(2*math.Pi*400e6)-0.5e-12, 1e-14)
	near(t, "Q1 Ib", d.Ib(), 1e-3/120, 1e-15)
	if d.Rb != 150 || d.Cmu != 0.5e-12 || d.Beta != 120 || d.VT != ThermalVoltage(300) {
		t.Errorf("Q1 = %+v", d)
	}
	q2, _ := c.Part("Q2")
	if d := q2.Dev; d.Gm != 20e-3 || d.Beta != 100 || d.Rpi != 100/20e-3 || d.Ro != 0 || d.Cpi != 0 || d.Ic != 0 || d.Ib() != 0 {
		t.Errorf("Q2 (gm given, defaults) = %+v", d)
	}
	m1, _ := c.Part("M1")
	d = m1.Dev
	near(t, "M1 gm = 2·Id/Vov", d.Gm, 2*200e-6/0.25, 1e-15)
	near(t, "M1 ro = 1/(λ·Id)", d.Ro, 1/(0.08*200e-6), 1e-15)
	near(t, "M1 cgs", d.Cgs, 40e-15, 1e-15)
	near(t, "M1 cgd", d.Cgd, 5e-15, 1e-15)
	near(t, "M1 gmb", d.Gmb, 0.3e-3, 1e-15)
	if sub, _ := c.Node("sub"); d.Bulk != sub || d.Gamma != DefaultGamma {
		t.Errorf("M1 = %+v", d)
	}
	m2, _ := c.Part("M2")
	if d := m2.Dev; d.Gm != 1e-3 || d.Ro != 50e3 || d.Bulk != Gnd || d.Gamma != 1.2 {
		t.Errorf("M2 = %+v", d)
	}
	if got := strings.Join(c.References(), " "); got != "M1 M2 Q1 Q2" {
		t.Errorf("References = %q", got)
	}
	if c.Temperature != 300 {
		t.Errorf("temperature %g", c.Temperature)
	}

	// At another temperature gm = IC/VT scales as 1/T.
	hot, err := ParseWith("bjt Q1 c b gnd ic=1m\nresistor R1 c gnd 1k", Options{Temperature: 350})
	if err != nil {
		t.Fatal(err)
	}
	near(t, "gm at 350 K", hot.Parts[0].Dev.Gm, 1e-3/ThermalVoltage(350), 1e-15)
	if hot.Temperature != 350 {
		t.Errorf("temperature %g", hot.Temperature)
	}
}

// Decibel gains on a0= and gain=, and the op amp's input capacitances.
func TestGainsInDecibels(t *testing.T) {
	c, err := Parse(`opamp U1 a b out a0=100dB cid=2p ccm=5p
vcvs E1 x gnd sense=a,gnd gain=-6dB
cccs F1 gnd y sense=R1 gain=20dB
resistor R1 a gnd 1k
resistor R2 b out 1k
resistor R3 x gnd 1k
resistor R4 y gnd 1k
`)
	if err != nil {
		t.Fatal(err)
	}
	u1, _ := c.Part("U1")
	if u1.Amp.A0 != 1e5 || u1.Amp.Cid != 2e-12 || u1.Amp.Ccm != 5e-12 {
		t.Errorf("U1 = %+v", u1.Amp)
	}
	e1, _ := c.Part("E1")
	near(t, "E1 gain −6 dB", e1.Value, math.Pow(10, -6.0/20), 1e-15)
	f1, _ := c.Part("F1")
	if f1.Value != 10 {
		t.Errorf("F1 gain 20 dB = %.17g, want 10", f1.Value)
	}
}

func TestNearest(t *testing.T) {
	keys := []string{"ic", "gm", "beta", "va", "ro", "ft", "cmu", "rb"}
	for _, c := range []struct{ in, want string }{
		{"bta", "beta"}, {"IC", "ic"}, {"Beta", "beta"}, {"fT", "ft"}, {"cmuu", "cmu"}, {"vaf", "va"},
		{"temperature", ""}, {"x", ""},
	} {
		if got := nearest(c.in, keys); got != c.want {
			t.Errorf("nearest(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
