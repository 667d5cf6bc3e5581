package plot

import (
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"zport/engine/value"
)

// Trace is one complex frequency response drawn on a Bode chart.
type Trace struct {
	Name   string       // legend label, e.g. "Z (Blackman)"
	Class  string       // CSS class suffix for the colour: "z" gives class="trace trace-z"
	Values []complex128 // one per frequency; NaN, Inf or 0 leaves a gap in the line
	Dashed bool
	// Dash, when set, is the line's own dash pattern (an SVG
	// stroke-dasharray such as "10 3 2 3"), in place of Dashed's: a
	// pinned design's line style.
	Dash string
}

// Marker is a vertical line at a frequency (a histogram value), labelled at
// the top of the chart, e.g. "crossover 784 kHz, PM 47.4°".
type Marker struct {
	Freq  float64 // the x position: frequency in Hz, or the value on a histogram
	Label string
	Class string // CSS class suffix: class="marker marker-<Class>"
}

// Panel names a panel of a Bode chart.
type Panel int

const (
	MagPanel   Panel = iota // the magnitude panel, on top
	PhasePanel              // the phase panel, below
)

// HLine is a horizontal reference line across one panel, such as |T| = 1
// on the magnitude panel or −180° on the phase panel.
type HLine struct {
	Panel Panel
	// Value is in the panel's units: a magnitude in MagUnit (decibels when
	// MagUnit is "dB"), or degrees.
	Value float64
	Label string
	Class string // CSS class suffix: class="hline hline-<Class>"
}

// Bode is a two-panel frequency-response chart: magnitude on top, phase in
// degrees below, sharing a log frequency axis. The zero value is usable;
// it draws empty axes.
type Bode struct {
	ID     string    // id of the svg element, unique on its page; ids of its parts derive from it
	Title  string    // visible heading and accessible name
	Freq   []float64 // Hz, ascending; points with a non-positive or non-finite frequency are skipped
	Traces []Trace
	// MagUnit selects the magnitude axis: "dB" plots 20·log10|v| on a
	// linear axis; any other unit ("Ω", "S", …) or "" (dimensionless) plots
	// |v| on a log axis labelled in that unit.
	MagUnit string
	Markers []Marker
	HLines  []HLine
	Width   int  // pixels; default 640
	Height  int  // pixels; default 400
	NoStyle bool // omit the embedded <style> (the page includes CSS itself)
	// NoPhase draws the magnitude panel alone, over the whole height, for
	// charts where the phase says nothing (magnitudes set against each
	// other); the hover data keeps the phases.
	NoPhase bool
}

// SVG returns the chart as a standalone SVG document fragment.
func (c *Bode) SVG() string { return string(c.AppendSVG(nil)) }

// WriteTo writes the chart's SVG to w.
func (c *Bode) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(c.AppendSVG(nil))
	return int64(n), err
}

const (
	outer     = 8.0  // padding around the chart
	fontPx    = 12.0 // tick label size
	legendRow = 16.0
	swatchW   = 18.0
)

// series is a trace prepared for drawing.
type series struct {
	abs, ph, my []float64 // |v|, unwrapped phase (°), magnitude axis coordinate; NaN marks a gap
	class       string
	finite      int
	absLo       float64 // magnitude range, for the description
	absHi       float64
	phLo, phHi  float64
}

