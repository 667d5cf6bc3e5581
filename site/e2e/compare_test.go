//go:build !js

package e2e

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"

	"zport/site/calc"
	"zport/site/examples"
	"zport/site/internal/sitetest"
)

// Pinned designs on the pages: pinning, the overlaid curves, the
// comparison tables, the share link, removal. Helpers here start with pin.

// pinClick clicks the control data-action=action inside the element root
// (a CSS selector) and waits a frame.
func pinClick(t *testing.T, ctx context.Context, root, action string) {
	t.Helper()
	ok := eval[bool](t, ctx, `(function () {
  var b = document.querySelector(`+jsString(root+` [data-action="`+action+`"]`)+`);
  if (!b || b.disabled) return false;
  b.scrollIntoView({ block: 'center' });
  b.click();
  return true;
})()`)
	if !ok {
		t.Fatalf("no enabled %s control in %s", action, root)
	}
}

// pinCount waits until the panel of root shows n pinned designs (its
// "Pinned designs" list) and every chart draws n pinned traces.
func pinCount(t *testing.T, ctx context.Context, root string, n int) {
	t.Helper()
	poll(t, ctx, fmt.Sprintf(`(function () {
  var r = document.querySelector(%s);
  var lis = r.querySelectorAll('[data-role="results"] .pin-summary li[data-pin]').length;
  var bar = r.querySelectorAll('[data-role="pin-list"] li').length;
  var svgs = Array.from(r.querySelectorAll('[data-role="results"] svg.zplot[data-freq]'));
  return lis === %d && bar === %d && svgs.length > 0 && svgs.every(function (s) {
    return s.querySelectorAll('path[data-values][class*="trace-pin"]').length === %d;
  });
})()`, jsString(root), n, n, n))
}

// pinTable is the page's comparison, each value or difference by its
// data attributes (data-compare, data-pin, data-stat) → its number
// attributes, and each chart's pinned traces by chart id and name.
type pinTable struct {
	Cells  map[string]string `json:"cells"`
	Traces map[string]string `json:"traces"`
}

const pinTableJS = `(function (root) {
  var r = document.querySelector(root + ' [data-role="results"]');
  var cells = {}, traces = {};
  r.querySelectorAll('[data-compare][data-stat]').forEach(function (e) {
    var k = e.closest('[data-compare-of]').getAttribute('data-compare-of') + '/' + e.getAttribute('data-compare') + '/' + e.getAttribute('data-pin') + '/' + e.getAttribute('data-stat');
    cells[k] = ['data-re', 'data-im', 'data-value', 'data-phase', 'data-null'].map(function (a) { return e.getAttribute(a) || ''; }).join(' ');
  });
  r.querySelectorAll('svg.zplot path[data-values][class*="trace-pin"]').forEach(function (p) {
    traces[p.closest('svg').id + '/' + p.getAttribute('data-name')] = p.getAttribute('data-values');
  });
  return { cells: cells, traces: traces };
})`

func pinRead(t *testing.T, ctx context.Context, root string) pinTable {
	t.Helper()
	return eval[pinTable](t, ctx, pinTableJS+`(`+jsString(root)+`)`)
}

// pinNative is the same read from the native engine's panel for form f.
func pinNative(t *testing.T, f calc.Form) pinTable {
	t.Helper()
	out := calc.Compute(f)
	if out.Error != nil {
		t.Fatalf("native: %+v", out.Error)
	}
	got := pinTable{Cells: map[string]string{}, Traces: map[string]string{}}
	els := sitetest.Parse(t, out.HTML)
	of := ""
	var svg string
	for _, e := range els {
		if v := e.Attrs["data-compare-of"]; v != "" {
			of = v
		}
		if e.Name == "svg" {
			svg = e.Attrs["id"]
		}
		if e.Attrs["data-compare"] != "" && e.Attrs["data-stat"] != "" {
			k := of + "/" + e.Attrs["data-compare"] + "/" + e.Attrs["data-pin"] + "/" + e.Attrs["data-stat"]
			got.Cells[k] = strings.Join([]string{e.Attrs["data-re"], e.Attrs["data-im"], e.Attrs["data-value"], e.Attrs["data-phase"], e.Attrs["data-null"]}, " ")
		}
		if e.Name == "path" && e.Attrs["data-values"] != "" && strings.Contains(e.Attrs["class"], "trace-pin") {
			got.Traces[svg+"/"+e.Attrs["data-name"]] = e.Attrs["data-values"]
		}
	}
	return got
}

