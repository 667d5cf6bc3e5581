package circuit

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"unicode/utf8"

	"zport/engine/value"
)

// Error is one problem in circuit text, at a 1-based line and column
// (counted in characters).
type Error struct {
	Line, Column int
	Msg          string
}

func (e *Error) Error() string { return fmt.Sprintf("%d:%d: %s", e.Line, e.Column, e.Msg) }

// ErrorList is every problem found, in text order.
type ErrorList []*Error

func (l ErrorList) Error() string {
	switch len(l) {
	case 0:
		return "no errors"
	case 1:
		return l[0].Error()
	}
	return fmt.Sprintf("%s (and %d more)", l[0], len(l)-1)
}

// MaxErrors bounds how many problems Parse collects before it stops, so a
// pasted file of junk answers at once.
const MaxErrors = 50

// MaxLineLength bounds one line, in bytes.
const MaxLineLength = 4096

type token struct {
	text string
	col  int // 1-based column in characters
}

// tokenize splits a line into tokens, dropping a # comment.
func tokenize(line string) []token {
	var toks []token
	col := 0
	start, startCol := -1, 0
	for i, r := range line {
		col++
		if r == '#' {
			if start >= 0 {
				toks = append(toks, token{line[start:i], startCol})
			}
			return toks
		}
		if r == ' ' || r == '\t' || r == '\r' {
			if start >= 0 {
				toks = append(toks, token{line[start:i], startCol})
				start = -1
			}
			continue
		}
		if start < 0 {
			start, startCol = i, col
		}
	}
	if start >= 0 {
		toks = append(toks, token{line[start:], startCol})
	}
	return toks
}

func isWord(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c == '_' || c >= '0' && c <= '9' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z') {
			return false
		}
	}
	return true
}

// shape gives, per kind, the positional node count, the unit of a
// positional VALUE ("" = none), and the options.
type option struct {
	key, unit string // unit gainUnit: a dimensionless gain, dB accepted
	required  bool
	positive  bool   // must be > 0
	nonneg    bool   // must be ≥ 0
	isSense   string // "pair" for CP,CN; "part" for a part name
	isNode    bool   // the value is a node name
	what      string // what the value is, for messages
	// words, when set, are the values the option takes instead of a
	// number, and word stores the one given.
	words []string
	word  func(p *Part, w string)
	// set stores a number; nil stores it as the part's Value (or, for a
	// transistor, among the options its model is derived from).
	set func(p *Part, v float64)
}

// gainUnit marks an option that is a dimensionless gain: a plain number,
// or decibels (value.ParseGain).
const gainUnit = value.DecibelSuffix

type shape struct {
	nodes    int
	value    string // unit of the positional value; "-" for none
	positive bool
	options  []option
}

