//go:build !js

package e2e

import (
	"bytes"
	"compress/flate"
	"context"
	"encoding/base64"
	"fmt"
	"math/cmplx"
	"math/rand/v2"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/browser"
	"github.com/chromedp/chromedp"
	"gonum.org/v1/gonum/cmplxs/cscalar"
	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/value"
	"zport/site/examples"
)

// The custom-circuit page (custom.html): its editor, pickers, examples,
// share link, files, limits and hostile input. Helpers here start with ed
// so as not to collide with the other browser tests of the package.

// edTol is how closely the page's numbers (the engine in WebAssembly)
// must match the native engine's.
const edTol = 1e-12

// edState is what the editor holds: the text, the pickers and the fields.
type edState struct {
	Text      string   `json:"text"`
	Reference string   `json:"reference"`
	Ports     []string `json:"ports"`
	Source    string   `json:"source"`
	Output    string   `json:"output"`
	Frequency string   `json:"frequency"`
	From      string   `json:"from"`
	To        string   `json:"to"`
	Points    string   `json:"points"`
	Example   string   `json:"example"`
	// Used is the number of sweep points the engine analyzed, when it
	// shortened the sweep to fit the page's time budget ("0": none).
	Used string `json:"used"`
}

const edStateJS = `(function () {
  var e = document.querySelector('[data-circuit-editor]');
  var q = function (r) { return e.querySelector('[data-role="' + r + '"]'); };
  var f = function (n) { return e.querySelector('input[name="' + n + '"]').value; };
  var ports = Array.from(e.querySelectorAll('[data-role="ports"] input:checked')).map(function (c) { return c.value; });
  var np = q('node-port').value;
  if (np && ports.indexOf(np) < 0) ports.push(np);
  var out = q('gain-output').value, minus = q('gain-minus').value;
  if (minus && minus !== 'gnd') out += ',' + minus;
  return { text: q('text').value, reference: q('reference').value, ports: ports, source: q('gain-source').value,
    output: q('gain-source').value ? out : '', frequency: f('frequency'), from: f('sweep.from'), to: f('sweep.to'),
    points: f('sweep.points'), example: q('example').value, used: e.dataset.sweepPoints || '' };
})()`

func edRead(t *testing.T, ctx context.Context) edState {
	t.Helper()
	return eval[edState](t, ctx, edStateJS)
}

// edRequest is the analysis the editor's state asks for.
func edRequest(t *testing.T, s edState) api.Request {
	t.Helper()
	hz := func(name, v string) float64 {
		x, err := value.Parse(v, "Hz")
		if err != nil {
			t.Fatalf("%s %q: %v", name, v, err)
		}
		return x
	}
	points := s.Points
	if s.Used != "" {
		points = s.Used
	}
	pts, err := strconv.Atoi(points)
	if err != nil {
		t.Fatalf("points %q: %v", points, err)
	}
	req := api.Request{Circuit: s.Text, Reference: s.Reference, Ports: s.Ports, Frequency: hz("frequency", s.Frequency)}
	if pts > 0 {
		req.Sweep = &api.SweepSpec{From: hz("from", s.From), To: hz("to", s.To), Points: pts}
	}
	if s.Source != "" {
		req.Gain = &api.GainSpec{Source: s.Source, Output: s.Output}
	}
	return req
}

func edNative(t *testing.T, req api.Request) *api.Response {
	t.Helper()
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatalf("native engine: %v", err)
	}
	return resp
}

// edValue is one value of the results panel, by its data attributes.
type edValue struct {
	Key   string `json:"key"`
	Re    string `json:"re"`
	Im    string `json:"im"`
	Value string `json:"value"`
	Null  bool   `json:"null"`
}

// edValuesJS reads the engine's values under the results of root (a CSS
// selector): data-quantity elements, keyed port/quantity or quantity.
const edValuesJS = `(function (root) {
  return Array.from(document.querySelectorAll(root + ' [data-role="results"] [data-quantity]')).map(function (e) {
    var d = e.dataset;
    var key = d.quantity === 'extra' ? 'extra:' + d.name : d.quantity === 'device' ? 'device:' + d.part + '/' + d.name : d.source ? d.quantity + ':' + d.source : (d.port ? d.port + '/' : '') + (d.pole ? 'pole' + d.pole + '/' : '') + d.quantity;
    return { key: key, re: d.re || '', im: d.im || '', value: d.value || '', null: d.null === 'true' };
  });
})`

func edValues(t *testing.T, ctx context.Context, root string) map[string]edValue {
	t.Helper()
	out := map[string]edValue{}
	for _, v := range eval[[]edValue](t, ctx, edValuesJS+"("+jsString(root)+")") {
		if _, dup := out[v.Key]; dup {
			t.Errorf("%s is shown twice", v.Key)
		}
		out[v.Key] = v
	}
	return out
}

// edExpected lists the numbers the panel must show for resp.
func edExpected(resp *api.Response) (complexes map[string]*api.Complex, reals map[string]*float64) {
	complexes = map[string]*api.Complex{}
	if resp.Reference != "" {
		complexes["T"] = resp.ReturnRatio
	}
	reals = map[string]*float64{}
	for _, p := range resp.Ports {
		for q, z := range map[string]*api.Complex{"z0": p.Z0, "tShort": p.TShort, "tOpen": p.TOpen, "z": p.Z, "zDirect": p.ZDirect} {
			complexes[p.Name+"/"+q] = z
		}
		if p.Z == nil && p.Y != nil {
			complexes[p.Name+"/y"] = p.Y
		}
		reals[p.Name+"/agreement"] = p.Agreement
	}
	if g := resp.Gain; g != nil {
		for q, z := range map[string]*api.Complex{"g0": g.G0, "gInf": g.GInf, "g": g.G, "gDirect": g.GDirect} {
			complexes[q] = z
		}
		reals["gainAgreement"] = g.Agreement
	}
	if m := resp.Margins; m != nil {
		reals["fc"], reals["pm"], reals["gm"] = m.Crossover, m.PhaseMargin, m.GainMargin
	}
	for k, v := range deviceValues(resp) {
		reals[k] = v
	}
	return complexes, reals
}

