package view

import (
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/internal/sitetest"
)

// Every number of the tolerance panel is the engine's, written in full
// (data-value), and the percentiles are the engine's stat.Quantile values.
func TestTolerancePanelShowsTheEnginesNumbers(t *testing.T) {
	res := sitetest.Tolerance(t, sitetest.Inverting(t), `{"default": "F", "amps": {"U1": {"a0Min": "100k"}}, "seed": 3, "trials": 700,
		"targets": [{"quantity": "pm", "op": "<", "value": 88.2}, {"quantity": "z", "port": "out", "op": ">", "value": 0.45}]}`)
	els := sitetest.Parse(t, TolerancePanel(res, "t", 0))
	got := sitetest.AidNumbers(t, els)
	n := 0
	check := func(key string, v *float64) {
		t.Helper()
		if v == nil {
			return
		}
		n++
		if g, ok := got[key]; !ok || g != strconv.FormatFloat(*v, 'g', -1, 64) {
			t.Errorf("%s: panel %q, engine %v", key, g, *v)
		}
	}
	for _, q := range res.Quantities {
		if q.Quantity == "r" {
			// Re Z of the inverting stage's ports stays positive: left out.
			if _, ok := got["tolerance|"+q.ID+"|p50|||"]; ok {
				t.Errorf("%s is listed though it never reaches zero", q.ID)
			}
			continue
		}
		if len(q.Percentiles) != 5 {
			t.Fatalf("%s: %d percentiles", q.ID, len(q.Percentiles))
		}
		for _, p := range q.Percentiles {
			check("tolerance|"+q.ID+"|p"+strconv.FormatFloat(p.P, 'g', -1, 64)+"|||", p.Value)
		}
		check("tolerance|"+q.ID+"|nominal|||", q.Nominal)
		check("tolerance|"+q.ID+"|min|||", q.Min)
		check("tolerance|"+q.ID+"|max|||", q.Max)
		check("tolerance|"+q.ID+"|cornerMin|||", q.Corners.Min)
		check("tolerance|"+q.ID+"|cornerMax|||", q.Corners.Max)
	}
	for i, tg := range res.Targets {
		f := tg.Fraction
		check("tolerance|target|fraction|||"+strconv.Itoa(i), &f)
	}
	if n < 70 {
		t.Errorf("only %d numbers checked", n)
	}
	hists := 0
	for _, e := range els {
		if e.Name == "svg" && strings.Contains(e.Attrs["class"], "zplot-hist") {
			hists++
		}
	}
	if want := len(res.Quantities) - 3; hists != want { // all but the three Re Z
		t.Errorf("%d histograms, want %d", hists, want)
	}
}

// A Howland pump without its load has a signed output resistance that
// swings through zero with 1 % resistors (Re Z → R1/ε changes sign with
// the mismatch ε, Franco 3rd ed., ch. 2, as in REFERENCES.md): the panel
// lists Re Z, bins |Z| in ratio, and says where Monte Carlo passes the
// corners (|Z| peaks at balance, inside the tolerance box).
func TestTolerancePanelHowland(t *testing.T) {
	res := sitetest.Tolerance(t, api.Request{Topology: "howland", Frequency: 100, Params: map[string]string{"RL": ""}}, `{"seed": 5, "trials": 1000}`)
	var q, r api.QuantitySpread
	for _, x := range res.Quantities {
		switch x.ID {
		case "z:out":
			q = x
		case "r:out":
			r = x
		}
	}
	if r.Min == nil || *r.Min >= 0 || r.Max == nil || *r.Max <= 0 {
		t.Fatalf("Re Z at out spans %v … %v; the test wants it to change sign", r.Min, r.Max)
	}
	html := TolerancePanel(res, "h", 0)
	got := sitetest.AidNumbers(t, sitetest.Parse(t, html))
	if got["tolerance|r:out|p50|||"] == "" {
		t.Error("Re Z at out is not listed though it changes sign")
	}
	if q.Histogram == nil || q.Histogram.Scale != "log" {
		t.Fatalf("|Z| at out histogram: %+v, want log bins", q.Histogram)
	}
	if !strings.Contains(html, `class="hint corner-beyond"`) {
		t.Error("no note that Monte Carlo reaches past the corners")
	}
}

