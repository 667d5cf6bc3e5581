package response

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"strconv"

	"zport/engine/mna"
	"zport/engine/numeric"
	"zport/engine/value"
)

// Limits of a step response's time axis.
const (
	MinPoints = 10
	MaxPoints = 20000
	// MaxUnknowns bounds the circuits analyzed: the eigenvalue problem
	// costs about 10·n³, which for larger circuits would hold a page for
	// seconds on every edit.
	MaxUnknowns = 150
)

// Options chooses the step response's time axis; a zero value is chosen
// automatically: To from the slowest natural frequency that shows in the
// step, Points so that the fastest ringing that shows gets 25 samples a
// period (at least 500).
type Options struct {
	To     float64 // seconds
	Points int
}

// Stability classifies a circuit by its natural frequencies.
type Stability int

const (
	// Stable: every natural frequency in the open left half plane.
	Stable Stability = iota
	// Marginal: one on the imaginary axis (within 1e-9 of its
	// magnitude) or at s = 0, none to the right.
	Marginal
	// Unstable: one in the right half plane.
	Unstable
)

func (s Stability) String() string {
	return [...]string{"stable", "marginal", "unstable"}[s]
}

// Pole is one natural frequency of the circuit, s = P, in rad/s.
type Pole struct {
	P complex128
	// Residue is the residue of the gain at P: how much P shows in the
	// gain (zero where the gain cannot see it).
	Residue complex128
	// Weight is the dominance index |residue|/|Re P| relative to the
	// largest: the height of the pole's own resonance in |g(jω)|.
	Weight float64
	// Dominant marks the poles that govern the response: weight ≥ 0.2.
	Dominant bool
}

// Frequency is the natural frequency |P|/2π in Hz.
func (p Pole) Frequency() float64 { return cmplx.Abs(p.P) / (2 * math.Pi) }

// Zeta is the damping ratio −Re P/|P| of a complex pair; NaN for a real
// pole.
func (p Pole) Zeta() float64 {
	if imag(p.P) == 0 {
		return math.NaN()
	}
	return -real(p.P) / cmplx.Abs(p.P)
}

// Q is the quality factor |P|/(−2·Re P) = 1/(2ζ) of a complex pair; NaN
// for a real pole.
func (p Pole) Q() float64 {
	if imag(p.P) == 0 {
		return math.NaN()
	}
	return cmplx.Abs(p.P) / (-2 * real(p.P))
}

// Result is a gain's closed-loop response. Times are in seconds,
// frequencies in hertz; NaN marks a figure that does not exist here (the
// notes say why).
type Result struct {
	// Time and Step sample the response to a unit step of the source,
	// from just after the step (Step[0] is y(0+)).
	Time, Step []float64
	To         float64
	Points     int
	// Final is the value the step settles to, the gain at s = 0.
	Final float64
	// Overshoot is the largest excursion beyond Final in percent of it
	// (0 when there is none); Peak and PeakTime where it happens.
	Overshoot, Peak, PeakTime float64
	// Rise10 and Rise90 are the first times the response reaches 10 % and
	// 90 % of Final; RiseTime their difference.
	Rise10, Rise90, RiseTime float64
	// Settling1 and Settling01: from then on the response stays within
	// ±1 % and ±0.1 % of Final.
	Settling1, Settling01 float64

	// Kind of the frequency response: "low-pass" (measured against the
	// gain at DC), "band-pass" (against its largest gain), "high-pass"
	// (against the gain at high frequency), "flat" (no finite corner).
	Kind string
	// Reference is |g| the frequency figures are measured against, at
	// ReferenceFrequency (0 for DC, +Inf for high frequency).
	Reference, ReferenceFrequency float64
	// PeakingDB is how far |g| peaks above Reference, at
	// PeakingFrequency; NaN for none.
	PeakingDB, PeakingFrequency float64
	// Bandwidth is the −3 dB frequency above the reference; LowerCorner
	// the one below it (band-pass and high-pass gains).
	Bandwidth, LowerCorner float64

	// Poles are the circuit's natural frequencies, sorted by magnitude,
	// conjugate pairs adjacent (upper first).
	Poles     []Pole
	Stability Stability
	// Agreement compares the realisation's gain with the direct nodal
	// solution of the pencil (relative, the worst of a few frequencies).
	Agreement float64
	Notes     []string
}

