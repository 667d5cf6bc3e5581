package feedback

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"strings"

	"zport/engine/circuit"
	"zport/engine/dd"
	"zport/engine/mna"
	"zport/engine/numeric"
	"zport/engine/value"
)

// MaxNodes bounds the circuits analyzed, to keep a page responsive.
const MaxNodes = 200

// Port is a resolved port.
type Port struct {
	Name string
	A, B int // circuit node indices
	// Drivers are the voltage sources wired exactly across the port.
	Drivers []int
	// HeldBy names the ideal voltage sources (other than the drivers)
	// that connect A to B: such a port's impedance is exactly zero.
	HeldBy []string
	// HeldAtDC is HeldBy with the inductors, which are shorts at DC.
	HeldAtDC []string
	keys     map[string]string
}

// key names the port's cached factorization of one kind.
func (p *Port) key(kind string) string {
	if k, ok := p.keys[kind]; ok {
		return k
	}
	if p.keys == nil {
		p.keys = map[string]string{}
	}
	k := kind + ":" + p.Name
	p.keys[kind] = k
	return k
}

// Gain is a resolved gain request.
type Gain struct {
	Source     int // part index of an independent source
	OutA, OutB int // output node pair (OutB may be gnd)
	SourceName string
	OutputName string
}

// Unit returns "V/V" for a voltage source and "V/A" for a current source.
func (g *Gain) Unit(c *circuit.Circuit) string {
	if c.Parts[g.Source].Kind == circuit.ISource {
		return "V/A"
	}
	return "V/V"
}

// PortResult holds Blackman's terms for one port; NaN marks a term that is
// not finite here (see Point.Notes).
type PortResult struct {
	Z0, TShort, TOpen, Z, ZDirect complex128
	// Y is the admittance form of Blackman's formula, set when Z is not
	// finite but the admittance is.
	Y complex128
	// Agreement is |Z − ZDirect|/max(|Z|, |ZDirect|) (absolute when one is
	// exactly zero), NaN when either is not finite.
	Agreement float64
	// Err bounds the error of each value.
	Err PortErrors
	// Sens is each value's sensitivity: how far it can move, to first
	// order, when every coefficient of the equations (and the reference's
	// gain) moves by one part in 1. Sens/|value| is the value's
	// componentwise condition number: refinement leaves an error of about
	// Sens·2⁻¹⁰⁰, beside the final rounding.
	Sens PortErrors
}

// PortErrors bounds the absolute error of each of a port's values: the
// exact value lies within Err of the reported one. 0 with a value of 0 is
// a zero the circuit's structure makes exact; +Inf means no bound can be
// given (the notes say why); NaN goes with a value that is not finite.
type PortErrors struct {
	Z0, TShort, TOpen, Z, ZDirect, Y float64
}

// GainResult holds the asymptotic gain model's terms.
type GainResult struct {
	G0, GInf, G, GDirect complex128
	Agreement            float64
	// Err bounds each value's error, as PortErrors does.
	Err GainErrors
	// Sens is each value's sensitivity (see PortResult.Sens).
	Sens GainErrors
}

// GainErrors bounds the errors of the gain's values (see PortErrors).
type GainErrors struct {
	G0, GInf, G, GDirect float64
}

// Point is the analysis at one frequency.
type Point struct {
	F float64
	T complex128
	// TErr bounds the error of T (see PortErrors), TSens is its
	// sensitivity (see PortResult.Sens).
	TErr, TSens float64
	Ports       []PortResult
	Gain        *GainResult
	Notes       []string
	// Cond is the largest estimated condition number among the systems
	// solved, when Analyzer.Condition is set (else 0): expect relative
	// errors of about Cond·2⁻⁵³.
	Cond float64
	// Adjoint is the adjoint solution z, Mᵀz = d, of the full circuit at
	// F for the read-out d = Analyzer.Adjoint (nil when not asked): the
	// output's response to any right-hand side b is zᵀb.
	Adjoint []complex128
}

// Analyzer analyzes one circuit for one reference element, a set of ports
// and optionally a gain, at any frequency. It keeps its work buffers, so it
// is not safe for concurrent use.
type Analyzer struct {
	C   *circuit.Circuit
	Sys *mna.System
	// Ref is the part index of the reference element, −1 when there is
	// none: then Blackman's terms, the return ratio and G₀, G∞, G are not
	// defined, and the results hold the direct solution only.
	Ref   int
	ref   int // index in Sys.Controls, −1 without a reference
	Ports []Port
	Gain  *Gain
	// Condition asks At to estimate the condition of every system it
	// solves (a few extra solves each; meant for spot analyses).
	Condition bool
	// Tol is the relative error bound a read-out must meet without
	// refinement; 0 means 2⁻⁴¹, which leaves 12 certain digits. A caller
	// that differences nearby results (a sensitivity) asks for more, so
	// that every value is refined alike.
	Tol float64
	// Adjoint, when set, is a read-out d of an output from the unknowns
	// (y = dᵀx): At then also solves the adjoint system Mᵀz = d of the
	// full circuit with the factorization it makes anyway, into
	// Point.Adjoint. One such solve gives the transfer from every source
	// of the circuit to the output (Rohrer, Nagel, Meyer, Weber, IEEE
	// J. Solid-State Circuits 6(4), 1971 [memory]); package noise uses it.
	Adjoint []mna.Term

	slots map[string]*slot
	used  []*slot      // factored during the current At
	r     []complex128 // reference injection, length Sys.N+1
	buf   []complex128 // a right-hand side: the gain source, a port current

	prec     *mna.Precise
	fns      []mna.Functional // the read-outs by id; fns[readCtl] changes with the frequency
	same     []int            // the first read-out with the same functional, by id
	ys       [2][]complex128  // refine's work space
	ls       [2]mna.Functional
	sx       []complex128 // eval's work space, length Sys.N+1
	sr, sd   []complex128
	sxd      []dd.Complex
	sw       []float64
	smag     []float64
	srnd     []float64
	balls    [4]ball
	sbd      []dd.Complex
	noteVals []struct {
		v complex128
		e float64
	}
	sy     [2][]complex128
	portID [1]int
	k      dd.Complex // the reference's gain at the current frequency
	kAbs   float64

	// Solves counts the solves by how they ended: [1] with the float64
	// factorization alone, [2] refined with it, [3] with the double-double
	// factorization, [0] singular even so or not settled (no bound).
	Solves [4]int
}

