package view

import (
	"math/cmplx"

	"zport/engine/api"
	"zport/engine/value"
)

// Complex describes one displayed complex value.
type Complex struct {
	Z *api.Complex
	// Unit is "Ω", "S", "" (a ratio), "V/V" or "V/A".
	Unit string
	// Attrs are the data attributes that name the value (data-quantity,
	// data-port …); data-re and data-im, or data-null, are added.
	Attrs []string
	// Series adds the equivalent series element at frequency At (for
	// impedances).
	Series bool
	At     float64
	// DB adds 20·log10|z|.
	DB bool
	// Bounded marks an engine value, whose error bound is Err: nil then
	// means that no bound could be given (the notes say why). A closed
	// form has none and is shown as it is.
	Bounded bool
	Err     *float64
}

// Complex writes one complex value: magnitude ∠ phase, real + j imaginary,
// and the extras c asks for, with its data attributes. A value that is not
// finite shows a dash and carries data-null="true".
func (w *Writer) Complex(c Complex) {
	attrs := append([]string{"class", "cv"}, c.Attrs...)
	if c.Z == nil {
		attrs = append(attrs, "data-null", "true")
		w.Open("span", attrs...)
		w.Elem("span", "—", "class", "polar", "title", "not finite here; see the notes")
		w.Close("span")
		return
	}
	z := c.Z.Value()
	attrs = append(attrs, "data-re", Num(c.Z.Re), "data-im", Num(c.Z.Im))
	digits, e := Sig, 0.0
	switch {
	case c.Bounded && c.Err == nil:
		attrs[1] = "cv untrusted"
		w.Open("span", attrs...)
		w.Elem("span", Polar(z, c.Unit), "class", "polar")
		w.Elem("span", "cannot be trusted; see the notes", "class", "hint")
		w.Close("span")
		return
	case c.Bounded:
		e = *c.Err
		attrs = append(attrs, "data-error", Num(e))
		if e >= cmplx.Abs(z) {
			// Zero within its bound: an exact zero where the structure
			// makes it one (a bound of 0), else zero below the bound —
			// never the digits of rounding noise.
			w.Open("span", attrs...)
			w.Elem("span", Magnitude(0, c.Unit), "class", "polar")
			if e > 0 {
				w.Elem("span", "below ±"+Magnitude(e, c.Unit), "class", "rect bound")
			}
			w.Close("span")
			return
		}
		digits = min(Sig, CertainDigits(z, e))
	}
	w.Open("span", attrs...)
	w.Elem("span", PolarN(z, c.Unit, digits), "class", "polar")
	if c.DB {
		w.Elem("span", Decibels(z), "class", "db")
	}
	w.Elem("span", RectN(z, c.Unit, digits, e), "class", "rect")
	if c.Series {
		w.Elem("span", SeriesElement(z, c.At), "class", "series", "title", "equivalent series element at "+value.Format(c.At, "Hz", Sig))
	}
	w.Close("span")
}

// Cell writes a table cell holding one complex value; label names the
// column for the narrow layout, where cells stack.
func (w *Writer) Cell(label string, c Complex) {
	w.Open("td", "data-label", label)
	w.Complex(c)
	w.Close("td")
}

// Ratio writes a relative difference such as an agreement, as mantissa ×
// 10ⁿ; one above 1e-6 is marked poor. bound, when not nil, is what the
// values' error bounds allow it to be, and an agreement within that is
// zero within rounding.
func (w *Writer) Ratio(x, bound *float64, attrs ...string) {
	if x == nil {
		w.Open("span", append(append([]string{"class", "agree"}, attrs...), "data-null", "true")...)
		w.Text("—")
		w.Close("span")
		return
	}
	class := "agree"
	if *x > 1e-6 && (bound == nil || *x > *bound) {
		class = "agree poor"
	}
	if bound != nil {
		attrs = append(attrs, "data-error", Num(*bound))
		if *x <= *bound {
			w.Open("span", append(append([]string{"class", class}, attrs...), "data-value", Num(*x))...)
			w.Text("0")
			if *bound > 0 {
				mant, exp := Sci(*bound)
				w.Open("span", "class", "hint bound")
				w.Text("below ±" + mant)
				if exp != "" {
					w.Text(" × 10")
					w.Elem("sup", exp)
				}
				w.Close("span")
			}
			w.Close("span")
			return
		}
	}
	w.Open("span", append(append([]string{"class", class}, attrs...), "data-value", Num(*x))...)
	mant, exp := Sci(*x)
	w.Text(mant)
	if exp != "" {
		w.Text(" × 10")
		w.Elem("sup", exp)
	}
	w.Close("span")
}

