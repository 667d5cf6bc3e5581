package solve

import (
	"errors"
	"fmt"
	"iter"
	"math"

	"zport/engine/eseries"
	"zport/engine/value"
)

// Problem is one solve: a model whose quantity is to reach Target, and the
// range of the part's value to search.
type Problem struct {
	Model  *Model
	Target float64
	// From and To are the range of the part's value, of one sign, From <
	// To.
	From, To float64
	// Nominal is the part's value in the circuit as given, whose quantity
	// the answer reports beside the solutions; NaN when the part is
	// absent there.
	Nominal float64
	// Series, when set, gives each solution its standard values on either
	// side (positive solutions only).
	Series *eseries.Series
	// Points is the grid's size; 0 means GridPoints.
	Points int
	// Part and Unit name the part and its unit for the notes; GainUnit is
	// the gain's unit ("V/V", "V/A"), for |g|.
	Part, Unit, GainUnit string
}

// Answer is a solve's outcome.
type Answer struct {
	// Nominal is the part's value as given and the quantity it gives
	// (nil when the part is absent from the circuit as given).
	Nominal   *Point
	Solutions []Point
	// Standard holds, for each solution, the series values on either side
	// of it and the quantity each gives; nil without a series.
	Standard []Neighbours
	Curve    []Point
	// Best is the closest approach when there is no solution.
	Best  *Point
	Notes []string
	// Counts tallies the work; Circuits is the number of evaluations.
	Counts Counts
	// Done is false while a run is still going (the answer is then
	// incomplete).
	Done bool
}

// Neighbours are the standard values below and above a solution. When
// the solution is itself a series value, both are it.
type Neighbours struct{ Below, Above Point }

// errStopped ends a run whose caller stopped stepping it.
var errStopped = errors.New("solve: run stopped")

// solver carries out a Problem; tick, when set, is called after every
// evaluation of the circuit (the point where a run in slices pauses).
type solver struct {
	p     *Problem
	ans   *Answer
	tick  func()
	fails int
	first error
}

// at is the quantity at x, NaN where it is undefined or the circuit cannot
// be analyzed (counted, the first reason kept for the notes).
func (s *solver) at(x float64) float64 {
	q, err := s.p.Model.At(x)
	s.ans.Counts = s.p.Model.Counts
	if err != nil {
		s.fails++
		if s.first == nil {
			s.first = err
		}
		q = math.NaN()
	}
	if math.IsInf(q, 0) {
		q = math.NaN()
	}
	if s.tick != nil {
		s.tick()
	}
	return q
}

// Solve carries out the problem to the end.
func (p *Problem) Solve() *Answer {
	p.check()
	s := &solver{p: p, ans: &Answer{}}
	s.run()
	return s.ans
}

func (p *Problem) check() {
	if p.Model == nil || p.Model.Build == nil {
		panic("solve: a Problem needs a Model with Build")
	}
	if !(p.From < p.To) || p.From == 0 || p.To == 0 || (p.From > 0) != (p.To > 0) || math.IsInf(p.From, 0) || math.IsInf(p.To, 0) {
		panic(fmt.Sprintf("solve: range %g … %g is not of one sign with From < To", p.From, p.To))
	}
}

func (s *solver) run() {
	p, a := s.p, s.ans
	if x := p.Nominal; !math.IsNaN(x) && x != 0 {
		a.Nominal = &Point{x, s.at(x)}
	}
	f := Find(s.at, p.From, p.To, p.Target, p.Model.Quantity.Angular(), p.Points)
	a.Solutions, a.Curve, a.Best = f.Solutions, f.Curve, f.Best
	if p.Series != nil {
		for _, sol := range f.Solutions {
			if !(sol.X > 0) {
				continue
			}
			lo, hi := p.Series.Bracket(sol.X)
			n := Neighbours{Below: Point{lo, s.at(lo)}}
			n.Above = n.Below
			if hi != lo {
				n.Above = Point{hi, s.at(hi)}
			}
			a.Standard = append(a.Standard, n)
		}
	}
	a.Notes = s.notes(f)
	a.Counts = p.Model.Counts
	a.Done = true
}