// edCompare checks the shown values against resp: every expected number
// present, equal to edTol (agreements, themselves rounding-sized, to edTol
// absolutely).
func edCompare(t *testing.T, what string, got map[string]edValue, resp *api.Response) {
	t.Helper()
	cs, rs := edExpected(resp)
	for k, z := range cs {
		v, ok := got[k]
		switch {
		case !ok:
			t.Errorf("%s: %s is not shown", what, k)
		case z == nil:
			if !v.Null {
				t.Errorf("%s: %s shows %s%+sj, the native engine has no finite value", what, k, v.Re, v.Im)
			}
		default:
			re, err1 := strconv.ParseFloat(v.Re, 64)
			im, err2 := strconv.ParseFloat(v.Im, 64)
			if err1 != nil || err2 != nil || !cscalar.EqualWithinAbsOrRel(complex(re, im), z.Value(), 1e-300, edTol) {
				t.Errorf("%s: %s = %s%+sj on the page, %v natively (relative difference %.3g)", what, k, v.Re, v.Im, z.Value(),
					cmplx.Abs(complex(re, im)-z.Value())/cmplx.Abs(z.Value()))
			}
		}
	}
	for k, x := range rs {
		v, ok := got[k]
		switch {
		case !ok:
			t.Errorf("%s: %s is not shown", what, k)
		case x == nil:
			if !v.Null {
				t.Errorf("%s: %s shows %s, the native engine has none", what, k, v.Value)
			}
		default:
			f, err := strconv.ParseFloat(v.Value, 64)
			abs := strings.HasSuffix(k, "greement")
			if err != nil || abs && !scalar.EqualWithinAbs(f, *x, edTol) || !abs && !scalar.EqualWithinRel(f, *x, edTol) {
				t.Errorf("%s: %s = %s on the page, %v natively", what, k, v.Value, *x)
			}
		}
	}
}

// edCount is the number of recomputes the editor has run.
func edCount(t *testing.T, ctx context.Context) int {
	t.Helper()
	return eval[int](t, ctx, `Number(document.querySelector('[data-circuit-editor]').dataset.recomputes || 0)`)
}

// edWait waits for a recompute after the n-th.
func edWait(t *testing.T, ctx context.Context, n int) {
	t.Helper()
	poll(t, ctx, fmt.Sprintf(`Number(document.querySelector('[data-circuit-editor]').dataset.recomputes || 0) > %d`, n))
}

// edLoad opens u and waits until the editor has read the address and
// analyzed.
func edLoad(t *testing.T, ctx context.Context, u string) {
	t.Helper()
	load(t, ctx, u)
	poll(t, ctx, `(function () { var e = document.querySelector('[data-circuit-editor]'); return !!e && e.dataset.live === 'true'; })()`)
}

// edSetText replaces the editor's text as a paste would and waits for
// the recompute it causes.
func edSetText(t *testing.T, ctx context.Context, text string) {
	t.Helper()
	n := edCount(t, ctx)
	eval[bool](t, ctx, `(function (v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  ta.value = v;
  ta.dispatchEvent(new Event('input', { bubbles: true }));
  return true;
})(`+jsString(text)+`)`)
	edWait(t, ctx, n)
}

// edChoose sets a select of the editor (by data-role) and waits for the
// recompute.
func edChoose(t *testing.T, ctx context.Context, role, value string) {
	t.Helper()
	n := edCount(t, ctx)
	ok := eval[bool](t, ctx, `(function (r, v) {
  var s = document.querySelector('[data-circuit-editor] [data-role="' + r + '"]');
  if (!Array.from(s.options).some(function (o) { return o.value === v; })) return false;
  s.value = v;
  s.dispatchEvent(new Event('change', { bubbles: true }));
  return true;
})(`+jsString(role)+`, `+jsString(value)+`)`)
	if !ok {
		t.Fatalf("the %s picker has no option %q", role, value)
	}
	edWait(t, ctx, n)
}

func edStale(t *testing.T, ctx context.Context) bool {
	t.Helper()
	return eval[bool](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="results"]').classList.contains('is-stale')`)
}

// edCheckExample checks that the editor holds example ex with its
// settings and shows the native engine's numbers for it.
func edCheckExample(t *testing.T, ctx context.Context, ex examples.Example) {
	t.Helper()
	s := edRead(t, ctx)
	if s.Text != ex.Text || s.Reference != ex.Reference || strings.Join(s.Ports, " ") != strings.Join(ex.Ports, " ") ||
		s.Frequency != ex.Frequency || s.From != ex.From || s.To != ex.To || s.Points != ex.Points {
		t.Errorf("%s: the editor holds %+v, not the example's settings", ex.ID, s)
	}
	if ex.Gain != nil && (s.Source != ex.Gain.Source || s.Output != ex.Gain.Output) {
		t.Errorf("%s: gain %s → %s, want %s → %s", ex.ID, s.Source, s.Output, ex.Gain.Source, ex.Gain.Output)
	}
	if edStale(t, ctx) {
		t.Errorf("%s: the results are marked stale", ex.ID)
	}
	// The page may have shortened the sweep on a slow machine (it says
	// so); the native engine answers the request the page made.
	req := ex.Request()
	if s.Used != ex.Points {
		t.Logf("%s: the page used %s of %s sweep points", ex.ID, s.Used, ex.Points)
		req = edRequest(t, s)
	}
	edCompare(t, ex.ID, edValues(t, ctx, "[data-circuit-editor]"), edNative(t, req))
}

// Each example, chosen from the list, shows the native engine's numbers;
// the page opens with the first, pre-rendered, then live.
func TestCustomExamples(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	first := examples.All()[0]
	edCheckExample(t, ctx, first)
	if n := eval[int](t, ctx, `document.querySelectorAll('[data-circuit-editor] [data-role="results"] .zplot').length`); n < 3 {
		t.Errorf("%d charts, want |Z| per port and T at least", n)
	}
	for _, ex := range examples.All()[1:] {
		edChoose(t, ctx, "example", ex.ID)
		edCheckExample(t, ctx, ex)
		if got := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="scenario"]').textContent`); got != ex.Scenario {
			t.Errorf("%s: the scenario shown is %q", ex.ID, got)
		}
	}
	// The two-stage example with U2 as the reference: Z stays, the terms
	// move (the page text explains it).
	edChoose(t, ctx, "example", "twostage")
	before := edValues(t, ctx, "[data-circuit-editor]")
	edChoose(t, ctx, "reference", "U2")
	after := edValues(t, ctx, "[data-circuit-editor]")
	req := edRequest(t, edRead(t, ctx))
	if req.Reference != "U2" {
		t.Fatalf("reference %q after choosing U2", req.Reference)
	}
	edCompare(t, "twostage with U2", after, edNative(t, req))
	if before["sum/z"].Re != after["sum/z"].Re && !near12(before["sum/z"], after["sum/z"]) || before["sum/z0"] == after["sum/z0"] {
		t.Errorf("sum: Z %v → %v and Z₀ %v → %v; want Z kept and Z₀ changed", before["sum/z"], after["sum/z"], before["sum/z0"], after["sum/z0"])
	}
	// Editing a choice writes it to the address, once the edits pause.
	poll(t, ctx, `location.hash.startsWith('#c=') && location.hash.includes('ref=U2')`)
	checkHealthy(t, ctx)
}

