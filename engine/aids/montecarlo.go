package aids

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"

	"zport/engine/feedback"
)

// DefaultTrials is the number of Monte Carlo trials when Options.Trials is 0.
const DefaultTrials = 2000

// DefaultBins is the number of histogram bins when a Result is asked with 0.
const DefaultBins = 30

// ShortGap is how far the Monte Carlo extreme of a quantity must stop short
// of the corner extreme to earn a note: by this ratio for a magnitude (|Z|,
// |g|), else by this fraction of the corner value or of the nominal value,
// whichever is larger. The CornerRange flags report any shortfall.
const ShortGap = 0.02

// Percentiles are the percentiles every quantity reports, in percent.
var Percentiles = [...]float64{0.1, 1, 50, 99, 99.9}

// Options configure a MonteCarlo.
type Options struct {
	Distribution Distribution
	// Seed fixes the draws: trial i draws from a PCG generator seeded
	// (Seed, i), so a trial's values do not depend on the trials before it
	// or on how the run was sliced into steps.
	Seed uint64
	// Trials is the number of trials; 0 means DefaultTrials.
	Trials int
	// Corners runs the worst-case corners too (see the package doc).
	Corners bool
}

// MonteCarlo is a tolerance study run in slices: Step runs the next units
// of work (the corners first, then the trials) and Result summarizes what
// has run so far, so a page can show progress and stop at any time. It is
// not safe for concurrent use.
type MonteCarlo struct {
	m       *Model
	ev      *evaluator
	spreads []Spread
	opt     Options

	qs       []Quantity
	nomX     []float64
	nominal  Sample
	nomVals  []float64
	margins  feedback.MarginResult
	x        []float64
	s        Sample
	src      *rand.PCG
	samples  [][]float64 // [quantity][trial]
	done     int
	failed   int
	firstErr error

	corners *corners
}

// NewMonteCarlo prepares a tolerance study of m with the given spreads.
// It analyzes the nominal circuit (and, with Options.Corners and more than
// MaxFullCorners spreads, each spread's limits one at a time to choose the
// corners); an error there is returned, as is a *feedback.Stopped error
// once m's Context is done.
func NewMonteCarlo(m *Model, spreads []Spread, opt Options) (*MonteCarlo, error) {
	if opt.Trials == 0 {
		opt.Trials = DefaultTrials
	}
	if opt.Trials < 0 {
		panic("aids: negative Options.Trials")
	}
	for _, s := range spreads {
		if s.Param < 0 || s.Param >= len(m.Params) {
			panic(fmt.Sprintf("aids: spread of parameter %d; the model has %d", s.Param, len(m.Params)))
		}
	}
	ev, nom, margins, err := nominal(m)
	if err != nil {
		return nil, err
	}
	mc := &MonteCarlo{m: m, ev: ev, spreads: spreads, opt: opt, nomX: m.Nominal(), nominal: nom, margins: margins,
		src: rand.NewPCG(opt.Seed, 0), s: newSample(len(m.Ports))}
	mc.qs = quantities(m, ev.loop != nil)
	mc.x = make([]float64, len(m.Params))
	mc.nomVals = make([]float64, len(mc.qs))
	mc.samples = make([][]float64, len(mc.qs))
	for q := range mc.qs {
		mc.nomVals[q] = mc.qs[q].Of(&mc.nominal)
		mc.samples[q] = make([]float64, opt.Trials)
	}
	if opt.Corners && len(spreads) > 0 {
		if mc.corners, err = newCorners(mc); err != nil {
			return nil, err
		}
	}
	return mc, nil
}

// nominal builds the evaluator of m, with its loop tracker, and analyzes
// the nominal circuit.
func nominal(m *Model) (*evaluator, Sample, feedback.MarginResult, error) {
	ev := newEvaluator(m)
	x := m.Nominal()
	a, err := ev.analyzer(x)
	if err != nil {
		return nil, Sample{}, feedback.MarginResult{}, fmt.Errorf("the nominal circuit: %w", err)
	}
	grid := m.Grid
	if len(grid) == 0 {
		grid = DefaultGrid()
	}
	var margins feedback.MarginResult
	if ev.loop, margins, err = newLoop(m, a, grid); err != nil {
		return nil, Sample{}, feedback.MarginResult{}, fmt.Errorf("the nominal circuit's loop: %w", err)
	}
	s := newSample(len(m.Ports))
	if err := ev.eval(x, &s); err != nil {
		return nil, Sample{}, feedback.MarginResult{}, fmt.Errorf("the nominal circuit: %w", err)
	}
	return ev, s, margins, nil
}

