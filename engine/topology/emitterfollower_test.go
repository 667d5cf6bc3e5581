package topology_test

import (
	"math"
	"math/cmplx"
	"strconv"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

// vtAt is kT/q from the exact SI constants (BIPM SI Brochure, 9th ed., 2019).
func vtAt(kelvin float64) float64 { return 1.380649e-23 * kelvin / 1.602176634e-19 }

func efEngine(t *testing.T, params map[string]string, f float64, ports ...string) *api.Response {
	t.Helper()
	r, err := api.Analyze(api.Request{Topology: "emitterfollower", Params: params, Frequency: f, Ports: ports})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// At low frequency the follower's output resistance is the base circuit's
// resistance divided by β0 + 1, in parallel with what else loads the
// emitter: (Rs + rb + rπ)/(1 + β0) ∥ ro ∥ RE ∥ RL, rπ = β0·VT/IC, ro = VA/IC
// (P. R. Gray, P. J. Hurst, S. H. Lewis, R. G. Meyer, 5th ed., ch. 7
// [memory]; the parallel terms derived here by KCL at the emitter).
func TestEmitterFollowerLowFrequency(t *testing.T) {
	for _, c := range []struct {
		ic, beta, rs, rb, va, re, rl float64
	}{
		{2e-3, 120, 5e3, 80, 60, 0, 1e3},
		{0.1e-3, 50, 100e3, 0, 0, 47e3, 10e3},
		{10e-3, 300, 50, 20, 100, 0, 75},
	} {
		params := map[string]string{"IC": num(c.ic), "beta": num(c.beta), "Rs": num(c.rs), "RL": num(c.rl), "CL": "", "Cmu": ""}
		params["rb"], params["VA"], params["RE"] = "", "", ""
		if c.rb > 0 {
			params["rb"] = num(c.rb)
		}
		if c.va > 0 {
			params["VA"] = num(c.va)
		}
		if c.re > 0 {
			params["RE"] = num(c.re)
		}
		r := efEngine(t, params, 0, "out")
		rpi := c.beta * vtAt(300) / c.ic
		g := (1+c.beta)/(c.rs+c.rb+rpi) + 1/c.rl
		if c.va > 0 {
			g += c.ic / c.va
		}
		if c.re > 0 {
			g += 1 / c.re
		}
		cfNear(t, "Zout at DC", real(r.Ports[0].ZDirect.Value()), 1/g, 1e-9)
		if imag(r.Ports[0].ZDirect.Value()) != 0 {
			t.Errorf("Zout at DC has an imaginary part %g", imag(r.Ports[0].ZDirect.Value()))
		}
	}
}

// Above fT/β0 the transistor's β falls and the output impedance of the
// follower alone becomes Zo = (Rbt + Zπ)/(1 + gm·Zπ), Rbt = Rs + rb,
// Zπ = rπ ∥ 1/(sCπ) [derived], which is exactly R1 + R2 ∥ sL with
// R1 = (Rbt + rπ)/(1 + β0), R2 = Rbt − R1, L = R2·rπ·Cπ/(1 + β0): an
// inductance when Rbt > 1/gm (Gray, Hurst, Lewis, Meyer, 5th ed., ch. 7
// [memory]: R1 ≈ 1/gm + Rbt/β0, L ≈ Rbt/ωT for β0 ≫ 1 and Rbt ≫ 1/gm).
// The band where it is inductive runs from the zero ωz = 1/(Cπ·(Rbt ∥ rπ))
// to the pole ωp = (1 + β0)/(rπ·Cπ) ≈ ωT. Checked with Cμ, ro and the load
// out of the way (RL = 1 TΩ), then with the stage's defaults.
func TestEmitterFollowerInductive(t *testing.T) {
	const ic, beta, ft, rs, rb = 2e-3, 120.0, 300e6, 5e3, 80.0
	gm := ic / vtAt(300)
	rpi := beta / gm
	cpi := gm / (2 * math.Pi * ft)
	rbt := rs + rb
	r1 := (rbt + rpi) / (1 + beta)
	r2 := rbt - r1
	wp := (1 + beta) / (rpi * cpi)
	l := r2 / wp
	wz := 1 / (cpi * rbt * rpi / (rbt + rpi))
	bare := map[string]string{"Cmu": "", "VA": "", "RE": "", "RL": "1T", "CL": ""}
	prevMag := 0.0
	for _, f := range []float64{wz / (2 * math.Pi) * 2, 10e6, 30e6, 60e6, wp / (2 * math.Pi) / 2} {
		r := efEngine(t, bare, f, "out")
		z := r.Ports[0].ZDirect.Value()
		s := complex(0, 2*math.Pi*f)
		want := complex(r1, 0) + complex(r2, 0)*s*complex(l, 0)/(complex(r2, 0)+s*complex(l, 0))
		if cmplx.Abs(z-want) > 1e-8*cmplx.Abs(want) {
			t.Errorf("%g Hz: Zout %v, R1 + R2 ∥ sL gives %v", f, z, want)
		}
		if ph := cmplx.Phase(z) * 180 / math.Pi; ph <= 10 {
			t.Errorf("%g Hz: phase %.3g°, want inductive in the band fz…fp", f, ph)
		}
		if cmplx.Abs(z) <= prevMag {
			t.Errorf("%g Hz: |Zout| %.4g does not rise", f, cmplx.Abs(z))
		}
		prevMag = cmplx.Abs(z)
	}
	// Gray–Meyer's approximations, within their first order in 1/β0 and
	// 1/(gm·Rbt).
	if d := math.Abs((1/gm+rbt/beta)/r1 - 1); d > 2/beta {
		t.Errorf("R1 ≈ 1/gm + Rbt/β0 is %.3g off", d)
	}
	if d := math.Abs((rbt/(2*math.Pi*ft))/l - 1); d > 3/beta+1/(gm*rbt) {
		t.Errorf("L ≈ Rbt/ωT is %.3g off", d)
	}
	// Below the band the output is resistive, R1 to within the band's
	// first-order phase.
	r := efEngine(t, bare, ft/beta/100, "out")
	if ph := cmplx.Phase(r.Ports[0].ZDirect.Value()) * 180 / math.Pi; ph < 0 || ph > 2 {
		t.Errorf("at fT/β0/100 the phase is %.3g°, want resistive", ph)
	}
	// From a low source resistance (Rbt < 1/gm) it does not turn inductive.
	low := map[string]string{"Cmu": "", "VA": "", "RE": "", "RL": "1T", "CL": "", "Rs": "5", "rb": ""}
	r = efEngine(t, low, 30e6, "out")
	if ph := cmplx.Phase(r.Ports[0].ZDirect.Value()); ph >= 0 {
		t.Errorf("Rs = 5 Ω < 1/gm: phase %.3g rad at 30 MHz, want capacitive", ph)
	}

	// The stage as its defaults stand (Cμ, ro, RE, RL): still inductive
	// across the band from 2·fT/β0 to fT/5.
	for f := 2 * ft / beta; f <= ft/5; f *= 2 {
		r := efEngine(t, nil, f, "out")
		if ph := cmplx.Phase(r.Ports[0].ZDirect.Value()); ph <= 0 {
			t.Errorf("defaults at %g Hz: phase %.3g rad, want inductive", f, ph)
		}
	}
	// The design values give the same R1, L and band edges.
	st := efEngine(t, nil, 10e6).Topology
	for _, c := range []struct {
		prefix string
		want   float64
	}{{"transistor's low-frequency output resistance", (rbt + beta/gm) / (1 + beta)}} {
		for _, x := range st.Extras {
			if len(x.Name) >= len(c.prefix) && x.Name[:len(c.prefix)] == c.prefix {
				cfNear(t, c.prefix, *x.Value, c.want, 1e-12)
			}
		}
	}
}

// The closed-form gain at low frequency is the follower's
// (1 + β0)·Re′/(Rs + rb + rπ + (1 + β0)·Re′) (Gray, Hurst, Lewis, Meyer,
// 5th ed., ch. 7 [memory]), against the engine.
func TestEmitterFollowerGain(t *testing.T) {
	r := efEngine(t, map[string]string{"Cmu": "", "CL": ""}, 0)
	gm := 2e-3 / vtAt(300)
	rpi := 120 / gm
	re := 1 / (1/1e3 + 1/2.2e3 + 2e-3/60)
	cfNear(t, "gain", real(r.Gain.GDirect.Value()), 121*re/(5e3+80+rpi+121*re), 1e-9)
}

// At another temperature, gm = IC/VT follows kT/q, and so does the
// low-frequency output resistance.
func TestEmitterFollowerTemperature(t *testing.T) {
	hot := 360.0
	r, err := api.Analyze(api.Request{Topology: "emitterfollower", Params: map[string]string{"VA": "", "Cmu": "", "CL": ""}, Frequency: 0, Temperature: &hot})
	if err != nil {
		t.Fatal(err)
	}
	rpi := 120 * vtAt(hot) / 2e-3
	r1 := (5e3 + 80 + rpi) / 121
	cfNear(t, "Zout at 360 K", real(r.Ports[0].ZDirect.Value()), 1/(1/r1+1/1e3+1/2.2e3), 1e-9)
	checkForms(t, mustStage(t, "emitterfollower"), r, "at 360 K")
	if r.Topology.Params["temperature"] != 0 {
		t.Errorf("the temperature is echoed as a stage parameter")
	}
}

func mustStage(t *testing.T, id string) *topology.Topology {
	t.Helper()
	st, ok := topology.Lookup(id)
	if !ok {
		t.Fatalf("no stage %s", id)
	}
	return st
}
