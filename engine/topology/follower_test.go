package topology_test

import (
	"math"
	"testing"
)

// REFERENCES.md §3, voltage follower [derived] from Franco's exact formulas
// (S. Franco, Design with Operational Amplifiers and Analog Integrated
// Circuits, 3rd ed., 2002, ch. 1 [found: as re-worked]): a = 150 000 (flat),
// rd = 1 MΩ, ro = 50 Ω, ideal source, no Riso, no load.
var followerCheck = map[string]string{"Rs": "", "Riso": "", "a0": "150k", "gbw": "", "p2": "",
	"rid": "1M", "rcm": "", "ro": "50", "RL": "", "CL": ""}

const srcRefFol = "REFERENCES.md §3 follower check [derived], Franco 3rd ed. ch. 1"

func TestFollowerFrancoCheck(t *testing.T) {
	fs := opmForms(t, "follower", followerCheck, 0)
	opmWant(t, "A", real(fs.Gain.Value), "0.999993333378", srcRefFol)
	opmWant(t, "Ri", real(opmPort(t, fs, "in").Z.Value), "150.00100005e9", srcRefFol)
	opmWant(t, "Ro", real(opmPort(t, fs, "out").Z.Value), "0.333331111e-3", srcRefFol)

	r := opmEngine(t, "follower", followerCheck, 0)
	opmWant(t, "engine A", real(r.Gain.G.Value()), "0.999993333378", srcRefFol)
	opmWant(t, "engine Ri", real(opmEnginePort(t, r, "in").ZDirect.Value()), "150.00100005e9", srcRefFol)
	opmWant(t, "engine Ro", real(opmEnginePort(t, r, "out").ZDirect.Value()), "0.333331111e-3", srcRefFol)

	// Franco's formulas themselves with the same values.
	a, rd, ro := 150e3, 1e6, 50.0
	for _, c := range []struct {
		what      string
		got, want float64
	}{
		{"A", real(fs.Gain.Value), (a + ro/rd) / (1 + a + ro/rd)},
		{"Ri", real(opmPort(t, fs, "in").Z.Value), rd*(1+a) + ro},
		{"Ro", real(opmPort(t, fs, "out").Z.Value), ro * rd / (rd*(1+a) + ro)},
	} {
		if math.Abs(c.got-c.want) > 1e-11*math.Abs(c.want) {
			t.Errorf("%s = %.12g, Franco's exact formula gives %.12g", c.what, c.got, c.want)
		}
	}
}

// With Riso the output impedance at the load tends to Riso at low frequency
// (common practice); exactly, Blackman's terms give Riso + Ro(pin) with
// T_sc the loop with Riso to gnd.
func TestFollowerIsolationResistor(t *testing.T) {
	p := map[string]string{"Rs": "", "Riso": "47", "a0": "150k", "gbw": "", "p2": "", "rid": "1M", "rcm": "", "ro": "50", "RL": "", "CL": ""}
	z := real(opmPort(t, opmForms(t, "follower", p, 0), "out").Z.Value)
	want := 47 + 50*1e6/(1e6*(1+150e3)+50) // Riso in series with the pin's Ro (no load, so no loading of the loop)
	if math.Abs(z-want) > 1e-12*want {
		t.Errorf("Zout with Riso = %.12g, want Riso + Ro(pin) = %.12g", z, want)
	}
}

func TestFollowerAgreesWithEngine(t *testing.T) {
	opmAgree(t, "follower", []string{"Rs", "Riso", "gbw", "p2", "rid", "rcm", "RL", "CL"}, 2)
}
