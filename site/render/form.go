package render

import (
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"zport/engine/api"
	"zport/engine/value"
)

// Form is what a calculator's inputs hold, as typed.
type Form struct {
	// Topology is a catalog stage ID; Params overrides its defaults.
	Topology string            `json:"topology,omitempty"`
	Params   map[string]string `json:"params,omitempty"`

	// Circuit, Reference, Ports and Gain describe a circuit of the user's
	// own instead of a topology (see api.Request).
	Circuit   string        `json:"circuit,omitempty"`
	Reference string        `json:"reference,omitempty"`
	Ports     []string      `json:"ports,omitempty"`
	Gain      *api.GainSpec `json:"gain,omitempty"`

	// Frequency is the spot frequency in value syntax ("1k"); empty means
	// the topology's suggestion.
	Frequency string `json:"frequency,omitempty"`
	// Sweep is the frequency grid; empty fields mean the topology's
	// suggestion.
	Sweep SweepForm `json:"sweep"`

	// ID prefixes the element ids inside the panel, so that several
	// calculators can share a page.
	ID string `json:"id,omitempty"`

	// Fragment, when set, is a URL fragment (without "#") read over the
	// topology's defaults in place of Params, Frequency and Sweep.
	Fragment *string `json:"fragment,omitempty"`

	// Study holds the design-aid settings, which travel in the URL
	// fragment with the rest (keys starting "aid.", see Study.State); nil
	// when the user has not set any.
	Study *Study `json:"study,omitempty"`

	// Budget, in milliseconds, bounds the time of the sweep: when the spot
	// analysis shows that the sweep would take longer, it is shortened to
	// fit (or left out) and Output.SweepCut says so. 0 means no bound. The
	// custom-circuit page sets it, so that a large circuit cannot hold the
	// page for long on every edit.
	Budget float64 `json:"budget,omitempty"`

	// CSV asks for the sweep as CSV in Output.CSV. Writing every value of a
	// sweep in full precision costs more than drawing it, so a page asks
	// only when the user wants the file.
	CSV bool `json:"csv,omitempty"`
}

// SweepForm is a sweep as typed: from and to in value syntax, points a
// whole number.
type SweepForm struct {
	From   string `json:"from,omitempty"`
	To     string `json:"to,omitempty"`
	Points string `json:"points,omitempty"`
}

// Field names used in Output.Error.Param for the form's own inputs.
const (
	FieldFrequency = "frequency"
	FieldFrom      = "sweep.from"
	FieldTo        = "sweep.to"
	FieldPoints    = "sweep.points"
	FieldFragment  = "fragment"
)

// Limits on a URL fragment: longer text is refused before it is read.
const (
	maxFragment      = 4096
	maxFragmentValue = 64
)

// fragment keys for the form's own fields; p is reserved for the
// single-file export's page choice.
const (
	keyFrequency = "f"
	keyFrom      = "from"
	keyTo        = "to"
	keyPoints    = "points"
	keyPage      = "p"
)

// ReservedKeys lists the fragment keys that are not topology parameters.
// No catalog parameter may use one of them as its name.
var ReservedKeys = []string{keyFrequency, keyFrom, keyTo, keyPoints, keyPage}

// DefaultForm is the form of a topology at its catalog defaults.
func DefaultForm(e api.CatalogEntry) Form {
	f := Form{Topology: e.ID, Params: make(map[string]string, len(e.Params))}
	for _, p := range e.Params {
		f.Params[p.Name] = p.Default
	}
	f.Frequency = Syntax(e.Frequency)
	f.Sweep = SweepForm{From: Syntax(e.Sweep.From), To: Syntax(e.Sweep.To), Points: strconv.Itoa(e.Sweep.Points)}
	return f
}

// withDefaults returns f with every empty field of a topology form taken
// from the catalog entry.
func (f Form) withDefaults(e api.CatalogEntry) Form {
	d := DefaultForm(e)
	params := make(map[string]string, len(d.Params)+len(f.Params))
	for k, v := range d.Params {
		params[k] = v
	}
	for k, v := range f.Params {
		params[k] = v
	}
	f.Params = params
	if strings.TrimSpace(f.Frequency) == "" {
		f.Frequency = d.Frequency
	}
	if strings.TrimSpace(f.Sweep.From) == "" {
		f.Sweep.From = d.Sweep.From
	}
	if strings.TrimSpace(f.Sweep.To) == "" {
		f.Sweep.To = d.Sweep.To
	}
	if strings.TrimSpace(f.Sweep.Points) == "" {
		f.Sweep.Points = d.Sweep.Points
	}
	return f
}

