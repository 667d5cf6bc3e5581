package calc

import (
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/internal/sitetest"
)

// The Transistors section shows every device's derived values with the
// engine's numbers in data-value, and is absent without transistors.
func TestPanelDevices(t *testing.T) {
	const text = `# invented values
vsource Vin b gnd 1
bjt Q1 c b e ic=1m beta=150 ft=400M cmu=0.5p rb=50
resistor RE e gnd 470
resistor RC c gnd 4.7k
mos M1 d c gnd id=100u vov=0.2 lambda=0.1 cgs=30f gmb=0.1m b=sub
resistor RD d gnd 20k
resistor RB sub gnd 1k
port out d gnd
`
	resp, err := api.Analyze(api.Request{Circuit: text, Reference: "Q1", Ports: []string{"out"}, Frequency: 1e3})
	if err != nil {
		t.Fatal(err)
	}
	html := Panel(&Form{ID: "p"}, nil, resp)
	els := sitetest.Parse(t, html)
	shown := map[string]*sitetest.Element{}
	for _, e := range els {
		if e.Attrs["data-quantity"] == "device" {
			shown[e.Attrs["data-part"]+"/"+e.Attrs["data-name"]] = e
		}
	}
	q1, m1 := resp.Devices[0], resp.Devices[1]
	for key, want := range map[string]*float64{
		"Q1/gm": &q1.Gm, "Q1/rpi": q1.Rpi, "Q1/cpi": q1.Cpi, "Q1/cmu": q1.Cmu, "Q1/rb": q1.Rb, "Q1/ic": q1.Ic, "Q1/ib": q1.Ib, "Q1/beta": q1.Beta,
		"M1/gm": &m1.Gm, "M1/ro": m1.Ro, "M1/cgs": m1.Cgs, "M1/gmb": m1.Gmb, "M1/id": m1.Id, "M1/vov": m1.Vov, "M1/gamma": m1.Gamma,
	} {
		e := shown[key]
		if e == nil {
			t.Errorf("%s is not shown", key)
			continue
		}
		if got, err := strconv.ParseFloat(e.Attrs["data-value"], 64); err != nil || got != *want {
			t.Errorf("%s: data-value %q, want %v exactly", key, e.Attrs["data-value"], *want)
		}
	}
	if e := shown["Q1/ro"]; e == nil || e.Attrs["data-null"] != "true" || !strings.Contains(e.Text, "∞") {
		t.Errorf("Q1 without va= should show ro as infinite: %+v", e)
	}
	if e := shown["Q1/gm"]; e == nil || e.Text != "38.68 mS" {
		t.Errorf("Q1 gm shown as %q, want 38.68 mS (1 mA at 300 K)", e.Text)
	}
	if !strings.Contains(html, "300.0 K") || !strings.Contains(html, "25.85 mV") || !strings.Contains(html, "bulk sub") {
		t.Errorf("the section does not state the temperature, VT or M1's bulk")
	}

	plain, err := api.Analyze(api.Request{Circuit: "vsource V1 a gnd 1\nresistor R1 a b 1k\nvccs G1 b gnd sense=a,gnd gm=1m\nport p b gnd\n", Reference: "G1", Frequency: 0})
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(Panel(&Form{ID: "p"}, nil, plain), "Transistors") {
		t.Error("a circuit without transistors has a Transistors section")
	}
}