func samePinTables(t *testing.T, what string, got, want pinTable) {
	t.Helper()
	if len(want.Cells) == 0 || len(want.Traces) == 0 {
		t.Fatalf("%s: the native panel has no comparison (%d cells, %d traces)", what, len(want.Cells), len(want.Traces))
	}
	for k, v := range want.Cells {
		tol := relTol
		if strings.HasPrefix(k, "response/") {
			tol = respTol
		}
		if !sameNumbers(got.Cells[k], v, tol) {
			t.Errorf("%s: comparison %s reads %q, want %q", what, k, got.Cells[k], v)
		}
	}
	if len(got.Cells) != len(want.Cells) {
		t.Errorf("%s: %d comparison values on the page, %d natively", what, len(got.Cells), len(want.Cells))
	}
	for k, v := range want.Traces {
		tol := relTol
		if strings.Contains(k, "-plot-step/") {
			tol = respTol // a float64 step from the pencil (see respTol)
		}
		if !sameVector(got.Traces[k], v, tol) {
			t.Errorf("%s: pinned trace %s differs from the native engine's", what, k)
		}
	}
	if len(got.Traces) != len(want.Traces) {
		t.Errorf("%s: %d pinned traces on the page, %d natively", what, len(got.Traces), len(want.Traces))
	}
}

// numberFields splits a list of numbers written with spaces, commas or
// semicolons between them.
func numberFields(s string) []string {
	return strings.FieldsFunc(s, func(r rune) bool { return r == ' ' || r == ',' || r == ';' })
}

// sameNumbers reports whether two texts are the same but for numbers
// within tol of each other, relatively: the page's engine is WebAssembly,
// whose math functions may differ from amd64's in the last bit.
func sameNumbers(a, b string, tol float64) bool {
	if a == b {
		return true
	}
	fa, fb := numberFields(a), numberFields(b)
	if len(fa) != len(fb) {
		return false
	}
	for i := range fa {
		if fa[i] == fb[i] {
			continue
		}
		x, err1 := strconv.ParseFloat(fa[i], 64)
		y, err2 := strconv.ParseFloat(fb[i], 64)
		if err1 != nil || err2 != nil || math.Abs(x-y) > tol*math.Max(math.Abs(x), math.Abs(y)) {
			return false
		}
	}
	return true
}

// sameVector reports whether two lists of numbers (a trace's values) agree
// to tol of the larger one's largest magnitude: a trace through zero (a
// step's start) is compared on its own scale, not point by point.
func sameVector(a, b string, tol float64) bool {
	if a == b {
		return true
	}
	fa, fb := numberFields(a), numberFields(b)
	if len(fa) != len(fb) {
		return false
	}
	xs, ys := make([]float64, len(fa)), make([]float64, len(fb))
	scale := 0.0
	for i := range fa {
		var err1, err2 error
		xs[i], err1 = strconv.ParseFloat(fa[i], 64)
		ys[i], err2 = strconv.ParseFloat(fb[i], 64)
		if err1 != nil || err2 != nil {
			if fa[i] != fb[i] {
				return false
			}
			xs[i], ys[i] = 0, 0
		}
		if !math.IsNaN(ys[i]) && !math.IsInf(ys[i], 0) {
			scale = math.Max(scale, math.Abs(ys[i]))
		}
	}
	for i := range xs {
		if math.IsNaN(xs[i]) != math.IsNaN(ys[i]) || math.Abs(xs[i]-ys[i]) > tol*scale {
			return false
		}
	}
	return true
}

