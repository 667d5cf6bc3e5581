package render

import (
	"math"
	"math/cmplx"

	"zport/engine/api"
	"zport/engine/value"
)

// Panel writes the results panel for resp. entry is the catalog entry of
// the topology the response is for, or nil for a circuit of the user's own;
// id prefixes the element ids inside the panel.
func Panel(resp *api.Response, entry *api.CatalogEntry, id string) string {
	if id == "" {
		id = "calc"
	}
	p := &panel{resp: resp, entry: entry, id: id}
	p.write()
	return p.w.String()
}

type panel struct {
	w     writer
	resp  *api.Response
	entry *api.CatalogEntry
	id    string
}

// cval describes one displayed complex value.
type cval struct {
	z        *api.Complex
	unit     string // "Ω", "", "V/V", "V/A"
	attrs    []string
	impedant bool // show the equivalent series element
	dB       bool // show 20·log10|z|
	// bounded marks an engine value, whose error bound is err: nil then
	// means that no bound could be given (the notes say why). A closed
	// form has none and is shown as it is.
	bounded bool
	err     *float64
}

// engine returns c as an engine value with error bound err.
func (c cval) engine(err *float64) cval {
	c.bounded, c.err = true, err
	return c
}

func (p *panel) write() {
	r := p.resp
	w := &p.w
	w.open("div", "class", "panel", "id", p.id+"-panel", "data-frequency", num(r.Frequency), "data-reference", r.Reference)
	w.open("p", "class", "panel-head")
	w.text("Results at ")
	w.elem("strong", value.Format(r.Frequency, "Hz", sig))
	if r.Reference != "" {
		w.text("; return ratios are those of ")
		w.elem("code", r.Reference)
	}
	w.text(".")
	w.close("p")
	p.ports()
	p.gain()
	p.loop()
	p.extras()
	p.notes()
	p.plots()
	p.circuit()
	w.close("div")
}

// value writes one complex value with its data attributes.
func (p *panel) value(c cval) {
	w := &p.w
	attrs := append([]string{"class", "cv"}, c.attrs...)
	if c.z == nil {
		attrs = append(attrs, "data-null", "true")
		w.open("span", attrs...)
		w.elem("span", "—", "class", "polar", "title", "not finite here; see the notes")
		w.close("span")
		return
	}
	z := c.z.Value()
	attrs = append(attrs, "data-re", num(c.z.Re), "data-im", num(c.z.Im))
	digits, e := sig, 0.0
	switch {
	case c.bounded && c.err == nil:
		attrs[1] = "cv untrusted"
		w.open("span", attrs...)
		w.elem("span", polar(z, c.unit), "class", "polar")
		w.elem("span", "cannot be trusted; see the notes", "class", "hint")
		w.close("span")
		return
	case c.bounded:
		e = *c.err
		attrs = append(attrs, "data-error", num(e))
		if e >= cmplx.Abs(z) {
			// Zero within its bound: an exact zero where the structure
			// makes it one (a bound of 0), else zero below the bound —
			// never the digits of rounding noise.
			w.open("span", attrs...)
			w.elem("span", magnitude(0, c.unit), "class", "polar")
			if e > 0 {
				w.elem("span", "below ±"+magnitude(e, c.unit), "class", "rect bound")
			}
			w.close("span")
			return
		}
		digits = min(sig, certainDigits(z, e))
	}
	w.open("span", attrs...)
	w.elem("span", polarN(z, c.unit, digits), "class", "polar")
	if c.dB {
		w.elem("span", decibels(z), "class", "db")
	}
	w.elem("span", rectN(z, c.unit, digits, e), "class", "rect")
	if c.impedant {
		w.elem("span", SeriesElement(z, p.resp.Frequency), "class", "series", "title", "equivalent series element at "+value.Format(p.resp.Frequency, "Hz", sig))
	}
	w.close("span")
}