type slot struct {
	lu  mna.LU
	mat []complex128
	err error
	f   float64
	ok  bool
	// The structural check, done once (per DC or not).
	structErr   *SingularError
	checked, dc bool

	act   *mna.Active // the configuration's coefficients, for residuals
	adj   []adjoint   // adjoint solutions by read-out, at f
	ludd  mna.LUDD    // the double-double factorization, made when needed
	ddMat []dd.Complex
	ddF   float64
	ddOK  bool
	ddErr error
}

// candidates names the parts of c that can be the reference, or says that
// there are none.
func candidates(c *circuit.Circuit) string {
	if refs := c.References(); len(refs) > 0 {
		return "choose one of: " + strings.Join(refs, ", ")
	}
	return "the circuit has none: add a controlled source (vcvs, vccs, ccvs, cccs), an opamp or a transistor (bjt, mos)"
}

// New prepares an analysis of c with the named reference element.
func New(c *circuit.Circuit, reference string, ports []Port, gain *Gain) (*Analyzer, error) {
	if n := len(c.Nodes) - 1; n > MaxNodes {
		return nil, fmt.Errorf("the circuit has %d nodes; zport analyzes up to %d so the page stays responsive", n, MaxNodes)
	}
	a := &Analyzer{C: c, Sys: mna.New(c), Ports: ports, Gain: gain, slots: map[string]*slot{}, Ref: -1, ref: -1}
	if reference != "" {
		i, ok := c.PartIndex(reference)
		if !ok {
			return nil, fmt.Errorf("reference %s: no part of that name (%s)", value.Quote(reference), candidates(c))
		}
		if k := c.Parts[i].Kind; !k.Controlled() {
			return nil, fmt.Errorf("reference %s is a %s; the reference must be a controlled source, an opamp or a transistor (%s)", value.Quote(reference), k, candidates(c))
		}
		a.Ref, a.ref = i, a.Sys.ControlOf(i)
	}
	sys := a.Sys
	for i := range a.Ports {
		p := &a.Ports[i]
		p.Drivers = drivers(c, p.A, p.B)
		p.HeldBy = heldBy(c, p.A, p.B, p.Drivers, false)
		p.HeldAtDC = heldBy(c, p.A, p.B, p.Drivers, true)
	}
	if gain != nil {
		k := c.Parts[gain.Source].Kind
		if k != circuit.VSource && k != circuit.ISource {
			return nil, fmt.Errorf("gain source %q is a %s; it must be a vsource or isource", c.Parts[gain.Source].Name, k)
		}
	}
	a.r = make([]complex128, sys.N+1)
	if a.ref >= 0 {
		mna.Scatter(a.r, sys.Controls[a.ref].R)
	}
	a.buf = make([]complex128, sys.N+1)
	a.prec = mna.NewPrecise(sys)
	a.fns = make([]mna.Functional, readPort+len(a.Ports))
	if gain != nil {
		a.fns[readOut] = mna.NodePair(gain.OutA, gain.OutB)
	}
	a.same = make([]int, len(a.fns))
	for i, p := range a.Ports {
		a.fns[readPort+i] = mna.NodePair(p.A, p.B)
	}
	for i := range a.same {
		a.same[i] = i
		for j := readOut; j < i; j++ {
			if i >= readOut && slices.Equal(a.fns[i], a.fns[j]) {
				a.same[i] = a.same[j]
				break
			}
		}
	}
	a.sx = make([]complex128, sys.N+1)
	a.sr = make([]complex128, sys.N+1)
	a.sd = make([]complex128, sys.N+1)
	a.sxd = make([]dd.Complex, sys.N+1)
	a.sbd = make([]dd.Complex, sys.N+1)
	a.sw = make([]float64, sys.N+1)
	a.smag = make([]float64, sys.N+1)
	a.srnd = make([]float64, sys.N+1)
	return a, nil
}