func near12(a, b edValue) bool {
	ra, _ := strconv.ParseFloat(a.Re, 64)
	ia, _ := strconv.ParseFloat(a.Im, 64)
	rb, _ := strconv.ParseFloat(b.Re, 64)
	ib, _ := strconv.ParseFloat(b.Im, 64)
	return cscalar.EqualWithinRel(complex(ra, ia), complex(rb, ib), 1e-9)
}

// geometry is where the page draws an error and what the textarea looks
// like around it.
type geometry struct {
	MarkLines  []int     `json:"markLines"`
	MarkTop    float64   `json:"markTop"`    // the first mark's top, from the textarea's top
	LineTop    float64   `json:"lineTop"`    // where that line's text starts, from the textarea's top
	LineHeight float64   `json:"lineHeight"` // of the textarea
	UnderLeft  float64   `json:"underLeft"`  // the first underline's left, from the textarea's left
	ColLeft    float64   `json:"colLeft"`    // where the error's column starts
	Listed     []string  `json:"listed"`     // the list's entries
	Places     [][2]int  `json:"places"`     // their line and column
	Gutter     float64   `json:"gutter"`     // the gutter's scrollTop
	Scroll     float64   `json:"scroll"`     // the textarea's scrollTop
	Heads      []float64 `json:"heads"`
}

const geometryJS = `(function () {
  var e = document.querySelector('[data-circuit-editor]');
  var ta = e.querySelector('[data-role="text"]');
  var cs = getComputedStyle(ta);
  var lh = parseFloat(cs.lineHeight), pt = parseFloat(cs.paddingTop), pl = parseFloat(cs.paddingLeft);
  var box = ta.getBoundingClientRect();
  var marks = Array.from(e.querySelectorAll('.gutter-mark'));
  var under = e.querySelector('.err-underline');
  var items = Array.from(e.querySelectorAll('[data-role="errors"] li'));
  var places = Array.from(e.querySelectorAll('[data-role="errors"] button[data-line]')).map(function (b) { return [Number(b.dataset.line), Number(b.dataset.column)]; });
  var g = { markLines: marks.map(function (m) { return Number(m.dataset.line); }), lineHeight: lh,
    listed: items.map(function (li) { return li.textContent; }), places: places,
    gutter: e.querySelector('[data-role="gutter"]').scrollTop, scroll: ta.scrollTop, markTop: -1, lineTop: -1, underLeft: -1, colLeft: -1 };
  if (marks.length) {
    g.markTop = marks[0].getBoundingClientRect().top - box.top;
    g.lineTop = pt + (g.markLines[0] - 1) * lh - ta.scrollTop;
  }
  if (under && places.length) {
    var c = document.createElement('canvas').getContext('2d');
    c.font = cs.font;
    g.underLeft = under.getBoundingClientRect().left - box.left;
    g.colLeft = pl + c.measureText('M'.repeat(places[0][1] - 1)).width - ta.scrollLeft;
  }
  return g;
})()`