var shapes = map[string]struct {
	kind Kind
	shape
}{
	"resistor":  {Resistor, shape{2, "Ω", true, []option{noiseOff}}},
	"capacitor": {Capacitor, shape{2, "F", true, nil}},
	"inductor":  {Inductor, shape{2, "H", true, nil}},
	"vsource":   {VSource, shape{2, "V", false, nil}},
	"isource":   {ISource, shape{2, "A", false, nil}},
	"vcvs":      {VCVS, shape{2, "-", false, []option{{key: "sense", required: true, isSense: "pair"}, {key: "gain", unit: gainUnit, required: true}}}},
	"vccs":      {VCCS, shape{2, "-", false, []option{{key: "sense", required: true, isSense: "pair"}, {key: "gm", unit: "S", required: true}}}},
	"ccvs":      {CCVS, shape{2, "-", false, []option{{key: "sense", required: true, isSense: "part"}, {key: "r", unit: "Ω", required: true}}}},
	"cccs":      {CCCS, shape{2, "-", false, []option{{key: "sense", required: true, isSense: "part"}, {key: "gain", unit: gainUnit, required: true}}}},
	"opamp": {OpAmp, shape{3, "-", false, []option{
		{key: "a0", unit: gainUnit, positive: true, set: func(p *Part, v float64) { p.Amp.A0 = v }},
		{key: "gbw", unit: "Hz", positive: true, set: func(p *Part, v float64) { p.Amp.GBW = v }},
		{key: "p2", unit: "Hz", positive: true, set: func(p *Part, v float64) { p.Amp.P2 = v }},
		{key: "rid", unit: "Ω", positive: true, set: func(p *Part, v float64) { p.Amp.Rid = v }},
		{key: "rcm", unit: "Ω", positive: true, set: func(p *Part, v float64) { p.Amp.Rcm = v }},
		{key: "ro", unit: "Ω", nonneg: true, set: func(p *Part, v float64) { p.Amp.Ro = v }},
		{key: "cid", unit: "F", positive: true, set: func(p *Part, v float64) { p.Amp.Cid = v }},
		{key: "ccm", unit: "F", positive: true, set: func(p *Part, v float64) { p.Amp.Ccm = v }},
		{key: "en", unit: "V/√Hz", nonneg: true, set: func(p *Part, v float64) { p.Noise.V = v }},
		{key: "fce", unit: "Hz", positive: true, set: func(p *Part, v float64) { p.Noise.VCorner = v }},
		{key: "in", unit: "A/√Hz", nonneg: true, set: func(p *Part, v float64) { p.Noise.I = v }},
		{key: "fci", unit: "Hz", positive: true, set: func(p *Part, v float64) { p.Noise.ICorner = v }},
	}}},
	"bjt": {BJT, shape{3, "-", false, []option{
		{key: "ic", unit: "A", positive: true, what: "the collector bias current"},
		{key: "gm", unit: "S", positive: true, what: "the transconductance"},
		{key: "beta", positive: true, what: "the small-signal current gain"},
		{key: "va", unit: "V", positive: true, what: "the Early voltage"},
		{key: "ro", unit: "Ω", positive: true, what: "the output resistance"},
		{key: "ft", unit: "Hz", positive: true, what: "the transition frequency"},
		{key: "cmu", unit: "F", nonneg: true, what: "the base-collector capacitance"},
		{key: "rb", unit: "Ω", nonneg: true, what: "the base resistance"},
	}}},
	"mos": {MOS, shape{3, "-", false, []option{
		{key: "gm", unit: "S", positive: true, what: "the transconductance"},
		{key: "id", unit: "A", positive: true, what: "the drain bias current"},
		{key: "vov", unit: "V", positive: true, what: "the overdrive voltage"},
		{key: "ro", unit: "Ω", positive: true, what: "the output resistance"},
		{key: "lambda", positive: true, what: "the channel-length modulation, per volt"},
		{key: "cgs", unit: "F", nonneg: true, what: "the gate-source capacitance"},
		{key: "cgd", unit: "F", nonneg: true, what: "the gate-drain capacitance"},
		{key: "gmb", unit: "S", nonneg: true, what: "the body transconductance"},
		{key: "b", isNode: true},
		{key: "gamma", positive: true, what: "the channel-noise factor"},
	}}},
	"vnoise": {VNoise, shape{2, "-", false, []option{
		{key: "density", unit: "V/√Hz", required: true, nonneg: true, set: func(p *Part, v float64) { p.Noise.V = v }},
		{key: "fc", unit: "Hz", positive: true, set: func(p *Part, v float64) { p.Noise.VCorner = v }},
	}}},
	"inoise": {INoise, shape{2, "-", false, []option{
		{key: "density", unit: "A/√Hz", nonneg: true, set: func(p *Part, v float64) { p.Noise.I = v }},
		{key: "fc", unit: "Hz", positive: true, set: func(p *Part, v float64) { p.Noise.ICorner = v }},
		{key: "shot", unit: "A", nonneg: true, set: func(p *Part, v float64) { p.Noise.Shot = v }},
		{key: "thermal", unit: "S", nonneg: true, set: func(p *Part, v float64) { p.Noise.Thermal = v }},
	}}},
}

// noiseOff is a resistor's noise= option: on (the default) or off.
var noiseOff = option{key: "noise", words: []string{"on", "off"}, word: func(p *Part, w string) { p.Noise.Off = w == "off" }}

