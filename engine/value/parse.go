package value

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// SyntaxError reports a malformed value. Offset is the byte offset within the
// parsed text of the first character that could not be accepted.
type SyntaxError struct {
	Text   string // the text that was parsed
	Offset int    // byte offset of the problem within Text
	Msg    string
}

func (e *SyntaxError) Error() string { return e.Msg }

// prefixes maps an SI prefix symbol to its power of ten.
var prefixes = map[string]int{
	"f": -15, "p": -12, "n": -9, "u": -6, "µ": -6, "μ": -6,
	"m": -3, "k": 3, "M": 6, "G": 9, "T": 12,
}

// Units lists the unit symbols a value may carry, with their spellings.
// A caller passes one of the keys to Parse; an empty unit accepts no symbol.
var Units = map[string][]string{
	"Ω":  {"Ω", "ohm", "Ohm", "ohms"},
	"F":  {"F"},
	"H":  {"H"},
	"V":  {"V"},
	"A":  {"A"},
	"S":  {"S"},
	"Hz": {"Hz"},
	// Noise densities, as data sheets and the trade write them.
	"V/√Hz": {"V/√Hz", "V/rtHz"},
	"A/√Hz": {"A/√Hz", "A/rtHz"},
}

// Parse reads one value. unit names the unit symbol that may follow the
// number ("Ω", "F", "H", "V", "A", "S", "Hz", "V/√Hz", "A/√Hz" or "" for a
// plain number); any other trailing text is an error. The result is always
// finite.
func Parse(text, unit string) (float64, error) {
	fail := func(off int, format string, args ...any) (float64, error) {
		return 0, &SyntaxError{Text: text, Offset: off, Msg: fmt.Sprintf(format, args...)}
	}
	if text == "" {
		return fail(0, "missing value")
	}
	s := text
	// Strip the unit symbol first: it is always last, and "F" or "A" must not
	// be taken for anything else.
	end := len(s)
	if unit != "" {
		for _, sp := range Units[unit] {
			if strings.HasSuffix(s, sp) && len(s) > len(sp) {
				end = len(s) - len(sp)
				break
			}
		}
	}
	body := s[:end]
	i := 0
	if i < len(body) && (body[i] == '+' || body[i] == '-') {
		i++
	}
	start := i
	digits := func() int {
		n := 0
		for i < len(body) && body[i] >= '0' && body[i] <= '9' {
			i++
			n++
		}
		return n
	}
	intDigits := digits()
	// RKM: digits, a marker letter, digits — the letter is the decimal point.
	if i < len(body) && body[i] != '.' && body[i] != 'e' && body[i] != 'E' {
		r, size := utf8.DecodeRuneInString(body[i:])
		marker := string(r)
		exp, isPrefix := prefixes[marker]
		if marker == "R" {
			exp, isPrefix = 0, true
		}
		if marker == "K" { // IEC 60062 writes the kilo marker as a capital.
			exp, isPrefix = 3, true
		}
		if !isPrefix {
			return fail(i, "unexpected %q in value %q", marker, text)
		}
		mark := i
		i += size
		fracDigits := digits()
		if intDigits == 0 && fracDigits == 0 {
			return fail(mark, "value %q has no digits", text)
		}
		if i != len(body) {
			return fail(i, "unexpected %q after %q in value %q", rest(body[i:]), body[:i], text)
		}
		if intDigits == 0 && marker != "R" {
			return fail(mark, "value %q must start with a digit (only R may lead, as in R47)", text)
		}
		num := body[start:mark] + "." + body[mark+size:]
		if intDigits == 0 {
			num = "0" + num
		}
		v, err := strconv.ParseFloat(body[:start]+num, 64)
		if err != nil {
			return fail(0, "cannot read %q as a number", text)
		}
		return finite(text, v*math.Pow10(exp))
	}
	if i < len(body) && body[i] == '.' {
		i++
		if digits() == 0 && intDigits == 0 {
			return fail(i-1, "value %q has no digits", text)
		}
	}
	if intDigits == 0 && i == start {
		if i < len(body) {
			return fail(i, "expected a number, found %q", rest(body[i:]))
		}
		return fail(i, "expected a number in %q", text)
	}
	hasExp := false
	if i < len(body) && (body[i] == 'e' || body[i] == 'E') {
		ePos := i
		i++
		if i < len(body) && (body[i] == '+' || body[i] == '-') {
			i++
		}
		if digits() == 0 {
			return fail(ePos, "exponent in %q has no digits", text)
		}
		hasExp = true
	}
	numEnd := i
	exp := 0
	if i < len(body) {
		r, size := utf8.DecodeRuneInString(body[i:])
		p, ok := prefixes[string(r)]
		if !ok {
			if r == 'K' {
				return fail(i, "use k for kilo (SI prefixes are case-sensitive); K is accepted only as an RKM decimal marker such as 4K7")
			}
			return fail(i, "unexpected %q in value %q", rest(body[i:]), text)
		}
		if hasExp {
			return fail(i, "value %q has both an exponent and a prefix; use one", text)
		}
		exp = p
		i += size
		if i < len(body) {
			return fail(i, "unexpected %q after %q in value %q", rest(body[i:]), body[:i], text)
		}
	}
	v, err := strconv.ParseFloat(body[:numEnd], 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return fail(0, "value %q is out of range", text)
		}
		return fail(0, "cannot read %q as a number", text)
	}
	return finite(text, v*math.Pow10(exp))
}

func finite(text string, v float64) (float64, error) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &SyntaxError{Text: text, Msg: fmt.Sprintf("value %q is out of range", text)}
	}
	return v, nil
}

// rest returns the leading rune of s, for messages.
func rest(s string) string {
	r, _ := utf8.DecodeRuneInString(s)
	return string(r)
}
