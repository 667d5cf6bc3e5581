package topology_test

import (
	"math"
	"math/cmplx"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

func TestIntegratorAgainstEngine(t *testing.T) {
	cfAgree(t, "integrator", []cfCase{
		{"defaults", nil, 100},
		{"all optional parts", map[string]string{"Rs": "1k", "p2": "5M", "rcm": "10G", "rid": "10M", "CL": "1n"}, 3e3},
		{"pure integrator", map[string]string{"R2": ""}, 10},
		{"pure integrator, bare op amp", map[string]string{"R2": "", "gbw": "", "rid": "", "ro": "0"}, 1e3},
		{"damped, at DC", map[string]string{"Rs": "50", "rcm": "1G"}, 0},
		{"pure integrator with rid, at DC", map[string]string{"R2": "", "rid": "1G"}, 0},
	})
}

// The inverting integrator's ideal law vO/Vin = −1/(sR1C1), and −Z_f/R1 with
// the damping resistor (Franco, 3rd ed., ch. 3 [memory]); the input impedance
// with rid = ∞ is R1 + (Z_f + ro)/(1 + a), the inverting stage's form of
// Franco ch. 1 (REFERENCES.md §3) with R2 → Z_f.
func TestIntegratorIdealAndInput(t *testing.T) {
	st, _ := topology.Lookup("integrator")
	f := 1e3
	s := complex(0, 2*math.Pi*f)
	params := map[string]string{"a0": "1T", "gbw": "", "rid": "", "ro": "0", "R2": "", "R1": "47k", "C1": "3.3n"}
	v, _ := st.Values(params)
	fs := st.Forms(v, f)
	want := -1 / (s * 47e3 * 3.3e-9)
	if d := rel(fs.Gain.Value, want); d > 1e-9 {
		t.Errorf("ideal integrator gain %v, want %v (rel %.2g)", fs.Gain.Value, want, d)
	}
	resp, err := api.Analyze(api.Request{Topology: "integrator", Params: params, Frequency: f})
	if err != nil {
		t.Fatal(err)
	}
	if d := rel(resp.Gain.GDirect.Value(), want); d > 1e-9 {
		t.Errorf("engine integrator gain %v, want %v (rel %.2g)", resp.Gain.GDirect.Value(), want, d)
	}
	cfNear(t, "unity-gain frequency", cfExtra(t, fs, "unity-gain"), 1/(2*math.Pi*47e3*3.3e-9), 1e-12)

	// Damped, at DC: −R2/R1.
	params = map[string]string{"a0": "1T", "gbw": "", "rid": "", "ro": "0", "R1": "10k", "R2": "220k"}
	v, _ = st.Values(params)
	fs = st.Forms(v, 0)
	cfNear(t, "damped DC gain", real(fs.Gain.Value), -22, 1e-9)
	cfNear(t, "extra DC gain", cfExtra(t, fs, "DC gain"), -22, 1e-12)

	// Input impedance, finite a and ro, no rid, a load so light it does not count.
	params = map[string]string{"a0": "50k", "gbw": "2M", "rid": "", "ro": "75", "RL": "1T", "R1": "22k", "C1": "1n", "R2": ""}
	v, _ = st.Values(params)
	fs = st.Forms(v, f)
	m := 50e3 / (1 + complex(0, f*50e3/2e6))
	zf := 1 / (s * 1e-9)
	wantZ := 22e3 + (zf+75)/(1+m)
	if d := rel(fs.Ports[0].Z.Value, wantZ); d > 1e-8 {
		t.Errorf("input impedance %v, want R1 + (Z_f + ro)/(1 + a) = %v (rel %.2g)", fs.Ports[0].Z.Value, wantZ, d)
	}
	// Summing node, source zeroed: Z₀/(1+T) with Z₀ = R1 ∥ (Z_f + ro),
	// T = a·R1/(R1 + Z_f + ro) [derived].
	wantSum := 22e3 * (zf + 75) / (22e3*(1+m) + zf + 75)
	if d := rel(fs.Ports[1].Z.Value, wantSum); d > 1e-8 || cmplx.IsNaN(fs.Ports[1].Z.Value) {
		t.Errorf("summing node %v, want %v (rel %.2g)", fs.Ports[1].Z.Value, wantSum, d)
	}
}
