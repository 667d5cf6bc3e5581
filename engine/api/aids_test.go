package api_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

// aidsCircuit is an inverting stage of our own, with a load.
const aidsCircuit = `vsource Vin src gnd 1
resistor R1 src sum 10k
resistor R2 out sum 47k
capacitor Cf out sum 10p
opamp U1 gnd sum out a0=200k gbw=1M rid=2M ro=75
resistor RL out gnd 10k
port in src gnd
port out out gnd
`

func aidsRequest(extra string) string {
	b, _ := json.Marshal(aidsCircuit)
	return fmt.Sprintf(`{"circuit": %s, "reference": "U1", "ports": ["in", "out"], "frequency": 1000, "gain": {"source": "Vin", "output": "out"}%s}`, b, extra)
}

// TestAidsRequestErrors: every bad design-aid request names its field.
func TestAidsRequestErrors(t *testing.T) {
	cases := []struct {
		extra, field, fragment string
	}{
		{`, "tolerance": {"parts": {"R7": "F"}}`, "tolerance.parts.R7", "no part called R7"},
		{`, "tolerance": {"parts": {"U1": "F"}}`, "tolerance.parts.U1", "tolerance.amps.U1"},
		{`, "tolerance": {"parts": {"Vin": "F"}}`, "tolerance.parts.Vin", "vsource"},
		{`, "tolerance": {"parts": {"R1": "Q"}}`, "tolerance.parts.R1", "not an IEC 60062 tolerance letter"},
		{`, "tolerance": {"parts": {"R1": "150%"}}`, "tolerance.parts.R1", "100 %"},
		{`, "tolerance": {"default": "X"}`, "tolerance.default", "letter"},
		{`, "tolerance": {"default": "none"}`, "tolerance", "nothing varies"},
		{`, "tolerance": {"distribution": "triangular"}`, "tolerance.distribution", "uniform"},
		{`, "tolerance": {"seed": -1}`, "tolerance.seed", "whole number"},
		{`, "tolerance": {"seed": 9007199254740992}`, "tolerance.seed", "2⁵³"},
		{`, "tolerance": {"trials": 1000000}`, "tolerance.trials", "100000"},
		{`, "tolerance": {"bins": -3}`, "tolerance.bins", "bins"},
		{`, "tolerance": {"sed": 3}`, "tolerance", `unknown field "sed"`},
		{`, "tolerance": true`, "tolerance", "object"},
		{`, "tolerance": {"amps": {"U9": {"a0Min": "50k"}}}`, "tolerance.amps.U9", "no opamp"},
		{`, "tolerance": {"amps": {"U1": {"a0Min": "500k"}}}`, "tolerance.amps.U1.a0Min", "at most the typical"},
		{`, "tolerance": {"amps": {"U1": {"a0Min": "5x"}}}`, "tolerance.amps.U1.a0Min", ""},
		{`, "tolerance": {"amps": {"U1": {"gbw": "5k"}}}`, "tolerance.amps.U1", `unknown field "gbw"`},
		{`, "tolerance": {"amps": {"U1": {"a0Min": 50000}}}`, "tolerance.amps.U1.a0Min", "a string"},
		{`, "tolerance": {"targets": [{"quantity": "z", "port": "out", "op": "<", "value": "1"}]}`, "tolerance.targets[0].value", "a number"},
		{`, "tolerance": {"targets": [{"quantity": "zz", "op": "<", "value": 1}]}`, "tolerance.targets[0].quantity", "not a quantity"},
		{`, "tolerance": {"targets": [{"quantity": "z", "port": "nope", "op": "<", "value": 1}]}`, "tolerance.targets[0].port", "not a port"},
		{`, "tolerance": {"targets": [{"quantity": "pm", "port": "out", "op": "<", "value": 1}]}`, "tolerance.targets[0].port", "no port"},
		{`, "tolerance": {"targets": [{"quantity": "pm", "op": "<=", "value": 45}]}`, "tolerance.targets[0].op", "\"<\""},
		{`, "standardValues": {"series": "E7"}`, "standardValues.series", "E24"},
		{`, "standardValues": {"capacitorSeries": "e5"}`, "standardValues.capacitorSeries", "IEC 60063"},
		{`, "standardValues": {"parts": ["U1"]}`, "standardValues.parts[0]", "no resistor or capacitor called U1"},
		{`, "standardValues": {"ratios": [{"num": "R2", "den": "R2"}]}`, "standardValues.ratios[0].den", "two different parts"},
		{`, "standardValues": {"ratios": [{"num": "R2", "den": "Cf"}]}`, "standardValues.ratios[0].den", "different kinds"},
		{`, "standardValues": {"ratios": [{"num": "R2", "den": "R1", "plus1": true, "gain": 0.5}]}`, "standardValues.ratios[0].gain", "above 1"},
		{`, "standardValues": {"ratios": [{"num": "R2", "den": "R1", "min": "10k", "max": "1k"}]}`, "standardValues.ratios[0].max", "below its min"},
		{`, "standardValues": {"ratios": [{"num": "R2", "den": "R1", "min": "1.02M", "max": "1.08M"}]}`, "standardValues", "no E24 value"},
		{`, "sensitivity": {"parameters": ["Rx"]}`, "sensitivity.parameters[0]", "no parameter called \"Rx\""},
		{`, "sensitivity": {"step": 0.5}`, "sensitivity.step", "0.05"},
		{`, "sensitivity": "yes"`, "sensitivity", "object"},
	}
	for _, c := range cases {
		// A bad key is refused as the request is read, or by the
		// analysis when it runs; either way the error names the field.
		var req api.Request
		err := json.Unmarshal([]byte(aidsRequest(c.extra)), &req)
		if err == nil {
			_, err = api.Analyze(req)
		}
		if err == nil {
			t.Errorf("%s: no error", c.extra)
			continue
		}
		b := api.Body(err)
		if b.Param != c.field || !strings.Contains(b.Message, c.fragment) {
			t.Errorf("%s:\n got %s: %s\nwant %s: …%s…", c.extra, b.Param, b.Message, c.field, c.fragment)
		}
	}
	// The gain and the phase margin can only be targets where they exist.
	req := api.Request{Circuit: aidsCircuit, Reference: "U1", Ports: []string{"out"}, Frequency: 1e3}
	api.Tolerance.Ask(&req, &api.ToleranceRequest{Targets: []api.TargetRequest{{Quantity: "g", Op: "<", Value: 1}}})
	if _, err := api.Analyze(req); err == nil || api.Body(err).Param != "tolerance.targets[0].quantity" {
		t.Errorf("a gain target without a gain: %v", err)
	}
	req.Topology, req.Circuit, req.Reference = "inverting", "", ""
	api.Tolerance.Ask(&req, &api.ToleranceRequest{Parts: map[string]string{"Rz": "F"}})
	if _, err := api.Analyze(req); err == nil || api.Body(err).Param != "tolerance.parts.Rz" || !strings.Contains(err.Error(), "stage inverting has no passive parameter") {
		t.Errorf("a stage part that does not exist: %v", err)
	}
}