// Quantities lists what each trial measures, in Result order.
func (mc *MonteCarlo) Quantities() []Quantity { return mc.qs }

// Total is the number of units of work: corners plus trials.
func (mc *MonteCarlo) Total() int { return mc.corners.total() + mc.opt.Trials }

// Done is the number of units of work run so far.
func (mc *MonteCarlo) Done() int { return mc.corners.doneCount() + mc.done }

// Step runs up to n more units of work — the remaining corners first, then
// trials — and returns Done. A trial whose circuit cannot be analyzed (a
// value set that makes it singular) counts as run, with its quantities
// undefined.
func (mc *MonteCarlo) Step(n int) int {
	for ; n > 0 && mc.corners.doneCount() < mc.corners.total(); n-- {
		mc.corners.step()
	}
	for ; n > 0 && mc.done < mc.opt.Trials; n-- {
		mc.trial(mc.done)
		mc.done++
	}
	return mc.Done()
}

func (mc *MonteCarlo) trial(i int) {
	mc.src.Seed(mc.opt.Seed, uint64(i))
	copy(mc.x, mc.nomX)
	for _, s := range mc.spreads {
		mc.x[s.Param] = s.draw(mc.opt.Distribution, mc.src)
	}
	if err := mc.ev.eval(mc.x, &mc.s); err != nil {
		mc.failed++
		if mc.firstErr == nil {
			mc.firstErr = fmt.Errorf("trial %d: %w", i, err)
		}
	}
	for q := range mc.qs {
		mc.samples[q][i] = mc.qs[q].Of(&mc.s)
	}
}

// Draws returns the parameter values trial i uses (indexed as Params),
// without analyzing them: for showing or checking a trial.
func (mc *MonteCarlo) Draws(i int) []float64 {
	src := rand.NewPCG(mc.opt.Seed, uint64(i))
	x := slices.Clone(mc.nomX)
	for _, s := range mc.spreads {
		x[s.Param] = s.draw(mc.opt.Distribution, src)
	}
	return x
}

// Samples returns the values of quantity q over the trials run so far, in
// trial order, NaN where undefined. The slice is the runner's own.
func (mc *MonteCarlo) Samples(q int) []float64 { return mc.samples[q][:mc.done] }

// Target is a miss condition: a trial misses when its value of the
// quantity is below (Below) or above Value. A trial where the quantity is
// undefined is counted apart.
type Target struct {
	ID    string // a Quantity ID
	Below bool
	Value float64
}

// TargetResult counts the trials that miss a target.
type TargetResult struct {
	Target
	Misses, Undefined int
	// Fraction is Misses over the trials run.
	Fraction float64
}

// Histogram holds counts of a quantity in bins: bin i spans
// [Edges[i], Edges[i+1]) (the last bin includes its upper edge). Log bins
// are equal in ratio, for a quantity spread over more than a decade.
type Histogram struct {
	Log    bool
	Edges  []float64
	Counts []int
}

// QuantityResult summarizes one quantity over the trials, beside its
// corners.
type QuantityResult struct {
	Quantity
	Nominal float64
	// N counts the trials where the quantity is defined; Undefined the rest.
	N, Undefined int
	// Mean, StdDev (the sample standard deviation), Min and Max are over
	// the N defined values; Percentiles matches the package's Percentiles.
	Mean, StdDev, Min, Max float64
	Percentiles            [len(Percentiles)]float64
	Hist                   Histogram
	// Corners is set when corners were run.
	Corners *CornerRange
}

// CornerRange is a quantity's range over the corners run.
type CornerRange struct {
	Min, Max float64
	// MinAt and MaxAt are the corners where Min and Max occur: for each
	// spread, in order, +1 for its high limit (Hi) and −1 for its low (Lo).
	MinAt, MaxAt []int8
	Undefined    int
	// MissesMin and MissesMax are true when the Monte Carlo range stays
	// inside the corner range at that end (its min above the corner min,
	// its max below the corner max); BeyondMin and BeyondMax when it
	// reaches past it.
	MissesMin, MissesMax, BeyondMin, BeyondMax bool
}

