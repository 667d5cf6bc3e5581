package calc

import (
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
	"zport/site/view"
)

// pinned heads the panel when designs are pinned: each pin with its line
// style and what it changes from the current design, so that a printed
// or copied comparison says what was compared. The pins themselves are
// part of the form (Form.Pins); every other analysis overlays and compares
// them.
var pinned = Analysis{
	Key:     "pinned",
	Title:   "Pinned designs",
	Section: pinnedSection,
	Copy:    pinnedCopy,
}

func pinnedSection(w *view.Writer, c *Context) {
	if len(c.Pins) == 0 {
		return
	}
	w.Section(c.ID, "pinned", "Pinned designs")
	w.Explain("Each chart draws the pinned designs in their line styles beside this design, analyzed at the same frequencies; the tables compare them.")
	w.Open("ul", "class", "pin-summary")
	for i := range c.Pins {
		p := &c.Pins[i]
		st := p.Style()
		w.Open("li", "data-pin", strconv.Itoa(p.Slot))
		w.Raw(plot.Swatch(st.Class, st.Dash))
		w.Text(" ")
		w.Elem("strong", p.Name)
		w.Text(": " + pinChanges(c, p.Pin))
		if p.Err != nil {
			w.Text(" ")
			w.Elem("span", "Not analyzed: "+errorText(p.Err), "class", "pin-error")
		}
		w.Close("li")
	}
	w.Close("ul")
	w.Close("section")
}

func pinnedCopy(m *Markdown, c *Context) {
	if len(c.Pins) == 0 {
		return
	}
	var rows [][]string
	for i := range c.Pins {
		p := &c.Pins[i]
		what := pinChanges(c, p.Pin)
		if p.Err != nil {
			what += " Not analyzed: " + errorText(p.Err)
		}
		rows = append(rows, []string{MD(p.Name), MD(what)})
	}
	m.Table([]string{"Pinned design", "Differs from this design in"}, rows...)
}

// errorText is an engine error as one line: the field or place, then the
// message.
func errorText(e *api.ErrorBody) string {
	switch {
	case e.Line > 0:
		return "line " + strconv.Itoa(e.Line) + ", column " + strconv.Itoa(e.Column) + ": " + e.Message
	case e.Param != "":
		return e.Param + ": " + e.Message
	}
	return e.Message
}

// pinChanges says what pin p changes from the current design: a stage's
// parameters with both values, or a circuit's text, reference, ports and
// gain.
func pinChanges(c *Context, p Pin) string {
	f := c.Form
	var parts []string
	if c.Entry != nil {
		for _, par := range c.Entry.Params {
			pv, cv := strings.TrimSpace(p.Params[par.Name]), strings.TrimSpace(f.Params[par.Name])
			if pv != cv {
				parts = append(parts, par.Name+" "+typedValue(pv, par.Unit)+" (here "+typedValue(cv, par.Unit)+")")
			}
		}
	} else {
		if p.Circuit != f.Circuit {
			parts = append(parts, textChanges(p.Circuit, f.Circuit))
		}
		if p.Reference != f.Reference {
			parts = append(parts, "reference "+p.Reference)
		}
		if !slices.Equal(p.Ports, f.Ports) {
			parts = append(parts, "ports "+strings.Join(p.Ports, ", "))
		}
		if !sameGain(p.Gain, f.Gain) {
			if p.Gain == nil {
				parts = append(parts, "no gain")
			} else {
				parts = append(parts, "gain "+p.Gain.Source+" → "+p.Gain.Output)
			}
		}
	}
	if len(parts) == 0 {
		return "the same design as this one."
	}
	return strings.Join(parts, "; ") + "."
}

// textChanges says how circuit text pin differs from cur, line by line
// with comments and spacing left aside: the pin's lines that cur lacks
// and cur's that the pin lacks, a few of each.
func textChanges(pin, cur string) string {
	lines := func(s string) map[string]int {
		m := map[string]int{}
		for _, l := range strings.Split(s, "\n") {
			if i := strings.IndexByte(l, '#'); i >= 0 {
				l = l[:i]
			}
			if l = strings.Join(strings.Fields(l), " "); l != "" {
				m[l]++
			}
		}
		return m
	}
	p, c := lines(pin), lines(cur)
	only := func(a, b map[string]int, in string) []string {
		var out []string
		for _, l := range strings.Split(in, "\n") {
			if i := strings.IndexByte(l, '#'); i >= 0 {
				l = l[:i]
			}
			l = strings.Join(strings.Fields(l), " ")
			if l != "" && a[l] > b[l] {
				a[l]--
				out = append(out, "“"+l+"”")
			}
		}
		return out
	}
	mine, theirs := only(p, c, pin), only(c, p, cur)
	some := func(ls []string) string {
		if len(ls) > 3 {
			return strings.Join(ls[:3], ", ") + " and " + strconv.Itoa(len(ls)-3) + " more"
		}
		return strings.Join(ls, ", ")
	}
	switch {
	case len(mine) == 0 && len(theirs) == 0:
		return "the same circuit, its text spaced or commented differently"
	case len(theirs) == 0:
		return "its own circuit text, with " + some(mine)
	case len(mine) == 0:
		return "its own circuit text, without " + some(theirs)
	}
	return "its own circuit text, with " + some(mine) + " where this one has " + some(theirs)
}

// typedValue writes a value as typed in a form for people: in
// engineering notation with its unit, "absent" when empty, as typed when
// it does not read.
func typedValue(s, unit string) string {
	if s == "" {
		return "absent"
	}
	x, err := value.Parse(s, unit)
	if err != nil {
		return s
	}
	return view.Eng(x, unit)
}
