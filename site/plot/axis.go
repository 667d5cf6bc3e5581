package plot

import (
	"math"

	"zport/engine/value"
)

// tick is one position on an axis, in axis coordinates: log10 of the value
// on a log axis, the value itself on a linear one.
type tick struct {
	pos   float64
	label string // "" for an unlabelled tick
	major bool   // drawn as a full grid line; minor ticks get a faint one
}

// axis maps axis coordinates [lo, hi] onto pixels [p0, p1]; p1 < p0 for a
// vertical axis, whose low end is at the bottom.
type axis struct {
	lo, hi float64
	p0, p1 float64
	ticks  []tick
}

func (a *axis) px(v float64) float64 { return a.p0 + (v-a.lo)*(a.p1-a.p0)/(a.hi-a.lo) }

// pxPerUnit is the pixel length of one axis unit (one decade on a log axis).
func (a *axis) pxPerUnit() float64 { return math.Abs(a.p1-a.p0) / (a.hi - a.lo) }

// in reports whether axis coordinate v lies on the axis.
func (a *axis) in(v float64) bool { return v >= a.lo-1e-9 && v <= a.hi+1e-9 }

const eps = 1e-9

// Decade label strides: every decade, every second, then multiples of
// three so labels fall on SI prefixes (1 Hz, 1 kHz, 1 MHz …).
var strides = []int{1, 2, 3, 6, 9, 12, 15, 30, 60, 90, 150, 300}

// logTicks returns the ticks of a log axis spanning [lo, hi] (log10 units)
// at pxPerDec pixels per decade, labelled with value.Format in unit. gap is
// the least distance between label positions, in pixels: decades are
// labelled every stride decades so labels never crowd, the 2 and 5 of each
// decade are labelled too when a decade is long enough, and 2…9 get minor
// grid lines when it is long enough for them to read as a grid. If that
// leaves fewer than two labels (a range inside one decade), both ends are
// labelled with three digits.
func logTicks(lo, hi, pxPerDec, gap float64, unit string) []tick {
	stride := strides[len(strides)-1]
	for _, s := range strides {
		if pxPerDec*float64(s) >= gap {
			stride = s
			break
		}
	}
	label25 := stride == 1 && pxPerDec*math.Log10(2) >= gap
	labelAll := stride == 1 && pxPerDec*math.Log10(10.0/9) >= gap
	minor := stride == 1 && pxPerDec >= 30

	var ticks []tick
	labelled := 0
	kLo, kHi := int(math.Floor(lo)), int(math.Ceil(hi))
	for k := kLo; k <= kHi; k++ {
		if p := float64(k); p >= lo-eps && p <= hi+eps {
			t := tick{pos: p}
			if mod(k, stride) == 0 {
				t.major = true
				t.label = value.Format(math.Pow10(k), unit, 1)
				labelled++
			}
			ticks = append(ticks, t)
		}
		if !minor {
			continue
		}
		for m := 2; m <= 9; m++ {
			p := float64(k) + math.Log10(float64(m))
			if p < lo-eps || p > hi+eps {
				continue
			}
			t := tick{pos: p}
			if labelAll || label25 && (m == 2 || m == 5) {
				t.label = value.Format(float64(m)*math.Pow10(k), unit, 1)
				labelled++
			}
			ticks = append(ticks, t)
		}
	}
	if labelled < 2 {
		for i := range ticks {
			ticks[i].label = ""
		}
		ticks = append(ticks,
			tick{pos: lo, label: value.Format(math.Pow(10, lo), unit, 3)},
			tick{pos: hi, label: value.Format(math.Pow(10, hi), unit, 3)})
	}
	return ticks
}

func mod(a, b int) int { return ((a % b) + b) % b }

// niceStep returns the smallest step of the form 1, 2 or 5 × 10^k that
// divides span into at most n intervals.
func niceStep(span float64, n int) float64 {
	if n < 1 {
		n = 1
	}
	if !(span > 0) || math.IsInf(span, 0) {
		return 1
	}
	raw := span / float64(n)
	p := math.Pow10(int(math.Floor(math.Log10(raw))))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw*(1-eps) {
			return m * p
		}
	}
	return 10 * p
}

// snap widens [lo, hi] outward to multiples of step.
func snap(lo, hi, step float64) (float64, float64) {
	return math.Floor(lo/step+eps) * step, math.Ceil(hi/step-eps) * step
}

// linTicks returns a labelled major tick at every multiple of step in
// [lo, hi], with suffix appended to each label.
func linTicks(lo, hi, step float64, suffix string) []tick {
	var ticks []tick
	for i := math.Ceil(lo/step - eps); i*step <= hi+eps*step && len(ticks) < 1000; i++ {
		v := i * step
		ticks = append(ticks, tick{pos: v, label: linLabel(v, step) + suffix, major: true})
	}
	return ticks
}