// heldBy returns the ideal voltage sources on a path from node pa to node
// pb, when there is one: vsources (other than the port's drivers), vnoise
// sources (0 V outside the noise analysis), vcvs outputs and opamp outputs
// without ro, and with dc the inductors. A
// current injected into such a port flows through the path and changes no
// other equation — unless a current-controlled source senses a part on the
// path, in which case there is no such rule and heldBy returns nil.
func heldBy(c *circuit.Circuit, pa, pb int, drivers []int, dc bool) []string {
	skip := map[int]bool{}
	for _, d := range drivers {
		skip[d] = true
	}
	sensed := map[int]bool{}
	for _, p := range c.Parts {
		if p.Kind == circuit.CCVS || p.Kind == circuit.CCCS {
			sensed[p.Sense] = true
		}
	}
	type edge struct {
		a, b int
		part int
	}
	var edges []edge
	for i, p := range c.Parts {
		switch {
		case skip[i]:
		case p.Kind == circuit.VSource || p.Kind == circuit.VNoise || p.Kind == circuit.VCVS || dc && p.Kind == circuit.Inductor:
			edges = append(edges, edge{p.Nodes[0], p.Nodes[1], i})
		case p.Kind == circuit.OpAmp && p.Amp.Ro == 0:
			edges = append(edges, edge{p.Nodes[2], circuit.Gnd, i})
		}
	}
	names := pathBetween(pa, pb, len(c.Nodes), func(yield func(a, b int, name string)) {
		for _, e := range edges {
			yield(e.a, e.b, c.Parts[e.part].Name)
		}
	})
	if len(names) == 0 {
		return nil
	}
	for _, n := range names {
		if i, ok := c.PartIndex(n); ok && sensed[i] {
			return nil
		}
	}
	return names
}

func drivers(c *circuit.Circuit, pa, pb int) []int {
	var d []int
	for i, p := range c.Parts {
		if p.Kind != circuit.VSource {
			continue
		}
		if p.Nodes[0] == pa && p.Nodes[1] == pb || p.Nodes[0] == pb && p.Nodes[1] == pa {
			d = append(d, i)
		}
	}
	return d
}

// factor returns the factorization of the system for cfg at cfg.F, cached
// under key for that frequency.
func (a *Analyzer) factor(key string, cfg mna.Config) (*slot, error) {
	s := a.slots[key]
	if s == nil {
		s = &slot{}
		a.slots[key] = s
	}
	if s.ok && s.f == cfg.F {
		return s, s.err
	}
	// The graph decides structural failures, whatever rounding would let
	// the factorization pass; it depends on the frequency only through
	// f = 0, so it is kept per slot.
	dc := cfg.F == 0
	if !s.checked || s.dc != dc {
		s.structErr, s.checked, s.dc = a.structure(cfg, ""), true, dc
	}
	if s.structErr != nil {
		s.f, s.ok, s.err = cfg.F, true, s.structErr
		return s, s.err
	}
	if s.act == nil {
		s.act = a.prec.Active(cfg)
	}
	s.mat = a.Sys.Assemble(s.mat, cfg)
	s.err = s.lu.Factor(s.mat, a.Sys.Size(cfg))
	s.f, s.ok = cfg.F, true
	if s.err == nil {
		a.used = append(a.used, s)
	}
	return s, s.err
}

// setFrequency prepares the bounds' per-frequency state.
func (a *Analyzer) setFrequency(f float64) {
	a.prec.At(f)
	if a.ref < 0 {
		return
	}
	a.fns[readCtl] = a.prec.Control(a.fns[readCtl][:0], a.ref)
	a.k = a.prec.Gain(a.ref)
	a.kAbs = cmplx.Abs(a.k.Complex128())
}

// usable reports whether slot s can be solved: its float64 factorization
// succeeded, or it failed on a pivot only (the structure is sound) and the
// double-double one succeeds.
func (a *Analyzer) usable(s *slot, err error) bool {
	if err == nil {
		return true
	}
	var ms *mna.Singular
	if !errors.As(err, &ms) || s.act == nil {
		return false
	}
	_, err = a.ddFactor(s)
	return err == nil
}

// returnRatio solves the injection of a unit test source at the reference
// for slot s and returns T = −k·(control signal), the control signal and,
// when withOut, the output read-out (for the gain).
func (a *Analyzer) returnRatio(s *slot, withOut bool) (T ratio, cr, vr ball) {
	ids := readIDs[:1]
	if withOut {
		ids = readIDs[:2]
	}
	out := a.balls[:len(ids)]
	a.eval(s, a.r, ids, out, nil)
	cr, vr = out[0], nanBall
	if withOut {
		vr = out[1]
	}
	return a.ratioOf(cr), cr, vr
}

var (
	readIDs  = [...]int{readCtl, readOut}
	readIDs2 = [...]int{readOut, readCtl}
)

// ErrNoReference is ReturnRatio's error for an analyzer without a
// reference element.
var ErrNoReference = errors.New("no reference element: the return ratio needs a controlled source, an opamp or a transistor as reference")

// ReturnRatio returns T at f with every independent source zeroed.
func (a *Analyzer) ReturnRatio(f float64) (complex128, error) {
	if a.ref < 0 {
		return cmplx.NaN(), ErrNoReference
	}
	cfg := mna.Config{F: f, Ref: a.ref}
	s, err := a.factor("base0", cfg)
	if !a.usable(s, err) {
		return cmplx.NaN(), a.explain(err, cfg, "with the reference gain at zero")
	}
	a.setFrequency(f)
	T, _, _ := a.returnRatio(s, false)
	return T.T.v, nil
}

var nan = cmplx.NaN()

