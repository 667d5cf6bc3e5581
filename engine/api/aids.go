package api

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"maps"
	"math"
	"reflect"
	"slices"
	"sort"
	"strings"

	"zport/engine/aids"
	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/feedback"
	"zport/engine/value"
)

// This file holds the design aids' side of the contract: the request keys
// "tolerance", "standardValues" and "sensitivity", their answers, and a
// tolerance run in slices for the page (StartTolerance). The shapes are
// documented in DEVELOPERS.md, "Design aids in the JSON contract".

// Limits of a tolerance request.
const (
	MaxTrials = 100000
	MaxBins   = 200
	// MaxSeed is the largest seed: 2⁵³ − 1, so a seed survives a trip
	// through JavaScript numbers and share links.
	MaxSeed = 1<<53 - 1
)

// ToleranceRequest is the "tolerance" key of a request.
type ToleranceRequest struct {
	// Default is the tolerance of every passive part not listed in Parts:
	// an IEC 60062 letter ("F" ±1 %) or a percentage ("0.5%"), or "none".
	// Empty means "F". For a topology, the passive parts are the stage's
	// R, C and L parameters in its network group; source and load
	// parameters vary only when listed in Parts.
	Default string `json:"default,omitempty"`
	// Parts overrides the tolerance per part (a topology parameter's name
	// for a stage): a letter, a percentage, or "none" to hold it at its
	// nominal value.
	Parts map[string]string `json:"parts,omitempty"`
	// Amps gives opamps (by part name, "U1") a min–typ spread of a0 and
	// gbw: the minimum in value syntax; typ is the circuit's value.
	Amps map[string]AmpSpreadRequest `json:"amps,omitempty"`
	// Distribution is "uniform" (default) or "normal" (tolerance = 3σ).
	Distribution string `json:"distribution,omitempty"`
	// Seed fixes the draws (default 1; 0 … 2⁵³ − 1).
	Seed *uint64 `json:"seed,omitempty"`
	// Trials is the number of Monte Carlo trials (default 2000).
	Trials int `json:"trials,omitempty"`
	// Bins is the number of histogram bins (default 30).
	Bins int `json:"bins,omitempty"`
	// Corners runs the worst-case corners too (default true).
	Corners *bool `json:"corners,omitempty"`
	// Targets are miss conditions counted over the trials.
	Targets []TargetRequest `json:"targets,omitempty"`
}

// AmpSpreadRequest is an opamp's guaranteed minimum a0 and gbw.
type AmpSpreadRequest struct {
	A0Min  string `json:"a0Min,omitempty"`
	GBWMin string `json:"gbwMin,omitempty"`
}

// TargetRequest is a miss condition: a trial misses when its Quantity
// ("z", "phase", "r" at Port, or "g", "pm") is Op ("<" or ">") Value.
type TargetRequest struct {
	Quantity string  `json:"quantity"`
	Port     string  `json:"port,omitempty"`
	Op       string  `json:"op"`
	Value    float64 `json:"value"`
}

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

// SensitivityRequest is the "sensitivity" key: true, or an object.
type SensitivityRequest struct {
	// Parameters lists the parameters to vary; empty means all.
	Parameters []string `json:"parameters,omitempty"`
	// Step is h, the step in ln p (default 1e-3, at most 0.05).
	Step float64 `json:"step,omitempty"`
}

// ---- responses ----

// ToleranceResult is the "tolerance" key of a response.
type ToleranceResult struct {
	Distribution string  `json:"distribution"`
	Seed         uint64  `json:"seed"`
	Frequency    float64 `json:"frequency"`
	// Trials is the number asked for, Done the number run, Failed those
	// whose circuit could not be analyzed.
	Trials int `json:"trials"`
	Done   int `json:"done"`
	Failed int `json:"failed"`
	// Parts lists what varies, in draw order; corner signs index it.
	Parts      []TolerancedPart `json:"parts"`
	Quantities []QuantitySpread `json:"quantities"`
	Corners    *CornerSummary   `json:"corners,omitempty"`
	Targets    []TargetResult   `json:"targets"`
	// PhaseMarginSearch counts evaluations whose phase margin came from
	// the secant search and from a sweep.
	PhaseMarginSearch *SearchCount `json:"phaseMarginSearch,omitempty"`
	Notes             []string     `json:"notes"`
}

