package calc

import (
	"strconv"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
	"zport/site/view"
)

// Panel writes the results panel of resp, the answer to form f (defaults
// filled in): a head saying what was computed, then each analysis's
// section in the order of Analyses, each with its comparison with the
// pinned designs when there are pins. entry is the catalog entry of a
// stage, nil for circuit text.
func Panel(f *Form, entry *api.CatalogEntry, resp *api.Response, pins ...Pinned) string {
	id := f.ID
	if id == "" {
		id = "calc"
	}
	var w view.Writer
	w.Open("div", "class", "panel", "id", id+"-panel", "data-frequency", view.Num(resp.Frequency), "data-reference", resp.Reference)
	w.Open("p", "class", "panel-head")
	w.Text("Results at ")
	w.Elem("strong", view.Magnitude(resp.Frequency, "Hz"))
	if resp.Reference != "" {
		w.Text("; return ratios are those of ")
		w.Elem("code", resp.Reference)
	}
	w.Text(".")
	if s := resp.Sweep; s != nil && len(s.Frequency) > 0 {
		w.Text(" Charts sweep from " + view.Magnitude(s.Frequency[0], "Hz") + " to " + view.Magnitude(s.Frequency[len(s.Frequency)-1], "Hz") +
			", " + strconv.Itoa(len(s.Frequency)) + " points, log-spaced; move the pointer over a chart, or focus it with Tab and use the arrow keys, to read its values.")
	}
	w.Close("p")
	g := *f
	g.ID = id
	for _, a := range Analyses {
		c := a.context(&g, entry, resp, pins...)
		if a.Section != nil {
			a.Section(&w, c)
		}
		if !c.compared {
			c.Comparison(&w)
		}
	}
	w.Close("div")
	return w.String()
}

// spotMarker marks the spot frequency on a chart of the sweep, when it
// lies inside it.
func spotMarker(r *api.Response) []plot.Marker {
	s := r.Sweep
	if s == nil || len(s.Frequency) == 0 || r.Frequency < s.Frequency[0] || r.Frequency > s.Frequency[len(s.Frequency)-1] {
		return nil
	}
	return []plot.Marker{{Freq: r.Frequency, Label: "spot " + value.Format(r.Frequency, "Hz", 3), Class: "spot"}}
}
