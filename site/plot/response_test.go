package plot

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// stepSample is a second-order step, ζ = 0.3, ωn = 2π·1 MHz (REFERENCES
// §8), on 500 points over 5 µs.
func stepSample() *Time {
	const z, wn = 0.3, 2 * math.Pi * 1e6
	wd := wn * math.Sqrt(1-z*z)
	t := make([]float64, 500)
	y := make([]float64, 500)
	for i := range t {
		t[i] = float64(i) * 5e-6 / 499
		y[i] = 1 - math.Exp(-z*wn*t[i])*(math.Cos(wd*t[i])+z/math.Sqrt(1-z*z)*math.Sin(wd*t[i]))
	}
	return &Time{ID: "s", Title: "Step response", Time: t, Series: []Series{{Name: "step", Class: "g", Values: y}},
		YLabel: "Step (V/V)", HLines: []HLine{{Value: 1, Label: "final 1"}}, Markers: []Marker{{Freq: 1.6e-6, Label: "peak"}}}
}

// Every sample of a time chart lies on its line, inside the plot area,
// where the data attributes the readout uses put it.
func TestTimePointsLieOnTheAxes(t *testing.T) {
	c := stepSample()
	root := parse(t, c.SVG())
	if !root.hasClass("zplot-time") {
		t.Fatalf("root classes %q", root.attr["class"])
	}
	x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
	ya := attrFloats(t, root, "data-y")
	tm := attrFloats(t, root, "data-time")
	t0, t1 := attrFloats(t, root, "data-tmin")[0], attrFloats(t, root, "data-tmax")[0]
	paths := root.all(func(n *node) bool { _, ok := n.attr["data-values"]; return ok && n.name == "path" })
	if len(paths) != 1 || paths[0].attr["data-name"] != "step" {
		t.Fatalf("%d traces with data, want the step", len(paths))
	}
	vals := attrFloats(t, paths[0], "data-values")
	subs := pathPoints(t, paths[0].attr["d"])
	if len(subs) != 1 || len(vals) != len(tm) {
		t.Fatalf("%d subpaths, %d values for %d times", len(subs), len(vals), len(tm))
	}
	worst := 0.0
	for i := range tm {
		p := [2]float64{x0 + (tm[i]-t0)/(t1-t0)*(x1-x0), ya[1] + (vals[i]-ya[2])/(ya[3]-ya[2])*(ya[0]-ya[1])}
		worst = max(worst, distToPolyline(p, subs[0]))
	}
	if worst > 0.15 {
		t.Errorf("a sample lies %.3f px off the line", worst)
	}
	for _, q := range subs[0] {
		if q[0] < x0-0.05 || q[0] > x1+0.05 || q[1] < ya[0]-0.05 || q[1] > ya[1]+0.05 {
			t.Fatalf("point %v outside the plot area", q)
		}
	}
	// Ratios are labelled without prefixes, the time axis with them.
	ticks := strings.Join(root.texts("tick"), " ")
	for _, want := range []string{"0.5", "1.0", "1 µs", "5 µs"} {
		if !strings.Contains(ticks, want) {
			t.Errorf("tick labels %q lack %q", ticks, want)
		}
	}
	if strings.Contains(ticks, "500m") {
		t.Errorf("a ratio labelled with a prefix: %q", ticks)
	}
	if first, again := c.SVG(), c.SVG(); first != again {
		t.Error("two renderings differ")
	}
}

// Text a user typed stays text; empty and broken input draws empty axes.
func TestTimeEscapingAndEmpty(t *testing.T) {
	c := &Time{Title: `<script>"x"</script>`, Series: []Series{{Name: "a&b", Values: []float64{math.NaN(), math.Inf(1)}}},
		Time: []float64{0, 1}, HLines: []HLine{{Value: math.NaN(), Label: "<b>"}}}
	s := c.SVG()
	root := parse(t, s)
	if strings.Contains(s, "<script>") || strings.Contains(s, "<b>") {
		t.Errorf("markup reached the SVG: %s", clip(s))
	}
	if notes := root.all(byClass("text", "note")); len(notes) != 1 || notes[0].text != "no finite values" {
		t.Error("no note for a chart without finite values")
	}
	parse(t, (&Time{}).SVG())
}

