//go:build !js

package plot

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"net/http"
	"net/http/httptest"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"zport/engine/value"
	zbrowser "zport/site/browser"
)

// csp is the policy the site's pages use, plus style-src 'self' so the test
// also covers a page that forbids inline styles (charts with NoStyle, the
// style sheet linked as a file).
const csp = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'"

// probe records CSP violations and uncaught errors for the test to read.
const probe = `window.zprobe = [];
document.addEventListener("securitypolicyviolation", function (e) { zprobe.push("csp " + e.violatedDirective + " " + e.blockedURI); });
window.addEventListener("error", function (e) { zprobe.push("error " + e.message); });`

// servePage serves a page holding body with the hover script, the chart
// style sheet and the probe, under the site's Content-Security-Policy.
func servePage(t *testing.T, body, css string) *httptest.Server {
	t.Helper()
	js, err := os.ReadFile("../assets/plothover.js")
	if err != nil {
		t.Fatal(err)
	}
	mux := http.NewServeMux()
	file := func(path, typ, content string) {
		mux.HandleFunc(path, func(w http.ResponseWriter, r *http.Request) {
			w.Header().Set("Content-Type", typ)
			w.Header().Set("Content-Security-Policy", csp)
			io.WriteString(w, content)
		})
	}
	file("/{$}", "text/html; charset=utf-8", `<!doctype html><html><head><meta charset="utf-8"><title>chart</title>`+
		`<link rel="stylesheet" href="/page.css"><script src="/probe.js"></script><script src="/plothover.js" defer></script>`+
		`</head><body>`+body+`</body></html>`)
	file("/page.css", "text/css", css+CSS)
	file("/probe.js", "text/javascript", probe)
	file("/plothover.js", "text/javascript", string(js))
	srv := httptest.NewServer(mux)
	t.Cleanup(srv.Close)
	return srv
}

// browser starts Chromium the project's way (package zport/site/browser:
// its flags, a skip in -short mode, and a loud skip or, with
// ZPORT_BROWSER=required, a failure when it is missing), with the 760×900
// viewport these tests measure in.
func browser(t *testing.T) context.Context {
	t.Helper()
	ctx := zbrowser.ForTest(t)
	if err := chromedp.Do(ctx, chromedp.EmulateViewport(760, 900)); err != nil {
		t.Fatal(err)
	}
	return ctx
}

func eval[T any](t *testing.T, ctx context.Context, js string) T {
	t.Helper()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](js))
	if err != nil {
		t.Fatalf("evaluate %.80q: %v", js, err)
	}
	return v
}

func jsString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// readout returns the lines of a chart's hover readout.
func readout(t *testing.T, ctx context.Context, id string) []string {
	return eval[[]string](t, ctx, `Array.from(document.querySelectorAll("#`+id+` .zcur text")).map(function (e) { return e.textContent; })`)
}

// wantReadout is what the readout must say at point i, computed here with
// value.Format from the numbers in the SVG.
func wantReadout(t *testing.T, root *node, i int) []string {
	freq := attrFloats(t, root, "data-freq")
	lines := []string{value.Format(freq[i], "Hz", 3)}
	mag, _ := tracePaths(root)
	for _, p := range mag {
		v := attrFloats(t, p, "data-values")
		lines = append(lines, p.attr["data-name"]+": "+value.Format(v[2*i], root.attr["data-unit"], 3)+
			"  ∠ "+signed(strconv.FormatFloat(v[2*i+1], 'f', 1, 64))+"°")
	}
	return lines
}