// Syntax writes a frequency or count in the engine's value syntax with an
// SI prefix: 1000 → "1k", 1e8 → "100M", 2.5e-3 → "2.5m". It is how
// defaults given as numbers appear in inputs, so it uses the fewest digits
// that read back within 1e-14 of v.
func Syntax(v float64) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return "0"
	}
	prefixes := []struct {
		exp int
		sym string
	}{{12, "T"}, {9, "G"}, {6, "M"}, {3, "k"}, {0, ""}, {-3, "m"}, {-6, "u"}, {-9, "n"}, {-12, "p"}, {-15, "f"}}
	a := math.Abs(v)
	for _, p := range prefixes {
		if a < math.Pow10(p.exp) && p.exp != -15 {
			continue
		}
		m := v / math.Pow10(p.exp)
		for prec := 1; prec <= 17; prec++ {
			s := strconv.FormatFloat(m, 'f', -1, 64)
			if prec < 17 {
				s = strconv.FormatFloat(m, 'g', prec, 64)
			}
			if strings.ContainsRune(s, 'e') {
				continue
			}
			if got, err := value.Parse(s+p.sym, ""); err == nil && math.Abs(got-v) <= 1e-14*a {
				return s + p.sym
			}
		}
		break
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// request turns the form into an engine request. Field errors name the
// field; parameter values are checked by the engine itself, which names the
// parameter.
func (f Form) request() (api.Request, *api.ErrorBody) {
	req := api.Request{
		Topology:  f.Topology,
		Params:    f.Params,
		Circuit:   f.Circuit,
		Reference: f.Reference,
		Ports:     f.Ports,
		Gain:      f.Gain,
	}
	fieldErr := func(field, msg string) *api.ErrorBody {
		return &api.ErrorBody{Param: field, Message: msg}
	}
	freq, err := value.Parse(strings.TrimSpace(f.Frequency), "Hz")
	if err != nil {
		return req, fieldErr(FieldFrequency, "spot frequency: "+err.Error())
	}
	if freq < 0 {
		return req, fieldErr(FieldFrequency, "spot frequency: must not be negative")
	}
	req.Frequency = freq
	if f.Sweep == (SweepForm{}) {
		return req, nil
	}
	from, err := value.Parse(strings.TrimSpace(f.Sweep.From), "Hz")
	if err != nil {
		return req, fieldErr(FieldFrom, "sweep start: "+err.Error())
	}
	if from <= 0 {
		return req, fieldErr(FieldFrom, "sweep start: must be above 0 Hz (the axis is logarithmic)")
	}
	to, err := value.Parse(strings.TrimSpace(f.Sweep.To), "Hz")
	if err != nil {
		return req, fieldErr(FieldTo, "sweep end: "+err.Error())
	}
	if to <= from {
		return req, fieldErr(FieldTo, "sweep end: must be above the start, "+value.Format(from, "Hz", 4))
	}
	pts, err := strconv.Atoi(strings.TrimSpace(f.Sweep.Points))
	if err != nil {
		return req, fieldErr(FieldPoints, "sweep points: a whole number is needed, e.g. 400")
	}
	if pts < 2 || pts > api.MaxPoints {
		return req, fieldErr(FieldPoints, "sweep points: must be from 2 to "+strconv.Itoa(api.MaxPoints))
	}
	req.Sweep = &api.SweepSpec{From: from, To: to, Points: pts}
	return req, nil
}

// State writes the form of a topology as a URL fragment (without "#"):
// every parameter in catalog order, then the spot frequency and sweep.
func (f Form) State(e api.CatalogEntry) string {
	var b strings.Builder
	add := func(k, v string) {
		if b.Len() > 0 {
			b.WriteByte('&')
		}
		b.WriteString(queryEscape(k))
		b.WriteByte('=')
		b.WriteString(queryEscape(v))
	}
	for _, p := range e.Params {
		add(p.Name, f.Params[p.Name])
	}
	add(keyFrequency, f.Frequency)
	add(keyFrom, f.Sweep.From)
	add(keyTo, f.Sweep.To)
	add(keyPoints, f.Sweep.Points)
	if st := f.Study.State(); st != "" {
		b.WriteByte('&')
		b.WriteString(st)
	}
	return b.String()
}

// FragmentError is a URL fragment that could not be read.
type FragmentError struct {
	Msg string
}

func (e *FragmentError) Error() string { return e.Msg }

// ReadFragment reads a URL fragment (with or without "#") written by State
// over base, a form of topology e: settings the fragment leaves out keep
// base's values. It refuses the whole fragment when any part of it is
// malformed, returning base unchanged: the caller then keeps its defaults
// and says why.
func ReadFragment(frag string, base Form, e api.CatalogEntry) (Form, error) {
	base = base.withDefaults(e)
	f := base
	f.Params = make(map[string]string, len(base.Params))
	for k, v := range base.Params {
		f.Params[k] = v
	}
	frag = strings.TrimPrefix(frag, "#")
	if len(frag) > maxFragment {
		return base, &FragmentError{"the link's settings are longer than " + strconv.Itoa(maxFragment) + " characters"}
	}
	known := make(map[string]bool, len(e.Params))
	for _, p := range e.Params {
		known[p.Name] = true
	}
	seen := map[string]bool{}
	var study *Study
	for _, part := range strings.Split(frag, "&") {
		if part == "" {
			continue
		}
		rawKey, rawVal, ok := strings.Cut(part, "=")
		if !ok {
			return base, &FragmentError{"a setting has no “=”"}
		}
		k, v, err := readPair(rawKey, rawVal, seen)
		if err != nil {
			return base, err
		}
		switch {
		case strings.HasPrefix(k, studyPrefix):
			if study == nil {
				study = &Study{}
			}
			if !study.readStudyKey(k, v) {
				return base, &FragmentError{"unknown design-aid setting " + strconv.Quote(k)}
			}
		case k == keyPage:
		case k == keyFrequency:
			f.Frequency = v
		case k == keyFrom:
			f.Sweep.From = v
		case k == keyTo:
			f.Sweep.To = v
		case k == keyPoints:
			f.Sweep.Points = v
		case known[k]:
			f.Params[k] = v
		default:
			return base, &FragmentError{"unknown setting " + strconv.Quote(k) + " for " + e.Title}
		}
	}
	if study != nil {
		s := study.compact()
		f.Study = &s
	}
	return f, nil
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

// queryEscape writes s form-encoded, as URLSearchParams reads it: letters,
// digits and "-_.~" stay, a space becomes "+", every other byte %XX. It
// stands in for net/url, which would bring net/netip into the WebAssembly
// module.
func queryEscape(s string) string {
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
var errEscape = &FragmentError{"a setting is not properly escaped"}

// queryUnescape reads a form-encoded string: "+" is a space, %XX a byte.
func queryUnescape(s string) (string, error) {
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
