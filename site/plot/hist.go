package plot

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"zport/engine/numeric"
	"zport/engine/value"
)

// Histogram is a single-panel chart of counts in bins, such as the spread
// of a result over Monte Carlo trials. Bin i spans [Edges[i], Edges[i+1]]
// and holds Counts[i], so len(Edges) = len(Counts)+1. Markers (Freq is the
// x value) draw labelled vertical lines, e.g. percentiles or a target; the
// x range widens to show them. Input that breaks these rules draws empty
// axes with a note saying what is wrong.
type Histogram struct {
	ID      string
	Title   string
	XLabel  string // x axis title, e.g. "Output impedance at 1 kHz"
	Unit    string // unit of the x values for value.Format, e.g. "Ω"
	Edges   []float64
	Counts  []int
	Markers []Marker
	// Log draws the x axis logarithmically, for bins equal in ratio (a
	// spread over decades); every edge must then be above 0, and markers
	// at or below 0 are left out.
	Log     bool
	Width   int // pixels; default 640
	Height  int // pixels; default 320
	NoStyle bool
}

// SVG returns the chart as a standalone SVG document fragment.
func (h *Histogram) SVG() string { return string(h.AppendSVG(nil)) }

// WriteTo writes the chart's SVG to w.
func (h *Histogram) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(h.AppendSVG(nil))
	return int64(n), err
}

// problem returns why the histogram cannot be drawn, or "".
func (h *Histogram) problem() string {
	switch {
	case len(h.Edges) == 0 && len(h.Counts) == 0:
		return "no data"
	case len(h.Edges) != len(h.Counts)+1:
		return fmt.Sprintf("invalid histogram: %d edges for %d counts (need one edge more than counts)", len(h.Edges), len(h.Counts))
	}
	for i, e := range h.Edges {
		if math.IsNaN(e) || math.IsInf(e, 0) {
			return fmt.Sprintf("invalid histogram: edge %d is not finite", i)
		}
		if i > 0 && !(e > h.Edges[i-1]) {
			return fmt.Sprintf("invalid histogram: edge %d is not above edge %d", i, i-1)
		}
		if h.Log && !(e > 0) {
			return fmt.Sprintf("invalid histogram: edge %d is not above 0 on a log axis", i)
		}
	}
	if !numeric.FiniteReal(h.Edges[len(h.Edges)-1] - h.Edges[0]) {
		return "invalid histogram: the edges span more than a float64 can hold"
	}
	for i, c := range h.Counts {
		if c < 0 {
			return fmt.Sprintf("invalid histogram: count %d is negative", i)
		}
	}
	return ""
}

