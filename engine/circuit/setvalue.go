package circuit

import (
	"fmt"
	"strings"
)

// SetNumber returns text with one number of one part changed to x,
// written as given (value syntax, such as "1.383p"), and nothing else
// changed: spacing, comments, the other lines and the line's other tokens
// stay as they are. name is a part's value by its name ("R1", "E1" for a
// controlled source's gain= / gm= / r=) or an opamp's model number
// ("U1.gbw"), or a transistor's transconductance ("Q1.gm"). A positional
// value keeps its unit symbol if it had one ("4.7nF" becomes "1.383pF");
// an opamp number the line does not give is added at the end of its
// options. The text must parse, and x must read back as a value of that
// number: the result is parsed again, and any error is returned with the
// text unchanged.
//
// A transistor given by its bias (ic=, or id= and vov=) has no gm= token
// to change: its gm follows the bias with its other small-signal values,
// so SetNumber returns an error rather than change what the line means.
func SetNumber(text, name, x string) (string, error) {
	c, err := Parse(text)
	if err != nil {
		return text, fmt.Errorf("the circuit text has problems; correct them first (%v)", err)
	}
	base, field, dotted := strings.Cut(name, ".")
	part, ok := c.Part(base)
	if !ok {
		return text, fmt.Errorf("no part called %s in the text", base)
	}
	lines := strings.Split(text, "\n")
	line := lines[part.Line-1]
	toks := byteTokens(line)
	if len(toks) < 2 {
		return text, fmt.Errorf("line %d is not %s's", part.Line, base)
	}
	replace := func(from, to int, s string) {
		lines[part.Line-1] = line[:from] + s + line[to:]
	}
	option := func(key string) (from, to int, found bool) {
		for _, t := range toks[2:] {
			if k, _, ok := strings.Cut(line[t.from:t.to], "="); ok && k == key {
				return t.from + len(key) + 1, t.to, true
			}
		}
		return 0, 0, false
	}
	switch k := part.Kind; {
	case !dotted && (k == Resistor || k == Capacitor || k == Inductor):
		if len(toks) < 5 {
			return text, fmt.Errorf("line %d has no value for %s", part.Line, base)
		}
		t := toks[4]
		old := line[t.from:t.to]
		unit := shapes[kindNames[k]].value
		if strings.HasSuffix(old, unit) && !strings.HasSuffix(x, unit) {
			x += unit
		}
		replace(t.from, t.to, x)
	case !dotted && k >= VCVS && k <= CCCS:
		key := map[Kind]string{VCVS: "gain", VCCS: "gm", CCVS: "r", CCCS: "gain"}[k]
		from, to, _ := option(key)
		replace(from, to, x)
	case dotted && k == OpAmp:
		known := false
		for _, o := range shapes["opamp"].options {
			known = known || o.key == field
		}
		if !known {
			return text, fmt.Errorf("an opamp has no number called %s", field)
		}
		if from, to, found := option(field); found {
			replace(from, to, x)
		} else {
			end := toks[len(toks)-1].to
			replace(end, end, " "+field+"="+x)
		}
	case dotted && field == "gm" && k.Transistor():
		from, to, found := option("gm")
		if !found {
			return text, fmt.Errorf("%s is given by its bias, from which its gm follows with its other small-signal values; change the bias to change gm", base)
		}
		replace(from, to, x)
	default:
		return text, fmt.Errorf("%s has no number called %s to change", base, name)
	}
	out := strings.Join(lines, "\n")
	if _, err := Parse(out); err != nil {
		return text, fmt.Errorf("%s = %s does not read back: %v", name, x, err)
	}
	return out, nil
}

// span is a token's place in its line, in bytes.
type span struct{ from, to int }

// byteTokens splits a line as tokenize does, keeping byte offsets.
func byteTokens(line string) []span {
	var toks []span
	start := -1
	for i, r := range line {
		if r == '#' {
			break
		}
		if r == ' ' || r == '\t' || r == '\r' {
			if start >= 0 {
				toks = append(toks, span{start, i})
				start = -1
			}
			continue
		}
		if start < 0 {
			start = i
		}
	}
	if start >= 0 {
		end := len(line)
		if i := strings.IndexByte(line, '#'); i >= 0 {
			end = i
		}
		toks = append(toks, span{start, end})
	}
	return toks
}
