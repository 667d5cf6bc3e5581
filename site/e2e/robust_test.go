//go:build !js

package e2e

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"

	"zport/engine/api"
	"zport/site/calc"
	"zport/site/examples"
)

// Never lose the user's work, never show a broken state: drafts across
// reloads, links by one rule, tiny values, long tokens, scripts off and
// the editor's input limits. Helpers here start with rb.

// rbReload reloads the page as the user does and waits for the engine.
func rbReload(t *testing.T, ctx context.Context) {
	t.Helper()
	if err := chromedp.Do(ctx, chromedp.Reload()); err != nil {
		t.Fatalf("reload: %v", err)
	}
	waitEngine(t, ctx)
}

// rbWaitDraft waits until the draft the page keeps under name (zport.js)
// satisfies cond, a JavaScript expression over the draft d.
func rbWaitDraft(t *testing.T, ctx context.Context, name, cond string) {
	t.Helper()
	poll(t, ctx, `(function () {
  for (var i = 0; i < sessionStorage.length; i++) {
    var k = sessionStorage.key(i);
    if (k.indexOf('zport.draft:') !== 0 || k.slice(-`+fmt.Sprint(len(name)+1)+`) !== ':' + `+jsString(name)+`) continue;
    var d = JSON.parse(sessionStorage.getItem(k));
    return !!(`+cond+`);
  }
  return false;
})()`)
}

// rbProblems is the editor's list of problems, one line each.
func rbProblems(t *testing.T, ctx context.Context) string {
	t.Helper()
	return eval[string](t, ctx, `Array.from(document.querySelectorAll('[data-circuit-editor] [data-role="errors"] li')).map(function (l) { return l.textContent; }).join('\n')`)
}

// rbRestore clicks the button that brings back what a link replaced.
func rbRestore(t *testing.T, ctx context.Context, host, label string) {
	t.Helper()
	sel := host + ` [data-role="restore"] [data-action="restore-previous"]`
	poll(t, ctx, `(function () { var b = document.querySelector(`+jsString(sel)+`); return !!b && b.offsetHeight > 0 && b.textContent === `+jsString(label)+`; })()`)
	if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(sel))); err != nil {
		t.Fatalf("click %s: %v", sel, err)
	}
}

// The custom page keeps the reader's text across reloads, valid or not;
// a link that replaces it keeps it, and "Restore your previous text"
// brings it back, from a fresh load of the link and from one followed in
// the open page.
func TestCustomTextSurvivesReload(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	ex := examples.All()[0]

	// A valid circuit, then a line with an error: the reload keeps both.
	good := ex.Text + "resistor R3 out gnd 10k\n"
	edSetText(t, ctx, good)
	poll(t, ctx, `/^#c=/.test(location.hash)`) // the address holds the last valid text
	bad := good + "resistor R4 out gnd 4k7k\n"
	edSetText(t, ctx, bad)
	line := strings.Count(good, "\n") + 1
	at := fmt.Sprintf("line %d, column 24", line) // the second k of 4k7k
	if p := rbProblems(t, ctx); !strings.Contains(p, at) {
		t.Fatalf("problems before the reload: %q", p)
	}
	rbWaitDraft(t, ctx, "circuit", `d.text === `+jsString(bad))
	rbReload(t, ctx)
	poll(t, ctx, `document.querySelector('[data-circuit-editor]').dataset.live === 'true'`)
	if got := edRead(t, ctx).Text; got != bad {
		t.Fatalf("after the reload the editor holds %.80q…, not the text with its error", got)
	}
	if p := rbProblems(t, ctx); !strings.Contains(p, at) {
		t.Errorf("problems after the reload: %q", p)
	}

	// Text with an error from the start, on a page opened without a link.
	loadFresh(t, ctx, fileURL("custom", ""))
	poll(t, ctx, `document.querySelector('[data-circuit-editor]').dataset.live === 'true'`)
	if got := edRead(t, ctx).Text; got != bad {
		t.Fatalf("the page opened again without a link holds %.80q…, not the reader's text", got)
	}
	broken := "opamp U1 in fb out a0=oops\nport p out\n"
	edSetText(t, ctx, broken)
	rbWaitDraft(t, ctx, "circuit", `d.text === `+jsString(broken))
	rbReload(t, ctx)
	poll(t, ctx, `document.querySelector('[data-circuit-editor]').dataset.live === 'true'`)
	if got := edRead(t, ctx).Text; got != broken {
		t.Fatalf("after the reload the editor holds %.80q…, want the broken text", got)
	}

	// A link opened in the same tab replaces the text and keeps it.
	other := examples.All()[1].Text + "# sent by a colleague\n"
	link := fileURL("custom", "c="+edCompress(t, []byte(other)))
	loadFresh(t, ctx, link)
	poll(t, ctx, `document.querySelector('[data-circuit-editor]').dataset.live === 'true'`)
	if got := edRead(t, ctx).Text; got != other {
		t.Fatalf("the link's circuit is not shown: %.80q", got)
	}
	rbRestore(t, ctx, "[data-circuit-editor]", "Restore your previous text")
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(broken))
	// And what the restore replaced is kept in turn.
	rbRestore(t, ctx, "[data-circuit-editor]", "Restore your previous text")
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(other))

	// A link followed in the open page (only the fragment changes).
	edSetText(t, ctx, bad)
	third := examples.All()[2]
	eval[bool](t, ctx, `location.hash = `+jsString("c="+edCompress(t, []byte(third.Text)))+`, true`)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(third.Text))
	rbRestore(t, ctx, "[data-circuit-editor]", "Restore your previous text")
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(bad))
	checkHealthy(t, ctx)
}

