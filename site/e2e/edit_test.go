//go:build !js

package e2e

import (
	"context"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"

	"zport/engine/api"
	"zport/site/calc"
)

// inputSel is the CSS selector of input name of calculator id.
func inputSel(id, name string) string {
	return calcSel(id) + ` input[name="` + name + `"]`
}

// typeInto replaces the text of an input the way a user does: focus it,
// select what it holds, and type text as key events, one per character
// (each one an input event, so the page recomputes as the user types).
func typeInto(t *testing.T, ctx context.Context, id, name, text string) {
	t.Helper()
	selectInput(t, ctx, id, name)
	if err := chromedp.Do(ctx, chromedp.KeyEvent(text)); err != nil {
		t.Fatalf("typing %q into %s: %v", text, name, err)
	}
}

// pasteInto replaces the text of an input in one insertion, as a paste
// does: one input event for the whole text.
func pasteInto(t *testing.T, ctx context.Context, id, name, text string) {
	t.Helper()
	selectInput(t, ctx, id, name)
	if _, err := chromedp.Call(ctx, input.InsertText, input.InsertTextParams{Text: text}); err != nil {
		t.Fatalf("inserting %q into %s: %v", text, name, err)
	}
}

func selectInput(t *testing.T, ctx context.Context, id, name string) {
	t.Helper()
	ok := eval[bool](t, ctx, `(function () {
  var e = document.querySelector(`+jsString(inputSel(id, name))+`);
  if (!e) return false;
  e.scrollIntoView({ block: 'center' });
  e.focus();
  e.select();
  return document.activeElement === e;
})()`)
	if !ok {
		t.Fatalf("cannot focus input %s of %s", name, id)
	}
}

// waitState waits until the calculator's share link (and the address, as
// the page's first calculator) holds the settings of its current inputs
// (after p=PAGE in the single-file export):
// the page writes them with the panel it computed from them, so the panel
// on the page is then the one for those inputs.
func waitState(t *testing.T, ctx context.Context, id string) string {
	t.Helper()
	e, ok := api.LookupEntry(id)
	if !ok {
		t.Fatalf("no stage %s", id)
	}
	want := "#" + form(id, inputs(t, ctx, id)).State(e)
	// In the single-file export the page's own key comes first.
	if page := eval[string](t, ctx, `(function () {
  var s = document.documentElement.getAttribute('data-single') === 'true' && document.querySelector(`+jsString(calcSel(id))+`).closest('section.page');
  return s ? s.id.replace(/^page-/, '') : '';
})()`); page != "" {
		want = "#p=" + page + "&" + want[1:]
	}
	poll(t, ctx, `document.querySelector(`+jsString(calcSel(id)+` [data-action="share"]`)+`).getAttribute('href') === `+jsString(want)+
		` && location.hash === `+jsString(want))
	return want
}

// An edit per stage that reaches every port, the loop and the gain.
var edits = []struct{ id, param, value string }{
	{"inverting", "R2", "100k"},
	{"noninverting", "R2", "47k"},
	{"follower", "gbw", "10M"},
	{"transimpedance", "Rf", "470k"},
	{"difference", "gbw", "3M"},
	{"howland", "gbw", "3M"},
	{"integrator", "gbw", "3M"},
	{"capload", "gbw", "10M"},
	{"degenerated", "gm", "2m"},
	{"shuntfeedback", "IC", "2m"},
	{"boostedcascode", "Ab", "2000"},
	{"emitterfollower", "IC", "3m"},
	{"miller", "Rz", "1k"},
}

// Typing a value (key by key) updates every port row and every chart, and
// the new values are the native engine's for the new parameter. A stage
// per tab, side by side.
func TestTypingUpdatesEveryRowAndChart(t *testing.T) {
	t.Parallel()
	covered := map[string]bool{}
	for _, ed := range edits {
		covered[ed.id] = true
		t.Run(ed.id, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, fileURL(ed.id, ""))
			checkLive(t, ctx, ed.id)
			before := shownValues(t, ctx, ed.id)
			beforeCharts := charts(t, ctx, ed.id)
			beforeResp := native(t, ed.id, inputs(t, ctx, ed.id))

			typeInto(t, ctx, ed.id, ed.param, ed.value)
			if got := inputs(t, ctx, ed.id)[ed.param]; got != ed.value {
				t.Fatalf("input %s holds %q after typing %q", ed.param, got, ed.value)
			}
			state := waitState(t, ctx, ed.id)
			if !strings.Contains(state, ed.param+"="+ed.value) {
				t.Errorf("the settings %q do not hold %s=%s", state, ed.param, ed.value)
			}
			resp := checkAgainstNative(t, ctx, ed.id)

			// Every port row changed, and every chart.
			after := shownValues(t, ctx, ed.id)
			for _, p := range beforeResp.Ports {
				if v0, v1 := valueOf(before, p.Name+"/z"), valueOf(after, p.Name+"/z"); v0 == v1 {
					t.Errorf("port %s: Z still %s after the edit", p.Name, v0)
				}
			}
			if len(resp.Ports) != len(beforeResp.Ports) {
				t.Errorf("%d ports after the edit, %d before", len(resp.Ports), len(beforeResp.Ports))
			}
			afterCharts := charts(t, ctx, ed.id)
			if len(afterCharts) != len(beforeCharts) {
				t.Fatalf("%d charts after the edit, %d before", len(afterCharts), len(beforeCharts))
			}
			for i, c := range afterCharts {
				changed := false
				for name, v := range c.Traces {
					if beforeCharts[i].Traces[name] != v {
						changed = true
					}
				}
				if !changed {
					t.Errorf("chart %s did not change", c.ID)
				}
			}
			if n := eval[int](t, ctx, `document.querySelectorAll('.is-stale, [data-role="stale"]').length`); n != 0 {
				t.Errorf("a good edit left %d stale marks", n)
			}
			checkHealthy(t, ctx)
		})
	}
	for _, e := range api.Catalog() {
		if !covered[e.ID] {
			t.Errorf("stage %s has no edit in the table", e.ID)
		}
	}
}

