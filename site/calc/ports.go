package calc

import (
	"strconv"
	"strings"
	"unicode/utf8"

	"zport/engine/api"
	"zport/engine/numeric"
	"zport/site/plot"
	"zport/site/view"
)

// ports is the port-impedance analysis: Blackman's three terms and Z of
// every port beside the direct nodal solution and the hand formulas, and
// |Z| over the sweep. The ports themselves are part of the base request
// (a stage's own, or the custom page's picks).
var ports = Analysis{
	Key:     "ports",
	Title:   "Port impedances",
	Section: portsSection,
	Columns: portsColumns,
	Copy:    portsCopy,
	Compare: portsCompared,
}

var portColumns = []struct{ label, hint string }{
	{"Z₀", "reference gain zero"},
	{"T short", "port shorted"},
	{"T open", "port open"},
	{"Z", "Blackman"},
	{"Z direct", "nodal solution"},
	{"Agreement", "relative difference"},
}

func portsSection(w *view.Writer, c *Context) {
	r := c.Resp
	if len(r.Ports) == 0 {
		return
	}
	w.Section(c.ID, "ports", "Port impedances")
	if r.Reference == "" {
		w.Explain("Direct nodal solution: without a reference element (a controlled source or an op amp) Blackman’s terms are not defined. Each value as magnitude ∠ phase, as real + j imaginary, and as the equivalent series pair at the spot frequency.")
	} else {
		w.Explain("Blackman’s formula: Z = Z₀ · (1 + T short) / (1 + T open), checked against a direct nodal solution. Each value as magnitude ∠ phase, as real + j imaginary, and for impedances as the equivalent series pair at the spot frequency.")
	}
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "results ports-table")
	w.Open("thead")
	w.Open("tr")
	w.Elem("th", "Port", "scope", "col")
	for _, col := range portColumns {
		w.Open("th", "scope", "col")
		w.Text(col.label)
		w.Elem("span", col.hint, "class", "hint")
		w.Close("th")
	}
	w.Close("tr")
	w.Close("thead")
	f := r.Frequency
	for _, pr := range r.Ports {
		w.Open("tbody", "data-port", pr.Name)
		w.Open("tr", "class", "engine")
		w.Open("th", "scope", "row")
		w.Elem("span", pr.Name, "class", "port-name")
		if t := portTitle(c.Entry, pr.Name); t != "" {
			w.Elem("span", t, "class", "hint")
		}
		w.Elem("span", pr.A+" – "+pr.B, "class", "hint nodes")
		w.Close("th")
		q := func(name string) []string { return []string{"data-port", pr.Name, "data-quantity", name} }
		w.Cell("Z₀", view.Complex{Z: pr.Z0, Unit: "Ω", Series: true, At: f, Attrs: q("z0"), Bounded: true, Err: pr.Errors.Z0})
		w.Cell("T short", view.Complex{Z: pr.TShort, Attrs: q("tShort"), Bounded: true, Err: pr.Errors.TShort})
		w.Cell("T open", view.Complex{Z: pr.TOpen, Attrs: q("tOpen"), Bounded: true, Err: pr.Errors.TOpen})
		w.Open("td", "data-label", "Z")
		w.Complex(view.Complex{Z: pr.Z, Unit: "Ω", Series: true, At: f, Attrs: q("z"), Bounded: true, Err: pr.Errors.Z})
		if pr.Z == nil && pr.Y != nil {
			w.Elem("span", "Z is not finite here; the admittance is", "class", "hint")
			w.Complex(view.Complex{Z: pr.Y, Unit: "S", Attrs: q("y"), Bounded: true, Err: pr.Errors.Y})
		}
		w.Close("td")
		w.Cell("Z direct", view.Complex{Z: pr.ZDirect, Unit: "Ω", Series: true, At: f, Attrs: q("zDirect"), Bounded: true, Err: pr.Errors.ZDirect})
		w.Open("td", "data-label", "Agreement")
		w.Ratio(pr.Agreement, pr.Errors.Agreement, q("agreement")...)
		w.Close("td")
		w.Close("tr")
		if pf := portForms(r, pr.Name); pf != nil {
			closedRow(w, pr, pf, f)
		}
		w.Close("tbody")
	}
	w.Close("table")
	w.Close("div")
	c.Comparison(w)
	formulaList(w, r)
	if charts := portCharts(c); len(charts) > 0 {
		w.Figures(charts...)
	}
	w.Close("section")
}

