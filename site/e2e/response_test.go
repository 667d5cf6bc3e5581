//go:build !js

package e2e

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/calc"
	"zport/site/examples"
)

// The closed-loop response section and the loop views: the harness's
// hooks for them (the analyses' settings among a calculator's inputs, what
// they ask the engine, the values and charts they show), then their
// browser tests.

// setting files the input k = v under its analysis when k is the path of
// an analysis's setting ("response.to"), and reports whether it was.
func setting(k, v string, into *map[string]calc.Values) bool {
	key, name, ok := strings.Cut(k, ".")
	if !ok {
		return false
	}
	for _, a := range calc.Analyses {
		for _, s := range a.Settings {
			if a.Key == key && s.Name == name {
				if *into == nil {
					*into = map[string]calc.Values{}
				}
				if (*into)[key] == nil {
					(*into)[key] = calc.Values{}
				}
				(*into)[key][name] = v
				return true
			}
		}
	}
	return false
}

// askAnalyses adds to req what stage id's calculator asks the engine
// beyond the base request: the closed-loop response where the stage has a
// gain, on the time axis of its settings ("auto" leaves it to the engine).
func askAnalyses(t *testing.T, id string, req *api.Request, settings map[string]calc.Values) {
	t.Helper()
	e, ok := api.LookupEntry(id)
	if !ok || e.Gain == nil {
		return
	}
	var axis api.TimeAxis
	if s := settings["response"]["to"]; s != "" && s != "auto" {
		v, err := value.Parse(s, "s")
		if err != nil {
			t.Fatalf("%s: response.to %q: %v", id, s, err)
		}
		axis.To = &v
	}
	if s := settings["response"]["points"]; s != "" && s != "auto" {
		n, err := strconv.Atoi(s)
		if err != nil {
			t.Fatalf("%s: response.points %q: %v", id, s, err)
		}
		axis.Points = &n
	}
	q := &api.ResponseRequest{}
	if axis.To != nil || axis.Points != nil {
		q.Time = &axis
	}
	api.ClosedLoop.Ask(req, q)
}

// expectAnalyses adds to w what the loop views and the response section
// show for resp.
// respTol is how close the page's response figures must come to the
// native engine's. They are computed in float64 from the circuit's pencil
// — eigenvalues, a matrix exponential, slopes on log axes — without the
// refinement the nodal values get, so a last-bit difference between the
// WebAssembly math functions and amd64's grows with the problem's
// conditioning (to about 1e-11 on the transistor-level stages); 1e-9
// still catches any real disagreement.
const respTol = 1e-9

func expectAnalyses(resp *api.Response, w map[string]want) {
	x := func(k string, f *float64, abs bool) { w[k] = want{x: f, abs: abs, tol: respTol, kind: 'x'} }
	text := func(k, s string) { w[k] = want{text: &s, kind: 't'} }
	if m := resp.Margins; m != nil && m.Closure != nil {
		x("closure", &m.Closure.Rate, false)
		text("closureVerdict", m.Closure.Verdict)
	}
	r := api.ClosedLoop.Result(resp)
	if r == nil || r.Stability == api.NotComputed {
		return
	}
	text("stability", r.Stability)
	x("final", r.Final, false)
	// 100·(y/final − 1) scales the last bit of y, where the wasm's
	// exp and the native one may differ, by 100/overshoot.
	w["overshoot"] = want{x: r.Overshoot, abs: true, tol: 1e-10, kind: 'x'}
	if r.Peak != nil {
		x("peakTime", &r.Peak.Time, false)
	}
	x("riseTime", r.RiseTime, false)
	x("settling1", r.SettlingTime.Percent1, false)
	x("settling01", r.SettlingTime.Percent01, false)
	if ref := r.Reference; ref != nil {
		x("referenceGain", &ref.Gain, false)
		if ref.Frequency != nil && *ref.Frequency > 0 {
			x("referenceFrequency", ref.Frequency, false)
		}
	}
	if r.Stability == "stable" && r.Kind == "low-pass" {
		if p := r.Peaking; p != nil {
			x("peaking", &p.DB, false)
			x("peakingFrequency", &p.Frequency, false)
		} else {
			x("peaking", nil, false)
		}
	}
	x("bandwidth", r.Bandwidth, false)
	if r.LowerCorner != nil {
		x("lowerCorner", r.LowerCorner, false)
	}
	for i, p := range r.Poles {
		if p.Im < 0 {
			continue
		}
		k := "pole" + strconv.Itoa(i) + "/"
		x(k+"poleFrequency", &p.Frequency, false)
		x(k+"poleQ", p.Q, false)
		x(k+"poleZeta", p.Zeta, false)
		x(k+"poleWeight", &p.Weight, true)
		w[k+"pole"] = want{z: &api.Complex{Re: p.Re, Im: p.Im}, tol: respTol, kind: 'z'}
	}
}

// loopView is one trace of the loop views, over the sweep.
type loopView struct {
	chart, trace string
	v            []*api.Complex
}

