package api

import (
	"fmt"
	"math"
	"strings"

	"zport/engine/aids"
	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/value"
)

// This file holds the "standardValues" analysis: the parts snapped to IEC
// 60063 series, ratio pairs chosen together, and the circuit analyzed again.

// StandardValuesRequest is the "standardValues" key of a request.
type StandardValuesRequest struct {
	// Series is the IEC 60063 series for resistors (default "E24");
	// CapacitorSeries for capacitors (default "E12").
	Series          string `json:"series,omitempty"`
	CapacitorSeries string `json:"capacitorSeries,omitempty"`
	// Parts lists the parts snapped to their nearest value; empty means
	// every resistor and capacitor (a stage's network group).
	Parts []string `json:"parts,omitempty"`
	// Ratios are pairs realized together, beside the stage's own.
	Ratios []RatioRequest `json:"ratios,omitempty"`
}

// RatioRequest names a pair whose quotient Num/Den matters.
type RatioRequest struct {
	Num   string `json:"num"`
	Den   string `json:"den"`
	Plus1 bool   `json:"plus1,omitempty"`
	// Gain is the wanted gain magnitude: Num/Den, or 1 + Num/Den with
	// Plus1; absent means the nominal quotient.
	Gain *float64 `json:"gain,omitempty"`
	// Min and Max bound either part's value (value syntax); absent means
	// √10 below the smaller and above the larger nominal value.
	Min   string `json:"min,omitempty"`
	Max   string `json:"max,omitempty"`
	Title string `json:"title,omitempty"`
}

// StandardValuesResult is the "standardValues" key of a response.
type StandardValuesResult struct {
	Frequency       float64       `json:"frequency"`
	Series          string        `json:"series"`
	CapacitorSeries string        `json:"capacitorSeries"`
	Ratios          []RatioResult `json:"ratios"`
	Variants        []SnapVariant `json:"variants"`
	Notes           []string      `json:"notes"`
}

// RatioResult is the series pair chosen for one ratio.
type RatioResult struct {
	Title  string  `json:"title,omitempty"`
	Num    string  `json:"num"`
	Den    string  `json:"den"`
	Plus1  bool    `json:"plus1"`
	Series string  `json:"series"`
	Min    float64 `json:"min"`
	Max    float64 `json:"max"`
	// Wanted is the quotient sought; NumValue/DenValue the chosen pair,
	// RelErr its relative error.
	Wanted   float64 `json:"wanted"`
	NumValue float64 `json:"numValue"`
	DenValue float64 `json:"denValue"`
	RelErr   float64 `json:"relErr"`
	// Gain is Num/Den (or 1 + Num/Den) with the chosen pair; GainRelErr
	// its relative error against the wanted gain.
	Gain       float64 `json:"gain"`
	GainRelErr float64 `json:"gainRelErr"`
	// Errors bounds RelErr and GainRelErr: what the binary representation
	// of the decimal values and the arithmetic can put into them. One
	// within its bound is zero (the pair is exact).
	Errors RatioErrors `json:"errors"`
}

// RatioErrors bounds a RatioResult's errors.
type RatioErrors struct {
	RelErr     *float64 `json:"relErr"`
	GainRelErr *float64 `json:"gainRelErr"`
}

// SnapVariant is the circuit analyzed with one set of series values.
type SnapVariant struct {
	Name               string         `json:"name"` // "nearest" or "ratios"
	Values             []SnappedValue `json:"values"`
	Ports              []SnapCompare  `json:"ports"`
	Gain               *SnapCompare   `json:"gain,omitempty"`
	PhaseMargin        *float64       `json:"phaseMargin,omitempty"`
	NominalPhaseMargin *float64       `json:"nominalPhaseMargin,omitempty"`
}

// SnappedValue is one part's series value.
type SnappedValue struct {
	Name    string  `json:"name"`
	Series  string  `json:"series"`
	Nominal float64 `json:"nominal"`
	Value   float64 `json:"value"`
	Change  float64 `json:"change"` // value/nominal − 1
	// Errors bounds Change, as RatioErrors do.
	Errors SnappedErrors `json:"errors"`
}

// SnappedErrors bounds a SnappedValue's change.
type SnappedErrors struct {
	Change *float64 `json:"change"`
}

