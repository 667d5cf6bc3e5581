package noise_test

import (
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/noise"
)

const kT300 = noise.Boltzmann * 300

// Non-inverting stage (our values; ideal opamp approached with a0 = 10¹²,
// no poles, no ro, infinite input resistances), source resistance Rs:
//
//	e_o² = [en² + (in·Rs)² + 4kT·Rs]·(1 + R2/R1)² + (in·R2)²
//	       + 4kT·R1·(R2/R1)² + 4kT·R2
//
// [derived] from the node equations with the + input following the
// source and the − input held to it: en and the source side see the
// noise gain 1 + R2/R1; a current into the − input (in, and R1's thermal
// current 4kT/R1) leaves through R2; R2's own current appears across it.
// This is the textbook sum of en·(1 + R2/R1), in·R2 and the resistors'
// 4kT terms. en and in carry 1/f corners, en(f)² = en²(1 + fce/f).
func TestNonInvertingSum(t *testing.T) {
	const rs, r1, r2, en, fce, in, fci = 10e3, 2e3, 18e3, 5e-9, 100, 2e-12, 1e3
	s := newSetup(t, `
vsource  Vin src gnd 0
resistor Rs  src plus 10k
opamp    U1  plus fb out a0=1e12 en=5n fce=100 in=2p fci=1k
resistor R1  fb  gnd 2k
resistor R2  out fb 18k
`, "U1", "out", "Vin", 300)
	g := 1 + r2/r1
	for _, f := range []float64{0.1, 10, 1e3, 1e5, 1e8} {
		en2 := en * en * (1 + fce/f)
		in2 := in * in * (1 + fci/f)
		want2 := (en2+in2*rs*rs+4*kT300*rs)*g*g + in2*r2*r2 + 4*kT300*r1*(r2/r1)*(r2/r1) + 4*kT300*r2
		got, by, gain := s.density(t, f)
		within(t, "output density", got, math.Sqrt(want2), 1e-9)
		within(t, "gain", cmplx.Abs(gain), g, 1e-9)
		within(t, "input-referred density", got/cmplx.Abs(gain), math.Sqrt(want2)/g, 1e-9)
		within(t, "U1.en", by["U1.en"], en2*g*g, 1e-9)
		within(t, "U1.in-", by["U1.in-"], in2*r2*r2, 1e-9)
		within(t, "R1", by["R1"], 4*kT300*r2*r2/r1, 1e-9)
	}
}

// Photodiode transimpedance stage (our values; ideal opamp a0 = 10¹², no
// poles, ro = 0), detector capacitance Cd, feedback Rf ∥ Cf. With
// Zi = 1/(sCd) and Zf = Rf/(1 + sRf·Cf) [derived from the node equations]:
//
//	e_o² = en²·|1 + Zf/Zi|² + (in² + 4kT/Rf)·|Zf|²
//
// At low frequency Zf → Rf and the noise gain 1 + Zf/Zi → 1:
// √(4kT·Rf + (in·Rf)² + en²·NG²); above the noise gain's zero, and far
// above Rf·Cf, it is en·(1 + Cd/Cf) (common practice; Graeme,
// Photodiode Amplifiers, 1996 [memory]). Referred to the input current,
// the density is e_o/|Zf|: √(4kT/Rf + in² + (en·NG/Rf)²) at low frequency.
func TestTransimpedanceNoise(t *testing.T) {
	const rf, cf, cd, en, fce, in = 1e6, 1e-12, 20e-12, 8e-9, 100, 1e-15
	s := newSetup(t, `
isource  Iin gnd sum 0
capacitor Cd sum gnd 20p
resistor Rf  out sum 1M
capacitor Cf out sum 1p
opamp    U1  gnd sum out a0=1e12 en=8n fce=100 in=1f
`, "U1", "out", "Iin", 300)
	enf := func(f float64) float64 { return en * math.Sqrt(1+fce/f) }
	for _, f := range []float64{0.01, 1, 100, 7.5e3, 1e5, 1e6, 1e9} {
		w := complex(0, 2*math.Pi*f)
		zf := rf / (1 + w*rf*cf)
		ng := 1 + zf*w*cd
		want := math.Sqrt(enf(f)*enf(f)*sq(cmplx.Abs(ng)) + (in*in+4*kT300/rf)*sq(cmplx.Abs(zf)))
		got, _, g := s.density(t, f)
		within(t, "output density", got, want, 1e-9)
		within(t, "transimpedance", cmplx.Abs(g), cmplx.Abs(zf), 1e-9)
	}
	low, _, g := s.density(t, 0.01)
	within(t, "low-frequency form", low, math.Sqrt(4*kT300*rf+sq(in*rf)+sq(enf(0.01))), 1e-8)
	within(t, "low-frequency input current noise", low/cmplx.Abs(g), math.Sqrt(4*kT300/rf+in*in+sq(enf(0.01)/rf)), 1e-8)
	high, _, _ := s.density(t, 1e9)
	within(t, "en·(1 + Cd/Cf) above the zero", high, enf(1e9)*(1+cd/cf), 1e-6)
}

func sq(x float64) float64 { return x * x }

// NoiseGain against 1 + Zf/Zi on the same TIA with a real opamp (a0 =
// 10⁵, gbw = 10 MHz, ro = 0): 1/β does not depend on the opamp's gain, so
// the agreement is exact whatever a(s); the en transfer k·h is
// NG·T/(1 + T).
func TestNoiseGain(t *testing.T) {
	const rf, cf, cd = 1e6, 1e-12, 20e-12
	s := newSetup(t, `
isource  Iin gnd sum 0
capacitor Cd sum gnd 20p
resistor Rf  out sum 1M
capacitor Cf out sum 1p
opamp    U1  gnd sum out a0=100k gbw=10M en=8n
`, "U1", "out", "Iin", 300)
	u1, _ := s.c.PartIndex("U1")
	br := s.a.Sys.Branch[u1]
	for _, f := range []float64{1, 1e3, 1e5, 1e6, 1e7} {
		pt, err := s.a.At(f)
		if err != nil {
			t.Fatal(err)
		}
		w := complex(0, 2*math.Pi*f)
		zf := rf / (1 + w*rf*cf)
		want := 1 + zf*w*cd
		k := s.c.Parts[u1].Amp.Gain(f)
		ng := noise.NoiseGain(pt.Adjoint[br], pt.T, k)
		if d := cmplx.Abs(ng-want) / cmplx.Abs(want); d > 1e-12 {
			t.Errorf("f=%g: noise gain %v, want 1 + Zf/Zi = %v (%.2g)", f, ng, want, d)
		}
		_, by, _ := s.density(t, f)
		within(t, "en power against |NG·T/(1+T)|²·en²", by["U1.en"], sq(cmplx.Abs(want*pt.T/(1+pt.T)))*64e-18, 1e-10)
	}
	if !cmplx.IsNaN(noise.NoiseGain(1, 0, 1)) {
		t.Error("NoiseGain with T = 0 is not NaN")
	}
}
