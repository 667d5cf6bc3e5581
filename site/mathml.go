package site

import (
	"fmt"
	"html"
	"strings"
	"unicode"
	"unicode/utf8"
)

// MathError is a formula that could not be converted; Offset is the byte
// offset of the problem within the formula.
type MathError struct {
	Offset int
	Msg    string
}

func (e *MathError) Error() string { return fmt.Sprintf("formula, byte %d: %s", e.Offset, e.Msg) }

// MathML converts a formula written in the small notation below into
// presentation MathML, which browsers typeset without any script.
//
//	letters   runs of ASCII letters are one identifier ("sc" in T_{sc});
//	          separate single-letter symbols with a space ("R C")
//	digits    numbers, with a decimal point: 2, 0.5
//	_  ^      subscript and superscript of the preceding item: Z_0, x^{2}
//	{ }       grouping
//	\frac{a}{b}  \sqrt{a}  \text{words}  \mathrm{d}
//	\alpha … \omega, \Omega, \Delta, \infty     symbols
//	\cos \sin \tan \log \ln \exp \arg \Re \Im   function names
//	\cdot \times \parallel \approx \le \ge \ne \to \angle \pm \deg
//	\,  \;  \quad  \qquad  spaces
//
// Every other printable character is an operator (+ − = ( ) / | …) or,
// if it is a letter, an identifier; ASCII "-" is written as the minus sign.
func MathML(src string, display bool) (string, error) {
	p := &mathParser{src: src}
	var b strings.Builder
	if display {
		b.WriteString(`<math display="block">`)
	} else {
		b.WriteString(`<math>`)
	}
	items, err := p.list(false)
	if err != nil {
		return "", err
	}
	if p.pos < len(p.src) {
		return "", &MathError{p.pos, "unmatched “}”"}
	}
	b.WriteString(row(items))
	b.WriteString(`</math>`)
	return b.String(), nil
}

type mathParser struct {
	src string
	pos int
}

var mathIdents = map[string]string{
	"alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ε", "varepsilon": "ε",
	"zeta": "ζ", "eta": "η", "theta": "θ", "kappa": "κ", "lambda": "λ", "mu": "μ", "nu": "ν",
	"xi": "ξ", "pi": "π", "rho": "ρ", "sigma": "σ", "tau": "τ", "phi": "ϕ", "varphi": "φ",
	"chi": "χ", "psi": "ψ", "omega": "ω", "Gamma": "Γ", "Delta": "Δ", "Theta": "Θ",
	"Lambda": "Λ", "Pi": "Π", "Sigma": "Σ", "Phi": "Φ", "Psi": "Ψ", "Omega": "Ω",
	"infty": "∞",
}

var mathOps = map[string]string{
	"cdot": "·", "times": "×", "parallel": "∥", "approx": "≈", "le": "≤", "ge": "≥",
	"ne": "≠", "to": "→", "angle": "∠", "pm": "±", "deg": "°", "mid": "|", "ll": "≪", "gg": "≫",
	"equiv": "≡", "propto": "∝", "lvert": "|", "rvert": "|",
}

var mathFuncs = map[string]bool{"cos": true, "sin": true, "tan": true, "log": true, "ln": true,
	"exp": true, "arg": true, "Re": true, "Im": true, "max": true, "min": true}

// list reads items up to the end, or up to "}" when inGroup.
func (p *mathParser) list(inGroup bool) ([]string, error) {
	var items []string
	for {
		p.skipSpace()
		if p.pos >= len(p.src) {
			if inGroup {
				return nil, &MathError{p.pos, "missing “}”"}
			}
			return items, nil
		}
		if p.src[p.pos] == '}' {
			if !inGroup {
				return items, nil
			}
			p.pos++
			return items, nil
		}
		if c := p.src[p.pos]; c == '_' || c == '^' {
			if len(items) == 0 {
				return nil, &MathError{p.pos, fmt.Sprintf("“%c” with nothing before it", c)}
			}
			base := items[len(items)-1]
			var sub, sup string
			for p.pos < len(p.src) && (p.src[p.pos] == '_' || p.src[p.pos] == '^') {
				which := p.src[p.pos]
				at := p.pos
				p.pos++
				arg, err := p.argument()
				if err != nil {
					return nil, err
				}
				if which == '_' {
					if sub != "" {
						return nil, &MathError{at, "two subscripts on one item"}
					}
					sub = arg
				} else {
					if sup != "" {
						return nil, &MathError{at, "two superscripts on one item"}
					}
					sup = arg
				}
				p.skipSpace()
			}
			switch {
			case sub != "" && sup != "":
				items[len(items)-1] = "<msubsup>" + base + sub + sup + "</msubsup>"
			case sub != "":
				items[len(items)-1] = "<msub>" + base + sub + "</msub>"
			default:
				items[len(items)-1] = "<msup>" + base + sup + "</msup>"
			}
			continue
		}
		item, err := p.atom()
		if err != nil {
			return nil, err
		}
		if item != "" {
			items = append(items, item)
		}
	}
}

// argument reads one atom or braced group as a single MathML element.
func (p *mathParser) argument() (string, error) {
	p.skipSpace()
	if p.pos >= len(p.src) || p.src[p.pos] == '}' {
		return "", &MathError{p.pos, "missing argument"}
	}
	if p.src[p.pos] == '{' {
		p.pos++
		items, err := p.list(true)
		if err != nil {
			return "", err
		}
		return row(items), nil
	}
	if c := p.src[p.pos]; c == '_' || c == '^' {
		return "", &MathError{p.pos, "missing argument"}
	}
	return p.atom()
}