// TolerancedPart is one varied parameter.
type TolerancedPart struct {
	Name string `json:"name"`
	// Kind is "resistor", "capacitor", "inductor" (a tolerance) or "a0",
	// "gbw" (a min–typ spread).
	Kind    string  `json:"kind"`
	Unit    string  `json:"unit"`
	Nominal float64 `json:"nominal"`
	// Tolerance is the relative tolerance of a passive part (0.01 = ±1 %).
	Tolerance *float64 `json:"tolerance,omitempty"`
	// Low and High are the limits: the corners' values.
	Low  float64 `json:"low"`
	High float64 `json:"high"`
}

// QuantitySpread is one quantity over the trials.
type QuantitySpread struct {
	ID       string   `json:"id"`       // "z:out", "phase:out", "r:out", "g", "pm"
	Quantity string   `json:"quantity"` // "z", "phase", "r", "g", "pm"
	Port     string   `json:"port,omitempty"`
	Title    string   `json:"title"`
	Unit     string   `json:"unit"`
	Nominal  *float64 `json:"nominal"`
	// Samples counts the trials where the quantity is defined.
	Samples     int               `json:"samples"`
	Undefined   int               `json:"undefined"`
	Mean        *float64          `json:"mean"`
	StdDev      *float64          `json:"stdDev"`
	Min         *float64          `json:"min"`
	Max         *float64          `json:"max"`
	Percentiles []PercentileValue `json:"percentiles"`
	Histogram   *HistogramResult  `json:"histogram,omitempty"`
	Corners     *CornerRange      `json:"corners,omitempty"`
}

// PercentileValue is one percentile: P in percent.
type PercentileValue struct {
	P     float64  `json:"p"`
	Value *float64 `json:"value"`
}

// HistogramResult: bin i spans [edges[i], edges[i+1]) and holds counts[i].
type HistogramResult struct {
	Scale  string    `json:"scale"` // "linear" or "log" (bins equal in ratio)
	Edges  []float64 `json:"edges"`
	Counts []int     `json:"counts"`
}

// CornerRange is a quantity's range over the corners.
type CornerRange struct {
	Min *float64 `json:"min"`
	Max *float64 `json:"max"`
	// MinAt and MaxAt give each part's limit at that corner, indexed as
	// ToleranceResult.Parts: +1 high, −1 low.
	MinAt     []int8 `json:"minAt,omitempty"`
	MaxAt     []int8 `json:"maxAt,omitempty"`
	Undefined int    `json:"undefined"`
	// MonteCarloShortMin/Max: the Monte Carlo range stays inside the
	// corner range at that end; MonteCarloBeyondMin/Max: it reaches past.
	MonteCarloShortMin  bool `json:"monteCarloShortMin"`
	MonteCarloShortMax  bool `json:"monteCarloShortMax"`
	MonteCarloBeyondMin bool `json:"monteCarloBeyondMin"`
	MonteCarloBeyondMax bool `json:"monteCarloBeyondMax"`
}

// CornerSummary says how the corners were chosen and how many ran.
type CornerSummary struct {
	Method string `json:"method"` // "all" (2ⁿ) or "sensitivity" (two per quantity)
	Count  int    `json:"count"`
	Done   int    `json:"done"`
}

// TargetResult counts the trials missing one target.
type TargetResult struct {
	Quantity  string  `json:"quantity"`
	Port      string  `json:"port,omitempty"`
	Op        string  `json:"op"`
	Value     float64 `json:"value"`
	Misses    int     `json:"misses"`
	Undefined int     `json:"undefined"`
	Fraction  float64 `json:"fraction"` // misses / trials run
}

// SearchCount counts the two paths of the phase-margin search.
type SearchCount struct {
	Secant int `json:"secant"`
	Sweep  int `json:"sweep"`
}

// SensitivityResult is the "sensitivity" key of a response.
type SensitivityResult struct {
	Frequency  float64               `json:"frequency"`
	Step       float64               `json:"step"`
	Method     string                `json:"method"`
	Quantities []SensitivityQuantity `json:"quantities"`
	Notes      []string              `json:"notes"`
}

// SensitivityQuantity lists one quantity's sensitivities, largest first.
type SensitivityQuantity struct {
	ID       string `json:"id"`       // "z:PORT", "g" or "pm"
	Quantity string `json:"quantity"` // "z", "g" or "pm"
	Port     string `json:"port,omitempty"`
	Title    string `json:"title"`
	// Value is the nominal impedance or gain; PhaseMargin the nominal
	// margin in degrees.
	Value       *Complex           `json:"value,omitempty"`
	PhaseMargin *float64           `json:"phaseMargin,omitempty"`
	Entries     []SensitivityEntry `json:"entries"`
}

