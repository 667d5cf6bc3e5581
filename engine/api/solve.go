package api

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"

	"zport/engine/aids"
	"zport/engine/circuit"
	"zport/engine/eseries"
	"zport/engine/solve"
	"zport/engine/topology"
	"zport/engine/value"
)

// This file holds the "solve" analysis: the values of one part at which a
// quantity reaches a target (DEVELOPERS.md, "Design to a target"),
// answered by package zport/engine/solve, and a run in slices for a page.

// SolveRequest is the "solve" key of a request.
type SolveRequest struct {
	// Part names what to solve for: a part of circuit text ("Cf"), an op
	// amp's number ("U1.gbw"), a transistor's transconductance ("Q1.gm"),
	// or a catalog stage's parameter ("Cf", "gbw").
	Part   string      `json:"part"`
	Target SolveTarget `json:"target"`
	// Range limits the search; an absent end is the part's allowed limit
	// (a stage's parameter) or 1000 times the value away from it (circuit
	// text).
	Range *SolveRange `json:"range,omitempty"`
	// Series is the IEC 60063 series of the standard values offered
	// beside each solution of a resistor, capacitor or inductor ("" means
	// E12).
	Series string `json:"series,omitempty"`
}

// SolveTarget is the quantity to reach and its value: Quantity one of
// "pm" (°), "gm" (dB), "crossover" (Hz), "z", "r" (Ω), "phase" (°) — these
// three at Port — "g", "peaking" (dB), "bandwidth" (Hz), "overshoot" (%).
type SolveTarget struct {
	Quantity string   `json:"quantity"`
	Value    *float64 `json:"value"`
	Port     string   `json:"port,omitempty"`
}

// SolveRange is the range of the part's value to search, in its unit.
type SolveRange struct {
	From *float64 `json:"from,omitempty"`
	To   *float64 `json:"to,omitempty"`
}

// DefaultSolveSeries is the series of a solve's standard values when the
// request names none.
const DefaultSolveSeries = "E12"

// SolveResult is the "solve" key of a response.
type SolveResult struct {
	Part string `json:"part"`
	// Unit is the part's unit ("F", "Ω", "Hz", "" …).
	Unit     string `json:"unit"`
	Quantity string `json:"quantity"`
	Port     string `json:"port,omitempty"`
	// Title names the quantity ("phase margin", "|Z| at out");
	// QuantityUnit is its unit ("°", "Ω", "dB", "%" …).
	Title        string  `json:"title"`
	QuantityUnit string  `json:"quantityUnit"`
	Target       float64 `json:"target"`
	// Range is the range searched.
	Range SolvedRange `json:"range"`
	// Series names the series of Standard; empty when the part takes no
	// standard values (it is not a resistor, capacitor or inductor).
	Series string `json:"series,omitempty"`
	// Nominal is the part's value as given and what it achieves; null
	// when the part is absent (a stage's optional part left empty).
	Nominal *SolvePoint `json:"nominal"`
	// Solutions are every value in the range that meets the target,
	// ascending, each to 1e-9 relative.
	Solutions []SolvePoint `json:"solutions"`
	// Standard gives, per solution, the series values on either side and
	// what each achieves.
	Standard []StandardPair `json:"standard,omitempty"`
	// Curve is the quantity against the part over the range.
	Curve SolveCurve `json:"curve"`
	// Best is the closest approach to the target, when nothing in the
	// range meets it.
	Best *SolvePoint `json:"best,omitempty"`
	// Evaluations counts the circuits analyzed.
	Evaluations int      `json:"evaluations"`
	Notes       []string `json:"notes"`
}

// SolvedRange is a searched range.
type SolvedRange struct {
	From float64 `json:"from"`
	To   float64 `json:"to"`
}

// SolvePoint is a value of the part and the quantity it achieves (null
// where the quantity is undefined).
type SolvePoint struct {
	Value    float64  `json:"value"`
	Achieved *float64 `json:"achieved"`
}

// StandardPair is the series values below and above a solution.
type StandardPair struct {
	Below SolvePoint `json:"below"`
	Above SolvePoint `json:"above"`
}

