// Package fragment reads and writes the settings a page keeps in its URL
// fragment: form-encoded key=value pairs joined by "&", as URLSearchParams
// reads them, so that a shared link reproduces what its sender saw.
//
// Writing keeps the order the caller gives, so two equal states give the
// same link. Reading is strict, setting by setting: a fragment too long to
// be a link is refused whole, and otherwise each setting that is malformed
// — no "=", bad escaping, control characters or invalid UTF-8, an
// over-long key or value, a key given twice that may appear only once — is
// left out and reported with its key (an Errors list), while the others
// are read. The page then uses what it can of a link and says exactly what
// it did not use. The package stands in for net/url, which would bring
// net/netip into the WebAssembly module.
//
//	var p fragment.Pairs
//	p.Add("R1", "4k7")
//	p.Add("f", "1k")
//	s := p.Encode() // "R1=4k7&f=1k"
//	back, err := fragment.Parse(s, fragment.Repeatable("port"))
package fragment

import (
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Limits on what Parse reads.
const (
	// MaxLength bounds a whole fragment, in bytes.
	MaxLength = 4096
	// MaxValue bounds one key or value, in bytes, once unescaped.
	MaxValue = 64
)

// Pair is one setting.
type Pair struct {
	Key, Value string
}

// Pairs is a fragment's settings in order.
type Pairs []Pair

// Add appends a pair.
func (p *Pairs) Add(key, value string) { *p = append(*p, Pair{key, value}) }

// Get returns the value of the first pair with key.
func (p Pairs) Get(key string) (string, bool) {
	for _, x := range p {
		if x.Key == key {
			return x.Value, true
		}
	}
	return "", false
}

// Encode writes the pairs form-encoded, joined by "&", without "#".
func (p Pairs) Encode() string {
	var b strings.Builder
	for i, x := range p {
		if i > 0 {
			b.WriteByte('&')
		}
		b.WriteString(Escape(x.Key))
		b.WriteByte('=')
		b.WriteString(Escape(x.Value))
	}
	return b.String()
}

// Error is a fragment, or one setting of it, that could not be read. Key
// names the setting at fault when it could be read, and Value holds its
// value when that could be read too.
type Error struct {
	Key, Value string
	Msg        string
}

func (e *Error) Error() string { return e.Msg }

// Errors lists the settings of a fragment that could not be read, in the
// order they came.
type Errors []*Error

func (e Errors) Error() string {
	switch len(e) {
	case 0:
		return "no errors"
	case 1:
		return e[0].Msg
	}
	return e[0].Msg + " (and " + strconv.Itoa(len(e)-1) + " more)"
}

// Option adjusts Parse.
type Option func(*options)

type options struct {
	repeatable map[string]bool
	skip       map[string]bool
}

// Repeatable lets each of keys appear more than once (a list, such as the
// ports of a circuit); any other key given twice is an error naming it.
func Repeatable(keys ...string) Option {
	return func(o *options) {
		for _, k := range keys {
			o.repeatable[k] = true
		}
	}
}

// Skip leaves out the pairs with these keys unread (their values are not
// checked): settings that belong to someone else, such as the compressed
// circuit text that the page's script reads itself.
func Skip(keys ...string) Option {
	return func(o *options) {
		for _, k := range keys {
			o.skip[k] = true
		}
	}
}

// Parse reads a fragment, with or without its leading "#". Empty pieces
// ("a=1&&b=2") are passed over. A fragment longer than MaxLength is refused
// whole: Parse returns nil and an *Error. Otherwise it returns the settings
// it could read, in order, and, when some could not be read, an Errors
// list of them: a key given twice that may appear only once is reported
// once, and none of its values is returned. A skipped key is not read, but
// it may not appear twice either.
func Parse(frag string, opts ...Option) (Pairs, error) {
	o := options{repeatable: map[string]bool{}, skip: map[string]bool{}}
	for _, f := range opts {
		f(&o)
	}
	frag = strings.TrimPrefix(frag, "#")
	if len(frag) > MaxLength {
		return nil, &Error{Msg: "the link's settings are longer than " + strconv.Itoa(MaxLength) + " characters"}
	}
	var out Pairs
	var bad Errors
	seen := map[string]int{}
	for _, part := range strings.Split(frag, "&") {
		if part == "" {
			continue
		}
		rawKey, rawVal, ok := strings.Cut(part, "=")
		if !ok {
			bad = append(bad, &Error{Msg: "a setting has no “=”"})
			continue
		}
		k, err := Unescape(rawKey)
		if err != nil {
			bad = append(bad, &Error{Msg: "a setting's name is not properly escaped"})
			continue
		}
		if !printable(k) || len(k) > MaxValue {
			bad = append(bad, &Error{Msg: "a setting's name is longer than " + strconv.Itoa(MaxValue) + " characters or holds characters that are not allowed"})
			continue
		}
		if seen[k]++; seen[k] == 2 && !o.repeatable[k] {
			bad = append(bad, &Error{Key: k, Msg: "the setting " + strconv.Quote(k) + " appears twice"})
		}
		if o.skip[k] {
			continue
		}
		v, err := Unescape(rawVal)
		switch {
		case err != nil:
			bad = append(bad, &Error{Key: k, Msg: "its value is not properly escaped"})
		case !printable(v):
			bad = append(bad, &Error{Key: k, Msg: "its value holds characters that are not allowed"})
		case len(v) > MaxValue:
			bad = append(bad, &Error{Key: k, Msg: "its value is longer than " + strconv.Itoa(MaxValue) + " characters"})
		default:
			out = append(out, Pair{k, v})
		}
	}
	// A key given twice is refused with all its values.
	kept := out[:0]
	for _, p := range out {
		if seen[p.Key] < 2 || o.repeatable[p.Key] {
			kept = append(kept, p)
		}
	}
	if len(bad) > 0 {
		return kept, bad
	}
	return kept, nil
}

// printable reports whether s is valid UTF-8 free of control characters.
func printable(s string) bool {
	if !utf8.ValidString(s) {
		return false
	}
	for _, r := range s {
		if unicode.IsControl(r) || r == utf8.RuneError {
			return false
		}
	}
	return true
}

// Escape writes s form-encoded, as URLSearchParams reads it: letters,
// digits and "-_.~" stay, a space becomes "+", every other byte %XX.
func Escape(s string) string {
	const hex = "0123456789ABCDEF"
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' || c == '_' || c == '.' || c == '~':
			b.WriteByte(c)
		case c == ' ':
			b.WriteByte('+')
		default:
			b.WriteByte('%')
			b.WriteByte(hex[c>>4])
			b.WriteByte(hex[c&15])
		}
	}
	return b.String()
}

// errEscape is a malformed %-escape.
var errEscape = &Error{Msg: "a setting is not properly escaped"}

// Unescape reads a form-encoded string: "+" is a space, %XX a byte.
func Unescape(s string) (string, error) {
	if !strings.ContainsAny(s, "%+") {
		return s, nil
	}
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '+':
			b.WriteByte(' ')
		case '%':
			if i+2 >= len(s) {
				return "", errEscape
			}
			hi, ok1 := unhex(s[i+1])
			lo, ok2 := unhex(s[i+2])
			if !ok1 || !ok2 {
				return "", errEscape
			}
			b.WriteByte(hi<<4 | lo)
			i += 2
		default:
			b.WriteByte(c)
		}
	}
	return b.String(), nil
}

func unhex(c byte) (byte, bool) {
	switch {
	case c >= '0' && c <= '9':
		return c - '0', true
	case c >= 'a' && c <= 'f':
		return c - 'a' + 10, true
	case c >= 'A' && c <= 'F':
		return c - 'A' + 10, true
	}
	return 0, false
}