// SensitivityEntry is one parameter's sensitivity. For "z" and "g", Value
// is ∂ln|Q|/∂ln p and Phase ∂∠Q/∂ln p in degrees; for "pm", Value is
// ∂PM/∂ln p in degrees and Phase is absent. The errors are estimates.
type SensitivityEntry struct {
	Parameter  string   `json:"parameter"`
	Unit       string   `json:"unit"`
	Nominal    float64  `json:"nominal"`
	Value      *float64 `json:"value"`
	Error      *float64 `json:"error"`
	Phase      *float64 `json:"phase,omitempty"`
	PhaseError *float64 `json:"phaseError,omitempty"`
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
}

// ---- decoding ----

// present reports whether a raw key was given with a value other than null.
func present(raw json.RawMessage) bool {
	t := bytes.TrimSpace(raw)
	return len(t) > 0 && !bytes.Equal(t, []byte("null"))
}

// decodeStrict decodes raw into dst, rejecting unknown fields; errors name
// the field under key.
func decodeStrict(key string, raw json.RawMessage, dst any) error {
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.DisallowUnknownFields()
	err := dec.Decode(dst)
	if err == nil {
		if _, extra := dec.Token(); extra != io.EOF {
			return fieldErr(key, "unexpected text after the object")
		}
		return nil
	}
	// where finds the precise path of the problem in the request.
	where := func(fallback string) string {
		var tree any
		if json.Unmarshal(raw, &tree) == nil {
			if at := badField(reflect.TypeOf(dst).Elem(), tree, key); at != "" {
				return at
			}
		}
		return fallback
	}
	var te *json.UnmarshalTypeError
	if errors.As(err, &te) {
		field := key
		if te.Field != "" {
			field += "." + te.Field
		}
		return fieldErr(where(field), "want %s, not a JSON %s", jsonType(te.Type.String()), te.Value)
	}
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "json: unknown field "); ok {
		return fieldErr(where(key), "unknown field %s", name)
	}
	return fieldErr(key, "not valid JSON for this key: %s", strings.TrimPrefix(msg, "json: "))
}

// badField walks a decoded JSON tree against the Go type it was meant for
// and returns the path of the first problem: the object holding a key the
// type does not have, or a value of the wrong JSON type; "" when it finds
// none. (encoding/json names an unknown key but not where it is, and
// leaves map keys and array indices out of a type error's path.)
func badField(t reflect.Type, v any, path string) string {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if v == nil {
		return ""
	}
	switch t.Kind() {
	case reflect.Struct:
		obj, ok := v.(map[string]any)
		if !ok {
			return path
		}
		fields := map[string]reflect.Type{}
		for i := range t.NumField() {
			f := t.Field(i)
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			if name == "" {
				name = f.Name
			}
			fields[name] = f.Type
		}
		for _, k := range slices.Sorted(maps.Keys(obj)) {
			ft, ok := fields[k]
			if !ok {
				return path
			}
			if at := badField(ft, obj[k], path+"."+k); at != "" {
				return at
			}
		}
	case reflect.Map:
		obj, ok := v.(map[string]any)
		if !ok {
			return path
		}
		for _, k := range slices.Sorted(maps.Keys(obj)) {
			if at := badField(t.Elem(), obj[k], path+"."+k); at != "" {
				return at
			}
		}
	case reflect.Slice:
		if t.Elem().Kind() == reflect.Uint8 { // json.RawMessage: anything goes
			return ""
		}
		arr, ok := v.([]any)
		if !ok {
			return path
		}
		for i, e := range arr {
			if at := badField(t.Elem(), e, fmt.Sprintf("%s[%d]", path, i)); at != "" {
				return at
			}
		}
	case reflect.String:
		if _, ok := v.(string); !ok {
			return path
		}
	case reflect.Bool:
		if _, ok := v.(bool); !ok {
			return path
		}
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		x, ok := v.(float64)
		if !ok || x != math.Trunc(x) || x < 0 && t.Kind() >= reflect.Uint {
			return path
		}
	case reflect.Float32, reflect.Float64:
		if _, ok := v.(float64); !ok {
			return path
		}
	}
	return ""
}

