package plot

import (
	"math"
	"strings"
	"testing"
)

// curveSample is the phase margin of the ideal two-pole transimpedance
// loop against Cf (Rf = 1 MΩ, Ci = 20 pF, gbw = 10 MHz: REFERENCES.md §5's
// loop, closed form [derived]) over 0.1 … 10 pF, with the 45° target and
// a point on it.
func curveSample() *Curve {
	const rf, ci, wt = 1e6, 20e-12, 2 * math.Pi * 10e6
	pm := func(cf float64) float64 {
		t1, t2 := rf*cf, rf*(ci+cf)
		b := 1 - wt*wt*t1*t1
		w := math.Sqrt((-b + math.Sqrt(b*b+4*t2*t2*wt*wt)) / (2 * t2 * t2))
		return 90 + (math.Atan(w*t1)-math.Atan(w*t2))*180/math.Pi
	}
	x := logspace(0.1e-12, 10e-12, 37)
	y := make([]float64, len(x))
	for i := range x {
		y[i] = pm(x[i])
	}
	return &Curve{ID: "c", Title: "Phase margin against Cf", X: x, XUnit: "F", XLabel: "Cf",
		Series: []Series{{Name: "phase margin", Values: y}}, Unit: "°", YLabel: "Phase margin (°)",
		HLines: []HLine{{Value: 45, Label: "target 45°"}}, Markers: []Marker{{Freq: 1e-12, Label: "as given"}},
		Points: []Mark{{X: 0.3e-12, Y: pm(0.3e-12), Label: "Cf = 300 fF", Class: "solution"}}}
}

// Every value lies on its line where the data attributes the readout uses
// put it; the axes carry the part's and the quantity's units; marks and
// reference lines are drawn.
func TestCurvePointsLieOnTheAxes(t *testing.T) {
	c := curveSample()
	root := parse(t, c.SVG())
	if !root.hasClass("zplot-curve") || root.attr["data-xunit"] != "F" || root.attr["data-xname"] != "Cf" || root.attr["data-unit"] != "°" {
		t.Fatalf("root %v", root.attr)
	}
	x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
	ya := attrFloats(t, root, "data-y")
	xs := attrFloats(t, root, "data-curve")
	l0, l1 := math.Log10(attrFloats(t, root, "data-xmin")[0]), math.Log10(attrFloats(t, root, "data-xmax")[0])
	paths := root.all(func(n *node) bool { _, ok := n.attr["data-values"]; return ok && n.name == "path" })
	if len(paths) != 1 || paths[0].attr["data-name"] != "phase margin" {
		t.Fatalf("%d traces with data", len(paths))
	}
	vals := attrFloats(t, paths[0], "data-values")
	subs := pathPoints(t, paths[0].attr["d"])
	if len(subs) != 1 || len(vals) != len(xs) || len(xs) != 37 {
		t.Fatalf("%d subpaths, %d values for %d x", len(subs), len(vals), len(xs))
	}
	worst := 0.0
	for i := range xs {
		p := [2]float64{x0 + (math.Log10(xs[i])-l0)/(l1-l0)*(x1-x0), ya[1] + (vals[i]-ya[2])/(ya[3]-ya[2])*(ya[0]-ya[1])}
		worst = max(worst, distToPolyline(p, subs[0]))
	}
	if worst > 0.15 {
		t.Errorf("a value lies %.3f px off the line", worst)
	}
	ticks := strings.Join(root.texts("tick"), " ")
	for _, want := range []string{"1 pF", "10 pF", "°"} {
		if !strings.Contains(ticks, want) {
			t.Errorf("tick labels %q lack %q", ticks, want)
		}
	}
	if len(root.all(byClass("circle", "point-solution"))) != 1 || len(root.all(byClass("path", "hline"))) != 1 || len(root.all(byClass("path", "marker"))) != 1 {
		t.Error("the point, the target line or the marker is missing")
	}
	if first, again := c.SVG(), c.SVG(); first != again {
		t.Error("two renderings differ")
	}
}

// A log value axis for magnitudes, a negative part drawn by its
// magnitude with signed labels, escaped text, and empty input.
func TestCurveLogNegativeEscapedEmpty(t *testing.T) {
	c := &Curve{X: []float64{-1e3, -1e4, -1e5}, XUnit: "", XLabel: `<g>`, YLog: true, Unit: "Ω",
		Series: []Series{{Name: "|Z| & co", Values: []float64{10, 1e3, -1}}}}
	s := c.SVG()
	root := parse(t, s)
	if root.attr["data-yscale"] != "log" || strings.Contains(s, "<g>") {
		t.Errorf("yscale %q, or markup reached the SVG", root.attr["data-yscale"])
	}
	ticks := strings.Join(root.texts("tick"), " ")
	if !strings.Contains(ticks, "−10k") || !strings.Contains(ticks, "Ω") {
		t.Errorf("tick labels %q: want signed part values and ohms", ticks)
	}
	// The negative value on a log axis is a gap: two points drawn.
	path := root.all(func(n *node) bool { _, ok := n.attr["data-values"]; return ok })[0]
	if n := len(pathPoints(t, path.attr["d"])[0]); n != 2 {
		t.Errorf("%d points drawn, want 2", n)
	}
	// A quantity that is 0 over the whole range (a step without
	// overshoot) describes itself without a tick step to go by.
	flat := &Curve{X: []float64{1, 10, 100}, Unit: "%", Series: []Series{{Name: "overshoot", Values: []float64{0, 0, 0}}}}
	if d := parse(t, flat.SVG()).all(byName("desc")); len(d) != 1 || !strings.Contains(d[0].text, "overshoot: 0 %") {
		t.Errorf("description of a flat curve: %v", d)
	}
	if got := linLabel(0, 0); got != "0" {
		t.Errorf("linLabel(0, 0) = %q", got)
	}
	empty := parse(t, (&Curve{}).SVG())
	if notes := empty.all(byClass("text", "note")); len(notes) != 1 {
		t.Error("no note on an empty chart")
	}
}
