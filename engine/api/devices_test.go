package api_test

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/engine/circuit"
)

// A common-emitter stage of our own: bjt from its bias, emitter resistor.
const ceCircuit = `vsource Vin b gnd 1
bjt Q1 c b e ic=1m beta=100 ft=300M cmu=1p
resistor RE e gnd 100
resistor RC c gnd 5k
port out c gnd
`

func kelvin(x float64) *float64 { return &x }

// The devices list carries the values the engine derived, and the
// analysis temperature the request set: gm = IC/VT, VT = kT/q with the
// exact SI constants (BIPM SI Brochure, 9th ed., 2019); IC = 1 mA at 300 K
// gives gm = 38.6817 mS (REFERENCES.md §11 [derived]).
func TestDevicesInResponse(t *testing.T) {
	r, err := api.Analyze(api.Request{Circuit: ceCircuit, Reference: "Q1", Ports: []string{"out"}, Frequency: 1e3})
	if err != nil {
		t.Fatal(err)
	}
	if r.Temperature != 300 || len(r.Devices) != 1 {
		t.Fatalf("temperature %g, devices %+v", r.Temperature, r.Devices)
	}
	d := r.Devices[0]
	if d.Name != "Q1" || d.Kind != "bjt" || d.Line != 2 || strings.Join(d.Nodes, " ") != "c b e" {
		t.Errorf("device %+v", d)
	}
	if math.Abs(d.Gm-38.6817e-3) > 1e-7 || math.Abs(*d.VT-25.852e-3) > 0.5e-6 {
		t.Errorf("gm %.7g S, VT %.7g V; want 38.6817 mS and 25.852 mV", d.Gm, *d.VT)
	}
	if math.Abs(*d.Rpi-100/d.Gm) > 1e-12**d.Rpi || math.Abs(*d.Ib-1e-5) > 1e-20 || d.Ro != nil || d.Id != nil {
		t.Errorf("rπ %v, Ib %v, ro %v, id %v", *d.Rpi, *d.Ib, d.Ro, d.Id)
	}
	if want := d.Gm/(2*math.Pi*300e6) - 1e-12; math.Abs(*d.Cpi-want) > 1e-12*want {
		t.Errorf("Cπ = %g, want gm/(2π·fT) − Cμ = %g", *d.Cpi, want)
	}

	// At 350 K, gm = IC/VT falls as 1/T.
	hot, err := api.Analyze(api.Request{Circuit: ceCircuit, Reference: "Q1", Ports: []string{"out"}, Frequency: 1e3, Temperature: kelvin(350)})
	if err != nil {
		t.Fatal(err)
	}
	if hot.Temperature != 350 || math.Abs(hot.Devices[0].Gm-d.Gm*300/350) > 1e-15 {
		t.Errorf("at 350 K: temperature %g, gm %.17g, want %.17g", hot.Temperature, hot.Devices[0].Gm, d.Gm*300/350)
	}
	if hot.Ports[0].Z.Value() == r.Ports[0].Z.Value() {
		t.Error("the temperature does not reach the analysis")
	}

	// JSON: the field is read, and ro is null when infinite.
	b, _ := json.Marshal(ceCircuit)
	out, ok := api.AnalyzeJSON([]byte(`{"circuit": ` + string(b) + `, "reference": "Q1", "ports": ["out"], "frequency": 1000, "temperature": 400}`))
	if !ok || !strings.Contains(string(out), `"temperature":400`) || !strings.Contains(string(out), `"ro":null`) || !strings.Contains(string(out), `"devices":[{"name":"Q1","kind":"bjt"`) {
		t.Errorf("JSON answer: %.400s", out)
	}

	// A circuit without transistors has no devices key.
	out, _ = api.AnalyzeJSON([]byte(`{"circuit": "vsource V1 a gnd 1\nresistor R1 a b 1k\nvccs G1 b gnd sense=a,gnd gm=1m\nport p b gnd\n", "reference": "G1", "frequency": 0}`))
	if strings.Contains(string(out), "devices") {
		t.Errorf("devices listed for a circuit without transistors: %.300s", out)
	}
}

// A bad temperature names the field.
func TestTemperatureErrors(t *testing.T) {
	for _, k := range []float64{0, -10, 1000.5, math.Inf(1), math.NaN()} {
		_, err := api.Analyze(api.Request{Circuit: ceCircuit, Reference: "Q1", Frequency: 1e3, Temperature: kelvin(k)})
		var p *api.Problem
		if !errors.As(err, &p) || p.Param != "temperature" || !strings.Contains(p.Msg, "kelvin") {
			t.Errorf("temperature %g: %v, want an error naming the field", k, err)
		}
	}
	if _, err := api.Analyze(api.Request{Circuit: ceCircuit, Reference: "Q1", Frequency: 1e3, Temperature: kelvin(1000)}); err != nil {
		t.Errorf("1000 K: %v", err)
	}
}

// A circuit parsed at one temperature and prepared for another is parsed
// again at the request's.
func TestPrepareParsedAtTemperature(t *testing.T) {
	c, err := circuit.Parse(ceCircuit)
	if err != nil {
		t.Fatal(err)
	}
	p, err := api.PrepareParsed(api.Request{Circuit: ceCircuit, Reference: "Q1", Frequency: 1e3, Temperature: kelvin(250)}, c)
	if err != nil {
		t.Fatal(err)
	}
	if p.Circuit.Temperature != 250 || p.Circuit.Parts[1].Dev.Gm != 1e-3/circuit.ThermalVoltage(250) {
		t.Errorf("prepared at %g K with gm %g", p.Circuit.Temperature, p.Circuit.Parts[1].Dev.Gm)
	}
}

// A transistor's gm is a parameter of the sensitivities. Through the
// degenerated common-emitter gain G = −gm·RC/(1 + (gm + 1/rπ)·RE) with rπ
// held, ∂ln|G|/∂ln gm = 1 − gm·RE/(1 + (gm + 1/rπ)·RE) [derived].
func TestDeviceSensitivity(t *testing.T) {
	const text = `vsource Vin b gnd 1
bjt Q1 c b e ic=1m beta=100
resistor RE e gnd 100
resistor RC c gnd 5k
port out c gnd
`
	b, _ := json.Marshal(text)
	out, ok := api.AnalyzeJSON([]byte(`{"circuit": ` + string(b) + `, "reference": "Q1", "ports": ["out"], "gain": {"source": "Vin", "output": "c"}, "frequency": 0, "sensitivity": {"parameters": ["Q1.gm"]}}`))
	if !ok {
		t.Fatalf("%s", out)
	}
	var r struct {
		Sensitivity api.SensitivityResult `json:"sensitivity"`
	}
	if err := json.Unmarshal(out, &r); err != nil {
		t.Fatal(err)
	}
	gm := 1e-3 / circuit.ThermalVoltage(300)
	want := 1 - gm*100/(1+(gm+gm/100)*100)
	found := false
	for _, q := range r.Sensitivity.Quantities {
		if q.ID != "g" {
			continue
		}
		for _, e := range q.Entries {
			if e.Parameter == "Q1.gm" {
				found = true
				if e.Value == nil || math.Abs(*e.Value-want) > 1e-8 || e.Unit != "S" || e.Nominal != gm {
					t.Errorf("sensitivity of g to Q1.gm: %+v, want %.10g", e, want)
				}
			}
		}
	}
	if !found {
		t.Errorf("no sensitivity to Q1.gm in %s", out)
	}
}