func jsonType(goType string) string {
	switch {
	case strings.HasPrefix(goType, "map["):
		return "an object"
	case strings.HasPrefix(goType, "[]"):
		return "an array"
	case goType == "string":
		return "a string"
	case goType == "bool":
		return "true or false"
	case strings.Contains(goType, "int"):
		return "a whole number"
	case strings.Contains(goType, "float"):
		return "a number"
	}
	return "an object"
}

func trimPkg(err error) string { return strings.TrimPrefix(err.Error(), "eseries: ") }

// aidsModel is the design aids' view of the prepared request: the
// circuit's variable numbers (or the stage's parameters), the ports and
// gain of the request, at its spot frequency.
func (p *Prepared) aidsModel() *aids.Model {
	m := &aids.Model{Circuit: p.Circuit, Reference: p.Req.Reference, Gain: p.Analyzer.Gain, Frequency: p.Req.Frequency}
	for _, pt := range p.Analyzer.Ports {
		m.Ports = append(m.Ports, feedback.Port{Name: pt.Name, A: pt.A, B: pt.B})
	}
	if p.Stage != nil {
		m.Params, m.Rebuild = aids.StageParams(p.Stage, p.Values, p.Circuit)
	} else {
		m.Params = aids.CircuitParams(p.Circuit)
	}
	return m
}

// runAids answers the request's design-aid keys into resp.
func (p *Prepared) runAids(resp *Response) error {
	tol, std, sens := present(p.Req.Tolerance), present(p.Req.StandardValues), present(p.Req.Sensitivity)
	if !tol && !std && !sens {
		return nil
	}
	m := p.aidsModel()
	if tol {
		run, err := p.startTolerance(m)
		if err != nil {
			return err
		}
		run.Step(run.Total())
		resp.Tolerance = run.Result()
	}
	if std {
		r, err := p.standardValues(m)
		if err != nil {
			return err
		}
		resp.StandardValues = r
	}
	if sens {
		r, err := p.sensitivity(m)
		if err != nil {
			return err
		}
		if r != nil {
			resp.Sensitivity = r
		}
	}
	return nil
}

// ---- tolerance ----

// ToleranceRun is a tolerance study run in slices, for a page that shows
// progress and can cancel: call Step until it reports done == total (or
// stop calling it), and Result at any time for what has run so far.
type ToleranceRun struct {
	mc      *aids.MonteCarlo
	m       *aids.Model
	bins    int
	targets []aids.Target
	reqs    []TargetRequest
	parts   []TolerancedPart
}

// StartTolerance prepares req and its "tolerance" key and returns the run,
// nothing computed yet beyond the nominal circuit. Errors are as for
// Analyze.
func StartTolerance(req Request) (*ToleranceRun, error) {
	p, err := Prepare(req)
	if err != nil {
		return nil, err
	}
	if !present(req.Tolerance) {
		return nil, fieldErr("tolerance", "the request has no \"tolerance\" object")
	}
	return p.startTolerance(p.aidsModel())
}

// StartToleranceJSON is StartTolerance on a JSON request. On bad input it
// returns a nil run and an ErrorResponse as JSON. It never panics.
func StartToleranceJSON(in []byte) (run *ToleranceRun, errJSON []byte) {
	defer func() {
		if r := recover(); r != nil {
			run = nil
			errJSON, _ = json.Marshal(ErrorResponse{Error: ErrorBody{Message: fmt.Sprintf("internal error: %v (please report this circuit)", r)}})
		}
	}()
	var req Request
	dec := json.NewDecoder(bytes.NewReader(in))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&req); err != nil {
		errJSON, _ = json.Marshal(ErrorResponse{Error: ErrorBody{Message: "request is not valid JSON for this contract: " + err.Error()}})
		return nil, errJSON
	}
	run, err := StartTolerance(req)
	if err != nil {
		errJSON, _ = json.Marshal(ErrorResponse{Error: Body(err)})
		return nil, errJSON
	}
	return run, nil
}

// Total is the number of units of work (corners, then trials).
func (r *ToleranceRun) Total() int { return r.mc.Total() }

// Step runs up to n more units of work and returns how many have run and
// the total.
func (r *ToleranceRun) Step(n int) (done, total int) { return r.mc.Step(n), r.mc.Total() }