// At analyzes the circuit at frequency f ≥ 0.
func (a *Analyzer) At(f float64) (Point, error) {
	if f < 0 || math.IsNaN(f) || math.IsInf(f, 0) {
		return Point{}, fmt.Errorf("frequency %g Hz: it must be finite and ≥ 0", f)
	}
	pt := Point{F: f, T: nan, TErr: math.NaN(), TSens: math.NaN()}
	notes := map[string]bool{}
	note := func(format string, args ...any) {
		s := fmt.Sprintf(format, args...)
		if !notes[s] {
			notes[s] = true
			pt.Notes = append(pt.Notes, s)
		}
	}
	a.used = a.used[:0]
	a.setFrequency(f)
	cfgK := mna.Config{F: f, Ref: a.ref, RefGain: true}
	baseK, errK := a.factor("baseK", cfgK)
	if a.ref < 0 {
		if !a.usable(baseK, errK) {
			return Point{}, a.explain(errK, cfgK, "")
		}
		return a.direct(pt, baseK, note), nil
	}
	cfg0 := mna.Config{F: f, Ref: a.ref}
	base0, err0 := a.factor("base0", cfg0)
	ok0 := a.usable(base0, err0)
	okK := a.usable(baseK, errK)
	if !okK && !ok0 {
		return Point{}, a.explain(errK, cfgK, "")
	}
	if errK != nil && !valuesFailed(errK) {
		return Point{}, errK // the structure itself, named by factor
	}
	k := ball{a.k.Complex128(), a.k, 64 * dd.U2 * a.kAbs, a.kAbs}
	T, cr, vr := nanRatio, nanBall, nanBall
	if !ok0 {
		note("%s: with %s's gain at zero the circuit has no solution (%v), so the return ratio is not finite; only the direct results are given", hz(f), a.C.Parts[a.Ref].Name, a.explain(err0, cfg0, "with the reference gain at zero"))
	} else {
		T, cr, vr = a.returnRatio(base0, a.Gain != nil)
		pt.T, pt.TErr, pt.TSens = T.T.v, T.T.e, T.T.s
	}
	if k.v == 0 {
		note("%s: %s has zero gain, so every return ratio is zero", hz(f), a.C.Parts[a.Ref].Name)
	}
	// det(full matrix) = det(matrix at zero gain)·(1 + T): where 1 + T is
	// zero within its bound, the full circuit is singular.
	closed := loopZero(T)
	if !okK && !closed {
		return Point{}, a.explain(errK, cfgK, "")
	}

	if g := a.Gain; g != nil {
		gr := &GainResult{G0: nan, GInf: nan, G: nan, GDirect: nan, Agreement: math.NaN(),
			Err: GainErrors{math.NaN(), math.NaN(), math.NaN(), math.NaN()}}
		gr.Sens = gr.Err
		b := a.buf
		a.sourceVector(b[:a.Sys.N])
		G0, GInf, G, GD := nanBall, nanBall, nanBall, nanBall
		out := a.balls[:2]
		if closed {
			note("%s: 1 + T = 0 within its error bound: the closed loop has no finite solution here, so g and g direct are not given", hz(f))
		} else {
			a.eval(baseK, b, readIDs[1:2], out[:1], nil)
			GD = out[0]
		}
		if ok0 {
			a.eval(base0, b, readIDs2[:], out, nil)
			var cs ball
			G0, cs = out[0], out[1]
			G, GInf = a.gainModel(G0, cs, vr, cr, k, T, closed, false)
			// Where a formula cancels (g∞ ≪ g₀), its terms need more
			// than their own 12 digits: ask for what the result needs,
			// and evaluate again.
			if t := a.gainTargets(G0, cs, vr, cr, k, T, G, GInf); t != nil {
				a.eval(base0, a.r, readIDs[:2], out, t[0:2])
				cr, vr = out[0], out[1]
				T2 := a.ratioOf(cr)
				a.eval(base0, b, readIDs2[:], out, t[2:4])
				G0, cs = out[0], out[1]
				G, GInf = a.gainModel(G0, cs, vr, cr, k, T2, closed, true)
			}
			if zeroWithin(cr) {
				note("%s: T is zero within its error bound: the reference's control signal does not respond to its output, so g∞ is not defined", hz(f))
			}
		}
		gr.G0, gr.Err.G0, gr.Sens.G0 = G0.v, G0.e, G0.s
		gr.GInf, gr.Err.GInf, gr.Sens.GInf = GInf.v, GInf.e, GInf.s
		gr.G, gr.Err.G, gr.Sens.G = G.v, G.e, G.s
		gr.GDirect, gr.Err.GDirect, gr.Sens.GDirect = GD.v, GD.e, GD.s
		gr.Agreement = numeric.RelDiff(gr.G, gr.GDirect)
		pt.Gain = gr
	}

	for pi := range a.Ports {
		pt.Ports = append(pt.Ports, a.port(pi, f, base0, ok0, baseK, T, closed, note))
	}
	if a.Adjoint != nil && errK == nil {
		pt.Adjoint = make([]complex128, a.Sys.N)
		a.solveAdjoint(baseK, pt.Adjoint)
	}
	a.finish(&pt, note)
	return pt, nil
}

// finish notes the digits the results keep and, when asked, the
// condition of the systems solved at this point.
func (a *Analyzer) finish(pt *Point, note func(string, ...any)) {
	a.noteDigits(pt, note)
	if a.Condition {
		for _, s := range a.used {
			pt.Cond = math.Max(pt.Cond, s.lu.Cond())
		}
	}
}

// NoReferenceNote says what an analysis without a reference element leaves
// out; a response carries it once, not per frequency.
const NoReferenceNote = "no reference element: Blackman’s terms, the return ratio, the margins and the asymptotic gain terms need a controlled source, an opamp or a transistor as reference; impedances and gain are those of the direct nodal solution"