// AppendSVG appends the chart's SVG to dst and returns the extended slice.
func (h *Histogram) AppendSVG(dst []byte) []byte {
	W, H := size(h.Width, h.Height, 640, 320, 240, 160)
	id := cleanID(h.ID, "zhist")
	problem := h.problem()

	// xc is the axis coordinate of a value: log10 of it on a log axis
	// (NaN at or below 0), the value itself on a linear one.
	xc := func(v float64) float64 {
		if h.Log {
			if !(v > 0) {
				return math.NaN()
			}
			return math.Log10(v)
		}
		return v
	}
	lo, hi := 0.0, 1.0
	total, maxC, fullest := 0, 0, -1
	if problem == "" {
		lo, hi = xc(h.Edges[0]), xc(h.Edges[len(h.Edges)-1])
		for i, c := range h.Counts {
			total += c
			if c > maxC {
				maxC, fullest = c, i
			}
		}
	}
	for _, m := range h.Markers {
		// A marker widens the range unless that would overflow it.
		if v := xc(m.Freq); !math.IsNaN(v) {
			if l, u := min(lo, v), max(hi, v); numeric.FiniteReal(u - l) {
				lo, hi = l, u
			}
		}
	}
	if pad := 0.02 * (hi - lo); numeric.FiniteReal(lo-pad) && numeric.FiniteReal(hi+pad) {
		lo, hi = lo-pad, hi+pad
	}

	top := outer
	titleY := 0.0
	if h.Title != "" {
		titleY = top + 12
		top += 22
	}
	top += 4
	bottom := H - 26
	if h.XLabel != "" {
		bottom = H - 40
	}

	// Count axis: integer 1-2-5 steps, a little headroom for marker labels.
	cy := axis{p0: bottom, p1: top}
	n := max(2, int((bottom-top)/28))
	step := max(1, niceStep(float64(maxC)*1.08, n))
	cy.lo, cy.hi = 0, math.Max(step, math.Ceil(float64(maxC)*1.08/step-eps)*step)
	cy.ticks = linTicks(0, cy.hi, step, "")
	x0 := plotLeft(cy.ticks)
	x1 := W - 16
	xa := axis{lo: lo, hi: hi, p0: x0, p1: x1}
	ticks := func() []tick {
		if h.Log {
			return logTicks(lo, hi, xa.pxPerUnit(), 56, h.Unit)
		}
		return engTicks(lo, hi, x1-x0, h.Unit)
	}
	xa.ticks = ticks()
	if over := overhang(&xa, W); over > 0 {
		x1 -= over
		xa.p1 = x1
		xa.ticks = ticks()
	}

	b := dst
	if b == nil {
		b = make([]byte, 0, 4096+len(h.Counts)*24)
	}
	b = appendSVGStart(b, "zplot-hist", id, W, H)
	b = append(b, '>')
	title := h.Title
	if title == "" {
		title = "Histogram"
	}
	b = appendTitleDesc(b, id, title, h.describe(problem, total, fullest))
	b = appendStyle(b, h.NoStyle)

	b = append(b, `<path class="grid" fill="none" stroke="currentColor" stroke-opacity=".16" d="`...)
	for _, t := range cy.ticks {
		b = appendHLine(b, tenths(x0), tenths(cy.px(t.pos)), tenths(x1))
	}
	b = append(b, `"/>`...)

	if problem == "" {
		b = append(b, `<path class="bar" fill="currentColor" fill-opacity=".3" d="`...)
		yb := tenths(bottom)
		for i, c := range h.Counts {
			if c == 0 {
				continue
			}
			b = appendVLine(b, tenths(xa.px(xc(h.Edges[i]))), yb, tenths(cy.px(float64(c))))
			b = append(b, 'H')
			b = appendTenths(b, tenths(xa.px(xc(h.Edges[i+1]))), true)
			b = append(b, 'V')
			b = appendTenths(b, yb, true)
			b = append(b, 'Z')
		}
		b = append(b, `"/>`...)
	}

	b = append(b, `<path class="axis" fill="none" stroke="currentColor" stroke-opacity=".5" d="`...)
	b = appendBox(b, x0, top, x1, bottom)
	for _, t := range xa.ticks {
		b = appendVLine(b, tenths(xa.px(t.pos)), tenths(bottom), tenths(bottom+5))
	}
	b = append(b, `"/><g class="tick" text-anchor="end">`...)
	for _, t := range cy.ticks {
		b = appendText(b, "", x0-6, cy.px(t.pos), ".35em", t.label)
	}
	b = append(b, `</g><g class="tick" text-anchor="middle">`...)
	for _, t := range xa.ticks {
		b = appendText(b, "", xa.px(t.pos), bottom+18, "", t.label)
	}
	b = append(b, `</g>`...)
	b = appendVText(b, 18, (top+bottom)/2, "Count")
	if h.XLabel != "" {
		b = appendText(b, ` class="axis-title" text-anchor="middle"`, (x0+x1)/2, H-8, "", h.XLabel)
	}

	var labels []byte
	slot := 0
	for _, m := range h.Markers {
		if math.IsNaN(xc(m.Freq)) || math.IsInf(m.Freq, 0) {
			continue
		}
		x := xa.px(xc(m.Freq))
		b = append(b, `<path class="marker`...)
		b = appendClassSuffix(b, "marker-", m.Class)
		b = append(b, `" fill="none" stroke="currentColor" stroke-dasharray="3 3" d="`...)
		b = appendVLine(b, tenths(x), tenths(top), tenths(bottom))
		b = append(b, `"/>`...)
		if m.Label != "" {
			labels = appendMarkerLabel(labels, x, x0, x1, top+13+13*float64(slot%4), m.Label)
			slot++
		}
	}
	if len(labels) > 0 {
		b = append(b, `<g class="label halo">`...)
		b = append(b, labels...)
		b = append(b, `</g>`...)
	}
	if h.Title != "" {
		b = appendText(b, ` class="title"`, outer, titleY, "", h.Title)
	}
	note := problem
	if note == "" && total == 0 {
		note = "no samples"
	}
	if note != "" {
		b = appendText(b, ` class="note" text-anchor="middle"`, (x0+x1)/2, (top+bottom)/2, ".35em", note)
	}
	return append(b, "</svg>"...)
}