// Pin two designs of the TIA (the defaults, and Cf = 2.2 pF), then try
// 3.3 pF: every chart overlays both pins in their own line styles, the
// comparison tables show each pin's value and the difference, equal to
// the native engine's; a renamed pin keeps its name in the link, the link
// reproduces the pins in a fresh tab, and pins are removed one and all.
func TestPinsOverlayAndCompare(t *testing.T) {
	ctx := start(t)
	const id = "transimpedance"
	root := calcSel(id)
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)

	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 1)
	typeInto(t, ctx, id, "Cf", "2p2")
	poll(t, ctx, `document.querySelector(`+jsString(root+` [data-action="share"]`)+`).getAttribute('href').indexOf('Cf=2p2') > 0`)
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 2)
	typeInto(t, ctx, id, "Cf", "3p3")
	// Rename pin 1, as a user does before a review.
	ok := eval[bool](t, ctx, `(function () {
  var i = document.querySelector(`+jsString(root+` [data-role="pin-list"] li[data-pin="1"] input`)+`);
  i.focus(); i.select(); return document.activeElement === i;
})()`)
	if !ok {
		t.Fatal("cannot focus the name of pin 1")
	}
	if err := chromedp.Do(ctx, chromedp.KeyEvent("Cf 1 pF")); err != nil {
		t.Fatal(err)
	}
	poll(t, ctx, `location.hash.indexOf('pin1=Cf+1+pF&pin1.Cf=1p&pin2=Pin+2&pin2.Cf=2p2') > 0 && location.hash.indexOf('Cf=3p3') > 0`)
	pinCount(t, ctx, root, 2)

	e := form(id, inputs(t, ctx, id))
	p1, p2 := cloneParams(e.Params), cloneParams(e.Params)
	p1["Cf"], p2["Cf"] = "1p", "2p2"
	e.Pins = []calc.Pin{{Name: "Cf 1 pF", Slot: 1, Params: p1}, {Name: "Pin 2", Slot: 2, Params: p2}}
	want := pinNative(t, e)
	got := pinRead(t, ctx, root)
	samePinTables(t, "two pins", got, want)
	// The loop's comparison holds the phase margins, in degrees.
	if _, ok := got.Cells["loop/pm/2/diff"]; !ok {
		t.Errorf("no phase-margin difference for pin 2: %v", got.Cells)
	}
	// The legend names the pins; the copied results carry the comparison.
	if n := eval[int](t, ctx, `Array.from(document.querySelectorAll(`+jsString(root+` svg.zplot .legend text`)+`)).filter(function (x) { return x.textContent.indexOf('Cf 1 pF') >= 0; }).length`); n == 0 {
		t.Error("no legend entry names the renamed pin")
	}
	// Copy results: the parameters in engineering notation with their
	// units, the pins' comparison, and the link at the end.
	copied, err := chromedp.Run(ctx, chromedp.Evaluate[string](`new Promise(function (resolve) {
  navigator.clipboard.writeText = function (s) { resolve(s); return Promise.resolve(); };
  document.querySelector(`+jsString(root+` [data-action="copy"]`)+`).click();
})`, chromedp.EvalAwaitPromise))
	if err != nil {
		t.Fatalf("copying the results: %v", err)
	}
	for _, want := range []string{"| a0 | 1 M |", "| Cf | 3.3 pF |", "| Cf 1 pF | Cf 1 pF \\(here 3\\.3 pF\\)\\. |", "| Loop vs pins |"} {
		if !strings.Contains(copied, want) {
			t.Errorf("the copied results lack %q:\n%s", want, copied)
		}
	}
	if link := eval[string](t, ctx, `location.href`); !strings.HasSuffix(copied, "Link to these results: "+link+"\n") {
		t.Errorf("the copied results do not end with the link %s:\n…%s", link, copied[max(0, len(copied)-300):])
	}
	if dir := os.Getenv("ZPORT_SHOTS"); dir != "" {
		screenshot(t, ctx, dir, "pins-"+id+"-1280")
	}

	// The link, opened in a fresh tab, reproduces the pins.
	link := eval[string](t, ctx, `location.href`)
	tab := newTab(t, ctx)
	load(t, tab, link)
	checkLive(t, tab, id)
	pinCount(t, tab, root, 2)
	samePinTables(t, "from the link", pinRead(t, tab, root), want)
	if names := eval[string](t, tab, `Array.from(document.querySelectorAll(`+jsString(root+` [data-role="pin-list"] input`)+`)).map(function (i) { return i.value; }).join('|')`); names != "Cf 1 pF|Pin 2" {
		t.Errorf("pin names from the link: %q", names)
	}
	checkHealthy(t, tab)

	// Remove pin 1, then all.
	pinClick(t, ctx, root+` [data-role="pin-list"] li[data-pin="1"]`, "unpin")
	pinCount(t, ctx, root, 1)
	poll(t, ctx, `document.querySelectorAll(`+jsString(root+` path.trace-pin1`)+`).length === 0 && location.hash.indexOf('pin1') < 0 && location.hash.indexOf('pin2=') > 0`)
	pinClick(t, ctx, root, "unpin-all")
	poll(t, ctx, `document.querySelector(`+jsString(root+` [data-role="pins"]`)+`).hidden && !document.querySelector(`+jsString(root+` .pin-summary`)+`) && location.hash.indexOf('pin') < 0`)
	checkHealthy(t, ctx)
}

