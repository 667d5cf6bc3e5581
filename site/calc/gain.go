package calc

import (
	"zport/engine/api"
	"zport/engine/numeric"
	"zport/site/plot"
	"zport/site/view"
)

// gain is the closed-loop gain by the asymptotic gain model, beside the
// direct nodal solution and the hand formula, and over the sweep. The gain
// itself (source and output) is part of the base request.
var gain = Analysis{
	Key:     "gain",
	Title:   "Gain",
	Section: gainSection,
	Columns: gainColumns,
	Copy:    gainCopy,
	Compare: gainCompared,
}

func gainSection(w *view.Writer, c *Context) {
	r := c.Resp
	g := r.Gain
	if g == nil {
		return
	}
	title := "Gain"
	if c.Entry != nil && c.Entry.Gain != nil && c.Entry.Gain.Title != "" {
		title = "Gain: " + c.Entry.Gain.Title
	}
	w.Section(c.ID, "gain", title)
	w.Open("p", "class", "explain")
	if r.Reference == "" {
		w.Text("Direct nodal solution, from ")
	} else {
		w.Text("Asymptotic gain model, from ")
	}
	w.Elem("code", g.Source)
	w.Text(" to ")
	w.Elem("code", g.Output)
	if r.Reference == "" {
		w.Text(" in " + g.Unit + ": without a reference element the asymptotic gain model’s terms are not defined.")
	} else {
		w.Text(" in " + g.Unit + ": g = g∞ · T/(1 + T) + g₀/(1 + T).")
	}
	w.Close("p")
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "results gain-table")
	w.Open("thead")
	w.Open("tr")
	w.Elem("th", "", "scope", "col")
	for _, h := range []struct{ l, h string }{{"g₀", "feedthrough, reference gain zero"}, {"g∞", "ideal, reference gain infinite"}, {"g", "asymptotic gain model"}, {"g direct", "nodal solution"}, {"Agreement", "relative difference"}} {
		w.Open("th", "scope", "col")
		w.Text(h.l)
		w.Elem("span", h.h, "class", "hint")
		w.Close("th")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	w.Open("tr", "class", "engine")
	w.Elem("th", "engine", "scope", "row")
	unit := g.Unit
	val := func(z *api.Complex, attrs ...string) view.Complex {
		return view.Complex{Z: z, Unit: unit, DB: unit == "V/V", Attrs: attrs}
	}
	engine := func(z *api.Complex, err *float64, q string) view.Complex {
		v := val(z, "data-quantity", q)
		v.Bounded, v.Err = true, err
		return v
	}
	w.Cell("g₀", engine(g.G0, g.Errors.G0, "g0"))
	w.Cell("g∞", engine(g.GInf, g.Errors.GInf, "gInf"))
	w.Cell("g", engine(g.G, g.Errors.G, "g"))
	w.Cell("g direct", engine(g.GDirect, g.Errors.GDirect, "gDirect"))
	w.Open("td", "data-label", "Agreement")
	w.Ratio(g.Agreement, g.Errors.Agreement, "data-quantity", "gainAgreement")
	w.Close("td")
	w.Close("tr")
	form := gainForm(r)
	if form != nil {
		w.Open("tr", "class", "closed")
		w.Open("th", "scope", "row")
		w.Elem("span", "hand formula", "class", "hint")
		w.Close("th")
		for _, l := range []string{"g₀ (hand)", "g∞ (hand)"} {
			w.Open("td", "data-label", l)
			w.Close("td")
		}
		w.Cell("g (hand)", val(form.Value, "data-closed-form", "g"))
		w.Open("td", "data-label", "g direct (hand)")
		w.Close("td")
		w.Open("td", "data-label", "Hand vs engine")
		var d *float64
		if form.Value != nil && g.G != nil {
			d = api.F(numeric.RelDiff(form.Value.Value(), g.G.Value()))
		}
		w.Ratio(d, nil, "data-closed-form", "gainAgreement", "title", "|g hand − g| / |g|")
		w.Close("td")
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
	c.Comparison(w)
	if form != nil {
		w.Open("details", "class", "formulas")
		w.Elem("summary", "Hand formula and its source")
		w.Open("dl")
		w.Formula("g", form)
		w.Close("dl")
		w.Close("details")
	}
	if s := r.Sweep; s != nil && s.Gain != nil && len(s.Frequency) > 0 {
		mag := "dB"
		if unit != "V/V" {
			mag = unit
		}
		traces := []plot.Trace{
			{Name: "g", Class: "g", Values: view.Values(s.Gain.G)},
			{Name: "g∞ (ideal)", Class: "ginf", Values: view.Values(s.Gain.GInf), Dashed: true},
		}
		direct := r.Reference == ""
		if direct {
			// No reference: the direct solution is all there is.
			traces = []plot.Trace{{Name: "g direct", Class: "g", Values: view.Values(s.Gain.GDirect)}}
		}
		b := plot.Bode{
			ID:      c.ID + "-plot-gain",
			Title:   "Closed-loop gain " + g.Source + " → " + g.Output + " (" + unit + ")",
			Freq:    s.Frequency,
			MagUnit: mag,
			Traces: append(traces, c.BodePins("g", func(r *api.Response) []*api.Complex {
				switch {
				case r.Sweep.Gain == nil:
					return nil
				case direct:
					return r.Sweep.Gain.GDirect
				}
				return r.Sweep.Gain.G
			})...),
			Markers: spotMarker(r),
			NoStyle: true,
		}
		b.Width, b.Height = c.ChartSize(640, 400)
		w.Figures(b.SVG())
	}
	w.Close("section")
}

// gainForm is the stage's hand formula for the gain, or nil.
func gainForm(r *api.Response) *api.Formula {
	if t := r.Topology; t != nil && t.ClosedForm != nil {
		return t.ClosedForm.Gain
	}
	return nil
}

func gainColumns(c *Context) []Column {
	r := c.Resp
	if r.Gain == nil {
		return nil
	}
	unit := r.Gain.Unit
	set := func(g0, gInf, g, gDirect []*api.Complex) []Column {
		return []Column{{Name: "gain.g0", Unit: unit, Complex: g0}, {Name: "gain.gInf", Unit: unit, Complex: gInf},
			{Name: "gain.g", Unit: unit, Complex: g}, {Name: "gain.gDirect", Unit: unit, Complex: gDirect}}
	}
	if s := r.Sweep; s != nil {
		if s.Gain == nil {
			return nil
		}
		return set(s.Gain.G0, s.Gain.GInf, s.Gain.G, s.Gain.GDirect)
	}
	g := r.Gain
	one := func(z *api.Complex) []*api.Complex { return []*api.Complex{z} }
	return set(one(g.G0), one(g.GInf), one(g.G), one(g.GDirect))
}

func gainCopy(m *Markdown, c *Context) {
	g := c.Resp.Gain
	if g == nil {
		return
	}
	var rows [][]string
	for _, x := range []struct {
		q string
		z *api.Complex
	}{{"g₀", g.G0}, {"g∞", g.GInf}, {"g", g.G}, {"g direct", g.GDirect}} {
		mag, re := "—", "—"
		if x.z != nil {
			mag, re = view.Polar(x.z.Value(), g.Unit), view.Rect(x.z.Value(), g.Unit)
		}
		rows = append(rows, []string{x.q, mag, re})
	}
	m.Table([]string{"Gain " + MD(g.Source) + " → " + MD(g.Output), "Magnitude ∠ phase", "Real + j imaginary"}, rows...)
}

// gainCompared compares g with the pins' g.
func gainCompared(c *Context) []Compared {
	g := c.Resp.Gain
	if g == nil {
		return nil
	}
	direct := c.Resp.Reference == "" // no reference: the direct solution
	return []Compared{{ID: "g", Label: "g, " + g.Source + " → " + g.Output, Unit: g.Unit,
		Complex: func(r *api.Response) *api.Complex {
			switch {
			case r.Gain == nil:
				return nil
			case direct:
				return r.Gain.GDirect
			}
			return r.Gain.G
		}}}
}
