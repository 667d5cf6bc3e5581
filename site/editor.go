package site

import (
	"html/template"
	"slices"
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
	"zport/site/examples"
)

// KindCircuitEditor is the custom-circuit page's editor: a fenced block
// with info string "circuit-editor".
var KindCircuitEditor = ast.NewNodeKind("CircuitEditor")

// CircuitEditor is the node of a circuit-editor block. Its body is
// optional "key: value" lines: "example: ID" chooses the example the
// editor opens with (the first of the list when absent); blank lines and
// lines starting with "#" are ignored.
type CircuitEditor struct {
	ast.BaseBlock
	// Example is the example the editor opens with.
	Example examples.Example
	// ID is the element id of the editor.
	ID string
	// Line is the line of the block's opening fence.
	Line int
	Err  error
}

// Kind implements ast.Node.
func (n *CircuitEditor) Kind() ast.NodeKind { return KindCircuitEditor }

// Dump implements ast.Node.
func (n *CircuitEditor) Dump(source []byte, level int) {
	ast.DumpHelper(n, source, level, map[string]string{"Example": n.Example.ID, "ID": n.ID}, nil)
}

// MaxShareURL is the longest share link the editor offers without a
// warning, in characters: many wikis, chat programs and mail clients cut
// or refuse longer ones, so above it the page suggests saving the circuit
// as a .txt file instead.
const MaxShareURL = 2000

// Editor is the goldmark extension that turns a fenced block with info
// string "circuit-editor" into the custom-circuit page's editor: circuit
// text with line numbers, pickers for what to analyze, and the results
// panel, pre-rendered for the example it opens with. One editor per page:
// it keeps its circuit in the page's URL fragment.
type Editor struct {
	// Examples are the examples it offers, the first being the default.
	Examples []examples.Example
	// Compute renders the pre-computed panel.
	Compute func(calc.Form) calc.Output
	// Templates holds "circuit-editor" (templates/editor.html).
	Templates *template.Template
}

// Extend implements goldmark.Extender.
func (e *Editor) Extend(m goldmark.Markdown) {
	m.Parser().AddOptions(parser.WithASTTransformers(util.Prioritized(&editorTransformer{e}, 100)))
	m.Renderer().AddOptions(renderer.WithNodeRenderers(util.Prioritized(&editorRenderer{e}, 100)))
}

type editorTransformer struct{ e *Editor }

func (t *editorTransformer) Transform(doc *ast.Document, reader text.Reader, pc parser.Context) {
	src := reader.Source()
	page := pageOf(pc)
	var blocks []*ast.FencedCodeBlock
	_ = ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if b, ok := n.(*ast.FencedCodeBlock); ok && entering && string(b.Language(src)) == "circuit-editor" {
			blocks = append(blocks, b)
		}
		return ast.WalkContinue, nil
	})
	for i, b := range blocks {
		line := lineOf(src, b)
		n := t.read(string(b.Lines().Value(src)), line)
		n.Line = line
		n.ID = "circuit"
		if page.Single {
			n.ID = page.Name + "-circuit"
		}
		if i > 0 && n.Err == nil {
			n.Err = &BlockError{line, "circuit-editor: a page holds one editor (it keeps its circuit in the page's address)"}
		}
		b.Parent().ReplaceChild(b.Parent(), b, n)
	}
}

// read reads a circuit-editor block's body; line is that of its fence.
func (t *editorTransformer) read(body string, line int) *CircuitEditor {
	n := &CircuitEditor{}
	if len(t.e.Examples) == 0 {
		n.Err = &BlockError{line, "circuit-editor: no examples to open with"}
		return n
	}
	n.Example = t.e.Examples[0]
	for i, raw := range strings.Split(body, "\n") {
		s := strings.TrimSpace(raw)
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		k, v, ok := strings.Cut(s, ":")
		k, v = strings.TrimSpace(k), strings.TrimSpace(v)
		if !ok || k != "example" {
			n.Err = &BlockError{line + i + 1, "circuit-editor: expected “example: ID”, got " + strconv.Quote(s)}
			return n
		}
		found := false
		var ids []string
		for _, e := range t.e.Examples {
			ids = append(ids, e.ID)
			if e.ID == v {
				n.Example, found = e, true
			}
		}
		if !found {
			n.Err = &BlockError{line + i + 1, "circuit-editor: no example " + strconv.Quote(v) + " (one of: " + strings.Join(ids, ", ") + ")"}
			return n
		}
	}
	return n
}

type editorRenderer struct{ e *Editor }