// loopViewSeries are the traces of the gain-against-1/β and Nyquist
// charts of a calculator whose chart ids start with prefix.
func loopViewSeries(prefix string, resp *api.Response) []loopView {
	m, s := resp.Margins, resp.Sweep
	if m == nil || s == nil || len(m.OpenLoop) != len(s.Frequency) {
		return nil
	}
	return []loopView{
		{prefix + "beta", "|A| of " + resp.Reference, m.OpenLoop},
		{prefix + "beta", "1/β = |A/T|", m.NoiseGain},
		{prefix + "nyquist", "T of " + resp.Reference, s.ReturnRatio},
	}
}

// compareStepChart holds the step chart to the native response: its times
// and values to the chart's six digits.
func compareStepChart(prefix string, got []chart, resp *api.Response) []string {
	r := api.ClosedLoop.Result(resp)
	var c *chart
	for i := range got {
		if got[i].Time != "" {
			if got[i].ID != prefix+"step" || c != nil {
				return []string{"unexpected time chart " + got[i].ID}
			}
			c = &got[i]
		}
	}
	switch {
	case r == nil && c == nil:
		return nil
	case r == nil:
		return []string{"a step chart, but the native response has none"}
	case c == nil:
		return []string{"no step chart"}
	}
	var bad []string
	near := func(what string, i int, s string, v, scale float64) {
		x, err := strconv.ParseFloat(s, 64)
		if err != nil || math.Abs(x-v) > 5.01e-6*math.Abs(v)+1e-15*scale {
			bad = append(bad, fmt.Sprintf("step chart: %s %d is %s, native %v", what, i, s, v))
		}
	}
	ts := strings.Fields(c.Time)
	vs := strings.Fields(c.Traces["step"])
	if len(ts) != len(r.Step.Time) || len(vs) != len(r.Step.Value) {
		return []string{fmt.Sprintf("step chart: %d times and %d values, native %d", len(ts), len(vs), len(r.Step.Time))}
	}
	scale := 0.0
	for _, v := range r.Step.Value {
		scale = math.Max(scale, math.Abs(v))
	}
	for i := range ts {
		near("time", i, ts[i], r.Step.Time[i], r.Step.Time[len(ts)-1])
		near("value", i, vs[i], r.Step.Value[i], scale)
		if len(bad) > 3 {
			break
		}
	}
	return bad
}

// chartReadout returns the readout lines of the chart with element id.
func chartReadout(t *testing.T, ctx context.Context, id string) []string {
	t.Helper()
	return eval[[]string](t, ctx, `Array.from(document.querySelectorAll('#`+id+` .zcur text')).map(function (e) { return e.textContent; })`)
}

// signedFixed writes v with d decimals and a typographic minus, as the
// readout does.
func signedFixed(v float64, d int) string {
	s := strconv.FormatFloat(v, 'f', d, 64)
	if strings.HasPrefix(s, "-") {
		if strings.Trim(s[1:], "0.") == "" {
			return s[1:]
		}
		return "−" + s[1:]
	}
	return s
}