// portTitle is the catalog's description of a port, or "".
func portTitle(entry *api.CatalogEntry, name string) string {
	if entry != nil {
		for _, pi := range entry.Ports {
			if pi.Name == name {
				return pi.Title
			}
		}
	}
	return ""
}

// portForms are the hand formulas of a port, nil where there are none.
func portForms(r *api.Response, name string) *api.PortFormulas {
	t := r.Topology
	if t == nil || t.ClosedForm == nil {
		return nil
	}
	for i := range t.ClosedForm.Ports {
		if t.ClosedForm.Ports[i].Name == name {
			return &t.ClosedForm.Ports[i]
		}
	}
	return nil
}

// closedRow writes the hand formulas' values under a port's engine row.
func closedRow(w *view.Writer, pr api.PortResult, f *api.PortFormulas, freq float64) {
	w.Open("tr", "class", "closed")
	w.Open("th", "scope", "row")
	w.Elem("span", "hand formula", "class", "hint")
	w.Close("th")
	one := func(label, q string, fm *api.Formula, unit string, imp bool) {
		w.Open("td", "data-label", label+" (hand)")
		if fm == nil {
			w.Elem("span", "no closed form", "class", "hint")
		} else {
			w.Complex(view.Complex{Z: fm.Value, Unit: unit, Series: imp, At: freq, Attrs: []string{"data-port", pr.Name, "data-closed-form", q}})
		}
		w.Close("td")
	}
	one("Z₀", "z0", f.Z0, "Ω", true)
	one("T short", "tShort", f.TShort, "", false)
	one("T open", "tOpen", f.TOpen, "", false)
	one("Z", "z", f.Z, "Ω", true)
	w.Open("td", "data-label", "Z direct (hand)")
	w.Close("td")
	w.Open("td", "data-label", "Hand vs engine")
	var d *float64
	if f.Z != nil && f.Z.Value != nil && pr.Z != nil {
		d = api.F(numeric.RelDiff(f.Z.Value.Value(), pr.Z.Value()))
	}
	w.Ratio(d, nil, "data-port", pr.Name, "data-closed-form", "agreement", "title", "|Z hand − Z| / |Z|")
	w.Close("td")
	w.Close("tr")
}

// formulaList writes the text and source of every port's closed forms.
func formulaList(w *view.Writer, r *api.Response) {
	t := r.Topology
	if t == nil || t.ClosedForm == nil || len(t.ClosedForm.Ports) == 0 {
		return
	}
	w.Open("details", "class", "formulas")
	w.Elem("summary", "Hand formulas and their sources")
	w.Open("dl")
	for _, pf := range t.ClosedForm.Ports {
		for _, x := range []struct {
			sym string
			f   *api.Formula
		}{{"Z₀", pf.Z0}, {"T short", pf.TShort}, {"T open", pf.TOpen}, {"Z", pf.Z}} {
			if x.f != nil {
				w.Formula(pf.Name+": "+x.sym, x.f)
			}
		}
	}
	w.Close("dl")
	w.Close("details")
}

// portCharts are |Z| and its phase over the sweep, one chart a port.
func portCharts(c *Context) []string {
	r := c.Resp
	s := r.Sweep
	if s == nil || len(s.Frequency) == 0 {
		return nil
	}
	var out []string
	for i, ps := range s.Ports {
		traces := []plot.Trace{
			{Name: "Z (Blackman)", Class: "z", Values: view.Values(ps.Z)},
			{Name: "Z₀ (reference gain zero)", Class: "z0", Values: view.Values(ps.Z0), Dashed: true},
		}
		pinned := func(r *api.Response) []*api.Complex { return sweepPort(r, ps.Name).Z }
		if r.Reference == "" {
			// No reference: the direct solution is all there is.
			traces = []plot.Trace{{Name: "Z direct", Class: "z", Values: view.Values(ps.ZDirect)}}
			pinned = func(r *api.Response) []*api.Complex { return sweepPort(r, ps.Name).ZDirect }
		}
		b := plot.Bode{
			ID:      c.ID + "-plot-port" + strconv.Itoa(i),
			Title:   portChartTitle(ps.Name, portTitle(c.Entry, ps.Name)),
			Freq:    s.Frequency,
			MagUnit: "Ω",
			Traces:  append(traces, c.BodePins("Z", pinned)...),
			Markers: spotMarker(r),
			NoStyle: true,
		}
		b.Width, b.Height = c.ChartSize(640, 400)
		out = append(out, b.SVG())
	}
	return out
}

