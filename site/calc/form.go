package calc

import (
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/fragment"
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

	// Settings holds each analysis's settings as typed, by the
	// analysis's key (see Analysis); they travel in the URL fragment
	// under the key's prefix ("aid.tol=J").
	Settings map[string]Values `json:"settings,omitempty"`

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

	// Pins are the designs kept for comparison (see Pin): every chart
	// overlays them and every section compares with them. They travel in
	// the share link under pin1 … pin4.
	Pins []Pin `json:"pins,omitempty"`

	// Link is the page's share link, written into the CSV's header when
	// the page asks for the file.
	Link string `json:"link,omitempty"`

	// ChartWidth, when set, is the width in CSS pixels at which the page
	// shows its charts: a phone's narrow column. The charts are then drawn
	// at that width, so their text keeps its size instead of shrinking
	// with a scaled-down drawing. 0 draws them at their default width.
	ChartWidth int `json:"chartWidth,omitempty"`
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
var ReservedKeys = append([]string{keyFrequency, keyFrom, keyTo, keyPoints, keyPage}, pinKeys("")...)

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
// that read back within 1e-14 of v. Below a thousandth of the smallest
// prefix (1 f) it writes a decimal exponent, "1e-320", short enough for a
// share link.
func Syntax(v float64) string { return SyntaxWithin(v, 1e-14) }

// SyntaxWithin is Syntax with the fewest digits that read back within
// rel of v (relative): 1.38325850079699e-12 within 5e-8 is "1.383259p".
func SyntaxWithin(v, rel float64) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return "0"
	}
	if math.Abs(v) < 1e-18 {
		return strconv.FormatFloat(v, 'g', -1, 64)
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
			if got, err := value.Parse(s+p.sym, ""); err == nil && math.Abs(got-v) <= rel*a {
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
// every parameter in catalog order, then the spot frequency and sweep,
// then the analyses' settings (see Form.analysisState).
func (f Form) State(e api.CatalogEntry) string {
	var p fragment.Pairs
	for _, par := range e.Params {
		p.Add(par.Name, f.Params[par.Name])
	}
	f.analysisState(&p)
	f.stagePinState(&p, e)
	return p.Encode()
}

// analysisState adds what every calculator has to p: the spot frequency,
// the sweep, then each analysis's settings in the order of Analyses, each
// under its key's prefix: the declared settings in their order where they
// differ from the default, then the accepted ones in name order where they
// are not empty.
func (f Form) analysisState(p *fragment.Pairs) {
	p.Add(keyFrequency, f.Frequency)
	p.Add(keyFrom, f.Sweep.From)
	p.Add(keyTo, f.Sweep.To)
	p.Add(keyPoints, f.Sweep.Points)
	for _, a := range Analyses {
		v := f.Settings[a.Key]
		if len(v) == 0 {
			continue
		}
		declared := map[string]bool{}
		for _, st := range a.Settings {
			declared[st.Name] = true
			if x := v[st.Name]; strings.TrimSpace(x) != "" && x != st.Default {
				p.Add(a.Field(st.Name), x)
			}
		}
		for _, k := range slices.Sorted(maps.Keys(v)) {
			if !declared[k] && v[k] != "" && a.accepts(k) {
				p.Add(a.Field(k), v[k])
			}
		}
	}
}

// settingsRead collects the analyses' settings of a fragment.
type settingsRead map[string]Values

// read takes one fragment pair that may be an analysis's setting: false
// when the key names no analysis's setting.
func (s settingsRead) read(k, v string) bool {
	key, name, ok := strings.Cut(k, ".")
	if !ok {
		return false
	}
	a := byKey(key)
	if a == nil || !a.accepts(name) {
		return false
	}
	if s[key] == nil {
		s[key] = Values{}
	}
	s[key][name] = v
	return true
}

// over returns base's settings with those of every analysis that the
// fragment had settings for replaced by the fragment's.
func (s settingsRead) over(base map[string]Values) map[string]Values {
	if len(s) == 0 {
		return base
	}
	out := maps.Clone(base)
	if out == nil {
		out = map[string]Values{}
	}
	maps.Copy(out, s)
	return out
}