// A mistake at a known line and column is marked in the gutter at that
// line, underlined at that column and listed; the last good results stay,
// marked stale; choosing the entry puts the caret there; correcting it
// brings the live results back.
func TestCustomErrorAtItsLine(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	good := edValues(t, ctx, "[data-circuit-editor]")

	// Forty lines of comment push the mistake below the textarea's fold.
	var b strings.Builder
	for i := 0; i < 40; i++ {
		fmt.Fprintf(&b, "# line %d of a long preamble\n", i+1)
	}
	b.WriteString("vsource  Vin in  gnd 1\nopamp    U1  in  fb  out  a0=100k gbw=1M\nresistor R1  fb  gnd 1k\nresistor R2  out fb  4k7k\nport     out out gnd\n")
	text := b.String()
	native := api.Inspect(text)
	if len(native.Errors) != 1 || native.Errors[0].Line != 44 {
		t.Fatalf("the test circuit should have one error, on line 44: %+v", native.Errors)
	}
	wantLine, wantCol := native.Errors[0].Line, native.Errors[0].Column
	edSetText(t, ctx, text)
	g := eval[geometry](t, ctx, geometryJS)
	if len(g.MarkLines) != 1 || g.MarkLines[0] != wantLine {
		t.Fatalf("gutter marks on lines %v, want %d", g.MarkLines, wantLine)
	}
	if len(g.Places) != 1 || g.Places[0] != [2]int{wantLine, wantCol} {
		t.Errorf("listed places %v, want line %d column %d", g.Places, wantLine, wantCol)
	}
	if len(g.Listed) != 1 || !strings.Contains(g.Listed[0], fmt.Sprintf("line %d, column %d", wantLine, wantCol)) ||
		!strings.Contains(g.Listed[0], native.Errors[0].Message) {
		t.Errorf("listed %q, want line %d, column %d: %s", g.Listed, wantLine, wantCol, native.Errors[0].Message)
	}
	if !edStale(t, ctx) || eval[int](t, ctx, `document.querySelectorAll('[data-circuit-editor] [data-role="stale"]').length`) != 1 {
		t.Error("the results are not marked stale")
	}
	if kept := edValues(t, ctx, "[data-circuit-editor]"); fmt.Sprint(kept) != fmt.Sprint(good) {
		t.Error("the last good results were not kept")
	}

	// Scroll the text so that the line is in view: the gutter follows, and
	// the mark and the underline sit on the line and the column.
	eval[bool](t, ctx, `(function () { var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  ta.scrollTop = 600; ta.dispatchEvent(new Event('scroll')); return true; })()`)
	nextFrames(t, ctx, 1)
	g = eval[geometry](t, ctx, geometryJS)
	if g.Scroll == 0 || g.Gutter != g.Scroll {
		t.Errorf("textarea scrolled to %v, gutter to %v", g.Scroll, g.Gutter)
	}
	if d := g.MarkTop - g.LineTop; d < -1.5 || d > 1.5 {
		t.Errorf("the gutter mark is %.1f px from its line (mark at %.1f, line at %.1f)", d, g.MarkTop, g.LineTop)
	}
	if d := g.UnderLeft - g.ColLeft; d < -1.5 || d > 1.5 {
		t.Errorf("the underline is %.1f px from its column", d)
	}

	// The entry takes the caret to the mistake.
	eval[bool](t, ctx, `(document.querySelector('[data-circuit-editor] [data-role="errors"] button').click(), true)`)
	caret := eval[[]int](t, ctx, `(function () { var ta = document.querySelector('[data-circuit-editor] [data-role="text"]'); return [ta.selectionStart, ta.selectionEnd]; })()`)
	lines := strings.Split(text, "\n")
	off := len(strings.Join(lines[:wantLine-1], "\n")) + 1 + (wantCol - 1) // ASCII text: columns are bytes
	end := off + strings.IndexAny(text[off:], " \t\n")
	if caret[0] != off || caret[1] != end {
		t.Errorf("selection %v, want %d–%d: from the column to the end of the token %q", caret, off, end, text[off:end])
	}

	// Typing the fix, key by key, brings the results back.
	n := edCount(t, ctx)
	if err := chromedp.Do(ctx, chromedp.KeyEvent("\b")); err != nil {
		t.Fatal(err)
	}
	edWait(t, ctx, n)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="problems"]').hidden`)
	if edStale(t, ctx) {
		t.Error("still stale after the fix")
	}
	fixed := edRead(t, ctx)
	if !strings.Contains(fixed.Text, "\nport     out out gnd") || strings.Contains(fixed.Text, "4k7k") {
		t.Fatalf("the typed fix did not reach the text: %.200q", fixed.Text[len(fixed.Text)-80:])
	}
	edCompare(t, "after the fix", edValues(t, ctx, "[data-circuit-editor]"), edNative(t, edRequest(t, fixed)))

	// A bad spot frequency is marked at its field; the text is fine.
	n = edCount(t, ctx)
	eval[bool](t, ctx, `(function () { var i = document.querySelector('[data-circuit-editor] input[name="frequency"]');
  i.value = '1..2'; i.dispatchEvent(new Event('input', { bubbles: true })); return true; })()`)
	edWait(t, ctx, n)
	if msg := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-field="frequency"] [data-role="msg"]').textContent`); !strings.Contains(msg, "spot frequency") {
		t.Errorf("frequency message %q", msg)
	}

	// A circuit without a controlled source is analysed as it is: the
	// reference picker says none, and the direct solution is shown.
	eval[bool](t, ctx, `(function () { var i = document.querySelector('[data-circuit-editor] input[name="frequency"]');
  i.value = '1k'; return true; })()`)
	edSetText(t, ctx, "resistor R1 a gnd 1k\nport p a gnd\n")
	if ref := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="reference"]').selectedOptions[0].textContent`); !strings.HasPrefix(ref, "none") {
		t.Errorf("reference picker shows %q", ref)
	}
	if edStale(t, ctx) {
		t.Error("a passive circuit is marked stale")
	}
	z := edValues(t, ctx, "[data-circuit-editor]")["p/zDirect"]
	if re, err := strconv.ParseFloat(z.Re, 64); err != nil || !scalar.EqualWithinRel(re, 1000, 1e-12) || z.Im != "0" {
		t.Errorf("Z direct of 1 kΩ shows %+v", z)
	}
	checkHealthy(t, ctx)
}

// Up to 200 nodes analyze; one more gets the engine's message.
func TestCustomNodeLimit(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	if c := api.Inspect(circuit.Ladder(200)); len(c.Nodes) != 200 || len(c.Errors) != 0 {
		t.Fatalf("the 200-node ladder has %d nodes and errors %v", len(c.Nodes), c.Errors)
	}
	edSetText(t, ctx, circuit.Ladder(200))
	if edStale(t, ctx) {
		t.Fatalf("200 nodes did not analyze: %s", eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="problems"]').textContent`))
	}
	s := edRead(t, ctx)
	edCompare(t, "200 nodes", edValues(t, ctx, "[data-circuit-editor]"), edNative(t, edRequest(t, s)))
	// On this machine a 200-node sweep of 400 points takes longer than
	// the page's budget: it is shortened, the page says so, and the whole
	// sweep is there on request.
	if s.Used != s.Points {
		note := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="cut-notice"]:not([hidden])').textContent`)
		if !strings.Contains(note, "ms per frequency") || !strings.Contains(note, "Compute all "+s.Points+" points") {
			t.Errorf("sweep shortened to %s points; notice %q", s.Used, note)
		}
		n := edCount(t, ctx)
		eval[bool](t, ctx, `(document.querySelector('[data-circuit-editor] [data-action="full-sweep"]').click(), true)`)
		edWait(t, ctx, n)
		full := edRead(t, ctx)
		if full.Used != full.Points || !eval[bool](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="cut-notice"]').hidden`) {
			t.Errorf("after asking for the whole sweep: %s of %s points", full.Used, full.Points)
		}
		edCompare(t, "200 nodes, whole sweep", edValues(t, ctx, "[data-circuit-editor]"), edNative(t, edRequest(t, full)))
	} else {
		t.Log("the 200-node sweep fitted the budget: no shortening to check")
	}
	edSetText(t, ctx, circuit.Ladder(201))
	msg := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="problems"]').textContent`)
	if !edStale(t, ctx) || !strings.Contains(msg, "201 nodes") || !strings.Contains(msg, "up to 200") {
		t.Errorf("201 nodes: stale %v, message %q", edStale(t, ctx), msg)
	}
	checkHealthy(t, ctx)
}

// edCompress is the c= encoding, done the Go way: raw DEFLATE (RFC 1951,
// what CompressionStream('deflate-raw') reads) and base64url.
func edCompress(t *testing.T, b []byte) string {
	t.Helper()
	var buf bytes.Buffer
	w, _ := flate.NewWriter(&buf, flate.BestCompression)
	w.Write(b)
	w.Close()
	return base64.RawURLEncoding.EncodeToString(buf.Bytes())
}