// SnapCompare sets a snapped result beside the nominal one.
type SnapCompare struct {
	Name    string   `json:"name,omitempty"` // the port
	Nominal *Complex `json:"nominal"`
	Snapped *Complex `json:"snapped"`
	// MagnitudeError is |snapped|/|nominal| − 1; PhaseDifference is
	// ∠snapped − ∠nominal in degrees.
	MagnitudeError  *float64 `json:"magnitudeError"`
	PhaseDifference *float64 `json:"phaseDifference"`
	// Errors bounds both, from the two analyses' error bounds: a change
	// within its bound is none the engine can resolve.
	Errors CompareErrors `json:"errors"`
}

// CompareErrors bounds a SnapCompare's differences.
type CompareErrors struct {
	MagnitudeError  *float64 `json:"magnitudeError"`
	PhaseDifference *float64 `json:"phaseDifference"`
}

// StandardValues is the "standardValues" analysis: every resistor and
// capacitor snapped to an IEC 60063 series, the stage's ratio pairs chosen
// together, and the circuit analyzed again with those values.
var StandardValues = Register("standardValues", func(p *Prepared, q *StandardValuesRequest, _ *Response) (*StandardValuesResult, error) {
	return p.standardValues(p.aidsModel(), q)
})

func (p *Prepared) standardValues(m *aids.Model, sv *StandardValuesRequest) (*StandardValuesResult, error) {
	rs, cs, err := sv.series()
	if err != nil {
		return nil, err
	}
	opt := aids.SnapOptions{Resistors: rs, Capacitors: cs}
	// snappable finds a resistor or capacitor parameter by name.
	snappable := func(field, name string) (int, error) {
		j := m.Param(name)
		if j >= 0 && m.Params[j].Class == aids.Passive && (m.Params[j].Kind == circuit.Resistor || m.Params[j].Kind == circuit.Capacitor) {
			return j, nil
		}
		var names []string
		for _, par := range m.Params {
			if par.Class == aids.Passive && (par.Kind == circuit.Resistor || par.Kind == circuit.Capacitor) {
				names = append(names, par.Name)
			}
		}
		what := "no resistor or capacitor called " + name
		if j >= 0 {
			what = name + " is not a resistor or capacitor"
		}
		return -1, fieldErr(field, "%s (one of: %s)", what, strings.Join(names, ", "))
	}
	for i, name := range sv.Parts {
		j, err := snappable(fmt.Sprintf("standardValues.parts[%d]", i), name)
		if err != nil {
			return nil, err
		}
		opt.Params = append(opt.Params, j)
	}
	type pair struct{ num, den string }
	seen := map[pair]bool{}
	addRatio := func(at string, rq RatioRequest) error {
		num, err := snappable(at+".num", rq.Num)
		if err != nil {
			return err
		}
		den, err := snappable(at+".den", rq.Den)
		if err != nil {
			return err
		}
		if num == den {
			return fieldErr(at+".den", "a ratio needs two different parts")
		}
		if m.Params[num].Kind != m.Params[den].Kind {
			return fieldErr(at+".den", "%s and %s are different kinds of part; a ratio pairs two resistors or two capacitors", rq.Num, rq.Den)
		}
		rp := aids.RatioPair{Num: num, Den: den, Plus1: rq.Plus1, Title: rq.Title}
		if g := rq.Gain; g != nil {
			switch {
			case rq.Plus1 && !(*g > 1) || math.IsInf(*g, 0):
				return fieldErr(at+".gain", "a gain 1 + %s/%s must be above 1 and finite", rq.Num, rq.Den)
			case !(*g > 0) || math.IsInf(*g, 0):
				return fieldErr(at+".gain", "the gain magnitude %s/%s must be above 0 and finite", rq.Num, rq.Den)
			}
			rp.Want = *g
			if rq.Plus1 {
				rp.Want = *g - 1
			}
		}
		unit := m.Params[num].Unit
		for _, b := range []struct {
			key, s string
			dst    *float64
		}{{"min", rq.Min, &rp.Lo}, {"max", rq.Max, &rp.Hi}} {
			if b.s == "" {
				continue
			}
			v, err := value.Parse(strings.TrimSpace(b.s), unit)
			if err != nil {
				return fieldErr(at+"."+b.key, "%v", err)
			}
			if !(v > 0) {
				return fieldErr(at+"."+b.key, "must be above 0")
			}
			*b.dst = v
		}
		if rp.Lo > 0 && rp.Hi > 0 && rp.Lo > rp.Hi {
			return fieldErr(at+".max", "the range's max is below its min")
		}
		k := pair{rq.Num, rq.Den}
		if seen[k] {
			return nil
		}
		seen[k] = true
		opt.Ratios = append(opt.Ratios, rp)
		return nil
	}
	for i, rq := range sv.Ratios {
		if err := addRatio(fmt.Sprintf("standardValues.ratios[%d]", i), rq); err != nil {
			return nil, err
		}
	}
	if p.Stage != nil {
		for i, r := range p.Stage.Ratios {
			if m.Param(r.Num) < 0 || m.Param(r.Den) < 0 {
				continue // an optional part left empty (a capload stage without R1 is a follower)
			}
			if err := addRatio(fmt.Sprintf("stage %s ratio %d", p.Stage.ID, i), RatioRequest{Num: r.Num, Den: r.Den, Plus1: r.Plus1, Title: r.Title}); err != nil {
				return nil, err
			}
		}
	}
	res, err := aids.Snap(m, opt)
	if err != nil {
		return nil, &Problem{Param: "standardValues", Msg: trimPkg(err), Err: err}
	}
	out := &StandardValuesResult{Frequency: m.Frequency, Series: rs.Name, CapacitorSeries: cs.Name,
		Ratios: []RatioResult{}, Variants: []SnapVariant{}, Notes: append([]string{}, res.Notes...)}
	for _, r := range res.Ratios {
		out.Ratios = append(out.Ratios, RatioResult{Title: r.Title, Num: r.NumName, Den: r.DenName, Plus1: r.Plus1, Series: r.Series,
			Min: r.Lo, Max: r.Hi, Wanted: r.Wanted, NumValue: r.NumValue, DenValue: r.DenValue, RelErr: r.RelErr,
			Gain: r.Gain, GainRelErr: r.GainRelErr,
			// Each decimal value is within 2⁻⁵⁴ of its binary one, and
			// each of the three or four operations rounds by as much.
			Errors: RatioErrors{RelErr: F(4 * 0x1p-53 * (1 + r.RelErr)), GainRelErr: F(6 * 0x1p-53 * (1 + r.GainRelErr))}})
	}
	cmp := func(name string, c aids.Compare) SnapCompare {
		return SnapCompare{Name: name, Nominal: C(c.Nominal), Snapped: C(c.Snapped), MagnitudeError: F(c.MagErr), PhaseDifference: F(c.PhaseDiff),
			Errors: CompareErrors{MagnitudeError: F(c.MagErrBound), PhaseDifference: F(c.PhaseDiffBound)}}
	}
	for _, v := range res.Variants {
		sv := SnapVariant{Name: v.Name, Values: []SnappedValue{}, Ports: []SnapCompare{}, PhaseMargin: F(v.PM), NominalPhaseMargin: F(v.NominalPM)}
		for _, x := range v.Values {
			q := x.Value / x.Nominal
			// The series value and the nominal are decimals within 2⁻⁵⁴ of
			// their binary values; the quotient rounds by as much.
			sv.Values = append(sv.Values, SnappedValue{Name: x.Name, Series: x.Series, Nominal: x.Nominal, Value: x.Value, Change: q - 1,
				Errors: SnappedErrors{Change: F(2 * 0x1p-53 * q)}})
		}
		for i, c := range v.Ports {
			sv.Ports = append(sv.Ports, cmp(m.Ports[i].Name, c))
		}
		if v.Gain != nil {
			g := cmp("", *v.Gain)
			sv.Gain = &g
		}
		out.Variants = append(out.Variants, sv)
	}
	return out, nil
}

// series returns the request's resistor and capacitor series.
func (sv *StandardValuesRequest) series() (rs, cs eseries.Series, err error) {
	pick := func(field, name, def string) (eseries.Series, error) {
		if name == "" {
			name = def
		}
		s, ok := eseries.ByName(name)
		if !ok {
			var names []string
			for _, s := range eseries.All() {
				names = append(names, s.Name)
			}
			return s, fieldErr(field, "%q is not an IEC 60063 series offered here (one of: %s)", name, strings.Join(names, ", "))
		}
		return s, nil
	}
	if rs, err = pick("standardValues.series", sv.Series, "E24"); err != nil {
		return rs, cs, err
	}
	cs, err = pick("standardValues.capacitorSeries", sv.CapacitorSeries, "E12")
	return rs, cs, err
}

// CheckStandardValues checks the series of req's "standardValues" key
// without analyzing anything, as CheckTolerance does for "tolerance".
func CheckStandardValues(req Request) error {
	if sv := StandardValues.Asked(req); sv != nil {
		_, _, err := sv.series()
		return err
	}
	return nil
}