// RegisterFuncs implements renderer.NodeRenderer.
func (r *editorRenderer) RegisterFuncs(reg renderer.NodeRendererFuncRegisterer) {
	reg.Register(KindCircuitEditor, r.render)
}

// editorExample is an example as the template lists it.
type editorExample struct {
	examples.Example
	PortList string // the ports, space-separated (port and node names hold no spaces)
}

// pick is one option of a picker.
type pick struct {
	Value, Label string
	Selected     bool
}

// editorData is what the "circuit-editor" template receives.
type editorData struct {
	ID       string
	Text     string
	Lines    string // the gutter's line numbers, one per line
	Current  editorExample
	Examples []editorExample
	// The pickers as the example opens, so that the page reads the same
	// before its script runs; the script rebuilds them from the text.
	References, Ports, Sources, Nodes, Outputs, Minus []pick
	Analysis                                          []calcField
	Settings                                          []calcGroup
	Panel                                             template.HTML
	MaxURL                                            int
	MaxText                                           int
}

func (r *editorRenderer) render(w util.BufWriter, _ []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	n := node.(*CircuitEditor)
	if n.Err != nil {
		return ast.WalkStop, n.Err
	}
	ex := n.Example
	form := calc.Form{
		Circuit: ex.Text, Reference: ex.Reference, Ports: ex.Ports, Gain: ex.Gain,
		Frequency: ex.Frequency, Sweep: calc.SweepForm{From: ex.From, To: ex.To, Points: ex.Points}, ID: n.ID,
	}
	out := r.e.Compute(form)
	if out.Error != nil {
		return ast.WalkStop, &BlockError{n.Line, "circuit-editor: example " + ex.ID + ": " + out.Error.Message}
	}
	d := editorData{ID: n.ID, Text: ex.Text, Current: listed(ex), Panel: template.HTML(out.HTML), MaxURL: MaxShareURL, MaxText: api.MaxCircuitBytes}
	var lines strings.Builder
	for i := 1; i <= strings.Count(ex.Text, "\n")+1; i++ {
		lines.WriteString(strconv.Itoa(i) + "\n")
	}
	d.Lines = lines.String()
	for _, e := range r.e.Examples {
		d.Examples = append(d.Examples, listed(e))
	}
	in := api.Inspect(ex.Text)
	for _, p := range in.References {
		d.References = append(d.References, pick{p.Name, p.Name + " (" + p.Kind + ", line " + strconv.Itoa(p.Line) + ")", p.Name == ex.Reference})
	}
	for _, p := range in.Ports {
		d.Ports = append(d.Ports, pick{p.Name, p.Name + " (" + p.A + " – " + p.B + ")", slices.Contains(ex.Ports, p.Name)})
	}
	d.Sources = []pick{{"", "none", ex.Gain == nil}}
	for _, p := range in.Sources {
		d.Sources = append(d.Sources, pick{p.Name, p.Name + " (" + p.Kind + ")", ex.Gain != nil && ex.Gain.Source == p.Name})
	}
	plus, minus := "", "gnd"
	if ex.Gain != nil {
		plus, minus, _ = strings.Cut(ex.Gain.Output, ",")
		if minus == "" {
			minus = "gnd"
		}
	}
	d.Nodes = []pick{{"", "none", true}}
	d.Minus = []pick{{"gnd", "gnd", minus == "gnd"}}
	for _, nd := range in.Nodes {
		d.Nodes = append(d.Nodes, pick{Value: nd, Label: nd})
		d.Outputs = append(d.Outputs, pick{nd, nd, nd == plus})
		d.Minus = append(d.Minus, pick{nd, nd, nd == minus})
	}
	d.Analysis = []calcField{
		{Name: calc.FieldFrequency, Symbol: "f", Meaning: "spot frequency", Unit: "Hz", Value: ex.Frequency, Range: "0 Hz or more"},
		{Name: calc.FieldFrom, Symbol: "from", Meaning: "sweep start", Unit: "Hz", Value: ex.From, Range: "above 0 Hz"},
		{Name: calc.FieldTo, Symbol: "to", Meaning: "sweep end", Unit: "Hz", Value: ex.To, Range: "above the start"},
		{Name: calc.FieldPoints, Symbol: "points", Meaning: "sweep points", Value: ex.Points, Range: "2 to " + strconv.Itoa(api.MaxPoints)},
	}
	d.Settings = settingGroups(form)
	if err := r.e.Templates.ExecuteTemplate(w, "circuit-editor", d); err != nil {
		return ast.WalkStop, err
	}
	return ast.WalkSkipChildren, nil
}

func listed(e examples.Example) editorExample {
	return editorExample{Example: e, PortList: strings.Join(e.Ports, " ")}
}