// SolveCurve is the quantity (null where undefined) at each value of the
// part, ascending.
type SolveCurve struct {
	Values     []float64  `json:"values"`
	Quantities []*float64 `json:"quantities"`
}

// Solve is the "solve" analysis, run to the end.
var Solve = Register("solve", func(p *Prepared, q *SolveRequest, _ *Response) (*SolveResult, error) {
	sp, err := p.solveProblem(q)
	if err != nil {
		return nil, err
	}
	return sp.result(sp.prob.Solve()), nil
})

// solvePlan is a resolved solve request: the problem, and what the result
// echoes.
type solvePlan struct {
	prob   *solve.Problem
	echo   SolveResult
	series bool
	note   string
}

// solveProblem resolves q against the prepared request, naming the field
// at fault.
func (p *Prepared) solveProblem(q *SolveRequest) (*solvePlan, error) {
	qty, ok := solve.ParseQuantity(q.Target.Quantity)
	if !ok {
		return nil, fieldErr("solve.target.quantity", "%q is not a quantity here; use %s", q.Target.Quantity, strings.Join(solve.Quantities(), ", "))
	}
	if q.Target.Value == nil {
		return nil, fieldErr("solve.target.value", "give the value the %s is to reach", qty.Title("the port"))
	}
	target := *q.Target.Value
	if err := qty.CheckTarget(target); err != nil {
		return nil, fieldErr("solve.target.value", "%s: %v", value.Format(target, qty.Unit(""), 4), err)
	}
	m := &solve.Model{Quantity: qty, Frequency: p.Req.Frequency, Reference: p.Circuit.Parts[p.Analyzer.Ref].Name}
	var ports []string
	for _, pt := range p.Analyzer.Ports {
		ports = append(ports, pt.Name)
	}
	switch {
	case qty.NeedsPort() && q.Target.Port == "":
		return nil, fieldErr("solve.target.port", "%s is a port's quantity: name the port (ports: %s)", qty, strings.Join(ports, ", "))
	case qty.NeedsPort():
		i := indexOf(ports, q.Target.Port)
		if i < 0 {
			return nil, fieldErr("solve.target.port", "%q is not a port of the request (ports: %s)", q.Target.Port, strings.Join(ports, ", "))
		}
		pt := p.Analyzer.Ports[i]
		m.Port = &solve.PortNodes{Name: pt.Name, A: p.Circuit.Nodes[pt.A], B: p.Circuit.Nodes[pt.B]}
	case q.Target.Port != "":
		return nil, fieldErr("solve.target.port", "%s takes no port", qty.Title(""))
	}
	gainUnit := ""
	if g := p.Analyzer.Gain; g != nil {
		m.Gain = &solve.GainNodes{Source: g.SourceName, A: p.Circuit.Nodes[g.OutA], B: p.Circuit.Nodes[g.OutB]}
		gainUnit = g.Unit(p.Circuit)
	} else if qty.NeedsGain() {
		return nil, fieldErr("solve.target.quantity", "the %s is the gain's, and the request has no \"gain\" (the sources are %s)", qty.Title(""), strings.Join(p.Circuit.Sources(), ", "))
	}

	part, err := p.solvePart(q.Part)
	if err != nil {
		return nil, err
	}
	m.Build = part.build()
	from, to, err := solveRange(q.Range, part)
	if err != nil {
		return nil, err
	}
	prob := &solve.Problem{Model: m, Target: target, From: from, To: to, Nominal: part.nominal,
		Part: q.Part, Unit: part.unit, GainUnit: gainUnit}
	plan := &solvePlan{prob: prob}
	if part.passive {
		name := q.Series
		if name == "" {
			name = DefaultSolveSeries
		}
		s, ok := eseries.ByName(name)
		if !ok {
			return nil, fieldErr("solve.series", "%q is not an IEC 60063 series here; use %s", q.Series, strings.Join(seriesNames(), ", "))
		}
		prob.Series = &s
		plan.series = true
	} else {
		if q.Series != "" {
			if _, ok := eseries.ByName(q.Series); !ok {
				return nil, fieldErr("solve.series", "%q is not an IEC 60063 series here; use %s", q.Series, strings.Join(seriesNames(), ", "))
			}
		}
		plan.note = fmt.Sprintf("Standard values are for resistors, capacitors and inductors; %s is none of them.", q.Part)
	}
	qu := qty.Unit(gainUnit)
	plan.echo = SolveResult{Part: q.Part, Unit: part.unit, Quantity: qty.String(), Port: q.Target.Port,
		Title: qty.Title(q.Target.Port), QuantityUnit: qu, Target: target, Range: SolvedRange{From: from, To: to}}
	if plan.series {
		plan.echo.Series = prob.Series.Name
	}
	return plan, nil
}

