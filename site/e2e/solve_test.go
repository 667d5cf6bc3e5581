//go:build !js

package e2e

import (
	"context"
	"math"
	"net/url"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
)

// The solve section (site/assets/solve.js): opened from a link it runs
// once and shows what the native engine finds, number for number; a
// solution and a standard value apply to a stage's input and to the
// custom page's circuit text, the calculator following; its settings
// travel in the share link and back; the single file carries it; a bad
// setting in a link is named.

// solveState waits for the solve section under root (a CSS selector) to
// reach state.
func solveWait(t *testing.T, ctx context.Context, root, state string) {
	t.Helper()
	d := `document.querySelector(` + jsString(root+" details.solve") + `)`
	poll(t, ctx, `!!`+d+` && `+d+`.getAttribute('data-solve-state') === `+jsString(state))
}

// solveNumbers reads the numbers of the solve panel under root: by row
// kind, index and stat ("solution|0|value").
func solveNumbers(t *testing.T, ctx context.Context, root string) map[string]float64 {
	t.Helper()
	raw := eval[[]string](t, ctx, `Array.from(document.querySelectorAll(`+jsString(root+` [data-aid="solve"] tr[data-solve]`)+`)).flatMap(tr =>
		Array.from(tr.querySelectorAll('[data-stat][data-value]')).map(e => tr.dataset.solve + '|' + tr.dataset.index + '|' + e.dataset.stat + '|' + e.dataset.value))`)
	out := map[string]float64{}
	for _, s := range raw {
		i := strings.LastIndexByte(s, '|')
		v, err := strconv.ParseFloat(s[i+1:], 64)
		if err != nil {
			t.Fatalf("%s: %v", s, err)
		}
		out[s[:i]] = v
	}
	return out
}

// solveNative is the engine's own answer, for the page to match.
func solveNative(t *testing.T, req api.Request, part, q string, x float64) *api.SolveResult {
	t.Helper()
	api.Solve.Ask(&req, &api.SolveRequest{Part: part, Target: api.SolveTarget{Quantity: q, Value: &x}})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	return api.Solve.Result(resp)
}

// solveMatch checks the page's solutions and standard values against the
// native answer.
func solveMatch(t *testing.T, got map[string]float64, want *api.SolveResult) {
	t.Helper()
	check := func(key string, w *float64) {
		g, ok := got[key]
		if !ok || w == nil {
			t.Errorf("%s: page %v (shown %v), native %v", key, g, ok, w)
			return
		}
		if math.Abs(g-*w) > 1e-12*math.Abs(*w) {
			t.Errorf("%s: page %.15g, native %.15g", key, g, *w)
		}
	}
	if len(want.Solutions) == 0 {
		t.Fatal("the native engine finds no solution")
	}
	for i, s := range want.Solutions {
		k := "solution|" + strconv.Itoa(i) + "|"
		check(k+"value", &s.Value)
		check(k+"achieved", s.Achieved)
		if i < len(want.Standard) {
			sv := want.Standard[i]
			check("below|"+strconv.Itoa(i)+"|value", &sv.Below.Value)
			check("below|"+strconv.Itoa(i)+"|achieved", sv.Below.Achieved)
			check("above|"+strconv.Itoa(i)+"|value", &sv.Above.Value)
			check("above|"+strconv.Itoa(i)+"|achieved", sv.Above.Achieved)
		}
	}
}

// solveApply clicks the apply button of the row kind ("solution",
// "below") and returns the text it applies.
func solveApply(t *testing.T, ctx context.Context, root, kind string) string {
	t.Helper()
	sel := root + ` [data-aid="solve"] tr[data-solve="` + kind + `"] button[data-solve-apply]`
	text := eval[string](t, ctx, `document.querySelector(`+jsString(sel)+`).dataset.text`)
	eval[bool](t, ctx, `(document.querySelector(`+jsString(sel)+`).click(), true)`)
	return text
}