// A stage page keeps typed values across reloads, valid or not, and a link
// that replaces them offers them back.
func TestStageValuesSurviveReload(t *testing.T) {
	ctx := start(t)
	const id = "inverting"
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)
	typeInto(t, ctx, id, "R2", "100k")
	typeInto(t, ctx, id, "R1", "4k7k")
	msg := calcSel(id) + ` [data-field="R1"] [data-role="msg"]`
	poll(t, ctx, `document.querySelector(`+jsString(msg)+`).textContent !== ''`)
	rbWaitDraft(t, ctx, "calc-"+id, `d.form.params.R1 === '4k7k' && d.form.params.R2 === '100k'`)
	rbReload(t, ctx)
	poll(t, ctx, `document.querySelector(`+jsString(msg)+`).textContent !== ''`)
	if got := inputs(t, ctx, id); got["R1"] != "4k7k" || got["R2"] != "100k" {
		t.Fatalf("after the reload R1 = %q, R2 = %q", got["R1"], got["R2"])
	}

	// A link replaces them; the values come back on request.
	e, _ := api.LookupEntry(id)
	f := calc.DefaultForm(e)
	f.Params["R1"] = "22k"
	loadFresh(t, ctx, fileURL(id, f.State(e)))
	checkLive(t, ctx, id)
	if got := inputs(t, ctx, id); got["R1"] != "22k" || got["R2"] != "47k" {
		t.Fatalf("the link's values are not shown: R1 = %q, R2 = %q", got["R1"], got["R2"])
	}
	rbRestore(t, ctx, calcSel(id), "Restore your previous values")
	poll(t, ctx, `document.querySelector(`+jsString(inputSel(id, "R1"))+`).value === '4k7k'`)
	if got := inputs(t, ctx, id); got["R2"] != "100k" {
		t.Errorf("restored R2 = %q", got["R2"])
	}
	checkHealthy(t, ctx)
}