// AppendSVG appends the chart's SVG to dst and returns the extended slice.
func (c *Bode) AppendSVG(dst []byte) []byte {
	W, H := size(c.Width, c.Height, 640, 400, 320, 240)
	id := cleanID(c.ID, "zplot")
	db := c.MagUnit == "dB"
	n := len(c.Freq)
	nan := math.NaN()

	store := make([]float64, n*(1+3*len(c.Traces)))
	lf := store[:n:n]
	store = store[n:]
	lf0, lf1, nf := math.Inf(1), math.Inf(-1), 0
	for i, f := range c.Freq {
		if f > 0 && f <= math.MaxFloat64 {
			lf[i] = math.Log10(f)
			lf0, lf1 = min(lf0, lf[i]), max(lf1, lf[i])
			nf++
		} else {
			lf[i] = nan
		}
	}
	switch {
	case nf == 0:
		lf0, lf1 = 1, 5
	case lf1-lf0 < 1e-3:
		lf0, lf1 = lf0-0.5, lf1+0.5
	}

	// Magnitudes, unwrapped phases and the data ranges.
	ser := make([]series, len(c.Traces))
	magLo, magHi, phLo, phHi := nan, nan, nan, nan
	extend := func(lo, hi *float64, v float64) {
		if math.IsNaN(*lo) {
			*lo, *hi = v, v
			return
		}
		*lo, *hi = min(*lo, v), max(*hi, v)
	}
	anyFinite := false
	for t := range c.Traces {
		tr, s := &c.Traces[t], &ser[t]
		s.abs, s.ph, s.my = store[:n:n], store[n:2*n:2*n], store[2*n:3*n:3*n]
		store = store[3*n:]
		s.class = traceClass(tr, t)
		s.absLo, s.absHi, s.phLo, s.phHi = nan, nan, nan, nan
		prev := nan
		for i := range n {
			a, p, m := nan, nan, nan
			if i < len(tr.Values) && !math.IsNaN(lf[i]) {
				v := tr.Values[i]
				if x := cmplx.Abs(v); x > 0 && x <= math.MaxFloat64 {
					a, m = x, math.Log10(x)
					if db {
						m *= 20
					}
					p = math.Atan2(imag(v), real(v)) * (180 / math.Pi)
					if !math.IsNaN(prev) {
						p -= 360 * math.Round((p-prev)/360)
					}
					prev = p
					s.finite++
					extend(&s.absLo, &s.absHi, a)
					extend(&s.phLo, &s.phHi, p)
					extend(&magLo, &magHi, m)
				}
			}
			s.abs[i], s.ph[i], s.my[i] = a, p, m
		}
		if s.finite > 0 {
			anyFinite = true
			extend(&phLo, &phHi, s.phLo)
			extend(&phLo, &phHi, s.phHi)
		}
	}
	for _, h := range c.HLines {
		if v, ok := hlineCoord(h, db); ok {
			if h.Panel == PhasePanel {
				extend(&phLo, &phHi, v)
			} else {
				extend(&magLo, &magHi, v)
			}
		}
	}

	// Vertical layout: title, legend rows, magnitude panel, phase panel,
	// frequency labels.
	names := make([]string, len(c.Traces))
	for i := range c.Traces {
		names[i] = c.Traces[i].Name
	}
	titleLines, titleY, items, legendY, y := layoutHead(c.Title, names, W)
	my0 := y + 6
	py1 := H - 40
	const gap = 16.0
	avail := max(py1-my0-gap, 80)
	magH := math.Round(avail * 0.58)
	if c.NoPhase {
		magH = max(py1-my0, 80)
	}
	my1 := my0 + magH
	py0 := my1 + gap

	mag := axis{p0: my1, p1: my0}
	if db {
		mag.lo, mag.hi, mag.ticks = dbRange(magLo, magHi, magH)
	} else {
		mag.lo, mag.hi = logRange(magLo, magHi)
		mag.ticks = logTicks(mag.lo, mag.hi, mag.pxPerUnit(), 18, c.MagUnit)
	}
	ph := axis{p0: py1, p1: py0}
	ph.lo, ph.hi, ph.ticks = phaseRange(phLo, phHi, py1-py0)
	// The panels drawn, and the bottom of the lowest.
	axes := []*axis{&mag, &ph}
	bottom := py1
	if c.NoPhase {
		axes, bottom = axes[:1], my1
	}

	labelW := 0.0
	for _, a := range axes {
		for _, t := range a.ticks {
			labelW = max(labelW, textWidth(t.label, fontPx))
		}
	}
	x0 := math.Round(outer + 16 + labelW + 10)
	x1 := W - 16
	fx := axis{lo: lf0, hi: lf1, p0: x0, p1: x1}
	fx.ticks = logTicks(lf0, lf1, fx.pxPerUnit(), 58, "Hz")
	if over := overhang(&fx, W); over > 0 {
		x1 -= over
		fx.p1 = x1
		fx.ticks = logTicks(lf0, lf1, fx.pxPerUnit(), 58, "Hz")
	}

	xt := make([]int, 3*n)
	scratch := xt[n:]
	xt = xt[:n]
	for i, l := range lf {
		if !math.IsNaN(l) {
			xt[i] = tenths(fx.px(l))
		}
	}

	b := dst
	if b == nil {
		b = make([]byte, 0, 6144+n*(10+len(c.Traces)*36))
	}

	// Root element with the data the hover script reads.
	b = appendSVGStart(b, "zplot-bode", id, W, H)
	b = append(b, ` data-freq="`...)
	for i, f := range c.Freq {
		if i > 0 {
			b = append(b, ' ')
		}
		if math.IsNaN(lf[i]) {
			f = nan
		}
		b = appendSig6(b, f)
	}
	b = append(b, `" data-fmin="`...)
	b = appendSig6(b, math.Pow(10, lf0))
	b = append(b, `" data-fmax="`...)
	b = appendSig6(b, math.Pow(10, lf1))
	b = append(b, '"')
	b = appendAttrPx(b, "data-x0", x0)
	b = appendAttrPx(b, "data-x1", x1)
	b = appendRange(b, "data-my", my0, my1, mag.lo, mag.hi)
	if !c.NoPhase {
		b = appendRange(b, "data-py", py0, py1, ph.lo, ph.hi)
	}
	if db {
		b = append(b, ` data-mscale="db"`...)
	} else {
		b = append(b, ` data-mscale="log"`...)
	}
	b = appendAttr(b, "data-unit", c.MagUnit)
	b = append(b, '>')

	title := c.Title
	if title == "" {
		title = "Bode chart"
	}
	b = appendTitleDesc(b, id, title, c.describe(ser, lf0, lf1, nf))
	b = appendStyle(b, c.NoStyle)

	// Grid and frames.
	var major, minor []byte
	for _, t := range fx.ticks {
		x := tenths(fx.px(t.pos))
		g := &minor
		if t.major {
			g = &major
		}
		*g = appendVLine(*g, x, tenths(my0), tenths(my1))
		if !c.NoPhase {
			*g = appendVLine(*g, x, tenths(py0), tenths(py1))
		}
	}
	for _, a := range axes {
		for _, t := range a.ticks {
			g := &minor
			if t.major {
				g = &major
			}
			*g = appendHLine(*g, tenths(x0), tenths(a.px(t.pos)), tenths(x1))
		}
	}
	b = append(b, `<path class="grid grid-minor" fill="none" stroke="currentColor" stroke-opacity=".07" d="`...)
	b = append(b, minor...)
	b = append(b, `"/><path class="grid" fill="none" stroke="currentColor" stroke-opacity=".16" d="`...)
	b = append(b, major...)
	b = append(b, `"/><path class="axis" fill="none" stroke="currentColor" stroke-opacity=".5" d="`...)
	b = appendBox(b, x0, my0, x1, my1)
	if !c.NoPhase {
		b = appendBox(b, x0, py0, x1, py1)
	}
	b = append(b, `"/>`...)

	// Tick labels and axis titles.
	b = append(b, `<g class="tick" text-anchor="end">`...)
	for _, a := range axes {
		for _, t := range a.ticks {
			if t.label != "" {
				b = appendText(b, "", x0-6, a.px(t.pos), ".35em", t.label)
			}
		}
	}
	b = append(b, `</g><g class="tick" text-anchor="middle">`...)
	for _, t := range fx.ticks {
		if t.label != "" {
			b = appendText(b, "", fx.px(t.pos), bottom+16, "", t.label)
		}
	}
	b = append(b, `</g>`...)
	magTitle := "Magnitude"
	if c.MagUnit != "" {
		magTitle += " (" + c.MagUnit + ")"
	}
	b = appendVText(b, 18, (my0+my1)/2, magTitle)
	if !c.NoPhase {
		b = appendVText(b, 18, (py0+py1)/2, "Phase (°)")
	}
	b = append(b, `<text class="axis-title" text-anchor="middle"`...)
	b = appendAttrPx(b, "x", (x0+x1)/2)
	b = appendAttrPx(b, "y", H-8)
	b = append(b, `>Frequency</text>`...)

	// Reference lines and markers, under the traces; their labels go on top.
	var labels []byte
	for _, h := range c.HLines {
		v, ok := hlineCoord(h, db)
		a, top := &mag, my0
		if h.Panel == PhasePanel {
			if c.NoPhase {
				continue
			}
			a, top = &ph, py0
		}
		if !ok || !a.in(v) {
			continue
		}
		b, labels = appendRefLine(b, labels, h, x0, x1, a.px(v), top)
	}
	slot := 0
	for _, m := range c.Markers {
		if !(m.Freq > 0) || !fx.in(math.Log10(m.Freq)) {
			continue
		}
		x := fx.px(math.Log10(m.Freq))
		b = append(b, `<path class="marker`...)
		b = appendClassSuffix(b, "marker-", m.Class)
		b = append(b, `" fill="none" stroke="currentColor" stroke-dasharray="3 3" d="`...)
		b = appendVLine(b, tenths(x), tenths(my0), tenths(my1))
		if !c.NoPhase {
			b = appendVLine(b, tenths(x), tenths(py0), tenths(py1))
		}
		b = append(b, `"/>`...)
		if m.Label != "" {
			labels = appendMarkerLabel(labels, x, x0, x1, my0+13+13*float64(slot%4), m.Label)
			slot++
		}
	}

	// Traces: one path per trace and panel. The magnitude path carries the
	// trace's name and values for the hover readout.
	b = append(b, `<g class="traces" fill="none" stroke="currentColor" stroke-width="1.75" stroke-linejoin="round" stroke-linecap="round">`...)
	for t := range ser {
		s, tr := &ser[t], &c.Traces[t]
		b = appendTraceOpen(b, s.class, tr)
		b = appendAttr(b, "data-name", tr.Name)
		b = append(b, ` data-values="`...)
		for i := range n {
			if i > 0 {
				b = append(b, ' ')
			}
			b = appendSig6(b, s.abs[i])
			b = append(b, ' ')
			b = appendHundredths(b, s.ph[i])
		}
		b = append(b, `" d="`...)
		b = appendLine(b, xt, s.my, &mag, scratch)
		b = append(b, `"/>`...)
		if c.NoPhase {
			continue
		}
		b = appendTraceOpen(b, s.class, tr)
		b = append(b, ` d="`...)
		b = appendLine(b, xt, s.ph, &ph, scratch)
		b = append(b, `"/>`...)
	}
	b = append(b, `</g>`...)
	b = appendLabelsTitle(b, labels, titleLines, titleY)
	b = appendLegend(b, c.Traces, ser, items, legendY)
	if !anyFinite {
		b = appendText(b, ` class="note" text-anchor="middle"`, (x0+x1)/2, (my0+my1)/2, ".35em", "no finite values")
	}
	return append(b, "</svg>"...)
}