func cloneParams(m map[string]string) map[string]string {
	out := make(map[string]string, len(m))
	for k, v := range m {
		out[k] = v
	}
	return out
}

// On the custom page: pin the first example, pin it again with Cm = 22 pF,
// then remove Cm: both pins are drawn and compared, and the link — which
// carries each pin's own text as pinN.c — reproduces them in a fresh tab.
func TestCustomPins(t *testing.T) {
	ctx := start(t)
	const root = "[data-circuit-editor]"
	edLoad(t, ctx, fileURL("custom", ""))
	first := examples.All()[0].Text
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 1)
	edSetText(t, ctx, strings.Replace(first, "mid  gnd  10p", "mid  gnd  22p", 1))
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 2)
	edSetText(t, ctx, strings.Replace(first, "capacitor Cm   mid  gnd  10p", "# no guard trace", 1))
	pinCount(t, ctx, root, 2)
	poll(t, ctx, `location.hash.indexOf('&pin1=Pin+1') > 0 && location.hash.indexOf('&pin1.c=') > 0 && location.hash.indexOf('&pin2.c=') > 0`)
	got := pinRead(t, ctx, root)
	points := `document.querySelector('[data-circuit-editor]').getAttribute('data-sweep-points')`
	gotPoints := eval[string](t, ctx, points)
	if len(got.Cells) == 0 || got.Cells["loop/pm/1/diff"] == "" || len(got.Traces) < 6 {
		t.Fatalf("the comparison with two pinned circuits is missing: %d cells, %d traces", len(got.Cells), len(got.Traces))
	}
	if txt := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] .pin-summary').textContent`); !strings.Contains(txt, "Pin 1: its own circuit text, with “capacitor Cm mid gnd 10p”.") || !strings.Contains(txt, "Pin 2: its own circuit text, with “capacitor Cm mid gnd 22p”.") {
		t.Errorf("the pins' summary says %q", txt)
	}
	link := eval[string](t, ctx, `location.href`)
	tab := newTab(t, ctx)
	edLoad(t, tab, link)
	pinCount(t, tab, root, 2)
	again := pinRead(t, tab, root)
	// The custom page shortens a sweep that would take longer than its
	// budget, and a busy machine may shorten the two tabs' differently: the
	// pins are then computed on other grids, their curves differ and their
	// refined margins and crossovers by rounding. On one grid the numbers
	// are the same to the last digit.
	sameGrid := eval[string](t, tab, points) == gotPoints
	for k, v := range got.Cells {
		if again.Cells[k] != v && (sameGrid || !sameNumbers(again.Cells[k], v, 1e-9)) {
			t.Errorf("from the link, %s reads %q, want %q", k, again.Cells[k], v)
		}
	}
	if !sameGrid {
		t.Logf("the tabs' sweeps were shortened to %s and %s points: the pinned curves are not compared", gotPoints, eval[string](t, tab, points))
	}
	for k, v := range got.Traces {
		if sameGrid && again.Traces[k] != v {
			t.Errorf("from the link, the pinned trace %s differs", k)
		}
	}
	checkHealthy(t, tab)
	checkHealthy(t, ctx)
}