// direct completes pt from the full circuit alone, for an analyzer without
// a reference: every port's direct impedance and the direct gain, each
// with its bound.
func (a *Analyzer) direct(pt Point, baseK *slot, note func(string, ...any)) Point {
	f := pt.F
	if a.Gain != nil {
		gr := &GainResult{G0: nan, GInf: nan, G: nan, GDirect: nan, Agreement: math.NaN(),
			Err: GainErrors{math.NaN(), math.NaN(), math.NaN(), math.NaN()}}
		gr.Sens = gr.Err
		b := a.buf
		a.sourceVector(b[:a.Sys.N])
		a.eval(baseK, b, readIDs[1:2], a.balls[:1], nil)
		GD := a.balls[0]
		gr.GDirect, gr.Err.GDirect, gr.Sens.GDirect = GD.v, GD.e, GD.s
		pt.Gain = gr
	}
	for pi := range a.Ports {
		p := &a.Ports[pi]
		s, ok := baseK, true
		if len(p.Drivers) > 0 {
			cfg := mna.Config{F: f, Ref: -1, RefGain: true, Removed: p.Drivers}
			var err error
			s, err = a.factor(p.key("openK"), cfg)
			if ok = a.usable(s, err); !ok {
				if valuesFailed(err) {
					note("%s: port %s: the direct impedance cannot be computed: %v", hz(f), p.Name, a.explain(err, cfg, "with the port open"))
				} else {
					note("%s: port %s: with the port open the circuit has no solution, so the direct impedance is infinite", hz(f), p.Name)
				}
			}
		}
		ZD := nanBall
		if ok {
			a.portVector(p, a.buf)
			ZD = a.read(s, a.buf, readPort+pi, nil)
		}
		pt.Ports = append(pt.Ports, portOf(nanBall, nanRatio, nanRatio, nanBall, ZD, nanBall))
	}
	if a.Adjoint != nil && baseK.err == nil {
		pt.Adjoint = make([]complex128, a.Sys.N)
		a.solveAdjoint(baseK, pt.Adjoint)
	}
	a.finish(&pt, note)
	return pt
}

// portVector writes a unit test current into port p's A node, out of its
// B node.
func (a *Analyzer) portVector(p *Port, b []complex128) {
	clear(b)
	if v := mna.NodeVar(p.A); v >= 0 {
		b[v] = 1
	}
	if v := mna.NodeVar(p.B); v >= 0 {
		b[v] = -1
	}
}

// solveAdjoint solves the adjoint system of the factored full circuit s for
// the read-out a.Adjoint into z (length Sys.N).
func (a *Analyzer) solveAdjoint(s *slot, z []complex128) {
	d := a.sd
	mna.Scatter(d, a.Adjoint)
	s.lu.SolveTransTo(z, d[:a.Sys.N])
}

// AdjointAt solves the adjoint system Mᵀz = d of the full circuit at
// f > 0 for the read-out d = a.Adjoint (which must be set) into z (length
// Sys.N). Within one frequency it reuses the factorization At made, and
// the structure of earlier ones.
func (a *Analyzer) AdjointAt(f float64, z []complex128) error {
	if a.Adjoint == nil {
		panic("feedback: AdjointAt without an Adjoint read-out")
	}
	cfg := mna.Config{F: f, Ref: a.ref, RefGain: true}
	s, err := a.factor("baseK", cfg)
	if err != nil {
		return a.explain(err, cfg, "")
	}
	a.solveAdjoint(s, z)
	return nil
}

// gainModel returns the asymptotic gain model's g and g∞ from g₀, the
// control signal cs and output vr of the source's and the test
// injection's solutions at zero reference gain, the returned signal cr and
// T. g∞ is NaN where T is zero within its bound, g where 1 + T is. With
// precise, the products and quotients keep double-double midpoints, for
// when g₀ and the feedback term nearly cancel.
func (a *Analyzer) gainModel(G0, cs, vr, cr, k ball, T ratio, closed, precise bool) (G, GInf ball) {
	G, GInf = nanBall, nanBall
	mul, div := ball.mulF, ball.divF
	if precise {
		mul, div = ball.mul, ball.div
	}
	// G = G∞·T/(1+T) + G₀/(1+T), written as G₀ + k·vr·cs/(1+T) (the same
	// expression), so that a vanishing T needs no division by the
	// returned signal.
	if !closed {
		G = G0.add(div(mul(mul(k, vr), cs), T.one))
	}
	if !zeroWithin(cr) {
		GInf = G0.sub(div(mul(vr, cs), cr))
	}
	return G, GInf
}

// gainTargets returns, when g or g∞ has fewer than 12 certain digits,
// the absolute bounds its terms need for 12: [cr, vr, g₀, cs], the order
// of the two solves. Each term gets a quarter of the result's budget.
func (a *Analyzer) gainTargets(G0, cs, vr, cr, k ball, T ratio, G, GInf ball) []float64 {
	if !shortOf(G) && !shortOf(GInf) || !G0.ok() || !cs.ok() || !vr.ok() || !cr.ok() {
		return nil
	}
	t := []float64{math.Inf(1), math.Inf(1), math.Inf(1), math.Inf(1)}
	lower := func(i int, x float64) {
		if x > 0 && x < t[i] {
			t[i] = x
		}
	}
	abs := cmplx.Abs
	if shortOf(GInf) {
		E := tolRefine * abs(GInf.v) / 4
		q := abs(vr.v) * abs(cs.v) / abs(cr.v)
		lower(2, E)
		if q > 0 {
			lower(0, E*abs(cr.v)/q)
			lower(1, E*abs(vr.v)/q)
			lower(3, E*abs(cs.v)/q)
		}
	}
	if shortOf(G) {
		E := tolRefine * abs(G.v) / 4
		p := abs(k.v) * abs(vr.v) * abs(cs.v) / abs(T.one.v)
		lower(2, E)
		if p > 0 {
			lower(0, E*abs(T.one.v)/(p*abs(k.v)))
			lower(1, E*abs(vr.v)/p)
			lower(3, E*abs(cs.v)/p)
		}
	}
	return t
}

