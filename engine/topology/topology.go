package topology

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"slices"
	"sort"
	"strings"

	"zport/engine/circuit"
	"zport/engine/value"
)

// Param describes one parameter of a stage. Its symbol, unit and label
// come from the glossary (see Term), filled in when the stage registers:
// a stage writes only what is its own — the role of a part whose role
// differs between stages (Meaning), or what it adds to the glossary's
// label (Note).
type Param struct {
	Name    string // key, e.g. "R1", "a0"
	Symbol  string // display symbol, e.g. "R₁", "a₀" (from the glossary)
	Meaning string // e.g. "input resistor, source to summing node"
	Unit    string // "Ω", "F", "Hz", "S", "A", "" … (from the glossary)
	// Term names the parameter's glossary entry when it is not Name.
	Term string
	// Note follows the glossary's label in Meaning: where the part sits,
	// what leaving it empty means (", source to summing node",
	// " (empty: none)").
	Note    string
	Default string  // in value syntax, e.g. "10k"; "" for an absent optional
	Min     float64 // allowed range, inclusive
	Max     float64
	// Optional parameters may be left empty or "none": absent (e.g. rid
	// absent is infinite). Values omits them.
	Optional bool
	Group    string // "amplifier", "network", "source", "load"
	// Decibels: a dimensionless gain that may also be typed in decibels,
	// 20·log10 of the gain (100dB is 1e5; value.ParseGain).
	Decibels bool
}

// PortDef is a port of the generated circuit.
type PortDef struct {
	Name  string // the `port` line's name
	Title string // e.g. "input, as the source sees it"
	A, B  string // nodes of the generated circuit
}

// GainDef names a stage's gain: from an independent source to an output.
type GainDef struct {
	Source string // e.g. "Vin"
	Output string // "NODE" or "NODE,NODE"
	Unit   string // "V/V" or "V/A"
	Title  string
}

// Sweep is a suggested frequency sweep.
type Sweep struct {
	From, To float64
	Points   int
}

// Values holds a stage's parsed parameters; an absent optional parameter
// has no key.
type Values map[string]float64

// TemperatureKey is the key under which Values may carry the analysis
// temperature in kelvin. It is the request's setting, not a parameter of
// the stage: a stage whose circuit has transistors given by their bias
// reads it with Kelvin, so that its closed forms use the VT = kT/q at which
// its generated text is parsed.
const TemperatureKey = "temperature"

// Kelvin returns the analysis temperature v carries, or
// circuit.DefaultTemperature.
func (v Values) Kelvin() float64 { return v.Or(TemperatureKey, circuit.DefaultTemperature) }

// Has reports whether the optional parameter name is present.
func (v Values) Has(name string) bool { _, ok := v[name]; return ok }

// Or returns v[name], or def when absent.
func (v Values) Or(name string, def float64) float64 {
	if x, ok := v[name]; ok {
		return x
	}
	return def
}

// Formula is a closed-form value with its text form and published source.
// A NaN Value means the formula has no finite value here.
type Formula struct {
	Value  complex128
	Text   string
	Source string
	// Tol is the relative difference from the engine's exact result that
	// the formula is held to in tests; 0 means exact for the stage's model
	// (1e-9). An approximation states its own.
	Tol float64
}

// PortForms holds the closed forms for one port's Blackman terms; nil
// where no closed form is offered.
type PortForms struct {
	Name                 string
	Z0, TShort, TOpen, Z *Formula
}

// Extra is a stage-specific derived value, e.g. a suggested Cf.
type Extra struct {
	Name   string
	Value  float64
	Unit   string
	Note   string
	Source string
}

// Forms is the hand-formula side of a stage at one frequency.
type Forms struct {
	T      *Formula // return ratio of the reference, nil if not offered
	Gain   *Formula
	Ports  []PortForms
	Extras []Extra
}