// appendRefLine draws reference line h across [x0, x1] at height yy and
// adds its label to labels, above the line unless that would leave the
// panel whose top is top.
func appendRefLine(b, labels []byte, h HLine, x0, x1, yy, top float64) ([]byte, []byte) {
	b = append(b, `<path class="hline`...)
	b = appendClassSuffix(b, "hline-", h.Class)
	b = append(b, `" fill="none" stroke="currentColor" stroke-dasharray="9 3 2 3" d="`...)
	b = appendHLine(b, tenths(x0), tenths(yy), tenths(x1))
	b = append(b, `"/>`...)
	if h.Label != "" {
		ly := yy - 4
		if ly-10 < top {
			ly = yy + 13
		}
		labels = appendText(labels, anchorEnd, x1-4, ly, "", h.Label)
	}
	return b, labels
}

// overhang returns how far the centred label of the rightmost labelled tick
// of a horizontal axis would reach past the chart's right padding.
func overhang(a *axis, W float64) float64 {
	for i := len(a.ticks) - 1; i >= 0; i-- {
		if t := a.ticks[i]; t.label != "" {
			return math.Ceil(a.px(t.pos) + textWidth(t.label, fontPx)/2 - (W - 4))
		}
	}
	return 0
}

// hlineCoord returns the axis coordinate of a reference line, and false
// when it cannot be drawn (non-finite, or not positive on a log axis).
func hlineCoord(h HLine, db bool) (float64, bool) {
	v := h.Value
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	if h.Panel == PhasePanel || db {
		// Beyond a billion degrees or decibels a line means nothing, and
		// an axis around it could not resolve its ±45° or ±5 dB.
		return v, math.Abs(v) <= 1e9
	}
	if v <= 0 {
		return 0, false
	}
	return math.Log10(v), true
}

