//go:build !js

package e2e

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/cmplxs/cscalar"
	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/calc"
)

// What a live calculator shows is held to the native engine: the same
// request analyzed by api.Analyze in this process must give the numbers
// the page carries in its data attributes (full precision), and the
// points its charts carry (to the charts' own precision). The WebAssembly
// engine is the same Go code; only the last bits of library functions
// such as math.Log and math.Hypot (assembly on amd64, pure Go on wasm) may
// differ, so 1e-12 relative is a generous bound that still catches any
// value taken from the wrong place or left over from an earlier state.
const relTol = 1e-12

// calcSel is the CSS selector of the calculator of topology id.
func calcSel(id string) string {
	return `[data-calculator][data-topology="` + id + `"]`
}

// inputs returns the calculator's inputs by name, as typed.
func inputs(t *testing.T, ctx context.Context, id string) map[string]string {
	t.Helper()
	return eval[map[string]string](t, ctx, `(function () {
  var out = {};
  document.querySelectorAll(`+jsString(calcSel(id)+` input[name]`)+`).forEach(function (e) { out[e.name] = e.value; });
  return out;
})()`)
}

// form turns a calculator's inputs into the form the page sends the
// engine.
func form(id string, in map[string]string) calc.Form {
	f := calc.Form{Topology: id, Params: map[string]string{}, ID: "calc-" + id}
	for k, v := range in {
		switch {
		case k == "frequency":
			f.Frequency = v
		case strings.HasPrefix(k, "sweep."):
			switch k {
			case "sweep.from":
				f.Sweep.From = v
			case "sweep.to":
				f.Sweep.To = v
			case "sweep.points":
				f.Sweep.Points = v
			}
		case setting(k, v, &f.Settings):
		default:
			f.Params[k] = v
		}
	}
	return f
}

// native analyzes what the calculator's inputs say with the native
// engine: the topology with those parameters, at that spot frequency, over
// that sweep, with the noise the calculator's settings ask for.
func native(t *testing.T, id string, in map[string]string) *api.Response {
	t.Helper()
	req := api.Request{Topology: id, Params: map[string]string{}}
	parse := func(name string) float64 {
		v, err := value.Parse(strings.TrimSpace(in[name]), "Hz")
		if err != nil {
			t.Fatalf("%s: input %s = %q: %v", id, name, in[name], err)
		}
		return v
	}
	settings := map[string]calc.Values{}
	for k, v := range in {
		if k != "frequency" && !strings.HasPrefix(k, "sweep.") && !setting(k, v, &settings) {
			req.Params[k] = v
		}
	}
	askAnalyses(t, id, &req, settings)
	req.Frequency = parse("frequency")
	pts, err := strconv.Atoi(strings.TrimSpace(in["sweep.points"]))
	if err != nil {
		t.Fatalf("%s: sweep points %q: %v", id, in["sweep.points"], err)
	}
	req.Sweep = &api.SweepSpec{From: parse("sweep.from"), To: parse("sweep.to"), Points: pts}
	// The noise options exactly as the calculator asks for them.
	asked, bad := form(id, in).Request()
	if bad != nil {
		t.Fatalf("%s: the calculator's request: %+v", id, bad)
	}
	api.Noise.Ask(&req, api.Noise.Asked(asked))
	req.Temperature = asked.Temperature
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatalf("%s: native analysis of %v: %v", id, in, err)
	}
	return resp
}

// shown is one value on the page, as its element's data attributes give it.
type shown struct {
	Key   string `json:"key"` // "port/quantity", "quantity", "closed:port/quantity", "extra:name", "device:part/name"
	Re    string `json:"re"`
	Im    string `json:"im"`
	Value string `json:"value"`
	Null  bool   `json:"null"`
	Text  string `json:"text"`
}

// shownValues reads every value the calculator's results panel carries.
func shownValues(t *testing.T, ctx context.Context, id string) []shown {
	t.Helper()
	return eval[[]shown](t, ctx, `(function () {
  var root = document.querySelector(`+jsString(calcSel(id)+` [data-role="results"]`)+`);
  return Array.from(root.querySelectorAll('[data-quantity], [data-closed-form]')).map(function (e) {
    var d = e.dataset, key;
    if (d.quantity === 'extra') key = 'extra:' + d.name;
    else if (d.quantity === 'device') key = 'device:' + d.part + '/' + d.name;
    else if (d.quantity && d.source) key = d.quantity + ':' + d.source;
    else if (d.quantity) key = (d.port ? d.port + '/' : '') + (d.pole ? 'pole' + d.pole + '/' : '') + d.quantity;
    else key = 'closed:' + (d.port ? d.port + '/' : '') + d.closedForm;
    return { key: key, re: d.re || '', im: d.im || '', value: d.value || '', null: d.null === 'true', text: e.textContent };
  });
})()`)
}

