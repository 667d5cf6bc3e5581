package plot

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// sampleBars is an invented ranking of sensitivities, largest first.
func sampleBars() *Bars {
	return &Bars{ID: "s", Title: "Z at out: ∂ln|Z|/∂ln p", XLabel: "∂ln|Z|/∂ln p",
		Labels: []string{"gbw", "R2", "R1", "ro", "a0", "CL"},
		Values: []float64{-0.9999, 0.82, -0.81, 0.0101, -1e-6, math.NaN()}}
}

func TestBars(t *testing.T) {
	c := sampleBars()
	root := parse(t, c.SVG())
	pos := root.all(byClass("path", "bar-pos"))
	neg := root.all(byClass("path", "bar-neg"))
	if len(pos) != 2 || len(neg) != 3 {
		t.Fatalf("%d positive and %d negative bars, want 2 and 3 (NaN gets none)", len(pos), len(neg))
	}
	// Every bar starts at the zero line: positive bars extend right of it,
	// negative ones left, and longer for a larger value.
	x := func(n *node) (x0, x1 float64) {
		pts := pathPoints(t, n.attr["d"])[0]
		x0, x1 = math.Inf(1), math.Inf(-1)
		for _, p := range pts {
			x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
		}
		return
	}
	p0l, p0r := x(pos[0])
	n0l, n0r := x(neg[0])
	if math.Abs(p0l-n0r) > 0.11 {
		t.Errorf("bars do not share a zero line: positive starts at %v, negative ends at %v", p0l, n0r)
	}
	n1l, _ := x(neg[1])
	p1l, p1r := x(pos[1])
	if !(n0l < n1l) || !(p0r-p0l > p1r-p1l) {
		t.Errorf("bar lengths do not follow the values: %v %v %v %v", n0l, n1l, p0r-p0l, p1r-p1l)
	}
	if w := p1r - p1l; w < 1 {
		t.Errorf("a tiny value's bar is %v px wide: invisible", w)
	}
	labels := root.texts("tick")
	for _, want := range append(slices.Clone(c.Labels), "−1.0", "−0.5", "0.0", "0.5", "1.0") {
		if !slices.Contains(labels, want) {
			t.Errorf("tick label %q missing from %q", want, labels)
		}
	}
	values := root.texts("label")
	for _, want := range []string{"−1", "0.82", "−0.81", "0.0101", "−1e-06", "—"} {
		if !slices.Contains(values, want) {
			t.Errorf("value label %q missing from %q", want, values)
		}
	}
	desc := root.all(byName("desc"))[0].text
	if !strings.HasPrefix(desc, "Bar chart of 6 values: gbw −1; R2 0.82;") {
		t.Errorf("desc %q", desc)
	}
	if got := root.attr["height"]; got != strconv.Itoa(8+22+4+6*22+26+14) {
		t.Errorf("height %s for six rows", got)
	}
}

func TestBarsEscapingAndEmpty(t *testing.T) {
	evil := `<img src=x onerror="alert(1)">`
	c := &Bars{ID: `x" onload="y`, Title: evil, XLabel: evil, Labels: []string{evil}, Values: []float64{1}}
	out := c.SVG()
	if strings.Contains(out, "<img") {
		t.Fatal("markup from a label reached the output")
	}
	root := parse(t, out)
	if root.attr["id"] != "xonloady" {
		t.Errorf("id %q", root.attr["id"])
	}
	for _, n := range root.all(func(*node) bool { return true }) {
		for a := range n.attr {
			if strings.HasPrefix(a, "on") {
				t.Errorf("event handler attribute %q", a)
			}
		}
	}
	empty := parse(t, (&Bars{}).SVG())
	if notes := empty.all(byClass("text", "note")); len(notes) != 1 || notes[0].text != "no data" {
		t.Errorf("empty chart: %v", notes)
	}
	if s := (&Bars{Labels: []string{"a", "b"}, Values: []float64{0, 0}}).SVG(); !strings.Contains(s, "</svg>") {
		t.Error("all-zero chart")
	}
}

// A log histogram places bins equal in ratio evenly and labels decades.
func TestHistogramLog(t *testing.T) {
	edges := []float64{1e3, 1e4, 1e5, 1e6, 1e7}
	h := &Histogram{ID: "l", Unit: "Ω", Edges: edges, Counts: []int{1, 2, 3, 4}, Log: true,
		Markers: []Marker{{Freq: 3e5, Label: "nominal"}, {Freq: -1, Label: "below zero"}}}
	root := parse(t, h.SVG())
	pts := pathPoints(t, root.all(byClass("path", "bar"))[0].attr["d"])
	var widths []float64
	for _, bar := range pts {
		x0, x1 := math.Inf(1), math.Inf(-1)
		for _, p := range bar {
			x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
		}
		widths = append(widths, x1-x0)
	}
	for _, w := range widths {
		if math.Abs(w-widths[0]) > 0.2 {
			t.Errorf("bins equal in ratio have widths %v on a log axis", widths)
			break
		}
	}
	labels := root.texts("tick")
	for _, want := range []string{"10 kΩ", "100 kΩ", "1 MΩ"} {
		if !slices.Contains(labels, want) {
			t.Errorf("tick label %q missing from %q", want, labels)
		}
	}
	if n := len(root.all(byClass("path", "marker"))); n != 1 {
		t.Errorf("%d markers drawn, want 1 (one is not above 0)", n)
	}
	bad := parse(t, (&Histogram{Edges: []float64{0, 1}, Counts: []int{1}, Log: true}).SVG())
	if notes := bad.all(byClass("text", "note")); len(notes) != 1 || !strings.Contains(notes[0].text, "not above 0 on a log axis") {
		t.Errorf("log histogram from 0: %v", notes)
	}
}

// Degrees take no SI prefix on a histogram axis.
func TestHistogramDegrees(t *testing.T) {
	h := &Histogram{Unit: "°", Edges: []float64{-0.00238, -0.00230, -0.00222}, Counts: []int{5, 7}}
	for _, l := range parse(t, h.SVG()).texts("tick") {
		if strings.Contains(l, "m°") {
			t.Errorf("label %q has a prefix", l)
		}
	}
}