func indexOf(list []string, s string) int {
	for i, x := range list {
		if x == s {
			return i
		}
	}
	return -1
}

func seriesNames() []string {
	var names []string
	for _, s := range eseries.All() {
		names = append(names, s.Name)
	}
	return names
}

// solvable is a part a solve can vary.
type solvable struct {
	// build makes the function that builds the circuit for a value of
	// the part (made only for a solve: it costs a stage some checks).
	build   func() func(x float64) (*circuit.Circuit, error)
	unit    string
	nominal float64 // NaN when absent
	// min and max are the allowed values (a stage's limits), or the
	// default range around the nominal value (circuit text), with
	// limited set for a stage.
	min, max float64
	limited  bool
	// positive is set for values that must stay above 0.
	positive bool
	passive  bool
}

// solvePart finds the part called name: a stage's parameter, or a number
// of circuit text as the design aids know them (aids.CircuitParams).
func (p *Prepared) solvePart(name string) (*solvable, error) {
	if name == "" {
		return nil, fieldErr("solve.part", "name the part to solve for")
	}
	if p.Stage != nil {
		return p.solveStageParam(name)
	}
	params := aids.CircuitParams(p.Circuit)
	j := -1
	var names []string
	for i, par := range params {
		names = append(names, par.Name)
		if par.Name == name {
			j = i
		}
	}
	if j < 0 {
		return nil, fieldErr("solve.part", "%s", p.notSolvable(name, names))
	}
	par := params[j]
	m := &aids.Model{Circuit: p.Circuit, Params: params}
	x := par.Nominal
	s := &solvable{build: func() func(float64) (*circuit.Circuit, error) { return m.Vary(j) }, unit: par.Unit, nominal: x, min: x / 1000, max: x * 1000,
		passive: par.Class == aids.Passive}
	// A controlled source's gain may have either sign; every other number
	// (a resistance, an op amp's gbw, a transistor's gm) is above 0.
	s.positive = !(par.Kind >= circuit.VCVS && par.Kind <= circuit.CCCS)
	if x < 0 {
		s.min, s.max = x*1000, x/1000
	}
	return s, nil
}

// notSolvable says why name cannot be solved for in circuit text.
func (p *Prepared) notSolvable(name string, names []string) string {
	list := strings.Join(names, ", ")
	base, field, dotted := strings.Cut(name, ".")
	part, ok := p.Circuit.Part(base)
	if !ok {
		return fmt.Sprintf("no part called %s (what can be solved for: %s)", name, list)
	}
	var own []string
	for _, n := range names {
		if strings.HasPrefix(n, base+".") {
			own = append(own, n)
		}
	}
	switch {
	case part.Kind == circuit.VSource || part.Kind == circuit.ISource:
		return fmt.Sprintf("%s is an independent source: its value scales every response alike and sets no impedance, gain or margin, so it is not a number to solve for (what can be: %s)", base, list)
	case part.Kind == circuit.OpAmp && !dotted:
		return fmt.Sprintf("%s is an op amp: name one of its numbers, %s", base, strings.Join(own, ", "))
	case part.Kind == circuit.OpAmp:
		return fmt.Sprintf("%s has no %s here (its numbers are %s; one absent from its line, such as gbw or p2, can be solved for once the line gives it)", base, field, strings.Join(own, ", "))
	case part.Kind.Transistor():
		return fmt.Sprintf("name %s's transconductance, %s.gm", base, base)
	case part.Kind.Controlled() && part.Value == 0:
		return fmt.Sprintf("%s's value is 0, which a search by ratio cannot start from; give it a value", base)
	}
	return fmt.Sprintf("%s has no number called %s (what can be solved for: %s)", base, field, list)
}