// Analyze computes the response of the gain from the independent source
// part to the node pair (outA, outB) of the system sys, all gains on.
func Analyze(sys *mna.System, source, outA, outB int, opt Options) (*Result, error) {
	// sys.N counts every unknown but the op-amp states: refuse before
	// the pencil's N² entries are even allocated.
	if sys.N > MaxUnknowns {
		return nil, fmt.Errorf("the circuit has %d unknowns; the closed-loop response is computed for up to %d, so the page stays responsive", sys.N, MaxUnknowns)
	}
	P := sys.Pencil()
	if P.N > MaxUnknowns {
		return nil, fmt.Errorf("the circuit has %d unknowns with its amplifiers' poles; the closed-loop response is computed for up to %d, so the page stays responsive", P.N, MaxUnknowns)
	}
	b := make([]float64, P.N)
	c := make([]float64, P.N)
	for _, t := range sys.Excitation(source) {
		b[t.I] += t.V
	}
	for _, t := range mna.Across(outA, outB) {
		c[t.I] += t.V
	}
	md, err := build(P, b, c)
	if err != nil {
		return nil, err
	}
	r := &Result{Final: nan, Overshoot: nan, Peak: nan, PeakTime: nan, Rise10: nan, Rise90: nan, RiseTime: nan,
		Settling1: nan, Settling01: nan, Reference: nan, ReferenceFrequency: nan, PeakingDB: nan,
		PeakingFrequency: nan, Bandwidth: nan, LowerCorner: nan}
	note := func(format string, args ...any) { r.Notes = append(r.Notes, fmt.Sprintf(format, args...)) }

	dir := newDirect(P, b, c)
	poles := append([]complex128(nil), md.raw...)
	if dir.refine(poles) == maxRefine {
		note("Some natural frequencies did not settle to full precision: a multiple or nearly multiple pole is found only to about eight digits.")
	}
	order(poles)

	// The gain, from the model where it is proper, else from the pencil.
	scaleW := 1.0
	if len(poles) > 0 {
		scaleW = cmplx.Abs(poles[len(poles)-1])
	}
	x := make([]complex128, md.m)
	y := make([]complex128, md.m)
	gain := func(s complex128, slope *complex128) complex128 {
		v := md.at(s, x)
		if slope != nil {
			*slope = md.slope(s, x, y)
		}
		return v
	}
	// The model against the nodal solution, relative to the largest |g|
	// met: an improper gain (which the model cannot hold) shows as a
	// difference as large as the gain itself at the highest frequency.
	worst, big := 0.0, 0.0
	for _, w := range []float64{0, scaleW * 1e-3, scaleW, scaleW * 1e3} {
		s := complex(0, w)
		v := dir.gain(s)
		worst = math.Max(worst, cmplx.Abs(md.at(s, x)-v))
		big = math.Max(big, cmplx.Abs(v))
	}
	r.Agreement = worst / big
	if big == 0 {
		r.Agreement = worst
	}
	improper := r.Agreement > 1e-6
	if improper {
		note("The gain keeps rising at high frequency (it is improper: more zeros than poles), so its step starts with an impulse, which is not drawn; the frequency figures come from the nodal solution.")
		gain = func(s complex128, slope *complex128) complex128 {
			v := dir.gain(s)
			if slope != nil {
				h := complex(0, 1e-7*math.Max(cmplx.Abs(s), scaleW))
				*slope = (dir.gain(s+h) - dir.gain(s-h)) / (2 * h)
			}
			return v
		}
	}

	// Residues by the trapezoidal rule on a circle around each pole,
	// which converges geometrically for an analytic integrand
	// (L. N. Trefethen, J. A. C. Weideman, "The exponentially convergent
	// trapezoidal rule", SIAM Review 56(3), 2014 [memory]).
	r.Poles = make([]Pole, len(poles))
	for i, p := range poles {
		r.Poles[i] = Pole{P: p, Residue: residue(md, x, poles, i)}
	}
	r.Stability = Stable
	for _, p := range r.Poles {
		switch {
		case real(p.P) > 1e-9*cmplx.Abs(p.P):
			r.Stability = Unstable
		case real(p.P) >= -1e-9*cmplx.Abs(p.P) && r.Stability == Stable:
			r.Stability = Marginal
		}
	}
	dominance(r.Poles)

	// The gain at DC from the nodal solution itself.
	g0 := real(dir.gain(0))
	if r.Stability != Stable || !numeric.FiniteReal(g0) {
		g0 = nan
	}
	fr := &fractions{g0: g0, p: poles, rho: make([]complex128, len(poles))}
	for i, p := range r.Poles {
		fr.rho[i] = p.Residue / p.P
	}

	// The time axis.
	autoTo, autoPts := autoAxis(r, fr, md)
	r.To, r.Points = opt.To, opt.Points
	if r.To == 0 {
		r.To = autoTo
	}
	if r.Points == 0 {
		r.Points = autoPts
		if opt.To > 0 && autoTo > 0 {
			r.Points = min(MaxPoints, max(500, int(float64(autoPts)*opt.To/autoTo)))
		}
	}
	h := r.To / float64(r.Points-1)
	r.Time = make([]float64, r.Points)
	for k := range r.Time {
		r.Time[k] = float64(k) * h
	}
	r.Step = md.series(h, r.Points)

	switch r.Stability {
	case Unstable:
		var right []string
		for _, p := range r.Poles {
			if real(p.P) > 1e-9*cmplx.Abs(p.P) && imag(p.P) >= 0 {
				right = append(right, describe(p))
			}
		}
		note("Unstable: natural frequencies in the right half plane (%s). The step grows without bound, so it has no final value, overshoot, rise or settling time, and the frequency response describes no steady state.", joinList(right))
		return r, nil
	case Marginal:
		note("Marginally stable: a natural frequency on the imaginary axis or at s = 0, so the step rings or ramps forever and has no final value; a lossless resonance or an integrator without a DC path is the usual cause.")
		return r, nil
	}
	r.Final = g0

	// The figures, on a grid of their own that reaches the 0.1 % band,
	// evaluated by the modes where they reproduce the exact samples.
	ev := evaluator{fr.series, fr.at, fr.slope}
	scale := 0.0
	for _, v := range r.Step {
		scale = math.Max(scale, math.Abs(v))
	}
	for k, v := range fr.series(h, r.Points) {
		if math.Abs(v-r.Step[k]) > 1e-9*math.Max(scale, math.Abs(g0)) {
			// Repeated poles: the modes' sum loses digits.
			ev = evaluator{md.series, md.stepAt, md.slopeAt}
			break
		}
	}
	if len(poles) == 0 {
		r.Overshoot, r.Rise10, r.Rise90, r.RiseTime, r.Settling1, r.Settling01 = 0, 0, 0, 0, 0, 0
		note("No natural frequencies: the gain is the same at every frequency, and the step is a step.")
	} else if math.Abs(g0) <= 1e-9*scale {
		note("The gain at DC is zero (a band-pass or high-pass gain), so the step returns to 0: overshoot, rise and settling, measured against the final value, do not apply. The step's largest excursion is %.4g at %s.", extreme(r.Step), value.Format(r.Time[argExtreme(r.Step)], "s", 4))
	} else {
		span := autoTo
		var f figures
		for try := 0; try < 4; try++ {
			f = measure(ev, g0, span, figurePoints(span, r.Poles))
			if f.complete {
				break
			}
			span *= 2
		}
		r.Overshoot, r.Peak, r.PeakTime = f.overshoot, f.peak, f.peakTime
		r.Rise10, r.Rise90 = f.rise10, f.rise90
		r.RiseTime = f.rise90 - f.rise10
		r.Settling1, r.Settling01 = f.settle1, f.settle01
		low := math.Inf(1)
		for _, v := range r.Step {
			low = math.Min(low, v/g0)
		}
		if low < -1e-3 {
			note("The step first moves the wrong way, to %s of its final value: the gain has a zero in the right half plane.", percent(100*low))
		}
	}

	// The frequency figures.
	lo, hi := 1.0, 1.0
	if len(poles) > 0 {
		lo, hi = cmplx.Abs(poles[0])/1e3, cmplx.Abs(poles[len(poles)-1])*1e3
		for _, p := range poles {
			if cmplx.Abs(p) > 0 {
				lo = math.Min(lo, cmplx.Abs(p)/1e3)
			}
		}
	}
	gInf := md.d
	if improper {
		gInf = nan
	}
	if len(poles) == 0 {
		r.Kind = "flat"
	} else {
		bd := shape(gain, g0, gInf, lo, hi, poles)
		r.Kind = bd.kind
		const hz = 1 / (2 * math.Pi)
		r.Reference, r.ReferenceFrequency = bd.ref, bd.refAt*hz
		if !math.IsNaN(bd.peak) && bd.kind == "low-pass" {
			r.PeakingDB, r.PeakingFrequency = 20*math.Log10(bd.peak/bd.ref), bd.peakAt*hz
		}
		r.Bandwidth, r.LowerCorner = bd.upper*hz, bd.lower*hz
		if bd.kind == "low-pass" && math.IsNaN(bd.upper) {
			note("|g| does not fall 3 dB below its low-frequency value within 1000 times the highest natural frequency: no bandwidth is given.")
		}
	}
	explain(r, note)
	return r, nil
}

