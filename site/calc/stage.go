package calc

import (
	"strconv"

	"zport/engine/api"
	"zport/site/view"
)

// designValues are a catalog stage's own derived values (a suggested
// feedback capacitor, a pump's output resistance at balance, …), each
// with its source; circuit text has none.
var designValues = Analysis{
	Key:     "design",
	Title:   "Design values",
	Section: designSection,
	Copy:    designCopy,
	Compare: designCompared,
}

func designSection(w *view.Writer, c *Context) {
	t := c.Resp.Topology
	if t == nil || len(t.Extras) == 0 {
		return
	}
	w.Section(c.ID, "extras", "Design values")
	w.Open("dl", "class", "kv")
	for _, x := range t.Extras {
		w.KV(x.Name, func() {
			w.Real(x.Value, x.Unit, "—", "data-quantity", "extra", "data-name", x.Name)
			if x.Note != "" {
				w.Text(" ")
				w.Elem("span", x.Note, "class", "detail")
			}
			if x.Source != "" {
				w.Elem("span", x.Source, "class", "source")
			}
		})
	}
	w.Close("dl")
	c.Comparison(w)
	w.Close("section")
}

// designCompared compares each design value with the pin's of the same
// name — or, where a name carries a computed figure ("Cf (classic “45°”
// formula, gives 51.8°)") and so differs between designs, with the pin's
// at the same place in a list of the same length and unit.
func designCompared(c *Context) []Compared {
	t := c.Resp.Topology
	if t == nil {
		return nil
	}
	var rows []Compared
	for i, x := range t.Extras {
		name, unit, n := x.Name, x.Unit, len(t.Extras)
		rows = append(rows, Compared{ID: "extra:" + strconv.Itoa(i), Label: name, Unit: x.Unit,
			Real: func(r *api.Response) *float64 {
				if r.Topology == nil {
					return nil
				}
				for _, y := range r.Topology.Extras {
					if y.Name == name {
						return y.Value
					}
				}
				if ys := r.Topology.Extras; len(ys) == n && ys[i].Unit == unit {
					return ys[i].Value
				}
				return nil
			}})
	}
	return rows
}

func designCopy(m *Markdown, c *Context) {
	t := c.Resp.Topology
	if t == nil || len(t.Extras) == 0 {
		return
	}
	var rows [][]string
	for _, x := range t.Extras {
		v := "—"
		if x.Value != nil {
			v = view.Magnitude(*x.Value, x.Unit)
		}
		rows = append(rows, []string{MD(x.Name), v})
	}
	m.Table([]string{"Design value", "Value"}, rows...)
}

// generated is a catalog stage's circuit text, with the link that opens
// it on the custom-circuit page.
var generated = Analysis{
	Key:     "generated",
	Title:   "Generated circuit text",
	Section: generatedSection,
}

func generatedSection(w *view.Writer, c *Context) {
	t := c.Resp.Topology
	if t == nil || t.Circuit == "" {
		return
	}
	w.Open("details", "class", "block circuit", "data-analysis", "generated")
	w.Elem("summary", "Generated circuit text")
	w.Open("pre", "class", "circuit-text")
	w.Elem("code", t.Circuit)
	w.Close("pre")
	w.Open("p")
	// The page's script fills in the fragment (c=…, see zport.js) when it
	// can compress; without it the link opens the empty circuit page.
	// data-state carries the reference, ports, gain and frequencies that
	// the custom page needs to reproduce this analysis.
	w.Elem("a", "Open as an editable circuit", "class", "open-circuit", "href", "custom.html", "data-state", CircuitLinkState(c.Resp))
	w.Close("p")
	w.Close("details")
}
