package plot

import (
	"io"
	"math"
	"strconv"

	"zport/engine/value"
)

// Curve is a chart of a quantity against the value of a part, the part on
// a log axis: the phase margin against a feedback capacitor, |Z| against
// a resistor. HLines draw horizontal reference lines (a target; Value in
// Unit, Panel ignored), Markers vertical ones at values of the part (Freq
// holds the value), and Points mark labelled points (the solutions). A
// part whose values are all negative (a controlled source's gain) is
// drawn on |x|, its labels keeping the sign. The zero value is usable; it
// draws empty axes.
type Curve struct {
	ID    string
	Title string
	// X holds the part's values, of one sign; NaN, Inf and 0 are skipped.
	X []float64
	// XUnit is the part's unit for the axis labels and the readout ("F",
	// "Ω", "" …); XLabel titles the axis and names the part in the
	// readout ("Cf").
	XUnit, XLabel string
	Series        []Series // one value per X; NaN or Inf leaves a gap
	// Unit is the values' unit ("°", "dB", "%", "Ω", "Hz", "" …); YLabel
	// titles the vertical axis. YLog plots the values on a log axis (for
	// magnitudes and frequencies spanning decades); values ≤ 0 then leave
	// gaps.
	Unit, YLabel string
	YLog         bool
	HLines       []HLine
	Markers      []Marker
	Points       []Mark
	Width        int // pixels; default 640
	Height       int // pixels; default 340
	NoStyle      bool
}

// Mark is a labelled point on a Curve at (X, Y), in the chart's units;
// Class gives it class="point point-<Class>".
type Mark struct {
	X, Y  float64
	Label string
	Class string
}

// SVG returns the chart as a standalone SVG document fragment.
func (c *Curve) SVG() string { return string(c.AppendSVG(nil)) }

// WriteTo writes the chart's SVG to w.
func (c *Curve) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(c.AppendSVG(nil))
	return int64(n), err
}