var nan = math.NaN()

// build realises the gain with a shift near the middle of the natural
// frequencies: a first estimate from the pencil's diagonal, then, when the
// natural frequencies it finds are centred elsewhere, once more there. A
// shift that lands on a natural frequency is moved.
func build(P *mna.Pencil, b, c []float64) (*model, error) {
	try := func(sigma float64) (*model, error) {
		for k := 0; k < 6; k++ {
			md, err := realize(P, b, c, sigma)
			if !errors.Is(err, errShift) {
				return md, err
			}
			sigma *= 1.618
		}
		return nil, errors.New("no shift avoids the natural frequencies")
	}
	sigma := -initialScale(P)
	md, err := try(sigma)
	if err != nil {
		return nil, fmt.Errorf("the closed-loop response could not be computed: %v", err)
	}
	lg, n := 0.0, 0
	for _, p := range md.raw {
		if a := cmplx.Abs(p); a > 0 {
			lg += math.Log(a)
			n++
		}
	}
	if n == 0 {
		return md, nil
	}
	centre := math.Exp(lg / float64(n))
	if r := centre / -sigma; r > 30 || r < 1.0/30 {
		if md2, err := try(-centre); err == nil && len(md2.raw) >= len(md.raw) {
			md = md2
		}
	}
	return md, nil
}

