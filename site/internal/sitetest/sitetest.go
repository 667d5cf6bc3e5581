// Package sitetest holds what the tests of the site's packages share:
// reading the HTML their Go code writes, and asking the engine for the
// numbers a panel must show.
package sitetest

import (
	"encoding/json"
	"encoding/xml"
	"io"
	"strings"
	"testing"

	"zport/engine/api"
)

// Hostile is text a user could put where a port or part name goes; every
// writer must show it as text.
const Hostile = `<img src=x onerror=alert(1)>`

// Element is one element of parsed markup, with the text it contains.
type Element struct {
	Name  string
	Attrs map[string]string
	Text  string
}

// Parse reads markup as XML: the site's writers close every element and
// quote every attribute, so markup that is not well-formed XML is a bug. It
// returns every element in document order.
func Parse(t testing.TB, html string) []*Element {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(html))
	d.Strict = true
	d.Entity = map[string]string{}
	return elements(t, d)
}

// ParseLoose reads markup with void elements (input) and bare boolean
// attributes (selected, hidden), as forms have them.
func ParseLoose(t testing.TB, html string) []*Element {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(html))
	d.Strict = false
	d.AutoClose = xml.HTMLAutoClose
	d.Entity = xml.HTMLEntity
	return elements(t, d)
}

func elements(t testing.TB, d *xml.Decoder) []*Element {
	t.Helper()
	var all, stack []*Element
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed: %v", err)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			e := &Element{Name: tok.Name.Local, Attrs: map[string]string{}}
			for _, a := range tok.Attr {
				e.Attrs[a.Name.Local] = a.Value
			}
			all = append(all, e)
			stack = append(stack, e)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			for _, e := range stack {
				e.Text += string(tok)
			}
		}
	}
	return all
}

// CheckInert fails t when html holds the Hostile text as markup rather
// than as escaped text, or any element carries an event handler.
func CheckInert(t testing.TB, name, html string) {
	t.Helper()
	for _, bad := range []string{"<img", "<script", "onerror=alert(1)>"} {
		if strings.Contains(html, bad) {
			t.Errorf("%s: contains %q unescaped", name, bad)
		}
	}
	if !strings.Contains(html, "&lt;img src=x onerror=alert(1)&gt;") {
		t.Errorf("%s: the hostile text is not shown as text", name)
	}
	for _, e := range ParseLoose(t, html) {
		for k := range e.Attrs {
			if strings.HasPrefix(k, "on") {
				t.Errorf("%s: element %s has an event handler attribute %s", name, e.Name, k)
			}
		}
		if e.Name == "img" || e.Name == "script" {
			t.Errorf("%s: holds a %s element", name, e.Name)
		}
	}
}

// AidNumbers collects the numbers of a design-aid panel by their data
// attributes, keyed data-aid|data-quantity|data-stat|data-parameter|
// data-variant|data-index, each the engine's number in full (data-value);
// two numbers under one key fail t.
func AidNumbers(t testing.TB, els []*Element) map[string]string {
	t.Helper()
	out := map[string]string{}
	for _, e := range els {
		a := e.Attrs
		if a["data-aid"] == "" || a["data-value"] == "" {
			continue
		}
		k := strings.Join([]string{a["data-aid"], a["data-quantity"], a["data-stat"], a["data-parameter"], a["data-variant"], a["data-index"]}, "|")
		if _, dup := out[k]; dup {
			t.Errorf("two numbers carry %s", k)
		}
		out[k] = a["data-value"]
	}
	return out
}

// Inverting is a request for the catalog's inverting stage at its
// defaults and spot frequency, without a sweep.
func Inverting(t testing.TB) api.Request {
	t.Helper()
	e, ok := api.LookupEntry("inverting")
	if !ok {
		t.Fatal("no inverting stage")
	}
	return api.Request{Topology: "inverting", Frequency: e.Frequency}
}

// Tolerance is the engine's one-shot answer to req with the "tolerance"
// key tol, given as JSON.
func Tolerance(t testing.TB, req api.Request, tol string) *api.ToleranceResult {
	t.Helper()
	var q api.ToleranceRequest
	if err := json.Unmarshal([]byte(tol), &q); err != nil {
		t.Fatal(err)
	}
	api.Tolerance.Ask(&req, &q)
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	return api.Tolerance.Result(resp)
}