// traceClass is the class attribute of trace t: the base class, the
// caller's colour class and a palette class by position, which the
// caller's class overrides in the style sheet.
func traceClass(tr *Trace, t int) string {
	s := "trace"
	if cl := cleanClass(tr.Class); cl != "" {
		s += " trace-" + cl
	}
	return s + " zc" + strconv.Itoa(t%6+1)
}

// appendTraceOpen opens a trace's path: its classes and, for a dashed
// trace, its pattern as an attribute (charts keep their look where no
// style sheet applies).
func appendTraceOpen(b []byte, class string, tr *Trace) []byte {
	b = append(b, `<path class="`...)
	b = append(b, class...)
	switch {
	case tr.Dash != "":
		b = append(b, ` own-dash" stroke-dasharray="`...)
		b = appendDash(b, tr.Dash)
	case tr.Dashed:
		b = append(b, ` dashed" stroke-dasharray="7 4`...)
	}
	return append(b, '"')
}

// appendDash appends a dash pattern keeping only what one may hold:
// digits, points and spaces.
func appendDash(b []byte, d string) []byte {
	for i := 0; i < len(d); i++ {
		if c := d[i]; c >= '0' && c <= '9' || c == '.' || c == ' ' {
			b = append(b, c)
		}
	}
	return b
}

