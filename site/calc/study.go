package calc

import (
	"maps"
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
)

// Study is a calculator's design-aid settings as typed: the tolerance
// study's inputs and the standard-value series. Every field is text, kept
// as typed so that a share link gives back exactly what the user saw; an
// empty field means its default. Request turns it into the engine's
// "tolerance" and "standardValues" keys, naming a bad field by its path in
// the contract ("tolerance.seed", "tolerance.parts.R1", …), which is also
// the data-param of the input that holds it.
type Study struct {
	// Tolerance is the default tolerance of the default set of passive
	// parts: an IEC 60062 letter, a percentage or "none" ("" means F).
	Tolerance string `json:"tolerance,omitempty"`
	// Parts overrides the tolerance per part; an empty value means "use
	// the default".
	Parts map[string]string `json:"parts,omitempty"`
	// Amps gives each opamp its guaranteed minimum a0 and gbw.
	Amps map[string]AmpStudy `json:"amps,omitempty"`
	// Distribution is "uniform" ("" too) or "normal".
	Distribution string `json:"distribution,omitempty"`
	// Seed and Trials are whole numbers as typed ("" means 1 and 2000).
	Seed   string `json:"seed,omitempty"`
	Trials string `json:"trials,omitempty"`
	// Targets are the miss conditions.
	Targets []TargetStudy `json:"targets,omitempty"`
	// Series and CapSeries are the IEC 60063 series for resistors and
	// capacitors ("" means E24 and E12).
	Series    string `json:"series,omitempty"`
	CapSeries string `json:"capacitorSeries,omitempty"`
}

// AmpStudy is one opamp's min–typ spread as typed; empty means fixed.
type AmpStudy struct {
	A0Min  string `json:"a0Min,omitempty"`
	GBWMin string `json:"gbwMin,omitempty"`
}

// TargetStudy is one miss condition as typed: Quantity "z", "phase", "r"
// (with Port), "g" or "pm"; Op "<" or ">"; Value in value syntax.
type TargetStudy struct {
	Quantity string `json:"quantity"`
	Port     string `json:"port,omitempty"`
	Op       string `json:"op"`
	Value    string `json:"value"`
}

// Study defaults, as the form shows them.
const (
	DefaultTolerance = "F"
	DefaultSeed      = "1"
	DefaultTrials    = "2000"
	DefaultSeries    = "E24"
	DefaultCapSeries = "E12"
	// MaxTargets bounds the targets of one study (and of a share link).
	MaxTargets = 8
)

// Setting names of a study: with the analysis's key, "aid.tol=J" in a
// share link.
const (
	keyTol       = "tol"
	keyPartTol   = "tol." // + part name
	keyA0Min     = "a0."  // + opamp name
	keyGBWMin    = "gbw." // + opamp name
	keyDist      = "dist"
	keySeed      = "seed"
	keyTrials    = "n"
	keyTarget    = "t" // + 1 … MaxTargets
	keySeries    = "e"
	keyCapSeries = "ec"
)

// Values writes the study as the design aids' settings, leaving out empty
// fields.
func (s Study) Values() Values {
	v := Values{}
	add := func(k, x string) {
		if x != "" {
			v[k] = x
		}
	}
	add(keyTol, s.Tolerance)
	add(keyDist, s.Distribution)
	add(keySeed, s.Seed)
	add(keyTrials, s.Trials)
	add(keySeries, s.Series)
	add(keyCapSeries, s.CapSeries)
	for name, x := range s.Parts {
		add(keyPartTol+name, x)
	}
	for name, a := range s.Amps {
		add(keyA0Min+name, a.A0Min)
		add(keyGBWMin+name, a.GBWMin)
	}
	for i, t := range s.Targets {
		if i < MaxTargets {
			add(keyTarget+strconv.Itoa(i+1), t.String())
		}
	}
	return v
}

// String writes a target as it goes into a share link: "pm<45",
// "z:out>1k".
func (t TargetStudy) String() string {
	q := t.Quantity
	if t.Port != "" {
		q += ":" + t.Port
	}
	return q + t.Op + t.Value
}

