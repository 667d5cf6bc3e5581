package topology_test

import (
	"math"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

func TestHowlandAgainstEngine(t *testing.T) {
	cfAgree(t, "howland", []cfCase{
		{"defaults", nil, 100},
		{"all optional parts", map[string]string{"Rs": "50", "p2": "3M", "rcm": "500M", "rid": "1M", "CL": "10n"}, 12e3},
		{"no load", map[string]string{"RL": "", "CL": ""}, 1e3},
		{"capacitive load only, over-compensated", map[string]string{"RL": "", "CL": "1n", "R4": "10.2k"}, 50e3},
		{"bare op amp at DC", map[string]string{"gbw": "", "ro": "0", "RL": "470"}, 0},
	})
}

// Howland output resistance against the Blackman form and R1/ε
// (REFERENCES.md §3: R1 = R3 = 15 kΩ, R2 = 4.5 kΩ, a = 100 000, check values
// [derived]; the R1/ε limit from S. Franco, Design with Operational Amplifiers
// and Analog Integrated Circuits, 3rd ed., ch. 2 [found: as re-worked]).
func TestHowlandFrancoChecks(t *testing.T) {
	st, _ := topology.Lookup("howland")
	for _, c := range []struct {
		eps, want float64
	}{
		{0, 266.2756509e6},
		{0.04, 374.4823024e3},
		{-0.04, -375.5386857e3},
	} {
		params := map[string]string{"R1": "15k", "R2": "4.5k", "R3": "15k", "R4": cfTestNum(4.5e3 * (1 - c.eps)),
			"a0": "100k", "gbw": "", "rid": "", "rcm": "", "ro": "0", "RL": "", "CL": ""}
		v, err := st.Values(params)
		if err != nil {
			t.Fatal(err)
		}
		fs := st.Forms(v, 0)
		out := fs.Ports[0]
		cfNear(t, "closed-form Ro", real(out.Z.Value), c.want, 1e-9)
		cfNear(t, "Z₀ = R1∥R2", real(out.Z0.Value), 15e3*4.5e3/19.5e3, 1e-12)
		cfNear(t, "T_sc = aβN", real(out.TShort.Value), 1e5*15e3/(15e3+4.5e3*(1-c.eps)), 1e-12)
		cfNear(t, "extra Ro (load removed)", cfExtra(t, fs, "output impedance seen by the load (load removed), real"), c.want, 1e-9)
		if c.eps != 0 {
			re := cfExtra(t, fs, "mismatch-limited")
			cfNear(t, "R1/ε", re, 15e3/c.eps, 1e-9)
			// a = 1e5 is within 0.3 % of the a → ∞ limit here.
			cfNear(t, "Ro vs R1/ε", c.want, re, 3e-3)
		}
		resp, err := api.Analyze(api.Request{Topology: "howland", Params: params, Frequency: 0})
		if err != nil {
			t.Fatal(err)
		}
		cfNear(t, "engine Ro (Blackman)", real(resp.Ports[0].Z.Value()), c.want, 1e-9)
		cfNear(t, "engine Ro (direct)", real(resp.Ports[0].ZDirect.Value()), c.want, 1e-9)
	}
}

// Balanced bridge, near-ideal op amp: I_load = Vin/R1 into any load
// (Franco, ch. 2 [memory]); the op-amp output sits at vP(1 + R4/R3).
func TestHowlandTransconductance(t *testing.T) {
	st, _ := topology.Lookup("howland")
	for _, rl := range []string{"100", "2.2k"} {
		params := map[string]string{"R1": "10k", "R2": "10k", "R3": "10k", "R4": "10k", "a0": "1T", "gbw": "", "rid": "", "ro": "0", "RL": rl}
		v, _ := st.Values(params)
		fs := st.Forms(v, 0)
		cfNear(t, "load current per volt", cfExtra(t, fs, "load current per volt"), 1/10e3, 1e-9)
		cfNear(t, "op-amp output per volt", cfExtra(t, fs, "op-amp output swing"), 2*v["RL"]/10e3, 1e-9)
		resp, err := api.Analyze(api.Request{Topology: "howland", Params: params, Frequency: 0, Gain: &api.GainSpec{Source: "Vin", Output: "vo"}})
		if err != nil {
			t.Fatal(err)
		}
		cfNear(t, "engine vO/Vin", math.Abs(real(resp.Gain.GDirect.Value())), cfExtra(t, fs, "op-amp output swing"), 1e-9)
	}
}

// The compliance extra |vO/Vin| equals the engine's gain to the op-amp
// output for the full model.
func TestHowlandOutputSwingAgainstEngine(t *testing.T) {
	st, _ := topology.Lookup("howland")
	for _, params := range []map[string]string{nil, {"rid": "1M", "rcm": "100M", "Rs": "600", "p2": "4M", "CL": "2n"}} {
		f := 30e3
		v, _ := st.Values(params)
		fs := st.Forms(v, f)
		resp, err := api.Analyze(api.Request{Topology: "howland", Params: params, Frequency: f, Gain: &api.GainSpec{Source: "Vin", Output: "vo"}})
		if err != nil {
			t.Fatal(err)
		}
		g := resp.Gain.GDirect.Value()
		cfNear(t, "|vO/Vin|", cfExtra(t, fs, "op-amp output swing"), math.Hypot(real(g), imag(g)), 1e-9)
	}
}
