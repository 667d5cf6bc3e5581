package site

import (
	"bytes"
	"fmt"
	"html/template"
	"strconv"
	"strings"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/text"
	"github.com/yuin/goldmark/util"

	"zport/engine/api"
	"zport/site/calc"
	"zport/site/view"
)

// Node kinds of the blocks this package adds to Markdown.
var (
	// KindCalculator is a live calculator: a fenced block with info string
	// "calculator".
	KindCalculator = ast.NewNodeKind("Calculator")
	// KindCatalog is the table of the topology catalog: info string
	// "catalog", empty body.
	KindCatalog = ast.NewNodeKind("Catalog")
	// KindMath is a display formula: info string "math", body in the
	// notation of MathML.
	KindMath = ast.NewNodeKind("Math")
)

// Calculator is the node of a calculator block. Its body is a list of
// "key: value" lines: "topology: ID" (required), any of the topology's
// parameters ("R2: 100k"), "frequency: 1k" and "sweep: FROM TO POINTS";
// blank lines and lines starting with "#" are ignored.
type Calculator struct {
	ast.BaseBlock
	// Entry is the catalog entry of the topology.
	Entry api.CatalogEntry
	// Form holds the topology's defaults with the block's overrides.
	Form calc.Form
	// ID is the element id of the calculator, unique within the page.
	ID string
	// Line is the line of the block's opening fence in the Markdown source.
	Line int
	// Err is the first problem found in the block; rendering fails with it.
	Err error
}

// Kind implements ast.Node.
func (n *Calculator) Kind() ast.NodeKind { return KindCalculator }

// Dump implements ast.Node.
func (n *Calculator) Dump(source []byte, level int) {
	ast.DumpHelper(n, source, level, map[string]string{"Topology": n.Entry.ID, "ID": n.ID}, nil)
}

// Catalog is the node of a catalog block.
type Catalog struct {
	ast.BaseBlock
	// Single is set when the page goes into the single-file export, whose
	// links select sections instead of files.
	Single bool
	Err    error
}

// Kind implements ast.Node.
func (n *Catalog) Kind() ast.NodeKind { return KindCatalog }

// Dump implements ast.Node.
func (n *Catalog) Dump(source []byte, level int) { ast.DumpHelper(n, source, level, nil, nil) }

// Math is the node of a display formula.
type Math struct {
	ast.BaseBlock
	MathML string
	Err    error
}

// Kind implements ast.Node.
func (n *Math) Kind() ast.NodeKind { return KindMath }

// Dump implements ast.Node.
func (n *Math) Dump(source []byte, level int) { ast.DumpHelper(n, source, level, nil, nil) }

// BlockError is a problem in a calculator, catalog or math block, with the
// line of the Markdown source it is on.
type BlockError struct {
	Line int
	Msg  string
}

func (e *BlockError) Error() string { return fmt.Sprintf("line %d: %s", e.Line, e.Msg) }

// Blocks is the goldmark extension that turns fenced blocks with the info
// strings "calculator", "catalog" and "math" into live calculators, the
// catalog table and MathML formulas, and (for the single-file export)
// points links between pages at the page's section.
type Blocks struct {
	// Catalog lists the topologies a calculator block may name.
	Catalog []api.CatalogEntry
	// Compute renders a calculator's pre-computed default panel.
	Compute func(calc.Form) calc.Output
	// Schematic returns the inline SVG for a topology, if there is one.
	Schematic func(id string) (template.HTML, bool)
	// Templates holds "calculator" and "catalog", executed with the data
	// described in templates/calculator.html.
	Templates *template.Template
}

// Extend implements goldmark.Extender.
func (e *Blocks) Extend(m goldmark.Markdown) {
	m.Parser().AddOptions(parser.WithASTTransformers(util.Prioritized(&blockTransformer{e}, 100)))
	m.Renderer().AddOptions(renderer.WithNodeRenderers(util.Prioritized(&blockRenderer{e}, 100)))
}

// pageKey carries the page being converted through the parser context.
var pageKey = parser.NewContextKey()