// ratio writes a relative difference such as an agreement; bound, when
// not nil, is what the values' error bounds allow it to be, and an
// agreement within that is zero within rounding.
func (p *panel) ratio(x, bound *float64, attrs ...string) {
	w := &p.w
	if x == nil {
		w.open("span", append(append([]string{"class", "agree"}, attrs...), "data-null", "true")...)
		w.text("—")
		w.close("span")
		return
	}
	class := "agree"
	if *x > 1e-6 && (bound == nil || *x > *bound) {
		class = "agree poor"
	}
	if bound != nil {
		attrs = append(attrs, "data-error", num(*bound))
		if *x <= *bound {
			w.open("span", append(append([]string{"class", class}, attrs...), "data-value", num(*x))...)
			w.text("0")
			if *bound > 0 {
				mant, exp := sci(*bound)
				w.open("span", "class", "hint bound")
				w.text("below ±" + mant)
				if exp != "" {
					w.text(" × 10")
					w.elem("sup", exp)
				}
				w.close("span")
			}
			w.close("span")
			return
		}
	}
	w.open("span", append(append([]string{"class", class}, attrs...), "data-value", num(*x))...)
	mant, exp := sci(*x)
	w.text(mant)
	if exp != "" {
		w.text(" × 10")
		w.elem("sup", exp)
	}
	w.close("span")
}

// portTitle is the catalog's description of a port, or its name.
func (p *panel) portTitle(name string) string {
	if p.entry != nil {
		for _, pi := range p.entry.Ports {
			if pi.Name == name {
				return pi.Title
			}
		}
	}
	return ""
}