// dbRange chooses the range and ticks of a decibel axis for data in
// [lo, hi] (NaN when there is none) on an axis of px pixels: at least 10 dB
// tall, widened to the nearest multiples of a 1-2-5 step.
func dbRange(lo, hi, px float64) (float64, float64, []tick) {
	if math.IsNaN(lo) {
		lo, hi = -20, 20
	}
	if hi-lo < 10 {
		c := (lo + hi) / 2
		lo, hi = c-5, c+5
	}
	n := max(2, int(px/28))
	var step, slo, shi float64
	for m := n; m >= 1; m-- {
		step = niceStep(hi-lo, m)
		slo, shi = snap(lo, hi, step)
		if (shi-slo)/step <= float64(n)+eps {
			break
		}
	}
	return slo, shi, linTicks(slo, shi, step, "")
}

// phaseSteps are the tick steps of a phase axis, all multiples of 45°.
var phaseSteps = []float64{45, 90, 180, 360, 720, 1440, 2880, 5760}

// phaseRange chooses the range and ticks of a phase axis for unwrapped
// phases in [lo, hi] degrees (NaN when there are none) on an axis of px
// pixels: at least 90° tall, snapped to a multiple of 45° or 90° (or of a
// larger multiple of 90° when the phase winds through many turns).
func phaseRange(lo, hi, px float64) (float64, float64, []tick) {
	if math.IsNaN(lo) {
		lo, hi = -90, 90
	}
	if hi-lo < 90 {
		c := (lo + hi) / 2
		lo, hi = c-45, c+45
	}
	n := max(2, int(px/24))
	for _, step := range phaseSteps {
		slo, shi := snap(lo, hi, step)
		if (shi-slo)/step <= float64(n)+eps {
			return slo, shi, linTicks(slo, shi, step, "°")
		}
	}
	step := niceStep(hi-lo, n)
	slo, shi := snap(lo, hi, step)
	return slo, shi, linTicks(slo, shi, step, "°")
}

// logRange chooses the range of a log axis (log10 units) for data in
// [lo, hi] (NaN when there is none): at least one decade tall, with 5 %
// of the span as padding at each end.
func logRange(lo, hi float64) (float64, float64) {
	if math.IsNaN(lo) {
		return -1, 2
	}
	if hi-lo < 1 {
		c := (lo + hi) / 2
		return c - 0.5, c + 0.5
	}
	pad := 0.05 * (hi - lo)
	return lo - pad, hi + pad
}

// appendFrame draws a one-panel chart's grid — a faint line at each minor
// tick, a stronger one at each major tick of xa and ya (all of a linear
// axis's ticks are major) — its frame from (x0, top) to (x1, bottom), and
// the tick labels: ya's left of the frame, xa's below it.
func appendFrame(b []byte, xa, ya *axis, x0, x1, top, bottom float64) []byte {
	var major, minor []byte
	for _, t := range xa.ticks {
		g := &minor
		if t.major {
			g = &major
		}
		*g = appendVLine(*g, tenths(xa.px(t.pos)), tenths(top), tenths(bottom))
	}
	for _, t := range ya.ticks {
		g := &minor
		if t.major {
			g = &major
		}
		*g = appendHLine(*g, tenths(x0), tenths(ya.px(t.pos)), tenths(x1))
	}
	if len(minor) > 0 {
		b = append(b, `<path class="grid grid-minor" fill="none" stroke="currentColor" stroke-opacity=".07" d="`...)
		b = append(b, minor...)
		b = append(b, `"/>`...)
	}
	b = append(b, `<path class="grid" fill="none" stroke="currentColor" stroke-opacity=".16" d="`...)
	b = append(b, major...)
	b = append(b, `"/><path class="axis" fill="none" stroke="currentColor" stroke-opacity=".5" d="`...)
	b = appendBox(b, x0, top, x1, bottom)
	b = append(b, `"/><g class="tick" text-anchor="end">`...)
	for _, t := range ya.ticks {
		if t.label != "" {
			b = appendText(b, "", x0-6, ya.px(t.pos), ".35em", t.label)
		}
	}
	b = append(b, `</g><g class="tick" text-anchor="middle">`...)
	for _, t := range xa.ticks {
		if t.label != "" {
			b = appendText(b, "", xa.px(t.pos), bottom+16, "", t.label)
		}
	}
	return append(b, `</g>`...)
}

// plotLeft is the left edge of a panel whose value axis carries ticks:
// room for the axis title and the widest tick label.
func plotLeft(ticks []tick) float64 {
	w := 0.0
	for _, t := range ticks {
		w = max(w, textWidth(t.label, fontPx))
	}
	return math.Round(outer + 16 + w + 10)
}