func TestSolveStagePage(t *testing.T) {
	ctx := start(t)
	const root = "#calc-transimpedance"
	load(t, ctx, fileURL("transimpedance", "solve.part=Cf&solve.quantity=pm&solve.value=45"))
	solveWait(t, ctx, root, "done")
	native := solveNative(t, api.Request{Topology: "transimpedance", Frequency: 1e3}, "Cf", "pm", 45)
	solveMatch(t, solveNumbers(t, ctx, root), native)
	if n := eval[int](t, ctx, `document.querySelectorAll(`+jsString(root+` [data-aid="solve"] svg.zplot-curve path[data-values]`)+`).length`); n != 1 {
		t.Errorf("%d curves drawn", n)
	}

	// A solution applied: the input takes it, the calculator follows, and
	// the margin it shows is the target.
	text := solveApply(t, ctx, root, "solution")
	if v := eval[string](t, ctx, `document.querySelector(`+jsString(root+` input[name="Cf"]`)+`).value`); v != text {
		t.Errorf("Cf input %q, applied %q", v, text)
	}
	poll(t, ctx, `(function () { var e = document.querySelector(`+jsString(root+` [data-role="results"] [data-quantity="pm"]`)+`); return !!e && Math.abs(Number(e.dataset.value) - 45) < 1e-5; })()`)
	// A standard value applied: the margin the page shows is the one the
	// row promised.
	below := native.Standard[0].Below
	text = solveApply(t, ctx, root, "below")
	if text != "470f" {
		t.Errorf("the E12 value below applies %q", text)
	}
	poll(t, ctx, `(function () { var e = document.querySelector(`+jsString(root+` [data-role="results"] [data-quantity="pm"]`)+`); return !!e && Math.abs(Number(e.dataset.value) - `+strconv.FormatFloat(*below.Achieved, 'g', -1, 64)+`) < 1e-6; })()`)
	if eval[bool](t, ctx, `document.querySelector(`+jsString(root+` [data-role="solve-results"]`)+`).classList.contains('is-stale')`) {
		t.Error("applying a value the results offered marked them out of date")
	}
	// Another edit makes them out of date.
	eval[bool](t, ctx, `(() => { const i = document.querySelector(`+jsString(root+` input[name="Rf"]`)+`); i.value = '2M'; i.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	poll(t, ctx, `document.querySelector(`+jsString(root+` [data-role="solve-results"]`)+`).classList.contains('is-stale')`)

	// The share link carries the solve's settings and the part applied;
	// opened in another tab, it gives the same answer again.
	poll(t, ctx, `document.querySelector(`+jsString(root+` [data-action="share"]`)+`).getAttribute('href').includes('Rf=2M')`)
	href := eval[string](t, ctx, `document.querySelector(`+jsString(root+` [data-action="share"]`)+`).getAttribute('href')`)
	for _, want := range []string{"Cf=470f", "solve.part=Cf", "solve.quantity=pm", "solve.value=45"} {
		if !strings.Contains(href, want) {
			t.Errorf("share link %s lacks %s", href, want)
		}
	}
	checkHealthy(t, ctx)
	tab := newTab(t, ctx)
	load(t, tab, fileURL("transimpedance", strings.TrimPrefix(href, "#")))
	solveWait(t, tab, root, "done")
	again := solveNative(t, api.Request{Topology: "transimpedance", Frequency: 1e3, Params: map[string]string{"Cf": "470f", "Rf": "2M"}}, "Cf", "pm", 45)
	got := solveNumbers(t, tab, root)
	solveMatch(t, got, again)
	if got["nominal|0|value"] != 470e-15 {
		t.Errorf("as given %v, want the 470 fF of the link", got["nominal|0|value"])
	}
	if v := eval[string](t, tab, `document.querySelector(`+jsString(root+` [data-solve="value"]`)+`).value`); v != "45" {
		t.Errorf("target from the link: %q", v)
	}
	checkHealthy(t, tab)
}

// The custom page: the solve works on the circuit text, and applying a
// value rewrites that one token and nothing else.
func TestSolveCustomPage(t *testing.T) {
	ctx := start(t)
	// REFERENCES.md §9 [derived]: Cd = 20 pF, Rf = 100 kΩ, a0 = 1e5,
	// gbw = 10 MHz; Cf for 60° is 2.10088 pF.
	text := "# photodiode stage, values our own\nisource   Iin gnd sum 1\ncapacitor Cd  sum gnd 20p\nresistor  Rf  out sum 100k\n" +
		"capacitor Cf  out sum 1pF   # feedback capacitor\nopamp     U1  gnd sum out a0=1e5 gbw=10M\nport      out out gnd\n"
	frag := "c=" + edCompress(t, []byte(text)) + "&ref=U1&port=out&src=Iin&out=out&f=1k&solve.part=Cf&solve.quantity=pm&solve.value=60"
	load(t, ctx, fileURL("custom", frag))
	const root = "[data-circuit-editor]"
	solveWait(t, ctx, root, "done")
	req := api.Request{Circuit: text, Reference: "U1", Ports: []string{"out"}, Frequency: 1e3, Gain: &api.GainSpec{Source: "Iin", Output: "out"}}
	native := solveNative(t, req, "Cf", "pm", 60)
	got := solveNumbers(t, ctx, root)
	solveMatch(t, got, native)
	if v := got["solution|0|value"]; math.Abs(v-2.10088e-12) > 5e-6*2.10088e-12 {
		t.Errorf("Cf for 60° = %g, REFERENCES.md §9 says 2.10088 pF", v)
	}

	applied := solveApply(t, ctx, root, "solution")
	want := strings.Replace(text, "1pF ", applied+"F ", 1)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] textarea').value === `+jsString(want))
	poll(t, ctx, `(function () { var e = document.querySelector('[data-circuit-editor] [data-role="results"] [data-quantity="pm"]'); return !!e && Math.abs(Number(e.dataset.value) - 60) < 1e-5; })()`)
	// A standard value too, into the same token.
	applied = solveApply(t, ctx, root, "above")
	if applied != "2.2p" {
		t.Errorf("the E12 value above 2.10 pF applies %q", applied)
	}
	want = strings.Replace(text, "1pF ", "2.2pF ", 1)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] textarea').value === `+jsString(want))
	poll(t, ctx, `location.hash.includes('solve.part=Cf') && location.hash.includes('solve.value=60')`)
	checkHealthy(t, ctx)
}

