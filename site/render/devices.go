package render

import (
	"strings"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/value"
)

// devices writes the "Transistors" section of the panel: for every bjt and
// mos line of the circuit, the small-signal values the engine derived from
// it (the response's devices list), one table per kind, with the analysis
// temperature and the VT it gives. Each value carries data-quantity
// "device", data-part (the part's name), data-name (the contract's field:
// gm, rpi, ro, cpi, cmu, rb, ic, ib, beta, cgs, cgd, gmb, id, vov, gamma)
// and data-value, the engine's number in SI units; an infinite ro has
// data-null and shows "∞". A circuit without transistors has no section.
func (p *panel) devices() {
	r := p.resp
	if len(r.Devices) == 0 {
		return
	}
	w := &p.w
	h := p.id + "-devices-h"
	w.open("section", "class", "block devices", "aria-labelledby", h)
	w.elem("h3", "Transistors", "id", h)
	byKind := map[string][]api.Device{}
	for _, d := range r.Devices {
		byKind[d.Kind] = append(byKind[d.Kind], d)
	}
	var models []string
	if len(byKind["bjt"]) > 0 {
		models = append(models, "a bjt is the hybrid-π model, gm = IC/VT, rπ = β0/gm, ro = VA/IC, Cπ = gm/(2π·fT) − Cμ")
	}
	if len(byKind["mos"]) > 0 {
		models = append(models, "a mos has gm = 2·ID/Vov, ro = 1/(λ·ID)")
	}
	w.open("p", "class", "explain")
	w.text("The small-signal model each transistor line gives at its bias, at " + value.Format(r.Temperature, "K", sig) +
		" (VT = kT/q = " + value.Format(circuit.ThermalVoltage(r.Temperature), "V", sig) + "): " + strings.Join(models, "; ") + ".")
	w.close("p")
	for _, kind := range []string{"bjt", "mos"} {
		if ds := byKind[kind]; len(ds) > 0 {
			p.deviceTable(kind, ds)
		}
	}
	w.close("section")
}

// deviceColumn is one quantity of a device table.
type deviceColumn struct {
	name, label, unit string
	get               func(d api.Device) *float64
}

var deviceColumns = map[string][]deviceColumn{
	"bjt": {
		{"gm", "gm", "S", func(d api.Device) *float64 { return &d.Gm }},
		{"rpi", "rπ", "Ω", func(d api.Device) *float64 { return d.Rpi }},
		{"ro", "ro", "Ω", func(d api.Device) *float64 { return d.Ro }},
		{"cpi", "Cπ", "F", func(d api.Device) *float64 { return d.Cpi }},
		{"cmu", "Cμ", "F", func(d api.Device) *float64 { return d.Cmu }},
		{"rb", "rb", "Ω", func(d api.Device) *float64 { return d.Rb }},
		{"ic", "IC", "A", func(d api.Device) *float64 { return d.Ic }},
		{"ib", "IB = IC/β0", "A", func(d api.Device) *float64 { return d.Ib }},
		{"beta", "β0", "", func(d api.Device) *float64 { return d.Beta }},
	},
	"mos": {
		{"gm", "gm", "S", func(d api.Device) *float64 { return &d.Gm }},
		{"ro", "ro", "Ω", func(d api.Device) *float64 { return d.Ro }},
		{"cgs", "Cgs", "F", func(d api.Device) *float64 { return d.Cgs }},
		{"cgd", "Cgd", "F", func(d api.Device) *float64 { return d.Cgd }},
		{"gmb", "gmb", "S", func(d api.Device) *float64 { return d.Gmb }},
		{"id", "ID", "A", func(d api.Device) *float64 { return d.Id }},
		{"vov", "Vov", "V", func(d api.Device) *float64 { return d.Vov }},
		{"gamma", "γ (noise)", "", func(d api.Device) *float64 { return d.Gamma }},
	},
}

func (p *panel) deviceTable(kind string, ds []api.Device) {
	w := &p.w
	cols := deviceColumns[kind]
	nodes := map[string]string{"bjt": "C, B, E", "mos": "D, G, S"}[kind]
	w.open("div", "class", "table-wrap")
	w.open("table", "class", "results devices-table", "data-kind", kind)
	w.open("thead")
	w.open("tr")
	w.open("th", "scope", "col")
	w.text(kind)
	w.elem("span", nodes, "class", "hint")
	w.close("th")
	for _, c := range cols {
		w.elem("th", c.label, "scope", "col")
	}
	w.close("tr")
	w.close("thead")
	w.open("tbody")
	for _, d := range ds {
		w.open("tr", "data-part", d.Name)
		w.open("th", "scope", "row")
		w.elem("code", d.Name)
		hint := strings.Join(d.Nodes, ", ")
		if d.Bulk != "" && d.Bulk != "gnd" {
			hint += "; bulk " + d.Bulk
		}
		w.elem("span", hint, "class", "hint nodes")
		w.close("th")
		for _, c := range cols {
			w.open("td", "data-label", c.label)
			x := c.get(d)
			attrs := []string{"data-quantity", "device", "data-part", d.Name, "data-name", c.name}
			switch {
			case x != nil:
				w.elem("span", magnitude(*x, c.unit), append(attrs, "data-value", num(*x))...)
			case c.name == "ro":
				w.elem("span", "∞", append(attrs, "data-null", "true", "title", "no Early effect given: infinite")...)
			default:
				w.elem("span", "—", append(attrs, "data-null", "true", "title", "not given on the line")...)
			}
			w.close("td")
		}
		w.close("tr")
	}
	w.close("tbody")
	w.close("table")
	w.close("div")
}
