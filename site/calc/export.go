package calc

import (
	"sort"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/view"
)

// CopyText writes the results of resp, the answer to form f, as Markdown
// tables, what "copy results" puts on the clipboard: a title line, the
// stage's parameters, then each analysis's rows in the order of Analyses.
// Text from the circuit (port and part names) is escaped so that it cannot
// turn into markup where the table is pasted.
func CopyText(f *Form, entry *api.CatalogEntry, resp *api.Response) string {
	var m Markdown
	title := "Circuit"
	if resp.Topology != nil {
		title = resp.Topology.Title
	}
	head := "**" + MD(title) + "** at " + value.Format(resp.Frequency, "Hz", view.Sig)
	if resp.Reference != "" {
		head += ", return ratios of " + MD(resp.Reference)
	}
	m.Line(head + " (zport, small-signal linear analysis)")
	if t := resp.Topology; t != nil && len(t.Params) > 0 {
		var rows [][]string
		for _, name := range paramOrder(t.Params, entry) {
			unit := ""
			if entry != nil {
				for _, p := range entry.Params {
					if p.Name == name {
						unit = p.Unit
					}
				}
			}
			rows = append(rows, []string{MD(name), value.Format(t.Params[name], unit, view.Sig)})
		}
		m.Table([]string{"Parameter", "Value"}, rows...)
	}
	for _, a := range Analyses {
		if a.Copy != nil {
			a.Copy(&m, a.context(f, entry, resp))
		}
	}
	m.Line("Small-signal linear analysis only (no slew, clipping or large-signal behaviour; noise from the linear model's sources only); confirm on the bench.")
	return m.String()
}

// paramOrder lists the parameter names in catalog order when the entry is
// known, else sorted.
func paramOrder(params map[string]float64, entry *api.CatalogEntry) []string {
	var names []string
	if entry != nil {
		for _, p := range entry.Params {
			if _, ok := params[p.Name]; ok {
				names = append(names, p.Name)
			}
		}
		if len(names) == len(params) {
			return names
		}
		names = names[:0]
	}
	for k := range params {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
}

// CSV writes the sweep of resp, the answer to form f, as comma-separated
// values: a header row, then one row per frequency with the frequency in
// hertz and every analysis's columns in the order of Analyses — a complex
// column as its real and imaginary parts — each in strconv's shortest
// round-trip form. A value that is not finite is an empty field. Without
// a sweep it holds the spot frequency alone.
func CSV(f *Form, entry *api.CatalogEntry, resp *api.Response) string {
	freq := []float64{resp.Frequency}
	if s := resp.Sweep; s != nil {
		freq = s.Frequency
	}
	var cols []Column
	for _, a := range Analyses {
		if a.Columns != nil {
			cols = append(cols, a.Columns(a.context(f, entry, resp))...)
		}
	}
	var b strings.Builder
	b.WriteString("frequency_Hz")
	for _, c := range cols {
		if c.Complex != nil {
			b.WriteString("," + csvText(c.Name+"_re") + "," + csvText(c.Name+"_im"))
		} else {
			b.WriteString("," + csvText(c.Name))
		}
	}
	b.WriteString("\r\n")
	for i, fr := range freq {
		b.WriteString(view.Num(fr))
		for _, c := range cols {
			if c.Complex != nil {
				if i >= len(c.Complex) || c.Complex[i] == nil {
					b.WriteString(",,")
					continue
				}
				b.WriteString("," + view.Num(c.Complex[i].Re) + "," + view.Num(c.Complex[i].Im))
				continue
			}
			if i >= len(c.Real) || c.Real[i] == nil {
				b.WriteString(",")
				continue
			}
			b.WriteString("," + view.Num(*c.Real[i]))
		}
		b.WriteString("\r\n")
	}
	return b.String()
}

// csvText writes a header cell as RFC 4180 has it: quoted, with quotes
// doubled, when it holds a comma, a quote or a line break. A cell that a
// spreadsheet would take for a formula (a leading =, +, − or @) gets a
// leading apostrophe first.
func csvText(s string) string {
	if s != "" && strings.ContainsRune("=+-@", rune(s[0])) {
		s = "'" + s
	}
	if strings.ContainsAny(s, ",\"\r\n") {
		return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
	}
	return s
}
