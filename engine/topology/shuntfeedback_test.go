package topology_test

import (
	"fmt"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

func TestShuntFeedbackAgainstEngine(t *testing.T) {
	cfAgree(t, "shuntfeedback", []cfCase{
		{"defaults", nil, 1e6},
		{"defaults, 500 MHz", nil, 500e6},
		{"no Early effect, load capacitance", map[string]string{"VA": "", "CL": "5p"}, 30e6},
		{"no capacitors, DC", map[string]string{"Cpi": "", "Cmu": ""}, 0},
	})
	// The analysis temperature sets VT, in the engine and the closed forms.
	cfAgreeAt(t, "shuntfeedback", 398.15, []cfCase{
		{"hot, low current", map[string]string{"IC": "100u", "RC": "22k", "RF": "220k", "Rs": "1k"}, 10e3},
	})
}

// VT = kT/q from the exact SI constants (BIPM SI Brochure, 9th ed., 2019):
// 25.851 999 8 mV at 300 K, 25.6926 mV at 298.15 K (REFERENCES.md §6
// [derived]); gm = IC/VT and rπ = β/gm as the generated circuit uses them.
func TestShuntFeedbackThermalVoltage(t *testing.T) {
	st, _ := topology.Lookup("shuntfeedback")
	for _, c := range []struct {
		T    float64
		vt   float64
		digs float64
	}{{300, 25.8519998e-3, 1e-9}, {298.15, 25.6926e-3, 2e-6}} {
		v, err := st.Values(map[string]string{"IC": "1m", "beta": "150"})
		if err != nil {
			t.Fatal(err)
		}
		v[topology.TemperatureKey] = c.T
		fs := st.Forms(v, 0)
		cfNear(t, fmt.Sprint("VT at ", c.T, " K"), cfExtra(t, fs, "thermal voltage"), c.vt, c.digs)
		cfNear(t, "gm", cfExtra(t, fs, "transconductance"), 1e-3/c.vt, c.digs)
		cfNear(t, "rπ", cfExtra(t, fs, "rπ"), 150*c.vt/1e-3, c.digs)
	}
}

// Low-frequency input and output resistance of the shunt-shunt stage:
// base: rπ ∥ (RF + RC′)/(1 + gm·RC′); collector: RC′ ∥ (RF + Rs′)/(1 + gm·Rs′),
// RC′ = RC ∥ ro, Rs′ = Rs ∥ rπ (the textbook shunt-feedback forms, e.g. Sedra
// and Smith, Microelectronic Circuits, feedback chapter [memory]; re-derived
// here by nodal analysis [derived]). The engine's port values match them.
func TestShuntFeedbackLowFrequency(t *testing.T) {
	st, _ := topology.Lookup("shuntfeedback")
	params := map[string]string{"Cpi": "", "Cmu": "", "IC": "2m", "beta": "120", "VA": "80", "RC": "2.2k", "RF": "47k", "Rs": "600"}
	v, _ := st.Values(params)
	vt := 1.380649e-23 * 300 / 1.602176634e-19
	gm := 2e-3 / vt
	rpi := 120 / gm
	ro := 80 / 2e-3
	rc := 2.2e3 * ro / (2.2e3 + ro)
	rsp := 600 * rpi / (600 + rpi)
	par := func(a, b float64) float64 { return a * b / (a + b) }
	wantIn := 600 + par(rpi, (47e3+rc)/(1+gm*rc))
	wantOut := par(rc, (47e3+rsp)/(1+gm*rsp))
	fs := st.Forms(v, 0)
	cfNear(t, "closed-form Zin", real(fs.Ports[0].Z.Value), wantIn, 1e-12)
	cfNear(t, "closed-form Zout", real(fs.Ports[1].Z.Value), wantOut, 1e-12)
	resp, err := api.Analyze(api.Request{Topology: "shuntfeedback", Params: params, Frequency: 0})
	if err != nil {
		t.Fatal(err)
	}
	cfNear(t, "engine Zin", real(resp.Ports[0].ZDirect.Value()), wantIn, 1e-9)
	cfNear(t, "engine Zout", real(resp.Ports[1].ZDirect.Value()), wantOut, 1e-9)
	// Gain: with vb known, vc follows from the collector node [derived].
	// vC/Vin = −Gs(gm − GF)/((Gs+Gπ)(Gc+GF) + GF·Gc + gm·GF).
	gs, gpi, gf, gc := 1/600.0, 1/rpi, 1/47e3, 1/rc
	wantG := -gs * (gm - gf) / ((gs+gpi)*(gc+gf) + gf*gc + gm*gf)
	cfNear(t, "engine gain", real(resp.Gain.GDirect.Value()), wantG, 1e-9)
}
