package calc

import (
	"encoding/csv"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/fragment"
	"zport/site/internal/sitetest"
)

// hostile is text a user could put where a port or part name goes; the
// panel must show it as text.
const hostile = sitetest.Hostile

// sample is a response built by hand (values our own, not from any
// circuit) with every section of the panel present, and hostile names in
// every place a name from the circuit can appear.
func sample() *api.Response {
	c := func(re, im float64) *api.Complex { return &api.Complex{Re: re, Im: im} }
	f := func(x float64) *float64 { return &x }
	freq := []float64{10, 100, 1e3, 1e4, 1e5}
	col := func(z complex128) []*api.Complex {
		out := make([]*api.Complex, len(freq))
		for i, fr := range freq {
			out[i] = api.C(z / complex(1, fr/1e3))
		}
		return out
	}
	return &api.Response{
		Frequency:   1e3,
		Reference:   hostile,
		ReturnRatio: c(100, -100),
		Ports: []api.PortResult{{
			Name: hostile, A: hostile, B: "gnd",
			Z0: c(54935.77, -0.3), TShort: c(26077.6, -12), TOpen: c(143259.6, -60),
			Z: c(10000.31, 1.5), ZDirect: c(10000.31, 1.5), Agreement: f(2.1e-15),
		}, {
			Name: "open", A: "n1", B: "gnd",
			Z0: nil, TShort: c(0, 0), TOpen: c(-1, 0), Z: nil, ZDirect: nil, Y: c(1e-3, 2e-4),
		}},
		Gain: &api.GainResult{Source: hostile, Output: "out", Unit: "V/V",
			G0: c(1e-3, 0), GInf: c(-4.7, 0), G: c(-4.69, 0.02), GDirect: c(-4.69, 0.02), Agreement: f(1e-16)},
		Notes: []string{"note with " + hostile},
		Sweep: &api.SweepResult{
			Frequency:   freq,
			ReturnRatio: col(1e4),
			Ports: []api.PortSweep{
				{Name: hostile, Z0: col(5e4), TShort: col(2e4), TOpen: col(1e5), Z: col(1e4), ZDirect: col(1e4)},
				{Name: "open", Z0: make([]*api.Complex, 5), TShort: col(0), TOpen: col(-1), Z: make([]*api.Complex, 5), ZDirect: make([]*api.Complex, 5)},
			},
			Gain: &api.GainSweep{G0: col(1e-3), GInf: col(-4.7), G: col(-4.69), GDirect: col(-4.69)},
		},
		Margins: &api.Margins{
			Crossovers:     []api.Crossover{{Frequency: 1.86e5, PhaseMargin: 88.2, Direction: "down"}},
			PhaseCrossings: []api.PhaseCrossing{{Frequency: 1.3e7, GainMargin: 43.9}},
			Crossover:      f(1.86e5), PhaseMargin: f(88.2), GainMargin: f(43.9),
			Verdict: "stable", VerdictDetail: "Phase margin 88.2° " + hostile,
		},
		Topology: &api.TopologyEcho{
			ID: "t", Title: "Test stage " + hostile, Params: map[string]float64{"R1": 1e4, hostile: 1},
			Circuit: "resistor R1 a b 10k # " + hostile, Reference: hostile,
			ClosedForm: &api.ClosedForm{
				ReturnRatio: &api.Formula{Value: c(100, -100), Text: "T = a·β " + hostile, Source: "src " + hostile},
				Ports: []api.PortFormulas{{Name: hostile,
					Z0: &api.Formula{Value: c(54935.77, -0.3), Text: "Z₀ = " + hostile, Source: "Franco"},
					Z:  &api.Formula{Value: c(10000.31, 1.5), Text: "Z", Source: "Blackman"}}},
				Gain: &api.Formula{Value: c(-4.69, 0.02), Text: "G", Source: "AGM"},
			},
			Extras: []api.Extra{{Name: "Cf " + hostile, Value: f(0.798e-12), Unit: "F", Note: hostile, Source: hostile},
				{Name: "phase margin", Value: f(65.83), Unit: "°"}, {Name: "nothing", Value: nil, Unit: "Ω"}},
		},
	}
}