// The capacitive-load page from file:// shows the response section and
// the loop views with the native engine's numbers; the step, gain-against-
// 1/β and Nyquist charts read out by keyboard; the time axis settings
// change the step and travel in the link; a bad setting is named beside
// its input and keeps the last good result.
func TestResponseSection(t *testing.T) {
	ctx := start(t)
	const id = "capload"
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)
	resp := checkAgainstNative(t, ctx, id)
	r := api.ClosedLoop.Result(resp)
	if r == nil {
		t.Fatal("the native response has no closed-loop response")
	}
	elID := eval[string](t, ctx, `document.querySelector(`+jsString(calcSel(id))+`).id`)
	for _, c := range []string{"step", "beta", "nyquist"} {
		if !eval[bool](t, ctx, `!!document.getElementById(`+jsString(elID+"-plot-"+c)+`)`) {
			t.Errorf("no %s chart", c)
		}
	}

	// The step chart: End shows the last sample.
	step := elID + "-plot-step"
	if err := chromedp.Do(ctx, chromedp.Focus("#"+step), chromedp.KeyEvent(kb.End)); err != nil {
		t.Fatal(err)
	}
	n := len(r.Step.Time)
	wantStep := []string{"t = " + value.Format(r.Step.Time[n-1], "s", 4), "step: " + strconv.FormatFloat(r.Step.Value[n-1], 'g', 4, 64)}
	if got := chartReadout(t, ctx, step); strings.Join(got, "|") != strings.Join(wantStep, "|") {
		t.Errorf("step readout %q, want %q", got, wantStep)
	}
	// The Nyquist chart: focus shows the lowest frequency; an arrow the next.
	nyq := elID + "-plot-nyquist"
	if err := chromedp.Do(ctx, chromedp.Focus("#"+nyq), chromedp.KeyEvent(kb.ArrowRight)); err != nil {
		t.Fatal(err)
	}
	T := resp.Sweep.ReturnRatio[1].Value()
	wantNyq := []string{value.Format(resp.Sweep.Frequency[1], "Hz", 3),
		"T of U1: " + value.Format(cmplx.Abs(T), "", 3) + "  ∠ " + signedFixed(cmplx.Phase(T)*180/math.Pi, 1) + "°  (" + signedFixed(20*math.Log10(cmplx.Abs(T)), 1) + " dB)"}
	if got := chartReadout(t, ctx, nyq); strings.Join(got, "|") != strings.Join(wantNyq, "|") {
		t.Errorf("Nyquist readout %q, want %q", got, wantNyq)
	}
	// Gain against 1/β: magnitudes only.
	beta := elID + "-plot-beta"
	if err := chromedp.Do(ctx, chromedp.Focus("#"+beta), chromedp.KeyEvent(kb.Home)); err != nil {
		t.Fatal(err)
	}
	a := resp.Margins.OpenLoop[0].Value()
	ng := resp.Margins.NoiseGain[0].Value()
	wantBeta := []string{value.Format(resp.Sweep.Frequency[0], "Hz", 3),
		"|A| of U1: " + signedFixed(20*math.Log10(cmplx.Abs(a)), 1) + " dB", "1/β = |A/T|: " + signedFixed(20*math.Log10(cmplx.Abs(ng)), 1) + " dB"}
	if got := chartReadout(t, ctx, beta); strings.Join(got, "|") != strings.Join(wantBeta, "|") {
		t.Errorf("gain-against-1/β readout %q, want %q", got, wantBeta)
	}

	// A time span of our own: the step ends there, the link carries it.
	typeInto(t, ctx, id, "response.to", "20u")
	state := waitState(t, ctx, id)
	if !strings.Contains(state, "response.to=20u") {
		t.Errorf("the link %q does not carry the time span", state)
	}
	resp = checkAgainstNative(t, ctx, id)
	if r := api.ClosedLoop.Result(resp); !scalar.EqualWithinRel(r.Step.Time[len(r.Step.Time)-1], 20e-6, 1e-15) {
		t.Errorf("the step ends at %g s, want 20 µs", r.Step.Time[len(r.Step.Time)-1])
	}
	good := shownValues(t, ctx, id)

	// Too few points: named beside the input; the last good result stays.
	typeInto(t, ctx, id, "response.points", "5")
	msgSel := jsString(calcSel(id) + ` .field[data-field="response.points"] [data-role="msg"]`)
	poll(t, ctx, `/10 to 20000/.test(document.querySelector(`+msgSel+`).textContent)`)
	if got := shownValues(t, ctx, id); !sameShown(got, good) {
		t.Error("the values changed although the setting is bad")
	}
	if h := eval[string](t, ctx, `location.hash`); h != state {
		t.Errorf("the address changed to %q; it should keep %q", h, state)
	}
	checkHealthy(t, ctx)
}

// The custom page: a circuit with a gain shows its response with the
// native engine's numbers; without a gain the section says what is
// missing.
func TestResponseOnCustomPage(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	var ex examples.Example
	for _, e := range examples.All() {
		if e.Gain != nil {
			ex = e
			break
		}
	}
	if ex.Gain == nil {
		t.Fatal("no example with a gain")
	}
	if err := chromedp.Do(ctx, chromedp.SetValue(`[data-circuit-editor] [data-role="example"]`, ex.ID)); err != nil {
		t.Fatal(err)
	}
	edChoose(t, ctx, "example", ex.ID)
	s := edRead(t, ctx)
	req := edRequest(t, s)
	api.ClosedLoop.Ask(&req, &api.ResponseRequest{})
	resp := edNative(t, req)
	r := api.ClosedLoop.Result(resp)
	got := edValues(t, ctx, "[data-circuit-editor]")
	for k, v := range map[string]*float64{"final": r.Final, "riseTime": r.RiseTime, "settling1": r.SettlingTime.Percent1, "bandwidth": r.Bandwidth} {
		g, ok := got[k]
		if v == nil {
			if !ok || !g.Null {
				t.Errorf("%s: shown %+v, native none", k, g)
			}
			continue
		}
		f, err := strconv.ParseFloat(g.Value, 64)
		if !ok || err != nil || !scalar.EqualWithinRel(f, *v, edTol) {
			t.Errorf("%s = %q on the page, %v natively", k, g.Value, *v)
		}
	}
	if !eval[bool](t, ctx, `!!document.querySelector('[data-circuit-editor] svg.zplot-time') && !!document.querySelector('[data-circuit-editor] svg.zplot-nyquist')`) {
		t.Error("no step or Nyquist chart on the custom page")
	}
	edChoose(t, ctx, "gain-source", "")
	if !eval[bool](t, ctx, `/Choose a gain/.test(document.querySelector('[data-circuit-editor] section[data-analysis="response"]').textContent)`) {
		t.Error("without a gain the response section does not say what is missing")
	}
	if eval[bool](t, ctx, `!!document.querySelector('[data-circuit-editor] svg.zplot-time')`) {
		t.Error("a step chart without a gain")
	}
	checkHealthy(t, ctx)
}
