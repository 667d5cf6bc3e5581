package plot

import (
	"encoding/xml"
	"io"
	"strconv"
	"strings"
	"testing"
)

// node is a parsed element, enough to check the structure of the output.
type node struct {
	name  string
	attr  map[string]string
	text  string // character data directly inside
	kids  []*node
	space string
}

// parse decodes an SVG with encoding/xml in strict mode, failing the test
// if it is not well-formed, and returns the root element.
func parse(t testing.TB, s string) *node {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(s))
	d.Strict = true
	var stack []*node
	var root *node
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("output is not well-formed XML: %v\n%s", err, clip(s))
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			n := &node{name: tk.Name.Local, space: tk.Name.Space, attr: map[string]string{}}
			for _, a := range tk.Attr {
				n.attr[a.Name.Local] = a.Value
			}
			if len(stack) > 0 {
				p := stack[len(stack)-1]
				p.kids = append(p.kids, n)
			} else if root != nil {
				t.Fatalf("more than one root element")
			} else {
				root = n
			}
			stack = append(stack, n)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			if len(stack) > 0 {
				stack[len(stack)-1].text += string(tk)
			} else if strings.TrimSpace(string(tk)) != "" {
				t.Fatalf("text outside the root element: %q", tk)
			}
		}
	}
	if root == nil {
		t.Fatalf("no root element")
	}
	return root
}

func clip(s string) string {
	if len(s) > 600 {
		return s[:600] + "…"
	}
	return s
}

// all returns the elements under n (n included) for which f holds, in
// document order.
func (n *node) all(f func(*node) bool) []*node {
	var out []*node
	var walk func(*node)
	walk = func(m *node) {
		if f(m) {
			out = append(out, m)
		}
		for _, k := range m.kids {
			walk(k)
		}
	}
	walk(n)
	return out
}

func (n *node) hasClass(c string) bool {
	for _, f := range strings.Fields(n.attr["class"]) {
		if f == c {
			return true
		}
	}
	return false
}

func byName(name string) func(*node) bool { return func(n *node) bool { return n.name == name } }

func byClass(name, class string) func(*node) bool {
	return func(n *node) bool { return n.name == name && n.hasClass(class) }
}

// texts returns the contents of the <text> elements inside groups of the
// given class.
func (n *node) texts(class string) []string {
	var out []string
	for _, g := range n.all(byClass("g", class)) {
		for _, k := range g.all(byName("text")) {
			out = append(out, k.text)
		}
	}
	return out
}

// floats parses a space-separated list of numbers.
func floats(t testing.TB, s string) []float64 {
	t.Helper()
	var out []float64
	for _, f := range strings.Fields(s) {
		v, err := strconv.ParseFloat(f, 64)
		if err != nil {
			t.Fatalf("bad number %q: %v", f, err)
		}
		out = append(out, v)
	}
	return out
}