// loopZero reports whether 1 + T is zero within its bound, with T known
// well enough (six digits) for that to mean something; a T known worse
// leaves 1 + T unknown, and what divides by it gets no bound.
func loopZero(t ratio) bool {
	return zeroWithin(t.one) && t.one.e <= 1e-6*math.Max(1, cmplx.Abs(t.T.v))
}

// shortOf reports whether b, a formula's result, has fewer than 12
// certain digits though it has a bound and is not zero within it.
func shortOf(b ball) bool {
	return b.ok() && !math.IsInf(b.e, 1) && b.e > tolRefine*cmplx.Abs(b.v) && !b.covers()
}

// zeroWithin reports whether b is a value with a bound that contains zero
// (an unbounded value is not: it is unknown, not zero).
func zeroWithin(b ball) bool { return b.ok() && !math.IsInf(b.e, 1) && b.covers() }

func (a *Analyzer) port(pi int, f float64, base0 *slot, ok0 bool, baseK *slot, T ratio, closed bool, note func(string, ...any)) PortResult {
	p := &a.Ports[pi]
	bp := a.buf
	a.portVector(p, bp)
	id := readPort + pi
	Z0, Z, ZD, Y := nanBall, nanBall, nanBall, nanBall
	Ts, To := nanRatio, nanRatio
	held := p.HeldBy
	if f == 0 && len(p.HeldAtDC) > 0 {
		held = p.HeldAtDC
	}
	if len(held) > 0 && len(p.Drivers) == 0 && ok0 {
		// Exactly zero by structure; the direct solution still runs, so
		// its residue shows as the agreement.
		Z0, Z, To = exact(0), exact(0), T
		if !closed {
			ZD = a.read(baseK, bp, id, nil)
		}
		note("%s: port %s is %s: its impedance is exactly 0, and T short is undefined", hz(f), p.Name, a.holding(held, f))
		return portOf(Z0, Ts, To, Z, ZD, Y)
	}
	var open0, openK, short0 *slot
	var errOpen0, errOpenK, errShort0 error
	okOpen0, okOpenK, okShort0 := ok0, !closed, false
	if len(p.Drivers) > 0 {
		// The port's driver is removed for the open port; the driver,
		// zeroed, is itself the short.
		cfg := mna.Config{F: f, Ref: a.ref, Removed: p.Drivers}
		open0, errOpen0 = a.factor(p.key("open0"), cfg)
		okOpen0 = a.usable(open0, errOpen0)
		cfg.RefGain = true
		openK, errOpenK = a.factor(p.key("openK"), cfg)
		okOpenK = a.usable(openK, errOpenK)
		Ts = T
		okShort0 = ok0
	} else {
		open0, openK = base0, baseK
		cfg := mna.Config{F: f, Ref: a.ref, Short: &[2]int{p.A, p.B}}
		short0, errShort0 = a.factor(p.key("short0"), cfg)
		if okShort0 = a.usable(short0, errShort0); okShort0 {
			Ts = a.returned(short0, nil)
		}
	}
	if okOpen0 {
		Z0 = a.read(open0, bp, id, nil)
		if len(p.Drivers) > 0 {
			To = a.returned(open0, nil)
		} else {
			To = T
		}
	} else if valuesFailed(errOpen0) {
		note("%s: port %s: Z₀ and T open cannot be computed: %v", hz(f), p.Name, a.explain(errOpen0, mna.Config{F: f, Ref: a.ref, Removed: p.Drivers}, "with the port open and the reference gain at zero"))
	} else {
		note("%s: port %s: with the reference gain at zero nothing connects the open port (%v), so Z₀ is infinite and T open is not finite", hz(f), p.Name, a.explain(errOpen0, mna.Config{F: f, Ref: a.ref, Removed: p.Drivers}, "with the port open and the reference gain at zero"))
	}
	// det(open port, full gain) = det(open port, zero gain)·(1 + T open).
	openSingular := loopZero(To)
	switch {
	case openSingular:
		note("%s: port %s: 1 + T open = 0 within its error bound, so with the port open the full circuit is singular and has no direct impedance", hz(f), p.Name)
	case okOpenK && len(p.Drivers) > 0 || !closed && len(p.Drivers) == 0:
		ZD = a.read(openK, bp, id, nil)
	case valuesFailed(errOpenK):
		note("%s: port %s: the direct impedance cannot be computed: %v", hz(f), p.Name, a.explain(errOpenK, mna.Config{F: f, Ref: a.ref, RefGain: true, Removed: p.Drivers}, "with the port open"))
	default:
		note("%s: port %s: with the port open the full circuit has no solution, so the direct impedance is infinite", hz(f), p.Name)
	}
	var loopParts []string // the voltage-forcing parts a short across the port closes a loop with
	if errShort0 != nil {
		if se, ok := errShort0.(*SingularError); ok {
			loopParts = se.Parts
		}
	}
	shortLoop := len(loopParts) > 0
	if !okShort0 && !shortLoop && !zeroWithin(Z0) {
		note("%s: port %s: with the port shorted and the reference gain at zero the circuit has no solution, so T short is not finite", hz(f), p.Name)
	}
	switch {
	case zeroWithin(Z0) && !Ts.T.ok() && To.T.ok():
		// Parts that force a voltage hold the port: shorting it is
		// undefined, but Blackman's product is zero whatever T short is.
		what := "an ideal voltage source drives the port"
		if shortLoop {
			var held []string
			for _, n := range loopParts {
				if n != "the port short" {
					held = append(held, n)
				}
			}
			what = "the port is " + a.holding(held, f)
		}
		note("%s: port %s: %s (Z₀ = 0), so T short is undefined and Z = 0", hz(f), p.Name, what)
		Z0, Z = exact(0), exact(0)
	case Z0.ok() && Ts.T.ok() && To.T.ok():
		den := To.one
		switch {
		case loopZero(To):
			note("%s: port %s: 1 + T open = 0 within its error bound, so the impedance is infinite; its admittance is given instead", hz(f), p.Name)
			Y = den.divF(Z0.mulF(Ts.one))
		default:
			Z = Z0.mulF(Ts.one).divF(den)
			if !shortOf(Z) {
				break
			}
			// Fewer than 12 digits from terms that each have 12: give
			// each a third of Z's budget and evaluate again.
			E := tolRefine / 3
			if t := E * cmplx.Abs(Z0.v); Z0.e > t {
				Z0 = a.read(open0, bp, id, []float64{t})
			}
			shortS, openS := short0, open0
			if len(p.Drivers) > 0 {
				shortS = base0
			} else {
				openS = base0
			}
			if t := E * cmplx.Abs(Ts.one.v) / a.kAbs; Ts.one.e > E*cmplx.Abs(Ts.one.v) && okShort0 {
				Ts = a.returned(shortS, []float64{t})
			}
			if t := E * cmplx.Abs(To.one.v) / a.kAbs; To.one.e > E*cmplx.Abs(To.one.v) {
				To = a.returned(openS, []float64{t})
			}
			Z = Z0.mulF(Ts.one).divF(To.one)
		}
	}
	return portOf(Z0, Ts, To, Z, ZD, Y)
}