// The Nyquist chart's radius: 0 at T = 0, one third at |T| = 1, the rim
// at 10⁶ and beyond, monotonic; points lie at their compressed radius and
// true angle, −1 is marked where it belongs.
func TestNyquist(t *testing.T) {
	for _, c := range []struct{ mag, r float64 }{
		{0, 0}, {1, math.Log10(1001) / math.Log10(1+1e9)}, {1e6, 1}, {1e9, 1},
	} {
		if got := NyquistRadius(c.mag); math.Abs(got-c.r) > 1e-15 {
			t.Errorf("NyquistRadius(%g) = %g, want %g", c.mag, got, c.r)
		}
	}
	if r := NyquistRadius(1); math.Abs(r-1.0/3) > 1e-4 {
		t.Errorf("the unit circle at %g of the radius, want about a third", r)
	}
	f := logspace(10, 1e9, 400)
	T := threePole(f, 1e4, 100, 1e6, 1e7)
	c := &Nyquist{ID: "n", Title: "Nyquist", Name: "T of E1", Freq: f, T: T,
		Points: []Point{{Value: -0.0909, Label: "GM 20.8 dB", Class: "gm"}}}
	root := parse(t, c.SVG())
	cx, cy, R := attrFloats(t, root, "data-cx")[0], attrFloats(t, root, "data-cy")[0], attrFloats(t, root, "data-r")[0]
	var curve *node
	for _, p := range root.all(byName("path")) {
		if _, ok := p.attr["data-values"]; ok {
			curve = p
		}
	}
	if curve == nil || curve.attr["data-name"] != "T of E1" {
		t.Fatal("no curve with hover data")
	}
	vals := attrFloats(t, curve, "data-values")
	subs := pathPoints(t, curve.attr["d"])
	worst := 0.0
	for i := range f {
		r := NyquistRadius(vals[2*i]) * R
		a := vals[2*i+1] * math.Pi / 180
		p := [2]float64{cx + r*math.Cos(a), cy - r*math.Sin(a)}
		d := math.Inf(1)
		for _, s := range subs {
			d = min(d, distToPolyline(p, s))
		}
		worst = max(worst, d)
		if got := cmplx.Abs(T[i]); math.Abs(vals[2*i]/got-1) > 5.01e-6 {
			t.Fatalf("point %d: |T| %g in the data, %g given", i, vals[2*i], got)
		}
	}
	if worst > 0.15 {
		t.Errorf("a point lies %.3f px off the curve", worst)
	}
	cross := root.all(byClass("path", "minus-one"))
	if len(cross) != 1 {
		t.Fatal("no −1 mark")
	}
	pts := pathPoints(t, cross[0].attr["d"])
	mid := [2]float64{(pts[0][0][0] + pts[0][1][0]) / 2, (pts[0][0][1] + pts[0][1][1]) / 2}
	if want := [2]float64{cx - NyquistRadius(1)*R, cy}; math.Hypot(mid[0]-want[0], mid[1]-want[1]) > 0.1 {
		t.Errorf("−1 marked at %v, want %v", mid, want)
	}
	dots := root.all(byClass("circle", "point-gm"))
	if len(dots) != 1 {
		t.Fatal("no gain-margin point")
	}
	x, y := attrFloats(t, dots[0], "cx")[0], attrFloats(t, dots[0], "cy")[0]
	if want := cx - NyquistRadius(0.0909)*R; math.Abs(x-want) > 0.06 || math.Abs(y-cy) > 0.06 {
		t.Errorf("gain-margin point at (%g, %g), want (%g, %g)", x, y, want, cy)
	}
	desc := root.all(byName("desc"))[0].text
	if !strings.Contains(desc, "log10(1 + |T|/0.001)") || !strings.Contains(desc, "GM 20.8 dB") {
		t.Errorf("desc %q does not state the compression and the points", desc)
	}
	parse(t, (&Nyquist{Name: "<x>", T: []complex128{cmplx.NaN()}, Freq: []float64{1}}).SVG())
}

// A Bode chart without its phase panel: no phase paths, no data-py, the
// magnitude panel down to the frequency labels.
func TestBodeNoPhase(t *testing.T) {
	c := bode400x4()
	c.NoPhase = true
	root := parse(t, c.SVG())
	if _, ok := root.attr["data-py"]; ok {
		t.Error("data-py on a chart without a phase panel")
	}
	mag, ph := tracePaths(root)
	if len(mag) != 4 || len(ph) != 0 {
		t.Errorf("%d magnitude and %d phase paths, want 4 and 0", len(mag), len(ph))
	}
	my := attrFloats(t, root, "data-my")
	if my[1] < 300 {
		t.Errorf("the magnitude panel ends at %g px, want it to fill the chart", my[1])
	}
	if desc := root.all(byName("desc"))[0].text; strings.Contains(desc, "phase") {
		t.Errorf("desc %q speaks of a phase", desc)
	}
}
