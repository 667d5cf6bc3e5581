package site

import (
	"bytes"
	"strings"
	"testing"

	"github.com/yuin/goldmark"

	"zport/engine/api"
	"zport/site/calc"
	"zport/site/examples"
)

// hostileExample carries markup in every text the page prints.
var hostileExample = examples.Example{
	ID: "hostile", Title: `<img src=x onerror=alert(1)>`, Scenario: `<script>alert(2)</script>`, Look: `"><b>`,
	Text:      "# </textarea><img src=x onerror=alert(3)>\nvsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M ro=50\nport o out gnd\n",
	Reference: "U1", Ports: []string{"o"}, Gain: &api.GainSpec{Source: "Vin", Output: "out"},
	Frequency: "1k", From: "10", To: "1M", Points: "20",
}

func editorMarkdown(t *testing.T, list []examples.Example) goldmark.Markdown {
	t.Helper()
	tmpl, err := Templates(Sources)
	if err != nil {
		t.Fatal(err)
	}
	return goldmark.New(goldmark.WithExtensions(&Editor{Examples: list, Compute: calc.Compute, Templates: tmpl}))
}

func TestEditorBlock(t *testing.T) {
	list := []examples.Example{examples.All()[0], hostileExample}
	for _, tc := range []struct {
		md, example string
	}{
		{"```circuit-editor\n```\n", list[0].ID},
		{"# T\n\n```circuit-editor\n# opens with the second\nexample: hostile\n```\n", "hostile"},
	} {
		var out bytes.Buffer
		if err := editorMarkdown(t, list).Convert([]byte(tc.md), &out); err != nil {
			t.Fatalf("%q: %v", tc.md, err)
		}
		got := out.String()
		for _, want := range []string{
			`data-circuit-editor`, `id="circuit"`, `data-max-url="2000"`, `<option value="` + tc.example + `" selected>`,
			`data-quantity="zDirect"`, `<template data-role="examples">`, `data-example="hostile"`, `name="sweep.points"`,
		} {
			if !strings.Contains(got, want) {
				t.Errorf("example %s: output lacks %s", tc.example, want)
			}
		}
		// Every text is escaped: the markup of the hostile example never
		// appears as markup, and the textarea holds the text as it is.
		for _, bad := range []string{"<img", "<script", "<b>", "</textarea><"} {
			if strings.Contains(got, bad) {
				t.Errorf("example %s: unescaped %q in the output", tc.example, bad)
			}
		}
	}
}

func TestEditorBlockErrors(t *testing.T) {
	for _, tc := range []struct {
		md, want string
	}{
		{"```circuit-editor\nexample: nope\n```\n", `line 2: circuit-editor: no example "nope" (one of: ` + strings.Join(exampleIDs(), ", ") + `)`},
		{"text\n\n```circuit-editor\nopen: twopole\n```\n", `line 4: circuit-editor: expected “example: ID”, got "open: twopole"`},
		{"```circuit-editor\n```\n\n```circuit-editor\n```\n", "line 4: circuit-editor: a page holds one editor (it keeps its circuit in the page's address)"},
	} {
		var out bytes.Buffer
		err := editorMarkdown(t, examples.All()).Convert([]byte(tc.md), &out)
		if err == nil || err.Error() != tc.want {
			t.Errorf("%q:\n got error %v\nwant %s", tc.md, err, tc.want)
		}
	}
	var out bytes.Buffer
	if err := editorMarkdown(t, nil).Convert([]byte("```circuit-editor\n```\n"), &out); err == nil {
		t.Error("an editor without examples was accepted")
	}
}

func exampleIDs() []string {
	var l []string
	for _, e := range examples.All() {
		l = append(l, e.ID)
	}
	return l
}

// The custom page is built, linked from every page, loads its script, and
// is a section of the single-file export with its script inline.
func TestCustomPage(t *testing.T) {
	files := build(t)
	page := string(files["custom.html"])
	for _, want := range []string{
		`data-circuit-editor`, `<script defer src="zport-engine.js"></script>`, `<script defer src="circuit.js"></script>`,
		`data-quantity="zDirect"`, `Small-signal linear analysis only`, `<table>`,
	} {
		if !strings.Contains(page, want) {
			t.Errorf("custom.html lacks %s", want)
		}
	}
	if _, ok := files["circuit.js"]; !ok {
		t.Error("circuit.js is not written")
	}
	for _, e := range examples.All() {
		if !strings.Contains(page, `data-example="`+e.ID+`"`) {
			t.Errorf("custom.html does not offer the example %s", e.ID)
		}
	}
	for _, name := range files.Names() {
		if strings.HasSuffix(name, ".html") && !strings.Contains(string(files[name]), `href="custom.html"`) {
			t.Errorf("%s does not link to the custom page", name)
		}
		if strings.HasSuffix(name, ".html") && name != "custom.html" && strings.Contains(string(files[name]), "circuit.js") {
			t.Errorf("%s loads circuit.js without the editor", name)
		}
	}
	s := string(single(t))
	if !strings.Contains(s, `id="page-custom"`) || !strings.Contains(s, `href="#p=custom"`) || !strings.Contains(s, `id="custom-circuit"`) {
		t.Error("the single file lacks the custom section, its link or its editor")
	}
	cjs, _ := Sources.ReadFile("assets/circuit.js")
	if !strings.Contains(s, string(cjs[:200])) {
		t.Error("the single file does not carry circuit.js")
	}
}
