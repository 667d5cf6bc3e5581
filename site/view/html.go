package view

import "strings"

// writer builds HTML in which text and attribute values are always escaped.
// Element and attribute names come from this package's code only, never from
// data; raw markup enters only through svg, for the plot package's output.
type Writer struct {
	b strings.Builder
}

// open writes a start tag. attrs alternates names and values; a value is
// escaped, and a name given with an empty value and a trailing "?" (e.g.
// "hidden?") is written as a bare boolean attribute when the value is
// non-empty and omitted otherwise.
func (w *Writer) Open(tag string, attrs ...string) {
	w.b.WriteByte('<')
	w.b.WriteString(tag)
	for i := 0; i+1 < len(attrs); i += 2 {
		name, val := attrs[i], attrs[i+1]
		if strings.HasSuffix(name, "?") {
			if val != "" {
				w.b.WriteByte(' ')
				w.b.WriteString(strings.TrimSuffix(name, "?"))
			}
			continue
		}
		w.b.WriteByte(' ')
		w.b.WriteString(name)
		w.b.WriteString(`="`)
		w.b.WriteString(escape(val))
		w.b.WriteByte('"')
	}
	w.b.WriteByte('>')
}

// close writes an end tag.
func (w *Writer) Close(tag string) {
	w.b.WriteString("</")
	w.b.WriteString(tag)
	w.b.WriteByte('>')
}

// text writes escaped text.
func (w *Writer) Text(s string) {
	w.b.WriteString(escape(s))
}

// elem writes a whole element holding escaped text.
func (w *Writer) Elem(tag, text string, attrs ...string) {
	w.Open(tag, attrs...)
	w.Text(text)
	w.Close(tag)
}

// svg inserts markup produced by package plot, which escapes its own text.
func (w *Writer) Raw(markup string) {
	w.b.WriteString(markup)
}

func (w *Writer) String() string { return w.b.String() }

// escape replaces the five characters that are markup in text or in a
// quoted attribute value. It stands in for html.EscapeString, whose package
// carries the whole entity table into the WebAssembly module.
func escape(s string) string {
	if !strings.ContainsAny(s, "&<>\"'") {
		return s
	}
	var b strings.Builder
	b.Grow(len(s) + 16)
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '&':
			b.WriteString("&amp;")
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '"':
			b.WriteString("&#34;")
		case '\'':
			b.WriteString("&#39;")
		default:
			b.WriteByte(c)
		}
	}
	return b.String()
}
