//go:build !js

package plot

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"zport/engine/value"
)

// The readout of a time chart and of a Nyquist chart, by pointer and by
// keyboard, says what the chart's data say at the point the cursor is on.
func TestHoverTimeAndNyquist(t *testing.T) {
	ctx := browser(t)
	st := stepSample()
	st.NoStyle = true
	f := logspace(10, 1e9, 200)
	ny := &Nyquist{ID: "ny", Name: "T", Freq: f, T: threePole(f, 1e4, 100, 1e6, 1e7), NoStyle: true}
	srv := servePage(t, st.SVG()+ny.SVG(), "body{margin:0;font:14px sans-serif}")
	if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL), chromedp.WaitVisible("#ny")); err != nil {
		t.Fatal(err)
	}

	// Time chart: the pointer over sample 100, then one arrow to the right.
	root := parse(t, st.SVG())
	tm := attrFloats(t, root, "data-time")
	x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
	vals := attrFloats(t, root.all(func(n *node) bool { _, ok := n.attr["data-values"]; return ok })[0], "data-values")
	box := eval[[]float64](t, ctx, `(function () { var r = document.querySelector("#s").getBoundingClientRect(); return [r.left, r.top]; })()`)
	xi := x0 + tm[100]/tm[len(tm)-1]*(x1-x0)
	if err := chromedp.Do(ctx, chromedp.MouseEvent(input.DispatchMouseEventTypeMouseMoved, box[0]+xi, box[1]+150)); err != nil {
		t.Fatal(err)
	}
	want := func(i int) string {
		return "t = " + value.Format(tm[i], "s", 4) + "|step: " + strconv.FormatFloat(vals[i], 'g', 4, 64)
	}
	if got := strings.Join(readout(t, ctx, "s"), "|"); got != want(100) {
		t.Errorf("time readout %q, want %q", got, want(100))
	}
	if err := chromedp.Do(ctx, chromedp.Focus("#s"), chromedp.KeyEvent(kb.ArrowRight)); err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(readout(t, ctx, "s"), "|"); got != want(101) {
		t.Errorf("time readout after an arrow %q, want %q", got, want(101))
	}

	// Nyquist: the pointer on the curve's point 120 shows that frequency.
	nroot := parse(t, ny.SVG())
	cx, cy, R := attrFloats(t, nroot, "data-cx")[0], attrFloats(t, nroot, "data-cy")[0], attrFloats(t, nroot, "data-r")[0]
	var nv []float64
	for _, p := range nroot.all(byName("path")) {
		if _, ok := p.attr["data-values"]; ok {
			nv = attrFloats(t, p, "data-values")
		}
	}
	i := 120
	r := NyquistRadius(nv[2*i]) * R
	a := nv[2*i+1] * math.Pi / 180
	nb := eval[[]float64](t, ctx, `(function () { var e = document.querySelector("#ny"); e.scrollIntoView(); var r = e.getBoundingClientRect(); return [r.left, r.top]; })()`)
	if err := chromedp.Do(ctx, chromedp.MouseEvent(input.DispatchMouseEventTypeMouseMoved, nb[0]+cx+r*math.Cos(a), nb[1]+cy-r*math.Sin(a))); err != nil {
		t.Fatal(err)
	}
	got := readout(t, ctx, "ny")
	if len(got) != 2 || got[0] != value.Format(f[i], "Hz", 3) || !strings.HasPrefix(got[1], "T: "+value.Format(nv[2*i], "", 3)+"  ∠ ") {
		t.Errorf("Nyquist readout %q at point %d (%s, |T| %g)", got, i, value.Format(f[i], "Hz", 3), nv[2*i])
	}
	if v := eval[[]string](t, ctx, `window.zprobe`); len(v) > 0 {
		t.Errorf("page reported problems: %q", v)
	}
}

// The readout of a curve names the part and its value and gives the
// quantity there, by pointer and by keyboard.
func TestHoverCurve(t *testing.T) {
	ctx := browser(t)
	c := curveSample()
	c.NoStyle = true
	srv := servePage(t, c.SVG(), "body{margin:0;font:14px sans-serif}")
	if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL), chromedp.WaitVisible("#c")); err != nil {
		t.Fatal(err)
	}
	root := parse(t, c.SVG())
	xs := attrFloats(t, root, "data-curve")
	x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
	l0, l1 := math.Log10(xs[0]), math.Log10(xs[len(xs)-1])
	vals := attrFloats(t, root.all(func(n *node) bool { _, ok := n.attr["data-values"]; return ok })[0], "data-values")
	box := eval[[]float64](t, ctx, `(function () { var r = document.querySelector("#c").getBoundingClientRect(); return [r.left, r.top]; })()`)
	xi := x0 + (math.Log10(xs[12])-l0)/(l1-l0)*(x1-x0)
	if err := chromedp.Do(ctx, chromedp.MouseEvent(input.DispatchMouseEventTypeMouseMoved, box[0]+xi, box[1]+150)); err != nil {
		t.Fatal(err)
	}
	want := func(i int) string {
		return "Cf = " + value.Format(xs[i], "F", 4) + "|phase margin: " + strconv.FormatFloat(vals[i], 'f', 2, 64) + "°"
	}
	if got := strings.Join(readout(t, ctx, "c"), "|"); got != want(12) {
		t.Errorf("curve readout %q, want %q", got, want(12))
	}
	if err := chromedp.Do(ctx, chromedp.Focus("#c"), chromedp.KeyEvent(kb.ArrowLeft)); err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(readout(t, ctx, "c"), "|"); got != want(11) {
		t.Errorf("curve readout after an arrow %q, want %q", got, want(11))
	}
	if v := eval[[]string](t, ctx, `window.zprobe`); len(v) > 0 {
		t.Errorf("page reported problems: %q", v)
	}
}