// parseTarget reads a target written by String.
func parseTarget(s string) (TargetStudy, bool) {
	i := strings.IndexAny(s, "<>")
	if i <= 0 {
		return TargetStudy{}, false
	}
	t := TargetStudy{Op: s[i : i+1], Value: s[i+1:]}
	t.Quantity, t.Port, _ = strings.Cut(s[:i], ":")
	switch t.Quantity {
	case "z", "phase", "r":
		if t.Port == "" {
			return TargetStudy{}, false
		}
	case "g", "pm":
		if t.Port != "" {
			return TargetStudy{}, false
		}
	default:
		return TargetStudy{}, false
	}
	return t, t.Value != ""
}

// targetIndex reads the number of a target's setting name, "t3" → 3.
func targetIndex(name string) (int, bool) {
	n, ok := strings.CutPrefix(name, keyTarget)
	if !ok {
		return 0, false
	}
	i, err := strconv.Atoi(n)
	return i, err == nil && i >= 1 && i <= MaxTargets && strconv.Itoa(i) == n
}

// studyKey reports whether name is one of a study's settings.
func studyKey(name string) bool {
	switch name {
	case keyTol, keyDist, keySeed, keyTrials, keySeries, keyCapSeries:
		return true
	}
	for _, prefix := range []string{keyPartTol, keyA0Min, keyGBWMin} {
		if rest, ok := strings.CutPrefix(name, prefix); ok {
			return rest != ""
		}
	}
	_, ok := targetIndex(name)
	return ok
}

// studyOf reads the design aids' settings into a Study. A setting it does
// not know, or a target it cannot read, is an error naming it.
func studyOf(v Values) (Study, *api.ErrorBody) {
	var s Study
	for _, name := range slices.Sorted(maps.Keys(v)) {
		x := v[name]
		bad := func(msg string) (Study, *api.ErrorBody) {
			return Study{}, &api.ErrorBody{Param: aidsKey + "." + name, Message: msg}
		}
		switch name {
		case keyTol:
			s.Tolerance = x
		case keyDist:
			s.Distribution = x
		case keySeed:
			s.Seed = x
		case keyTrials:
			s.Trials = x
		case keySeries:
			s.Series = x
		case keyCapSeries:
			s.CapSeries = x
		default:
			if part, ok := strings.CutPrefix(name, keyPartTol); ok && part != "" {
				if s.Parts == nil {
					s.Parts = map[string]string{}
				}
				s.Parts[part] = x
				continue
			}
			amp, a0 := strings.CutPrefix(name, keyA0Min)
			if !a0 {
				amp, _ = strings.CutPrefix(name, keyGBWMin)
			}
			if amp != name && amp != "" {
				if s.Amps == nil {
					s.Amps = map[string]AmpStudy{}
				}
				as := s.Amps[amp]
				if a0 {
					as.A0Min = x
				} else {
					as.GBWMin = x
				}
				s.Amps[amp] = as
				continue
			}
			i, ok := targetIndex(name)
			if !ok {
				return bad("not a design-aid setting")
			}
			if x == "" {
				continue
			}
			t, ok := parseTarget(x)
			if !ok {
				return bad("a target is written quantity, < or >, and a value: pm<45, z:out>1k")
			}
			for len(s.Targets) < i {
				s.Targets = append(s.Targets, TargetStudy{})
			}
			s.Targets[i-1] = t
		}
	}
	return s.compact(), nil
}

// compact drops targets left empty by settings that skipped a number.
func (s Study) compact() Study {
	var ts []TargetStudy
	for _, t := range s.Targets {
		if t.Quantity != "" {
			ts = append(ts, t)
		}
	}
	s.Targets = ts
	return s
}

// Field paths of the study's own checks; the engine names the others.
const (
	FieldSeed         = "tolerance.seed"
	FieldTrials       = "tolerance.trials"
	FieldDistribution = "tolerance.distribution"
)