// AppendSVG appends the chart's SVG to dst and returns the extended slice.
func (c *Curve) AppendSVG(dst []byte) []byte {
	W, H := size(c.Width, c.Height, 640, 340, 320, 220)
	id := cleanID(c.ID, "zcurve")
	n := len(c.X)
	nan := math.NaN()
	neg := false
	for _, x := range c.X {
		if x < 0 {
			neg = true
		}
	}

	// The part's axis: log10|x| over the values given.
	lx := make([]float64, n)
	lx0, lx1 := math.Inf(1), math.Inf(-1)
	for i, x := range c.X {
		lx[i] = nan
		if a := math.Abs(x); a > 0 && a <= math.MaxFloat64 {
			lx[i] = math.Log10(a)
			lx0, lx1 = min(lx0, lx[i]), max(lx1, lx[i])
		}
	}
	switch {
	case lx0 > lx1:
		lx0, lx1 = 0, 3
	case lx1-lx0 < 1e-3:
		lx0, lx1 = lx0-0.5, lx1+0.5
	}

	// The values' axis coordinates and their range, with the reference
	// lines and points.
	coord := func(v float64) float64 {
		if !finiteF(v) {
			return nan
		}
		if c.YLog {
			if v <= 0 {
				return nan
			}
			return math.Log10(v)
		}
		return v
	}
	ys := make([][]float64, len(c.Series))
	lo, hi := math.Inf(1), math.Inf(-1)
	finite := 0
	for k, s := range c.Series {
		ys[k] = make([]float64, n)
		for i := range n {
			ys[k][i] = nan
			if i < len(s.Values) && !math.IsNaN(lx[i]) {
				if y := coord(s.Values[i]); !math.IsNaN(y) {
					ys[k][i] = y
					lo, hi = min(lo, y), max(hi, y)
					finite++
				}
			}
		}
	}
	for _, h := range c.HLines {
		if y := coord(h.Value); !math.IsNaN(y) {
			lo, hi = min(lo, y), max(hi, y)
		}
	}
	for _, p := range c.Points {
		if y := coord(p.Y); !math.IsNaN(y) {
			lo, hi = min(lo, y), max(hi, y)
		}
	}

	names := make([]string, len(c.Series))
	for i := range c.Series {
		names[i] = c.Series[i].Name
	}
	titleLines, titleY, items, legendY, y := layoutHead(c.Title, names, W)
	top := y + 6
	bottom := H - 40

	ya := axis{p0: bottom, p1: top}
	if c.YLog {
		if lo > hi {
			lo, hi = nan, nan
		}
		ya.lo, ya.hi = logRange(lo, hi)
		ya.ticks = logTicks(ya.lo, ya.hi, ya.pxPerUnit(), 18, c.Unit)
	} else {
		switch {
		case lo > hi:
			lo, hi = 0, 1
		case hi-lo <= 1e-9*max(math.Abs(lo), math.Abs(hi), 1):
			d := max(math.Abs(lo)*0.1, 1)
			lo, hi = lo-d, hi+d
		}
		if pad := 0.05 * (hi - lo); finiteF(lo-pad) && finiteF(hi+pad) {
			lo, hi = lo-pad, hi+pad
		}
		ya.ticks = linearTicks(lo, hi, bottom-top, c.Unit)
		if len(ya.ticks) > 1 {
			lo = min(lo, ya.ticks[0].pos)
			hi = max(hi, ya.ticks[len(ya.ticks)-1].pos)
		}
		ya.lo, ya.hi = lo, hi
	}
	x0 := plotLeft(ya.ticks)
	x1 := W - 16
	xa := axis{lo: lx0, hi: lx1, p0: x0, p1: x1}
	xTicks := func() []tick {
		ts := logTicks(lx0, lx1, xa.pxPerUnit(), 58, c.XUnit)
		if neg {
			for i := range ts {
				if ts[i].label != "" {
					ts[i].label = "−" + ts[i].label
				}
			}
		}
		return ts
	}
	xa.ticks = xTicks()
	if over := overhang(&xa, W); over > 0 {
		x1 -= over
		xa.p1 = x1
		xa.ticks = xTicks()
	}

	xt := make([]int, 3*n)
	scratch := xt[n:]
	xt = xt[:n]
	for i, l := range lx {
		if !math.IsNaN(l) {
			xt[i] = tenths(xa.px(l))
		}
	}

	b := dst
	if b == nil {
		b = make([]byte, 0, 4096+n*(12+len(c.Series)*20))
	}
	b = appendSVGStart(b, "zplot-curve", id, W, H)
	b = append(b, ` data-curve="`...)
	for i, x := range c.X {
		if i > 0 {
			b = append(b, ' ')
		}
		if math.IsNaN(lx[i]) {
			x = nan
		}
		b = appendSig6(b, x)
	}
	b = append(b, `" data-xmin="`...)
	b = appendSig6(b, math.Pow(10, lx0))
	b = append(b, `" data-xmax="`...)
	b = appendSig6(b, math.Pow(10, lx1))
	b = append(b, '"')
	b = appendAttrPx(b, "data-x0", x0)
	b = appendAttrPx(b, "data-x1", x1)
	b = appendRange(b, "data-y", top, bottom, ya.lo, ya.hi)
	if c.YLog {
		b = append(b, ` data-yscale="log"`...)
	}
	b = appendAttr(b, "data-unit", c.Unit)
	b = appendAttr(b, "data-xunit", c.XUnit)
	b = appendAttr(b, "data-xname", c.XLabel)
	b = append(b, '>')
	title := c.Title
	if title == "" {
		title = "Curve"
	}
	b = appendTitleDesc(b, id, title, c.describe(finite))
	b = appendStyle(b, c.NoStyle)

	b = appendFrame(b, &xa, &ya, x0, x1, top, bottom)
	if c.YLabel != "" {
		b = appendVText(b, 18, (top+bottom)/2, c.YLabel)
	}
	xTitle := c.XLabel
	if xTitle == "" {
		xTitle = "Value"
	}
	if neg {
		xTitle += " (negative: drawn by magnitude)"
	}
	b = appendText(b, ` class="axis-title" text-anchor="middle"`, (x0+x1)/2, H-8, "", xTitle)

	var labels []byte
	for _, h := range c.HLines {
		if y := coord(h.Value); !math.IsNaN(y) && ya.in(y) {
			b, labels = appendRefLine(b, labels, h, x0, x1, ya.px(y), top)
		}
	}
	slot := 0
	for _, m := range c.Markers {
		a := math.Abs(m.Freq)
		if !(a > 0) || !xa.in(math.Log10(a)) {
			continue
		}
		x := xa.px(math.Log10(a))
		b = append(b, `<path class="marker`...)
		b = appendClassSuffix(b, "marker-", m.Class)
		b = append(b, `" fill="none" stroke="currentColor" stroke-dasharray="3 3" d="`...)
		b = appendVLine(b, tenths(x), tenths(top), tenths(bottom))
		b = append(b, `"/>`...)
		if m.Label != "" {
			labels = appendMarkerLabel(labels, x, x0, x1, bottom-8-13*float64(slot%4), m.Label)
			slot++
		}
	}

	b = append(b, `<g class="traces" fill="none" stroke="currentColor" stroke-width="1.75" stroke-linejoin="round" stroke-linecap="round">`...)
	classes := make([]series, len(c.Series))
	for k := range c.Series {
		s := &c.Series[k]
		classes[k].class = seriesClass(s.Class, k)
		b = appendTraceOpen(b, classes[k].class, &Trace{Dashed: s.Dashed, Dash: s.Dash})
		b = appendAttr(b, "data-name", s.Name)
		b = append(b, ` data-values="`...)
		for i := range n {
			if i > 0 {
				b = append(b, ' ')
			}
			v := nan
			if !math.IsNaN(ys[k][i]) {
				v = s.Values[i]
			}
			b = appendSig6(b, v)
		}
		b = append(b, `" d="`...)
		b = appendLine(b, xt, ys[k], &ya, scratch)
		b = append(b, `"/>`...)
	}
	b = append(b, `</g>`...)

	var placed [][3]float64 // the labels placed: x from, x to, baseline
	for _, p := range c.Points {
		a, y := math.Abs(p.X), coord(p.Y)
		if !(a > 0) || math.IsNaN(y) || !xa.in(math.Log10(a)) || !ya.in(y) {
			continue
		}
		px, py := xa.px(math.Log10(a)), ya.px(y)
		b = append(b, `<circle class="point`...)
		b = appendClassSuffix(b, "point-", p.Class)
		b = append(b, `" r="4" fill="currentColor" stroke="none"`...)
		b = appendAttrPx(b, "cx", px)
		b = appendAttrPx(b, "cy", py)
		b = append(b, `/>`...)
		if p.Label != "" {
			// Above the point, else below, else a line further out: the
			// first place inside the plot that no earlier label takes (two
			// points close together, a target met twice, keep theirs
			// apart).
			w := textWidth(p.Label, 11)
			lx0, lx1 := px+4, px+4+w // appendMarkerLabel's placement
			if px-x0 > x1-px {
				lx0, lx1 = px-4-w, px-4
			}
			ly := py - 8
			for _, cand := range []float64{py - 8, py + 16, py - 21, py + 29, py - 34, py + 42} {
				if cand-10 < top || cand+3 > bottom {
					continue
				}
				free := true
				for _, r := range placed {
					if lx0 < r[1] && r[0] < lx1 && math.Abs(cand-r[2]) < 12 {
						free = false
					}
				}
				if free {
					ly = cand
					break
				}
			}
			placed = append(placed, [3]float64{lx0, lx1, ly})
			labels = appendMarkerLabel(labels, px, x0, x1, ly, p.Label)
		}
	}
	b = appendLabelsTitle(b, labels, titleLines, titleY)
	if len(items) > 0 {
		traces := make([]Trace, len(c.Series))
		for k, s := range c.Series {
			traces[k] = Trace{Name: s.Name, Dashed: s.Dashed, Dash: s.Dash}
		}
		b = appendLegend(b, traces, classes, items, legendY)
	}
	if finite == 0 {
		b = appendText(b, ` class="note" text-anchor="middle"`, (x0+x1)/2, (top+bottom)/2, ".35em", "no finite values")
	}
	return append(b, "</svg>"...)
}

