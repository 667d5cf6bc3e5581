package plot

import (
	"io"
	"math"
	"strconv"

	"zport/engine/numeric"
)

// Bars is a horizontal bar chart of signed values, one labelled row per
// value drawn from a zero line, in the order given: a ranking such as the
// normalized sensitivities of a quantity to each parameter. A value that is
// not finite gets no bar and the label "—". Each bar is its own path, with
// the class bar-pos or bar-neg by sign; the value is written at its end
// with three significant digits.
type Bars struct {
	ID     string
	Title  string
	XLabel string // axis title, e.g. "∂ln|Z|/∂ln p"
	Labels []string
	Values []float64
	// Width is the chart's width in pixels (default 480); Row is the
	// height of one row (default 22). The height follows from the rows.
	Width, Row int
	NoStyle    bool
}

// SVG returns the chart as a standalone SVG document fragment.
func (c *Bars) SVG() string { return string(c.AppendSVG(nil)) }

// WriteTo writes the chart's SVG to w.
func (c *Bars) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(c.AppendSVG(nil))
	return int64(n), err
}

// barLabel writes a bar's value with three significant digits and a
// typographic minus.
func barLabel(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	if v == 0 {
		return "0"
	}
	return signed(strconv.FormatFloat(v, 'g', 3, 64))
}

// AppendSVG appends the chart's SVG to dst and returns the extended slice.
func (c *Bars) AppendSVG(dst []byte) []byte {
	n := min(len(c.Labels), len(c.Values))
	rowH := float64(c.Row)
	if c.Row <= 0 {
		rowH = 22
	}
	rowH = max(rowH, 14)
	W, _ := size(c.Width, 0, 480, 1, 240, 1)
	id := cleanID(c.ID, "zbars")

	top := outer
	titleY := 0.0
	if c.Title != "" {
		titleY = top + 12
		top += 22
	}
	top += 4
	bottom := top + rowH*float64(max(n, 1))
	H := bottom + 26
	if c.XLabel != "" {
		H += 14
	}

	// Data range: always holding zero, symmetric room for the labels.
	lo, hi := 0.0, 0.0
	labelW, valueW := 0.0, 0.0
	for i := 0; i < n; i++ {
		labelW = max(labelW, textWidth(c.Labels[i], fontPx))
		valueW = max(valueW, textWidth(barLabel(c.Values[i]), 11))
		if v := c.Values[i]; numeric.FiniteReal(v) {
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	if lo == 0 && hi == 0 {
		hi = 1
	}
	labelW = math.Min(labelW, W*0.35)
	x0 := math.Round(outer + labelW + 10)
	x1 := W - 12
	// Leave room past the longest bar on each side for its value.
	padL, padR := 0.0, 0.0
	if lo < 0 {
		padL = valueW + 6
	}
	if hi > 0 {
		padR = valueW + 6
	}
	xa := axis{lo: lo, hi: hi, p0: x0 + padL, p1: x1 - padR}
	if xa.p1-xa.p0 < 40 { // a very narrow chart: let the values overlap the frame
		xa.p0, xa.p1 = x0, x1
	}
	// Ticks at 1-2-5 steps, the axis widened to whole steps so that both
	// ends carry a label.
	step := niceStep(hi-lo, max(2, int((xa.p1-xa.p0)/60)))
	lo, hi = snap(lo, hi, step)
	xa.lo, xa.hi = lo, hi
	xa.ticks = linTicks(lo, hi, step, "")

	b := dst
	if b == nil {
		b = make([]byte, 0, 2048+n*160)
	}
	b = appendSVGStart(b, "zplot-bars", id, W, H)
	b = append(b, '>')
	title := c.Title
	if title == "" {
		title = "Bar chart"
	}
	b = appendTitleDesc(b, id, title, c.describe(n))
	b = appendStyle(b, c.NoStyle)

	b = append(b, `<path class="grid" fill="none" stroke="currentColor" stroke-opacity=".16" d="`...)
	for _, t := range xa.ticks {
		b = appendVLine(b, tenths(xa.px(t.pos)), tenths(top), tenths(bottom))
	}
	b = append(b, `"/>`...)

	zero := xa.px(0)
	for i := 0; i < n; i++ {
		v := c.Values[i]
		if !numeric.FiniteReal(v) || v == 0 {
			continue
		}
		y := top + rowH*float64(i)
		class := "bar bar-pos"
		if v < 0 {
			class = "bar bar-neg"
		}
		b = append(b, `<path class="`...)
		b = append(b, class...)
		b = append(b, `" fill="currentColor" fill-opacity=".3" d="`...)
		bx0, bx1 := zero, xa.px(v)
		if bx1 < bx0 {
			bx0, bx1 = bx1, bx0
		}
		if bx1-bx0 < 1 { // keep a tiny value visible as a sliver
			bx1 = bx0 + 1
		}
		b = appendBox(b, bx0, y+rowH*0.2, bx1, y+rowH*0.8)
		b = append(b, `"/>`...)
	}

	b = append(b, `<path class="axis" fill="none" stroke="currentColor" stroke-opacity=".5" d="`...)
	b = appendBox(b, x0, top, x1, bottom)
	b = appendVLine(b, tenths(zero), tenths(top), tenths(bottom))
	for _, t := range xa.ticks {
		b = appendVLine(b, tenths(xa.px(t.pos)), tenths(bottom), tenths(bottom+5))
	}
	b = append(b, `"/><g class="tick" text-anchor="end">`...)
	for i := 0; i < n; i++ {
		b = appendText(b, "", x0-6, top+rowH*(float64(i)+0.5), ".35em", c.Labels[i])
	}
	b = append(b, `</g><g class="tick" text-anchor="middle">`...)
	for _, t := range xa.ticks {
		b = appendText(b, "", xa.px(t.pos), bottom+18, "", t.label)
	}
	b = append(b, `</g><g class="label">`...)
	for i := 0; i < n; i++ {
		v := c.Values[i]
		y := top + rowH*(float64(i)+0.5)
		switch {
		case !numeric.FiniteReal(v):
			b = appendText(b, "", zero+4, y, ".35em", "—")
		case v < 0:
			b = appendText(b, anchorEnd, math.Min(xa.px(v), zero-1)-4, y, ".35em", barLabel(v))
		default:
			b = appendText(b, "", math.Max(xa.px(v), zero+1)+4, y, ".35em", barLabel(v))
		}
	}
	b = append(b, `</g>`...)
	if c.XLabel != "" {
		b = appendText(b, ` class="axis-title" text-anchor="middle"`, (x0+x1)/2, H-8, "", c.XLabel)
	}
	if c.Title != "" {
		b = appendText(b, ` class="title"`, outer, titleY, "", c.Title)
	}
	if n == 0 {
		b = appendText(b, ` class="note" text-anchor="middle"`, (x0+x1)/2, (top+bottom)/2, ".35em", "no data")
	}
	return append(b, "</svg>"...)
}

// describe writes the text of the chart's <desc>: every row's label and
// value, in order.
func (c *Bars) describe(n int) string {
	if n == 0 {
		return "Bar chart: no data."
	}
	b := []byte("Bar chart of ")
	b = strconv.AppendInt(b, int64(n), 10)
	b = append(b, " values:"...)
	for i := 0; i < n; i++ {
		if i > 0 {
			b = append(b, ';')
		}
		b = append(b, ' ')
		b = append(b, c.Labels[i]...)
		b = append(b, ' ')
		b = append(b, barLabel(c.Values[i])...)
	}
	return string(append(b, '.'))
}