// edShareText is a circuit of about size bytes whose values are random
// (seeded), so that it compresses like a real one; note adds a comment of
// that many random characters to each section.
func edShareText(size int, seed uint64, note int) string {
	r := rand.New(rand.NewPCG(seed, 2))
	const letters = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789"
	var b strings.Builder
	b.WriteString("# share-link test circuit (invented): a follower into an RC ladder; émigré µ Ω\nvsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=10M ro=50\nresistor Rf out fb 1k\nresistor Rg fb gnd 1k\n")
	prev := "out"
	for i := 1; b.Len() < size-40; i++ {
		node := "n" + strconv.Itoa(i)
		if note > 0 {
			b.WriteString("# ")
			for k := 0; k < note; k++ {
				b.WriteByte(letters[r.IntN(len(letters))])
			}
			b.WriteByte('\n')
		}
		fmt.Fprintf(&b, "resistor R%d %s %s %d.%d\ncapacitor C%d %s gnd %dp\n", i, prev, node, 10+r.IntN(990), r.IntN(10), i, node, 1+r.IntN(99))
		prev = node
	}
	fmt.Fprintf(&b, "port out out gnd\nport far %s gnd\n", prev)
	return b.String()
}

// A share link with a 2 KB circuit reproduces the circuit, the choices and
// the numbers in a fresh tab; a long one says so and offers the file.
func TestCustomShareLink(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	text := edShareText(2048, 1, 0)
	if len(text) < 2000 || len(text) > 2100 {
		t.Fatalf("test circuit is %d bytes", len(text))
	}
	edSetText(t, ctx, text)
	if edStale(t, ctx) {
		t.Fatalf("the 2 KB circuit does not analyze: %s", eval[string](t, ctx, `document.querySelector('[data-circuit-editor]').innerText.slice(0, 300)`))
	}
	edChoose(t, ctx, "node-port", "n7")
	edChoose(t, ctx, "gain-source", "Vin")
	edChoose(t, ctx, "gain-output", "n3")
	poll(t, ctx, `/[#&]out=n3(&|$)/.test(document.querySelector('[data-circuit-editor] [data-action="share"]').getAttribute('href'))`)
	href := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-action="share"]').getAttribute('href')`)
	if !strings.HasPrefix(href, "#c=") {
		t.Fatalf("share link %.80q", href)
	}
	state := edRead(t, ctx)
	shown := edValues(t, ctx, "[data-circuit-editor]")
	u := fileURL("custom", strings.TrimPrefix(href, "#"))
	t.Logf("2 KB circuit: share link of %d characters", len(u))
	wantNotice := len(u) > 2000
	if got := !eval[bool](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="link-notice"]').hidden`); got != wantNotice {
		t.Errorf("link of %d characters: notice shown %v", len(u), got)
	}

	tab := newTab(t, ctx)
	edLoad(t, tab, u)
	again := edRead(t, tab)
	if again.Text != text {
		t.Fatalf("the text did not survive the link (%d bytes, want %d)", len(again.Text), len(text))
	}
	// The sweep points a page uses depend on the machine's speed (the
	// sweep is shortened to a time budget); everything else must match.
	sameSettings := again
	sameSettings.Used = state.Used
	if fmt.Sprint(sameSettings) != fmt.Sprint(state) {
		t.Errorf("settings after the link:\n %+v\nwant\n %+v", again, state)
	}
	got := edValues(t, tab, "[data-circuit-editor]")
	for k, v := range shown {
		if again.Used != state.Used && (k == "fc" || k == "pm" || k == "gm" || k == "closure") {
			continue // found on different sweep grids
		}
		if got[k] != v {
			t.Errorf("%s = %+v after the link, %+v before", k, got[k], v)
		}
	}
	edCompare(t, "from the link", edValues(t, tab, "[data-circuit-editor]"), edNative(t, edRequest(t, again)))
	checkHealthy(t, tab)

	// A circuit too big for a wiki link: the notice, with the file offered.
	edSetText(t, ctx, edShareText(20000, 2, 120))
	if edStale(t, ctx) {
		t.Fatal("the 20 KB circuit does not analyze")
	}
	poll(t, ctx, `!document.querySelector('[data-circuit-editor] [data-role="link-notice"]').hidden`)
	note := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="link-notice"]').textContent`)
	if !strings.Contains(note, "2,000 characters") || !strings.Contains(note, ".txt") {
		t.Errorf("long-link notice %q", note)
	}
	checkHealthy(t, ctx)
}

// edHostileName is markup where a name goes.
const edHostileName = `<img src=x onerror=alert(1)>`

// What circuit.js draws at most: line numbers beyond the visible ones on
// either side (GUTTER_SPARE there), and errors marked and listed
// (MAX_LISTED, plus one entry saying how many more there are).
const (
	edSpare     = 40
	edMaxListed = 60
	// The editor's own elements (form, pickers, panel) with every error
	// listed: far fewer than a 10,000-line text has lines.
	edMaxElements = 2000
)

// edBounds is what the editor draws for its text, counted: the line
// numbers in the gutter, the error marks, underlines and list entries, and
// every element of the editor. None of them may grow with the text, or a
// 10,000-line paste would hold the page while it lays them out.
type edBounds struct {
	Numbers    int `json:"numbers"`
	Marks      int `json:"marks"`
	Underlines int `json:"underlines"`
	Listed     int `json:"listed"`
	Elements   int `json:"elements"`
	Lines      int `json:"lines"` // of the text
	Visible    int `json:"visible"`
	Calls      int `json:"calls"` // engine calls so far
}

const edBoundsJS = `(function () {
  var e = document.querySelector('[data-circuit-editor]');
  var ta = e.querySelector('[data-role="text"]');
  var numbers = e.querySelector('[data-role="numbers"]').textContent;
  return { numbers: numbers ? numbers.split('\n').length : 0,
    marks: e.querySelectorAll('.gutter-mark').length,
    underlines: e.querySelectorAll('.err-underline').length,
    listed: e.querySelectorAll('[data-role="errors"] li').length,
    elements: e.querySelectorAll('*').length,
    lines: ta.value.split('\n').length,
    visible: Math.ceil(ta.clientHeight / parseFloat(getComputedStyle(ta).lineHeight)),
    calls: performance.getEntriesByName('zport-engine-call').length };
})()`