// Sensitivities on the panel are the engine's, in its order (largest
// first), each quantity with its bar chart.
func TestSensitivityPanel(t *testing.T) {
	req := sitetest.Inverting(t)
	api.Sensitivity.Ask(&req, &api.SensitivityRequest{})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	sr := api.Sensitivity.Result(resp)
	els := sitetest.Parse(t, SensitivityPanel(sr, "s", 0))
	got := sitetest.AidNumbers(t, els)
	for _, q := range sr.Quantities {
		var order []string
		for _, e := range els {
			if e.Attrs["data-aid"] == "sensitivity" && e.Attrs["data-quantity"] == q.ID && e.Attrs["data-stat"] == "value" {
				order = append(order, e.Attrs["data-parameter"])
			}
		}
		for i, en := range q.Entries {
			if i >= len(order) || order[i] != en.Parameter {
				t.Errorf("%s: row %d is %v, want %s", q.ID, i, order, en.Parameter)
				break
			}
			if g := got["sensitivity|"+q.ID+"|value|"+en.Parameter+"||"]; g != strconv.FormatFloat(*en.Value, 'g', -1, 64) {
				t.Errorf("%s/%s: %s, engine %v", q.ID, en.Parameter, g, *en.Value)
			}
		}
	}
	bars := 0
	for _, e := range els {
		if e.Name == "svg" && strings.Contains(e.Attrs["class"], "zplot-bars") {
			bars++
		}
	}
	if bars != len(sr.Quantities) {
		t.Errorf("%d bar charts for %d quantities", bars, len(sr.Quantities))
	}
}

// Text from the engine and from the user is escaped everywhere in the
// design-aid HTML.
func TestAidPanelsEscapeHostileText(t *testing.T) {
	f := func(x float64) *float64 { return &x }
	res := &api.ToleranceResult{Distribution: sitetest.Hostile, Seed: 1, Frequency: 1e3, Trials: 2, Done: 2,
		Parts: []api.TolerancedPart{{Name: sitetest.Hostile, Kind: "resistor", Unit: "Ω", Nominal: 1e3, Tolerance: f(0.01), Low: 990, High: 1010}},
		Quantities: []api.QuantitySpread{{ID: sitetest.Hostile, Quantity: "z", Port: sitetest.Hostile, Title: sitetest.Hostile, Unit: "Ω", Nominal: f(1),
			Samples: 2, Mean: f(1), StdDev: f(0), Min: f(1), Max: f(2),
			Percentiles: []api.PercentileValue{{P: 50, Value: f(1.5)}},
			Histogram:   &api.HistogramResult{Scale: "linear", Edges: []float64{1, 2}, Counts: []int{2}},
			Corners:     &api.CornerRange{Min: f(0.5), Max: f(2.5), MonteCarloShortMin: true}}},
		Targets: []api.TargetResult{{Quantity: "z", Port: sitetest.Hostile, Op: "<", Value: 1, Misses: 1, Fraction: 0.5}},
		Notes:   []string{sitetest.Hostile}}
	sens := &api.SensitivityResult{Frequency: 1e3, Step: 1e-3, Method: sitetest.Hostile, Notes: []string{sitetest.Hostile},
		Quantities: []api.SensitivityQuantity{{ID: sitetest.Hostile, Quantity: "z", Port: sitetest.Hostile, Title: sitetest.Hostile, Value: &api.Complex{Re: 1},
			Entries: []api.SensitivityEntry{{Parameter: sitetest.Hostile, Unit: "Ω", Nominal: 1, Value: f(-1), Error: f(1e-13), Phase: f(0)}}}}}
	std := &api.StandardValuesResult{Frequency: 1e3, Series: sitetest.Hostile, CapacitorSeries: "E12", Notes: []string{sitetest.Hostile},
		Ratios: []api.RatioResult{{Title: sitetest.Hostile, Num: sitetest.Hostile, Den: "R1", Wanted: 2, NumValue: 2e3, DenValue: 1e3, Gain: 2}},
		Variants: []api.SnapVariant{{Name: sitetest.Hostile, Values: []api.SnappedValue{{Name: sitetest.Hostile, Series: "E24", Nominal: 1, Value: 1}},
			Ports: []api.SnapCompare{{Name: sitetest.Hostile, Nominal: &api.Complex{Re: 1}, Snapped: &api.Complex{Re: 1}, MagnitudeError: f(0), PhaseDifference: f(0)}}}}}
	for name, html := range map[string]string{
		"tolerance":   TolerancePanel(res, `x"><script>`, 0),
		"sensitivity": SensitivityPanel(sens, "s", 0),
		"standard":    StandardPanel(std, "d", map[string]string{sitetest.Hostile: "Ω"}),
	} {
		sitetest.CheckInert(t, name, html)
		sitetest.Parse(t, html) // well-formed
	}
}