// portOf writes a port's values and their bounds.
func portOf(Z0 ball, Ts, To ratio, Z, ZD, Y ball) PortResult {
	res := PortResult{Z0: Z0.v, TShort: Ts.T.v, TOpen: To.T.v, Z: Z.v, ZDirect: ZD.v, Y: Y.v,
		Err:  PortErrors{Z0.e, Ts.T.e, To.T.e, Z.e, ZD.e, Y.e},
		Sens: PortErrors{Z0.s, Ts.T.s, To.T.s, Z.s, ZD.s, Y.s}}
	res.Agreement = numeric.RelDiff(res.Z, res.ZDirect)
	return res
}

// read solves slot s for the port current bp and returns port id's
// voltage; tgt, when not nil, is an absolute bound asked of it.
func (a *Analyzer) read(s *slot, bp []complex128, id int, tgt []float64) ball {
	a.portID[0] = id
	a.eval(s, bp, a.portID[:], a.balls[:1], tgt)
	return a.balls[0]
}

// returned solves slot s for the test injection and returns T there.
func (a *Analyzer) returned(s *slot, tgt []float64) ratio {
	a.eval(s, a.r, readIDs[:1], a.balls[:1], tgt)
	return a.ratioOf(a.balls[0])
}

// valuesFailed reports whether err is a factorization that failed on its
// values (a pivot), not on the circuit's structure.
func valuesFailed(err error) bool {
	var ms *mna.Singular
	return errors.As(err, &ms)
}

// holding describes the parts that hold a port at zero impedance: ideal
// voltage sources, and at DC inductors.
func (a *Analyzer) holding(names []string, f float64) string {
	var sources, coils []string
	for _, n := range names {
		name, _, _ := strings.Cut(n, " ")
		if p, ok := a.C.Part(name); ok && p.Kind == circuit.Inductor {
			coils = append(coils, n)
		} else {
			sources = append(sources, n)
		}
	}
	switch {
	case len(sources) == 0 && f == 0:
		return fmt.Sprintf("shorted at DC by %s %s", plural(len(coils), "inductor", "inductors"), strings.Join(coils, ", "))
	case len(coils) == 0:
		return "held by ideal voltage sources (" + strings.Join(sources, ", ") + ")"
	}
	return "held by ideal voltage sources (" + strings.Join(sources, ", ") + ") and, at DC, " + plural(len(coils), "inductor", "inductors") + " (" + strings.Join(coils, ", ") + ")"
}