// ResultJSON is Result as JSON.
func (r *ToleranceRun) ResultJSON() []byte {
	b, err := json.Marshal(r.Result())
	if err != nil {
		b, _ = json.Marshal(ErrorResponse{Error: ErrorBody{Message: "internal error: " + err.Error()}})
	}
	return b
}

func (p *Prepared) startTolerance(m *aids.Model) (*ToleranceRun, error) {
	var tr ToleranceRequest
	if err := decodeStrict("tolerance", p.Req.Tolerance, &tr); err != nil {
		return nil, err
	}
	opt := aids.Options{Seed: 1, Trials: tr.Trials, Corners: tr.Corners == nil || *tr.Corners}
	switch tr.Distribution {
	case "", "uniform":
	case "normal":
		opt.Distribution = aids.Normal
	default:
		return nil, fieldErr("tolerance.distribution", "%q is not a distribution here; use \"uniform\" or \"normal\" (tolerance = 3σ)", tr.Distribution)
	}
	if tr.Seed != nil {
		if *tr.Seed > MaxSeed {
			return nil, fieldErr("tolerance.seed", "the seed must be from 0 to 2⁵³ − 1 = %d, so that it survives JavaScript and share links", uint64(MaxSeed))
		}
		opt.Seed = *tr.Seed
	}
	if tr.Trials < 0 || tr.Trials > MaxTrials {
		return nil, fieldErr("tolerance.trials", "from 1 to %d trials (default %d)", MaxTrials, aids.DefaultTrials)
	}
	if tr.Bins < 0 || tr.Bins > MaxBins {
		return nil, fieldErr("tolerance.bins", "from 1 to %d histogram bins (default %d)", MaxBins, aids.DefaultBins)
	}
	spreads, parts, err := p.spreads(m, &tr)
	if err != nil {
		return nil, err
	}
	mc, err := aids.NewMonteCarlo(m, spreads, opt)
	if err != nil {
		return nil, &Problem{Msg: err.Error()}
	}
	run := &ToleranceRun{mc: mc, m: m, bins: tr.Bins, parts: parts, reqs: tr.Targets}
	for i, t := range tr.Targets {
		at := fmt.Sprintf("tolerance.targets[%d]", i)
		tg, err := target(m, mc.Quantities(), at, t)
		if err != nil {
			return nil, err
		}
		run.targets = append(run.targets, tg)
	}
	return run, nil
}

