package topology_test

import (
	"math"
	"math/cmplx"
	"testing"
)

// REFERENCES.md §5 [derived]: Rf = 1 MΩ, Ci = 20 pF, gbw = 10 MHz, with
// a0 = 1e9 standing in for a = ωt/s; our stage needs ro > 0, so ro = 1 mΩ
// (its effect on T is below 1e-9 here). The approximate rule after
// J. Graeme, Photodiode Amplifiers, 1996 [memory]; the Butterworth value
// exact for the second-order model [derived].
var tiaCheck = map[string]string{"Rsh": "", "Cd": "20p", "Cin": "", "Rf": "1M", "Cf": "", "a0": "1G", "gbw": "10M", "p2": "",
	"rid": "", "rcm": "", "ro": "1m", "RL": "", "CL": ""}

const srcRefTIA = "REFERENCES.md §5 transimpedance Cf check [derived]"

func TestTransimpedanceCfCheck(t *testing.T) {
	fs := opmForms(t, "transimpedance", tiaCheck, 1e3)
	opmWant(t, "Ci", opmExtra(t, fs, "Ci (summing-node capacitance)"), "20e-12", srcRefTIA)
	// The classic formula's name says the margin it really gives.
	opmWant(t, "Cf “45°”", opmExtra(t, fs, "Cf (classic “45°” formula, gives 52.5°)"), "0.5642e-12", srcRefTIA)
	opmWant(t, "Q “45°”", opmExtra(t, fs, "Q with Cf (classic “45°” formula)"), "0.986", srcRefTIA)
	opmWant(t, "PM “45°”", opmExtra(t, fs, "phase margin with Cf (classic “45°” formula)"), "52.52", srcRefTIA)
	opmWant(t, "crossover “45°”", opmExtra(t, fs, "crossover with Cf (classic “45°” formula)"), "351.6e3", srcRefTIA)
	opmWant(t, "Cf Butterworth", opmExtra(t, fs, "Cf (Butterworth)"), "0.7977e-12", srcRefTIA)
	opmWant(t, "Q Butterworth", opmExtra(t, fs, "Q with Cf (Butterworth)"), "0.7071", srcRefTIA)
	opmWant(t, "PM Butterworth", opmExtra(t, fs, "phase margin with Cf (Butterworth)"), "65.83", srcRefTIA)
	opmWant(t, "crossover Butterworth", opmExtra(t, fs, "crossover with Cf (Butterworth)"), "423.9e3", srcRefTIA)
	opmWant(t, "f−3dB Butterworth", opmExtra(t, fs, "f−3dB with Cf (Butterworth)"), "276.6e3", srcRefTIA)
	// L = Rf/(2π·gbw) (REFERENCES.md §3 [derived]) = 1 MΩ/(2π·10 MHz).
	opmWant(t, "L", opmExtra(t, fs, "equivalent input inductance Rf/(2π·gbw)"), "15.9155e-3", "Rf/(2π·gbw), REFERENCES.md §3 [derived]")
}

// Without Ci and rd the summing node is (Zf + ro)/(1 + a) (REFERENCES.md §3
// [derived]), and with a ≈ ωt/s it is inductive, L = Rf/(2π·gbw).
func TestTransimpedanceInputImpedance(t *testing.T) {
	p := map[string]string{"Rsh": "", "Cd": "", "Cin": "", "Rf": "1M", "Cf": "1p", "a0": "1G", "gbw": "10M", "p2": "",
		"rid": "", "rcm": "", "ro": "50", "RL": "", "CL": ""}
	for _, f := range []float64{0, 1e3, 1e5} {
		s := complex(0, 2*math.Pi*f)
		zf := 1 / (1/complex(1e6, 0) + s*1e-12)
		a := 1e9 / (1 + s/complex(2*math.Pi*10e6/1e9, 0))
		want := (zf + 50) / (1 + a)
		got := opmPort(t, opmForms(t, "transimpedance", p, f), "in").Z.Value
		eng := opmEnginePort(t, opmEngine(t, "transimpedance", p, f), "in").ZDirect.Value()
		if cmplx.Abs(got-want) > 1e-12*cmplx.Abs(want) || cmplx.Abs(eng-want) > 1e-9*cmplx.Abs(want) {
			t.Errorf("f=%g: Zin closed form %v, engine %v, want (Zf + ro)/(1 + a) = %v", f, got, eng, want)
		}
	}
	// Inductive: at 10 kHz (far above gbw/a0, far below gbw) Zin ≈ jω·Rf/(2π·gbw),
	// to about f/gbw = 1e-3.
	p["Cf"] = ""
	f := 10e3
	z := opmPort(t, opmForms(t, "transimpedance", p, f), "in").Z.Value
	L := imag(z) / (2 * math.Pi * f)
	if want := 1e6 / (2 * math.Pi * 10e6); math.Abs(L-want) > 2e-3*want {
		t.Errorf("Zin at 10 kHz = %v: L = %.6g H, want Rf/(2π·gbw) = %.6g H", z, L, want)
	}
}

func TestTransimpedanceAgreesWithEngine(t *testing.T) {
	opmAgree(t, "transimpedance", []string{"Rsh", "Cd", "Cin", "Cf", "gbw", "p2", "rid", "rcm", "RL", "CL"}, 1)
}