// Topology is one stage of the catalog.
type Topology struct {
	ID, Title   string
	Description string // what designers use it for and what to watch
	Scenario    string // the invented design story behind the defaults
	Params      []Param
	Reference   string
	Ports       []PortDef
	Gain        *GainDef
	Frequency   float64 // suggested spot frequency
	Sweep       Sweep
	Cautions    []string
	// Ratios are the resistor pairs whose quotient sets the stage's
	// behaviour (a gain, a divider), for standard-value snapping.
	Ratios []Ratio
	// Circuit generates the circuit text for v.
	Circuit func(v Values) string
	// Forms evaluates the closed forms at frequency f.
	Forms func(v Values, f float64) Forms
}

// Ratio is a pair of parameters whose quotient matters: Num/Den, or
// 1 + Num/Den when Plus1 (a non-inverting gain).
type Ratio struct {
	Num, Den string
	Plus1    bool
	Title    string // e.g. "gain-setting ratio R2/R1"
}

// ParamError reports a bad parameter value by name.
type ParamError struct {
	Param string
	Msg   string
}

func (e *ParamError) Error() string { return e.Param + ": " + e.Msg }

var catalog []*Topology

func register(t *Topology) {
	for i := range t.Params {
		t.Params[i] = glossed(t.Params[i])
	}
	catalog = append(catalog, t)
}

// order fixes the catalog's order on every page.
var order = []string{"inverting", "noninverting", "follower", "transimpedance", "difference", "howland", "integrator", "capload", "degenerated", "shuntfeedback", "boostedcascode", "emitterfollower", "miller"}

// Catalog returns the stages in catalog order.
func Catalog() []*Topology {
	rank := map[string]int{}
	for i, id := range order {
		rank[id] = i
	}
	out := append([]*Topology(nil), catalog...)
	sort.SliceStable(out, func(i, j int) bool {
		ri, oki := rank[out[i].ID]
		rj, okj := rank[out[j].ID]
		if oki != okj {
			return oki
		}
		if ri != rj {
			return ri < rj
		}
		return out[i].ID < out[j].ID
	})
	return out
}

// Lookup returns the stage with the given ID.
func Lookup(id string) (*Topology, bool) {
	for _, t := range catalog {
		if t.ID == id {
			return t, true
		}
	}
	return nil, false
}

// Param returns the parameter called name.
func (t *Topology) Param(name string) (*Param, bool) {
	for i := range t.Params {
		if t.Params[i].Name == name {
			return &t.Params[i], true
		}
	}
	return nil, false
}

// Values parses params over the defaults. Unknown names, malformed values
// and values outside a parameter's range are errors naming the parameter.
func (t *Topology) Values(params map[string]string) (Values, error) {
	for _, k := range slices.Sorted(maps.Keys(params)) {
		if _, ok := t.Param(k); !ok {
			names := make([]string, len(t.Params))
			for i, p := range t.Params {
				names[i] = p.Name
			}
			return nil, &ParamError{k, fmt.Sprintf("%s has no parameter %q (it has %s)", t.ID, k, strings.Join(names, ", "))}
		}
	}
	v := Values{}
	for _, p := range t.Params {
		s, given := params[p.Name]
		if !given {
			s = p.Default
		}
		s = strings.TrimSpace(s)
		if s == "" || s == "none" {
			if p.Optional {
				continue
			}
			return nil, &ParamError{p.Name, fmt.Sprintf("%s (%s) needs a value", p.Symbol, p.Meaning)}
		}
		var x float64
		var err error
		if p.Decibels {
			x, err = value.ParseGain(s)
		} else {
			x, err = value.Parse(s, p.Unit)
		}
		if err != nil {
			var se *value.SyntaxError
			msg := err.Error()
			if errors.As(err, &se) {
				msg = se.Msg
			}
			return nil, &ParamError{p.Name, fmt.Sprintf("%s (%s): %s", p.Symbol, p.Meaning, msg)}
		}
		if x < p.Min || x > p.Max || math.IsNaN(x) {
			return nil, &ParamError{p.Name, fmt.Sprintf("%s (%s) must be from %s to %s; got %s",
				p.Symbol, p.Meaning, value.Format(p.Min, p.Unit, 3), value.Format(p.Max, p.Unit, 3), s)}
		}
		v[p.Name] = x
	}
	return v, nil
}