func TestHoverInBrowser(t *testing.T) {
	ctx := browser(t)
	c := bode400x4()
	c.NoStyle = true
	h := sampleHistogram()
	h.NoStyle = true
	srv := servePage(t, c.SVG()+h.SVG(), "body{margin:0;font:14px sans-serif}")
	if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL), chromedp.WaitVisible("#p-out")); err != nil {
		t.Fatal(err)
	}
	root := parse(t, c.SVG())

	if got := eval[string](t, ctx, `document.querySelector("#p-out").getAttribute("tabindex")`); got != "0" {
		t.Fatalf("chart not made focusable: tabindex %q", got)
	}
	if eval[bool](t, ctx, `document.querySelector("#mc-r").hasAttribute("tabindex")`) {
		t.Errorf("the histogram has no hover data and should be left alone")
	}
	// The linked style sheet applies: traces take the palette colour.
	if got := eval[string](t, ctx, `getComputedStyle(document.querySelector("#p-out path[data-values]")).stroke`); got != "rgb(42, 111, 176)" {
		t.Errorf("trace stroke %q, want the default --trace-z", got)
	}

	// Pointer: move over the point nearest to 10 kHz.
	box := eval[[]float64](t, ctx, `(function () { var r = document.querySelector("#p-out").getBoundingClientRect(); return [r.left, r.top]; })()`)
	freq := attrFloats(t, root, "data-freq")
	x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
	i := 0
	for k, f := range freq {
		if math.Abs(math.Log10(f/10e3)) < math.Abs(math.Log10(freq[i]/10e3)) {
			i = k
		}
	}
	xi := x0 + math.Log10(freq[i]/freq[0])/math.Log10(freq[len(freq)-1]/freq[0])*(x1-x0)
	if err := chromedp.Do(ctx, chromedp.MouseEvent(input.DispatchMouseEventTypeMouseMoved, box[0]+xi+0.2, box[1]+150)); err != nil {
		t.Fatal(err)
	}
	if got, want := readout(t, ctx, "p-out"), wantReadout(t, root, i); strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("readout after pointer move:\n got %q\nwant %q", got, want)
	}
	cursor := eval[string](t, ctx, `document.querySelector("#p-out .zcur-line").getAttribute("d")`)
	if want := "M" + strconv.FormatFloat(xi, 'f', 1, 64) + " "; !strings.HasPrefix(cursor, want) {
		t.Errorf("cursor path %q, want it at x = %.1f", cursor, xi)
	}
	if *sample != "" {
		shot(t, ctx, *sample+"-hover.png")
	}

	// Keyboard: focus, then arrows step one point, End goes to the last.
	if err := chromedp.Do(ctx, chromedp.Focus("#p-out"), chromedp.KeyEvent(kb.ArrowRight), chromedp.KeyEvent(kb.ArrowRight)); err != nil {
		t.Fatal(err)
	}
	if got, want := readout(t, ctx, "p-out"), wantReadout(t, root, i+2); strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("readout after two arrow presses:\n got %q\nwant %q", got, want)
	}
	if err := chromedp.Do(ctx, chromedp.KeyEvent(kb.End)); err != nil {
		t.Fatal(err)
	}
	if got, want := readout(t, ctx, "p-out")[0], value.Format(freq[len(freq)-1], "Hz", 3); got != want {
		t.Errorf("after End the readout shows %q, want %q", got, want)
	}
	if err := chromedp.Do(ctx, chromedp.KeyEvent(kb.Escape)); err != nil {
		t.Fatal(err)
	}
	if got := eval[string](t, ctx, `document.querySelector("#p-out .zcur").getAttribute("display")`); got != "none" {
		t.Errorf("Escape left the cursor shown (display %q)", got)
	}

	// A chart added later is picked up, and attaching again changes nothing.
	late := &Bode{ID: "p-late", Title: "late", Freq: logspace(1, 1e3, 5), NoStyle: true,
		Traces: []Trace{{Name: "<b>R</b>", Values: []complex128{1, 2, 3, 4, 5}}}}
	eval[bool](t, ctx, `document.body.insertAdjacentHTML("beforeend", `+jsString(late.SVG())+`), true`)
	if got := eval[string](t, ctx, `document.querySelector("#p-late").getAttribute("tabindex")`); got != "0" {
		t.Errorf("a chart added later was not attached (tabindex %q)", got)
	}
	eval[bool](t, ctx, `zportPlotHover(); zportPlotHover(document.querySelector("#p-late")); true`)
	lb := eval[[]float64](t, ctx, `(function () { var e = document.querySelector("#p-late"); e.scrollIntoView(); var r = e.getBoundingClientRect(); return [r.left, r.top]; })()`)
	if err := chromedp.Do(ctx, chromedp.MouseEvent(input.DispatchMouseEventTypeMouseMoved, lb[0]+300, lb[1]+120)); err != nil {
		t.Fatal(err)
	}
	if n := eval[int](t, ctx, `document.querySelectorAll("#p-late .zcur").length`); n != 1 {
		t.Errorf("%d cursor groups on a chart attached three times, want 1", n)
	}
	if got := readout(t, ctx, "p-late"); len(got) != 2 || !strings.HasPrefix(got[1], "<b>R</b>: ") {
		t.Errorf("readout %q: the name must arrive as text", got)
	}
	if n := eval[int](t, ctx, `document.querySelectorAll("#p-late b").length`); n != 0 {
		t.Errorf("markup from a trace name became elements")
	}

	if v := eval[[]string](t, ctx, `window.zprobe`); len(v) > 0 {
		t.Errorf("page reported problems: %q", v)
	}
}

