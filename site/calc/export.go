package calc

import (
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/view"
)

// CopyText writes the results of resp, the answer to form f, as Markdown
// tables, what "copy results" puts on the clipboard: a title line, the
// stage's parameters (each in engineering notation with its unit, an
// absent one as absent), then each analysis's rows in the order of
// Analyses, with its comparison with the pins when there are any; the
// page adds the share link at the end. Text from the circuit (port and
// part names) is escaped so that it cannot turn into markup where the
// table is pasted.
func CopyText(f *Form, entry *api.CatalogEntry, resp *api.Response, pins ...Pinned) string {
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
	if t := resp.Topology; t != nil && entry != nil {
		var rows [][]string
		for _, p := range entry.Params {
			v := "absent"
			if x, ok := t.Params[p.Name]; ok {
				v = view.Eng(x, p.Unit)
			}
			rows = append(rows, []string{MD(p.Name), v})
		}
		m.Table([]string{"Parameter", "Value"}, rows...)
	}
	for _, a := range Analyses {
		c := a.context(f, entry, resp, pins...)
		if a.Copy != nil {
			a.Copy(&m, c)
		}
		c.compareCopy(&m)
	}
	m.Line("Small-signal linear analysis only (no slew, clipping or large-signal behaviour; noise from the linear model's sources only); confirm on the bench.")
	return m.String()
}

// CSV writes the sweep of resp, the answer to form f, as comma-separated
// values (RFC 4180, CRLF line ends) for a spreadsheet or a script:
//
//   - a header of comment lines, each starting with "#", saying what
//     produced the file: the stage and every parameter with its unit (an
//     absent one named absent), or the circuit text; the reference, the
//     ports, the gain, the spot frequency and the sweep, the analyses'
//     settings, what the columns hold, and the share link (Form.Link);
//   - a row of column names, each with its unit (ASCII: Ohm, deg);
//   - one row per frequency: the frequency in hertz, then every analysis's
//     columns in the order of Analyses. A complex column is written as its
//     real and imaginary parts, its magnitude and its phase in degrees
//     (−180 to 180), and for a ratio (unit "" or V/V) its magnitude in dB.
//
// Numbers are in strconv's shortest round-trip form; a value that is not
// finite is an empty field. Without a sweep it holds the spot frequency
// alone. encoding/csv reads it back with Comment set to '#'.
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
	for _, line := range csvHeader(f, entry, resp) {
		b.WriteString(csvComment(line))
		b.WriteString("\r\n")
	}
	b.WriteString("frequency_Hz")
	for _, c := range cols {
		for _, h := range c.heads() {
			b.WriteString("," + csvText(h))
		}
	}
	b.WriteString("\r\n")
	for i, fr := range freq {
		b.WriteString(view.Num(fr))
		for _, c := range cols {
			c.appendRow(&b, i)
		}
		b.WriteString("\r\n")
	}
	return b.String()
}

// db reports whether a complex column also gets its magnitude in dB: a
// ratio.
func (c Column) db() bool { return c.Unit == "" || c.Unit == "V/V" }

// heads are the column's names in the CSV, each with its unit.
func (c Column) heads() []string {
	u := ""
	if c.Unit != "" {
		u = "_" + asciiUnit(c.Unit)
	}
	if c.Complex == nil {
		return []string{c.Name + u}
	}
	h := []string{c.Name + "_re" + u, c.Name + "_im" + u, c.Name + "_mag" + u, c.Name + "_phase_deg"}
	if c.db() {
		h = append(h, c.Name+"_dB")
	}
	return h
}

// appendRow writes the column's fields of row i, each after a comma.
func (c Column) appendRow(b *strings.Builder, i int) {
	if c.Complex == nil {
		if i >= len(c.Real) || c.Real[i] == nil {
			b.WriteString(",")
			return
		}
		b.WriteString("," + view.Num(*c.Real[i]))
		return
	}
	n := 4
	if c.db() {
		n = 5
	}
	if i >= len(c.Complex) || c.Complex[i] == nil {
		b.WriteString(strings.Repeat(",", n))
		return
	}
	z := c.Complex[i].Value()
	mag := cmplx.Abs(z)
	b.WriteString("," + view.Num(real(z)) + "," + view.Num(imag(z)) + "," + view.Num(mag) + "," + view.Num(view.Phase(z)))
	if c.db() {
		if mag > 0 {
			b.WriteString("," + view.Num(20*math.Log10(mag)))
		} else {
			b.WriteString(",")
		}
	}
}

// asciiUnit writes a unit in ASCII, for column names that every
// spreadsheet and script reads alike.
func asciiUnit(u string) string {
	return strings.NewReplacer("Ω", "Ohm", "°", "deg", "µ", "u").Replace(u)
}

