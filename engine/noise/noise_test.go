package noise_test

import (
	"math"
	"math/big"
	"testing"

	"zport/engine/noise"
)

// k and q as the SI Brochure (BIPM, 9th ed., 2019) defines them.
func TestConstants(t *testing.T) {
	if noise.Boltzmann != 1.380649e-23 || noise.Charge != 1.602176634e-19 {
		t.Errorf("k = %g, q = %g", noise.Boltzmann, noise.Charge)
	}
}

// √(4kTR) for 1 kΩ at 300 K is 4.0704 nV/√Hz (J. B. Johnson, Phys. Rev.
// 32, 97, 1928; H. Nyquist, Phys. Rev. 32, 110, 1928; the value [derived]
// in REFERENCES §10), here as the open-circuit noise of a lone resistor,
// and against √(4kTR) computed with math/big to 50 digits.
func TestJohnsonNyquist(t *testing.T) {
	s := newSetup(t, "resistor R1 out gnd 1k\n", "", "out", "", 300)
	exact := new(big.Float).SetPrec(170)
	exact.SetString("1.380649e-23")
	exact.Mul(exact, big.NewFloat(4*300*1000).SetPrec(170))
	exact.Sqrt(exact)
	want, _ := exact.Float64()
	for _, f := range []float64{1e-3, 1, 1e3, 1e9} {
		got, _, _ := s.density(t, f)
		within(t, "density of 1 kΩ at 300 K", got, want, 1e-15)
		if math.Abs(got-4.0704e-9) > 0.00005e-9 {
			t.Errorf("density %.6g V/√Hz, want 4.0704 nV/√Hz", got)
		}
	}
	// A noiseless resistor makes no noise but still loads the node: two
	// noisy 1 kΩ and a noiseless one in parallel give the two currents
	// 2·4kT/R through R/3.
	s = newSetup(t, "resistor R1 out gnd 1k\nresistor R2 out gnd 1k\nresistor RL out gnd 1k noise=off\n", "", "out", "", 300)
	got, by, _ := s.density(t, 1e3)
	if _, ok := by["RL"]; ok {
		t.Error("RL is noise=off but is a source")
	}
	within(t, "two 1 kΩ and a noiseless 1 kΩ in parallel", got, math.Sqrt(2*4*noise.Boltzmann*300/1000)*1000/3, 1e-14)
}

// kT/C: the noise of an RC low-pass integrated over all frequencies is
// √(kT/C), whatever R (Gray, Hurst, Lewis, Meyer, 5th ed., ch. 11
// [memory]); 2.0352 µV rms for 1 nF at 300 K [derived]. Over a finite band
// the closed form is (kT/C)·(2/π)·[atan(f2/fc) − atan(f1/fc)]; the band
// here is eight decades each side of fc, so the two agree to 2e-8. The
// equivalent noise bandwidth of the single pole is (π/2)·fc (common
// textbook result); over the band, fc·[atan(f2/fc) − atan(f1/fc)].
func TestKTC(t *testing.T) {
	const C, T = 1e-9, 300.0
	ktc := math.Sqrt(noise.Boltzmann * T / C)
	if math.Abs(ktc-2.0352e-6) > 0.00005e-6 {
		t.Fatalf("√(kT/C) = %g, want 2.0352 µV", ktc)
	}
	for _, r := range []string{"100", "10k", "1M"} {
		s := newSetup(t, "vsource Vin in gnd 0\nresistor R in out "+r+"\ncapacitor C out gnd 1n\n", "", "out", "Vin", T)
		R := map[string]float64{"100": 100, "10k": 1e4, "1M": 1e6}[r]
		fc := 1 / (2 * math.Pi * R * C)
		f1, f2 := fc*1e-8, fc*1e8
		b := s.band(t, f1, f2)
		span := math.Atan(f2/fc) - math.Atan(f1/fc)
		within(t, "R = "+r+": band power against the closed form", b.Total, noise.Boltzmann*T/C*2/math.Pi*span, 1e-9)
		within(t, "R = "+r+": rms against √(kT/C)", b.RMS(), ktc, 2e-8)
		if d := math.Abs(b.Total - noise.Boltzmann*T/C*2/math.Pi*span); d > b.Error {
			t.Errorf("R = %s: actual error %.2g exceeds the reported estimate %.2g", r, d, b.Error)
		}
		within(t, "R = "+r+": equivalent noise bandwidth", b.Bandwidth(), fc*span, 1e-9)
		within(t, "R = "+r+": against (π/2)·f−3dB", b.Bandwidth(), math.Pi/2*fc, 2e-8)
		within(t, "R = "+r+": peak gain", b.Peak, 1, 1e-12)
	}
}

