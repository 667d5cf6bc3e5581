package topology_test

import (
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

func TestDegeneratedAgainstEngine(t *testing.T) {
	cfAgree(t, "degenerated", []cfCase{
		{"defaults", nil, 1e3},
		{"defaults, high frequency", nil, 300e6},
		{"gate resistor and load", map[string]string{"Rg": "10k", "RL": "50k", "CL": "100f"}, 20e6},
		{"gate resistor, no capacitors", map[string]string{"Rg": "1M", "Cgs": "", "Cgd": ""}, 0},
		{"load only, DC", map[string]string{"RL": "20k", "Cgs": "", "Cgd": ""}, 0},
		{"light load, no capacitors", map[string]string{"RL": "1G", "Cgs": "", "Cgd": ""}, 1e3},
		{"gate resistor, Cgd only", map[string]string{"Rg": "2k", "Cgs": ""}, 1e9},
	})
}

// Source-degenerated output resistance (REFERENCES.md §3, check [derived];
// rO + RS + gm·rO·RS is the standard result, e.g. B. Razavi, Design of
// Analog CMOS Integrated Circuits, 2nd ed., 2017, ch. 3 [memory]):
// gm = 1 mS, rO = 100 kΩ, RS = 1 kΩ → Z₀ = 101 kΩ, T_sc = 0.9900990099,
// T_oc = 0, Rout = 201 kΩ. The stage always has a load parameter, so the
// unloaded check evaluates its forms and its generated circuit with the
// load left out (Forms and Circuit accept any Values), and reads the
// extras of the loaded stage.
func TestDegeneratedRazaviCheck(t *testing.T) {
	st, _ := topology.Lookup("degenerated")
	for _, v := range []topology.Values{
		{"gm": 1e-3, "ro": 100e3, "RS": 1e3},
		{"gm": 1e-3, "ro": 100e3, "RS": 1e3, "Rg": 47e3}, // the gate draws no current at DC
	} {
		fs := st.Forms(v, 0)
		p := fs.Ports[0]
		cfNear(t, "Z₀", real(p.Z0.Value), 101e3, 1e-12)
		cfNear(t, "T_sc", real(p.TShort.Value), 0.9900990099, 1e-10)
		if p.TOpen.Value != 0 {
			t.Errorf("T_oc = %v, want 0", p.TOpen.Value)
		}
		cfNear(t, "Rout", real(p.Z.Value), 201e3, 1e-12)
		cfNear(t, "extra Rout", cfExtra(t, fs, "low-frequency output resistance"), 201e3, 1e-12)
		resp, err := api.Analyze(api.Request{Circuit: st.Circuit(v), Reference: "Gm1", Ports: []string{"out"}, Frequency: 0})
		if err != nil {
			t.Fatal(err)
		}
		r := resp.Ports[0]
		cfNear(t, "engine Z₀", real(r.Z0.Value()), 101e3, 1e-9)
		cfNear(t, "engine T_sc", real(r.TShort.Value()), 0.9900990099, 1e-9)
		cfNear(t, "engine Rout", real(r.ZDirect.Value()), 201e3, 1e-9)
		if x := r.TOpen.Value(); rel(x, 0) > 1e-12 {
			t.Errorf("engine T_oc = %v, want 0", x)
		}
	}
	// With its load, the stage's extra gives the same unloaded 201 kΩ.
	vals, err := st.Values(map[string]string{"Cgs": "", "Cgd": "", "RL": "20k"})
	if err != nil {
		t.Fatal(err)
	}
	fs := st.Forms(vals, 0)
	cfNear(t, "extra Rout, load removed", cfExtra(t, fs, "output impedance with the load removed, real"), 201e3, 1e-12)
	cfNear(t, "port with the load", real(fs.Ports[0].Z.Value), 201e3*20e3/221e3, 1e-12)
}

// Low-frequency gain with a drain load, gate driven directly:
// −gm·rO·RL/(rO + RS + gm·rO·RS + RL) [derived; the degenerated
// common-source gain in its usual textbook form, e.g. Razavi ch. 3 [memory]].
func TestDegeneratedGain(t *testing.T) {
	st, _ := topology.Lookup("degenerated")
	params := map[string]string{"gm": "2m", "ro": "50k", "RS": "470", "RL": "10k", "Cgs": "", "Cgd": ""}
	v, _ := st.Values(params)
	fs := st.Forms(v, 0)
	gm, ro, rs, rl := 2e-3, 50e3, 470.0, 10e3
	cfNear(t, "gain", real(fs.Gain.Value), -gm*ro*rl/(ro+rs+gm*ro*rs+rl), 1e-12)
}