// Hostile circuits are rejected or analyzed without running any script,
// and without the page doing work that grows with the text where the user
// waits: one engine call per paste, and only a view's worth of line
// numbers, marks and list entries drawn, however long the text.
func TestCustomHostileCircuit(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	r := rand.New(rand.NewPCG(7, 7))
	junk := func(n int) string {
		const alphabet = "<>&\"'=/;:!?#()[]{}%$@^~`|\\ \t\nabcxyzABC0189.,-_+*µΩ€😀"
		rs := []rune(alphabet)
		var b strings.Builder
		for b.Len() < n {
			b.WriteRune(rs[r.IntN(len(rs))])
		}
		return b.String()
	}
	// Names in base 36 keep 10,000 lines within the 256 KB limit.
	var manyParts, manyNodes, manyComments strings.Builder
	manyParts.WriteString("vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=50\nresistor Rf out fb 1k\nport out out gnd\n")
	for i := 0; i < 10000; i++ {
		k := strconv.FormatInt(int64(i), 36)
		fmt.Fprintf(&manyParts, "resistor Q%s fb gnd %dk\n", k, 1+i%97)
		fmt.Fprintf(&manyNodes, "resistor Q%s n%s gnd 1k\n", k, k)
		manyComments.WriteString("#<svg onload=alert(1)>\n")
	}
	cases := []struct {
		name, text string
		analyzed   bool
		message    string
	}{
		{"markup in names", "vsource " + edHostileName + " in gnd 1\nresistor R1 in " + edHostileName + " 1k\nport <script>alert(2)</script> in gnd\n", false, "use letters, digits and _"},
		{"100 KB of junk", junk(100 << 10), false, "too many errors"},
		{"10,000 lines, 10,000 parts on a few nodes", manyParts.String(), true, ""},
		{"10,000 lines, 10,000 nodes", manyNodes.String(), false, "up to 200"},
		{"10,000 comment lines of markup", manyComments.String(), false, "no parts"},
		{"10,000 lines of markup", strings.Repeat("<svg onload=alert(1)>\n", 10000), false, "too many errors"},
	}
	for _, c := range cases {
		if len(c.text) > api.MaxCircuitBytes {
			t.Fatalf("%s: %d bytes, over the limit the case is not about", c.name, len(c.text))
		}
		before := eval[edBounds](t, ctx, edBoundsJS)
		edSetText(t, ctx, c.text)
		b := eval[edBounds](t, ctx, edBoundsJS)
		t.Logf("%s (%d bytes, %d lines): %d line numbers drawn, %d marks, %d listed, %d elements in the editor",
			c.name, len(c.text), b.Lines, b.Numbers, b.Marks, b.Listed, b.Elements)
		if calls := b.Calls - before.Calls; calls != 1 {
			t.Errorf("%s: %d engine calls for one paste, want 1", c.name, calls)
		}
		// The gutter draws the visible lines and edSpare on either side.
		if b.Numbers > b.Visible+2*edSpare+1 || b.Numbers >= b.Lines && b.Lines > b.Visible+2*edSpare+1 {
			t.Errorf("%s: %d line numbers drawn for %d lines of text, %d visible", c.name, b.Numbers, b.Lines, b.Visible)
		}
		if b.Marks > edMaxListed || b.Underlines > edMaxListed || b.Listed > edMaxListed+1 || b.Elements > edMaxElements {
			t.Errorf("%s: %d marks, %d underlines, %d list entries, %d elements: the editor grows with the text", c.name, b.Marks, b.Underlines, b.Listed, b.Elements)
		}
		stale := edStale(t, ctx)
		problems := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="problems"]').textContent`)
		if c.analyzed {
			if stale {
				t.Errorf("%s: not analyzed: %.200s", c.name, problems)
			} else {
				edCompare(t, c.name, edValues(t, ctx, "[data-circuit-editor]"), edNative(t, edRequest(t, edRead(t, ctx))))
			}
		} else if !stale || !strings.Contains(problems, c.message) {
			t.Errorf("%s: stale %v, problems %.200q; want %q", c.name, stale, problems, c.message)
		}
		if n := eval[int](t, ctx, `document.querySelectorAll('img, script:not([src])').length`); n != 0 {
			t.Errorf("%s: %d img or inline script elements in the page", c.name, n)
		}
		// Still answering: the page draws the next frame.
		nextFrames(t, ctx, 1)
	}

	// Text over the limit is refused before it reaches the textarea: a
	// paste of 300 KB, and a 300 KB file.
	before := edRead(t, ctx).Text
	big := strings.Repeat("# 300 KB of comment\n", 300<<10/20)
	msg := eval[string](t, ctx, `(function (v) {
  var ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
  var dt = new DataTransfer();
  dt.setData('text/plain', v);
  var e = new ClipboardEvent('paste', { clipboardData: dt, bubbles: true, cancelable: true });
  ta.dispatchEvent(e);
  return (e.defaultPrevented ? 'refused: ' : 'let through: ') + document.querySelector('[data-circuit-editor] [data-role="file-msg"]').textContent;
})(`+jsString(big)+`)`)
	if !strings.HasPrefix(msg, "refused: Not pasted") || !strings.Contains(msg, "256 KB") {
		t.Errorf("300 KB paste: %s", msg)
	}
	file := filepath.Join(t.TempDir(), "big.txt")
	if err := os.WriteFile(file, []byte(big), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := chromedp.Do(ctx, chromedp.SetUploadFiles(chromedp.CSS(`[data-circuit-editor] input[data-role="file"]`), []string{file})); err != nil {
		t.Fatal(err)
	}
	poll(t, ctx, `/big\.txt is \d+ KB; circuit text is limited to 256 KB/.test(document.querySelector('[data-circuit-editor] [data-role="file-msg"]').textContent)`)
	if edRead(t, ctx).Text != before {
		t.Error("text over the limit reached the editor")
	}
	if len(dialogs(ctx)) > 0 {
		t.Errorf("dialogs opened: %q", dialogs(ctx))
	}
	checkHealthy(t, ctx)
}

