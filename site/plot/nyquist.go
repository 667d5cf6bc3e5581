package plot

import (
	"io"
	"math"
	"math/cmplx"
	"strconv"

	"zport/engine/value"
)

// Nyquist is a polar chart of a return ratio T(jω) over frequency, with
// its mirror image for negative frequencies (dashed), the −1 point, the
// unit circle, and marked Points such as the phase-margin and gain-margin
// points. Loop gains span many decades, so the radius is compressed:
//
//	r = log10(1 + |T|/10⁻³) / log10(1 + 10⁹)
//
// of the chart's radius, with angles true. |T| from 10⁻³ to 10⁶ fills the
// chart (10⁻³ sits at 3 % of the radius, the unit circle at one third,
// 10⁶ on the rim); the map is continuous through T = 0, and a larger |T|
// is drawn on the rim. Encirclements of −1 and the distance to it in angle
// read as on the uncompressed plot.
type Nyquist struct {
	ID    string
	Title string
	Name  string       // the curve's legend label, e.g. "T of U1"
	Freq  []float64    // Hz, ascending
	T     []complex128 // one per frequency; NaN or Inf leaves a gap
	// Points marks values of T with a dot and a label; Class picks the
	// colour ("pm", "gm").
	Points []Point
	// Width is in pixels (default 640); the chart is a circle of at
	// most 520 px across, centred, below its title.
	Width   int
	NoStyle bool
}

// Point is a marked value of T.
type Point struct {
	Value complex128
	Label string
	Class string
}

// The radius compression: |T| = NyquistFloor is where the logarithm takes
// over from the near-linear centre, NyquistCeil the rim.
const (
	NyquistFloor = 1e-3
	NyquistCeil  = 1e6
)

// NyquistRadius is the compressed radius of |T|, 0 at T = 0 and 1 at
// NyquistCeil (and beyond).
func NyquistRadius(mag float64) float64 {
	return min(1, math.Log10(1+mag/NyquistFloor)/math.Log10(1+NyquistCeil/NyquistFloor))
}

// SVG returns the chart as a standalone SVG document fragment.
func (c *Nyquist) SVG() string { return string(c.AppendSVG(nil)) }

// WriteTo writes the chart's SVG to w.
func (c *Nyquist) WriteTo(w io.Writer) (int64, error) {
	n, err := w.Write(c.AppendSVG(nil))
	return int64(n), err
}

