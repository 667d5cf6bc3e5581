package aids

import (
	"fmt"
	"math"
	"math/cmplx"

	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/numeric"
)

// RatioPair is two parameters whose quotient Num/Den sets what a stage
// does: a gain −Num/Den, or 1 + Num/Den when Plus1 (a non-inverting gain).
type RatioPair struct {
	Num, Den int // indices in Model.Params
	Plus1    bool
	// Want is the wanted quotient Num/Den; 0 means the nominal one. For a
	// wanted gain G, Want is G (inverting) or G − 1 (Plus1).
	Want float64
	// Lo and Hi bound the values either part may take; 0 means from a
	// factor √10 below the smaller nominal value to √10 above the larger,
	// which keeps the network near the impedance level it was designed at.
	Lo, Hi float64
	Title  string
}

// SnapOptions say what to snap to which series.
type SnapOptions struct {
	// Resistors and Capacitors are the series for each kind of part.
	Resistors, Capacitors eseries.Series
	// Params are the parameters snapped to their nearest series value
	// (indices in Model.Params; each a resistor or capacitor); nil means
	// every Default resistor and capacitor.
	Params []int
	Ratios []RatioPair
}

// SnappedValue is one parameter's series value.
type SnappedValue struct {
	Param          int
	Name           string
	Series         string
	Nominal, Value float64
}

// RatioResult is the series pair that best realizes a RatioPair.
type RatioResult struct {
	RatioPair
	NumName, DenName string
	Series           string
	Lo, Hi           float64 // the range searched
	// Wanted is the quotient sought; NumValue/DenValue the pair chosen and
	// RelErr = |NumValue/DenValue / Wanted − 1|.
	Wanted             float64
	NumValue, DenValue float64
	RelErr             float64
	// Gain and GainRelErr are the stage's gain magnitude set by the pair
	// (Num/Den, or 1 + Num/Den with Plus1) and its error against the
	// wanted one.
	Gain, GainRelErr float64
}

// Compare sets a snapped result beside the nominal one.
type Compare struct {
	Nominal, Snapped complex128
	// MagErr is |Snapped|/|Nominal| − 1; PhaseDiff is ∠Snapped − ∠Nominal
	// in degrees.
	MagErr, PhaseDiff float64
	// MagErrBound and PhaseDiffBound bound their errors, from the two
	// values' error bounds: a difference within its bound is zero within
	// rounding (the snapped parts change nothing the engine can resolve).
	MagErrBound, PhaseDiffBound float64
}

// compare sets snap (with error bound es) beside nom (bound en).
func compare(nom complex128, en float64, snap complex128, es float64) Compare {
	nan := math.NaN()
	c := Compare{Nominal: nom, Snapped: snap, MagErr: nan, PhaseDiff: nan, MagErrBound: nan, PhaseDiffBound: nan}
	if numeric.Finite(nom) && numeric.Finite(snap) && nom != 0 {
		mn, ms := cmplx.Abs(nom), cmplx.Abs(snap)
		c.MagErr = ms/mn - 1
		// First order in the relative errors, plus the rounding of the
		// magnitudes and their quotient.
		rel := es/ms + en/mn
		c.MagErrBound = ms/mn*(rel+4*0x1p-53) + 0x1p-53
		if snap != 0 {
			c.PhaseDiff = cmplx.Phase(snap/nom) * 180 / math.Pi
			c.PhaseDiffBound = (rel + 4*0x1p-53) * 180 / math.Pi
		}
	}
	return c
}

// SnapVariant is the circuit analyzed with one choice of series values.
type SnapVariant struct {
	// Name is "nearest" (each part at its nearest series value) or
	// "ratios" (the ratio pairs at their best pairs, the rest nearest).
	Name   string
	Values []SnappedValue
	Ports  []Compare // index as Model.Ports
	Gain   *Compare
	// PM and NominalPM are the governing phase margins, NaN without a
	// tracked loop.
	PM, NominalPM float64
}

// SnapResult holds the ratio pairs and the analyzed variants.
type SnapResult struct {
	Ratios   []RatioResult
	Variants []SnapVariant
	Notes    []string
}