// want is one expected value: a complex number, a real one, or text; nil
// pointers mean "not finite" (the page shows data-null).
type want struct {
	z    *api.Complex
	x    *float64
	text *string
	abs  bool    // compare absolutely (a relative difference, itself near rounding)
	tol  float64 // the tolerance when not relTol
	kind byte    // 'z', 'x' or 't'
}

// expected lists what the page must show for resp, by the keys of shown.
func expected(resp *api.Response) map[string]want {
	w := map[string]want{}
	z := func(k string, c *api.Complex) { w[k] = want{z: c, kind: 'z'} }
	x := func(k string, f *float64, abs bool) { w[k] = want{x: f, abs: abs, kind: 'x'} }
	for _, p := range resp.Ports {
		z(p.Name+"/z0", p.Z0)
		z(p.Name+"/tShort", p.TShort)
		z(p.Name+"/tOpen", p.TOpen)
		z(p.Name+"/z", p.Z)
		z(p.Name+"/zDirect", p.ZDirect)
		if p.Z == nil && p.Y != nil {
			z(p.Name+"/y", p.Y)
		}
		x(p.Name+"/agreement", p.Agreement, true)
	}
	if g := resp.Gain; g != nil {
		z("g0", g.G0)
		z("gInf", g.GInf)
		z("g", g.G)
		z("gDirect", g.GDirect)
		x("gainAgreement", g.Agreement, true)
	}
	z("T", resp.ReturnRatio)
	if m := resp.Margins; m != nil {
		x("fc", m.Crossover, false)
		x("pm", m.PhaseMargin, false)
		x("gm", m.GainMargin, false)
		v := m.Verdict
		w["verdict"] = want{text: &v, kind: 't'}
	}
	for k, v := range deviceValues(resp) {
		x(k, v, false)
	}
	if n := api.Noise.Result(resp); n != nil {
		x("noiseOutput", n.Spot.Output, false)
		x("noiseRms", n.RMS.Output, false)
		x("noiseTemperature", &n.Temperature, false)
		x("noiseError", n.Integration.Error, true)
		if n.Source != "" {
			x("noiseInput", n.Spot.Input, false)
			x("noiseRmsInput", n.RMS.Input, false)
			x("noiseBandwidth", n.Bandwidth, false)
		}
		for _, c := range n.Contributors {
			x("contributorSpot:"+c.Name, c.Spot, false)
			x("contributorRms:"+c.Name, c.RMS, false)
			x("contributorShare:"+c.Name, c.Share, false)
		}
	}
	expectAnalyses(resp, w)
	if top := resp.Topology; top != nil {
		for _, e := range top.Extras {
			x("extra:"+e.Name, e.Value, false)
		}
		if cf := top.ClosedForm; cf != nil {
			val := func(f *api.Formula) *api.Complex {
				if f == nil {
					return nil
				}
				return f.Value
			}
			for _, pf := range cf.Ports {
				for _, q := range []struct {
					name string
					f    *api.Formula
				}{{"z0", pf.Z0}, {"tShort", pf.TShort}, {"tOpen", pf.TOpen}, {"z", pf.Z}} {
					if q.f != nil {
						z("closed:"+pf.Name+"/"+q.name, val(q.f))
					}
				}
				// The hand-versus-engine difference, as the panel computes it.
				var d *float64
				if pf.Z != nil && pf.Z.Value != nil {
					for _, p := range resp.Ports {
						if p.Name == pf.Name && p.Z != nil {
							d = api.F(relDiff(pf.Z.Value.Value(), p.Z.Value()))
						}
					}
				}
				x("closed:"+pf.Name+"/agreement", d, true)
			}
			if cf.Gain != nil {
				z("closed:g", cf.Gain.Value)
				var d *float64
				if cf.Gain.Value != nil && resp.Gain != nil && resp.Gain.G != nil {
					d = api.F(relDiff(cf.Gain.Value.Value(), resp.Gain.G.Value()))
				}
				x("closed:gainAgreement", d, true)
			}
			if cf.ReturnRatio != nil {
				z("closed:T", cf.ReturnRatio.Value)
			}
		}
	}
	return w
}