// solveStageParam finds a catalog stage's parameter. A parameter that is
// one number of the generated circuit is written straight into a copy of
// it; any other, or an optional one left absent, regenerates the stage's
// text for each value.
func (p *Prepared) solveStageParam(name string) (*solvable, error) {
	t := p.Stage
	var tp *topology.Param
	var names []string
	for i := range t.Params {
		names = append(names, t.Params[i].Name)
		if t.Params[i].Name == name {
			tp = &t.Params[i]
		}
	}
	if tp == nil {
		return nil, fieldErr("solve.part", "stage %s has no parameter called %s (it has %s)", t.ID, name, strings.Join(names, ", "))
	}
	s := &solvable{unit: tp.Unit, nominal: math.NaN(), min: tp.Min, max: tp.Max, limited: true, positive: tp.Min > 0}
	if _, ok := map[string]bool{"Ω": true, "F": true, "H": true}[tp.Unit]; ok && tp.Group != "amplifier" {
		s.passive = true
	}
	x, present := p.Values[name]
	if present {
		s.nominal = x
	}
	s.build = func() func(float64) (*circuit.Circuit, error) {
		if present {
			params, rebuild := aids.StageParams(t, p.Values, p.Circuit)
			m := &aids.Model{Circuit: p.Circuit, Params: params, Rebuild: rebuild}
			if j := m.Param(name); j >= 0 {
				return m.Vary(j)
			}
		}
		values := topology.Values{}
		for k, v := range p.Values {
			values[k] = v
		}
		kelvin := p.Circuit.Temperature
		return func(x float64) (*circuit.Circuit, error) {
			values[name] = x
			return circuit.ParseWith(t.Circuit(values), circuit.Options{Temperature: kelvin})
		}
	}
	return s, nil
}

// solveRange applies the defaults to a request's range and checks it.
func solveRange(r *SolveRange, s *solvable) (from, to float64, err error) {
	from, to = s.min, s.max
	if r != nil && r.From != nil {
		from = *r.From
	}
	if r != nil && r.To != nil {
		to = *r.To
	}
	u := s.unit
	switch {
	case math.IsNaN(from) || math.IsInf(from, 0):
		return 0, 0, fieldErr("solve.range.from", "must be a finite number")
	case math.IsNaN(to) || math.IsInf(to, 0):
		return 0, 0, fieldErr("solve.range.to", "must be a finite number")
	case !(from < to):
		return 0, 0, fieldErr("solve.range", "an empty range: from (%s) must be below to (%s)", value.Format(from, u, 4), value.Format(to, u, 4))
	case from == 0 || to == 0 || (from > 0) != (to > 0):
		return 0, 0, fieldErr("solve.range", "the range must not reach 0 or change sign: the search runs on a log scale, and the part keeps its sign")
	case s.positive && from < 0:
		return 0, 0, fieldErr("solve.range.from", "this value is above 0")
	}
	if s.limited {
		if from < s.min {
			return 0, 0, fieldErr("solve.range.from", "%s is below the least allowed value, %s", value.Format(from, u, 4), value.Format(s.min, u, 4))
		}
		if to > s.max {
			return 0, 0, fieldErr("solve.range.to", "%s is above the largest allowed value, %s", value.Format(to, u, 4), value.Format(s.max, u, 4))
		}
	}
	return from, to, nil
}

