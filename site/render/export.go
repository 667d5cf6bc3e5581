package render

import (
	"sort"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
)

// Markdown writes the spot-frequency results as Markdown tables, what
// "copy results" puts on the clipboard. Text from the response (port and
// part names) is escaped so that it cannot turn into markup where the table
// is pasted.
func Markdown(resp *api.Response, entry *api.CatalogEntry) string {
	var b strings.Builder
	f := resp.Frequency
	title := "Circuit"
	if resp.Topology != nil {
		title = resp.Topology.Title
	}
	b.WriteString("**" + mdEscape(title) + "** at " + value.Format(f, "Hz", sig))
	if resp.Reference != "" {
		b.WriteString(", return ratios of " + mdEscape(resp.Reference))
	}
	b.WriteString(" (zport, small-signal linear analysis)\n\n")

	if t := resp.Topology; t != nil && len(t.Params) > 0 {
		b.WriteString("| Parameter | Value |\n|---|---|\n")
		for _, name := range paramOrder(t.Params, entry) {
			unit := ""
			if entry != nil {
				for _, p := range entry.Params {
					if p.Name == name {
						unit = p.Unit
					}
				}
			}
			b.WriteString("| " + mdEscape(name) + " | " + value.Format(t.Params[name], unit, sig) + " |\n")
		}
		b.WriteString("\n")
	}

	if len(resp.Ports) > 0 {
		b.WriteString("| Port | Quantity | Magnitude ∠ phase | Real + j imaginary | Series element |\n|---|---|---|---|---|\n")
		for _, pr := range resp.Ports {
			row := func(q string, z *api.Complex, unit string, imp bool) {
				mag, re, ser := "—", "—", ""
				if z != nil {
					mag, re = polar(z.Value(), unit), rect(z.Value(), unit)
					if imp {
						ser = SeriesElement(z.Value(), f)
					}
				}
				b.WriteString("| " + mdEscape(pr.Name) + " | " + q + " | " + mag + " | " + re + " | " + ser + " |\n")
			}
			row("Z₀", pr.Z0, "Ω", true)
			row("T short", pr.TShort, "", false)
			row("T open", pr.TOpen, "", false)
			row("Z (Blackman)", pr.Z, "Ω", true)
			row("Z direct", pr.ZDirect, "Ω", true)
		}
		b.WriteString("\n")
	}

	if g := resp.Gain; g != nil {
		b.WriteString("| Gain " + mdEscape(g.Source) + " → " + mdEscape(g.Output) + " | Magnitude ∠ phase | Real + j imaginary |\n|---|---|---|\n")
		for _, x := range []struct {
			q string
			z *api.Complex
		}{{"g₀", g.G0}, {"g∞", g.GInf}, {"g", g.G}, {"g direct", g.GDirect}} {
			mag, re := "—", "—"
			if x.z != nil {
				mag, re = polar(x.z.Value(), g.Unit), rect(x.z.Value(), g.Unit)
			}
			b.WriteString("| " + x.q + " | " + mag + " | " + re + " |\n")
		}
		b.WriteString("\n")
	}

	b.WriteString("| Loop | Value |\n|---|---|\n")
	if resp.ReturnRatio != nil {
		T := resp.ReturnRatio.Value()
		b.WriteString("| T at " + value.Format(f, "Hz", sig) + " | " + polar(T, "") + " (" + decibels(T) + ") |\n")
	} else {
		b.WriteString("| T at " + value.Format(f, "Hz", sig) + " | — |\n")
	}
	if m := resp.Margins; m != nil {
		opt := func(x *float64, s func(float64) string) string {
			if x == nil {
				return "—"
			}
			return s(*x)
		}
		b.WriteString("| Crossover | " + opt(m.Crossover, func(x float64) string { return value.Format(x, "Hz", sig) }) + " |\n")
		b.WriteString("| Phase margin | " + opt(m.PhaseMargin, degrees) + " |\n")
		b.WriteString("| Gain margin | " + opt(m.GainMargin, dB) + " |\n")
		b.WriteString("| Verdict | " + mdEscape(m.Verdict) + " |\n")
	}
	if t := resp.Topology; t != nil && len(t.Extras) > 0 {
		b.WriteString("\n| Design value | Value |\n|---|---|\n")
		for _, x := range t.Extras {
			v := "—"
			if x.Value != nil {
				v = magnitude(*x.Value, x.Unit)
			}
			b.WriteString("| " + mdEscape(x.Name) + " | " + v + " |\n")
		}
	}
	b.WriteString("\nSmall-signal linear analysis only (no slew, clipping, noise or large-signal behaviour); confirm on the bench.\n")
	return b.String()
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

// mdEscape backslash-escapes ASCII punctuation, which CommonMark allows
// before any of it, so a name can neither break the table nor become a
// link, emphasis or HTML where the table is pasted.
func mdEscape(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r == '\n' || r == '\r' || r == '\t':
			b.WriteByte(' ')
		case r < 0x80 && strings.ContainsRune("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~", r):
			b.WriteByte('\\')
			b.WriteRune(r)
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// CSV writes the sweep as comma-separated values: a header row, then one
// row per frequency with the frequency in hertz and the real and imaginary
// parts of every quantity (return ratio; for each port z0, tShort, tOpen,
// z, zDirect; the gain's g0, gInf, g, gDirect), each in strconv's shortest
// round-trip form. A value that is not finite is an empty field. Without a
// sweep it holds the single spot frequency.
func CSV(resp *api.Response) string {
	type col struct {
		name string
		at   func(i int) *api.Complex
	}
	var cols []col
	var freq []float64
	if s := resp.Sweep; s != nil {
		freq = s.Frequency
		cols = append(cols, col{"T", func(i int) *api.Complex { return s.ReturnRatio[i] }})
		for _, ps := range s.Ports {
			ps := ps
			for _, q := range []struct {
				n string
				v []*api.Complex
			}{{"z0", ps.Z0}, {"tShort", ps.TShort}, {"tOpen", ps.TOpen}, {"z", ps.Z}, {"zDirect", ps.ZDirect}} {
				v := q.v
				cols = append(cols, col{ps.Name + "." + q.n, func(i int) *api.Complex { return v[i] }})
			}
		}
		if g := s.Gain; g != nil {
			for _, q := range []struct {
				n string
				v []*api.Complex
			}{{"g0", g.G0}, {"gInf", g.GInf}, {"g", g.G}, {"gDirect", g.GDirect}} {
				v := q.v
				cols = append(cols, col{"gain." + q.n, func(i int) *api.Complex { return v[i] }})
			}
		}
	} else {
		freq = []float64{resp.Frequency}
		cols = append(cols, col{"T", func(int) *api.Complex { return resp.ReturnRatio }})
		for _, pr := range resp.Ports {
			pr := pr
			for _, q := range []struct {
				n string
				v *api.Complex
			}{{"z0", pr.Z0}, {"tShort", pr.TShort}, {"tOpen", pr.TOpen}, {"z", pr.Z}, {"zDirect", pr.ZDirect}} {
				v := q.v
				cols = append(cols, col{pr.Name + "." + q.n, func(int) *api.Complex { return v }})
			}
		}
		if g := resp.Gain; g != nil {
			for _, q := range []struct {
				n string
				v *api.Complex
			}{{"g0", g.G0}, {"gInf", g.GInf}, {"g", g.G}, {"gDirect", g.GDirect}} {
				v := q.v
				cols = append(cols, col{"gain." + q.n, func(int) *api.Complex { return v }})
			}
		}
	}
	var b strings.Builder
	b.WriteString("frequency_Hz")
	for _, c := range cols {
		b.WriteByte(',')
		b.WriteString(csvText(c.name + "_re"))
		b.WriteByte(',')
		b.WriteString(csvText(c.name + "_im"))
	}
	b.WriteString("\r\n")
	for i, f := range freq {
		b.WriteString(num(f))
		for _, c := range cols {
			z := c.at(i)
			if z == nil {
				b.WriteString(",,")
				continue
			}
			b.WriteByte(',')
			b.WriteString(num(z.Re))
			b.WriteByte(',')
			b.WriteString(num(z.Im))
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