func lineKinds() []string {
	names := make([]string, 0, len(shapes)+1)
	for k := range shapes {
		names = append(names, k)
	}
	names = append(names, "port")
	sort.Strings(names)
	return names
}

func kindList() string { return strings.Join(lineKinds(), ", ") }

// Options are the settings circuit text is read under.
type Options struct {
	// Temperature is the analysis temperature in kelvin, from which a
	// transistor's bias-dependent values are derived (VT = kT/q); zero
	// means DefaultTemperature.
	Temperature float64
}

// Parse reads circuit text at the default temperature. On any problem it
// returns a nil circuit and an ErrorList.
func Parse(text string) (*Circuit, error) { return ParseWith(text, Options{}) }

// ParseWith reads circuit text under o. It panics if o.Temperature is
// negative or not finite: a caller checks a user's temperature first.
func ParseWith(text string, o Options) (*Circuit, error) {
	temp := o.Temperature
	if temp == 0 {
		temp = DefaultTemperature
	}
	if !(temp > 0) || math.IsInf(temp, 0) {
		panic(fmt.Sprintf("circuit: temperature %g K", temp))
	}
	p := &parser{c: &Circuit{
		Nodes:       []string{"gnd"},
		Temperature: temp,
		parts:       map[string]int{},
		nodes:       map[string]int{"gnd": Gnd},
	}, names: map[string]int{}}
	lines := strings.Split(text, "\n")
	for i, line := range lines {
		if len(p.errs) >= MaxErrors {
			p.errs = append(p.errs, &Error{i + 1, 1, fmt.Sprintf("too many errors; stopped reading at line %d of %d", i+1, len(lines))})
			break
		}
		p.line(i+1, line)
	}
	if len(p.errs) == 0 {
		p.resolveSenses()
	}
	if len(p.errs) > 0 {
		sort.SliceStable(p.errs, func(i, j int) bool {
			a, b := p.errs[i], p.errs[j]
			return a.Line < b.Line || a.Line == b.Line && a.Column < b.Column
		})
		return nil, p.errs
	}
	if len(p.c.Parts) == 0 {
		return nil, ErrorList{{1, 1, "the circuit has no parts"}}
	}
	return p.c, nil
}

type parser struct {
	c      *Circuit
	errs   ErrorList
	names  map[string]int // name → line where defined
	senses []pendingSense
}

type pendingSense struct {
	part int
	tok  token
	line int
}

func (p *parser) errorf(line, col int, format string, args ...any) {
	p.errs = append(p.errs, &Error{line, col, fmt.Sprintf(format, args...)})
}

func (p *parser) node(line int, t token) (int, bool) {
	if !isWord(t.text) {
		p.errorf(line, t.col, "node name %q: use letters, digits and _ only", t.text)
		return 0, false
	}
	if i, ok := p.c.nodes[t.text]; ok {
		return i, true
	}
	i := len(p.c.Nodes)
	p.c.Nodes = append(p.c.Nodes, t.text)
	p.c.nodes[t.text] = i
	return i, true
}

// val parses a value token, reporting the column of the bad character.
func (p *parser) val(line int, t token, off int, unit, what string) (float64, bool) {
	s := t.text[off:]
	var v float64
	var err error
	if unit == gainUnit {
		v, err = value.ParseGain(s)
	} else {
		v, err = value.Parse(s, unit)
	}
	if err != nil {
		col := t.col + utf8.RuneCountInString(t.text[:off])
		var se *value.SyntaxError
		if errors.As(err, &se) {
			col += utf8.RuneCountInString(s[:se.Offset])
		}
		p.errorf(line, col, "%s: %v", what, err)
		return 0, false
	}
	return v, true
}