// A link with a bad setting shows the link's own circuit with the default
// in that setting's place, says exactly that, and the field shows the
// value in use; a later link without the setting does not inherit it.
// Each link in a tab of its own, side by side.
func TestBadSettingLinks(t *testing.T) {
	t.Parallel()
	text := "# a link's own circuit (invented)\nvsource Vin in gnd 1\nopamp U7 in fb out a0=100k gbw=1M\nresistor R1 fb gnd 1k\nresistor R2 out fb 9k\nport zz out gnd\nport in in gnd\n"
	c := edCompress(t, []byte(text))
	for _, bad := range []string{"f=abc", "points=9999", "f=NaN"} {
		t.Run(bad, func(t *testing.T) {
			ctx := start(t)
			frag := "ref=U7&port=zz&" + bad
			load(t, ctx, fileURL("custom", "c="+c+"&"+frag))
			poll(t, ctx, `document.querySelector('[data-circuit-editor]').dataset.live === 'true'`)
			native := calc.ComputeCircuit(calc.CircuitRequest{Form: calc.Form{Circuit: text, Fragment: &frag, ID: "circuit"}})
			if native.Output == nil || native.Output.Notice == "" {
				t.Fatalf("the native engine refuses nothing of %q", frag)
			}
			s := edRead(t, ctx)
			if s.Text != text || s.Reference != "U7" || strings.Join(s.Ports, " ") != "zz" {
				t.Errorf("the page shows %+v, not the link's circuit and choices", s)
			}
			if s.Frequency != native.Form.Frequency || s.Points != native.Form.Sweep.Points {
				t.Errorf("fields f = %q, points = %q; the values in use are %q, %q", s.Frequency, s.Points, native.Form.Frequency, native.Form.Sweep.Points)
			}
			if got := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="notice"]').textContent`); got != native.Output.Notice {
				t.Errorf("notice\n %q\nwant\n %q", got, native.Output.Notice)
			}
			if edStale(t, ctx) {
				t.Error("the results are marked out of date")
			}
			edCompare(t, bad, edValues(t, ctx, "[data-circuit-editor]"), edNative(t, edRequest(t, s)))
			if h := eval[string](t, ctx, `location.hash`); strings.Contains(h, bad) {
				t.Errorf("the address still holds %s: %.120q", bad, h)
			}
			checkHealthy(t, ctx)
			if bad != "f=abc" {
				return
			}
			// The next link leaves f out: the default, not what the last
			// one had.
			eval[bool](t, ctx, `location.hash = `+jsString("c="+c+"&ref=U7&port=in")+`, true`)
			poll(t, ctx, `Array.from(document.querySelectorAll('[data-circuit-editor] [data-role="ports"] input:checked')).map(function (c) { return c.value; }).join() === 'in'`)
			if s := edRead(t, ctx); s.Frequency != "1k" {
				t.Errorf("a link without f shows f = %q", s.Frequency)
			}
		})
	}

	// The same rule on a stage page, and for the design aids' settings.
	const id = "inverting"
	for _, frag := range []string{"R1=22k&f=abc", "R1=22k&aid.n=abc&aid.seed=-5", "R1=22k&aid.n=500&aid.seed=-5"} {
		t.Run(frag, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, fileURL(id, frag))
			checkLive(t, ctx, id)
			native := calc.Compute(calc.Form{Topology: id, ID: "calc-" + id, Fragment: &frag})
			poll(t, ctx, `document.querySelector('[data-role="notice"]').textContent === `+jsString(native.Notice))
			if got := inputs(t, ctx, id); !sameMap(got, formInputs(*native.Form)) || got["R1"] != "22k" {
				t.Errorf("inputs %v", got)
			}
			if h := eval[string](t, ctx, `location.hash`); h != "#"+native.State || strings.Contains(h, "seed") || strings.Contains(h, "abc") {
				t.Errorf("address %q, want %q", h, native.State)
			}
			checkAgainstNative(t, ctx, id)
			if strings.Contains(frag, "n=500") {
				// The aids open with the values the link could give.
				poll(t, ctx, `(function () { var d = document.querySelector('details.aids'); var n = d && d.querySelector('[data-study="trials"]'); return !!d && d.open && !!n; })()`)
				got := eval[[]string](t, ctx, `[document.querySelector('[data-study="trials"]').value, document.querySelector('[data-study="seed"]').value]`)
				if got[0] != "500" || got[1] != calc.DefaultSeed {
					t.Errorf("trials %q, seed %q", got[0], got[1])
				}
			}
			checkHealthy(t, ctx)
		})
	}
}