// TargetField is the path of target i's field ("value", "quantity" …).
func TargetField(i int, field string) string {
	return "tolerance.targets[" + strconv.Itoa(i) + "]." + field
}

// ToleranceKey converts the study into the engine's "tolerance" key (see
// DEVELOPERS.md, "Design aids in the JSON contract"). The seed, trial count, distribution and target
// values are checked here, each error naming its field; the parts,
// tolerances and spreads are checked by the engine, which names them too.
func (s Study) ToleranceKey() (*api.ToleranceRequest, *api.ErrorBody) {
	bad := func(field, msg string) (*api.ToleranceRequest, *api.ErrorBody) {
		return nil, &api.ErrorBody{Param: field, Message: msg}
	}
	tr := api.ToleranceRequest{Default: strings.TrimSpace(s.Tolerance)}
	if tr.Default == "" {
		tr.Default = DefaultTolerance
	}
	for _, name := range slices.Sorted(maps.Keys(s.Parts)) {
		if v := strings.TrimSpace(s.Parts[name]); v != "" {
			if tr.Parts == nil {
				tr.Parts = map[string]string{}
			}
			tr.Parts[name] = v
		}
	}
	for _, name := range slices.Sorted(maps.Keys(s.Amps)) {
		a := AmpStudy{A0Min: strings.TrimSpace(s.Amps[name].A0Min), GBWMin: strings.TrimSpace(s.Amps[name].GBWMin)}
		if a != (AmpStudy{}) {
			if tr.Amps == nil {
				tr.Amps = map[string]api.AmpSpreadRequest{}
			}
			tr.Amps[name] = api.AmpSpreadRequest{A0Min: a.A0Min, GBWMin: a.GBWMin}
		}
	}
	switch d := strings.TrimSpace(s.Distribution); d {
	case "", "uniform", "normal":
		tr.Distribution = d
	default:
		return bad(FieldDistribution, "choose uniform or normal (tolerance = 3σ)")
	}
	seed := strings.TrimSpace(s.Seed)
	if seed == "" {
		seed = DefaultSeed
	}
	n, err := strconv.ParseUint(seed, 10, 64)
	if err != nil || n > api.MaxSeed {
		return bad(FieldSeed, "the seed is a whole number from 0 to 2⁵³ − 1 = "+strconv.FormatUint(api.MaxSeed, 10))
	}
	tr.Seed = &n
	trials := strings.TrimSpace(s.Trials)
	if trials == "" {
		trials = DefaultTrials
	}
	t, err := strconv.Atoi(trials)
	if err != nil || t < 1 || t > api.MaxTrials {
		return bad(FieldTrials, "from 1 to "+strconv.Itoa(api.MaxTrials)+" trials, a whole number")
	}
	tr.Trials = t
	if len(s.Targets) > MaxTargets {
		return bad("tolerance.targets", "at most "+strconv.Itoa(MaxTargets)+" targets")
	}
	for i, tg := range s.Targets {
		unit := map[string]string{"z": "Ω", "r": "Ω"}[tg.Quantity]
		text := strings.TrimSpace(tg.Value)
		if tg.Quantity == "phase" || tg.Quantity == "pm" {
			text = strings.TrimSpace(strings.TrimSuffix(text, "°"))
		}
		// A typographic minus, as the panels write one, reads as "-".
		v, err := value.Parse(strings.Replace(text, "−", "-", 1), unit)
		if err != nil {
			return bad(TargetField(i, "value"), "target value: "+err.Error())
		}
		tr.Targets = append(tr.Targets, api.TargetRequest{Quantity: tg.Quantity, Port: tg.Port, Op: tg.Op, Value: v})
	}
	return &tr, nil
}

// StandardKey converts the study into the engine's "standardValues" key:
// the series, every resistor and capacitor of the default set, and the
// stage's own ratios.
func (s Study) StandardKey() *api.StandardValuesRequest {
	return &api.StandardValuesRequest{Series: strings.TrimSpace(s.Series), CapacitorSeries: strings.TrimSpace(s.CapSeries)}
}