// spreads resolves the tolerance request into spreads, in parameter order.
func (p *Prepared) spreads(m *aids.Model, tr *ToleranceRequest) ([]aids.Spread, []TolerancedPart, error) {
	parse := func(field, s string) (float64, error) {
		switch strings.TrimSpace(s) {
		case "none", "0", "0%", "0 %":
			return 0, nil
		}
		f, err := eseries.ParseTolerance(s)
		if err != nil {
			return 0, fieldErr(field, "%s", trimPkg(err))
		}
		return f, nil
	}
	def := 0.01
	if tr.Default != "" {
		var err error
		if def, err = parse("tolerance.default", tr.Default); err != nil {
			return nil, nil, err
		}
	}
	tol := make([]float64, len(m.Params))
	given := make([]bool, len(m.Params))
	for _, name := range slices.Sorted(maps.Keys(tr.Parts)) {
		field := "tolerance.parts." + name
		j := m.Param(name)
		if j < 0 || m.Params[j].Class != aids.Passive {
			return nil, nil, fieldErr(field, "%s", p.notPassive(m, name, j))
		}
		f, err := parse(field, tr.Parts[name])
		if err != nil {
			return nil, nil, err
		}
		tol[j], given[j] = f, true
	}
	var spreads []aids.Spread
	kinds := map[int]string{}
	for j, par := range m.Params {
		if par.Class != aids.Passive {
			continue
		}
		if !given[j] && par.Default {
			tol[j] = def
		}
		if tol[j] > 0 {
			spreads = append(spreads, aids.Tolerance(j, par.Nominal, tol[j]))
			kinds[j] = par.Kind.String()
		}
	}
	for _, name := range slices.Sorted(maps.Keys(tr.Amps)) {
		field := "tolerance.amps." + name
		idx, ok := p.Circuit.PartIndex(name)
		if !ok || p.Circuit.Parts[idx].Kind != circuit.OpAmp {
			return nil, nil, fieldErr(field, "no opamp called %q (opamps: %s)", name, strings.Join(opamps(p.Circuit), ", "))
		}
		as := tr.Amps[name]
		for _, f := range []struct {
			key, s, unit string
			field        aids.Field
		}{{"a0Min", as.A0Min, "", aids.FieldA0}, {"gbwMin", as.GBWMin, "Hz", aids.FieldGBW}} {
			if f.s == "" {
				continue
			}
			at := field + "." + f.key
			j := slices.IndexFunc(m.Params, func(par aids.Param) bool { return par.Part == idx && par.Field == f.field })
			if j < 0 {
				what := map[aids.Field]string{aids.FieldA0: "a0", aids.FieldGBW: "gbw (no first pole is set)"}[f.field]
				return nil, nil, fieldErr(at, "%s has no %s to spread", name, what)
			}
			min, err := value.Parse(strings.TrimSpace(f.s), f.unit)
			if err != nil {
				return nil, nil, fieldErr(at, "%v", err)
			}
			typ := m.Params[j].Nominal
			if !(min > 0) || min > typ {
				return nil, nil, fieldErr(at, "the minimum must be above 0 and at most the typical value, which is the circuit's %s = %s", f.field, value.Format(typ, f.unit, 4))
			}
			if min == typ {
				continue
			}
			spreads = append(spreads, aids.MinTyp(j, min, typ))
			kinds[j] = f.field.String()
		}
	}
	if len(spreads) == 0 {
		return nil, nil, fieldErr("tolerance", "nothing varies: every part is held at its nominal value (give a default, a part's tolerance, or an opamp's a0Min or gbwMin)")
	}
	sort.SliceStable(spreads, func(a, b int) bool { return spreads[a].Param < spreads[b].Param })
	var parts []TolerancedPart
	for _, s := range spreads {
		par := m.Params[s.Param]
		tp := TolerancedPart{Name: par.Name, Kind: kinds[s.Param], Unit: par.Unit, Nominal: par.Nominal, Low: s.Lo, High: s.Hi}
		if s.Tol > 0 {
			tp.Tolerance = F(s.Tol)
		}
		parts = append(parts, tp)
	}
	return spreads, parts, nil
}

// notPassive explains why name cannot take a tolerance.
func (p *Prepared) notPassive(m *aids.Model, name string, j int) string {
	var passives []string
	for _, par := range m.Params {
		if par.Class == aids.Passive {
			passives = append(passives, par.Name)
		}
	}
	list := strings.Join(passives, ", ")
	if j >= 0 {
		return fmt.Sprintf("%s is not a resistor, capacitor or inductor; tolerances apply to those (%s), and an opamp's a0 and gbw spreads go in tolerance.amps", name, list)
	}
	if part, ok := p.Circuit.Part(name); ok && p.Stage == nil {
		if part.Kind == circuit.OpAmp {
			return fmt.Sprintf("%s is an opamp; its a0 and gbw spreads go in tolerance.amps.%s", name, name)
		}
		return fmt.Sprintf("%s is a %s; tolerances apply to resistors, capacitors and inductors (%s)", name, part.Kind, list)
	}
	if p.Stage != nil {
		return fmt.Sprintf("stage %s has no passive parameter called %s (it has %s)", p.Stage.ID, name, list)
	}
	return fmt.Sprintf("no part called %s (the passive parts are %s)", name, list)
}

func opamps(c *circuit.Circuit) []string {
	var r []string
	for _, pt := range c.Parts {
		if pt.Kind == circuit.OpAmp {
			r = append(r, pt.Name)
		}
	}
	if len(r) == 0 {
		return []string{"none"}
	}
	return r
}