// Page describes the page being converted: its name (the file name without
// ".html") and whether it goes into the single-file export.
type Page struct {
	Name   string
	Single bool
}

// NewContext returns a parser context for converting page p.
func NewContext(p Page) parser.Context {
	ctx := parser.NewContext(parser.WithIDs(newIDs(p)))
	ctx.Set(pageKey, p)
	return ctx
}

func pageOf(pc parser.Context) Page {
	if p, ok := pc.Get(pageKey).(Page); ok {
		return p
	}
	return Page{Name: "page"}
}

// PageLink is the link to page name: "name.html", or in the single-file
// export the fragment that selects its section.
func PageLink(name string, single bool) string {
	if single {
		return "#p=" + name
	}
	return name + ".html"
}

type blockTransformer struct{ e *Blocks }

func (t *blockTransformer) Transform(doc *ast.Document, reader text.Reader, pc parser.Context) {
	src := reader.Source()
	page := pageOf(pc)
	var blocks []*ast.FencedCodeBlock
	var links []*ast.Link
	_ = ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch n := n.(type) {
		case *ast.FencedCodeBlock:
			switch string(n.Language(src)) {
			case "calculator", "catalog", "math":
				blocks = append(blocks, n)
			}
		case *ast.Link:
			links = append(links, n)
		}
		return ast.WalkContinue, nil
	})
	count := map[string]int{}
	for _, b := range blocks {
		line := lineOf(src, b)
		body := string(b.Lines().Value(src))
		var repl ast.Node
		switch string(b.Language(src)) {
		case "calculator":
			c := t.calculator(body, line)
			c.Line = line
			if c.Err == nil {
				count[c.Entry.ID]++
				c.ID = "calc-" + c.Entry.ID
				if page.Single {
					c.ID = page.Name + "-" + c.ID
				}
				if n := count[c.Entry.ID]; n > 1 {
					c.ID += "-" + strconv.Itoa(n)
				}
				c.Form.ID = c.ID
			}
			repl = c
		case "catalog":
			c := &Catalog{Single: page.Single}
			if strings.TrimSpace(body) != "" {
				c.Err = &BlockError{line, "a catalog block takes no body"}
			}
			repl = c
		case "math":
			m := &Math{}
			var err error
			m.MathML, err = MathML(strings.TrimSpace(body), true)
			if err != nil {
				m.Err = &BlockError{line, err.Error()}
			}
			repl = m
		}
		b.Parent().ReplaceChild(b.Parent(), b, repl)
	}
	if page.Single {
		for _, l := range links {
			dest := string(l.Destination)
			if name, ok := strings.CutSuffix(strings.SplitN(dest, "#", 2)[0], ".html"); ok && isPageName(name) {
				l.Destination = []byte(PageLink(name, true))
			}
		}
	}
}

// isPageName reports whether s could be one of the site's page names: a
// relative link to a sibling page, nothing with a scheme or a path.
func isPageName(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '-') {
			return false
		}
	}
	return true
}

// lineOf is the 1-based line of the fenced block's opening fence.
func lineOf(src []byte, b *ast.FencedCodeBlock) int {
	off := 0
	if b.Info != nil {
		off = b.Info.Segment.Start
	} else if b.Lines().Len() > 0 {
		off = b.Lines().At(0).Start
	}
	return bytes.Count(src[:off], []byte("\n")) + 1
}