func TestPanelEscapesHostileText(t *testing.T) {
	resp := sample()
	entry := &api.CatalogEntry{ID: "t", Title: hostile, Ports: []api.PortInfo{{Name: hostile, Title: hostile}},
		Gain: &api.GainInfo{Title: hostile}}
	html := Panel(&Form{ID: `x"><script>alert(1)</script>`}, entry, resp)
	for _, bad := range []string{"<img", "<script", `onerror=alert(1)>`} {
		if strings.Contains(html, bad) {
			t.Errorf("panel contains %q unescaped", bad)
		}
	}
	if !strings.Contains(html, "&lt;img src=x onerror=alert(1)&gt;") {
		t.Errorf("the hostile name is not shown as text")
	}
	els := sitetest.Parse(t, html)
	for _, e := range els {
		for k := range e.Attrs {
			if strings.HasPrefix(k, "on") {
				t.Errorf("element %s has an event handler attribute %s", e.Name, k)
			}
		}
		if e.Name == "img" || e.Name == "script" {
			t.Errorf("panel holds a %s element", e.Name)
		}
	}
	md := CopyText(&Form{}, entry, resp)
	if strings.Count(md, "<") != strings.Count(md, `\<`) || !strings.Contains(md, `\<img`) {
		t.Errorf("Markdown does not escape the hostile name:\n%s", md)
	}
	r := csv.NewReader(strings.NewReader(CSV(&Form{}, entry, resp)))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatalf("the CSV does not read back: %v", err)
	}
	// The frequency; per port Z₀, Z, Z direct (re, im, mag, phase) and
	// T short, T open (and dB); four gains and T (re, im, mag, phase, dB).
	if n := len(rows[0]); n != 1+2*(3*4+2*5)+4*5+5 {
		t.Errorf("CSV header has %d columns: %q", n, rows[0])
	}
	if rows[0][1] != hostile+".z0_re_Ohm" {
		t.Errorf("the hostile port name is not one cell: %q", rows[0][1])
	}
}

func TestPanelDataAttributes(t *testing.T) {
	resp := sample()
	els := sitetest.Parse(t, Panel(&Form{ID: "p"}, nil, resp))
	find := func(port, q string) []*sitetest.Element {
		var out []*sitetest.Element
		for _, e := range els {
			if e.Attrs["data-quantity"] == q && e.Attrs["data-port"] == port {
				out = append(out, e)
			}
		}
		return out
	}
	pr := resp.Ports[0]
	for q, want := range map[string]*api.Complex{"z0": pr.Z0, "tShort": pr.TShort, "tOpen": pr.TOpen, "z": pr.Z, "zDirect": pr.ZDirect} {
		got := find(hostile, q)
		if len(got) != 1 {
			t.Errorf("%s: %d elements, want exactly 1", q, len(got))
			continue
		}
		re, err1 := strconv.ParseFloat(got[0].Attrs["data-re"], 64)
		im, err2 := strconv.ParseFloat(got[0].Attrs["data-im"], 64)
		if err1 != nil || err2 != nil || re != want.Re || im != want.Im {
			t.Errorf("%s: data-re/data-im = %q/%q, want %v/%v exactly", q, got[0].Attrs["data-re"], got[0].Attrs["data-im"], want.Re, want.Im)
		}
	}
	if a := find(hostile, "agreement"); len(a) != 1 || a[0].Attrs["data-value"] != "2.1e-15" {
		t.Errorf("agreement element: %v", a)
	}
	for _, q := range []string{"z0", "z", "zDirect"} {
		if got := find("open", q); len(got) != 1 || got[0].Attrs["data-null"] != "true" || !strings.Contains(got[0].Text, "—") {
			t.Errorf("open port %s: want one null value shown as a dash, got %v", q, got)
		}
	}
	if got := find("open", "y"); len(got) != 1 {
		t.Errorf("open port: the admittance is not shown")
	}
	for q, want := range map[string]string{"g0": "0.001", "gInf": "-4.7", "g": "-4.69", "gDirect": "-4.69", "T": "100"} {
		got := find("", q)
		if len(got) != 1 || got[0].Attrs["data-re"] != want {
			t.Errorf("%s: want one element with data-re %s, got %v", q, want, got)
		}
	}
	for q, want := range map[string]string{"fc": "186000", "pm": "88.2", "gm": "43.9"} {
		got := find("", q)
		if len(got) != 1 || got[0].Attrs["data-value"] != want {
			t.Errorf("%s: want one element with data-value %s, got %v", q, want, got)
		}
	}
	// Hand formulas are marked apart from the engine's values.
	n := 0
	for _, e := range els {
		if e.Attrs["data-closed-form"] != "" {
			if e.Attrs["data-quantity"] != "" {
				t.Errorf("a hand-formula value also carries data-quantity=%s", e.Attrs["data-quantity"])
			}
			n++
		}
	}
	if n == 0 {
		t.Errorf("no hand-formula values")
	}
	// Every chart's SVG is inline, without a style element (the pages' CSP
	// forbids inline styles).
	svgs := 0
	for _, e := range els {
		if e.Name == "svg" {
			svgs++
		}
		if e.Name == "style" {
			t.Errorf("panel holds a style element")
		}
		if _, ok := e.Attrs["style"]; ok {
			t.Errorf("element %s has a style attribute", e.Name)
		}
	}
	if want := 2 + 1 + 1; svgs != want { // two ports, the loop, the gain
		t.Errorf("%d charts, want %d", svgs, want)
	}
}

