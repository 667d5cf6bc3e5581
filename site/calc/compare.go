package calc

import (
	"math"
	"math/cmplx"
	"strconv"

	"zport/engine/api"
	"zport/engine/numeric"
	"zport/site/plot"
	"zport/site/view"
)

// Compared is one quantity an analysis compares with the pinned designs
// (Analysis.Compare): one row of its comparison table.
type Compared struct {
	// ID names the row in the panel's data-compare ("z:out", "pm").
	ID string
	// Label heads the row ("Z at out").
	Label string
	// Unit is the value's unit: "Ω", "V/V", "V/A", "Hz", "F", "°", "dB",
	// or "" for a ratio. It also says how the difference reads: in dB
	// for a complex ratio ("" or "V/V"), in the unit itself for "°" and
	// "dB", else in percent; a complex difference adds the phase's.
	Unit string
	// Complex or Real picks the quantity out of an answer, the current
	// design's or a pin's; nil where that answer has none.
	Complex func(r *api.Response) *api.Complex
	Real    func(r *api.Response) *float64
}

// Comparison writes the table comparing the analysis's Compare rows with
// the pinned designs, where Section calls it (after its results table,
// say); a section that does not call it gets the table after it. Without
// pins it writes nothing.
func (c *Context) Comparison(w *view.Writer) {
	c.compared = true
	rows := c.comparedRows() // none without the analysis, its Compare or pins
	if len(rows) == 0 {
		return
	}
	w.Open("div", "class", "table-wrap compare-wrap")
	w.Open("table", "class", "compare", "data-compare-of", c.a.Key)
	w.Open("caption")
	w.Text(c.a.Title + " compared with the pinned designs")
	w.Elem("span", "Δ: this design against the pin — the change in percent (in dB for a ratio, in the unit for degrees and decibels), and of the phase.", "class", "hint")
	w.Close("caption")
	w.Open("thead")
	w.Open("tr")
	w.Elem("th", "Quantity", "scope", "col")
	w.Elem("th", "This design", "scope", "col")
	for i := range c.Pins {
		p := &c.Pins[i]
		st := p.Style()
		w.Open("th", "scope", "col", "data-pin", strconv.Itoa(p.Slot))
		w.Raw(plot.Swatch(st.Class, st.Dash))
		w.Text(" " + p.Name)
		w.Close("th")
		w.Open("th", "scope", "col", "data-pin", strconv.Itoa(p.Slot))
		w.Text("Δ")
		w.Elem("span", "this vs "+p.Name, "class", "offscreen")
		w.Close("th")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for _, row := range rows {
		w.Open("tr", "data-compare", row.ID)
		w.Elem("th", row.Label, "scope", "row")
		cur := row.pick(c.Resp)
		w.Open("td", "data-label", "This design")
		cur.write(w, row.Unit, "data-compare", row.ID, "data-pin", "0", "data-stat", "value")
		w.Close("td")
		for i := range c.Pins {
			p := &c.Pins[i]
			slot := strconv.Itoa(p.Slot)
			var v quantity
			if p.Resp != nil {
				v = row.pick(p.Resp)
			}
			w.Open("td", "data-label", p.Name)
			v.write(w, row.Unit, "data-compare", row.ID, "data-pin", slot, "data-stat", "value")
			w.Close("td")
			w.Open("td", "data-label", "Δ this vs "+p.Name)
			d := difference(cur, v, row.Unit)
			attrs := []string{"class", "diff", "data-compare", row.ID, "data-pin", slot, "data-stat", "diff"}
			if d.ok {
				attrs = append(attrs, "data-value", view.Num(d.value))
				if d.phase != nil {
					attrs = append(attrs, "data-phase", view.Num(*d.phase))
				}
			} else {
				attrs = append(attrs, "data-null", "true")
			}
			if d.ang == "" {
				w.Elem("span", d.text, attrs...)
			} else {
				w.Open("span", attrs...)
				w.Text(d.mag)
				w.Elem("span", d.ang, "class", "dphase")
				w.Close("span")
			}
			w.Close("td")
		}
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
}

// comparedRows are the analysis's Compare rows where some pin differs
// from the current design (a table of equal values says nothing), or none
// without pins.
func (c *Context) comparedRows() []Compared {
	if len(c.Pins) == 0 || c.a == nil || c.a.Compare == nil || c.Resp == nil {
		return nil
	}
	var out []Compared
	for _, row := range c.a.Compare(c) {
		cur := row.pick(c.Resp)
		for i := range c.Pins {
			if r := c.Pins[i].Resp; r == nil || !cur.same(row.pick(r)) {
				out = append(out, row)
				break
			}
		}
	}
	return out
}

// compareCopy writes the comparison as a Markdown table.
func (c *Context) compareCopy(m *Markdown) {
	rows := c.comparedRows()
	if len(rows) == 0 {
		return
	}
	head := []string{MD(c.a.Title) + " vs pins", "This design"}
	for i := range c.Pins {
		head = append(head, MD(c.Pins[i].Name), "Δ this vs "+MD(c.Pins[i].Name))
	}
	var out [][]string
	for _, row := range rows {
		cur := row.pick(c.Resp)
		line := []string{MD(row.Label), cur.text(row.Unit)}
		for i := range c.Pins {
			var v quantity
			if r := c.Pins[i].Resp; r != nil {
				v = row.pick(r)
			}
			line = append(line, v.text(row.Unit), difference(cur, v, row.Unit).text)
		}
		out = append(out, line)
	}
	m.Table(head, out...)
}

// quantity is one compared value: complex, real, or absent.
type quantity struct {
	z *api.Complex
	x *float64
}

func (r Compared) pick(resp *api.Response) quantity {
	switch {
	case r.Complex != nil:
		return quantity{z: r.Complex(resp)}
	case r.Real != nil:
		return quantity{x: r.Real(resp)}
	}
	return quantity{}
}

// same reports whether q and o are the same value exactly (or both
// absent).
func (q quantity) same(o quantity) bool {
	switch {
	case q.z != nil || o.z != nil:
		return q.z != nil && o.z != nil && *q.z == *o.z
	case q.x != nil || o.x != nil:
		return q.x != nil && o.x != nil && *q.x == *o.x
	}
	return true
}

func (q quantity) text(unit string) string {
	switch {
	case q.z != nil:
		return view.Polar(q.z.Value(), unit)
	case q.x != nil:
		return view.Magnitude(*q.x, unit)
	}
	return "—"
}

// write writes the value with its data attributes (data-re and data-im,
// or data-value, or data-null).
func (q quantity) write(w *view.Writer, unit string, attrs ...string) {
	switch {
	case q.z != nil:
		w.Elem("span", q.text(unit), append(attrs, "class", "num", "data-re", view.Num(q.z.Re), "data-im", view.Num(q.z.Im))...)
	case q.x != nil:
		w.Elem("span", q.text(unit), append(attrs, "class", "num", "data-value", view.Num(*q.x))...)
	default:
		w.Elem("span", "—", append(attrs, "class", "num", "data-null", "true")...)
	}
}

// diff is the difference of the current design's value from a pin's:
// value in its own measure (percent, dB or the unit), phase in degrees
// for a complex quantity; text is both, mag and ang each alone.
type diff struct {
	ok       bool
	value    float64
	phase    *float64
	text     string
	mag, ang string
}

// difference compares cur with pin, the pin as the reference: a complex
// ratio's magnitude in dB, another complex magnitude and a real value in
// a physical unit in percent, degrees and decibels as a difference, and
// the phase of a complex value in degrees, wrapped to (−180°, 180°].
func difference(cur, pin quantity, unit string) diff {
	none := diff{text: "—"}
	switch {
	case cur.z != nil && pin.z != nil:
		a, b := cur.z.Value(), pin.z.Value()
		if b == 0 || a == 0 {
			return none
		}
		q := a / b
		ph := numeric.Wrap180(cmplx.Phase(q) * 180 / math.Pi)
		d := diff{ok: true, phase: &ph}
		if unit == "" || unit == "V/V" {
			d.value = 20 * math.Log10(cmplx.Abs(q))
			d.text = signedFixed(d.value, 2) + " dB"
		} else {
			d.value = 100 * (cmplx.Abs(q) - 1)
			d.text = signedPercent(d.value)
		}
		d.mag, d.ang = d.text, "∠ "+signedFixed(ph, 2)+"°"
		d.text += ", " + d.ang
		return d
	case cur.x != nil && pin.x != nil:
		a, b := *cur.x, *pin.x
		switch unit {
		case "°", "dB":
			d := diff{ok: true, value: a - b}
			d.text = signedFixed(d.value, 2)
			if unit == "°" {
				d.text += "°"
			} else {
				d.text += " dB"
			}
			return d
		}
		if b == 0 {
			return none
		}
		d := diff{ok: true, value: 100 * (a/b - 1)}
		d.text = signedPercent(d.value)
		return d
	}
	return none
}

// signedFixed writes v with d decimals, its sign always shown (a
// typographic minus), "0" for a value that rounds to zero.
func signedFixed(v float64, d int) string {
	s := strconv.FormatFloat(math.Abs(v), 'f', d, 64)
	zero := true
	for _, r := range s {
		if r != '0' && r != '.' {
			zero = false
		}
	}
	switch {
	case zero:
		return s
	case v < 0:
		return "−" + s
	}
	return "+" + s
}

// signedPercent writes a change in percent with three significant
// digits and its sign, e.g. "+12.3 %", "−0.481 %", "0 %".
func signedPercent(p float64) string {
	if p == 0 {
		return "0 %"
	}
	s := view.PlainN(math.Abs(p), 3) + " %"
	if p < 0 {
		return "−" + s
	}
	return "+" + s
}