// A band from a subnormal frequency (a share link may ask a sweep from
// 1e-320 Hz) spans 328 decades: more panels than the evaluations allow
// are not made, and the RC low-pass still integrates to kT/C (the same
// closed form as TestKTC), within the error the band reports.
func TestBandFromSubnormal(t *testing.T) {
	const C, T = 1e-9, 300.0
	s := newSetup(t, "vsource Vin in gnd 0\nresistor R in out 10k\ncapacitor C out gnd 1n\n", "", "out", "Vin", T)
	b, err := s.n.Band(s.a.AdjointAt, s.a.Sys.N, 1e-320, 1e8)
	if err != nil {
		t.Fatal(err)
	}
	fc := 1 / (2 * math.Pi * 1e4 * C)
	want := noise.Boltzmann * T / C * 2 / math.Pi * (math.Atan(1e8/fc) - math.Atan(1e-320/fc))
	if math.Abs(b.Total-want) > math.Max(b.Error, 1e-6*want) {
		t.Errorf("band power %.10g (error estimate %.2g, %d evaluations), want %.10g", b.Total, b.Error, b.Evaluations, want)
	}
}

// Shot noise √(2qI) (W. Schottky, Ann. Phys. 57, 1918 [memory]) of 1 µA,
// with q exact, into a noiseless 1 kΩ: the output density is √(2qI)·R.
func TestShot(t *testing.T) {
	s := newSetup(t, "inoise D gnd out shot=1u\nresistor R out gnd 1k noise=off\n", "", "out", "", 300)
	got, by, _ := s.density(t, 10)
	want := math.Sqrt(2*1.602176634e-19*1e-6) * 1e3
	within(t, "shot noise of 1 µA into 1 kΩ", got, want, 1e-15)
	within(t, "D's power", by["D"], want*want, 1e-15)
	if src := s.n.Sources[0]; src.Kind != noise.Shot || src.Unit != "A" {
		t.Errorf("source %+v", src)
	}
	// thermal= is the noise of a conductance at the analysis temperature:
	// 1 mS at 400 K into 1 kΩ is 4kT·1e-3·(1e3)².
	s = newSetup(t, "inoise G gnd out thermal=1m\nresistor R out gnd 1k noise=off\n", "", "out", "", 400)
	got, _, _ = s.density(t, 10)
	within(t, "thermal=1m at 400 K into 1 kΩ", got, math.Sqrt(4*noise.Boltzmann*400*1e-3)*1e3, 1e-15)
}

// Sources that enter alike share one transfer (Analysis groups them): a
// resistor and a noise current with a 1/f corner across the same RC node
// (our values). With |H|² = R²/(1 + (f/fp)²) [circuit theory], over
// [f1, f2]: ∫|H|²df = R²·fp·[atan(f/fp)] and ∫|H|²/f df =
// R²·[ln f − ½·ln(1 + (f/fp)²)] [derived]; the resistor's power is
// (4kT/R)·∫|H|²df and the current's d²·(∫|H|²df + fc·∫|H|²/f df).
func TestGroupedSources(t *testing.T) {
	const R, C, d, fc, T = 10e3, 1e-9, 3e-12, 1e3, 300.0
	s := newSetup(t, "resistor R out gnd 10k\ncapacitor C out gnd 1n\ninoise In gnd out density=3p fc=1k\n", "", "out", "", T)
	fp := 1 / (2 * math.Pi * R * C)
	f1, f2 := 1.0, 1e8
	A := R * R * fp * (math.Atan(f2/fp) - math.Atan(f1/fp))
	lg := func(f float64) float64 { return math.Log(f) - 0.5*math.Log1p((f/fp)*(f/fp)) }
	B := R * R * (lg(f2) - lg(f1))
	b := s.band(t, f1, f2)
	within(t, "resistor's power", b.Power[0], 4*noise.Boltzmann*T/R*A, 1e-9)
	within(t, "noise current's power", b.Power[1], d*d*(A+fc*B), 1e-9)
	within(t, "the parts add up to the total", b.Power[0]+b.Power[1], b.Total, 1e-12)
	_, by, _ := s.density(t, 100)
	z := make([]complex128, s.a.Sys.N)
	if err := s.a.AdjointAt(100, z); err != nil {
		t.Fatal(err)
	}
	total, _ := s.n.Total(z, 100)
	within(t, "Total against the sum of At", total, by["R"]+by["In"], 1e-14)
	within(t, "Of against At", s.n.Of(1, 100), by["In"], 1e-15)
}
