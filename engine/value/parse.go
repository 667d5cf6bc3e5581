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

// quoteMax is the longest text Quote writes in full, in characters.
const quoteMax = 32

// Quote writes s for a message as %q does, cut to 32 characters with an
// ellipsis after the closing quote ("xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx"…),
// so that a long token pasted into a field cannot fill a page with its
// echo.
func Quote(s string) string {
	if utf8.RuneCountInString(s) <= quoteMax {
		return strconv.Quote(s)
	}
	r := []rune(s)
	return strconv.Quote(string(r[:quoteMax-1])) + "…"
}

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
	if hint := megHint(text, body); hint != nil {
		return 0, hint
	}
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
			return fail(i, "unexpected %s in value %s", Quote(marker), Quote(text))
		}
		mark := i
		i += size
		fracDigits := digits()
		if intDigits == 0 && fracDigits == 0 {
			return fail(mark, "value %s has no digits", Quote(text))
		}
		if i != len(body) {
			return fail(i, "unexpected %s after %s in value %s", Quote(rest(body[i:])), Quote(body[:i]), Quote(text))
		}
		if intDigits == 0 && marker != "R" {
			return fail(mark, "value %s must start with a digit (only R may lead, as in R47)", Quote(text))
		}
		num := body[start:mark] + "." + body[mark+size:]
		if intDigits == 0 {
			num = "0" + num
		}
		v, err := strconv.ParseFloat(body[:start]+num+"e"+strconv.Itoa(exp), 64)
		if err != nil {
			if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
				return fail(0, "value %s is out of range", Quote(text))
			}
			return fail(0, "cannot read %s as a number", Quote(text))
		}
		return finite(text, v)
	}
	if i < len(body) && body[i] == '.' {
		i++
		if digits() == 0 && intDigits == 0 {
			return fail(i-1, "value %s has no digits", Quote(text))
		}
	}
	if intDigits == 0 && i == start {
		if i < len(body) {
			return fail(i, "expected a number, found %s", Quote(rest(body[i:])))
		}
		return fail(i, "expected a number in %s", Quote(text))
	}
	hasExp := false
	if i < len(body) && (body[i] == 'e' || body[i] == 'E') {
		ePos := i
		i++
		if i < len(body) && (body[i] == '+' || body[i] == '-') {
			i++
		}
		if digits() == 0 {
			return fail(ePos, "exponent in %s has no digits", Quote(text))
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
			return fail(i, "unexpected %s in value %s", Quote(rest(body[i:])), Quote(text))
		}
		if hasExp {
			return fail(i, "value %s has both an exponent and a prefix; use one", Quote(text))
		}
		exp = p
		i += size
		if i < len(body) {
			return fail(i, "unexpected %s after %s in value %s", Quote(rest(body[i:])), Quote(body[:i]), Quote(text))
		}
	}
	// The prefix joins the exponent, so the value is the decimal the
	// designer wrote rounded once (4n7 is 4.7e-9 exactly as the E12 table
	// has it, not 4.7 times a rounded 10⁻⁹, one unit off).
	num := body[:numEnd]
	if exp != 0 {
		num += "e" + strconv.Itoa(exp)
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return fail(0, "value %s is out of range", Quote(text))
		}
		return fail(0, "cannot read %s as a number", Quote(text))
	}
	return finite(text, v)
}

func finite(text string, v float64) (float64, error) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &SyntaxError{Text: text, Msg: fmt.Sprintf("value %q is out of range", text)}
	}
	return v, nil
}

// megHint catches the habit of writing mega as "meg" (1meg, 50MEG, 2Meg):
// SI prefixes are case-sensitive and have no "meg", and 1meg would
// otherwise read as 1 milli followed by junk. It returns nil when body is
// not a plain number followed by "meg" in any case.
func megHint(text, body string) *SyntaxError {
	if len(body) < 4 || !strings.EqualFold(body[len(body)-3:], "meg") {
		return nil
	}
	num := body[:len(body)-3]
	for i := 0; i < len(num); i++ {
		if c := num[i]; !(c >= '0' && c <= '9' || c == '.' || c == '+' || c == '-') {
			return nil
		}
	}
	if _, err := strconv.ParseFloat(num, 64); err != nil {
		return nil
	}
	return &SyntaxError{Text: text, Offset: len(num), Msg: fmt.Sprintf("M is mega and m is milli (SI); did you mean %sM?", num)}
}

// rest returns the leading rune of s, for messages.
func rest(s string) string {
	r, _ := utf8.DecodeRuneInString(s)
	return string(r)
}
