package plot

import (
	"math"
	"strconv"
	"unicode/utf8"
)

// appendEscaped appends s as XML character data that is also safe inside a
// double- or single-quoted attribute. Markup characters become entity
// references; bytes that are not valid UTF-8 and characters XML 1.0 forbids
// (controls other than tab, newline and carriage return, U+FFFE, U+FFFF)
// become U+FFFD, so no input can make the document malformed. Tab, newline
// and carriage return become spaces: every label is a single line.
func appendEscaped(b []byte, s string) []byte {
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			switch {
			case c == '&':
				b = append(b, "&amp;"...)
			case c == '<':
				b = append(b, "&lt;"...)
			case c == '>':
				b = append(b, "&gt;"...)
			case c == '"':
				b = append(b, "&quot;"...)
			case c == '\'':
				b = append(b, "&#39;"...)
			case c == '\t' || c == '\n' || c == '\r':
				b = append(b, ' ')
			case c < 0x20:
				b = append(b, "\uFFFD"...)
			default:
				b = append(b, c)
			}
			i++
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		if (r == utf8.RuneError && size == 1) || r == 0xFFFE || r == 0xFFFF {
			b = append(b, "\uFFFD"...)
		} else {
			b = append(b, s[i:i+size]...)
		}
		i += size
	}
	return b
}

// tenths rounds a pixel coordinate to an integer count of 0.1 px, the
// resolution of every coordinate the package writes.
func tenths(v float64) int { return int(math.Round(v * 10)) }

// appendTenths appends n/10 with at most one decimal. In path data (short)
// a leading zero is dropped: ".5", "-.5".
func appendTenths(b []byte, n int, short bool) []byte {
	if n < 0 {
		b = append(b, '-')
		n = -n
	}
	q, r := n/10, n%10
	if q != 0 || r == 0 || !short {
		b = strconv.AppendInt(b, int64(q), 10)
	}
	if r != 0 {
		b = append(b, '.', byte('0'+r))
	}
	return b
}

// appendPx appends a pixel coordinate rounded to 0.1 px, for attributes.
func appendPx(b []byte, v float64) []byte { return appendTenths(b, tenths(v), false) }

// appendNum appends a path-data number in tenths, preceded by a space
// unless its minus sign already separates it from what came before.
func appendNum(b []byte, n int) []byte {
	if n >= 0 {
		b = append(b, ' ')
	}
	return appendTenths(b, n, true)
}

// appendAttrPx appends ` name="v"` with v a pixel coordinate.
func appendAttrPx(b []byte, name string, v float64) []byte {
	b = append(b, ' ')
	b = append(b, name...)
	b = append(b, '=', '"')
	b = appendPx(b, v)
	return append(b, '"')
}

// appendAttr appends ` name="escaped value"`.
func appendAttr(b []byte, name, v string) []byte {
	b = append(b, ' ')
	b = append(b, name...)
	b = append(b, '=', '"')
	b = appendEscaped(b, v)
	return append(b, '"')
}

// appendSig6 appends v with 6 significant digits in the shortest form
// JavaScript's parseFloat reads back ("1.5e-5" rather than "1.5e-05");
// non-finite values are written NaN.
func appendSig6(b []byte, v float64) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(b, "NaN"...)
	}
	start := len(b)
	b = strconv.AppendFloat(b, v, 'g', 6, 64)
	for i := start; i < len(b); i++ {
		if b[i] != 'e' {
			continue
		}
		k := i + 1
		j := k + 1 // past the exponent sign
		if b[k] == '-' {
			k++
		}
		for j < len(b)-1 && b[j] == '0' {
			j++
		}
		k += copy(b[k:], b[j:])
		return b[:k]
	}
	return b
}

// appendHundredths appends v rounded to 0.01 without trailing zeros, for
// phases in degrees; non-finite values are written NaN.
func appendHundredths(b []byte, v float64) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return append(b, "NaN"...)
	}
	start := len(b)
	b = strconv.AppendFloat(b, v, 'f', 2, 64)
	for b[len(b)-1] == '0' {
		b = b[:len(b)-1]
	}
	if b[len(b)-1] == '.' {
		b = b[:len(b)-1]
	}
	if string(b[start:]) == "-0" {
		b = append(b[:start], '0')
	}
	return b
}

// linLabel writes a tick value of a linear axis (decibels, degrees) with as
// many decimals as the tick step needs and the typographic minus U+2212.
// Engineering values go through value.Format instead; these axes carry no
// SI prefix.
func linLabel(v, step float64) string {
	d := 0
	if step > 0 && step < 1 {
		// A step too small to print (or none: step 0, which a caller
		// with no spread may pass) gets 15 decimals at most; the
		// conversion of an infinite count would differ between native
		// code and WebAssembly.
		d = min(15, int(math.Ceil(-math.Log10(step)-1e-9)))
	}
	return signed(strconv.FormatFloat(v, 'f', d, 64))
}

// signed replaces a leading ASCII minus by U+2212 and drops it from zero.
func signed(s string) string {
	if len(s) == 0 || s[0] != '-' {
		return s
	}
	for _, c := range s[1:] {
		if c != '0' && c != '.' {
			return "−" + s[1:]
		}
	}
	return s[1:]
}

// textWidth estimates the advance width of s in a sans-serif face of size
// px. Layout must not depend on fonts being installed, so this is a fixed
// table of typical widths; it errs wide.
func textWidth(s string, px float64) float64 {
	w := 0.0
	for _, r := range s {
		switch {
		case r == ' ' || r == '.' || r == ',' || r == ':' || r == ';' || r == '\'' ||
			r == '|' || r == '!' || r == '(' || r == ')' || r == 'i' || r == 'j' ||
			r == 'l' || r == 'I' || r == 'f' || r == 't' || r == 'r':
			w += 0.32
		case r == 'm' || r == 'w' || r == 'M' || r == 'W' || r == 'Ω' || r == '—' || r == '%' || r == '@':
			w += 0.86
		case r >= 'A' && r <= 'Z':
			w += 0.68
		case r >= 0x2E80: // CJK and other wide scripts
			w += 1.0
		default:
			w += 0.57
		}
	}
	return w * px
}

// cleanClass keeps the characters of a CSS class suffix that need no
// escaping in a selector, so a class can never split into several.
func cleanClass(s string) string {
	ok := true
	for i := 0; i < len(s); i++ {
		if !classByte(s[i]) {
			ok = false
			break
		}
	}
	if ok {
		return s
	}
	out := make([]byte, 0, len(s))
	for i := 0; i < len(s); i++ {
		if classByte(s[i]) {
			out = append(out, s[i])
		}
	}
	return string(out)
}

func classByte(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' || c == '_'
}

// cleanID returns id restricted to the class characters, or def when that
// leaves nothing; ids are built from it ("<id>-title").
func cleanID(id, def string) string {
	id = cleanClass(id)
	if id == "" {
		return def
	}
	return id
}

// size applies defaults and lower bounds to a chart's pixel size.
func size(w, h, defW, defH, minW, minH int) (float64, float64) {
	if w <= 0 {
		w = defW
	}
	if h <= 0 {
		h = defH
	}
	return float64(max(w, minW)), float64(max(h, minH))
}
