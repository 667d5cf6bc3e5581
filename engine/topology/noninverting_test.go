package topology_test

import (
	"math"
	"math/cmplx"
	"testing"
)

// REFERENCES.md §3, non-inverting stage [derived] from Franco's exact
// formulas (S. Franco, Design with Operational Amplifiers and Analog
// Integrated Circuits, 3rd ed., 2002, ch. 1 [found: as re-worked]):
// rd = 1 MΩ, ro = 50 Ω, a = 150 000 (flat), R1 = 2 kΩ, R2 = 98 kΩ, ideal
// source, no load.
var noninvertingCheck = map[string]string{"Rs": "", "R1": "2k", "R2": "98k", "a0": "150k", "gbw": "", "p2": "",
	"rid": "1M", "rcm": "", "ro": "50", "RL": "", "CL": ""}

const srcRefNon = "REFERENCES.md §3 non-inverting check [derived], Franco 3rd ed. ch. 1"

func TestNoninvertingFrancoCheck(t *testing.T) {
	fs := opmForms(t, "noninverting", noninvertingCheck, 0)
	in, out := opmPort(t, fs, "in"), opmPort(t, fs, "out")
	opmWant(t, "A", real(fs.Gain.Value), "49.9832979", srcRefNon)
	opmWant(t, "Ri", real(in.Z.Value), "2.99950271e9", srcRefNon)
	opmWant(t, "Ri Z0", real(in.Z0.Value), "1.00196002e6", srcRefNon)
	opmWant(t, "Ri Tsc", real(in.TShort.Value), "2992.635125", srcRefNon)
	if in.TOpen != nil { // withheld when exactly 0 (rcm absent)
		opmWant(t, "Ri Toc", real(in.TOpen.Value), "0", srcRefNon)
	}
	opmWant(t, "Ro", real(out.Z.Value), "16.69375505e-3", srcRefNon)
	opmWant(t, "Ro Z0", real(out.Z0.Value), "49.9750115", srcRefNon)
	opmWant(t, "Ro Tsc", real(out.TShort.Value), "0", srcRefNon)
	opmWant(t, "Ro Toc", real(out.TOpen.Value), "2992.635125", srcRefNon)

	r := opmEngine(t, "noninverting", noninvertingCheck, 0)
	ein, eout := opmEnginePort(t, r, "in"), opmEnginePort(t, r, "out")
	opmWant(t, "engine A", real(r.Gain.G.Value()), "49.9832979", srcRefNon)
	opmWant(t, "engine Ri", real(ein.ZDirect.Value()), "2.99950271e9", srcRefNon)
	opmWant(t, "engine Ri Z0", real(ein.Z0.Value()), "1.00196002e6", srcRefNon)
	opmWant(t, "engine Ri Tsc", real(ein.TShort.Value()), "2992.635125", srcRefNon)
	opmWant(t, "engine Ro", real(eout.ZDirect.Value()), "16.69375505e-3", srcRefNon)
	opmWant(t, "engine Ro Z0", real(eout.Z0.Value()), "49.9750115", srcRefNon)
	opmWant(t, "engine Ro Toc", real(eout.TOpen.Value()), "2992.635125", srcRefNon)

	// Franco's closed forms themselves, evaluated with the same values.
	a, rd, ro, r1, r2 := 150e3, 1e6, 50.0, 2e3, 98e3
	A := ((1+r2/r1)*a + ro/rd) / (1 + a + r2/r1 + (r2+ro)/rd + ro/r1)
	Ri := rd*(1+a/(1+(r2+ro)/r1)) + r1*(r2+ro)/(r1+r2+ro)
	Ro := ro / (1 + (a+ro/r1+ro/rd)/(1+r2/r1+r2/rd))
	for _, c := range []struct {
		what      string
		got, want float64
	}{{"A", real(fs.Gain.Value), A}, {"Ri", real(in.Z.Value), Ri}, {"Ro", real(out.Z.Value), Ro}} {
		if math.Abs(c.got-c.want) > 1e-11*math.Abs(c.want) {
			t.Errorf("%s = %.12g, Franco's exact formula gives %.12g", c.what, c.got, c.want)
		}
	}
}

// Output impedance versus frequency, REFERENCES.md §3 [derived], after
// Franco 3rd ed., ch. 6 [found: as re-worked]: R1 = 2 kΩ, R2 = 18 kΩ,
// a0 = 100 000, gbw = 1 MHz, ro = 100 Ω, rd infinite — inductive rise.
func TestNoninvertingOutputImpedanceRise(t *testing.T) {
	p := map[string]string{"Rs": "", "R1": "2k", "R2": "18k", "a0": "100k", "gbw": "1M", "p2": "",
		"rid": "", "rcm": "", "ro": "100", "RL": "", "CL": ""}
	const src = "REFERENCES.md §3 output impedance vs frequency [derived], Franco ch. 6"
	for _, c := range []struct {
		f          float64
		mag, angle string
	}{{1e3, "0.99989902", "88.8513"}, {100e3, "70.530597", "44.8543"}} {
		z := opmPort(t, opmForms(t, "noninverting", p, c.f), "out").Z.Value
		opmWant(t, "|Zo| closed form", cmplx.Abs(z), c.mag, src)
		opmWant(t, "∠Zo closed form", cmplx.Phase(z)*180/math.Pi, c.angle, src)
		ez := opmEnginePort(t, opmEngine(t, "noninverting", p, c.f), "out").ZDirect.Value()
		opmWant(t, "|Zo| engine", cmplx.Abs(ez), c.mag, src)
		opmWant(t, "∠Zo engine", cmplx.Phase(ez)*180/math.Pi, c.angle, src)
	}
}

func TestNoninvertingAgreesWithEngine(t *testing.T) {
	opmAgree(t, "noninverting", []string{"Rs", "gbw", "p2", "rid", "rcm", "RL", "CL"}, 3)
}