// entry is a catalog entry of our own for the form tests.
var entry = api.CatalogEntry{
	ID: "t", Title: "Test stage",
	Params: []api.ParamInfo{
		{Name: "R1", Unit: "Ω", Default: "10k"},
		{Name: "R2", Unit: "Ω", Default: "47k"},
		{Name: "Cf", Unit: "F", Default: "", Optional: true},
	},
	Frequency: 1e3,
	Sweep:     api.SweepSpec{From: 10, To: 1e8, Points: 400},
}

func TestSyntax(t *testing.T) {
	for v, want := range map[float64]string{
		1000: "1k", 1e8: "100M", 10: "10", 2.5e-3: "2.5m", 1.5e6: "1.5M", 123456: "123.456k",
		0.47: "470m", 4.7e-9: "4.7n", 1e-12: "1p", 0: "0", 1e13: "10T",
	} {
		if got := Syntax(v); got != want {
			t.Errorf("Syntax(%g) = %q, want %q", v, got, want)
		}
	}
}

func TestFragmentRoundTrip(t *testing.T) {
	f := DefaultForm(entry)
	f.Params["R2"] = "4k7"
	f.Params["Cf"] = "2.2p"
	f.Frequency = "1.5 k" // spaces and other text survive escaping
	f.Sweep.Points = "200"
	state := f.State(entry)
	if state != "R1=10k&R2=4k7&Cf=2.2p&f=1.5+k&from=10&to=100M&points=200" {
		t.Errorf("State = %q", state)
	}
	for _, frag := range []string{state, "#" + state, "p=t&" + state, state + "&"} {
		g, refused := ReadFragment(frag, DefaultForm(entry), entry)
		if len(refused) > 0 {
			t.Fatalf("ReadFragment(%q): %+v", frag, refused)
		}
		if g.State(entry) != state {
			t.Errorf("round trip of %q gave %q", frag, g.State(entry))
		}
	}
	// A partial fragment keeps the base's other values.
	base := DefaultForm(entry)
	base.Params["R1"] = "2k2"
	g, refused := ReadFragment("R2=1M", base, entry)
	if len(refused) > 0 || g.Params["R1"] != "2k2" || g.Params["R2"] != "1M" {
		t.Errorf("partial fragment: %v, %+v", g.Params, refused)
	}
	if base.Params["R2"] != "47k" {
		t.Errorf("ReadFragment changed its base")
	}
}

// A setting that cannot be read, or that the stage does not have, is
// refused by name (or as unreadable) and leaves the base's value for it;
// the rest of the link is read. A fragment too long to be a link is
// refused whole.
func TestFragmentRefused(t *testing.T) {
	for _, c := range []struct{ frag, key string }{
		{hostile, "<img src"}, // a key "<img src" with a value: unknown
		{"R9=10k", "R9"},
		{"R1=10k&R1=20k", "R1"},
		{"R1=%zz", "R1"},
		{"R1=%0", "R1"},
		{"R1=%00", "R1"},
		{"R1=a%0Ab", "R1"},
		{"R1=%FF", "R1"},
		{"R1", ""},
		{"R1=" + strings.Repeat("9", fragment.MaxValue+1), "R1"},
		{"constructor=1", "constructor"},
		{"__proto__=1", "__proto__"},
	} {
		base := DefaultForm(entry)
		g, refused := ReadFragment(c.frag+"&R2=1M", base, entry)
		if len(refused) != 1 || refused[0].Key != c.key {
			t.Errorf("ReadFragment(%q): refused %+v, want one refusal of %q", c.frag, refused, c.key)
			continue
		}
		want := DefaultForm(entry)
		want.Params["R2"] = "1M"
		if g.State(entry) != want.State(entry) {
			t.Errorf("ReadFragment(%q) read %q, want the rest of the link alone", c.frag, g.State(entry))
		}
	}
	g, refused := ReadFragment(strings.Repeat("R1=1&", fragment.MaxLength/5+1), DefaultForm(entry), entry)
	if len(refused) != 1 || !refused[0].All || g.State(entry) != DefaultForm(entry).State(entry) {
		t.Errorf("an over-long fragment: %+v", refused)
	}
}