// Swatch is a short line in a trace's style, for a legend outside a
// chart (a table's column head): class is the trace's Class, dash its
// Dash. It carries the chart classes, so the page's chart style colours it.
func Swatch(class, dash string) string {
	b := []byte(`<svg xmlns="http://www.w3.org/2000/svg" class="zplot swatch" viewBox="0 0 26 10" width="26" height="10" aria-hidden="true">`)
	tr := Trace{Dash: dash}
	b = appendTraceOpen(b, traceClass(&Trace{Class: class}, 0), &tr)
	b = append(b, ` fill="none" stroke="currentColor" stroke-width="2" d="M1 5h24"/></svg>`...)
	return string(b)
}

// appendLine appends path data for ys (axis coordinates, NaN = gap) at the
// x positions xt (tenths of a pixel): each run of finite points becomes one
// subpath of relative line segments, a lone point a dot. scratch holds the
// points of a run (2 ints each, at least 2·len(ys)).
func appendLine(b []byte, xt []int, ys []float64, a *axis, scratch []int) []byte {
	k := (a.p1 - a.p0) / (a.hi - a.lo)
	run := scratch[:0]
	for i, v := range ys {
		if math.IsNaN(v) {
			b = appendRun(b, run)
			run = run[:0]
			continue
		}
		X, Y := xt[i], tenths(a.p0+(v-a.lo)*k)
		if n := len(run); n > 0 && run[n-2] == X && run[n-1] == Y {
			continue
		}
		run = append(run, X, Y)
	}
	return appendRun(b, run)
}

// simplifyTol is how far, in tenths of a pixel, a dropped point may lie
// from the segment that replaces it.
const simplifyTol = 1.0