// Result summarizes a MonteCarlo.
type Result struct {
	Distribution Distribution
	Seed         uint64
	Trials, Done int
	// Failed counts trials whose circuit could not be analyzed.
	Failed int
	// CornerMethod is "all" (every combination of limits), "sensitivity"
	// (two corners per quantity, by the sign of each spread's effect), or
	// "" when corners were not run; Corners and CornersDone count them.
	CornerMethod         string
	Corners, CornersDone int
	Quantities           []QuantityResult
	Targets              []TargetResult
	// FastPM and SlowPM count evaluations whose phase margin came from the
	// secant search and from a sweep (see the package doc).
	FastPM, SlowPM int
	// NominalMargins are the nominal loop's margins over the model's grid.
	NominalMargins feedback.MarginResult
	Notes          []string
}

// ErrUnknownQuantity is returned by Result for a Target whose ID is not
// one of Quantities.
var ErrUnknownQuantity = errors.New("aids: unknown quantity")

// Result summarizes the work run so far with bins histogram bins (0 means
// DefaultBins) and counts the misses of targets.
func (mc *MonteCarlo) Result(bins int, targets []Target) (*Result, error) {
	if bins <= 0 {
		bins = DefaultBins
	}
	r := &Result{Distribution: mc.opt.Distribution, Seed: mc.opt.Seed, Trials: mc.opt.Trials, Done: mc.done,
		Failed: mc.failed, NominalMargins: mc.margins}
	if l := mc.ev.loop; l != nil {
		r.FastPM, r.SlowPM = l.Fast, l.Slow
	}
	if c := mc.corners; c != nil {
		r.CornerMethod, r.Corners, r.CornersDone = c.method, c.total(), c.done
	}
	sorted := make([]float64, 0, mc.done)
	var short, beyond []string
	for q, qu := range mc.qs {
		sorted = sorted[:0]
		for _, v := range mc.samples[q][:mc.done] {
			if !math.IsNaN(v) {
				sorted = append(sorted, v)
			}
		}
		slices.Sort(sorted)
		qr := summarize(qu, mc.nomVals[q], sorted, bins)
		qr.Undefined = mc.done - qr.N
		if c := mc.corners; c != nil {
			cr := c.rangeOf(q)
			if qr.N > 0 && c.done == c.total() && !math.IsNaN(cr.Min) {
				cr.MissesMin, cr.BeyondMin = qr.Min > cr.Min, qr.Min < cr.Min
				cr.MissesMax, cr.BeyondMax = qr.Max < cr.Max, qr.Max > cr.Max
				if mc.done == mc.opt.Trials && cr.Max > cr.Min {
					scale := math.Max(math.Max(math.Abs(cr.Min), math.Abs(cr.Max)), math.Abs(qr.Nominal))
					var ends []string
					for _, e := range []struct {
						name          string
						corner, mc    float64
						short, beyond bool
					}{{"min", cr.Min, qr.Min, cr.MissesMin, cr.BeyondMin}, {"max", cr.Max, qr.Max, cr.MissesMax, cr.BeyondMax}} {
						gap := math.Abs(e.mc - e.corner)
						far := gap > ShortGap*math.Max(math.Abs(e.corner), math.Abs(qr.Nominal))
						if (qu.Kind == ZMag || qu.Kind == GainMag) && e.corner > 0 && e.mc > 0 {
							far = math.Abs(math.Log(e.mc/e.corner)) > math.Log1p(ShortGap) // a magnitude: by ratio
						}
						if e.short && far {
							ends = append(ends, fmt.Sprintf("%s %.4g %s against %.4g %s", e.name, e.mc, qu.Unit, e.corner, qu.Unit))
						}
						if e.beyond && gap > 1e-9*scale && !slices.Contains(beyond, qu.Title) {
							beyond = append(beyond, qu.Title)
						}
					}
					if len(ends) > 0 {
						short = append(short, qu.Title+" ("+strings.Join(ends, ", ")+")")
					}
				}
			}
			qr.Corners = &cr
		}
		r.Quantities = append(r.Quantities, qr)
	}
	for _, t := range targets {
		q := slices.IndexFunc(mc.qs, func(q Quantity) bool { return q.ID == t.ID })
		if q < 0 {
			return nil, fmt.Errorf("%w %q", ErrUnknownQuantity, t.ID)
		}
		tr := TargetResult{Target: t}
		for _, v := range mc.samples[q][:mc.done] {
			switch {
			case math.IsNaN(v):
				tr.Undefined++
			case t.Below && v < t.Value, !t.Below && v > t.Value:
				tr.Misses++
			}
		}
		if mc.done > 0 {
			tr.Fraction = float64(tr.Misses) / float64(mc.done)
		}
		r.Targets = append(r.Targets, tr)
	}
	if len(short) > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("Monte Carlo stops short of the corner extremes of %s: random trials seldom put every part at a limit at once, so there the corners show the worst case.",
			strings.Join(short, "; ")))
	}
	if len(beyond) > 0 {
		why := "the quantity is not monotonic in the parts over their range, so its extreme lies inside the tolerance box, not at a corner"
		if mc.opt.Distribution == Normal {
			why = "normal draws fall beyond the limits in 0.27 % of cases per part, or " + why
		}
		r.Notes = append(r.Notes, fmt.Sprintf("Monte Carlo reaches beyond the corners for %s: %s.", strings.Join(beyond, "; "), why))
	}
	if r.SlowPM > 0 && r.FastPM > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("The phase margin of %d of %d evaluations came from a sweep: the search from the nominal crossovers did not settle there.", r.SlowPM, r.SlowPM+r.FastPM))
	}
	if l := mc.ev.loop; l != nil && len(l.cross) > 1 {
		r.Notes = append(r.Notes, fmt.Sprintf("The nominal loop crosses unity %d times; each trial's phase margin is the smallest over its crossings.", len(l.cross)))
	}
	if mc.ev.loop == nil {
		r.Notes = append(r.Notes, "The nominal loop does not cross unity on the search grid, so no phase margin is reported.")
	}
	if mc.failed > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%d trials could not be analyzed and count as undefined (first: %v).", mc.failed, mc.firstErr))
	}
	if c := mc.corners; c != nil && c.failed > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%d corners could not be analyzed (first: %v).", c.failed, c.firstErr))
	}
	return r, nil
}

