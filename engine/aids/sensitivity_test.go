package aids_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"zport/engine/aids"
)

// invertingRo is an inverting amplifier of our own for the output
// impedance: R1 from the (zeroed) source to the − input, R2 from the output
// back to it, + input grounded; the op amp with rid, ro and one pole.
const invertingRo = `
vsource Vin src gnd 1
resistor R1 src sum {R1}
resistor R2 out sum {R2}
opamp U1 gnd sum out a0={a0} gbw={gbw} rid={rid} ro={ro}
port out out gnd
`

var invertingNominal = map[string]float64{"R1": 10e3, "R2": 47e3, "a0": 150e3, "gbw": 1e6, "rid": 1e6, "ro": 50}

func invertingText(v map[string]float64) string {
	s := invertingRo
	for k, x := range v {
		s = strings.ReplaceAll(s, "{"+k+"}", fmt.Sprintf("%.17g", x))
	}
	return s
}

// francoRo is the closed-loop output impedance with the source zeroed,
// Ro = ro / {1 + (a + ro/R1 + ro/rd)/(1 + R2/R1 + R2/rd)} (Franco, 3rd ed.,
// ch. 1, REFERENCES.md §3; with the source zeroed the inverting and
// non-inverting stages share it), and its exact logarithmic derivatives
// ∂ln Ro/∂ln p derived from it: with D = 1 + R2/R1 + R2/rd and
// N = a + ro/R1 + ro/rd, ln Ro = ln ro + ln D − ln(D + N). The open-loop
// gain is a = a0/(1 + jf·a0/gbw), so ∂ln a/∂ln a0 = 1/(1 + jf·a0/gbw) and
// ∂ln a/∂ln gbw = (jf·a0/gbw)/(1 + jf·a0/gbw). Real part: ∂ln|Ro|/∂ln p;
// imaginary part: ∂∠Ro/∂ln p in radians.
func francoRo(v map[string]float64, f float64) (ro complex128, s map[string]complex128) {
	r1, r2, rd, o := complex(v["R1"], 0), complex(v["R2"], 0), complex(v["rid"], 0), complex(v["ro"], 0)
	x := complex(0, f*v["a0"]/v["gbw"])
	a := complex(v["a0"], 0) / (1 + x)
	D := 1 + r2/r1 + r2/rd
	N := a + o/r1 + o/rd
	ro = o * D / (D + N)
	sa := -a / (D + N) // ∂ln Ro/∂ln a
	s = map[string]complex128{
		"R1":  -(r2/r1)/D + (r2/r1+o/r1)/(D+N),
		"R2":  (r2/r1+r2/rd)/D - (r2/r1+r2/rd)/(D+N),
		"rid": -(r2/rd)/D + (r2/rd+o/rd)/(D+N),
		"ro":  1 - (o/r1+o/rd)/(D+N),
		"a0":  sa / (1 + x),
		"gbw": sa * x / (1 + x),
	}
	return ro, s
}

// entry finds the sensitivity of quantity id to the circuit parameter.
func entry(t *testing.T, r *aids.SensitivityResult, id, param string) aids.SensitivityEntry {
	t.Helper()
	for _, q := range r.Quantities {
		if q.ID != id {
			continue
		}
		for _, e := range q.Entries {
			if e.Name == param {
				return e
			}
		}
	}
	t.Fatalf("no sensitivity of %s to %s", id, param)
	return aids.SensitivityEntry{}
}

var circuitName = map[string]string{"R1": "R1", "R2": "R2", "a0": "U1.a0", "gbw": "U1.gbw", "rid": "U1.rid", "ro": "U1.ro"}

