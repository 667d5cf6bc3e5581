package calc

import (
	"slices"
	"strings"

	"zport/engine/api"
	"zport/site/view"
)

// An Analysis is one part of what a calculator shows, in the spirit of a
// goldmark extension: everything about it in one value, registered once in
// Analyses. It may have settings (inputs in the calculator's form, kept in
// the share link), ask the engine for what it needs, and render its
// section of the results panel, its columns of the CSV and its rows of the
// copied results. Every field but Key and Title may be left nil.
//
// A calculator recompute runs like this: the form's settings of each
// analysis, defaults filled in, go to its Ask, which adds its key to the
// engine request (an error names the setting); the engine answers once;
// then Section, Columns and Copy read the one response, in the order of
// Analyses.
//
// An analysis that runs only on request (the design aids: a tolerance
// study takes seconds) has settings and no Ask: its own script runs it
// through its own bridge functions and reports its settings to the
// calculator, which keeps them with the rest of the form.
type Analysis struct {
	// Key names the analysis: its settings in a Form (Form.Settings[Key]),
	// the prefix of its share-link keys (Key + "." + setting), the
	// data-analysis attribute of its section, and the path of its
	// settings in error messages ("response.to").
	Key string
	// Title heads its section and its settings.
	Title string

	// Settings are its inputs, shown in the calculator's form.
	Settings []Setting
	// Accept, when set, admits settings beyond Settings (a family of
	// keys such as the design aids' per-part tolerances "tol.R1"); they
	// have no default and are written to the link when not empty.
	Accept func(name string) bool

	// Check, for an analysis without Ask, checks its settings, so that a
	// bad value in a share link is refused when the link is read rather
	// than when the analysis is run. An error names the setting as the
	// link does (Field(name), "aid.n"), so that the page can refuse that
	// setting alone and use the rest of the link.
	Check func(c *Context) *api.ErrorBody
	// Ask adds the analysis's request to req from its settings as typed,
	// defaults filled in. An error names the setting by its path, which is
	// also the name of the input that holds it.
	Ask func(req *api.Request, c *Context) *api.ErrorBody
	// Section writes the analysis's part of the results panel: nothing
	// when the response has nothing for it.
	Section func(w *view.Writer, c *Context)
	// Columns lists its columns of the CSV, one value per row (the sweep's
	// frequencies, or the spot frequency alone without a sweep).
	Columns func(c *Context) []Column
	// Copy writes its part of the copied results.
	Copy func(m *Markdown, c *Context)
	// Compare lists the quantities a table compares with the pinned
	// designs: each pin's value beside the current one, and the
	// difference. The table follows the section in the panel (or sits
	// where Section calls Context.Comparison) and the analysis's rows in
	// the copied results; without pins it is not written.
	Compare func(c *Context) []Compared
}

// Setting is one input of an analysis's settings.
type Setting struct {
	// Name is its key within the analysis.
	Name string
	// Symbol and Meaning label the input; Unit follows it.
	Symbol, Meaning, Unit string
	// Default is the value an empty input means, as typed.
	Default string
	// Range says what the input takes.
	Range string
	// Options, when set, make it a choice: value and text of each.
	Options [][2]string
}

// Values are an analysis's settings as typed, by setting name.
type Values map[string]string

// Context is what an analysis reads while a calculator recomputes.
type Context struct {
	// Form is the calculator's form, every default filled in.
	Form *Form
	// Values are this analysis's settings, defaults filled in.
	Values Values
	// Entry is the catalog entry of a stage, nil for circuit text.
	Entry *api.CatalogEntry
	// Resp is the engine's answer (nil in Ask, which builds the request).
	Resp *api.Response
	// ID prefixes the element ids of the panel.
	ID string
	// Pins are the pinned designs, each analyzed like the current one
	// (nil in Ask). A chart overlays them with PinTraces or BodePins; the
	// analysis's Compare rows compare them in a table.
	Pins []Pinned

	// a is the analysis the context is for; compared records that its
	// section placed its comparison table itself (Context.Comparison).
	a        *Analysis
	compared bool
}

// ChartSize is the size, in CSS pixels, at which to draw a chart whose
// default size is w × h: on a phone (Form.ChartWidth set) the page's
// column width, so that the chart's text keeps its size, and a little
// taller to leave room for a title and legend wrapped onto more lines;
// else w × h.
func (c *Context) ChartSize(w, h int) (int, int) {
	if cw := c.Form.ChartWidth; cw > 0 && cw < w {
		return cw, h + 40
	}
	return w, h
}

// Field is the path of setting name of analysis a, as errors name it and
// as the name of its input.
func (a *Analysis) Field(name string) string { return a.Key + "." + name }

// accepts reports whether name is one of a's settings.
func (a *Analysis) accepts(name string) bool {
	if slices.ContainsFunc(a.Settings, func(s Setting) bool { return s.Name == name }) {
		return true
	}
	return a.Accept != nil && a.Accept(name)
}

// values returns a's settings in f with the defaults filled in.
func (a *Analysis) values(f *Form) Values {
	v := Values{}
	for _, s := range a.Settings {
		v[s.Name] = s.Default
	}
	for k, x := range f.Settings[a.Key] {
		if strings.TrimSpace(x) != "" || !slices.ContainsFunc(a.Settings, func(s Setting) bool { return s.Name == k }) {
			v[k] = x
		}
	}
	return v
}

// context is the Context of a for a recompute of f, with the pins'
// answers when there are any.
func (a *Analysis) context(f *Form, entry *api.CatalogEntry, resp *api.Response, pins ...Pinned) *Context {
	return &Context{Form: f, Values: a.values(f), Entry: entry, Resp: resp, ID: f.ID, Pins: pins, a: a}
}

// byKey finds a registered analysis.
func byKey(key string) *Analysis {
	for _, a := range Analyses {
		if a.Key == key {
			return a
		}
	}
	return nil
}

// Column is one column of the CSV: a complex quantity (written as its real
// and imaginary parts) or a real one, one value per row; nil is a value
// that is not finite, an empty field.
type Column struct {
	// Name heads the column ("out.z"); Unit is its unit ("Ω", "" for a
	// ratio).
	Name, Unit string
	Complex    []*api.Complex
	Real       []*float64
}

// Markdown collects the copied results: Markdown tables that keep their
// shape when pasted into a wiki, a ticket or a chat.
type Markdown struct {
	b strings.Builder
}

// Line writes one line of text (already escaped with MD where it holds
// names from the circuit).
func (m *Markdown) Line(s string) {
	m.b.WriteString(s)
	m.b.WriteByte('\n')
}

// Table writes a table with a header row; every cell is written as given,
// so text from the circuit must pass through MD first.
func (m *Markdown) Table(head []string, rows ...[]string) {
	if m.b.Len() > 0 && !strings.HasSuffix(m.b.String(), "\n\n") {
		m.b.WriteByte('\n')
	}
	row := func(cells []string) {
		m.b.WriteString("| " + strings.Join(cells, " | ") + " |\n")
	}
	row(head)
	sep := make([]string, len(head))
	for i := range sep {
		sep[i] = "---"
	}
	m.b.WriteString("|" + strings.Join(sep, "|") + "|\n")
	for _, r := range rows {
		row(r)
	}
	m.b.WriteByte('\n')
}

func (m *Markdown) String() string { return m.b.String() }

// MD backslash-escapes ASCII punctuation, which CommonMark allows before
// any of it, so a name can neither break a table nor become a link,
// emphasis or HTML where the table is pasted.
func MD(s string) string {
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