// TestAidsEveryStage: all three aids answer for every catalog stage at its
// defaults, as JSON (which cannot carry NaN or Inf: encoding/json refuses
// them, so a leak would fail here).
func TestAidsEveryStage(t *testing.T) {
	for _, st := range topology.Catalog() {
		in := fmt.Sprintf(`{"topology": %q, "frequency": %g, "tolerance": {"trials": 200, "targets": [{"quantity": "z", "port": %q, "op": ">", "value": 1}]}, "sensitivity": true, "standardValues": {}}`,
			st.ID, st.Frequency, st.Ports[0].Name)
		out, ok := api.AnalyzeJSON([]byte(in))
		if !ok {
			t.Errorf("%s: %s", st.ID, out)
			continue
		}
		var resp struct {
			Tolerance      api.ToleranceResult      `json:"tolerance"`
			Sensitivity    api.SensitivityResult    `json:"sensitivity"`
			StandardValues api.StandardValuesResult `json:"standardValues"`
		}
		if err := json.Unmarshal(out, &resp); err != nil {
			t.Fatalf("%s: %v", st.ID, err)
		}
		if tr := resp.Tolerance; tr.Done != 200 || len(tr.Quantities) < 3*len(st.Ports) || len(tr.Targets) != 1 {
			t.Errorf("%s: tolerance ran %d trials with %d quantities and %d targets", st.ID, tr.Done, len(tr.Quantities), len(tr.Targets))
		}
		if n := len(resp.Sensitivity.Quantities); n < len(st.Ports) {
			t.Errorf("%s: %d sensitivity quantities", st.ID, n)
		}
		if len(resp.StandardValues.Variants) == 0 {
			t.Errorf("%s: no standard-value variant", st.ID)
		}
	}
}