func (p *mathParser) skipSpace() {
	for p.pos < len(p.src) && (p.src[p.pos] == ' ' || p.src[p.pos] == '\t' || p.src[p.pos] == '\n' || p.src[p.pos] == '\r') {
		p.pos++
	}
}

// braced reads a {…} group's raw text, for \text.
func (p *mathParser) braced() (string, error) {
	p.skipSpace()
	if p.pos >= len(p.src) || p.src[p.pos] != '{' {
		return "", &MathError{p.pos, "expected “{”"}
	}
	end := strings.IndexByte(p.src[p.pos:], '}')
	if end < 0 {
		return "", &MathError{p.pos, "missing “}”"}
	}
	s := p.src[p.pos+1 : p.pos+end]
	p.pos += end + 1
	return s, nil
}

func (p *mathParser) atom() (string, error) {
	start := p.pos
	c := p.src[p.pos]
	switch {
	case c == '{':
		p.pos++
		items, err := p.list(true)
		if err != nil {
			return "", err
		}
		return row(items), nil
	case c == '\\':
		return p.command()
	case c >= '0' && c <= '9' || c == '.' && p.pos+1 < len(p.src) && p.src[p.pos+1] >= '0' && p.src[p.pos+1] <= '9':
		for p.pos < len(p.src) && (p.src[p.pos] >= '0' && p.src[p.pos] <= '9' || p.src[p.pos] == '.') {
			p.pos++
		}
		return "<mn>" + p.src[start:p.pos] + "</mn>", nil
	case c < utf8.RuneSelf && (c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z'):
		for p.pos < len(p.src) && (p.src[p.pos] >= 'a' && p.src[p.pos] <= 'z' || p.src[p.pos] >= 'A' && p.src[p.pos] <= 'Z') {
			p.pos++
		}
		return "<mi>" + p.src[start:p.pos] + "</mi>", nil
	}
	r, size := utf8.DecodeRuneInString(p.src[p.pos:])
	if r == utf8.RuneError && size <= 1 {
		return "", &MathError{p.pos, "not valid UTF-8"}
	}
	p.pos += size
	switch {
	case r == '-':
		return "<mo>−</mo>", nil
	case unicode.IsLetter(r) || r == '∞':
		return "<mi>" + html.EscapeString(string(r)) + "</mi>", nil
	case unicode.IsDigit(r):
		return "<mn>" + string(r) + "</mn>", nil
	case unicode.IsControl(r):
		return "", &MathError{start, "control character"}
	}
	return "<mo>" + html.EscapeString(string(r)) + "</mo>", nil
}

func (p *mathParser) command() (string, error) {
	start := p.pos
	p.pos++ // the backslash
	if p.pos >= len(p.src) {
		return "", &MathError{start, "“\\” at the end"}
	}
	switch p.src[p.pos] {
	case ',':
		p.pos++
		return `<mspace width="0.1667em"></mspace>`, nil
	case ';':
		p.pos++
		return `<mspace width="0.2778em"></mspace>`, nil
	case '{', '}', '|', '\\', '_', '^':
		c := p.src[p.pos]
		p.pos++
		if c == '|' {
			return "<mo>∥</mo>", nil
		}
		return "<mo>" + html.EscapeString(string(c)) + "</mo>", nil
	}
	n := p.pos
	for n < len(p.src) && (p.src[n] >= 'a' && p.src[n] <= 'z' || p.src[n] >= 'A' && p.src[n] <= 'Z') {
		n++
	}
	name := p.src[p.pos:n]
	p.pos = n
	if name == "" {
		return "", &MathError{start, "“\\” must be followed by a command name"}
	}
	if s, ok := mathIdents[name]; ok {
		return "<mi>" + s + "</mi>", nil
	}
	if s, ok := mathOps[name]; ok {
		return "<mo>" + s + "</mo>", nil
	}
	if mathFuncs[name] {
		// U+2061 FUNCTION APPLICATION tells the typesetter a name applies.
		return "<mi>" + name + "</mi><mo>\u2061</mo>", nil
	}
	switch name {
	case "frac":
		num, err := p.argument()
		if err != nil {
			return "", err
		}
		den, err := p.argument()
		if err != nil {
			return "", err
		}
		return "<mfrac>" + num + den + "</mfrac>", nil
	case "sqrt":
		arg, err := p.argument()
		if err != nil {
			return "", err
		}
		return "<msqrt>" + arg + "</msqrt>", nil
	case "text":
		s, err := p.braced()
		if err != nil {
			return "", err
		}
		return "<mtext>" + html.EscapeString(s) + "</mtext>", nil
	case "mathrm":
		s, err := p.braced()
		if err != nil {
			return "", err
		}
		return `<mi mathvariant="normal">` + html.EscapeString(s) + "</mi>", nil
	case "quad":
		return `<mspace width="1em"></mspace>`, nil
	case "qquad":
		return `<mspace width="2em"></mspace>`, nil
	case "left", "right":
		return "", nil // the fence that follows is stretchy by itself
	}
	return "", &MathError{start, "unknown command \\" + name}
}

// row joins items into one element.
func row(items []string) string {
	if len(items) == 1 {
		return items[0]
	}
	return "<mrow>" + strings.Join(items, "") + "</mrow>"
}
