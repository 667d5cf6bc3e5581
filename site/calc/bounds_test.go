package calc

import (
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/internal/sitetest"
	"zport/site/view"
)

// The panel never shows rounding noise as digits: a value whose bound
// covers zero reads "0" (exact by structure) or "0 … below ±x", a value
// shows no more digits than its bound leaves certain, one without a bound
// says it cannot be trusted, and an agreement within what the two bounds
// allow reads as zero. Data attributes keep the numbers themselves.
func TestPanelShowsBounds(t *testing.T) {
	c := func(re, im float64) *api.Complex { return &api.Complex{Re: re, Im: im} }
	f := func(x float64) *float64 { return &x }
	resp := &api.Response{
		Frequency: 1e3, Reference: "U1", ReturnRatio: c(5.0e-23, -5.4e-23), ReturnRatioError: f(1e-20),
		Ports: []api.PortResult{{
			Name: "out", A: "out", B: "gnd",
			Z0: c(0, 0), TShort: c(5.0e-23, -5.4e-23), TOpen: c(1234.5678, 0), Z: c(1.2345678, 0), ZDirect: c(1.2345679, 0),
			Agreement: f(8.1e-8),
			Errors:    api.PortErrors{Z0: f(0), TShort: f(3e-20), TOpen: f(1e-9), Z: f(0.002), ZDirect: nil, Agreement: f(2e-3)},
		}},
		Notes: []string{},
	}
	els := sitetest.Parse(t, Panel(&Form{ID: "b"}, nil, resp))
	find := func(q string) *sitetest.Element {
		for _, e := range els {
			if e.Attrs["data-quantity"] == q && strings.Contains(e.Attrs["class"], "cv") || e.Attrs["data-quantity"] == q && q == "agreement" {
				return e
			}
		}
		t.Fatalf("no element for %s", q)
		return nil
	}
	for _, x := range []struct {
		q, want, not string
		err          string
	}{
		{"z0", "0 Ω", "below", "0"},                          // exact by structure
		{"tShort", "0below ±3.000 × 10⁻²⁰", "∠", "3e-20"},    // zero within its bound: no phase, no noise digits
		{"T", "0below ±1.000 × 10⁻²⁰", "dB", "1e-20"},        // the return ratio too
		{"tOpen", "1235 ∠ 0.00°", "1234.5678", "1e-09"},      // 4 digits of 12 certain
		{"z", "1.23 Ω", "1.235", "0.002"},                    // 3 certain digits shown, not 4
		{"zDirect", "cannot be trusted", "", ""},             // no bound
		{"agreement", "0below ±2.0 × 10−3", "poor", "0.002"}, // within what the bounds allow
	} {
		e := find(x.q)
		if !strings.Contains(e.Text, x.want) || x.not != "" && strings.Contains(e.Text+e.Attrs["class"], x.not) {
			t.Errorf("%s shows %q (class %q); want %q, not %q", x.q, e.Text, e.Attrs["class"], x.want, x.not)
		}
		if e.Attrs["data-error"] != x.err {
			t.Errorf("%s: data-error %q, want %q", x.q, e.Attrs["data-error"], x.err)
		}
	}
	if e := find("tShort"); e.Attrs["data-re"] != "5e-23" {
		t.Errorf("tShort keeps its number in data-re: got %q", e.Attrs["data-re"])
	}
}

// The standard-values table shows a change the arithmetic cannot tell
// from none as 0 %, not as −2.2 × 10⁻¹⁴ % (what 4n7 against the E12 value
// 4.7 nF gave when the prefix was applied by a rounded multiplication),
// and a real change as it is.
func TestStandardValuesShowNoRoundingNoise(t *testing.T) {
	f := func(x float64) *float64 { return &x }
	res := &api.StandardValuesResult{Frequency: 1e3, Series: "E24", CapacitorSeries: "E12",
		Ratios: []api.RatioResult{{Num: "R2", Den: "R1", Series: "E24", Wanted: 4.7, NumValue: 47e3, DenValue: 10e3,
			RelErr: 1.1e-16, Gain: 4.7, GainRelErr: 2.2e-16, Errors: api.RatioErrors{RelErr: f(4.4e-16), GainRelErr: f(6.6e-16)}}},
		Variants: []api.SnapVariant{{Name: "nearest",
			Values: []api.SnappedValue{
				{Name: "Cf", Series: "E12", Nominal: 4.700000000000001e-09, Value: 4.7e-09, Change: -2.220446049250313e-16, Errors: api.SnappedErrors{Change: f(4.4e-16)}},
				{Name: "R3", Series: "E24", Nominal: 8870, Value: 9100, Change: 0.0259301, Errors: api.SnappedErrors{Change: f(4.6e-16)}}},
			Ports: []api.SnapCompare{{Name: "out", Nominal: &api.Complex{Re: 1}, Snapped: &api.Complex{Re: 1}, MagnitudeError: f(-3.3e-16), PhaseDifference: f(1e-14),
				Errors: api.CompareErrors{MagnitudeError: f(2e-13), PhaseDifference: f(1e-11)}}}}},
		Notes: []string{}}
	els := sitetest.Parse(t, view.StandardPanel(res, "s", map[string]string{"Cf": "F", "R3": "Ω", "R1": "Ω", "R2": "Ω"}))
	want := map[string]string{"Cf change": "0 %", "R3 change": "+2.59 %", "z:out magnitudeError": "0 %", "ratio relErr": "0 %", "ratio gainRelErr": "0 %"}
	for _, e := range els {
		k := e.Attrs["data-quantity"] + " " + e.Attrs["data-stat"]
		if w, ok := want[k]; ok {
			if e.Text != w {
				t.Errorf("%s shows %q, want %q", k, e.Text, w)
			}
			delete(want, k)
		}
		if strings.Contains(e.Text, "10⁻") {
			t.Errorf("%q: rounding noise as a number", e.Text)
		}
	}
	for k := range want {
		t.Errorf("%s not shown", k)
	}
}