// engTicks returns labelled ticks at 1-2-5 steps across [lo, hi] on an
// axis of px pixels, labelled by value.Format in unit with the digits the
// step needs, spaced so the labels do not touch.
func engTicks(lo, hi, px float64, unit string) []tick {
	var ticks []tick
	for n := max(2, int(px/70)); n >= 1; n-- {
		step := niceStep(hi-lo, n)
		ticks = ticks[:0]
		widest := 0.0
		for i := math.Ceil(lo/step - eps); i*step <= hi+eps*step && len(ticks) <= n+2; i++ {
			v := i * step
			t := tick{pos: v, label: engLabel(v, step, unit), major: true}
			widest = max(widest, textWidth(t.label, fontPx))
			ticks = append(ticks, t)
		}
		if len(ticks) < 2 || px*step/(hi-lo) >= widest+14 || n == 1 {
			break
		}
	}
	return ticks
}

// engLabel writes the tick value v of a linear axis with the given step,
// by value.Format in unit with the digits the step needs (4.65 kΩ for a
// 10 Ω step); an angle, a level in decibels and a percentage take no SI
// prefix (0.25°, not 250 m°; 0.5 dB, not 500 mdB).
func engLabel(v, step float64, unit string) string {
	if math.Abs(v) < step*eps {
		v = 0
	}
	switch unit {
	case "°":
		return linLabel(v, step) + "°"
	case "dB", "%":
		return linLabel(v, step) + " " + unit
	}
	sig := 1
	if v != 0 {
		sig = int(math.Floor(math.Log10(math.Abs(v))+eps)-math.Floor(math.Log10(step)+eps)) + 1
		sig = min(max(sig, 1), 6)
	}
	return value.Format(v, unit, sig)
}

// describe writes the text of the histogram's <desc>.
func (h *Histogram) describe(problem string, total, fullest int) string {
	if problem != "" {
		return "Histogram: " + problem + "."
	}
	last := len(h.Edges) - 1
	b := []byte("Histogram of ")
	b = strconv.AppendInt(b, int64(total), 10)
	b = append(b, " samples in "...)
	b = strconv.AppendInt(b, int64(len(h.Counts)), 10)
	b = append(b, " bins from "...)
	b = append(b, value.Format(h.Edges[0], h.Unit, 3)...)
	b = append(b, " to "...)
	b = append(b, value.Format(h.Edges[last], h.Unit, 3)...)
	if fullest >= 0 {
		b = append(b, "; the fullest bin, "...)
		b = append(b, value.Format(h.Edges[fullest], h.Unit, 3)...)
		b = append(b, " to "...)
		b = append(b, value.Format(h.Edges[fullest+1], h.Unit, 3)...)
		b = append(b, ", holds "...)
		b = strconv.AppendInt(b, int64(h.Counts[fullest]), 10)
	}
	b = append(b, '.')
	b = appendLabels(b, " Marker: ", len(h.Markers), func(i int) string { return h.Markers[i].Label })
	return string(b)
}
