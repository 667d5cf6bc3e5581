package api

import (
	"bytes"
	"encoding/json"
	"fmt"
	"maps"
	"math"
	"slices"
	"sort"
	"strings"

	"zport/engine/aids"
	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/feedback"
	"zport/engine/value"
)

// This file holds the "tolerance" analysis: Monte Carlo spread and
// worst-case corners (DEVELOPERS.md, "Design aids in the JSON contract"),
// and a run in slices for a page that shows progress.

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

// Tolerance is the "tolerance" analysis: a Monte Carlo spread and the
// worst-case corners, run to the end, or until the request's context
// stops it between two corners or trials.
var Tolerance = Register("tolerance", func(p *Prepared, q *ToleranceRequest, _ *Response) (*ToleranceResult, error) {
	run, err := p.startTolerance(p.aidsModel(), q)
	if err != nil {
		return nil, err
	}
	ctx := p.Context()
	for done, total := run.Step(0); done < total; done, _ = run.Step(1) {
		if err := ctx.Err(); err != nil {
			return nil, &feedback.Stopped{Done: done, Total: total, Units: "corners and trials", Err: err}
		}
	}
	return run.Result(), nil
})

// StartTolerance prepares req and its "tolerance" key and returns the run,
// nothing computed yet beyond the nominal circuit. Errors are as for
// Analyze.
func StartTolerance(req Request) (*ToleranceRun, error) {
	q := Tolerance.Asked(req)
	if q == nil {
		return nil, fieldErr("tolerance", "the request has no \"tolerance\" object")
	}
	p, err := Prepare(req.Base())
	if err != nil {
		return nil, err
	}
	return p.startTolerance(p.aidsModel(), q)
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

// CheckTolerance checks req's "tolerance" key as far as it can without
// analyzing the circuit: the distribution, seed, trials and bins, every
// tolerance and the part it names, every opamp's spread, and each target's
// quantity, port, condition and value. (Whether the loop crosses unity, for
// a phase-margin target, and whether anything varies at all, show only
// when the study runs.) Errors are Analyze's, naming the field. A page
// uses it to refuse a share link's bad settings as it reads the link.
func CheckTolerance(req Request) error {
	tr := Tolerance.Asked(req)
	if tr == nil {
		return nil
	}
	p, err := Prepare(req.Base())
	if err != nil {
		return err
	}
	if _, err := toleranceOptions(tr); err != nil {
		return err
	}
	m := p.aidsModel()
	if _, _, err := p.spreads(m, tr); err != nil {
		return err
	}
	for i, t := range tr.Targets {
		if _, err := target(m, nil, fmt.Sprintf("tolerance.targets[%d]", i), t); err != nil {
			return err
		}
	}
	return nil
}

// toleranceOptions reads the run's options: distribution, seed, trials,
// bins and corners.
func toleranceOptions(tr *ToleranceRequest) (aids.Options, error) {
	opt := aids.Options{Seed: 1, Trials: tr.Trials, Corners: tr.Corners == nil || *tr.Corners}
	switch tr.Distribution {
	case "", "uniform":
	case "normal":
		opt.Distribution = aids.Normal
	default:
		return opt, fieldErr("tolerance.distribution", "%q is not a distribution here; use \"uniform\" or \"normal\" (tolerance = 3σ)", tr.Distribution)
	}
	if tr.Seed != nil {
		if *tr.Seed > MaxSeed {
			return opt, fieldErr("tolerance.seed", "the seed must be from 0 to 2⁵³ − 1 = %d, so that it survives JavaScript and share links", uint64(MaxSeed))
		}
		opt.Seed = *tr.Seed
	}
	if tr.Trials < 0 || tr.Trials > MaxTrials {
		return opt, fieldErr("tolerance.trials", "from 1 to %d trials (default %d)", MaxTrials, aids.DefaultTrials)
	}
	if tr.Bins < 0 || tr.Bins > MaxBins {
		return opt, fieldErr("tolerance.bins", "from 1 to %d histogram bins (default %d)", MaxBins, aids.DefaultBins)
	}
	return opt, nil
}

func (p *Prepared) startTolerance(m *aids.Model, tr *ToleranceRequest) (*ToleranceRun, error) {
	opt, err := toleranceOptions(tr)
	if err != nil {
		return nil, err
	}
	spreads, parts, err := p.spreads(m, tr)
	if err != nil {
		return nil, err
	}
	if len(spreads) == 0 {
		return nil, fieldErr("tolerance", "nothing varies: every part is held at its nominal value (give a default, a part's tolerance, or an opamp's a0Min or gbwMin)")
	}
	mc, err := aids.NewMonteCarlo(m, spreads, opt)
	if err != nil {
		return nil, &Problem{Msg: err.Error(), Err: err}
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

// target resolves one target request against the study's quantities; qs
// nil leaves out the one check that needs them (a phase margin to hold).
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
	switch {
	case k == aids.GainMag && m.Gain == nil:
		return aids.Target{}, fieldErr(at+".quantity", "the request has no gain")
	case k == aids.PhaseMargin && qs != nil && !slices.ContainsFunc(qs, func(q aids.Quantity) bool { return q.ID == id }):
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