// appendRun appends one subpath through the points of run (x, y pairs in
// tenths of a pixel), dropping points that add nothing visible, so a
// straight stretch of a line becomes one segment.
//
// It is the cone-intersection method (Williams, "An efficient algorithm for
// the piecewise linear approximation of planar curves", Computer Graphics
// and Image Processing 8, 1978 [memory]): from the last point kept, each
// later point admits the directions passing within simplifyTol of it; a
// segment may end at a point whose direction every skipped point admits.
// One pass, one square root per point.
func appendRun(b []byte, run []int) []byte {
	n := len(run) / 2
	if n == 0 {
		return b
	}
	b = append(b, 'M')
	b = appendTenths(b, run[0], true)
	b = appendNum(b, run[1])
	if n == 1 {
		return append(b, "h0"...)
	}
	b = append(b, 'l')
	first := true
	lx, ly := run[0], run[1]
	emit := func(i int) {
		x, y := run[2*i], run[2*i+1]
		if first {
			b = appendTenths(b, x-lx, true)
			first = false
		} else {
			b = appendNum(b, x-lx)
		}
		b = appendNum(b, y-ly)
		lx, ly = x, y
	}
	const tol2 = simplifyTol * simplifyTol
	var lX, lY, rX, rY float64 // the admitted directions lie between R (clockwise) and L
	open := false              // whether any point has narrowed the cone yet
	far := 0.0                 // largest distance from the anchor of a skipped point
	for i := 1; i < n; i++ {
		vx, vy := float64(run[2*i]-lx), float64(run[2*i+1]-ly)
		d2 := vx*vx + vy*vy
		if open {
			inside := rX*vy-rY*vx >= 0 && vx*lY-vy*lX >= 0 && vx*(lX+rX)+vy*(lY+rY) > 0
			if !inside || math.Sqrt(d2) < far-simplifyTol {
				emit(i - 1)
				open, far = false, 0
				vx, vy = float64(run[2*i]-lx), float64(run[2*i+1]-ly)
				d2 = vx*vx + vy*vy
			}
		}
		if d2 <= tol2 {
			continue // any direction passes near it
		}
		d := math.Sqrt(d2)
		far = max(far, d)
		sin := simplifyTol / d
		cos := math.Sqrt(1 - sin*sin)
		// v rotated by +α (counterclockwise) and −α.
		pLX, pLY := vx*cos-vy*sin, vx*sin+vy*cos
		pRX, pRY := vx*cos+vy*sin, -vx*sin+vy*cos
		if !open {
			lX, lY, rX, rY, open = pLX, pLY, pRX, pRY, true
			continue
		}
		if lX*pLY-lY*pLX < 0 { // the new left bound is clockwise of L
			lX, lY = pLX, pLY
		}
		if rX*pRY-rY*pRX > 0 { // the new right bound is counterclockwise of R
			rX, rY = pRX, pRY
		}
	}
	emit(n - 1)
	return b
}

// describe writes the text of the chart's <desc>.
func (c *Bode) describe(ser []series, lf0, lf1 float64, nf int) string {
	b := []byte("Bode chart")
	if nf > 0 {
		b = append(b, ", "...)
		b = append(b, value.Format(math.Pow(10, lf0), "Hz", 3)...)
		b = append(b, " to "...)
		b = append(b, value.Format(math.Pow(10, lf1), "Hz", 3)...)
		b = append(b, ", "...)
		b = strconv.AppendInt(b, int64(nf), 10)
		b = append(b, " points"...)
	}
	b = append(b, "; magnitude"...)
	switch c.MagUnit {
	case "dB":
		b = append(b, " in dB"...)
	case "":
		b = append(b, " on a log scale"...)
	default:
		b = append(b, " in "...)
		b = append(b, c.MagUnit...)
		b = append(b, " on a log scale"...)
	}
	if c.NoPhase {
		b = append(b, '.')
	} else {
		b = append(b, " above, phase in degrees below."...)
	}
	mag := func(v float64) string {
		if c.MagUnit == "dB" {
			return signed(strconv.FormatFloat(20*math.Log10(v), 'f', 1, 64)) + " dB"
		}
		return value.Format(v, c.MagUnit, 3)
	}
	deg := func(v float64) string { return signed(strconv.FormatFloat(v, 'f', 1, 64)) + "°" }
	for t, s := range ser {
		b = append(b, ' ')
		b = append(b, c.Traces[t].Name...)
		if s.finite == 0 {
			b = append(b, ": no finite values."...)
			continue
		}
		b = append(b, ": "...)
		b = appendSpan(b, mag(s.absLo), mag(s.absHi))
		if !c.NoPhase {
			b = append(b, ", phase "...)
			b = appendSpan(b, deg(s.phLo), deg(s.phHi))
		}
		b = append(b, '.')
	}
	if len(c.Traces) == 0 {
		b = append(b, " No traces."...)
	}
	b = appendLabels(b, " Marker: ", len(c.Markers), func(i int) string { return c.Markers[i].Label })
	b = appendLabels(b, " Reference line: ", len(c.HLines), func(i int) string {
		if c.NoPhase && c.HLines[i].Panel == PhasePanel {
			return "" // not drawn
		}
		return c.HLines[i].Label
	})
	return string(b)
}

// appendLabels appends what + label + "." to a description for each of
// the n labels that is not empty (the markers of a chart, its reference
// lines, its marked points).
func appendLabels(b []byte, what string, n int, label func(i int) string) []byte {
	for i := range n {
		if l := label(i); l != "" {
			b = append(b, what...)
			b = append(b, l...)
			b = append(b, '.')
		}
	}
	return b
}