// AppendSVG appends the chart's SVG to dst and returns the extended slice.
func (c *Nyquist) AppendSVG(dst []byte) []byte {
	W, _ := size(c.Width, 0, 640, 1, 280, 1)
	id := cleanID(c.ID, "znyq")
	n := min(len(c.Freq), len(c.T))

	legend := []string{}
	if c.Name != "" {
		legend = append(legend, c.Name, "negative frequencies")
	}
	titleLines, titleY, items, legendY, y := layoutHead(c.Title, legend, W)
	y += 10
	R := math.Min(math.Floor((W-2*outer-40)/2), 260)
	cx, cy := math.Round(W/2), y+R+8
	H := cy + R + 26
	pos := func(z complex128) (float64, float64) {
		r := NyquistRadius(cmplx.Abs(z)) * R
		a := cmplx.Phase(z)
		return cx + r*math.Cos(a), cy - r*math.Sin(a)
	}

	b := dst
	if b == nil {
		b = make([]byte, 0, 6144+n*24)
	}
	b = appendSVGStart(b, "zplot-nyquist", id, W, H)
	b = append(b, ` data-nyquist="`...)
	for i := range n {
		if i > 0 {
			b = append(b, ' ')
		}
		b = appendSig6(b, c.Freq[i])
	}
	b = append(b, '"')
	b = appendAttrPx(b, "data-cx", cx)
	b = appendAttrPx(b, "data-cy", cy)
	b = appendAttrPx(b, "data-r", R)
	b = append(b, ` data-floor="`...)
	b = appendSig6(b, NyquistFloor)
	b = append(b, `" data-ceil="`...)
	b = appendSig6(b, NyquistCeil)
	b = append(b, `">`...)
	title := c.Title
	if title == "" {
		title = "Nyquist chart"
	}
	b = appendTitleDesc(b, id, title, c.describe(n))
	b = appendStyle(b, c.NoStyle)

	// Grid: circles at decades of |T|, the axes and the diagonals.
	grid := []float64{1e-2, 1e2, 1e4}
	b = append(b, `<g class="grid" fill="none" stroke="currentColor" stroke-opacity=".16">`...)
	for _, g := range grid {
		b = appendCircle(b, cx, cy, NyquistRadius(g)*R, "")
	}
	b = append(b, `<path d="`...)
	for k := 0; k < 4; k++ {
		a := float64(k) * math.Pi / 4
		dx, dy := R*math.Cos(a), R*math.Sin(a)
		b = append(b, 'M')
		b = appendTenths(b, tenths(cx-dx), true)
		b = appendNum(b, tenths(cy+dy))
		b = append(b, 'L')
		b = appendTenths(b, tenths(cx+dx), true)
		b = appendNum(b, tenths(cy-dy))
	}
	b = append(b, `"/></g>`...)
	b = append(b, `<g class="axis" fill="none" stroke="currentColor" stroke-opacity=".5">`...)
	b = appendCircle(b, cx, cy, R, "")
	b = append(b, `</g><g class="hline hline-unity" fill="none" stroke="currentColor" stroke-dasharray="9 3 2 3">`...)
	b = appendCircle(b, cx, cy, NyquistRadius(1)*R, "")
	b = append(b, `</g>`...)
	// Labels of the circles, along the ray at +45°, and of the angles,
	// inside the rim.
	b = append(b, `<g class="tick halo" text-anchor="start">`...)
	for i, g := range []float64{1e-2, 1, 1e2, 1e4, NyquistCeil} {
		r := NyquistRadius(g) * R
		b = appendText(b, "", cx+r*(1/math.Sqrt2)+3, cy-r*(1/math.Sqrt2)-3, "", [...]string{"0.01", "1", "100", "10⁴", "10⁶"}[i])
	}
	b = append(b, `</g><g class="tick" text-anchor="middle">`...)
	b = appendText(b, "", cx, cy-R+14, "", "+90°")
	b = appendText(b, "", cx, cy+R-6, "", "−90°")
	b = append(b, `</g>`...)
	b = appendText(b, ` class="tick"`, cx-R+4, cy-5, "", "180°")
	b = appendText(b, ` class="tick" text-anchor="end"`, cx+R-4, cy-5, "", "0°")

	// The −1 point: a cross.
	mx, my := pos(-1)
	b = append(b, `<path class="minus-one" fill="none" stroke="currentColor" stroke-width="2" d="M`...)
	b = appendTenths(b, tenths(mx-5), true)
	b = appendNum(b, tenths(my-5))
	b = append(b, 'l')
	b = appendTenths(b, 100, true)
	b = appendNum(b, 100)
	b = append(b, 'm')
	b = appendTenths(b, 0, true)
	b = appendNum(b, -100)
	b = append(b, 'l')
	b = appendTenths(b, -100, true)
	b = appendNum(b, 100)
	b = append(b, `"/>`...)
	var labels []byte
	labels = appendText(labels, "", mx+6, my+16, "", "−1")

	// The curve and its mirror; the positive-frequency path carries the
	// hover data.
	scratch := make([]int, 2*n)
	b = append(b, `<g class="traces" fill="none" stroke="currentColor" stroke-width="1.75" stroke-linejoin="round" stroke-linecap="round">`...)
	for pass := 0; pass < 2; pass++ {
		run := scratch[:0]
		var path []byte
		flush := func() {
			path = appendRun(path, run)
			run = run[:0]
		}
		for i := range n {
			z := c.T[i]
			if cmplx.IsNaN(z) || cmplx.IsInf(z) {
				flush()
				continue
			}
			if pass == 1 {
				z = cmplx.Conj(z)
			}
			x, y := pos(z)
			X, Y := tenths(x), tenths(y)
			if k := len(run); k > 0 && run[k-2] == X && run[k-1] == Y {
				continue
			}
			run = append(run, X, Y)
		}
		flush()
		if pass == 0 {
			b = appendTraceOpen(b, seriesClass("t", 0), &Trace{})
			b = appendAttr(b, "data-name", c.Name)
			b = append(b, ` data-values="`...)
			for i := range n {
				if i > 0 {
					b = append(b, ' ')
				}
				z := c.T[i]
				mag, ph := math.NaN(), math.NaN()
				if !cmplx.IsNaN(z) && !cmplx.IsInf(z) {
					mag, ph = cmplx.Abs(z), cmplx.Phase(z)*180/math.Pi
				}
				b = appendSig6(b, mag)
				b = append(b, ' ')
				b = appendHundredths(b, ph)
			}
			b = append(b, '"')
		} else {
			b = appendTraceOpen(b, seriesClass("t", 0)+" mirror", &Trace{Dashed: true})
			b = append(b, ` stroke-opacity=".45"`...)
		}
		b = append(b, ` d="`...)
		b = append(b, path...)
		b = append(b, `"/>`...)
	}
	b = append(b, `</g>`...)

	// Marked points.
	for _, p := range c.Points {
		if cmplx.IsNaN(p.Value) || cmplx.IsInf(p.Value) {
			continue
		}
		x, y := pos(p.Value)
		b = append(b, `<circle class="point`...)
		b = appendClassSuffix(b, "point-", p.Class)
		b = append(b, `" r="4" fill="currentColor" stroke="none"`...)
		b = appendAttrPx(b, "cx", x)
		b = appendAttrPx(b, "cy", y)
		b = append(b, `/>`...)
		if p.Label != "" {
			anchor := ""
			lx := x + 7
			if x > cx {
				anchor, lx = anchorEnd, x-7
			}
			labels = appendText(labels, anchor, lx, y-7, "", p.Label)
		}
	}
	b = appendLabelsTitle(b, labels, titleLines, titleY)
	if len(items) > 0 {
		traces := []Trace{{Name: legend[0]}, {Name: legend[1], Dashed: true}}
		ser := []series{{class: seriesClass("t", 0)}, {class: seriesClass("t", 0) + " mirror"}}
		b = appendLegend(b, traces, ser, items, legendY)
	}
	return append(b, "</svg>"...)
}

