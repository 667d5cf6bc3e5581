package site

import (
	"bytes"
	"html/template"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/testutil"

	"zport/engine/api"
	"zport/site/calc"
)

// testCatalog is a catalog of our own with one small stage.
var testCatalog = []api.CatalogEntry{{
	ID: "divider", Title: "Test divider", Description: "Two resistors. A test stage.",
	Params: []api.ParamInfo{
		{Name: "R1", Symbol: "R_1", Meaning: "top resistor", Unit: "Ω", Default: "10k", Min: 1, Max: 1e9, Group: "network"},
		{Name: "CL", Symbol: "C_L", Meaning: "load capacitance", Unit: "F", Default: "", Min: 1e-15, Max: 1, Optional: true, Group: "load"},
	},
	Ports:     []api.PortInfo{{Name: "out", Title: "output"}},
	Frequency: 1e3,
	Sweep:     api.SweepSpec{From: 10, To: 1e6, Points: 50},
}}

// testTemplates stand in for the site's look: they show what the extension
// hands to its templates, compactly.
const testTemplates = `{{define "calculator"}}<calc id="{{.ID}}" topology="{{.Entry.ID}}">
{{range .Groups}}<group title="{{.Title}}">{{range .Fields}}<field name="{{.Name}}" sym="{{.Symbol}}" value="{{.Value}}" range="{{.Range}}"{{if .EmptyHint}} empty{{end}}/>{{end}}</group>
{{end}}<group title="Analysis">{{range .Analysis}}<field name="{{.Name}}" value="{{.Value}}"/>{{end}}</group>
{{.Schematic}}{{.Panel}}</calc>
{{end}}{{define "catalog"}}<catalog>{{range .}}<a href="{{.Link}}">{{.Entry.Title}}</a> {{.Purpose}} {{join .Ports ","}}{{end}}</catalog>
{{end}}`

// fakeCompute renders a stand-in panel that shows the form it was given.
func fakeCompute(f calc.Form) calc.Output {
	if f.Params["R1"] == "fail" {
		return calc.Output{Error: &api.ErrorBody{Param: "R1", Message: "R₁: not a value"}}
	}
	return calc.Output{HTML: `<div class="panel">` + template.HTMLEscapeString(f.ID+" R1="+f.Params["R1"]+" f="+f.Frequency+
		" sweep="+f.Sweep.From+","+f.Sweep.To+","+f.Sweep.Points) + `</div>`}
}

func testMarkdown(t *testing.T) goldmark.Markdown {
	t.Helper()
	tmpl := template.Must(template.New("t").Funcs(template.FuncMap{"join": strings.Join}).Parse(testTemplates))
	return goldmark.New(goldmark.WithExtensions(&Blocks{
		Catalog: testCatalog,
		Compute: fakeCompute,
		Schematic: func(id string) (template.HTML, bool) {
			return template.HTML(`<svg aria-label="` + id + `"></svg>`), id == "divider"
		},
		Templates: tmpl,
	}))
}

func TestBlocksSpec(t *testing.T) {
	testutil.DoTestCaseFile(testMarkdown(t), "testdata/blocks.txt", t, testutil.ParseCliCaseArg()...)
}

func TestBlockErrors(t *testing.T) {
	for _, tc := range []struct {
		md, want string
	}{
		{"# T\n\n```calculator\nR1: 1k\n```\n", "line 3: calculator: missing “topology: ID”"},
		{"text\n\n```calculator\ntopology: nope\n```\n", `line 3: calculator: no topology "nope" in the catalog (one of: divider)`},
		{"```calculator\ntopology: divider\nR9: 1k\n```\n", `line 3: calculator: divider has no parameter "R9"`},
		{"```calculator\ntopology: divider\nR1 1k\n```\n", `line 3: calculator: expected “key: value”, got "R1 1k"`},
		{"```calculator\ntopology: divider\nR1: 1k\nR1: 2k\n```\n", `line 4: calculator: "R1" given twice`},
		{"```calculator\ntopology: divider\nsweep: 10 1M\n```\n", "line 3: calculator: sweep needs “FROM TO POINTS”, e.g. “10 100M 400”"},
		{"a\n\n```calculator\ntopology: divider\nR1: fail\n```\n", "line 3: calculator divider: R1: R₁: not a value"},
		{"```catalog\nstuff\n```\n", "line 1: a catalog block takes no body"},
		{"\n```math\n\\frac{a}\n```\n", "line 2: formula, byte 8: missing argument"},
		{"```math\nx_\n```\n", "line 1: formula, byte 2: missing argument"},
		{"```math\n\\nope\n```\n", `line 1: formula, byte 0: unknown command \nope`},
	} {
		var out bytes.Buffer
		err := testMarkdown(t).Convert([]byte(tc.md), &out)
		if err == nil || err.Error() != tc.want {
			t.Errorf("%q:\n got error %v\nwant %s", tc.md, err, tc.want)
		}
	}
}

// TestSingleLinks checks that in the single-file export links between
// pages select sections, and nothing else is touched.
func TestSingleLinks(t *testing.T) {
	md := "[a](method.html) [b](divider.html#x) [c](https://example.org/x.html) [d](../up.html) [e](#here) [f](data.csv)\n\n```catalog\n```\n"
	for _, single := range []bool{false, true} {
		var out bytes.Buffer
		ctx := NewContext(Page{Name: "index", Single: single})
		if err := testMarkdown(t).Convert([]byte(md), &out, parser.WithContext(ctx)); err != nil {
			t.Fatal(err)
		}
		got := out.String()
		want := []string{`href="method.html"`, `href="divider.html#x"`, `href="divider.html"`}
		if single {
			want = []string{`href="#p=method"`, `href="#p=divider"`, `href="#p=divider"`}
		}
		for _, w := range append(want, `href="https://example.org/x.html"`, `href="../up.html"`, `href="#here"`, `href="data.csv"`) {
			if !strings.Contains(got, w) {
				t.Errorf("single=%v: output lacks %s:\n%s", single, w, got)
			}
		}
	}
}

func TestHeadingIDs(t *testing.T) {
	md := "# Title\n\n## Design notes\n\n## Design notes\n\n## ¿Qué?\n"
	for _, tc := range []struct {
		page Page
		want []string
	}{
		{Page{Name: "method"}, []string{`id="title"`, `id="design-notes"`, `id="design-notes-2"`, `id="qu"`}},
		{Page{Name: "method", Single: true}, []string{`id="method-title"`, `id="method-design-notes"`, `id="method-design-notes-2"`}},
	} {
		m := goldmark.New(goldmark.WithParserOptions(parser.WithAutoHeadingID()))
		var out bytes.Buffer
		if err := m.Convert([]byte(md), &out, parser.WithContext(NewContext(tc.page))); err != nil {
			t.Fatal(err)
		}
		for _, w := range tc.want {
			if !strings.Contains(out.String(), w) {
				t.Errorf("%+v: lacks %s in\n%s", tc.page, w, out.String())
			}
		}
	}
}