// notes explains what the solutions alone do not say.
func (s *solver) notes(f Found) []string {
	p := s.p
	q := p.Model.Quantity
	port := ""
	if p.Model.Port != nil {
		port = p.Model.Port.Name
	}
	title := q.Title(port)
	qu := q.Unit(p.GainUnit)
	qv := func(x float64) string { return formatQ(x, qu) }
	pv := func(x float64) string { return value.Format(x, p.Unit, 4) }
	var notes []string
	add := func(format string, args ...any) { notes = append(notes, fmt.Sprintf(format, args...)) }
	span := fmt.Sprintf("from %s to %s", pv(p.From), pv(p.To))
	switch n := len(f.Solutions); {
	case n == 0:
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, c := range f.Curve {
			if !math.IsNaN(c.Q) {
				lo, hi = math.Min(lo, c.Q), math.Max(hi, c.Q)
			}
		}
		if f.Best == nil {
			add("No value of %s %s gives a %s of %s: the %s is undefined over the whole range.", p.Part, span, title, qv(p.Target), title)
			break
		}
		add("No value of %s %s gives a %s of %s: it stays between %s and %s there. The closest is %s, at %s = %s.",
			p.Part, span, title, qv(p.Target), qv(lo), qv(hi), qv(f.Best.Q), p.Part, pv(f.Best.X))
	case n > 1:
		add("%d values of %s give a %s of %s: the %s is not monotonic in %s (the curve shows where it turns).", n, p.Part, title, qv(p.Target), title, p.Part)
	}
	for _, j := range f.Jumps {
		why := "the quantity is discontinuous there"
		switch q {
		case PhaseMargin, Crossover:
			why = "the crossover that governs the margin changes there"
		case GainMargin:
			why = "the −180° crossing that governs the gain margin changes there"
		case ZPhase:
			why = "∠Z passes ±180° there"
		}
		add("The %s jumps past %s at %s ≈ %s without taking that value (%s).", title, qv(p.Target), p.Part, pv(j.X), why)
	}
	for _, u := range f.Undefined {
		where := p.Part + " = " + pv(u[0])
		if u[1] != u[0] {
			where = fmt.Sprintf("%s from %s to %s", p.Part, pv(u[0]), pv(u[1]))
		}
		add("The %s is undefined for %s (%s).", title, where, undefinedWhy(q))
	}
	for _, l := range f.Lost {
		add("Between %s = %s and %s the %s passes %s, but becomes undefined on the way; no solution was located there.", p.Part, pv(l[0]), pv(l[1]), title, qv(p.Target))
	}
	if s.fails > 0 {
		add("At %d of the %d values of %s tried, the circuit could not be analyzed (%v).", s.fails, p.Model.Counts.Circuits, p.Part, s.first)
	}
	return notes
}

func undefinedWhy(q Quantity) string {
	switch q {
	case PhaseMargin, Crossover:
		return "|T| does not cross 1 between 1 mHz and 1 THz"
	case GainMargin:
		return "∠T does not reach −180° between 1 mHz and 1 THz"
	case Peaking, Bandwidth, Overshoot:
		return "the closed loop is not stable there, or its response has no such figure"
	}
	return "not finite"
}

// formatQ writes a quantity with four significant digits: degrees, dB and
// percent without a prefix.
func formatQ(x float64, unit string) string {
	switch unit {
	case "°", "dB", "%":
		s := fmt.Sprintf("%.4g", x)
		if unit == "°" || unit == "%" {
			return minus(s) + unit
		}
		return minus(s) + " " + unit
	}
	return value.Format(x, unit, 4)
}

// minus writes a leading ASCII minus as U+2212, as value.Format does.
func minus(s string) string {
	if len(s) > 0 && s[0] == '-' {
		return "−" + s[1:]
	}
	return s
}

// Run is a Problem carried out in slices, for a page that must stay
// responsive: Step evaluates the circuit up to n more times; Answer
// reports what has been found (Done once finished). Stop ends a run
// early; a finished run needs no Stop.
type Run struct {
	s        *solver
	next     func() (struct{}, bool)
	stop     func()
	finished bool
}

// Start prepares p to run in slices; nothing is evaluated until Step.
func (p *Problem) Start() *Run {
	p.check()
	s := &solver{p: p, ans: &Answer{}}
	r := &Run{s: s}
	seq := func(yield func(struct{}) bool) {
		defer func() {
			if e := recover(); e != nil && e != errStopped {
				panic(e)
			}
		}()
		s.tick = func() {
			if !yield(struct{}{}) {
				panic(errStopped)
			}
		}
		s.run()
	}
	r.next, r.stop = iter.Pull(seq)
	return r
}

// Step evaluates the circuit up to n more times and returns how many
// evaluations have run, an estimate of the total, and whether the run has
// finished (then done == total).
func (r *Run) Step(n int) (done, total int, finished bool) {
	for range n {
		if r.finished {
			break
		}
		if _, ok := r.next(); !ok {
			r.finished = true
		}
	}
	done = r.s.p.Model.Counts.Circuits
	if r.finished {
		return done, done, true
	}
	points := r.s.p.Points
	if points == 0 {
		points = GridPoints(r.s.p.From, r.s.p.To)
	}
	// The grid and the nominal value, then some ten evaluations per
	// solution to refine it and give its standard values.
	return done, max(points+12, done+6), false
}

// Answer is what the run has found so far; Done is set once it has
// finished.
func (r *Run) Answer() *Answer { return r.s.ans }

// Stop ends the run; further Steps do nothing.
func (r *Run) Stop() {
	r.finished = true
	r.stop()
}