func FuzzReadFragment(f *testing.F) {
	f.Add("R1=10k&R2=4k7&f=1k&from=10&to=100M&points=400")
	f.Add(hostile)
	f.Add("p=t&%zz=%%")
	f.Fuzz(func(t *testing.T, frag string) {
		g, _ := ReadFragment(frag, DefaultForm(entry), entry)
		// What was read is written back and read again to the same form.
		h, refused := ReadFragment(g.State(entry), DefaultForm(entry), entry)
		if len(refused) > 0 || h.State(entry) != g.State(entry) {
			t.Errorf("state %q does not round-trip: %+v", g.State(entry), refused)
		}
	})
}

func TestFormFieldErrors(t *testing.T) {
	for _, tc := range []struct {
		f     Form
		field string
	}{
		{Form{Frequency: "1kk"}, FieldFrequency},
		{Form{Frequency: "-1"}, FieldFrequency},
		{Form{Frequency: "1k", Sweep: SweepForm{From: "0", To: "1M", Points: "10"}}, FieldFrom},
		{Form{Frequency: "1k", Sweep: SweepForm{From: "10", To: "1", Points: "10"}}, FieldTo},
		{Form{Frequency: "1k", Sweep: SweepForm{From: "10", To: "1M", Points: "ten"}}, FieldPoints},
		{Form{Frequency: "1k", Sweep: SweepForm{From: "10", To: "1M", Points: "1"}}, FieldPoints},
		{Form{Frequency: "1k", Sweep: SweepForm{From: "10", To: "1M", Points: strconv.Itoa(api.MaxPoints + 1)}}, FieldPoints},
	} {
		_, bad := tc.f.request()
		if bad == nil || bad.Param != tc.field || bad.Message == "" {
			t.Errorf("%+v: error %+v, want one naming %s", tc.f, bad, tc.field)
		}
	}
}

// TestComputeCatalog runs every stage of the catalog through Compute, the
// path both the page build and the WebAssembly bridge take.
func TestComputeCatalog(t *testing.T) {
	cat := api.Catalog()
	if len(cat) == 0 {
		t.Fatal("the catalog is empty")
	}
	for _, e := range cat {
		t.Run(e.ID, func(t *testing.T) {
			out := Compute(Form{Topology: e.ID, ID: "c", CSV: true})
			if out.Error != nil {
				t.Fatalf("defaults: %+v", out.Error)
			}
			els := sitetest.Parse(t, out.HTML)
			for _, p := range e.Ports {
				for _, q := range []string{"z0", "tShort", "tOpen", "zDirect"} {
					found := false
					for _, el := range els {
						found = found || el.Attrs["data-port"] == p.Name && el.Attrs["data-quantity"] == q
					}
					if !found {
						t.Errorf("port %s: no %s value", p.Name, q)
					}
				}
			}
			if out.Markdown == "" || !strings.Contains(out.CSV, "\r\nfrequency_Hz,") || !strings.Contains(out.CSV, ",T_re,T_im,T_mag,T_phase_deg,T_dB") {
				t.Errorf("Markdown or CSV missing")
			}
			r := csv.NewReader(strings.NewReader(out.CSV))
			r.Comment = '#'
			if rows, err := r.ReadAll(); err != nil || len(rows) != e.Sweep.Points+1 {
				t.Errorf("CSV has %d rows (%v), want %d", len(rows), err, e.Sweep.Points+1)
			}
			// The state reproduces the panel exactly.
			frag := out.State
			again := Compute(Form{Topology: e.ID, ID: "c", Fragment: &frag, CSV: true})
			if again.Error != nil || again.HTML != out.HTML {
				t.Errorf("the state %q does not reproduce the panel (%v)", frag, again.Error)
			}
			// A bad value of each parameter names that parameter.
			for _, p := range e.Params {
				bad := Compute(Form{Topology: e.ID, Params: map[string]string{p.Name: "4k7k"}})
				if bad.Error == nil || bad.Error.Param != p.Name {
					t.Errorf("bad %s: error %+v, want one naming it", p.Name, bad.Error)
				}
			}
		})
	}
}

func TestComputeJSONNeverPanics(t *testing.T) {
	rnd := rand.New(rand.NewPCG(1, 1))
	inputs := []string{"", "null", "[]", "{", `{"topology": 3}`, `{"topology": "nope"}`, `{"x": 1}`,
		`{"topology": "inverting", "fragment": "` + hostile + `"}`, `{"circuit": "resistor R1 a gnd 1k\nport p a gnd\n", "frequency": "1k"}`}
	for i := 0; i < 50; i++ {
		b := make([]byte, rnd.IntN(40))
		for j := range b {
			b[j] = byte(rnd.IntN(256))
		}
		inputs = append(inputs, string(b))
	}
	for _, in := range inputs {
		out := ComputeJSON([]byte(in))
		if len(out) == 0 || out[0] != '{' {
			t.Errorf("ComputeJSON(%q) = %q, want a JSON object", in, out)
		}
	}
}