// appendSpan appends "lo to hi", or just lo when both read the same.
func appendSpan(b []byte, lo, hi string) []byte {
	b = append(b, lo...)
	if hi != lo {
		b = append(b, " to "...)
		b = append(b, hi...)
	}
	return b
}

// layoutHead lays out a chart's title and legend from the top: the
// title's baseline (0 without a title), the legend's entries and the
// middle of its first row, and the y below them.
func layoutHead(title string, names []string, W float64) (titleLines []string, titleY float64, items []legendItem, legendY, y float64) {
	y = outer
	titleLines = wrapTitle(title, W-2*outer)
	if len(titleLines) > 0 {
		titleY = y + 12
		y += 22 + titleLine*float64(len(titleLines)-1)
	}
	items, rows := layoutLegend(names, W)
	legendY = y + legendRow/2
	return titleLines, titleY, items, legendY, y + float64(rows)*legendRow
}

// titlePx is the size of a chart title (CSS rule .zplot .title, bold),
// and titleLine the distance between the lines of a wrapped one.
const (
	titlePx   = 14.0
	titleLine = 18.0
)

// wrapTitle breaks a title into lines no wider than width at its size,
// at spaces (a word too long for a line keeps a line to itself), so that
// a narrow chart shows all of it.
func wrapTitle(title string, width float64) []string {
	if title == "" {
		return nil
	}
	// The title is bold: about a tenth wider than textWidth's estimate.
	fits := func(s string) bool { return 1.1*textWidth(s, titlePx) <= width }
	var lines []string
	line := ""
	for _, word := range strings.Fields(title) {
		switch {
		case line == "":
			line = word
		case fits(line + " " + word):
			line += " " + word
		default:
			lines = append(lines, line)
			line = word
		}
	}
	return append(lines, line)
}

// appendLabelsTitle appends the labels of markers and reference lines
// (with a halo, over the traces) and the title.
func appendLabelsTitle(b, labels []byte, titleLines []string, titleY float64) []byte {
	if len(labels) > 0 {
		b = append(b, `<g class="label halo">`...)
		b = append(b, labels...)
		b = append(b, `</g>`...)
	}
	for i, line := range titleLines {
		b = appendText(b, ` class="title"`, outer, titleY+titleLine*float64(i), "", line)
	}
	return b
}

// legendItem is the position of one legend entry.
type legendItem struct {
	x   float64
	row int
}

// layoutLegend flows the legend entries into rows across the chart width.
func layoutLegend(names []string, W float64) ([]legendItem, int) {
	if len(names) == 0 {
		return nil, 0
	}
	items := make([]legendItem, len(names))
	x, row := outer, 0
	for i, name := range names {
		w := swatchW + 5 + textWidth(name, fontPx)
		if x > outer && x+w > W-outer {
			row++
			x = outer
		}
		items[i] = legendItem{x, row}
		x += w + 16
	}
	return items, row + 1
}

func appendLegend(b []byte, traces []Trace, ser []series, items []legendItem, y0 float64) []byte {
	if len(items) == 0 {
		return b
	}
	b = append(b, `<g class="legend">`...)
	for i, it := range items {
		y := y0 + float64(it.row)*legendRow
		b = appendTraceOpen(b, ser[i].class, &traces[i])
		b = append(b, ` fill="none" stroke="currentColor" stroke-width="2" d="M`...)
		b = appendTenths(b, tenths(it.x), true)
		b = appendNum(b, tenths(y))
		b = append(b, 'h')
		b = appendTenths(b, tenths(swatchW), true)
		b = append(b, `"/>`...)
		b = appendText(b, "", it.x+swatchW+5, y, ".35em", traces[i].Name)
	}
	return append(b, `</g>`...)
}

func appendViewBox(b []byte, W, H float64) []byte {
	b = append(b, ` viewBox="0 0 `...)
	b = appendPx(b, W)
	b = append(b, ' ')
	b = appendPx(b, H)
	b = append(b, '"')
	b = appendAttrPx(b, "width", W)
	return appendAttrPx(b, "height", H)
}