// deviceValues lists the transistor values the panel's Transistors section
// shows, keyed "device:PART/name" as the page's data-part and data-name
// give them.
func deviceValues(resp *api.Response) map[string]*float64 {
	out := map[string]*float64{}
	for _, d := range resp.Devices {
		fields := map[string]*float64{"gm": &d.Gm, "ro": d.Ro}
		switch d.Kind {
		case "bjt":
			for k, v := range map[string]*float64{"rpi": d.Rpi, "cpi": d.Cpi, "cmu": d.Cmu, "rb": d.Rb, "ic": d.Ic, "ib": d.Ib, "beta": d.Beta} {
				fields[k] = v
			}
		case "mos":
			for k, v := range map[string]*float64{"cgs": d.Cgs, "cgd": d.Cgd, "gmb": d.Gmb, "id": d.Id, "vov": d.Vov, "gamma": d.Gamma} {
				fields[k] = v
			}
		}
		for k, v := range fields {
			out["device:"+d.Name+"/"+k] = v
		}
	}
	return out
}

func relDiff(a, b complex128) float64 {
	d := cmplx.Abs(a - b)
	if d == 0 {
		return 0
	}
	return d / math.Max(cmplx.Abs(a), cmplx.Abs(b))
}

// compareShown lists every difference between what the page shows and
// what resp says: missing, extra or repeated values, and values that
// differ by more than relTol.
func compareShown(got []shown, resp *api.Response) []string {
	exp := expected(resp)
	var bad []string
	seen := map[string]int{}
	for _, s := range got {
		seen[s.Key]++
		w, ok := exp[s.Key]
		if !ok {
			bad = append(bad, fmt.Sprintf("%s: shown (%q) but not in the native response", s.Key, s.Text))
			continue
		}
		if msg := compareOne(s, w); msg != "" {
			bad = append(bad, s.Key+": "+msg)
		}
	}
	for k := range exp {
		if seen[k] != 1 {
			bad = append(bad, fmt.Sprintf("%s: shown %d times, want once", k, seen[k]))
		}
	}
	sort.Strings(bad)
	return bad
}

func compareOne(s shown, w want) string {
	num := func(v string) (float64, bool) {
		f, err := strconv.ParseFloat(v, 64)
		return f, err == nil
	}
	switch w.kind {
	case 't':
		if strings.TrimSpace(s.Text) != *w.text {
			return fmt.Sprintf("text %q, native %q", s.Text, *w.text)
		}
	case 'z':
		if w.z == nil {
			if !s.Null {
				return fmt.Sprintf("shows %s%+sj, native has no finite value", s.Re, s.Im)
			}
			return ""
		}
		re, ok1 := num(s.Re)
		im, ok2 := num(s.Im)
		if s.Null || !ok1 || !ok2 {
			return fmt.Sprintf("shows no number (re %q, im %q), native %v", s.Re, s.Im, w.z.Value())
		}
		tol := relTol
		if w.tol > 0 {
			tol = w.tol
		}
		if g, n := complex(re, im), w.z.Value(); !cscalar.EqualWithinRel(g, n, tol) {
			return fmt.Sprintf("page %v, native %v (relative difference %.3g)", g, n, relDiff(g, n))
		}
	case 'x':
		if w.x == nil {
			if !s.Null {
				return fmt.Sprintf("shows %q, native has no finite value", s.Value)
			}
			return ""
		}
		v, ok := num(s.Value)
		if s.Null || !ok {
			return fmt.Sprintf("shows no number (%q), native %v", s.Value, *w.x)
		}
		tol := relTol
		if w.tol > 0 {
			tol = w.tol
		}
		if w.abs {
			if !scalar.EqualWithinAbs(v, *w.x, tol) {
				return fmt.Sprintf("page %v, native %v", v, *w.x)
			}
		} else if !scalar.EqualWithinRel(v, *w.x, tol) {
			return fmt.Sprintf("page %v, native %v (relative difference %.3g)", v, *w.x, math.Abs(v-*w.x)/math.Max(math.Abs(v), math.Abs(*w.x)))
		}
	}
	return ""
}