// initialScale is a first guess at where the natural frequencies lie: the
// geometric mean of |G_ii/C_ii| over the unknowns with both (a node's
// 1/RC, an amplifier pole's ω).
func initialScale(P *mna.Pencil) float64 {
	n := P.N
	lg, k := 0.0, 0
	for i := 0; i < n; i++ {
		g, c := P.G[i*n+i], P.C[i*n+i]
		if g != 0 && c != 0 {
			lg += math.Log(math.Abs(g / c))
			k++
		}
	}
	if k == 0 {
		return 1
	}
	return math.Exp(lg / float64(k))
}

// order sorts natural frequencies by magnitude, keeping each conjugate
// pair together, upper member first.
func order(p []complex128) {
	slices.SortStableFunc(p, func(a, b complex128) int {
		ma, mb := cmplx.Abs(a), cmplx.Abs(b)
		if ma != mb && math.Abs(ma-mb) > 1e-12*math.Max(ma, mb) {
			if ma < mb {
				return -1
			}
			return 1
		}
		// A pair: the upper member first.
		switch {
		case imag(a) > imag(b):
			return -1
		case imag(a) < imag(b):
			return 1
		}
		return 0
	})
}

// residue is the residue of the model's gain at poles[i]: (1/2πi)∮g(s)ds
// on a circle a quarter of the way to the nearest other pole, by the
// trapezoidal rule on 24 points (error about 4^−24 of the residue).
func residue(md *model, x []complex128, poles []complex128, i int) complex128 {
	p := poles[i]
	rad := math.Inf(1)
	for j, q := range poles {
		if j != i {
			rad = math.Min(rad, cmplx.Abs(q-p))
		}
	}
	rad = math.Min(rad/4, cmplx.Abs(p)/4)
	if !(rad > 0) || math.IsInf(rad, 0) {
		rad = math.Max(cmplx.Abs(p), 1) / 4
	}
	const n = 24
	var sum complex128
	for k := 0; k < n; k++ {
		e := cmplx.Rect(1, 2*math.Pi*(float64(k)+0.5)/n)
		sum += md.at(p+complex(rad, 0)*e, x) * e
	}
	return sum * complex(rad/n, 0)
}

