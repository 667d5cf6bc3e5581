package calc

import (
	"strings"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/value"
	"zport/site/view"
)

// devices is the "Transistors" section of the panel: for every bjt and
// mos line of the circuit, the small-signal values the engine derived from
// it (the response's devices list), one table per kind, with the analysis
// temperature and the VT it gives. Each value carries data-quantity
// "device", data-part (the part's name), data-name (the contract's field:
// gm, rpi, ro, cpi, cmu, rb, ic, ib, beta, cgs, cgd, gmb, id, vov, gamma)
// and data-value, the engine's number in SI units; an infinite ro has
// data-null and shows "∞". A circuit without transistors has no section.
var devices = Analysis{
	Key:     "devices",
	Title:   "Transistors",
	Section: devicesSection,
}

func devicesSection(w *view.Writer, c *Context) {
	r := c.Resp
	if len(r.Devices) == 0 {
		return
	}
	w.Section(c.ID, "devices", "Transistors")
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
	w.Explain("The small-signal model each transistor line gives at its bias, at " + value.Format(r.Temperature, "K", view.Sig) +
		" (VT = kT/q = " + value.Format(circuit.ThermalVoltage(r.Temperature), "V", view.Sig) + "): " + strings.Join(models, "; ") + ".")
	for _, kind := range []string{"bjt", "mos"} {
		if ds := byKind[kind]; len(ds) > 0 {
			deviceTable(w, kind, ds)
		}
	}
	w.Close("section")
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

func deviceTable(w *view.Writer, kind string, ds []api.Device) {
	cols := deviceColumns[kind]
	nodes := map[string]string{"bjt": "C, B, E", "mos": "D, G, S"}[kind]
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "results devices-table", "data-kind", kind)
	w.Open("thead")
	w.Open("tr")
	w.Open("th", "scope", "col")
	w.Text(kind)
	w.Elem("span", nodes, "class", "hint")
	w.Close("th")
	for _, c := range cols {
		w.Elem("th", c.label, "scope", "col")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for _, d := range ds {
		w.Open("tr", "data-part", d.Name)
		w.Open("th", "scope", "row")
		w.Elem("code", d.Name)
		hint := strings.Join(d.Nodes, ", ")
		if d.Bulk != "" && d.Bulk != "gnd" {
			hint += "; bulk " + d.Bulk
		}
		w.Elem("span", hint, "class", "hint nodes")
		w.Close("th")
		for _, c := range cols {
			w.Open("td", "data-label", c.label)
			x := c.get(d)
			attrs := []string{"data-quantity", "device", "data-part", d.Name, "data-name", c.name}
			switch {
			case x != nil:
				w.Elem("span", view.Magnitude(*x, c.unit), append(attrs, "data-value", view.Num(*x))...)
			case c.name == "ro":
				w.Elem("span", "∞", append(attrs, "data-null", "true", "title", "no Early effect given: infinite")...)
			default:
				w.Elem("span", "—", append(attrs, "data-null", "true", "title", "not given on the line")...)
			}
			w.Close("td")
		}
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
}