// chart is one SVG chart of a results panel, with its data attributes.
type chart struct {
	ID     string            `json:"id"`
	Freq   string            `json:"freq"`
	Time   string            `json:"time"`   // a time chart's times, instead of Freq
	Traces map[string]string `json:"traces"` // data-name → data-values
}

// charts reads every chart of the calculator's results panel.
func charts(t *testing.T, ctx context.Context, id string) []chart {
	t.Helper()
	return eval[[]chart](t, ctx, `(function () {
  var root = document.querySelector(`+jsString(calcSel(id)+` [data-role="results"]`)+`);
  return Array.from(root.querySelectorAll('svg.zplot')).map(function (s) {
    var tr = {};
    s.querySelectorAll('path[data-values]').forEach(function (p) { tr[p.getAttribute('data-name')] = p.getAttribute('data-values'); });
    return { id: s.id, freq: s.getAttribute('data-freq') || s.getAttribute('data-nyquist') || '', time: s.getAttribute('data-time') || '', traces: tr };
  });
})()`)
}

// compareCharts lists the differences between the charts of the calculator
// whose element id is calcID (the prefix of its charts' ids) and
// resp's sweep. A chart keeps |v| to six significant digits and the phase
// to 0.01° (package plot), so that is the precision asked for here.
func compareCharts(calcID string, got []chart, resp *api.Response) []string {
	s := resp.Sweep
	if s == nil {
		return []string{"the native response has no sweep"}
	}
	type series struct {
		chart, trace string
		v            []*api.Complex
	}
	var exp []series
	prefix := calcID + "-plot-"
	for i, p := range s.Ports {
		c := prefix + "port" + strconv.Itoa(i)
		exp = append(exp, series{c, "Z (Blackman)", p.Z}, series{c, "Z₀ (reference gain zero)", p.Z0})
	}
	exp = append(exp, series{prefix + "loop", "T", s.ReturnRatio})
	if s.Gain != nil && resp.Gain != nil {
		exp = append(exp, series{prefix + "gain", "g", s.Gain.G}, series{prefix + "gain", "g∞ (ideal)", s.Gain.GInf})
	}
	if n := api.Noise.Result(resp); n != nil {
		reals := func(v []*float64) []*api.Complex {
			out := make([]*api.Complex, len(v))
			for i, x := range v {
				if x != nil {
					out[i] = &api.Complex{Re: *x}
				}
			}
			return out
		}
		exp = append(exp, series{prefix + "noise", "total", reals(n.Output)})
		for _, c := range n.Contributors {
			if c.Density != nil {
				exp = append(exp, series{prefix + "noise", calc.NoiseTrace(c), reals(c.Density)})
			}
		}
		if n.Input != nil {
			exp = append(exp, series{prefix + "noise-in", "input-referred", reals(n.Input)})
		}
		if n.NoiseGain != nil {
			exp = append(exp, series{prefix + "noise-gain", "noise gain 1/β", n.NoiseGain},
				series{prefix + "noise-gain", "eₙ → " + n.Node + " (closed loop)", n.EnTransfer})
		}
	}
	for _, l := range loopViewSeries(prefix, resp) {
		exp = append(exp, series(l))
	}
	byID := map[string]chart{}
	var bad []string
	bad = append(bad, compareStepChart(prefix, got, resp)...)
	for _, c := range got {
		if c.Time != "" {
			continue // the step chart, compared above
		}
		byID[c.ID] = c
		f := strings.Fields(c.Freq)
		if len(f) != len(s.Frequency) {
			bad = append(bad, fmt.Sprintf("chart %s: %d frequencies, native sweep %d", c.ID, len(f), len(s.Frequency)))
			continue
		}
		for i, x := range f {
			v, err := strconv.ParseFloat(x, 64)
			// Relative however small the frequency (gonum's EqualWithinRel
			// turns absolute below the smallest normal number).
			if err != nil || math.Abs(v-s.Frequency[i]) > 5.01e-6*math.Max(v, s.Frequency[i]) {
				bad = append(bad, fmt.Sprintf("chart %s: frequency %d is %s, native %v", c.ID, i, x, s.Frequency[i]))
				break
			}
		}
	}
	want := map[string]int{}
	for _, e := range exp {
		want[e.chart]++
	}
	for _, c := range got {
		if c.Time != "" {
			continue
		}
		if want[c.ID] == 0 {
			bad = append(bad, "chart "+c.ID+" is not one the native response has")
		} else if len(c.Traces) != want[c.ID] {
			bad = append(bad, fmt.Sprintf("chart %s has %d traces, want %d", c.ID, len(c.Traces), want[c.ID]))
		}
	}
	for _, e := range exp {
		c, ok := byID[e.chart]
		if !ok {
			bad = append(bad, "no chart "+e.chart)
			continue
		}
		vals, ok := c.Traces[e.trace]
		if !ok {
			bad = append(bad, fmt.Sprintf("chart %s: no trace %q", e.chart, e.trace))
			continue
		}
		if msg := compareTrace(vals, e.v); msg != "" {
			bad = append(bad, fmt.Sprintf("chart %s, trace %q: %s", e.chart, e.trace, msg))
		}
	}
	sort.Strings(bad)
	return bad
}