// appendRange appends a data attribute "top bottom lo hi": a panel's pixel
// extent and the axis coordinates at its bottom and top.
func appendRange(b []byte, name string, top, bottom, lo, hi float64) []byte {
	b = append(b, ' ')
	b = append(b, name...)
	b = append(b, `="`...)
	b = appendPx(b, top)
	b = append(b, ' ')
	b = appendPx(b, bottom)
	b = append(b, ' ')
	b = appendSig6(b, lo)
	b = append(b, ' ')
	b = appendSig6(b, hi)
	return append(b, '"')
}

// appendSVGStart writes the root element's opening tag of a chart of the
// given class, up to its attributes: the caller adds its own and the '>'.
func appendSVGStart(b []byte, class, id string, w, h float64) []byte {
	b = append(b, `<svg xmlns="http://www.w3.org/2000/svg" class="zplot `...)
	b = append(b, class...)
	b = append(b, '"')
	b = appendAttr(b, "id", id)
	b = appendViewBox(b, w, h)
	b = append(b, ` role="img" aria-labelledby="`...)
	b = append(b, id...)
	b = append(b, `-title" aria-describedby="`...)
	b = append(b, id...)
	return append(b, `-desc" font-family="system-ui,sans-serif" font-size="12" fill="currentColor"`...)
}

// appendStyle embeds the default style sheet unless the page links it.
func appendStyle(b []byte, noStyle bool) []byte {
	if noStyle {
		return b
	}
	b = append(b, "<style>"...)
	b = append(b, CSS...)
	return append(b, "</style>"...)
}

func appendTitleDesc(b []byte, id, title, desc string) []byte {
	b = append(b, `<title id="`...)
	b = append(b, id...)
	b = append(b, `-title">`...)
	b = appendEscaped(b, title)
	b = append(b, `</title><desc id="`...)
	b = append(b, id...)
	b = append(b, `-desc">`...)
	b = appendEscaped(b, desc)
	return append(b, `</desc>`...)
}

// appendText appends a <text> element. attrs is raw attribute text
// (constants only, never user data); dy may be empty.
func appendText(b []byte, attrs string, x, y float64, dy, s string) []byte {
	b = append(b, `<text`...)
	b = append(b, attrs...)
	b = appendAttrPx(b, "x", x)
	b = appendAttrPx(b, "y", y)
	if dy != "" {
		b = append(b, ` dy="`...)
		b = append(b, dy...)
		b = append(b, '"')
	}
	b = append(b, '>')
	b = appendEscaped(b, s)
	return append(b, `</text>`...)
}

// appendVText appends a vertical axis title centred on (x, y), reading
// bottom to top.
func appendVText(b []byte, x, y float64, s string) []byte {
	b = append(b, `<text class="axis-title" text-anchor="middle" transform="rotate(-90)"`...)
	b = appendAttrPx(b, "x", -y)
	b = appendAttrPx(b, "y", x)
	b = append(b, '>')
	b = appendEscaped(b, s)
	return append(b, `</text>`...)
}

// appendMarkerLabel places a marker's label beside its line at height y,
// on the side with more room.
const anchorEnd = ` text-anchor="end"`

func appendMarkerLabel(b []byte, x, x0, x1, y float64, s string) []byte {
	if x-x0 > x1-x {
		return appendText(b, anchorEnd, x-4, y, "", s)
	}
	return appendText(b, "", x+4, y, "", s)
}

func appendClassSuffix(b []byte, prefix, class string) []byte {
	if cl := cleanClass(class); cl != "" {
		b = append(b, ' ')
		b = append(b, prefix...)
		b = append(b, cl...)
	}
	return b
}

func appendVLine(b []byte, x, y0, y1 int) []byte {
	b = append(b, 'M')
	b = appendTenths(b, x, true)
	b = appendNum(b, y0)
	b = append(b, 'V')
	return appendTenths(b, y1, true)
}

func appendHLine(b []byte, x0, y, x1 int) []byte {
	b = append(b, 'M')
	b = appendTenths(b, x0, true)
	b = appendNum(b, y)
	b = append(b, 'H')
	return appendTenths(b, x1, true)
}

func appendBox(b []byte, x0, y0, x1, y1 float64) []byte {
	b = appendHLine(b, tenths(x0), tenths(y0), tenths(x1))
	b = append(b, 'V')
	b = appendTenths(b, tenths(y1), true)
	b = append(b, 'H')
	b = appendTenths(b, tenths(x0), true)
	return append(b, 'Z')
}
