package plot

import (
	"io"
	"math"
	"strconv"

	"zport/engine/value"
)

// Series is one real-valued trace of a Time chart.
type Series struct {
	Name   string    // legend label
	Class  string    // CSS class suffix, as for Trace
	Values []float64 // one per time; NaN or Inf leaves a gap
	Dashed bool
	// Dash, when set, is the trace's own stroke-dasharray (a pinned
	// design's line style; see Trace.Dash).
	Dash string
}

// Time is a single-panel chart of real values against time on linear
// axes, such as a step response. HLines draw horizontal reference lines
// (Value in Unit; Panel is ignored), such as the final value and a
// settling band; Markers draw labelled vertical lines at times (Freq holds
// the time in seconds). The zero value is usable; it draws empty axes.
type Time struct {
	ID     string
	Title  string
	Time   []float64 // seconds, ascending; non-finite times are skipped
	Series []Series
	// Unit is the values' unit for the tick labels and readout ("" for a
	// ratio, "Ω" …); YLabel titles the vertical axis.
	Unit    string
	YLabel  string
	HLines  []HLine
	Markers []Marker
	Width   int // pixels; default 640
	Height  int // pixels; default 320
	NoStyle bool
}

// SVG returns the chart as a standalone SVG document fragment.
func (c *Time) SVG() string { return string(c.AppendSVG(nil)) }

// WriteTo writes the chart's SVG to w.
func (c *Time) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(c.AppendSVG(nil))
	return int64(n), err
}

