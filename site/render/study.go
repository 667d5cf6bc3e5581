package render

import (
	"encoding/json"
	"sort"
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

// Fragment keys of a study: every one starts with studyPrefix, which no
// catalog parameter name can (they have no dot).
const (
	studyPrefix  = "aid."
	keyTol       = "aid.tol"
	keyPartTol   = "aid.tol." // + part name
	keyA0Min     = "aid.a0."  // + opamp name
	keyGBWMin    = "aid.gbw." // + opamp name
	keyDist      = "aid.dist"
	keySeed      = "aid.seed"
	keyTrials    = "aid.n"
	keyTarget    = "aid.t" // + 1 … MaxTargets
	keySeries    = "aid.e"
	keyCapSeries = "aid.ec"
)

// Empty reports whether the study holds no setting at all.
func (s *Study) Empty() bool {
	if s == nil {
		return true
	}
	return s.Tolerance == "" && len(s.Parts) == 0 && len(s.Amps) == 0 && s.Distribution == "" &&
		s.Seed == "" && s.Trials == "" && len(s.Targets) == 0 && s.Series == "" && s.CapSeries == ""
}

// State writes the study as URL fragment pairs (without "#" or a leading
// "&"): fixed keys first, then per-part tolerances and opamp spreads in
// name order, then the targets. Empty fields are left out.
func (s *Study) State() string {
	if s.Empty() {
		return ""
	}
	var b strings.Builder
	add := func(k, v string) {
		if v == "" {
			return
		}
		if b.Len() > 0 {
			b.WriteByte('&')
		}
		b.WriteString(queryEscape(k))
		b.WriteByte('=')
		b.WriteString(queryEscape(v))
	}
	add(keyTol, s.Tolerance)
	add(keyDist, s.Distribution)
	add(keySeed, s.Seed)
	add(keyTrials, s.Trials)
	add(keySeries, s.Series)
	add(keyCapSeries, s.CapSeries)
	for _, name := range sortedNames(s.Parts) {
		add(keyPartTol+name, s.Parts[name])
	}
	for _, name := range sortedNames(s.Amps) {
		add(keyA0Min+name, s.Amps[name].A0Min)
		add(keyGBWMin+name, s.Amps[name].GBWMin)
	}
	for i, t := range s.Targets {
		if i >= MaxTargets {
			break
		}
		add(keyTarget+strconv.Itoa(i+1), t.String())
	}
	return b.String()
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

// readStudyKey reads one fragment pair whose key starts with studyPrefix
// into s; false when the key is not one of a study's.
func (s *Study) readStudyKey(k, v string) bool {
	named := func(prefix string) (string, bool) {
		name, ok := strings.CutPrefix(k, prefix)
		return name, ok && name != ""
	}
	switch k {
	case keyTol:
		s.Tolerance = v
	case keyDist:
		s.Distribution = v
	case keySeed:
		s.Seed = v
	case keyTrials:
		s.Trials = v
	case keySeries:
		s.Series = v
	case keyCapSeries:
		s.CapSeries = v
	default:
		if name, ok := named(keyPartTol); ok {
			if s.Parts == nil {
				s.Parts = map[string]string{}
			}
			s.Parts[name] = v
			return true
		}
		for _, f := range []struct {
			prefix string
			set    func(*AmpStudy)
		}{{keyA0Min, func(a *AmpStudy) { a.A0Min = v }}, {keyGBWMin, func(a *AmpStudy) { a.GBWMin = v }}} {
			if name, ok := named(f.prefix); ok {
				if s.Amps == nil {
					s.Amps = map[string]AmpStudy{}
				}
				a := s.Amps[name]
				f.set(&a)
				s.Amps[name] = a
				return true
			}
		}
		n, ok := named(keyTarget)
		if !ok {
			return false
		}
		i, err := strconv.Atoi(n)
		if err != nil || i < 1 || i > MaxTargets || strconv.Itoa(i) != n {
			return false
		}
		t, ok := parseTarget(v)
		if !ok {
			return false
		}
		for len(s.Targets) < i {
			s.Targets = append(s.Targets, TargetStudy{})
		}
		s.Targets[i-1] = t
	}
	return true
}

// ReadStudy reads the study pairs of a URL fragment (with or without "#");
// pairs whose key does not start with "aid." are skipped, so a whole page
// fragment may be given. Anything malformed refuses the whole study.
func ReadStudy(frag string) (Study, error) {
	var s Study
	seen := map[string]bool{}
	frag = strings.TrimPrefix(frag, "#")
	if len(frag) > maxFragment {
		return Study{}, &FragmentError{"the link's settings are longer than " + strconv.Itoa(maxFragment) + " characters"}
	}
	for _, part := range strings.Split(frag, "&") {
		rawKey, rawVal, ok := strings.Cut(part, "=")
		if !ok || !strings.HasPrefix(rawKey, studyPrefix) {
			continue
		}
		k, v, err := readPair(rawKey, rawVal, seen)
		if err != nil {
			return Study{}, err
		}
		if !s.readStudyKey(k, v) {
			return Study{}, &FragmentError{"unknown design-aid setting " + strconv.Quote(k)}
		}
	}
	return s.compact(), nil
}

// compact drops targets left empty by a link that skipped a number.
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

// readPair unescapes and checks one key=value pair of a fragment, as
// ReadFragment does for every pair.
func readPair(rawKey, rawVal string, seen map[string]bool) (k, v string, err error) {
	k, err1 := queryUnescape(rawKey)
	v, err2 := queryUnescape(rawVal)
	if err1 != nil || err2 != nil {
		return "", "", &FragmentError{"a setting is not properly escaped"}
	}
	if !printable(k) || !printable(v) {
		return "", "", &FragmentError{"a setting holds characters that are not allowed"}
	}
	if len(k) > maxFragmentValue || len(v) > maxFragmentValue {
		return "", "", &FragmentError{"a setting is longer than " + strconv.Itoa(maxFragmentValue) + " characters"}
	}
	if seen[k] {
		return "", "", &FragmentError{"the setting " + strconv.Quote(k) + " appears twice"}
	}
	seen[k] = true
	return k, v, nil
}

func sortedNames[V any](m map[string]V) []string {
	names := make([]string, 0, len(m))
	for k := range m {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
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
func (s Study) ToleranceKey() (json.RawMessage, *api.ErrorBody) {
	bad := func(field, msg string) (json.RawMessage, *api.ErrorBody) {
		return nil, &api.ErrorBody{Param: field, Message: msg}
	}
	tr := api.ToleranceRequest{Default: strings.TrimSpace(s.Tolerance)}
	if tr.Default == "" {
		tr.Default = DefaultTolerance
	}
	for _, name := range sortedNames(s.Parts) {
		if v := strings.TrimSpace(s.Parts[name]); v != "" {
			if tr.Parts == nil {
				tr.Parts = map[string]string{}
			}
			tr.Parts[name] = v
		}
	}
	for _, name := range sortedNames(s.Amps) {
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
	b, err := json.Marshal(tr)
	if err != nil {
		return bad("tolerance", "internal error: "+err.Error())
	}
	return b, nil
}

// StandardKey converts the study into the engine's "standardValues" key:
// the series, every resistor and capacitor of the default set, and the
// stage's own ratios.
func (s Study) StandardKey() json.RawMessage {
	sv := api.StandardValuesRequest{Series: strings.TrimSpace(s.Series), CapacitorSeries: strings.TrimSpace(s.CapSeries)}
	b, _ := json.Marshal(sv) // strings only: cannot fail
	return b
}
