package calc

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/internal/sitetest"
)

// The response section carries the engine's numbers in full in its data
// attributes, one pole row per real pole or pair, the step chart, and in
// the loop section the rate of closure and the two loop views.
func TestResponseSection(t *testing.T) {
	f := Form{Topology: "capload", ID: "c", Params: map[string]string{"Riso": "", "Cf": ""}, CSV: true}
	out := Compute(f)
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	e, _ := api.LookupEntry("capload")
	req := api.Request{Topology: "capload", Params: map[string]string{"Riso": "", "Cf": ""}, Frequency: e.Frequency, Sweep: &e.Sweep}
	api.ClosedLoop.Ask(&req, &api.ResponseRequest{})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	r := api.ClosedLoop.Result(resp)
	els := sitetest.Parse(t, out.HTML)
	value := func(q string) string {
		for _, el := range els {
			if el.Attrs["data-quantity"] == q && el.Attrs["data-pole"] == "" {
				return el.Attrs["data-value"]
			}
		}
		return "(missing)"
	}
	num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	for q, want := range map[string]string{
		"final": num(*r.Final), "overshoot": num(*r.Overshoot), "riseTime": num(*r.RiseTime),
		"settling1": num(*r.SettlingTime.Percent1), "settling01": num(*r.SettlingTime.Percent01),
		"peaking": num(r.Peaking.DB), "peakingFrequency": num(r.Peaking.Frequency), "bandwidth": num(*r.Bandwidth),
		"closure": num(resp.Margins.Closure.Rate),
	} {
		if got := value(q); got != want {
			t.Errorf("%s: data-value %s, engine %s", q, got, want)
		}
	}
	rows := 0
	for _, el := range els {
		if el.Attrs["data-quantity"] == "pole" {
			rows++
			i, _ := strconv.Atoi(el.Attrs["data-pole"])
			p := r.Poles[i]
			if el.Attrs["data-re"] != num(p.Re) || el.Attrs["data-im"] != num(p.Im) || p.Im < 0 {
				t.Errorf("pole row %d shows %s%+sj, engine %v%+vj", i, el.Attrs["data-re"], el.Attrs["data-im"], p.Re, p.Im)
			}
		}
	}
	want := 0
	for _, p := range r.Poles {
		if p.Im >= 0 {
			want++
		}
	}
	if rows != want {
		t.Errorf("%d pole rows, want %d (pairs once)", rows, want)
	}
	for _, id := range []string{"c-plot-step", "c-plot-beta", "c-plot-nyquist"} {
		if !strings.Contains(out.HTML, `id="`+id+`"`) {
			t.Errorf("no chart %s", id)
		}
	}
	var head string // the column heads: the first line after the "#" comments
	for _, line := range strings.Split(out.CSV, "\n") {
		if !strings.HasPrefix(line, "#") {
			head = line
			break
		}
	}
	for _, col := range []string{"A_re", "A_im", "noiseGain_re", "noiseGain_im"} {
		if !strings.Contains(head, col) {
			t.Errorf("CSV header %q lacks %s", head, col)
		}
	}
	for _, s := range []string{"| Overshoot |", "| Natural frequency |", "| Rate of closure |"} {
		if !strings.Contains(out.Markdown, s) {
			t.Errorf("the copied results lack %q", s)
		}
	}
}

// The settings: defaults stay out of the link, a span of one's own goes
// in and comes back, and a bad value is an error naming its input.
func TestResponseSettings(t *testing.T) {
	f := Form{Topology: "follower", ID: "c"}
	if out := Compute(f); out.Error != nil || strings.Contains(out.State, "response.") {
		t.Fatalf("defaults: %+v, state %q", out.Error, out.State)
	}
	f.Settings = map[string]Values{"response": {"to": "3u", "points": "77"}}
	out := Compute(f)
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	if !strings.Contains(out.State, "response.to=3u") || !strings.Contains(out.State, "response.points=77") {
		t.Errorf("state %q lacks the settings", out.State)
	}
	e, _ := api.LookupEntry("follower")
	g, err := ReadFragment(out.State, Form{Topology: "follower"}, e)
	if err != nil || g.Settings["response"]["to"] != "3u" {
		t.Errorf("read back: %v, %v", g.Settings, err)
	}
	var times []float64
	for _, el := range sitetest.Parse(t, out.HTML) {
		if el.Attrs["id"] == "c-plot-step" {
			for _, s := range strings.Fields(el.Attrs["data-time"]) {
				v, _ := strconv.ParseFloat(s, 64)
				times = append(times, v)
			}
		}
	}
	if len(times) != 77 || times[76] != 3e-6 {
		t.Errorf("the step chart has %d times ending at %v, want 77 ending at 3 µs", len(times), times)
	}
	for _, c := range []struct{ name, v, param string }{
		{"to", "0", responseTo}, {"to", "-1u", responseTo}, {"to", "3x", responseTo},
		{"points", "9", responsePoints}, {"points", "20001", responsePoints}, {"points", "many", responsePoints},
	} {
		f.Settings = map[string]Values{"response": {c.name: c.v}}
		if bad := Compute(f); bad.Error == nil || bad.Error.Param != c.param {
			t.Errorf("%s=%q: error %+v, want one naming %s", c.name, c.v, bad.Error, c.param)
		}
	}
}

// On the custom page a circuit without a gain gets a hint instead of the
// section, and no engine error.
func TestResponseWithoutGain(t *testing.T) {
	out := Compute(Form{Circuit: "vsource Vin in gnd 1\nopamp U1 in out out gbw=1M\n", Reference: "U1", Frequency: "1k", ID: "c"})
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	if !strings.Contains(out.HTML, "Choose a gain") || strings.Contains(out.HTML, "c-plot-step") {
		t.Errorf("no hint, or a step chart, without a gain")
	}
}

// A pinned design's step is drawn on the current step's time axis, and
// its figures stand in the comparison beside the current ones.
func TestResponsePins(t *testing.T) {
	f := Form{Topology: "capload", ID: "c", Pins: []Pin{{Name: "Riso 2 Ω", Slot: 1, Params: map[string]string{"Riso": "2"}}}}
	out := Compute(f)
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	var step *sitetest.Element
	for _, e := range sitetest.Parse(t, out.HTML) {
		if e.Attrs["id"] == "c-plot-step" {
			step = e
		}
	}
	if step == nil || !strings.Contains(step.Text, "Riso 2 Ω") {
		t.Fatal("the step chart does not draw the pinned design")
	}
	if !strings.Contains(out.HTML, `data-compare="riseTime"`) {
		t.Error("no rise-time row in the comparison")
	}
}

func TestResample(t *testing.T) {
	got := resample([]float64{0, 1, 2}, []float64{0, 10, 30}, []float64{-1, 0, 0.5, 1.5, 2, 3})
	want := []float64{math.NaN(), 0, 5, 20, 30, math.NaN()}
	for i := range want {
		if got[i] != want[i] && !(math.IsNaN(got[i]) && math.IsNaN(want[i])) {
			t.Errorf("resample at %d: %v, want %v", i, got[i], want[i])
		}
	}
}