func (p *panel) portForms(name string) *api.PortFormulas {
	t := p.resp.Topology
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

var portColumns = []struct{ label, hint string }{
	{"Z₀", "reference gain zero"},
	{"T short", "port shorted"},
	{"T open", "port open"},
	{"Z", "Blackman"},
	{"Z direct", "nodal solution"},
	{"Agreement", "relative difference"},
}

func (p *panel) ports() {
	r := p.resp
	if len(r.Ports) == 0 {
		return
	}
	w := &p.w
	h := p.id + "-ports-h"
	w.open("section", "class", "block ports", "aria-labelledby", h)
	w.elem("h3", "Port impedances", "id", h)
	w.open("p", "class", "explain")
	w.text("Blackman’s formula: Z = Z₀ · (1 + T short) / (1 + T open), checked against a direct nodal solution. Each value as magnitude ∠ phase, as real + j imaginary, and for impedances as the equivalent series pair at the spot frequency.")
	w.close("p")
	w.open("div", "class", "table-wrap")
	w.open("table", "class", "results ports-table")
	w.open("thead")
	w.open("tr")
	w.elem("th", "Port", "scope", "col")
	for _, c := range portColumns {
		w.open("th", "scope", "col")
		w.text(c.label)
		w.elem("span", c.hint, "class", "hint")
		w.close("th")
	}
	w.close("tr")
	w.close("thead")
	for _, pr := range r.Ports {
		w.open("tbody", "data-port", pr.Name)
		w.open("tr", "class", "engine")
		w.open("th", "scope", "row")
		w.elem("span", pr.Name, "class", "port-name")
		if t := p.portTitle(pr.Name); t != "" {
			w.elem("span", t, "class", "hint")
		}
		w.elem("span", pr.A+" – "+pr.B, "class", "hint nodes")
		w.close("th")
		p.cell("Z₀", cval{z: pr.Z0, unit: "Ω", impedant: true, attrs: []string{"data-port", pr.Name, "data-quantity", "z0"}}.engine(pr.Errors.Z0))
		p.cell("T short", cval{z: pr.TShort, attrs: []string{"data-port", pr.Name, "data-quantity", "tShort"}}.engine(pr.Errors.TShort))
		p.cell("T open", cval{z: pr.TOpen, attrs: []string{"data-port", pr.Name, "data-quantity", "tOpen"}}.engine(pr.Errors.TOpen))
		w.open("td", "data-label", "Z")
		p.value(cval{z: pr.Z, unit: "Ω", impedant: true, attrs: []string{"data-port", pr.Name, "data-quantity", "z"}}.engine(pr.Errors.Z))
		if pr.Z == nil && pr.Y != nil {
			w.elem("span", "Z is not finite here; the admittance is", "class", "hint")
			p.value(cval{z: pr.Y, unit: "S", attrs: []string{"data-port", pr.Name, "data-quantity", "y"}}.engine(pr.Errors.Y))
		}
		w.close("td")
		p.cell("Z direct", cval{z: pr.ZDirect, unit: "Ω", impedant: true, attrs: []string{"data-port", pr.Name, "data-quantity", "zDirect"}}.engine(pr.Errors.ZDirect))
		w.open("td", "data-label", "Agreement")
		p.ratio(pr.Agreement, pr.Errors.Agreement, "data-port", pr.Name, "data-quantity", "agreement")
		w.close("td")
		w.close("tr")
		if f := p.portForms(pr.Name); f != nil {
			p.closedRow(pr, f)
		}
		w.close("tbody")
	}
	w.close("table")
	w.close("div")
	p.formulaList()
	w.close("section")
}

func (p *panel) cell(label string, c cval) {
	p.w.open("td", "data-label", label)
	p.value(c)
	p.w.close("td")
}

// closedRow writes the hand formulas' values under a port's engine row.
func (p *panel) closedRow(pr api.PortResult, f *api.PortFormulas) {
	w := &p.w
	w.open("tr", "class", "closed")
	w.open("th", "scope", "row")
	w.elem("span", "hand formula", "class", "hint")
	w.close("th")
	one := func(label, q string, fm *api.Formula, unit string, imp bool) {
		w.open("td", "data-label", label+" (hand)")
		if fm == nil {
			w.elem("span", "no closed form", "class", "hint")
		} else {
			p.value(cval{z: fm.Value, unit: unit, impedant: imp, attrs: []string{"data-port", pr.Name, "data-closed-form", q}})
		}
		w.close("td")
	}
	one("Z₀", "z0", f.Z0, "Ω", true)
	one("T short", "tShort", f.TShort, "", false)
	one("T open", "tOpen", f.TOpen, "", false)
	one("Z", "z", f.Z, "Ω", true)
	w.open("td", "data-label", "Z direct (hand)")
	w.close("td")
	w.open("td", "data-label", "Hand vs engine")
	var d *float64
	if f.Z != nil && f.Z.Value != nil && pr.Z != nil {
		d = api.F(relDiff(f.Z.Value.Value(), pr.Z.Value()))
	}
	p.ratio(d, nil, "data-port", pr.Name, "data-closed-form", "agreement", "title", "|Z hand − Z| / |Z|")
	w.close("td")
	w.close("tr")
}

func relDiff(a, b complex128) float64 {
	d := cmplx.Abs(a - b)
	if d == 0 {
		return 0
	}
	return d / math.Max(cmplx.Abs(a), cmplx.Abs(b))
}

// formulaList writes the text and source of every closed form shown.
func (p *panel) formulaList() {
	t := p.resp.Topology
	if t == nil || t.ClosedForm == nil || len(t.ClosedForm.Ports) == 0 {
		return
	}
	w := &p.w
	w.open("details", "class", "formulas")
	w.elem("summary", "Hand formulas and their sources")
	w.open("dl")
	for _, pf := range t.ClosedForm.Ports {
		for _, x := range []struct {
			sym string
			f   *api.Formula
		}{{"Z₀", pf.Z0}, {"T short", pf.TShort}, {"T open", pf.TOpen}, {"Z", pf.Z}} {
			if x.f == nil {
				continue
			}
			p.formula(pf.Name+": "+x.sym, x.f)
		}
	}
	w.close("dl")
	w.close("details")
}

func (p *panel) formula(label string, f *api.Formula) {
	w := &p.w
	w.open("div")
	w.elem("dt", label)
	w.open("dd")
	w.elem("code", f.Text)
	if f.Source != "" {
		w.elem("span", f.Source, "class", "source")
	}
	w.close("dd")
	w.close("div")
}

func (p *panel) gain() {
	g := p.resp.Gain
	if g == nil {
		return
	}
	w := &p.w
	h := p.id + "-gain-h"
	w.open("section", "class", "block gain", "aria-labelledby", h)
	title := "Gain"
	if p.entry != nil && p.entry.Gain != nil && p.entry.Gain.Title != "" {
		title = "Gain: " + p.entry.Gain.Title
	}
	w.elem("h3", title, "id", h)
	w.open("p", "class", "explain")
	w.text("Asymptotic gain model, from ")
	w.elem("code", g.Source)
	w.text(" to ")
	w.elem("code", g.Output)
	w.text(" in " + g.Unit + ": g = g∞ · T/(1 + T) + g₀/(1 + T).")
	w.close("p")
	w.open("div", "class", "table-wrap")
	w.open("table", "class", "results gain-table")
	w.open("thead")
	w.open("tr")
	w.elem("th", "", "scope", "col")
	for _, c := range []struct{ l, h string }{{"g₀", "feedthrough, reference gain zero"}, {"g∞", "ideal, reference gain infinite"}, {"g", "asymptotic gain model"}, {"g direct", "nodal solution"}, {"Agreement", "relative difference"}} {
		w.open("th", "scope", "col")
		w.text(c.l)
		w.elem("span", c.h, "class", "hint")
		w.close("th")
	}
	w.close("tr")
	w.close("thead")
	w.open("tbody")
	w.open("tr", "class", "engine")
	w.elem("th", "engine", "scope", "row")
	unit := g.Unit
	p.cell("g₀", cval{z: g.G0, unit: unit, dB: unit == "V/V", attrs: []string{"data-quantity", "g0"}}.engine(g.Errors.G0))
	p.cell("g∞", cval{z: g.GInf, unit: unit, dB: unit == "V/V", attrs: []string{"data-quantity", "gInf"}}.engine(g.Errors.GInf))
	p.cell("g", cval{z: g.G, unit: unit, dB: unit == "V/V", attrs: []string{"data-quantity", "g"}}.engine(g.Errors.G))
	p.cell("g direct", cval{z: g.GDirect, unit: unit, dB: unit == "V/V", attrs: []string{"data-quantity", "gDirect"}}.engine(g.Errors.GDirect))
	w.open("td", "data-label", "Agreement")
	p.ratio(g.Agreement, g.Errors.Agreement, "data-quantity", "gainAgreement")
	w.close("td")
	w.close("tr")
	if t := p.resp.Topology; t != nil && t.ClosedForm != nil && t.ClosedForm.Gain != nil {
		f := t.ClosedForm.Gain
		w.open("tr", "class", "closed")
		w.open("th", "scope", "row")
		w.elem("span", "hand formula", "class", "hint")
		w.close("th")
		w.open("td", "data-label", "g₀ (hand)")
		w.close("td")
		w.open("td", "data-label", "g∞ (hand)")
		w.close("td")
		p.cell("g (hand)", cval{z: f.Value, unit: unit, dB: unit == "V/V", attrs: []string{"data-closed-form", "g"}})
		w.open("td", "data-label", "g direct (hand)")
		w.close("td")
		w.open("td", "data-label", "Hand vs engine")
		var d *float64
		if f.Value != nil && g.G != nil {
			d = api.F(relDiff(f.Value.Value(), g.G.Value()))
		}
		p.ratio(d, nil, "data-closed-form", "gainAgreement", "title", "|g hand − g| / |g|")
		w.close("td")
		w.close("tr")
	}
	w.close("tbody")
	w.close("table")
	w.close("div")
	if t := p.resp.Topology; t != nil && t.ClosedForm != nil && t.ClosedForm.Gain != nil {
		w.open("details", "class", "formulas")
		w.elem("summary", "Hand formula and its source")
		w.open("dl")
		p.formula("g", t.ClosedForm.Gain)
		w.close("dl")
		w.close("details")
	}
	w.close("section")
}

// verdictClass maps the engine's verdicts onto the panel's styles.
func verdictClass(v string) string {
	switch v {
	case "stable":
		return "verdict ok"
	case "margin below 45°":
		return "verdict low"
	case "unstable":
		return "verdict bad"
	}
	return "verdict none"
}

func (p *panel) loop() {
	r := p.resp
	w := &p.w
	h := p.id + "-loop-h"
	w.open("section", "class", "block loop", "aria-labelledby", h)
	w.elem("h3", "Loop", "id", h)
	w.open("dl", "class", "kv")

	w.open("div")
	w.open("dt")
	w.text("Return ratio T at " + value.Format(r.Frequency, "Hz", sig))
	w.close("dt")
	w.open("dd")
	p.value(cval{z: r.ReturnRatio, dB: true, attrs: []string{"data-quantity", "T"}}.engine(r.ReturnRatioError))
	w.close("dd")
	w.close("div")

	var tForm *api.Formula
	if t := r.Topology; t != nil && t.ClosedForm != nil && t.ClosedForm.ReturnRatio != nil {
		tForm = t.ClosedForm.ReturnRatio
		w.open("div")
		w.elem("dt", "T by hand formula")
		w.open("dd")
		p.value(cval{z: tForm.Value, dB: true, attrs: []string{"data-closed-form", "T"}})
		w.close("dd")
		w.close("div")
	}

	if m := r.Margins; m != nil {
		real := func(dt, q string, x *float64, text func(float64) string, none string) {
			w.open("div")
			w.elem("dt", dt)
			w.open("dd")
			if x == nil {
				w.elem("span", none, "class", "none", "data-quantity", q, "data-null", "true")
			} else {
				w.elem("span", text(*x), "data-quantity", q, "data-value", num(*x))
			}
			w.close("dd")
			w.close("div")
		}
		real("Crossover, |T| = 1", "fc", m.Crossover, func(x float64) string { return value.Format(x, "Hz", sig) }, "none in the sweep")
		real("Phase margin", "pm", m.PhaseMargin, degrees, "—")
		real("Gain margin", "gm", m.GainMargin, dB, "phase does not reach −180° in the sweep")
		w.open("div")
		w.elem("dt", "Verdict")
		w.open("dd")
		w.elem("strong", m.Verdict, "class", verdictClass(m.Verdict), "data-quantity", "verdict")
		if m.VerdictDetail != "" {
			w.text(" ")
			w.elem("span", m.VerdictDetail, "class", "detail")
		}
		w.close("dd")
		w.close("div")
		if len(m.Crossovers) > 1 {
			w.open("div")
			w.elem("dt", "All crossovers")
			w.open("dd")
			w.open("ul", "class", "inline-list")
			for _, c := range m.Crossovers {
				w.elem("li", value.Format(c.Frequency, "Hz", sig)+" (|T| "+map[bool]string{true: "falling", false: "rising"}[c.Direction == "down"]+", phase margin "+degrees(c.PhaseMargin)+")")
			}
			w.close("ul")
			w.close("dd")
			w.close("div")
		}
	}
	w.close("dl")
	if tForm != nil {
		w.open("details", "class", "formulas")
		w.elem("summary", "Hand formula for T and its source")
		w.open("dl")
		p.formula("T", tForm)
		w.close("dl")
		w.close("details")
	}
	if r.Margins != nil {
		w.open("p", "class", "targets")
		w.text("Targets: a phase margin of at least 45°, and about 60° for a well-damped step response, are ")
		w.elem("em", "common practice")
		w.text(" rather than a published rule. Phase margin is 180° + ∠T at the crossover, with the phase of T followed continuously from the lowest frequency of the sweep; gain margin is −20·log₁₀|T| where that phase reaches −180°.")
		w.close("p")
	}
	w.close("section")
}

func (p *panel) extras() {
	t := p.resp.Topology
	if t == nil || len(t.Extras) == 0 {
		return
	}
	w := &p.w
	h := p.id + "-extras-h"
	w.open("section", "class", "block extras", "aria-labelledby", h)
	w.elem("h3", "Design values", "id", h)
	w.open("dl", "class", "kv")
	for _, x := range t.Extras {
		w.open("div")
		w.elem("dt", x.Name)
		w.open("dd")
		if x.Value == nil {
			w.elem("span", "—", "data-quantity", "extra", "data-name", x.Name, "data-null", "true")
		} else {
			w.elem("span", magnitude(*x.Value, x.Unit), "data-quantity", "extra", "data-name", x.Name, "data-value", num(*x.Value))
		}
		if x.Note != "" {
			w.text(" ")
			w.elem("span", x.Note, "class", "detail")
		}
		if x.Source != "" {
			w.elem("span", x.Source, "class", "source")
		}
		w.close("dd")
		w.close("div")
	}
	w.close("dl")
	w.close("section")
}

func (p *panel) notes() {
	r := p.resp
	if len(r.Notes) == 0 {
		return
	}
	w := &p.w
	h := p.id + "-notes-h"
	w.open("section", "class", "block notes", "aria-labelledby", h)
	w.elem("h3", "Notes from the engine", "id", h)
	w.open("ul")
	for _, n := range r.Notes {
		w.elem("li", n)
	}
	w.close("ul")
	w.close("section")
}

func (p *panel) circuit() {
	t := p.resp.Topology
	if t == nil || t.Circuit == "" {
		return
	}
	w := &p.w
	w.open("details", "class", "block circuit")
	w.elem("summary", "Generated circuit text")
	w.open("pre", "class", "circuit-text")
	w.elem("code", t.Circuit)
	w.close("pre")
	w.open("p")
	// The page's script fills in the fragment (c=…, see zport.js) when it
	// can compress; without it the link opens the empty circuit page.
	// data-state carries the reference, ports, gain and frequencies that
	// the custom page needs to reproduce this analysis.
	w.elem("a", "Open as an editable circuit", "class", "open-circuit", "href", "custom.html", "data-state", CircuitLinkState(p.resp))
	w.close("p")
	w.close("details")
}