// noteDigits notes the values of pt that are not known to 12 digits, and
// those that cannot be trusted at all.
func (a *Analyzer) noteDigits(pt *Point, note func(string, ...any)) {
	// The values in a fixed order, names built only when a note needs them.
	type val struct {
		v complex128
		e float64
	}
	vals := a.noteVals[:0]
	vals = append(vals, val{pt.T, pt.TErr})
	if g := pt.Gain; g != nil {
		vals = append(vals, val{g.G0, g.Err.G0}, val{g.GInf, g.Err.GInf}, val{g.G, g.Err.G}, val{g.GDirect, g.Err.GDirect})
	}
	for _, pr := range pt.Ports {
		vals = append(vals, val{pr.Z0, pr.Err.Z0}, val{pr.TShort, pr.Err.TShort}, val{pr.TOpen, pr.Err.TOpen},
			val{pr.Z, pr.Err.Z}, val{pr.Y, pr.Err.Y}, val{pr.ZDirect, pr.Err.ZDirect})
	}
	a.noteVals = vals
	// digits is −1 for a value to leave out, −2 for one without a bound.
	digits := func(x val) int {
		switch {
		case !numeric.Finite(x.v) || math.IsNaN(x.e):
		case math.IsInf(x.e, 1):
			return -2
		case x.e >= mna.Abs(x.v) || x.e <= 1e-12*mna.Abs(x.v):
			// Zero within its bound (shown as such), exact, or 12 digits.
		default:
			if d := certainDigits(x.v, x.e); d < 12 {
				return d
			}
		}
		return -1
	}
	any := false
	for _, x := range vals {
		any = any || digits(x) != -1
	}
	if !any {
		return
	}
	names := []string{"T"}
	if pt.Gain != nil {
		names = append(names, "g₀", "g∞", "g", "g direct")
	}
	for i := range pt.Ports {
		at := " at " + a.Ports[i].Name
		names = append(names, "Z₀"+at, "T short"+at, "T open"+at, "Z"+at, "Y"+at, "Z direct"+at)
	}
	var few, lost []string
	for i, x := range vals {
		switch d := digits(x); {
		case d == -2:
			lost = append(lost, names[i])
		case d >= 0:
			few = append(few, fmt.Sprintf("%s (%d)", names[i], d))
		}
	}
	if len(lost) > 0 {
		note("%s: these values cannot be trusted, not even to their first digit: their equations are singular to working precision even after refinement (condition beyond 10¹⁶): %s", hz(pt.F), strings.Join(lost, ", "))
	}
	if len(few) > 0 {
		note("%s: fewer than 12 digits are certain in %s (certain digits in brackets)", hz(pt.F), strings.Join(few, ", "))
	}
}

// CertainDigits is the number of significant digits of v that its error
// bound e leaves certain: ⌊−log₁₀(e/|v|)⌋, at most 16.
func CertainDigits(v complex128, e float64) int { return certainDigits(v, e) }

func certainDigits(v complex128, e float64) int {
	if e == 0 {
		return 16
	}
	d := int(math.Floor(-math.Log10(e / cmplx.Abs(v))))
	return max(0, min(16, d))
}

func (a *Analyzer) sourceVector(b []complex128) {
	clear(b)
	for _, t := range a.InputRHS() {
		b[t.I] += complex(t.V, 0)
	}
}

// InputRHS is the gain's source as a unit right-hand side of the
// equations: 1 in its branch row for a vsource; for an isource 1 into its
// TO node and −1 at its FROM node. It is nil without a gain.
func (a *Analyzer) InputRHS() []mna.Term {
	g := a.Gain
	if g == nil {
		return nil
	}
	src := a.C.Parts[g.Source]
	if src.Kind == circuit.VSource {
		return []mna.Term{{I: a.Sys.Branch[g.Source], V: 1}}
	}
	var t []mna.Term
	if v := mna.NodeVar(src.Nodes[1]); v >= 0 {
		t = append(t, mna.Term{I: v, V: 1})
	}
	if v := mna.NodeVar(src.Nodes[0]); v >= 0 {
		t = append(t, mna.Term{I: v, V: -1})
	}
	return t
}

// hz writes a frequency for notes.
func hz(f float64) string { return "at " + fmtHz(f) }

// Stopped is the error of a long loop stopped by its context (a time
// budget, a cancel) between two units of work: Done of Total Units
// ("frequencies") had run. It unwraps to the context's error.
type Stopped struct {
	Done, Total int
	Units       string
	Err         error
}

func (e *Stopped) Error() string {
	return fmt.Sprintf("stopped after %d of %d %s: %v", e.Done, e.Total, e.Units, e.Err)
}

func (e *Stopped) Unwrap() error { return e.Err }

// Sweep analyzes the circuit at each frequency of grid.
func (a *Analyzer) Sweep(grid []float64) ([]Point, error) {
	return a.SweepContext(context.Background(), grid)
}

// SweepContext is Sweep under ctx: between frequencies it checks ctx, and
// once ctx is done it stops with a *Stopped error saying how far it got.
func (a *Analyzer) SweepContext(ctx context.Context, grid []float64) ([]Point, error) {
	pts := make([]Point, len(grid))
	for i, f := range grid {
		if err := ctx.Err(); err != nil {
			return nil, &Stopped{Done: i, Total: len(grid), Units: "frequencies", Err: err}
		}
		p, err := a.At(f)
		if err != nil {
			return nil, err
		}
		pts[i] = p
	}
	return pts, nil
}

// Notes gathers the distinct notes of pts, in order of first appearance,
// replacing per-frequency prefixes by the range where each applies.
func Notes(pts []Point) []string {
	type rng struct{ lo, hi float64 }
	order := []string{}
	where := map[string]*rng{}
	for _, p := range pts {
		for _, n := range p.Notes {
			body := n
			if i := strings.Index(n, ": "); i >= 0 && strings.HasPrefix(n, "at ") {
				body = n[i+2:]
			}
			r := where[body]
			if r == nil {
				r = &rng{p.F, p.F}
				where[body] = r
				order = append(order, body)
			}
			r.hi = p.F
		}
	}
	out := make([]string, 0, len(order))
	for _, b := range order {
		r := where[b]
		if r.lo == r.hi {
			out = append(out, "at "+fmtHz(r.lo)+": "+b)
		} else {
			out = append(out, "from "+fmtHz(r.lo)+" to "+fmtHz(r.hi)+": "+b)
		}
	}
	return out
}