// calculator reads a calculator block's body; line is that of its fence.
func (t *blockTransformer) calculator(body string, line int) *Calculator {
	c := &Calculator{}
	fail := func(n int, format string, args ...any) *Calculator {
		c.Err = &BlockError{line + n, "calculator: " + fmt.Sprintf(format, args...)}
		return c
	}
	type kv struct {
		n    int
		k, v string
	}
	var items []kv
	seen := map[string]bool{}
	topo := ""
	for i, raw := range strings.Split(body, "\n") {
		s := strings.TrimSpace(raw)
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		k, v, ok := strings.Cut(s, ":")
		if !ok {
			return fail(i+1, "expected “key: value”, got %q", s)
		}
		k, v = strings.TrimSpace(k), strings.TrimSpace(v)
		if seen[k] {
			return fail(i+1, "%q given twice", k)
		}
		seen[k] = true
		if k == "topology" {
			topo = v
			continue
		}
		items = append(items, kv{i + 1, k, v})
	}
	if topo == "" {
		return fail(0, "missing “topology: ID”")
	}
	var ok bool
	for _, e := range t.e.Catalog {
		if e.ID == topo {
			c.Entry, ok = e, true
		}
	}
	if !ok {
		ids := make([]string, len(t.e.Catalog))
		for i, e := range t.e.Catalog {
			ids[i] = e.ID
		}
		return fail(0, "no topology %q in the catalog (one of: %s)", topo, strings.Join(ids, ", "))
	}
	c.Form = calc.DefaultForm(c.Entry)
	for _, it := range items {
		switch it.k {
		case "frequency":
			c.Form.Frequency = it.v
		case "sweep":
			f := strings.Fields(it.v)
			if len(f) != 3 {
				return fail(it.n, "sweep needs “FROM TO POINTS”, e.g. “10 100M 400”")
			}
			c.Form.Sweep = calc.SweepForm{From: f[0], To: f[1], Points: f[2]}
		default:
			known := false
			for _, p := range c.Entry.Params {
				known = known || p.Name == it.k
			}
			if !known {
				return fail(it.n, "%s has no parameter %q", topo, it.k)
			}
			c.Form.Params[it.k] = it.v
		}
	}
	return c
}

type blockRenderer struct{ e *Blocks }

// RegisterFuncs implements renderer.NodeRenderer.
func (r *blockRenderer) RegisterFuncs(reg renderer.NodeRendererFuncRegisterer) {
	reg.Register(KindCalculator, r.renderCalculator)
	reg.Register(KindCatalog, r.renderCatalog)
	reg.Register(KindMath, r.renderMath)
}

func (r *blockRenderer) renderMath(w util.BufWriter, _ []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	n := node.(*Math)
	if n.Err != nil {
		return ast.WalkStop, n.Err
	}
	w.WriteString(`<div class="formula">`)
	w.WriteString(n.MathML)
	w.WriteString("</div>\n")
	return ast.WalkSkipChildren, nil
}

// catalogRow is one stage in the catalog table.
type catalogRow struct {
	Link    string
	Entry   api.CatalogEntry
	Purpose string
	Ports   []string
}

func (r *blockRenderer) renderCatalog(w util.BufWriter, _ []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	n := node.(*Catalog)
	if n.Err != nil {
		return ast.WalkStop, n.Err
	}
	var rows []catalogRow
	single := n.Single
	for _, e := range r.e.Catalog {
		row := catalogRow{Link: PageLink(e.ID, single), Entry: e, Purpose: firstSentence(e.Description)}
		for _, p := range e.Ports {
			row.Ports = append(row.Ports, p.Name)
		}
		rows = append(rows, row)
	}
	if err := r.e.Templates.ExecuteTemplate(w, "catalog", rows); err != nil {
		return ast.WalkStop, err
	}
	return ast.WalkSkipChildren, nil
}

// firstSentence is the text up to and including the first ". ".
func firstSentence(s string) string {
	if i := strings.Index(s, ". "); i >= 0 {
		return s[:i+1]
	}
	return s
}

// calcField is one labelled input of a calculator form.
type calcField struct {
	Name, Symbol, Meaning, Unit, Value, Range string
	// EmptyHint says that the field may be left empty, where the meaning
	// does not say so already.
	EmptyHint bool
	// Analysis and Setting name an analysis's setting (its input's name
	// is then "Analysis.Setting"); Options make the input a choice.
	Analysis, Setting string
	Options           [][2]string
}

type calcGroup struct {
	Title  string
	Key    string // the analysis whose settings the group holds, if any
	Fields []calcField
}

// paramRange says what a parameter's input takes: its range, and that a
// gain may be typed in decibels.
func paramRange(p api.ParamInfo) string {
	r := view.Magnitude(p.Min, p.Unit) + " to " + view.Magnitude(p.Max, p.Unit)
	if p.Decibels {
		r += ", or in dB (100dB)"
	}
	return r
}