// TestStartToleranceSliced: the page's sliced run gives the same result,
// byte for byte, as the one-shot run inside analyze.
func TestStartToleranceSliced(t *testing.T) {
	in := aidsRequest(`, "tolerance": {"default": "J", "amps": {"U1": {"a0Min": "100k", "gbwMin": "0.6M"}}, "distribution": "normal", "seed": 77, "trials": 500, "targets": [{"quantity": "pm", "op": "<", "value": 80}]}`)
	out, ok := api.AnalyzeJSON([]byte(in))
	if !ok {
		t.Fatal(string(out))
	}
	var whole struct {
		Tolerance json.RawMessage `json:"tolerance"`
	}
	if err := json.Unmarshal(out, &whole); err != nil {
		t.Fatal(err)
	}
	run, errJSON := api.StartToleranceJSON([]byte(in))
	if run == nil {
		t.Fatal(string(errJSON))
	}
	for {
		done, total := run.Step(37)
		if done == total {
			break
		}
		if done > total {
			t.Fatalf("done %d of %d", done, total)
		}
	}
	if got := run.ResultJSON(); !bytes.Equal(got, whole.Tolerance) {
		t.Errorf("sliced result differs from the one-shot result:\n%s\n%s", got, whole.Tolerance)
	}
	if run, e := api.StartToleranceJSON([]byte(aidsRequest(""))); run != nil || !bytes.Contains(e, []byte(`"param":"tolerance"`)) {
		t.Errorf("a request without tolerance started a run: %s", e)
	}
}

// TestToleranceHowlandStage: the catalog's Howland pump with the
// REFERENCES.md §3 values and 1 % resistors: the corner output resistance
// takes both signs (the swing through infinity the design aids must show),
// and the smallest |Z| is near R1/ε at |ε| ≈ 0.04 (Franco 3rd ed., ch. 2).
func TestToleranceHowlandStage(t *testing.T) {
	req := api.Request{Topology: "howland", Frequency: 1,
		Params: map[string]string{"R1": "15k", "R2": "4.5k", "R3": "15k", "R4": "4.5k", "a0": "100k", "gbw": "", "p2": "", "rid": "", "rcm": "", "ro": "1m", "RL": "", "CL": ""},
		Ports:  []string{"out"}}
	api.Tolerance.Ask(&req, &api.ToleranceRequest{Trials: 500})
	resp, err := api.Analyze(req)
	if err != nil {
		if strings.Contains(err.Error(), "no parameter") {
			t.Skipf("the howland stage's parameters changed: %v", err)
		}
		t.Fatal(err)
	}
	tr := api.Tolerance.Result(resp)
	for _, q := range tr.Quantities {
		switch q.ID {
		case "r:out":
			if !(*q.Corners.Min < 0 && *q.Corners.Max > 0) {
				t.Errorf("corner Re Z [%g, %g]: want both signs", *q.Corners.Min, *q.Corners.Max)
			}
		case "z:out":
			// |ε| at most 1 − 0.99²/1.01² = 0.0392 (or 1.01²/0.99² − 1 =
			// 0.0408), so |Z| ≥ about 14.85k/0.0408 = 364 kΩ … 15.15k/0.0392.
			if m := *q.Corners.Min; m < 360e3 || m > 390e3 {
				t.Errorf("smallest corner |Z| %g, want about R1/|ε| ≈ 370 kΩ", m)
			}
		}
	}
}