// dominance weighs each pole by |residue|/|Re p|, the dominance index of
// N. Martins and J. Rommes ("Efficient computation of transfer function
// dominant poles using subspace acceleration", IEEE Trans. Power Systems
// 21(3), 2006 [memory]): the peak its own term r/(jω − p) reaches on the
// frequency axis.
func dominance(ps []Pole) {
	top := 0.0
	w := make([]float64, len(ps))
	for i, p := range ps {
		re := math.Max(math.Abs(real(p.P)), 1e-12*cmplx.Abs(p.P))
		w[i] = cmplx.Abs(p.Residue) / re
		if !numeric.FiniteReal(w[i]) {
			w[i] = 0
		}
		top = math.Max(top, w[i])
	}
	for i := range ps {
		if top > 0 {
			ps[i].Weight = w[i] / top
		}
		ps[i].Dominant = ps[i].Weight >= 0.2
	}
}

// autoAxis chooses the step's span and points: long enough for every mode
// that shows in the step (coefficient above 10⁻⁶ of the response's scale)
// to decay below 5·10⁻⁴ of it, and at least three time constants of each;
// 25 samples a period of the fastest ringing among them, 500 at least. An
// unstable response is shown until it has grown a thousandfold, a
// marginal one for ten periods.
func autoAxis(r *Result, fr *fractions, md *model) (float64, int) {
	scale := math.Abs(fr.g0)
	for _, rho := range fr.rho {
		if r.Stability == Stable {
			scale = math.Max(scale, cmplx.Abs(rho))
		}
	}
	if !(scale > 0) {
		scale = math.Max(math.Abs(md.d), 1)
	}
	span, fastest := 0.0, 0.0
	for i, p := range r.Poles {
		rho := cmplx.Abs(fr.rho[i])
		re := real(p.P)
		if r.Stability == Stable && rho < 1e-6*scale {
			continue
		}
		switch r.Stability {
		case Stable:
			span = math.Max(span, math.Max(math.Log(rho/(5e-4*scale)), 3)/-re)
		case Unstable:
			if re > 1e-9*cmplx.Abs(p.P) {
				span = math.Max(span, math.Log(1e3)/re)
			}
		case Marginal:
			if re >= -1e-9*cmplx.Abs(p.P) {
				if w := math.Abs(imag(p.P)); w > 0 {
					span = math.Max(span, 10*2*math.Pi/w)
				}
			}
		}
		fastest = math.Max(fastest, math.Abs(imag(p.P)))
	}
	if !(span > 0) || math.IsInf(span, 0) {
		span = 1
		for _, p := range r.Poles {
			if a := cmplx.Abs(p.P); a > 0 {
				span = 10 / a
				break
			}
		}
	}
	span = niceCeil(span)
	points := 500
	if fastest > 0 {
		points = max(points, int(math.Ceil(25*span*fastest/(2*math.Pi))))
	}
	return span, min(points, MaxPoints)
}

// figurePoints is the grid the figures are searched on: 40 samples a
// period of the fastest ringing, 2000 at least, so that no excursion out
// of a band falls between samples.
func figurePoints(span float64, ps []Pole) int {
	n := 2000
	for _, p := range ps {
		if p.Weight > 1e-6 {
			n = max(n, int(math.Ceil(40*span*math.Abs(imag(p.P))/(2*math.Pi))))
		}
	}
	return min(n, 200000)
}

// niceCeil rounds a span up to 1, 2 or 5 times a power of ten, the
// float64 nearest that decimal (so 10 µs is 1e-5, not 9.999…e-6).
func niceCeil(x float64) float64 {
	e := int(math.Floor(math.Log10(x)))
	for _, m := range []int{1, 2, 5, 10} {
		v, _ := strconv.ParseFloat(strconv.Itoa(m)+"e"+strconv.Itoa(e), 64)
		if v >= x*(1-1e-12) {
			return v
		}
	}
	v, _ := strconv.ParseFloat("1e"+strconv.Itoa(e+1), 64)
	return v
}

func extreme(y []float64) float64 { return y[argExtreme(y)] }

func argExtreme(y []float64) int {
	k := 0
	for i, v := range y {
		if math.Abs(v) > math.Abs(y[k]) {
			k = i
		}
	}
	return k
}