// csvHeader are the lines of the CSV's comment header (without "#").
func csvHeader(f *Form, entry *api.CatalogEntry, resp *api.Response) []string {
	lines := []string{"zport: small-signal linear analysis of a feedback stage (impedances by Blackman's formula; loop gain; closed-loop gain)"}
	if entry != nil {
		lines = append(lines, "stage: "+entry.Title+" ("+entry.ID+")", "parameters (SI value and unit; as typed):")
		for _, p := range entry.Params {
			typed := strings.TrimSpace(f.Params[p.Name])
			v := "absent"
			if t := resp.Topology; t != nil {
				if x, ok := t.Params[p.Name]; ok {
					v = plainNum(x)
					if p.Unit != "" {
						v += " " + asciiUnit(p.Unit)
					}
					v += " (" + typed + ")"
				}
			}
			lines = append(lines, "  "+p.Name+" = "+v+": "+ours(p.Meaning))
		}
	} else {
		lines = append(lines, "circuit text:")
		for _, l := range strings.Split(strings.TrimRight(f.Circuit, "\n"), "\n") {
			lines = append(lines, "  | "+strings.TrimRight(l, "\r"))
		}
	}
	if resp.Reference != "" {
		lines = append(lines, "reference element (its return ratio T): "+resp.Reference)
	}
	if len(resp.Ports) > 0 {
		var ps []string
		for _, p := range resp.Ports {
			ps = append(ps, p.Name+" ("+p.A+" to "+p.B+")")
		}
		lines = append(lines, "ports: "+strings.Join(ps, "; "))
	}
	if g := resp.Gain; g != nil {
		lines = append(lines, "gain: from "+g.Source+" to "+g.Output+" in "+g.Unit)
	}
	spot := "spot frequency: " + round10(resp.Frequency) + " Hz"
	if s := resp.Sweep; s != nil && len(s.Frequency) > 0 {
		spot += "; sweep: " + strconv.Itoa(len(s.Frequency)) + " points log-spaced from " + round10(s.Frequency[0]) + " Hz to " + round10(s.Frequency[len(s.Frequency)-1]) + " Hz"
	} else {
		spot += "; no sweep: one row at the spot frequency"
	}
	lines = append(lines, spot)
	if resp.Temperature > 0 {
		lines = append(lines, "analysis temperature: "+round10(resp.Temperature)+" K")
	}
	for _, a := range Analyses {
		if a.Ask == nil {
			continue
		}
		v := a.values(f)
		for _, st := range a.Settings {
			line := "setting " + a.Field(st.Name) + " = " + v[st.Name]
			if st.Unit != "" {
				line += " " + asciiUnit(st.Unit)
			}
			lines = append(lines, line+": "+ours(st.Meaning))
		}
	}
	lines = append(lines,
		"columns: NAME_re and NAME_im are the real and imaginary parts; NAME_mag the magnitude; NAME_phase_deg the phase in degrees (-180 to 180); NAME_dB 20*log10 of the magnitude; units follow the name (Ohm; V/V; V/A; Hz; deg)",
		"an empty field is a value that is not finite there (see the notes on the page)")
	if f.Link != "" {
		lines = append(lines, "link: "+f.Link)
	}
	return lines
}

// ours keeps the header's own text free of commas, so that a
// spreadsheet shows each of its lines in one cell.
func ours(s string) string { return strings.ReplaceAll(s, ",", ";") }

// plainNum writes x in full precision without an exponent where a
// spreadsheet user reads it at a glance (1000000, not 1e+06).
func plainNum(x float64) string {
	if a := math.Abs(x); a >= 1e-12 && a < 1e15 {
		return strconv.FormatFloat(x, 'f', -1, 64)
	}
	return view.Num(x)
}

// round10 writes a frequency to ten significant digits, without the
// last-bit noise of a computed grid.
func round10(x float64) string { return strconv.FormatFloat(x, 'g', 10, 64) }

// csvComment writes one header line as a comment: "#" first, then the
// text on one line. A spreadsheet splits the line at its commas; where a
// piece would then start like a formula (=, +, −, @), an apostrophe is
// put in front, as csvText does for a cell.
func csvComment(s string) string {
	s = strings.Map(func(r rune) rune {
		if r == '\r' || r == '\n' || r == '\t' {
			return ' '
		}
		return r
	}, s)
	var b strings.Builder
	b.WriteString("# ")
	for i, piece := range strings.Split(s, ",") {
		if i > 0 {
			b.WriteByte(',')
			if t := strings.TrimLeft(piece, " "); t != "" && strings.ContainsRune("=+-@", rune(t[0])) {
				piece = "'" + piece
			}
		}
		b.WriteString(piece)
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