func (p *parser) line(n int, line string) {
	if len(line) > MaxLineLength {
		p.errorf(n, 1, "line is %d bytes long; the limit is %d", len(line), MaxLineLength)
		return
	}
	if !utf8.ValidString(line) {
		p.errorf(n, 1, "line is not valid UTF-8 text")
		return
	}
	toks := tokenize(line)
	if len(toks) == 0 {
		return
	}
	kw := toks[0]
	if kw.text == "port" {
		p.port(n, toks)
		return
	}
	sh, ok := shapes[kw.text]
	if !ok {
		hint := ""
		if near := nearest(kw.text, lineKinds()); near != "" {
			hint = "; did you mean " + near + "?"
		}
		p.errorf(n, kw.col, "unknown part kind %q%s (one of %s)", kw.text, hint, kindList())
		return
	}
	if len(toks) < 2 {
		p.errorf(n, kw.col+utf8.RuneCountInString(kw.text), "%s needs a name", kw.text)
		return
	}
	nameTok := toks[1]
	if !p.name(n, nameTok) {
		return
	}
	positional := 2 + sh.nodes
	if sh.value != "-" {
		positional++
	}
	// Positional tokens are those without '='; options follow.
	var pos []token
	var opts []token
	for _, t := range toks[2:] {
		if strings.Contains(t.text, "=") {
			opts = append(opts, t)
		} else {
			if len(opts) > 0 {
				if !p.senseSpaceHint(n, sh.shape, opts[len(opts)-1], t) {
					p.errorf(n, t.col, "unexpected %q after the options", t.text)
				}
				return
			}
			pos = append(pos, t)
		}
	}
	want := positional - 2
	if len(pos) != want {
		what := fmt.Sprintf("%d nodes", sh.nodes)
		if sh.value != "-" {
			what += " and a value"
		}
		if len(pos) > want {
			p.errorf(n, pos[want].col, "%s %s takes %s; unexpected %q", kw.text, nameTok.text, what, pos[want].text)
		} else {
			end := nameTok.col + utf8.RuneCountInString(nameTok.text)
			if len(pos) > 0 {
				last := pos[len(pos)-1]
				end = last.col + utf8.RuneCountInString(last.text)
			}
			p.errorf(n, end, "%s %s takes %s; found %d token(s)", kw.text, nameTok.text, what, len(pos))
		}
		return
	}
	part := Part{Kind: sh.kind, Name: nameTok.text, Line: n, Col: nameTok.col, Sense: -1}
	ok = true
	for _, t := range pos[:sh.nodes] {
		i, good := p.node(n, t)
		ok = ok && good
		part.Nodes = append(part.Nodes, i)
	}
	if !ok {
		return
	}
	if sh.nodes == 2 && part.Nodes[0] == part.Nodes[1] {
		p.errorf(n, pos[1].col, "%s %s has both ends on node %s", kw.text, nameTok.text, pos[1].text)
		return
	}
	if sh.value != "-" {
		t := pos[sh.nodes]
		v, good := p.val(n, t, 0, sh.value, fmt.Sprintf("%s %s value", kw.text, nameTok.text))
		if !good {
			return
		}
		if sh.positive && v <= 0 {
			p.errorf(n, t.col, "%s %s must have a value > 0, found %s", kw.text, nameTok.text, t.text)
			return
		}
		part.Value = v
	}
	if sh.kind == OpAmp {
		part.Amp = &Amp{A0: 100e3}
		if part.Nodes[0] == part.Nodes[1] {
			p.errorf(n, pos[1].col, "opamp %s has both inputs on node %s", nameTok.text, pos[1].text)
			return
		}
	}
	seen := map[string]bool{}
	devOpts := map[string]given{}
	bulk := Gnd
	for _, t := range opts {
		eq := strings.IndexByte(t.text, '=')
		key := t.text[:eq]
		var o *option
		for i := range sh.options {
			if sh.options[i].key == key {
				o = &sh.options[i]
			}
		}
		if o == nil {
			var keys, bare []string
			for _, so := range sh.options {
				keys = append(keys, so.key+"=")
				bare = append(bare, so.key)
			}
			if len(keys) == 0 {
				p.errorf(n, t.col, "%s takes no options; unexpected %q", kw.text, t.text)
			} else if near := nearest(key, bare); near != "" {
				p.errorf(n, t.col, "unknown option %q for %s; did you mean %s=? (%s takes %s)", key+"=", kw.text, near, kw.text, strings.Join(keys, " "))
			} else {
				p.errorf(n, t.col, "unknown option %q for %s (takes %s)", key+"=", kw.text, strings.Join(keys, " "))
			}
			ok = false
			continue
		}
		if seen[key] {
			p.errorf(n, t.col, "option %s= given twice", key)
			ok = false
			continue
		}
		seen[key] = true
		valCol := t.col + utf8.RuneCountInString(key) + 1
		rest := t.text[eq+1:]
		if rest == "" {
			p.errorf(n, valCol, "option %s= has no value", key)
			ok = false
			continue
		}
		switch o.isSense {
		case "pair":
			if strings.HasSuffix(rest, ",") {
				// A node after a space would have been caught by
				// senseSpaceHint: the second node is missing.
				p.errorf(n, valCol+utf8.RuneCountInString(rest), "sense= takes two nodes, CP,CN: the second is missing after the comma")
				ok = false
				continue
			}
			a, b, found := strings.Cut(rest, ",")
			if !found {
				p.errorf(n, valCol, "sense= takes two nodes, CP,CN (found %q)", rest)
				ok = false
				continue
			}
			ia, ga := p.node(n, token{a, valCol})
			ib, gb := p.node(n, token{b, valCol + utf8.RuneCountInString(a) + 1})
			if !ga || !gb {
				ok = false
				continue
			}
			if ia == ib {
				p.errorf(n, valCol, "sense= names node %s twice", a)
				ok = false
				continue
			}
			part.Ctrl = [2]int{ia, ib}
		case "part":
			if !isWord(rest) {
				p.errorf(n, valCol, "sense= takes a part name, found %q", rest)
				ok = false
				continue
			}
			p.senses = append(p.senses, pendingSense{len(p.c.Parts), token{rest, valCol}, n})
		default:
			if o.isNode {
				i, good := p.node(n, token{rest, valCol})
				if !good {
					ok = false
					continue
				}
				bulk = i
				continue
			}
			if o.words != nil {
				if !slices.Contains(o.words, rest) {
					p.errorf(n, valCol, "option %s= takes %s, found %q", key, strings.Join(o.words, " or "), rest)
					ok = false
					continue
				}
				o.word(&part, rest)
				continue
			}
			v, good := p.val(n, t, eq+1, o.unit, fmt.Sprintf("%s %s option %s=", kw.text, nameTok.text, key))
			if !good {
				ok = false
				continue
			}
			if o.positive && v <= 0 || o.nonneg && v < 0 {
				bound := "> 0"
				if o.nonneg {
					bound = "≥ 0"
				}
				what := ""
				if o.what != "" {
					what = " (" + o.what + ")"
				}
				p.errorf(n, valCol, "%s %s: option %s=%s must be %s, found %s", kw.text, nameTok.text, key, what, bound, rest)
				ok = false
				continue
			}
			if sh.kind.Transistor() {
				devOpts[key] = given{v, t.col}
				continue
			}
			if o.set != nil {
				o.set(&part, v)
			} else {
				part.Value = v
			}
		}
	}
	for _, o := range sh.options {
		if o.required && !seen[o.key] {
			end := toks[len(toks)-1]
			p.errorf(n, end.col+utf8.RuneCountInString(end.text), "%s %s needs %s=", kw.text, nameTok.text, o.key)
			ok = false
		}
	}
	if sh.kind == INoise && ok {
		ok = p.oneNoise(n, kw.text, nameTok.text, toks, opts, seen)
	}
	if !ok {
		return
	}
	if sh.kind.Transistor() && !p.device(n, &part, devOpts, bulk) {
		return
	}
	p.c.parts[part.Name] = len(p.c.Parts)
	p.c.Parts = append(p.c.Parts, part)
}