// The single-file export carries the solve section, and its link.
func TestSolveSingleFile(t *testing.T) {
	ctx := start(t)
	u := (&url.URL{Scheme: "file", Path: filepath.ToSlash(singleFile)}).String() + "#p=capload&solve.part=Riso&solve.quantity=pm&solve.value=60"
	load(t, ctx, u)
	solveWait(t, ctx, "#page-capload", "done")
	native := solveNative(t, api.Request{Topology: "capload", Frequency: 1e4}, "Riso", "pm", 60)
	solveMatch(t, solveNumbers(t, ctx, "#page-capload"), native)
	checkHealthy(t, ctx)
}

// A bad setting in a link is refused with its setting named and why; the
// solve's other settings go with it (a target without its value is none),
// and the rest of the link is used.
func TestSolveBadLink(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("transimpedance", "Cf=2p&solve.part=Cf&solve.quantity=pm&solve.value=400"))
	poll(t, ctx, `(function () { var n = document.querySelector('#calc-transimpedance [data-role="notice"]'); return !n.hidden && n.textContent.includes('solve.value = "400"') && n.textContent.includes('a phase margin lies from'); })()`)
	if got := eval[string](t, ctx, `document.querySelector('`+inputSel("transimpedance", "Cf")+`').value`); got != "2p" {
		t.Errorf("Cf = %q after the link, want its 2p", got)
	}
	if eval[string](t, ctx, `document.querySelector('#calc-transimpedance details.solve').getAttribute('data-solve-state')`) != "idle" {
		t.Error("a refused link ran the solve")
	}
	checkHealthy(t, ctx)
}