// describe writes the text of the chart's <desc>.
func (c *Curve) describe(finite int) string {
	name := c.XLabel
	if name == "" {
		name = "the value"
	}
	b := []byte("Chart against " + name)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range c.X {
		if finiteF(x) && x != 0 {
			lo, hi = min(lo, x), max(hi, x)
		}
	}
	if lo <= hi {
		b = append(b, " from "...)
		b = append(b, value.Format(lo, c.XUnit, 3)...)
		b = append(b, " to "...)
		b = append(b, value.Format(hi, c.XUnit, 3)...)
		b = append(b, " on a log scale"...)
	}
	b = append(b, ", "...)
	b = strconv.AppendInt(b, int64(len(c.X)), 10)
	b = append(b, " points."...)
	for _, s := range c.Series {
		slo, shi := math.Inf(1), math.Inf(-1)
		for _, v := range s.Values {
			if finiteF(v) {
				slo, shi = min(slo, v), max(shi, v)
			}
		}
		b = append(b, ' ')
		b = append(b, s.Name...)
		if slo > shi {
			b = append(b, ": no finite values."...)
			continue
		}
		b = append(b, ": "...)
		b = appendSpan(b, valueText(slo, c.Unit), valueText(shi, c.Unit))
		b = append(b, '.')
	}
	if finite == 0 && len(c.Series) == 0 {
		b = append(b, " No traces."...)
	}
	b = appendLabels(b, " Reference line: ", len(c.HLines), func(i int) string { return c.HLines[i].Label })
	b = appendLabels(b, " Marker: ", len(c.Markers), func(i int) string { return c.Markers[i].Label })
	b = appendLabels(b, " Point: ", len(c.Points), func(i int) string { return c.Points[i].Label })
	return string(b)
}

// valueText writes a value for a chart's description: four significant
// digits, degrees, decibels and percent without an SI prefix.
func valueText(v float64, unit string) string {
	switch unit {
	case "°":
		return signed(strconv.FormatFloat(v, 'g', 4, 64)) + "°"
	case "dB", "%":
		return signed(strconv.FormatFloat(v, 'g', 4, 64)) + " " + unit
	}
	return value.Format(v, unit, 4)
}