// target resolves one target request against the study's quantities.
func target(m *aids.Model, qs []aids.Quantity, at string, t TargetRequest) (aids.Target, error) {
	kinds := map[string]aids.QuantityKind{"z": aids.ZMag, "phase": aids.ZPhase, "r": aids.ZRe, "g": aids.GainMag, "pm": aids.PhaseMargin}
	k, ok := kinds[t.Quantity]
	if !ok {
		return aids.Target{}, fieldErr(at+".quantity", "%q is not a quantity here; use \"z\" (|Z|, Ω), \"phase\" (∠Z, °), \"r\" (Re Z, Ω), \"g\" (|gain|) or \"pm\" (phase margin, °)", t.Quantity)
	}
	port := ""
	if k == aids.GainMag || k == aids.PhaseMargin {
		if t.Port != "" {
			return aids.Target{}, fieldErr(at+".port", "%q takes no port", t.Quantity)
		}
	} else {
		var names []string
		for _, pt := range m.Ports {
			names = append(names, pt.Name)
		}
		if !slices.Contains(names, t.Port) {
			return aids.Target{}, fieldErr(at+".port", "%q is not a port of the request (ports: %s)", t.Port, strings.Join(names, ", "))
		}
		port = t.Port
	}
	id := aids.QuantityID(k, port)
	if !slices.ContainsFunc(qs, func(q aids.Quantity) bool { return q.ID == id }) {
		if k == aids.GainMag {
			return aids.Target{}, fieldErr(at+".quantity", "the request has no gain")
		}
		return aids.Target{}, fieldErr(at+".quantity", "the nominal loop has no unity crossing, so there is no phase margin to hold to a target")
	}
	if t.Op != "<" && t.Op != ">" {
		return aids.Target{}, fieldErr(at+".op", "%q: use \"<\" or \">\" (the condition that counts as a miss)", t.Op)
	}
	if math.IsNaN(t.Value) || math.IsInf(t.Value, 0) {
		return aids.Target{}, fieldErr(at+".value", "must be a finite number")
	}
	return aids.Target{ID: id, Below: t.Op == "<", Value: t.Value}, nil
}

// Result summarizes the run so far.
func (r *ToleranceRun) Result() *ToleranceResult {
	res, err := r.mc.Result(r.bins, r.targets)
	if err != nil { // the targets were resolved against these quantities
		panic(err)
	}
	out := &ToleranceResult{Distribution: res.Distribution.String(), Seed: res.Seed, Frequency: r.m.Frequency,
		Trials: res.Trials, Done: res.Done, Failed: res.Failed, Parts: r.parts,
		Quantities: []QuantitySpread{}, Targets: []TargetResult{}, Notes: append([]string{}, res.Notes...)}
	if res.CornerMethod != "" {
		out.Corners = &CornerSummary{Method: res.CornerMethod, Count: res.Corners, Done: res.CornersDone}
	}
	if res.FastPM+res.SlowPM > 0 {
		out.PhaseMarginSearch = &SearchCount{Secant: res.FastPM, Sweep: res.SlowPM}
	}
	for _, q := range res.Quantities {
		qs := QuantitySpread{ID: q.ID, Quantity: q.Kind.String(), Title: q.Title, Unit: q.Unit, Nominal: F(q.Nominal),
			Samples: q.N, Undefined: q.Undefined, Mean: F(q.Mean), StdDev: F(q.StdDev), Min: F(q.Min), Max: F(q.Max)}
		if q.Port >= 0 {
			qs.Port = r.m.Ports[q.Port].Name
		}
		for i, pc := range aids.Percentiles {
			qs.Percentiles = append(qs.Percentiles, PercentileValue{P: pc, Value: F(q.Percentiles[i])})
		}
		if len(q.Hist.Counts) > 0 {
			scale := "linear"
			if q.Hist.Log {
				scale = "log"
			}
			qs.Histogram = &HistogramResult{Scale: scale, Edges: q.Hist.Edges, Counts: q.Hist.Counts}
		}
		if c := q.Corners; c != nil {
			qs.Corners = &CornerRange{Min: F(c.Min), Max: F(c.Max), MinAt: c.MinAt, MaxAt: c.MaxAt, Undefined: c.Undefined,
				MonteCarloShortMin: c.MissesMin, MonteCarloShortMax: c.MissesMax,
				MonteCarloBeyondMin: c.BeyondMin, MonteCarloBeyondMax: c.BeyondMax}
		}
		out.Quantities = append(out.Quantities, qs)
	}
	for i, t := range res.Targets {
		tq := r.reqs[i]
		out.Targets = append(out.Targets, TargetResult{Quantity: tq.Quantity, Port: tq.Port, Op: tq.Op, Value: tq.Value,
			Misses: t.Misses, Undefined: t.Undefined, Fraction: t.Fraction})
	}
	return out
}

// ---- sensitivity ----