// valueOf is the displayed value of key, as "re im" (or the real value).
func valueOf(s []shown, key string) string {
	for _, v := range s {
		if v.Key == key {
			return v.Re + " " + v.Im + v.Value
		}
	}
	return "(missing)"
}

// A bad value shows its message beside the input, naming the parameter;
// the page stays alive and keeps the last good result, marked stale;
// correcting the value clears all of it.
func TestBadValueKeepsLastGoodResult(t *testing.T) {
	ctx := start(t)
	const id = "inverting"
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)

	// A good edit first, so the last good result is not the built one.
	typeInto(t, ctx, id, "R2", "100k")
	good := waitState(t, ctx, id)
	goodValues := shownValues(t, ctx, id)
	goodCharts := charts(t, ctx, id)

	// Typed text goes through every prefix; "4k7" and "1" are good
	// values, so those are pasted in one go, and the last good result
	// stays the one before.
	for _, bad := range []struct {
		field, text string
		paste       bool
	}{
		{"R1", "4k7k", true},
		{"R1", "abc", false},
		{"frequency", "1..2", true},
	} {
		t.Run(bad.field+"="+bad.text, func(t *testing.T) {
			if bad.paste {
				pasteInto(t, ctx, id, bad.field, bad.text)
			} else {
				typeInto(t, ctx, id, bad.field, bad.text)
			}
			in := inputs(t, ctx, id)
			out := calc.Compute(form(id, in))
			if out.Error == nil || out.Error.Param != bad.field {
				t.Fatalf("the native engine does not refuse %s=%q by that field: %+v", bad.field, bad.text, out.Error)
			}
			msgSel := jsString(calcSel(id) + ` .field[data-field="` + bad.field + `"] [data-role="msg"]`)
			poll(t, ctx, `document.querySelector(`+msgSel+`).textContent === `+jsString(out.Error.Message))
			if bad.field == "R1" && !strings.Contains(out.Error.Message, "R₁") {
				t.Errorf("the message %q does not name the parameter R₁", out.Error.Message)
			}
			if got := eval[string](t, ctx, `document.querySelector(`+jsString(inputSel(id, bad.field))+`).getAttribute('aria-invalid') || ''`); got != "true" {
				t.Errorf("aria-invalid = %q on the bad input", got)
			}
			// Stale, visibly, with the last good values and charts.
			if !eval[bool](t, ctx, `document.querySelector(`+jsString(calcSel(id)+` [data-role="results"]`)+`).classList.contains('is-stale')`) {
				t.Error("the results are not marked stale")
			}
			if !eval[bool](t, ctx, `(function () { var n = document.querySelector(`+jsString(calcSel(id)+` [data-role="stale"]`)+`); return !!n && n.offsetHeight > 0 && /last good/.test(n.textContent); })()`) {
				t.Error("no visible stale note")
			}
			if got := shownValues(t, ctx, id); !sameShown(got, goodValues) {
				t.Error("the values changed although the input is bad")
			}
			if got := charts(t, ctx, id); !sameCharts(got, goodCharts) {
				t.Error("the charts changed although the input is bad")
			}
			if h := eval[string](t, ctx, `location.hash`); h != good {
				t.Errorf("the address changed to %q; it should keep the last good settings %q", h, good)
			}
			// Alive: the engine still answers, and other fields still work.
			if got := eval[string](t, ctx, `document.documentElement.dataset.engine`); got != "ready" {
				t.Errorf("engine %q after a bad value", got)
			}
			checkHealthy(t, ctx)

			// Correcting the value clears the message and the stale mark.
			fix := map[string]string{"R1": "4k7", "frequency": "2k"}[bad.field]
			typeInto(t, ctx, id, bad.field, fix)
			waitState(t, ctx, id)
			poll(t, ctx, `document.querySelector(`+msgSel+`).textContent === ''`)
			if n := eval[int](t, ctx, `document.querySelectorAll('[aria-invalid], .is-stale, [data-role="stale"]').length`); n != 0 {
				t.Errorf("%d error or stale marks left after the fix", n)
			}
			checkAgainstNative(t, ctx, id)
			goodValues, goodCharts = shownValues(t, ctx, id), charts(t, ctx, id)
			good = eval[string](t, ctx, `location.hash`)
		})
	}
}

func sameShown(a, b []shown) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func sameCharts(a, b []chart) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].ID != b[i].ID || a[i].Freq != b[i].Freq || len(a[i].Traces) != len(b[i].Traces) {
			return false
		}
		for k, v := range a[i].Traces {
			if b[i].Traces[k] != v {
				return false
			}
		}
	}
	return true
}