// compareTrace holds a trace's data-values ("|v| phase" pairs; a
// magnitude-only chart keeps the phases too) to the native values: |v|
// within half a unit of the sixth digit, the phase within 0.005° modulo
// 360° (the chart unwraps it). A gap (NaN) is right only where the native
// value is not finite or zero.
func compareTrace(vals string, v []*api.Complex) string {
	f := strings.Fields(vals)
	if len(f) != 2*len(v) {
		return fmt.Sprintf("%d numbers, want %d", len(f), 2*len(v))
	}
	for i, c := range v {
		mag, err1 := strconv.ParseFloat(f[2*i], 64)
		ph, err2 := strconv.ParseFloat(f[2*i+1], 64)
		if err1 != nil || err2 != nil {
			return fmt.Sprintf("point %d: unreadable %q", i, f[2*i:2*i+2])
		}
		if c == nil || c.Value() == 0 {
			if !math.IsNaN(mag) {
				return fmt.Sprintf("point %d: chart %v, native has no finite nonzero value", i, mag)
			}
			continue
		}
		z := c.Value()
		if !scalar.EqualWithinRel(mag, cmplx.Abs(z), 5.01e-6) {
			return fmt.Sprintf("point %d: |v| %v on the chart, native %v", i, mag, cmplx.Abs(z))
		}
		d := ph - cmplx.Phase(z)*180/math.Pi
		d -= 360 * math.Round(d/360)
		if math.Abs(d) > 0.00501 {
			return fmt.Sprintf("point %d: phase %v° on the chart, native %v°", i, ph, cmplx.Phase(z)*180/math.Pi)
		}
	}
	return ""
}

// checkLive fails t unless the calculator's panel is one the live engine
// rendered: the pre-rendered panel the probe marked is gone, and the page
// marked its first live result for the benchmark.
func checkLive(t *testing.T, ctx context.Context, id string) {
	t.Helper()
	if n := eval[int](t, ctx, `window.__e2e ? window.__e2e.prerendered : -2`); n < 1 {
		t.Fatalf("the probe found %d pre-rendered panels (want at least 1): it cannot tell a live panel from a built one", n)
	}
	poll(t, ctx, `document.querySelector(`+jsString(calcSel(id)+` [data-role="results"] > .panel:not([data-e2e-prerendered])`)+`) !== null && `+
		`document.querySelectorAll('[data-e2e-prerendered]').length === 0 && `+
		`performance.getEntriesByName('zport-first-live').length === 1`)
}

// checkAgainstNative compares every value and chart of calculator id with
// the native engine's answer to the calculator's current inputs, and
// returns that answer.
func checkAgainstNative(t *testing.T, ctx context.Context, id string) *api.Response {
	t.Helper()
	resp := native(t, id, inputs(t, ctx, id))
	got := shownValues(t, ctx, id)
	if len(got) == 0 {
		t.Fatalf("%s: the panel shows no values", id)
	}
	for _, msg := range compareShown(got, resp) {
		t.Errorf("%s: %s", id, msg)
	}
	elID := eval[string](t, ctx, `document.querySelector(`+jsString(calcSel(id))+`).id`)
	for _, msg := range compareCharts(elID, charts(t, ctx, id), resp) {
		t.Errorf("%s: %s", id, msg)
	}
	return resp
}