// AppendSVG appends the chart's SVG to dst and returns the extended slice.
func (c *Time) AppendSVG(dst []byte) []byte {
	W, H := size(c.Width, c.Height, 640, 320, 320, 200)
	id := cleanID(c.ID, "ztime")
	n := len(c.Time)
	nan := math.NaN()

	// The ranges: time from the first to the last finite time, values
	// over every finite sample and reference line, padded 5 %.
	t0, t1 := math.Inf(1), math.Inf(-1)
	for _, t := range c.Time {
		if finiteF(t) {
			t0, t1 = min(t0, t), max(t1, t)
		}
	}
	if !(t1 > t0) {
		t0, t1 = 0, 1
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	finite := 0
	for _, s := range c.Series {
		for i, v := range s.Values {
			if i < n && finiteF(v) && finiteF(c.Time[i]) {
				lo, hi = min(lo, v), max(hi, v)
				finite++
			}
		}
	}
	for _, h := range c.HLines {
		if finiteF(h.Value) {
			lo, hi = min(lo, h.Value), max(hi, h.Value)
		}
	}
	switch {
	case lo > hi:
		lo, hi = 0, 1
	case hi-lo <= 1e-12*max(math.Abs(lo), math.Abs(hi)):
		d := max(math.Abs(lo)*0.1, 1e-12)
		lo, hi = lo-d, hi+d
	}
	if pad := 0.05 * (hi - lo); finiteF(lo-pad) && finiteF(hi+pad) {
		lo, hi = lo-pad, hi+pad
	}

	// Layout: title, legend, the panel, time labels.
	names := make([]string, len(c.Series))
	for i := range c.Series {
		names[i] = c.Series[i].Name
	}
	titleLines, titleY, items, legendY, y := layoutHead(c.Title, names, W)
	top := y + 6
	bottom := H - 40

	ya := axis{p0: bottom, p1: top}
	ya.ticks = linearTicks(lo, hi, bottom-top, c.Unit)
	if len(ya.ticks) > 1 {
		lo = min(lo, ya.ticks[0].pos)
		hi = max(hi, ya.ticks[len(ya.ticks)-1].pos)
	}
	ya.lo, ya.hi = lo, hi
	x0 := plotLeft(ya.ticks)
	x1 := W - 16
	xa := axis{lo: t0, hi: t1, p0: x0, p1: x1}
	xa.ticks = engTicks(t0, t1, x1-x0, "s")
	if over := overhang(&xa, W); over > 0 {
		x1 -= over
		xa.p1 = x1
		xa.ticks = engTicks(t0, t1, x1-x0, "s")
	}

	xt := make([]int, 3*n)
	scratch := xt[n:]
	xt = xt[:n]
	for i, t := range c.Time {
		if finiteF(t) {
			xt[i] = tenths(xa.px(t))
		}
	}

	b := dst
	if b == nil {
		b = make([]byte, 0, 4096+n*(12+len(c.Series)*20))
	}
	b = appendSVGStart(b, "zplot-time", id, W, H)
	b = append(b, ` data-time="`...)
	for i, t := range c.Time {
		if i > 0 {
			b = append(b, ' ')
		}
		b = appendSig6(b, t)
	}
	b = append(b, `" data-tmin="`...)
	b = appendSig6(b, t0)
	b = append(b, `" data-tmax="`...)
	b = appendSig6(b, t1)
	b = append(b, '"')
	b = appendAttrPx(b, "data-x0", x0)
	b = appendAttrPx(b, "data-x1", x1)
	b = appendRange(b, "data-y", top, bottom, lo, hi)
	b = appendAttr(b, "data-unit", c.Unit)
	b = append(b, '>')
	title := c.Title
	if title == "" {
		title = "Time chart"
	}
	b = appendTitleDesc(b, id, title, c.describe(t0, t1, finite))
	b = appendStyle(b, c.NoStyle)

	b = appendFrame(b, &xa, &ya, x0, x1, top, bottom)
	if c.YLabel != "" {
		b = appendVText(b, 18, (top+bottom)/2, c.YLabel)
	}
	b = appendText(b, ` class="axis-title" text-anchor="middle"`, (x0+x1)/2, H-8, "", "Time")

	var labels []byte
	for _, h := range c.HLines {
		if !finiteF(h.Value) || !ya.in(h.Value) {
			continue
		}
		b, labels = appendRefLine(b, labels, h, x0, x1, ya.px(h.Value), top)
	}
	slot := 0
	for _, m := range c.Markers {
		if !finiteF(m.Freq) || !xa.in(m.Freq) {
			continue
		}
		x := xa.px(m.Freq)
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
	ys := make([]float64, n)
	classes := make([]series, len(c.Series))
	for k := range c.Series {
		s := &c.Series[k]
		classes[k].class = seriesClass(s.Class, k)
		for i := range ys {
			ys[i] = nan
			if i < len(s.Values) && finiteF(s.Values[i]) && finiteF(c.Time[i]) {
				ys[i] = s.Values[i]
			}
		}
		b = appendTraceOpen(b, classes[k].class, &Trace{Dashed: s.Dashed, Dash: s.Dash})
		b = appendAttr(b, "data-name", s.Name)
		b = append(b, ` data-values="`...)
		for i := range n {
			if i > 0 {
				b = append(b, ' ')
			}
			b = appendSig6(b, ys[i])
		}
		b = append(b, `" d="`...)
		b = appendLine(b, xt, ys, &ya, scratch)
		b = append(b, `"/>`...)
	}
	b = append(b, `</g>`...)
	b = appendLabelsTitle(b, labels, titleLines, titleY)
	if len(items) > 0 {
		traces := make([]Trace, len(c.Series))
		for k, s := range c.Series {
			traces[k] = Trace{Name: s.Name, Dashed: s.Dashed}
		}
		b = appendLegend(b, traces, classes, items, legendY)
	}
	if finite == 0 {
		b = appendText(b, ` class="note" text-anchor="middle"`, (x0+x1)/2, (top+bottom)/2, ".35em", "no finite values")
	}
	return append(b, "</svg>"...)
}

// seriesClass is the class attribute of a trace: as traceClass.
func seriesClass(class string, k int) string {
	return traceClass(&Trace{Class: class}, k)
}

func finiteF(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// linearTicks returns labelled ticks at 1-2-5 steps across [lo, hi] on a
// vertical axis of px pixels, about 32 px apart, labelled by value.Format
// in unit with the digits the step needs.
func linearTicks(lo, hi, px float64, unit string) []tick {
	step := niceStep(hi-lo, max(2, int(px/32)))
	var ticks []tick
	for i := math.Ceil(lo/step - eps); i*step <= hi+eps*step && len(ticks) < 100; i++ {
		v := i * step
		label := engLabel(v, step, unit)
		if unit == "" { // a ratio reads best without prefixes: 0.5, not 500m
			label = linLabel(v, step)
		}
		ticks = append(ticks, tick{pos: v, label: label, major: true})
	}
	return ticks
}

// describe writes the text of the chart's <desc>.
func (c *Time) describe(t0, t1 float64, finite int) string {
	b := []byte("Time chart from ")
	b = append(b, value.Format(t0, "s", 3)...)
	b = append(b, " to "...)
	b = append(b, value.Format(t1, "s", 3)...)
	b = append(b, ", "...)
	b = strconv.AppendInt(b, int64(len(c.Time)), 10)
	b = append(b, " points."...)
	for _, s := range c.Series {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, v := range s.Values {
			if finiteF(v) {
				lo, hi = min(lo, v), max(hi, v)
			}
		}
		b = append(b, ' ')
		b = append(b, s.Name...)
		if lo > hi {
			b = append(b, ": no finite values."...)
			continue
		}
		b = append(b, ": "...)
		b = appendSpan(b, value.Format(lo, c.Unit, 3), value.Format(hi, c.Unit, 3))
		b = append(b, '.')
	}
	if finite == 0 && len(c.Series) == 0 {
		b = append(b, " No traces."...)
	}
	b = appendLabels(b, " Marker: ", len(c.Markers), func(i int) string { return c.Markers[i].Label })
	b = appendLabels(b, " Reference line: ", len(c.HLines), func(i int) string { return c.HLines[i].Label })
	return string(b)
}