// Snap picks series values for the model's resistors and capacitors and
// analyzes the circuit with them.
func Snap(m *Model, opt SnapOptions) (*SnapResult, error) {
	series := func(j int) (eseries.Series, error) {
		switch p := m.Params[j]; {
		case p.Class == Passive && p.Kind == circuit.Resistor:
			return opt.Resistors, nil
		case p.Class == Passive && p.Kind == circuit.Capacitor:
			return opt.Capacitors, nil
		default:
			return eseries.Series{}, fmt.Errorf("%s is not a resistor or capacitor; only those are made in IEC 60063 series", p.Name)
		}
	}
	params := opt.Params
	if params == nil {
		for j, p := range m.Params {
			if p.Default && p.Class == Passive && (p.Kind == circuit.Resistor || p.Kind == circuit.Capacitor) {
				params = append(params, j)
			}
		}
	}
	ev, nom, _, err := nominal(m)
	if err != nil {
		return nil, err
	}
	res := &SnapResult{}
	nearest := m.Nominal()
	var nearVals []SnappedValue
	for _, j := range params {
		s, err := series(j)
		if err != nil {
			return nil, err
		}
		p := m.Params[j]
		nearest[j] = s.Nearest(p.Nominal)
		nearVals = append(nearVals, SnappedValue{Param: j, Name: p.Name, Series: s.Name, Nominal: p.Nominal, Value: nearest[j]})
	}
	variant := func(name string, x []float64, vals []SnappedValue) (SnapVariant, error) {
		s := newSample(len(m.Ports))
		if err := ev.eval(x, &s); err != nil {
			return SnapVariant{}, fmt.Errorf("the %s standard values: %w", name, err)
		}
		v := SnapVariant{Name: name, Values: vals, PM: s.PM, NominalPM: nom.PM}
		for i := range m.Ports {
			v.Ports = append(v.Ports, compare(nom.Z[i], nom.ZErr[i], s.Z[i], s.ZErr[i]))
		}
		if m.Gain != nil {
			g := compare(nom.G, nom.GErr, s.G, s.GErr)
			v.Gain = &g
		}
		return v, nil
	}
	nv, err := variant("nearest", nearest, nearVals)
	if err != nil {
		return nil, err
	}
	res.Variants = append(res.Variants, nv)
	if len(opt.Ratios) == 0 {
		return res, nil
	}
	ratios := append([]float64(nil), nearest...)
	set := map[int]string{}
	for _, rp := range opt.Ratios {
		num, den := m.Params[rp.Num], m.Params[rp.Den]
		s, err := series(rp.Num)
		if err != nil {
			return nil, err
		}
		sd, err := series(rp.Den)
		if err != nil {
			return nil, err
		}
		if sd.Name != s.Name {
			return nil, fmt.Errorf("%s and %s are different kinds of part; a ratio pairs two resistors or two capacitors", num.Name, den.Name)
		}
		rr := RatioResult{RatioPair: rp, NumName: num.Name, DenName: den.Name, Series: s.Name, Lo: rp.Lo, Hi: rp.Hi, Wanted: rp.Want}
		if rr.Wanted == 0 {
			rr.Wanted = num.Nominal / den.Nominal
		}
		if rr.Lo == 0 {
			rr.Lo = math.Min(num.Nominal, den.Nominal) / math.Sqrt(10)
		}
		if rr.Hi == 0 {
			rr.Hi = math.Max(num.Nominal, den.Nominal) * math.Sqrt(10)
		}
		n, d, relErr, err := s.BestRatio(rr.Wanted, rr.Lo, rr.Hi)
		if err != nil {
			return nil, fmt.Errorf("%s/%s: %w", num.Name, den.Name, err)
		}
		rr.NumValue, rr.DenValue, rr.RelErr = n, d, relErr
		rr.Gain, rr.GainRelErr = n/d, math.Abs(n/d/rr.Wanted-1)
		if rp.Plus1 {
			rr.Gain = 1 + n/d
			rr.GainRelErr = math.Abs((1+n/d)/(1+rr.Wanted) - 1)
		}
		for _, j := range []int{rp.Num, rp.Den} {
			if prev, ok := set[j]; ok {
				res.Notes = append(res.Notes, fmt.Sprintf("%s is in more than one ratio; the value from %s/%s replaces the one from %s.", m.Params[j].Name, num.Name, den.Name, prev))
			}
			set[j] = num.Name + "/" + den.Name
		}
		ratios[rp.Num], ratios[rp.Den] = n, d
		res.Ratios = append(res.Ratios, rr)
	}
	var ratioVals []SnappedValue
	seen := map[int]bool{}
	add := func(j int) {
		if seen[j] {
			return
		}
		seen[j] = true
		s, _ := series(j)
		p := m.Params[j]
		ratioVals = append(ratioVals, SnappedValue{Param: j, Name: p.Name, Series: s.Name, Nominal: p.Nominal, Value: ratios[j]})
	}
	for _, v := range nearVals {
		add(v.Param)
	}
	for _, rp := range opt.Ratios {
		add(rp.Num)
		add(rp.Den)
	}
	rv, err := variant("ratios", ratios, ratioVals)
	if err != nil {
		return nil, err
	}
	res.Variants = append(res.Variants, rv)
	return res, nil
}
