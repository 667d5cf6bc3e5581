package noise_test

import (
	"math"
	"strconv"
	"testing"

	"zport/engine/circuit"
	"zport/engine/noise"
)

// A common-emitter stage with its base held at AC ground through rb: the
// output noise at low frequency is the textbook sum (P. R. Gray, P. J.
// Hurst, S. H. Lewis, R. G. Meyer, Analysis and Design of Analog
// Integrated Circuits, 5th ed., 2009, ch. 11 [memory]) of the collector
// shot noise 2q·Ic straight into RC, and the base shot noise 2q·Ic/β and
// rb's 4kT/rb, both as currents into rb ∥ rπ at the internal base, times
// gm·RC:
//
//	S = RC²·(2q·Ic + gm²·(rb∥rπ)²·(4kT/rb + 2q·Ic/β)),
//
// gm = Ic/VT, rπ = β/gm, with k, q the exact SI constants.
func TestBJTNoise(t *testing.T) {
	const (
		T    = 300.0
		ic   = 1e-3
		beta = 120.0
		rb   = 150.0
		RC   = 2e3
	)
	for _, tc := range []struct{ name, line string }{
		{"ic given", "bjt Q1 c b gnd ic=1m beta=120 rb=150"},
		// gm given directly: the engine takes Ic = gm·VT.
		{"gm given", "bjt Q1 c b gnd gm=" + strconv.FormatFloat(ic/(noise.Boltzmann*T/noise.Charge), 'g', -1, 64) + " beta=120 rb=150"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := newSetup(t, "vsource Vin b gnd 1\n"+tc.line+"\nresistor RC c gnd 2k noise=off", "Q1", "c", "Vin", T)
			got, by, _ := s.density(t, 10)
			vt := noise.Boltzmann * T / noise.Charge
			gm := ic / vt
			rpi := beta / gm
			par := rb * rpi / (rb + rpi)
			q, k := noise.Charge, noise.Boltzmann
			want := math.Sqrt(RC * RC * (2*q*ic + gm*gm*par*par*(4*k*T/rb+2*q*ic/beta)))
			within(t, "output density", got, want, 1e-12)
			within(t, "collector shot", by["Q1.ic"], RC*RC*2*q*ic, 1e-12)
			within(t, "rb thermal", by["Q1.rb"], sq(gm*RC*par)*4*k*T/rb, 1e-12)
			within(t, "base shot", by["Q1.ib"], sq(gm*RC*par)*2*q*ic/beta, 1e-12)
		})
	}
}

// A mos with its gate at AC ground: the channel's thermal noise current
// 4kT·γ·gm (the long-channel result, same textbook [memory]) flows into
// the drain resistor; with ro it divides between ro and RD.
func TestMOSNoise(t *testing.T) {
	const T = 290.0
	s := newSetup(t, "vsource Vin g gnd 1\nmos M1 d g gnd gm=2m ro=40k gamma=1.2\nresistor RD d gnd 10k noise=off", "M1", "d", "Vin", T)
	got, _, _ := s.density(t, 1e3)
	r := 40e3 * 10e3 / 50e3
	want := math.Sqrt(4*noise.Boltzmann*T*1.2*2e-3) * r
	within(t, "output density", got, want, 1e-12)

	// The default γ is 2/3.
	s = newSetup(t, "vsource Vin g gnd 1\nmos M1 d g gnd gm=2m\nresistor RD d gnd 10k noise=off", "M1", "d", "Vin", T)
	got, _, _ = s.density(t, 1e3)
	within(t, "output density, default γ", got, math.Sqrt(4*noise.Boltzmann*T*circuit.DefaultGamma*2e-3)*10e3, 1e-12)
}