// A paste over the whole text is a new circuit: the previous example's
// description goes, and with exactly one independent source the gain is
// taken from it (to the node out).
func TestCustomPasteNewCircuit(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	text := "vsource Vs a gnd 1\nopamp U1 a n out a0=100k gbw=1M\nresistor Rf out n 10k\nresistor Rg n gnd 1k\nport o out gnd\n"
	n := edCount(t, ctx)
	eval[bool](t, ctx, `(function (v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  ta.focus();
  ta.select();
  var dt = new DataTransfer();
  dt.setData('text/plain', v);
  ta.dispatchEvent(new ClipboardEvent('paste', { clipboardData: dt, bubbles: true, cancelable: true }));
  return true;
})(`+jsString(text)+`)`)
	if _, err := chromedp.Call(ctx, input.InsertText, input.InsertTextParams{Text: text}); err != nil {
		t.Fatal(err)
	}
	edWait(t, ctx, n)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="gain-source"]').value === 'Vs'`)
	s := edRead(t, ctx)
	if s.Text != text || s.Source != "Vs" || s.Output != "out" || s.Reference != "U1" || strings.Join(s.Ports, " ") != "o" {
		t.Errorf("after the paste the editor holds %+v", s)
	}
	if !eval[bool](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="example-about"]').hidden`) {
		t.Error("the previous example's description still shows after the paste")
	}
	if n := eval[int](t, ctx, `document.querySelectorAll('[data-circuit-editor] [data-role="results"] [data-quantity="g"]').length`); n != 1 {
		t.Errorf("%d gain values on the page after the paste", n)
	}
	checkHealthy(t, ctx)
}

// In the single-file export: pins drawn and compared, and carried by the
// section's link into a fresh tab; a chart saved as SVG.
func TestPinsInSingleFile(t *testing.T) {
	ctx := start(t)
	const id = "transimpedance"
	root := calcSel(id)
	load(t, ctx, singleURL("p="+id))
	shownSection(t, ctx, id)
	checkLive(t, ctx, id)
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 1)
	typeInto(t, ctx, id, "Cd", "47p")
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 2)
	typeInto(t, ctx, id, "Cd", "10p")
	poll(t, ctx, `location.hash.indexOf('#p=transimpedance&') === 0 && location.hash.indexOf('Cd=10p') > 0 && location.hash.indexOf('&pin1.Cd=20p&pin2=Pin+2&pin2.Cd=47p') > 0`)
	pinCount(t, ctx, root, 2)
	got := pinRead(t, ctx, root)
	link := eval[string](t, ctx, `location.href`)
	checkHealthy(t, ctx)
	// The first tab rests while the second starts its eleven calculators.
	if err := chromedp.Do(ctx, chromedp.Navigate("about:blank")); err != nil {
		t.Fatal(err)
	}
	tab := newTab(t, ctx)
	load(t, tab, link)
	shownSection(t, tab, id)
	checkLive(t, tab, id)
	pinCount(t, tab, root, 2)
	again := pinRead(t, tab, root)
	if len(got.Cells) == 0 || !reflect.DeepEqual(got, again) {
		t.Errorf("the single file's link does not reproduce the comparison (%d and %d cells)", len(got.Cells), len(again.Cells))
	}
	out := t.TempDir()
	if _, err := chromedp.Call(tab, browser.SetDownloadBehavior, browser.SetDownloadBehaviorParams{
		Behavior: browser.SetDownloadBehaviorBehaviorAllow, DownloadPath: out,
		BrowserContextID: chromedp.FromContext(tab).BrowserContextID}); err != nil {
		t.Fatal(err)
	}
	eval[bool](t, tab, `(function () {
  var s = Array.from(document.querySelectorAll(`+jsString(root+` svg.zplot[data-freq]`)+`)).filter(function (s) { return /Return ratio/.test(s.querySelector('title').textContent); })[0];
  s.closest('figure').setAttribute('data-e2e-chart', '');
  return true;
})()`)
	pinClick(t, tab, `[data-e2e-chart]`, "save-svg")
	poll(t, tab, `/saved as zport-.*\.svg/.test(document.querySelector('[data-e2e-chart] [data-role="chart-msg"]').textContent)`)
	name := strings.TrimSuffix(strings.TrimPrefix(eval[string](t, tab, `document.querySelector('[data-e2e-chart] [data-role="chart-msg"]').textContent`), "Chart saved as "), ".")
	vb := eval[[]string](t, tab, `document.querySelector('[data-e2e-chart] svg').getAttribute('viewBox').split(' ')`)
	w, _ := strconv.Atoi(vb[2])
	h, _ := strconv.Atoi(vb[3])
	checkChartSVG(t, waitFile(t, filepath.Join(out, name), svgWhole), w, h, eval[string](t, tab, `document.querySelector('[data-e2e-chart] svg title').textContent`))
	checkHealthy(t, tab)
}