// A malformed or hostile link is ignored with a notice, never executed,
// and a link that inflates to a huge text is refused without reading it
// all.
func TestCustomHostileLink(t *testing.T) {
	ctx := start(t)
	good := edCompress(t, []byte(examples.All()[1].Text))
	bomb := edCompress(t, bytes.Repeat([]byte("# "), 8<<20)) // 16 MB of comment, ~16 KB of link
	noise := make([]byte, 600)
	nr := rand.New(rand.NewPCG(3, 3))
	for i := range noise {
		noise[i] = byte(nr.UintN(256))
	}
	first := examples.All()[0]
	for _, c := range []struct {
		name, frag, notice, text string
	}{
		{"not base64url", "c=%3Cimg%20src%3Dx%20onerror%3Dalert(1)%3E", "not valid base64url", first.Text},
		{"not deflate", "c=" + base64.RawURLEncoding.EncodeToString(noise), "damaged", first.Text},
		{"inflates to 16 MB", "c=" + bomb, "longer than 256 KB", first.Text},
		{"not UTF-8", "c=" + edCompress(t, []byte{'#', 0xff, 0xfe, '\n'}), "not UTF-8", first.Text},
		{"markup as reference", "c=" + good + "&ref=" + url.QueryEscape(edHostileName), `Not used from this link: ref = "`, examples.All()[1].Text},
		{"unknown setting", "c=" + good + "&onload=alert(1)", `Not used from this link: onload = "alert(1)" (this page has no such setting). The page shows the link’s circuit`, examples.All()[1].Text},
		{"the circuit twice", "c=" + good + "&c=" + good, "“c=” appears twice", examples.All()[1].Text},
	} {
		edLoad(t, ctx, fileURL("custom", c.frag))
		notice := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-role="notice"]').textContent`)
		if !strings.Contains(notice, c.notice) {
			t.Errorf("%s: notice %q, want it to say %q", c.name, notice, c.notice)
		}
		if got := edRead(t, ctx).Text; got != c.text {
			t.Errorf("%s: the editor holds %.60q", c.name, got)
		}
		if edStale(t, ctx) {
			t.Errorf("%s: no live results", c.name)
		}
		if n := eval[int](t, ctx, `document.querySelectorAll('img').length`); n != 0 {
			t.Errorf("%s: %d img elements", c.name, n)
		}
		checkHealthy(t, ctx)
	}
}

// "Open as an editable circuit" on every stage page lands on the custom
// page with the stage's text, reference, ports and gain chosen, and the
// same numbers. A stage per tab, side by side.
func TestCustomOpenAsCircuit(t *testing.T) {
	t.Parallel()
	for _, e := range api.Catalog() {
		t.Run(e.ID, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, fileURL(e.ID, ""))
			calc := `[data-calculator]`
			poll(t, ctx, `/#c=/.test(document.querySelector('a.open-circuit').getAttribute('href'))`)
			stage := edValues(t, ctx, calc)
			generated := eval[string](t, ctx, `document.querySelector('[data-calculator] pre.circuit-text').textContent`)
			link := eval[string](t, ctx, `document.querySelector('a.open-circuit').href`)
			edLoad(t, ctx, link)
			s := edRead(t, ctx)
			var ports []string
			for _, p := range e.Ports {
				ports = append(ports, p.Name)
			}
			if s.Reference != e.Reference || strings.Join(s.Ports, ",") != strings.Join(ports, ",") {
				t.Errorf("%s: reference %s, ports %v; want %s, %v", e.ID, s.Reference, s.Ports, e.Reference, ports)
			}
			if e.Gain != nil && s.Source != e.Gain.Source {
				t.Errorf("%s: gain from %q, want %q", e.ID, s.Source, e.Gain.Source)
			}
			if s.Text != generated {
				t.Errorf("%s: the editor holds %.80q, not the stage's generated text", e.ID, s.Text)
			}
			custom := edValues(t, ctx, "[data-circuit-editor]")
			cut := s.Used != s.Points // a slow machine: the sweep was shortened
			for k, v := range stage {
				if strings.HasPrefix(k, "extra:") || k == "verdict" || cut && (k == "fc" || k == "pm" || k == "gm") {
					continue
				}
				w, ok := custom[k]
				if !ok {
					t.Errorf("%s: %s is on the stage page but not on the custom page", e.ID, k)
					continue
				}
				if v.Null != w.Null || !edClose(v, w) {
					t.Errorf("%s: %s = %+v on the stage page, %+v on the custom page", e.ID, k, v, w)
				}
			}
			checkHealthy(t, ctx)
		})
	}
}

func edClose(a, b edValue) bool {
	p := func(s string) float64 { f, _ := strconv.ParseFloat(s, 64); return f }
	if a.Value != "" || b.Value != "" {
		return scalar.EqualWithinAbsOrRel(p(a.Value), p(b.Value), 1e-14, edTol)
	}
	return cscalar.EqualWithinAbsOrRel(complex(p(a.Re), p(a.Im)), complex(p(b.Re), p(b.Im)), 1e-300, edTol)
}

// The single-file export holds the custom page as a section: it works
// there, keeps its address under p=custom, and the stages' "open as
// circuit" links lead to it within the file.
func TestCustomInSingleFile(t *testing.T) {
	ctx := start(t)
	single := func(frag string) string {
		return (&url.URL{Scheme: "file", Path: filepath.ToSlash(singleFile)}).String() + "#" + frag
	}
	edLoad(t, ctx, single("p=custom"))
	if !eval[bool](t, ctx, `!document.getElementById('page-custom').hidden && document.getElementById('page-index').hidden`) {
		t.Fatal("the custom section is not the one shown")
	}
	edCheckExample(t, ctx, examples.All()[0])
	edChoose(t, ctx, "example", "cable")
	edCheckExample(t, ctx, examples.All()[1])
	poll(t, ctx, `/^#p=custom&c=/.test(location.hash)`)

	// From a stage's section to the custom section by its link.
	n := edCount(t, ctx)
	eval[bool](t, ctx, `(location.hash = '#p=inverting', true)`)
	poll(t, ctx, `!document.getElementById('page-inverting').hidden`)
	poll(t, ctx, `/^#p=custom&c=/.test(document.querySelector('#page-inverting a.open-circuit').getAttribute('href'))`)
	stage := edValues(t, ctx, "#page-inverting [data-calculator]")
	eval[bool](t, ctx, `(document.querySelector('#page-inverting a.open-circuit').click(), true)`)
	poll(t, ctx, `!document.getElementById('page-custom').hidden`)
	edWait(t, ctx, n)
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-role="text"]').value.indexOf('catalog stage "inverting"') >= 0`)
	custom := edValues(t, ctx, "[data-circuit-editor]")
	keys := []string{"T", "in/z", "sum/z", "out/z", "out/zDirect", "g"}
	if s := edRead(t, ctx); s.Used == s.Points {
		keys = append(keys, "pm") // unless a slow machine shortened the sweep
	}
	for _, k := range keys {
		if !edClose(stage[k], custom[k]) {
			t.Errorf("%s = %+v in the stage section, %+v in the custom section", k, stage[k], custom[k])
		}
	}
	checkHealthy(t, ctx)
}