// TestSensitivityFranco holds ∂ln|Ro|/∂ln p and ∂∠Ro/∂ln p of the
// inverting amplifier's output impedance to the closed form derived from
// Franco's Ro, at DC-like and at inductive frequencies, to 1e-8 relative
// (or 1e-11 absolute for a tiny sensitivity), and the reported error
// estimate to the actual error.
func TestSensitivityFranco(t *testing.T) {
	for _, f := range []float64{0, 1e3, 1e5} {
		m := circuitModel(t, invertingText(invertingNominal), "U1", []string{"out"}, "", "", f)
		r, err := aids.Sensitivities(m, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		ro, want := francoRo(invertingNominal, f)
		if f == 0 {
			// REFERENCES.md §3 [derived]: Ro = 1.915593209 mΩ (a = 150 000 flat).
			if e := relErr(real(r.Quantities[0].Value), 1.915593209e-3); e > 1e-9 {
				t.Errorf("Ro at DC %g, want 1.915593209 mΩ", real(r.Quantities[0].Value))
			}
		}
		if e := cmplx.Abs(r.Quantities[0].Value/ro - 1); e > 1e-10 {
			t.Errorf("f = %g: Ro %v, Franco %v", f, r.Quantities[0].Value, ro)
		}
		for p, s := range want {
			e := entry(t, r, "z:out", circuitName[p])
			wantMag, wantPh := real(s), imag(s)*180/math.Pi
			dm, dp := math.Abs(e.Mag-wantMag), math.Abs(e.Phase-wantPh)
			if dm > 1e-8*math.Abs(wantMag)+1e-11 || dp > 1e-8*math.Abs(wantPh)+1e-11 {
				t.Errorf("f = %g, %s: ∂ln|Ro|/∂ln p = %.12g (want %.12g), ∂∠Ro/∂ln p = %.12g° (want %.12g°)", f, p, e.Mag, wantMag, e.Phase, wantPh)
			}
			if dm > 10*e.MagErr+1e-12 || dp > 10*e.PhaseErr+1e-12 {
				t.Errorf("f = %g, %s: actual errors %.1e, %.1e exceed ten times the estimates %.1e, %.1e", f, p, dm, dp, e.MagErr, e.PhaseErr)
			}
		}
		// Sorted by magnitude, largest first.
		es := r.Quantities[0].Entries
		for i := 1; i < len(es); i++ {
			if math.Abs(es[i].Mag) > math.Abs(es[i-1].Mag) {
				t.Errorf("f = %g: entries not sorted: %s %g after %s %g", f, es[i].Name, es[i].Mag, es[i-1].Name, es[i-1].Mag)
			}
		}
	}
}

// TestSensitivityFiniteDifferences holds every sensitivity of the port
// impedance and the gain of the catalog's inverting stage to plain central
// differences (h = 1e-5 in ln p) computed through the engine on regenerated
// circuit text, independently of the aids' own evaluation path.
func TestSensitivityFiniteDifferences(t *testing.T) {
	const f = 20e3
	m := stageModel(t, "inverting", nil, f)
	r, err := aids.Sensitivities(m, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	st := stageText(t, "inverting")
	const h = 1e-5
	for j, p := range m.Params {
		eval := func(k float64) (map[string]complex128, complex128) {
			x := m.Nominal()
			x[j] *= math.Exp(k)
			text := st(x, m)
			z := map[string]complex128{}
			var g complex128
			for _, port := range m.Ports {
				z[port.Name], g = analyzeText(t, text, m.Reference, port.Name, f, "Vin", "out")
			}
			return z, g
		}
		zp, gp := eval(h)
		zm, gm := eval(-h)
		check := func(id string, a, b complex128) {
			l := cmplx.Log(a/b) / (2 * h)
			e := entry(t, r, id, p.Name)
			wantMag, wantPh := real(l), imag(l)*180/math.Pi
			// Central differences at h = 1e-5: truncation about h² and
			// rounding about 1e-15/h, so 1e-8 relative to the scale.
			if math.Abs(e.Mag-wantMag) > 1e-8*math.Max(1, math.Abs(wantMag)) || math.Abs(e.Phase-wantPh) > 1e-7*math.Max(1, math.Abs(wantPh)) {
				t.Errorf("%s to %s: %.10g, %.10g°; plain differences %.10g, %.10g°", id, p.Name, e.Mag, e.Phase, wantMag, wantPh)
			}
		}
		for _, port := range m.Ports {
			check("z:"+port.Name, zp[port.Name], zm[port.Name])
		}
		check("g", gp, gm)
	}
}

// TestSensitivityPhaseMargin: a follower whose op amp has a0 = 10⁹ and
// gbw = p2 has a loop T ≈ ω0²/[s(s + ω0/Q)] with Q = √(gbw/p2) = 1, so its
// phase margin is 51.83° (REFERENCES.md §4, Franco 3rd ed., ch. 8:
// cos φ = √(1 + 1/(4Q⁴)) − 1/(2Q²)), and differentiating that formula,
// ∂φ/∂ln Q = 2u(u/√(1 + u²) − 1)/sin φ with u = 1/(2Q²) [derived here];
// ∂ln Q/∂ln gbw = ½ = −∂ln Q/∂ln p2.
func TestSensitivityPhaseMargin(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in out out a0=1e9 gbw=10M p2=10M\nport out out gnd\n"
	m := circuitModel(t, text, "U1", []string{"out"}, "", "", 1e3)
	r, err := aids.Sensitivities(m, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	const q = 1.0
	u := 1 / (2 * q * q)
	phi := math.Acos(math.Sqrt(1+u*u) - u)
	dphi := 2 * u * (u/math.Sqrt(1+u*u) - 1) / math.Sin(phi) * 180 / math.Pi
	var pmq aids.SensitivityQuantity
	for _, qq := range r.Quantities {
		if qq.ID == "pm" {
			pmq = qq
		}
	}
	if math.Abs(pmq.PM-phi*180/math.Pi) > 1e-5 || math.Abs(pmq.PM-51.83) > 0.005 {
		t.Errorf("phase margin %.6f°, closed form %.6f° (table: 51.83°)", pmq.PM, phi*180/math.Pi)
	}
	for name, want := range map[string]float64{"U1.gbw": dphi / 2, "U1.p2": -dphi / 2, "U1.a0": 0} {
		e := entry(t, r, "pm", name)
		if math.Abs(e.Mag-want) > 1e-5 {
			t.Errorf("∂PM/∂ln %s = %.9f°, closed form %.9f°", name, e.Mag, want)
		}
	}
}