// senseSpaceHint reports, for a part whose sense= takes a node pair, a
// node written after sense= with a space where the comma belongs
// (sense=b e) or after it (sense=b, e). It returns false when last and t
// are not such a pair.
func (p *parser) senseSpaceHint(n int, sh shape, last, t token) bool {
	key, rest, _ := strings.Cut(last.text, "=")
	if key != "sense" || !isWord(t.text) {
		return false
	}
	pair := false
	for _, o := range sh.options {
		pair = pair || o.key == "sense" && o.isSense == "pair"
	}
	if !pair || strings.Count(rest, ",") > 1 || strings.Contains(rest, ",") && !strings.HasSuffix(rest, ",") {
		return false
	}
	a := strings.TrimSuffix(rest, ",")
	col := last.col + utf8.RuneCountInString(last.text)
	p.errorf(n, col, "sense= takes two nodes joined by a comma, with no space: did you mean sense=%s,%s?", a, t.text)
	return true
}

// oneNoise checks that an inoise line says what its noise is in exactly
// one way (density=, shot= or thermal=), and gives a 1/f corner only to a
// density.
func (p *parser) oneNoise(n int, kw, name string, toks, opts []token, seen map[string]bool) bool {
	var given []token
	for _, t := range opts {
		if k, _, _ := strings.Cut(t.text, "="); k == "density" || k == "shot" || k == "thermal" {
			given = append(given, t)
		}
	}
	switch {
	case len(given) == 0:
		end := toks[len(toks)-1]
		p.errorf(n, end.col+utf8.RuneCountInString(end.text), "%s %s needs one of density=, shot= or thermal=", kw, name)
		return false
	case len(given) > 1:
		p.errorf(n, given[1].col, "%s %s takes one of density=, shot= and thermal=, not two", kw, name)
		return false
	case seen["fc"] && !seen["density"]:
		for _, t := range opts {
			if strings.HasPrefix(t.text, "fc=") {
				p.errorf(n, t.col, "fc= is the 1/f corner of a density=; shot= and thermal= are white")
			}
		}
		return false
	}
	return true
}

