package calc

import (
	"slices"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/internal/sitetest"
)

// The noise section shows the engine's numbers exactly: the same request
// through api.Analyze gives the values the section's data attributes
// carry, the CSV's columns and the copied table.
func TestNoiseSection(t *testing.T) {
	f := Form{Topology: "transimpedance", ID: "c", CSV: true,
		Settings: map[string]Values{"noise": {"temperature": "77"}}}
	page := Compute(f)
	if page.Error != nil {
		t.Fatal(page.Error)
	}
	req := api.Request{Topology: "transimpedance", Frequency: 1e3, Sweep: &api.SweepSpec{From: 10, To: 1e8, Points: 400}}
	T, from, to := 77.0, 10.0, 1e8
	req.Temperature = &T
	api.Noise.Ask(&req, &api.NoiseRequest{Band: &api.NoiseBand{From: &from, To: &to}})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	n := api.Noise.Result(resp)
	if n.Temperature != 77 {
		t.Fatalf("temperature %g", n.Temperature)
	}
	want := map[string]*float64{"noiseOutput": n.Spot.Output, "noiseInput": n.Spot.Input, "noiseRms": n.RMS.Output,
		"noiseRmsInput": n.RMS.Input, "noiseBandwidth": n.Bandwidth, "noiseTemperature": &n.Temperature}
	for _, c := range n.Contributors {
		want["contributorRms:"+c.Name] = c.RMS
		want["contributorShare:"+c.Name] = c.Share
		want["contributorSpot:"+c.Name] = c.Spot
	}
	seen := 0
	for _, e := range sitetest.Parse(t, page.HTML) {
		q := e.Attrs["data-quantity"]
		if name := e.Attrs["data-source"]; name != "" {
			q += ":" + name
		}
		w, ok := want[q]
		if !ok {
			continue
		}
		seen++
		if got := e.Attrs["data-value"]; got != strconv.FormatFloat(*w, 'g', -1, 64) {
			t.Errorf("%s: data-value %s, want %g", q, got, *w)
		}
	}
	if seen != len(want) {
		t.Errorf("%d of %d noise values on the page", seen, len(want))
	}
	for _, s := range []string{`data-analysis="noise"`, "Noise at out", "invented defaults", "c-plot-noise", "c-plot-noise-in", "c-plot-noise-gain"} {
		if !strings.Contains(page.HTML, s) {
			t.Errorf("the section lacks %q", s)
		}
	}

	rows := readCSV(t, page.CSV)
	col := slices.IndexFunc(rows[0], func(h string) bool { return strings.HasPrefix(h, "noise.output_") })
	if col < 0 {
		t.Fatalf("CSV header %v has no noise.output", rows[0])
	}
	for i, row := range rows[1:] {
		if row[col] != strconv.FormatFloat(*n.Output[i], 'g', -1, 64) {
			t.Errorf("CSV row %d: noise.output %s, want %g", i+1, row[col], *n.Output[i])
			break
		}
	}
	for _, s := range []string{"| Noise at out | Value |", "| Noise source | Kind | rms at the output | Share |", "| Ipd | shot\\, 2qI |"} {
		if !strings.Contains(page.Markdown, s) {
			t.Errorf("copied results lack %q:\n%s", s, page.Markdown)
		}
	}
	if !strings.Contains(page.State, "noise.temperature=77") {
		t.Errorf("state %q lacks the temperature", page.State)
	}
}

// Bad noise settings name their input; a link's band is read back.
func TestNoiseSettings(t *testing.T) {
	for _, c := range []struct{ name, value, param string }{
		{"temperature", "0", "noise.temperature"},
		{"temperature", "hot", "noise.temperature"},
		{"temperature", "300K", "noise.temperature"}, // 300 kilo: far above 1000 K
		{"band.from", "1..2", "noise.band.from"},
		{"band.to", "5", "noise.band.to"},
		{"output", "nowhere", "noise.output"},
	} {
		out := Compute(Form{Topology: "inverting", Settings: map[string]Values{"noise": {c.name: c.value}}})
		if out.Error == nil || out.Error.Param != c.param {
			t.Errorf("%s = %q: error %+v, want one naming %s", c.name, c.value, out.Error, c.param)
		}
	}
	e, _ := api.LookupEntry("inverting")
	g, err := ReadFragment("noise.band.from=1k&noise.band.to=20k&noise.output=sum", Form{Topology: "inverting"}, e)
	if err != nil {
		t.Fatal(err)
	}
	out := Compute(g)
	if out.Error != nil || !strings.Contains(out.HTML, "Noise at sum") || !strings.Contains(out.HTML, "1.000 kHz to 20.00 kHz") {
		t.Errorf("link's noise settings not used: %+v", out.Error)
	}
}

// A circuit with nowhere to read its noise (no gain, no output named)
// still answers, and says how to get the noise; names from the circuit are
// text.
func TestNoiseWithoutOutput(t *testing.T) {
	out := Compute(Form{Circuit: "resistor " + "R1" + " a gnd 1k\nport p a gnd\n", Ports: []string{"p"}, Frequency: "1k",
		Sweep: SweepForm{From: "10", To: "1M", Points: "20"}})
	if out.Error != nil || !strings.Contains(out.HTML, "Choose a gain, or name an output node") {
		t.Errorf("%+v", out.Error)
	}
	resp := sample()
	api.Noise.Set(resp, &api.NoiseResult{Node: hostile, Source: hostile, Unit: "V/√Hz", InputUnit: "V/√Hz",
		Frequency: resp.Sweep.Frequency, Output: make([]*float64, 5),
		Contributors: []api.NoiseContributor{{Name: hostile, Kind: "thermal", Density: make([]*float64, 5)}}, Notes: []string{hostile}})
	html := Panel(&Form{ID: "x"}, nil, resp)
	if strings.Contains(html, "<img") || !strings.Contains(html, "Noise at &lt;img") {
		t.Errorf("the noise section does not escape names")
	}
	if md := CopyText(&Form{}, nil, resp); strings.Count(md, "<") != strings.Count(md, `\<`) {
		t.Errorf("copied noise table does not escape names:\n%s", md)
	}
}