// Real writes a real value in unit with its data attributes, or none (a
// dash or a phrase) with data-null when x is nil.
func (w *Writer) Real(x *float64, unit, none string, attrs ...string) {
	if x == nil {
		w.Elem("span", none, append(append([]string{"class", "none"}, attrs...), "data-null", "true")...)
		return
	}
	w.Elem("span", Magnitude(*x, unit), append(attrs, "data-value", Num(*x))...)
}

// KV writes one row of a key–value list (inside a dl): the term, then
// body for the description.
func (w *Writer) KV(term string, body func()) {
	w.Open("div")
	w.Elem("dt", term)
	w.Open("dd")
	body()
	w.Close("dd")
	w.Close("div")
}

// Formula writes a hand formula's text and source in a definition list.
func (w *Writer) Formula(label string, f *api.Formula) {
	w.KV(label, func() {
		w.Elem("code", f.Text)
		if f.Source != "" {
			w.Elem("span", f.Source, "class", "source")
		}
	})
}

// Section opens a results section for the analysis key, headed title; id
// prefixes the heading's element id. Close it with w.Close("section").
func (w *Writer) Section(id, key, title string, class ...string) {
	h := id + "-" + key + "-h"
	cls := "block " + key
	for _, c := range class {
		cls += " " + c
	}
	w.Open("section", "class", cls, "data-analysis", key, "aria-labelledby", h)
	w.Elem("h3", title, "id", h)
}

// Explain writes a short explanatory paragraph.
func (w *Writer) Explain(text string) {
	w.Elem("p", text, "class", "explain")
}

// Notes writes a list of notes with class, if there are any.
func (w *Writer) Notes(class string, notes []string) {
	if len(notes) == 0 {
		return
	}
	w.Open("ul", "class", class)
	for _, n := range notes {
		w.Elem("li", n)
	}
	w.Close("ul")
}

// Figures writes charts (their SVG markup) in the panel's chart grid.
func (w *Writer) Figures(svgs ...string) {
	if len(svgs) == 0 {
		return
	}
	w.Open("div", "class", "plot-grid")
	for _, s := range svgs {
		w.Figure(s, "plot")
	}
	w.Close("div")
}

// Figure writes one chart (its SVG markup) in a figure of class, with the
// buttons that save it as an image (data-action "save-svg" and
// "save-png", handled by site/assets/zport.js) and a place for their
// message. attrs are the figure's other attributes.
func (w *Writer) Figure(svg, class string, attrs ...string) {
	w.Open("figure", append([]string{"class", class}, attrs...)...)
	w.Raw(svg)
	w.Open("div", "class", "fig-tools")
	w.Elem("button", "Save as SVG", "type", "button", "data-action", "save-svg", "title", "the chart as a vector image, with its title, axes and legend")
	w.Elem("button", "Save as PNG", "type", "button", "data-action", "save-png", "title", "the chart as a picture at twice its size, for slides")
	w.Elem("span", "", "class", "chart-msg", "data-role", "chart-msg", "role", "status")
	w.Close("div")
	w.Close("figure")
}

// Values converts a sweep column; a null entry becomes NaN, a gap in a
// chart.
func Values(v []*api.Complex) []complex128 {
	out := make([]complex128, len(v))
	for i, c := range v {
		out[i] = c.Value()
	}
	return out
}