func (p *parser) name(n int, t token) bool {
	if !isWord(t.text) {
		p.errorf(n, t.col, "name %q: use letters, digits and _ only", t.text)
		return false
	}
	if prev, dup := p.names[t.text]; dup {
		p.errorf(n, t.col, "name %q is already used on line %d", t.text, prev)
		return false
	}
	p.names[t.text] = n
	return true
}

func (p *parser) port(n int, toks []token) {
	if len(toks) != 4 {
		var col int
		if len(toks) > 4 {
			col = toks[4].col
		} else {
			last := toks[len(toks)-1]
			col = last.col + utf8.RuneCountInString(last.text)
		}
		p.errorf(n, col, "port takes a name and two nodes: port NAME A B")
		return
	}
	if strings.Contains(toks[1].text, "=") {
		p.errorf(n, toks[1].col, "port takes a name and two nodes: port NAME A B")
		return
	}
	if !p.name(n, toks[1]) {
		return
	}
	a, ga := p.node(n, toks[2])
	b, gb := p.node(n, toks[3])
	if !ga || !gb {
		return
	}
	if a == b {
		p.errorf(n, toks[3].col, "port %s has both ends on node %s", toks[1].text, toks[3].text)
		return
	}
	p.c.Ports = append(p.c.Ports, Port{Name: toks[1].text, A: a, B: b, Line: n, Col: toks[1].col})
}

func (p *parser) resolveSenses() {
	for _, s := range p.senses {
		i, ok := p.c.parts[s.tok.text]
		if !ok {
			p.errorf(s.line, s.tok.col, "sense=%s: no part called %s", s.tok.text, s.tok.text)
			continue
		}
		k := p.c.Parts[i].Kind
		if !(k == Resistor || k == Capacitor || k.VoltageOutput()) {
			p.errorf(s.line, s.tok.col, "sense=%s: the current of a %s cannot be sensed (sense a resistor, capacitor, inductor, vsource, vcvs, ccvs or vnoise)", s.tok.text, k)
			continue
		}
		p.c.Parts[s.part].Sense = i
	}
}