func (p *Prepared) sensitivity(m *aids.Model) (*SensitivityResult, error) {
	var sr SensitivityRequest
	if t := bytes.TrimSpace(p.Req.Sensitivity); bytes.Equal(t, []byte("false")) {
		return nil, nil
	} else if !bytes.Equal(t, []byte("true")) {
		if err := decodeStrict("sensitivity", p.Req.Sensitivity, &sr); err != nil {
			return nil, err
		}
	}
	if sr.Step != 0 && !(sr.Step > 0 && sr.Step <= 0.05) {
		return nil, fieldErr("sensitivity.step", "the step in ln p must be above 0 and at most 0.05 (default %g)", aids.DefaultStep)
	}
	var params []int
	for i, name := range sr.Parameters {
		j := m.Param(name)
		if j < 0 {
			var names []string
			for _, par := range m.Params {
				names = append(names, par.Name)
			}
			return nil, fieldErr(fmt.Sprintf("sensitivity.parameters[%d]", i), "no parameter called %q (one of: %s)", name, strings.Join(names, ", "))
		}
		params = append(params, j)
	}
	res, err := aids.Sensitivities(m, params, sr.Step)
	if err != nil {
		return nil, &Problem{Msg: err.Error()}
	}
	out := &SensitivityResult{Frequency: m.Frequency, Step: res.Step, Quantities: []SensitivityQuantity{}, Notes: append([]string{}, res.Notes...),
		Method: "central differences of ln Q in ln p at steps 2h, h and h/2, Richardson-extrapolated; error = |R(h) − R(2h)|"}
	for _, q := range res.Quantities {
		sq := SensitivityQuantity{ID: q.ID, Quantity: q.Kind.String(), Title: q.Title, Entries: []SensitivityEntry{}}
		if q.Port >= 0 {
			sq.Port = m.Ports[q.Port].Name
		}
		if q.Kind == aids.PhaseMargin {
			sq.PhaseMargin = F(q.PM)
		} else {
			sq.Value = C(q.Value)
		}
		for _, e := range q.Entries {
			par := m.Params[e.Param]
			se := SensitivityEntry{Parameter: e.Name, Unit: par.Unit, Nominal: par.Nominal, Value: F(e.Mag), Error: F(e.MagErr)}
			if q.Kind != aids.PhaseMargin {
				se.Phase, se.PhaseError = F(e.Phase), F(e.PhaseErr)
			}
			sq.Entries = append(sq.Entries, se)
		}
		out.Quantities = append(out.Quantities, sq)
	}
	if len(out.Notes) == 0 {
		out.Notes = []string{}
	}
	return out, nil
}

// ---- standard values ----

func (p *Prepared) standardValues(m *aids.Model) (*StandardValuesResult, error) {
	var sv StandardValuesRequest
	if err := decodeStrict("standardValues", p.Req.StandardValues, &sv); err != nil {
		return nil, err
	}
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
	rs, err := pick("standardValues.series", sv.Series, "E24")
	if err != nil {
		return nil, err
	}
	cs, err := pick("standardValues.capacitorSeries", sv.CapacitorSeries, "E12")
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
		return nil, &Problem{Param: "standardValues", Msg: trimPkg(err)}
	}
	out := &StandardValuesResult{Frequency: m.Frequency, Series: rs.Name, CapacitorSeries: cs.Name,
		Ratios: []RatioResult{}, Variants: []SnapVariant{}, Notes: append([]string{}, res.Notes...)}
	for _, r := range res.Ratios {
		out.Ratios = append(out.Ratios, RatioResult{Title: r.Title, Num: r.NumName, Den: r.DenName, Plus1: r.Plus1, Series: r.Series,
			Min: r.Lo, Max: r.Hi, Wanted: r.Wanted, NumValue: r.NumValue, DenValue: r.DenValue, RelErr: r.RelErr,
			Gain: r.Gain, GainRelErr: r.GainRelErr})
	}
	cmp := func(name string, c aids.Compare) SnapCompare {
		return SnapCompare{Name: name, Nominal: C(c.Nominal), Snapped: C(c.Snapped), MagnitudeError: F(c.MagErr), PhaseDifference: F(c.PhaseDiff)}
	}
	for _, v := range res.Variants {
		sv := SnapVariant{Name: v.Name, Values: []SnappedValue{}, Ports: []SnapCompare{}, PhaseMargin: F(v.PM), NominalPhaseMargin: F(v.NominalPM)}
		for _, x := range v.Values {
			sv.Values = append(sv.Values, SnappedValue{Name: x.Name, Series: x.Series, Nominal: x.Nominal, Value: x.Value, Change: x.Value/x.Nominal - 1})
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