// A .txt file opens into the editor (read in the page, nothing sent) and
// the text saves back to a file.
func TestCustomFiles(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	dir := t.TempDir()
	text := examples.All()[3].Text + "# opened from a file\n"
	in := filepath.Join(dir, "mine.txt")
	if err := os.WriteFile(in, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	n := edCount(t, ctx)
	if err := chromedp.Do(ctx, chromedp.SetUploadFiles(chromedp.CSS(`[data-circuit-editor] input[data-role="file"]`), []string{in})); err != nil {
		t.Fatal(err)
	}
	edWait(t, ctx, n)
	s := edRead(t, ctx)
	if s.Text != text || s.Example != "" {
		t.Fatalf("after opening the file the editor holds %.80q (example %q)", s.Text, s.Example)
	}
	edCompare(t, "opened file", edValues(t, ctx, "[data-circuit-editor]"), edNative(t, edRequest(t, s)))

	out := t.TempDir()
	// Downloads of this tab's browser context only: other tests run beside
	// this one in the same browser.
	if _, err := chromedp.Call(ctx, browser.SetDownloadBehavior, browser.SetDownloadBehaviorParams{
		Behavior: browser.SetDownloadBehaviorBehaviorAllow, DownloadPath: out,
		BrowserContextID: chromedp.FromContext(ctx).BrowserContextID}); err != nil {
		t.Fatal(err)
	}
	eval[bool](t, ctx, `(document.querySelector('[data-circuit-editor] .editor-files [data-action="save-file"]').click(), true)`)
	if b := waitFile(t, filepath.Join(out, "zport-circuit.txt"), func(b []byte) bool { return len(b) == len(text) }); string(b) != text {
		t.Errorf("saved file differs from the text")
	}

	// The sweep as CSV: one row per point, the ports' and the gain's columns.
	eval[bool](t, ctx, `(document.querySelector('[data-circuit-editor] [data-action="csv"]').click(), true)`)
	csv := waitFile(t, filepath.Join(out, "zport-circuit.csv"), func(b []byte) bool { return bytes.Count(b, []byte("\n")) >= 401 })
	// The header row follows the comment lines that say what made the file.
	var head string
	for _, line := range strings.Split(string(csv), "\n") {
		if !strings.HasPrefix(line, "#") {
			head = line
			break
		}
	}
	if !strings.Contains(string(csv), "# circuit text:\r\n") || !strings.Contains(string(csv), "# link: file://") {
		t.Errorf("the CSV's header does not give the circuit text and the link:\n%.600s", csv)
	}
	for _, col := range []string{"in.z", "sum.zDirect", "gInf"} {
		if !strings.Contains(head, col) {
			t.Errorf("CSV header %q lacks %s", head, col)
		}
	}
	// Copy results: a Markdown table of the circuit's ports.
	eval[bool](t, ctx, `(document.querySelector('[data-circuit-editor] [data-action="copy"]').click(), true)`)
	poll(t, ctx, `/copied|select the text/i.test(document.querySelector('[data-circuit-editor] [data-role="action-msg"]').textContent)`)
	checkHealthy(t, ctx)
}

// Screenshots of the custom page with an example and with an error, at
// desktop and phone width, written to ZPORT_SHOTS when set (else a
// temporary folder), each checked to be a picture of the page's width.
func TestCustomScreenshots(t *testing.T) {
	ctx := start(t)
	dir := os.Getenv("ZPORT_SHOTS")
	if dir == "" {
		dir = t.TempDir()
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, v := range []struct {
		name   string
		w, h   int64
		mobile bool
	}{{"1280x800", 1280, 800, false}, {"390x844", 390, 844, true}} {
		opts := []chromedp.EmulateViewportOption{chromedp.EmulateScale(1)}
		if v.mobile {
			opts = append(opts, chromedp.EmulateMobile)
		}
		if err := chromedp.Do(ctx, chromedp.EmulateViewport(v.w, v.h, opts...)); err != nil {
			t.Fatal(err)
		}
		edLoad(t, ctx, fileURL("custom", ""))
		edChoose(t, ctx, "example", "twostage")
		if w := eval[int64](t, ctx, `document.documentElement.scrollWidth`); w > v.w {
			t.Errorf("%s: the page scrolls sideways (%d px wide)", v.name, w)
		}
		for _, shot := range []struct{ name, text string }{
			{"custom-example-" + v.name, ""},
			{"custom-error-" + v.name, strings.Replace(examples.All()[3].Text, "resistor R2   m    sum  100k", "resistor R2   m    sum  100kk", 1)},
		} {
			if shot.text != "" {
				edSetText(t, ctx, shot.text)
				if !edStale(t, ctx) {
					t.Fatalf("%s: the error did not register", shot.name)
				}
			}
			buf := screenshot(t, ctx, dir, shot.name, opts...)
			if len(buf) < 20000 {
				t.Errorf("%s: a %d-byte screenshot is too small to be the page", shot.name, len(buf))
			}
		}
	}
	t.Logf("screenshots in %s", dir)
}

// A circuit the engine cannot solve names the parts it is traced to; the
// editor marks their lines (a loop of two voltage sources here).
func TestCustomSingularMarksParts(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	edSetText(t, ctx, "vsource V1 a gnd 1\nvsource V2 a gnd 2\nvcvs E1 b gnd sense=a,gnd gain=1\nresistor R1 b gnd 1k\nport p b gnd\n")
	g := eval[geometry](t, ctx, geometryJS)
	if fmt.Sprint(g.MarkLines) != "[1 2]" {
		t.Errorf("gutter marks on lines %v, want 1 and 2 (V1 and V2)", g.MarkLines)
	}
	if len(g.Listed) != 1 || !strings.Contains(g.Listed[0], "V1") {
		t.Errorf("listed %q, want the engine's message naming V1 and V2", g.Listed)
	}
	if !edStale(t, ctx) {
		t.Error("the results are not marked stale")
	}
	checkHealthy(t, ctx)
}