// A value below 2.3e-308 is written, never as NaN.
func TestTinyValuesShown(t *testing.T) {
	t.Parallel()
	const id = "inverting"
	for _, c := range []struct{ frag, want string }{
		{"f=1e-320", "Results at 1.000 × 10⁻³²⁰ Hz"},
		{"from=1e-320", "Charts sweep from 1.000 × 10⁻³²⁰ Hz to 100.0 MHz"},
	} {
		t.Run(c.frag, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, fileURL(id, c.frag))
			checkLive(t, ctx, id)
			head := eval[string](t, ctx, `document.querySelector('[data-calculator] .panel-head').textContent`)
			if !strings.Contains(head, c.want) {
				t.Errorf("%q", head)
			}
			if text := eval[string](t, ctx, `document.body.innerText`); strings.Contains(text, "NaN") || strings.Contains(text, "Infinity") {
				i := max(strings.Index(text, "NaN"), strings.Index(text, "Infinity"))
				t.Errorf("the page shows %q", text[max(0, i-60):min(len(text), i+20)])
			}
			if eval[bool](t, ctx, `!document.querySelector('[data-role="notice"]').hidden`) {
				t.Errorf("notice %q", eval[string](t, ctx, `document.querySelector('[data-role="notice"]').textContent`))
			}
			checkAgainstNative(t, ctx, id)
			checkHealthy(t, ctx)
		})
	}
}

// A 10,000-character token in a field, or in circuit text, wraps or is
// cut in every message: the page keeps its width, at desktop and phone
// width.
func TestLongTokenKeepsPageWidth(t *testing.T) {
	t.Parallel()
	const id = "inverting"
	token := strings.Repeat("x", 10000)
	for _, w := range []int64{1280, 390} {
		t.Run(fmt.Sprint(w), func(t *testing.T) {
			ctx := start(t) // a tab of its own: no draft of the other width's token
			if err := chromedp.Do(ctx, chromedp.EmulateViewport(w, 844)); err != nil {
				t.Fatal(err)
			}
			load(t, ctx, fileURL(id, ""))
			checkLive(t, ctx, id)
			width := `Math.max(document.documentElement.scrollWidth, document.body.scrollWidth)`
			before := eval[int64](t, ctx, width)
			pasteInto(t, ctx, id, "R1", "1"+token)
			msg := calcSel(id) + ` [data-field="R1"] [data-role="msg"]`
			poll(t, ctx, `document.querySelector(`+jsString(msg)+`).textContent !== ''`)
			if got := eval[int64](t, ctx, width); got > before {
				t.Errorf("at %d px the page grew from %d to %d px wide with the token in R1", w, before, got)
			}
			if m := eval[string](t, ctx, `document.querySelector(`+jsString(msg)+`).textContent`); len(m) > 200 {
				t.Errorf("at %d px the message echoes %d characters", w, len(m))
			}

			edLoad(t, ctx, fileURL("custom", ""))
			before = eval[int64](t, ctx, width)
			edSetText(t, ctx, "vsource Vin in gnd 1\nresistor R1 in gnd 1"+token[:4000]+"\nport p in gnd\n")
			if p := rbProblems(t, ctx); !strings.Contains(p, "line 2") {
				t.Fatalf("problems %q", p)
			}
			if got := eval[int64](t, ctx, width); got > before {
				t.Errorf("at %d px the custom page grew from %d to %d px wide with the token in the text", w, before, got)
			}
			checkHealthy(t, ctx)
		})
	}
}