// settingGroups are the inputs of every analysis that has settings (see
// calc.Analysis), one group each, filled from form.
func settingGroups(form calc.Form) []calcGroup {
	var groups []calcGroup
	for _, a := range calc.Analyses {
		if len(a.Settings) == 0 {
			continue
		}
		g := calcGroup{Title: a.Title, Key: a.Key}
		for _, st := range a.Settings {
			v := st.Default
			if x, ok := form.Settings[a.Key][st.Name]; ok {
				v = x
			}
			g.Fields = append(g.Fields, calcField{Name: a.Field(st.Name), Symbol: st.Symbol, Meaning: st.Meaning, Unit: st.Unit,
				Value: v, Range: st.Range, Analysis: a.Key, Setting: st.Name, Options: st.Options})
		}
		groups = append(groups, g)
	}
	return groups
}

// calcData is what the "calculator" template receives.
type calcData struct {
	ID       string
	Entry    api.CatalogEntry
	Groups   []calcGroup
	Analysis []calcField
	// Settings are the analyses' own inputs (calc.Analysis.Settings).
	Settings  []calcGroup
	Schematic template.HTML
	Panel     template.HTML
}

var groupTitles = map[string]string{
	"network":   "Network",
	"source":    "Source",
	"load":      "Load",
	"amplifier": "Amplifier model",
	"noise":     "Noise sources (invented defaults)",
	"":          "Parameters",
}

func (r *blockRenderer) renderCalculator(w util.BufWriter, _ []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	n := node.(*Calculator)
	if n.Err != nil {
		return ast.WalkStop, n.Err
	}
	out := r.e.Compute(n.Form)
	if out.Error != nil {
		where := ""
		if out.Error.Param != "" {
			where = out.Error.Param + ": "
		}
		return ast.WalkStop, &BlockError{n.Line, "calculator " + n.Entry.ID + ": " + where + out.Error.Message}
	}
	d := calcData{ID: n.ID, Entry: n.Entry, Panel: template.HTML(out.HTML)}
	if r.e.Schematic != nil {
		d.Schematic, _ = r.e.Schematic(n.Entry.ID)
	}
	index := map[string]int{}
	for _, p := range n.Entry.Params {
		i, ok := index[p.Group]
		if !ok {
			i = len(d.Groups)
			index[p.Group] = i
			title, ok := groupTitles[p.Group]
			if !ok {
				title = strings.ToUpper(p.Group[:1]) + p.Group[1:]
			}
			d.Groups = append(d.Groups, calcGroup{Title: title})
		}
		d.Groups[i].Fields = append(d.Groups[i].Fields, calcField{
			Name: p.Name, Symbol: p.Symbol, Meaning: p.Meaning, Unit: p.Unit,
			Value: n.Form.Params[p.Name], EmptyHint: p.Optional && !strings.Contains(p.Meaning, "empty"),
			Range: paramRange(p),
		})
	}
	f := n.Form
	d.Analysis = []calcField{
		{Name: calc.FieldFrequency, Symbol: "f", Meaning: "spot frequency", Unit: "Hz", Value: f.Frequency, Range: "0 Hz or more"},
		{Name: calc.FieldFrom, Symbol: "from", Meaning: "sweep start", Unit: "Hz", Value: f.Sweep.From, Range: "above 0 Hz"},
		{Name: calc.FieldTo, Symbol: "to", Meaning: "sweep end", Unit: "Hz", Value: f.Sweep.To, Range: "above the start"},
		{Name: calc.FieldPoints, Symbol: "points", Meaning: "sweep points", Value: f.Sweep.Points, Range: "2 to " + strconv.Itoa(api.MaxPoints)},
	}
	d.Settings = settingGroups(f)
	if err := r.e.Templates.ExecuteTemplate(w, "calculator", d); err != nil {
		return ast.WalkStop, err
	}
	return ast.WalkSkipChildren, nil
}