// result turns an answer into the contract's form.
func (sp *solvePlan) result(a *solve.Answer) *SolveResult {
	r := sp.echo
	pt := func(p solve.Point) SolvePoint { return SolvePoint{Value: p.X, Achieved: F(p.Q)} }
	if a.Nominal != nil {
		n := pt(*a.Nominal)
		r.Nominal = &n
	}
	r.Solutions = []SolvePoint{}
	for _, s := range a.Solutions {
		r.Solutions = append(r.Solutions, pt(s))
	}
	if sp.series {
		r.Standard = []StandardPair{}
		for _, n := range a.Standard {
			r.Standard = append(r.Standard, StandardPair{Below: pt(n.Below), Above: pt(n.Above)})
		}
	}
	r.Curve = SolveCurve{Values: []float64{}, Quantities: []*float64{}}
	for _, c := range a.Curve {
		r.Curve.Values = append(r.Curve.Values, c.X)
		r.Curve.Quantities = append(r.Curve.Quantities, F(c.Q))
	}
	if a.Best != nil {
		b := pt(*a.Best)
		r.Best = &b
	}
	r.Evaluations = a.Counts.Circuits
	r.Notes = append([]string{}, a.Notes...)
	if sp.note != "" {
		r.Notes = append(r.Notes, sp.note)
	}
	return &r
}

// SolveRun is a solve run in slices, for a page that stays responsive:
// call Step until it reports finished (or stop calling it and call Stop),
// then Result.
type SolveRun struct {
	plan *solvePlan
	run  *solve.Run
}

// StartSolve prepares req and its "solve" key and returns the run, nothing
// evaluated yet. Errors are as for Analyze.
func StartSolve(req Request) (*SolveRun, error) {
	q := Solve.Asked(req)
	if q == nil {
		return nil, fieldErr("solve", "the request has no \"solve\" object")
	}
	p, err := Prepare(req.Base())
	if err != nil {
		return nil, err
	}
	sp, err := p.solveProblem(q)
	if err != nil {
		return nil, err
	}
	return &SolveRun{plan: sp, run: sp.prob.Start()}, nil
}

// Step evaluates the circuit up to n more times; it returns the
// evaluations so far, an estimate of the total, and whether the run has
// finished.
func (r *SolveRun) Step(n int) (done, total int, finished bool) { return r.run.Step(n) }

// Stop ends the run early.
func (r *SolveRun) Stop() { r.run.Stop() }

// Counts tallies the run's work so far: circuits analyzed, return ratios
// and closed-loop responses computed.
func (r *SolveRun) Counts() solve.Counts { return r.run.Answer().Counts }

// Result is the answer once the run has finished (before, what has been
// found so far: the curve is incomplete).
func (r *SolveRun) Result() *SolveResult { return r.plan.result(r.run.Answer()) }

// ResultJSON is Result as JSON.
func (r *SolveRun) ResultJSON() []byte {
	b, err := json.Marshal(r.Result())
	if err != nil {
		b, _ = json.Marshal(ErrorResponse{Error: ErrorBody{Message: "internal error: " + err.Error()}})
	}
	return b
}

// SolvablePart is a number a solve can vary, as a page lists it: its
// name, its unit, its value as given (NaN when a stage's optional part is
// absent), the default range of a search, and whether it takes standard
// values.
type SolvablePart struct {
	Name     string
	Unit     string
	Nominal  float64
	From, To float64
	Standard bool
}

// SolvableParts lists what a solve of req can vary, in the order of the
// stage's parameters or of the circuit text.
func SolvableParts(req Request) ([]SolvablePart, error) {
	p, err := Prepare(req.Base())
	if err != nil {
		return nil, err
	}
	var names []string
	if p.Stage != nil {
		for _, tp := range p.Stage.Params {
			names = append(names, tp.Name)
		}
	} else {
		for _, par := range aids.CircuitParams(p.Circuit) {
			names = append(names, par.Name)
		}
	}
	var out []SolvablePart
	for _, n := range names {
		s, err := p.solvePart(n)
		if err != nil {
			return nil, err
		}
		out = append(out, SolvablePart{Name: n, Unit: s.unit, Nominal: s.nominal, From: s.min, To: s.max, Standard: s.passive})
	}
	return out, nil
}

// CheckSolve checks req's "solve" key against its circuit without
// solving: the part, the target, the port, the range and the series, each
// error naming its field.
func CheckSolve(req Request) error {
	q := Solve.Asked(req)
	if q == nil {
		return fieldErr("solve", "the request has no \"solve\" object")
	}
	p, err := Prepare(req.Base())
	if err != nil {
		return err
	}
	_, err = p.solveProblem(q)
	return err
}