// With scripts off the pages say so and nothing else: no "starting" line,
// the inputs read-only, and the circuit editor's line numbers beside their
// lines.
func TestScriptsOff(t *testing.T) {
	t.Parallel()
	for _, page := range []string{"inverting", "custom"} {
		t.Run(page, func(t *testing.T) {
			ctx := start(t)
			if _, err := chromedp.Call(ctx, emulation.SetScriptExecutionDisabled, emulation.SetScriptExecutionDisabledParams{Value: true}); err != nil {
				t.Fatal(err)
			}
			if err := chromedp.Do(ctx, chromedp.Navigate(fileURL(page, ""))); err != nil {
				t.Fatal(err)
			}
			// DevTools evaluates even where the page's own scripts may not run.
			if eval[bool](t, ctx, `!!window.zportSite`) {
				t.Fatalf("%s: the page's scripts ran", page)
			}
			text := eval[string](t, ctx, `document.body.innerText`)
			if strings.Contains(text, "starting") || strings.Contains(text, "Live:") {
				t.Errorf("%s: the page speaks of the live engine with scripts off", page)
			}
			if !strings.Contains(text, "Scripts are off, so the ") {
				t.Errorf("%s: no word that scripts are off", page)
			}
			editable := eval[[]string](t, ctx, `Array.from(document.querySelectorAll('.calculator input, .calculator textarea, .calculator select')).filter(function (e) {
  return e.type !== 'file' && !e.readOnly && !e.disabled;
}).map(function (e) { return e.name || e.getAttribute('data-role') || e.id; })`)
			if len(editable) > 0 {
				t.Errorf("%s: editable with scripts off: %q", page, editable)
			}
			if page != "custom" {
				return
			}
			// The gutter: one number per line of the text, each beside its line.
			gutter := eval[map[string]any](t, ctx, `(function () {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  var pre = document.querySelector('[data-circuit-editor] [data-role="numbers"]');
  var g = document.querySelector('[data-circuit-editor] [data-role="gutter"]');
  var cs = getComputedStyle(ta), cp = getComputedStyle(pre);
  var r = document.createRange();
  r.selectNodeContents(pre);
  var box = r.getBoundingClientRect(), gb = g.getBoundingClientRect();
  return { numbers: pre.textContent.trim().split('\n').join(' '), lines: ta.value.split('\n').length,
    taTop: ta.getBoundingClientRect().top + parseFloat(cs.paddingTop) + parseFloat(cs.borderTopWidth),
    preTop: pre.getBoundingClientRect().top + parseFloat(cp.paddingTop), taLine: cs.lineHeight, preLine: cp.lineHeight,
    inside: box.left >= gb.left - 0.5 && box.right <= gb.right + 0.5 };
})()`)
			var want []string
			for i := 1; i <= int(gutter["lines"].(float64)); i++ {
				want = append(want, fmt.Sprint(i))
			}
			if gutter["numbers"] != strings.Join(want, " ") {
				t.Errorf("gutter numbers %q for %v lines", gutter["numbers"], gutter["lines"])
			}
			if gutter["taLine"] != gutter["preLine"] || abs(gutter["taTop"].(float64)-gutter["preTop"].(float64)) > 0.5 {
				t.Errorf("the numbers are not beside their lines: %v", gutter)
			}
			if gutter["inside"] != true {
				t.Errorf("the numbers are cut by the gutter: %v", gutter)
			}
		})
	}
}

func abs(x float64) float64 { return max(x, -x) }