func appendCircle(b []byte, cx, cy, r float64, class string) []byte {
	b = append(b, `<circle`...)
	if class != "" {
		b = append(b, ` class="`...)
		b = append(b, class...)
		b = append(b, '"')
	}
	b = appendAttrPx(b, "cx", cx)
	b = appendAttrPx(b, "cy", cy)
	b = appendAttrPx(b, "r", r)
	return append(b, `/>`...)
}

// describe writes the text of the chart's <desc>.
func (c *Nyquist) describe(n int) string {
	b := []byte("Nyquist chart of ")
	if c.Name != "" {
		b = append(b, c.Name...)
	} else {
		b = append(b, "T"...)
	}
	b = append(b, ", "...)
	b = strconv.AppendInt(b, int64(n), 10)
	b = append(b, " frequencies"...)
	if n > 0 {
		b = append(b, " from "...)
		b = append(b, value.Format(c.Freq[0], "Hz", 3)...)
		b = append(b, " to "...)
		b = append(b, value.Format(c.Freq[n-1], "Hz", 3)...)
	}
	b = append(b, "; radius log10(1 + |T|/0.001) over log10(1 + 10⁹), angle true; the unit circle and the −1 point are marked."...)
	b = appendLabels(b, " Point: ", len(c.Points), func(i int) string { return c.Points[i].Label })
	return string(b)
}