// summarize computes the statistics of sorted (ascending, no NaN) with
// gonum's stat package.
func summarize(q Quantity, nominal float64, sorted []float64, bins int) QuantityResult {
	qr := QuantityResult{Quantity: q, Nominal: nominal, N: len(sorted)}
	nan := math.NaN()
	qr.Mean, qr.StdDev, qr.Min, qr.Max = nan, nan, nan, nan
	for i := range qr.Percentiles {
		qr.Percentiles[i] = nan
	}
	if len(sorted) == 0 {
		return qr
	}
	qr.Mean = stat.Mean(sorted, nil)
	if len(sorted) > 1 {
		qr.StdDev = stat.StdDev(sorted, nil)
	}
	qr.Min, qr.Max = sorted[0], sorted[len(sorted)-1]
	for i, p := range Percentiles {
		qr.Percentiles[i] = stat.Quantile(p/100, stat.Empirical, sorted, nil)
	}
	qr.Hist = histogram(sorted, bins, q.Kind == ZMag || q.Kind == GainMag)
	return qr
}

// histogram bins sorted (ascending, no NaN) into bins equal bins between
// its extremes, equal in ratio when logOK and the values span more than a
// decade.
func histogram(sorted []float64, bins int, logOK bool) Histogram {
	lo, hi := sorted[0], sorted[len(sorted)-1]
	h := Histogram{}
	if lo == hi {
		h.Edges = []float64{lo, math.Nextafter(hi, math.Inf(1))}
		h.Counts = []int{len(sorted)}
		return h
	}
	h.Edges = make([]float64, bins+1)
	if logOK && lo > 0 && hi/lo > 10 {
		h.Log = true
		floats.LogSpan(h.Edges, lo, hi)
	} else {
		floats.Span(h.Edges, lo, hi)
	}
	h.Edges[0] = lo
	// gonum's bins are half-open; nudge the top edge so the maximum counts.
	h.Edges[bins] = math.Nextafter(hi, math.Inf(1))
	counts := stat.Histogram(nil, h.Edges, sorted, nil)
	h.Counts = make([]int, bins)
	for i, c := range counts {
		h.Counts[i] = int(c)
	}
	return h
}