// TestFormatterMatchesValueFormat holds the script's formatter to
// value.Format on seeded random values across the prefix range and beyond,
// over the whole range of float64 from the smallest subnormal.
func TestFormatterMatchesValueFormat(t *testing.T) {
	ctx := browser(t)
	srv := servePage(t, "", "")
	if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL)); err != nil {
		t.Fatal(err)
	}
	type testCase struct {
		V    float64 `json:"v"`
		Unit string  `json:"u"`
		Sig  int     `json:"s"`
	}
	cases := []testCase{{0, "Ω", 3}, {999.96, "Hz", 4}, {999.5, "Hz", 3}, {1e-15, "F", 3}, {9.9996e-16, "F", 3},
		{1e13, "Ω", 3}, {1e15, "Ω", 3}, {-2.5e-12, "F", 3}, {12345, "", 3}, {1, "", 3}, {math.Inf(1), "Ω", 3},
		{0.15, "", 1}, {1.005, "", 3}, {300, "Hz", 1},
		// The subnormals and the ends of the range.
		{math.SmallestNonzeroFloat64, "Hz", 4}, {1e-320, "Hz", 4}, {1e-320, "Hz", 6}, {math.Float64frombits(0x000fffffffffffff), "Hz", 3},
		{0x1p-1022, "Hz", 3}, {math.MaxFloat64, "Ω", 4}, {math.MaxFloat64, "Ω", 1}}
	rng := rand.New(rand.NewPCG(1, 1))
	units := []string{"Ω", "Hz", "", "S"}
	for i := range 3000 {
		v := math.Pow(10, -20+40*rng.Float64())
		switch {
		case i%3 == 0: // anywhere in the range of float64, the subnormals too
			v = math.Float64frombits(1 + rng.Uint64N(0x7ff0000000000000-1))
		case rng.IntN(5) == 0: // round numbers, where rounding edges live
			v = math.Round(v/math.Pow10(int(math.Floor(math.Log10(math.Abs(v))))-2)) * math.Pow10(int(math.Floor(math.Log10(math.Abs(v))))-2)
		}
		if rng.IntN(4) == 0 {
			v = -v
		}
		cases = append(cases, testCase{v, units[rng.IntN(len(units))], 1 + rng.IntN(6)})
	}
	enc := make([][3]any, len(cases))
	for i, c := range cases {
		v := any(c.V)
		if math.IsInf(c.V, 0) {
			v = "Infinity"
		}
		enc[i] = [3]any{v, c.Unit, c.Sig}
	}
	js, _ := json.Marshal(enc)
	got := eval[[]string](t, ctx, `(`+string(js)+`).map(function (c) { return zportPlotHover.formatValue(Number(c[0]), c[1], c[2]); })`)
	bad := 0
	for i, c := range cases {
		if want := value.Format(c.V, c.Unit, c.Sig); got[i] != want {
			if bad++; bad <= 10 {
				t.Errorf("formatValue(%v, %q, %d) = %q, value.Format gives %q", c.V, c.Unit, c.Sig, got[i], want)
			}
		}
	}
	if bad > 10 {
		t.Errorf("… %d mismatches in all", bad)
	}
}

// TestSampleDark renders the sample charts on a dark page that themes them
// through the custom properties, for a look at the PNG (-sample only).
func TestSampleDark(t *testing.T) {
	if *sample == "" {
		t.Skip("no -sample path")
	}
	ctx := browser(t)
	c := bode400x4()
	c.Traces = c.Traces[:3]
	theme := `body{margin:8px;background:#16191d;color:#d8dde3;--zplot-bg:#16191d;` +
		`--trace-z:#6aaee8;--trace-z0:#f0a060;--trace-t:#6fcf97}`
	srv := servePage(t, c.SVG(), theme)
	if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL), chromedp.WaitVisible("#p-out"), chromedp.Focus("#p-out"),
		chromedp.KeyEvent(kb.PageUp), chromedp.KeyEvent(kb.PageUp)); err != nil {
		t.Fatal(err)
	}
	shot(t, ctx, *sample+"-dark.png")
}

func shot(t *testing.T, ctx context.Context, path string) {
	t.Helper()
	png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	fmt.Fprintln(os.Stderr, "wrote", path)
}