// Text that would take the editor past its limit is refused before the
// textarea takes it, however it arrives: an input method's or Chromium's
// own insert of 1 MB of lines, a drop, a replacement, a dropped file; an
// insert no event could refuse is undone. Below the limit a long insert
// delivered line by line still arrives whole.
func TestCustomInputLimits(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	before := edRead(t, ctx).Text
	msg := `document.querySelector('[data-circuit-editor] [data-role="file-msg"]').textContent`
	focus := func() {
		eval[bool](t, ctx, `(function () { var ta = document.querySelector('[data-circuit-editor] [data-role="text"]'); ta.focus(); ta.setSelectionRange(ta.value.length, ta.value.length); return true; })()`)
	}
	mb := strings.Repeat("resistor R1 a gnd 1k # a line of a megabyte of lines\n", 1<<20/53)

	// Chromium's insertText (what an input method or an emoji keyboard
	// does), with a megabyte of lines.
	focus()
	if _, err := chromedp.Call(ctx, input.InsertText, input.InsertTextParams{Text: mb}); err != nil {
		t.Fatal(err)
	}
	if got := edRead(t, ctx).Text; got != before {
		t.Fatalf("a 1 MB insert reached the editor (%d characters)", len(got))
	}
	if m := eval[string](t, ctx, msg); !strings.HasPrefix(m, "Not inserted: the text would be ") {
		t.Errorf("message %q", m)
	}

	// Synthetic beforeinput events of the other kinds.
	for _, kind := range []string{"insertFromDrop", "insertReplacementText", "insertFromPaste", "insertText"} {
		refused := eval[bool](t, ctx, `(function (kind, v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  var dt = new DataTransfer();
  dt.setData('text/plain', v);
  var init = { inputType: kind, bubbles: true, cancelable: true };
  if (kind === 'insertText') init.data = v; else init.dataTransfer = dt;
  var e = new InputEvent('beforeinput', init);
  ta.dispatchEvent(e);
  return e.defaultPrevented;
})(`+jsString(kind)+`, `+jsString(mb[:300<<10])+`)`)
		if !refused {
			t.Errorf("%s of 300 KB was let through", kind)
		}
	}
	// A drop of text, caught at the drop.
	if !eval[bool](t, ctx, `(function (v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  var dt = new DataTransfer();
  dt.setData('text/plain', v);
  var e = new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true });
  ta.dispatchEvent(e);
  return e.defaultPrevented;
})(`+jsString(mb[:300<<10])+`)`) {
		t.Error("a drop of 300 KB was let through")
	}

	// An insert no event refused (an input method's composition): undone.
	n := edCount(t, ctx)
	eval[bool](t, ctx, `(function (v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  ta.value = ta.value + v;
  ta.dispatchEvent(new InputEvent('input', { inputType: 'insertCompositionText', bubbles: true }));
  return true;
})(`+jsString(mb[:300<<10])+`)`)
	edWait(t, ctx, n)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(before))
	if m := eval[string](t, ctx, msg); !strings.HasPrefix(m, "Undone: the text became ") {
		t.Errorf("message %q", m)
	}

	// Within the limit a long multi-line insert arrives whole, once.
	small := strings.Repeat("# a comment line of a long insert\n", 3000)
	focus()
	if _, err := chromedp.Call(ctx, input.InsertText, input.InsertTextParams{Text: small}); err != nil {
		t.Fatal(err)
	}
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(before+small))
	// The gutter counts every line of it.
	poll(t, ctx, `(function () {
  var e = document.querySelector('[data-circuit-editor]');
  var lh = parseFloat(getComputedStyle(e.querySelector('[data-role="text"]')).lineHeight);
  return parseFloat(e.querySelector('[data-role="gutter-inner"]').style.height) >= 3000 * lh;
})()`)

	// A file dropped on the text opens as the Open button would.
	file := filepath.Join(t.TempDir(), "dropped.txt")
	if err := os.WriteFile(file, []byte(examples.All()[1].Text), 0o644); err != nil {
		t.Fatal(err)
	}
	dropped := eval[bool](t, ctx, `(function (v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  var dt = new DataTransfer();
  dt.items.add(new File([v], 'dropped.txt', { type: 'text/plain' }));
  var e = new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true });
  ta.dispatchEvent(e);
  return e.defaultPrevented;
})(`+jsString(examples.All()[1].Text)+`)`)
	if !dropped {
		t.Error("a dropped file was left to the browser")
	}
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(examples.All()[1].Text))
	rbRestore(t, ctx, "[data-circuit-editor]", "Restore your previous text")
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value === `+jsString(before+small))
	checkHealthy(t, ctx)
}