// maxChartTitle is the longest chart title, in characters, that fits on
// one line of a 640-unit chart in a wide sans-serif (DejaVu Sans, Debian's
// default, measured in Chromium: 76 characters fit, 98 were clipped). The
// chart does not wrap its title.
const maxChartTitle = 76

// portChartTitle names a port's impedance chart with the port's
// description when it fits, else with the description's main clause (the
// text before a parenthesis inside it), else with the port's name alone;
// the results table above always carries the whole description.
func portChartTitle(name, desc string) string {
	title := "|Z| and phase at port " + name
	if desc == "" {
		return title
	}
	if full := title + " (" + desc + ")"; utf8.RuneCountInString(full) <= maxChartTitle {
		return full
	}
	if i := strings.Index(desc, " ("); i > 0 {
		if short := title + " (" + desc[:i] + ")"; utf8.RuneCountInString(short) <= maxChartTitle {
			return short
		}
	}
	return title
}

// sweepPort is the sweep of port name in r, empty when r has none.
func sweepPort(r *api.Response, name string) api.PortSweep {
	if r.Sweep != nil {
		for _, p := range r.Sweep.Ports {
			if p.Name == name {
				return p
			}
		}
	}
	return api.PortSweep{}
}

// portsCompared compares each port's Z with the pins' Z at the port of
// the same name.
func portsCompared(c *Context) []Compared {
	var rows []Compared
	direct := c.Resp.Reference == "" // no reference: the direct solution
	for _, pr := range c.Resp.Ports {
		name := pr.Name
		rows = append(rows, Compared{ID: "z:" + name, Label: "Z at " + name, Unit: "Ω",
			Complex: func(r *api.Response) *api.Complex {
				for _, p := range r.Ports {
					if p.Name == name && direct {
						return p.ZDirect
					}
					if p.Name == name {
						return p.Z
					}
				}
				return nil
			}})
	}
	return rows
}

// portsColumns are each port's five terms.
func portsColumns(c *Context) []Column {
	r := c.Resp
	var cols []Column
	if s := r.Sweep; s != nil {
		for _, ps := range s.Ports {
			cols = append(cols, portColumnSet(ps.Name, ps.Z0, ps.TShort, ps.TOpen, ps.Z, ps.ZDirect)...)
		}
		return cols
	}
	for _, pr := range r.Ports {
		one := func(z *api.Complex) []*api.Complex { return []*api.Complex{z} }
		cols = append(cols, portColumnSet(pr.Name, one(pr.Z0), one(pr.TShort), one(pr.TOpen), one(pr.Z), one(pr.ZDirect))...)
	}
	return cols
}

func portColumnSet(name string, z0, tShort, tOpen, z, zDirect []*api.Complex) []Column {
	return []Column{
		{Name: name + ".z0", Unit: "Ω", Complex: z0},
		{Name: name + ".tShort", Complex: tShort},
		{Name: name + ".tOpen", Complex: tOpen},
		{Name: name + ".z", Unit: "Ω", Complex: z},
		{Name: name + ".zDirect", Unit: "Ω", Complex: zDirect},
	}
}

func portsCopy(m *Markdown, c *Context) {
	r := c.Resp
	if len(r.Ports) == 0 {
		return
	}
	var rows [][]string
	for _, pr := range r.Ports {
		row := func(q string, z *api.Complex, unit string, imp bool) {
			mag, re, ser := "—", "—", ""
			if z != nil {
				mag, re = view.Polar(z.Value(), unit), view.Rect(z.Value(), unit)
				if imp {
					ser = view.SeriesElement(z.Value(), r.Frequency)
				}
			}
			rows = append(rows, []string{MD(pr.Name), q, mag, re, ser})
		}
		row("Z₀", pr.Z0, "Ω", true)
		row("T short", pr.TShort, "", false)
		row("T open", pr.TOpen, "", false)
		row("Z (Blackman)", pr.Z, "Ω", true)
		row("Z direct", pr.ZDirect, "Ω", true)
	}
	m.Table([]string{"Port", "Quantity", "Magnitude ∠ phase", "Real + j imaginary", "Series element"}, rows...)
}
