package feedback

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"zport/engine/circuit"
	"zport/engine/mna"
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
	keys   map[string]string
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
}

// GainResult holds the asymptotic gain model's terms.
type GainResult struct {
	G0, GInf, G, GDirect complex128
	Agreement            float64
}

// Point is the analysis at one frequency.
type Point struct {
	F     float64
	T     complex128
	Ports []PortResult
	Gain  *GainResult
	Notes []string
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
	bufs  [4][]complex128
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
}

// New prepares an analysis of c with the named reference element. An
// empty reference asks for the direct solution alone (see Analyzer.Ref):
// a passive network has nothing else to offer.
func New(c *circuit.Circuit, reference string, ports []Port, gain *Gain) (*Analyzer, error) {
	if n := len(c.Nodes) - 1; n > MaxNodes {
		return nil, fmt.Errorf("the circuit has %d nodes; zport analyzes up to %d so the page stays responsive", n, MaxNodes)
	}
	a := &Analyzer{C: c, Sys: mna.New(c), Ports: ports, Gain: gain, slots: map[string]*slot{}, Ref: -1, ref: -1}
	if reference != "" {
		i, ok := c.PartIndex(reference)
		if !ok {
			return nil, fmt.Errorf("reference %q: no part of that name (choose one of: %s)", reference, strings.Join(c.References(), ", "))
		}
		if k := c.Parts[i].Kind; !k.Controlled() {
			return nil, fmt.Errorf("reference %q is a %s; the reference must be a controlled source or an opamp (one of: %s)", reference, k, strings.Join(c.References(), ", "))
		}
		a.Ref, a.ref = i, a.Sys.ControlOf(i)
	}
	sys := a.Sys
	for i := range a.Ports {
		p := &a.Ports[i]
		p.Drivers = drivers(c, p.A, p.B)
		p.HeldBy = heldBy(c, p.A, p.B, p.Drivers)
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
	for i := range a.bufs {
		a.bufs[i] = make([]complex128, sys.N+1)
	}
	return a, nil
}

// heldBy returns the ideal voltage sources on a path from node pa to node
// pb, when there is one: vsources (other than the port's drivers) and
// vnoise sources (0 V outside the noise analysis), vcvs outputs and opamp
// outputs without ro. A current injected into such a port flows through
// the path and changes no other equation — unless a current-controlled
// source senses a part on the path, in which case there is no such rule
// and heldBy returns nil.
func heldBy(c *circuit.Circuit, pa, pb int, drivers []int) []string {
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
		case p.Kind == circuit.VSource || p.Kind == circuit.VNoise || p.Kind == circuit.VCVS:
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
	s.mat = a.Sys.Assemble(s.mat, cfg)
	s.err = s.lu.Factor(s.mat, a.Sys.Size(cfg))
	s.f, s.ok = cfg.F, true
	if s.err == nil {
		a.used = append(a.used, s)
	}
	return s, s.err
}

// gainAt is the reference's gain k at f.
func (a *Analyzer) gainAt(f float64) complex128 { return a.C.Parts[a.Ref].Gain(f) }

// returnRatio solves the injection of a unit test source at the reference
// for the factored system s and returns T = −k·(control signal).
func (a *Analyzer) returnRatio(s *slot, f float64, n int, x []complex128) complex128 {
	s.lu.SolveTo(x[:n], a.r[:n])
	return -a.gainAt(f) * a.Sys.ControlSignal(a.ref, f, x)
}

// ErrNoReference is ReturnRatio's error for an analyzer without a
// reference element.
var ErrNoReference = errors.New("no reference element: the return ratio needs a controlled source or an opamp as reference")

// ReturnRatio returns T at f with every independent source zeroed.
func (a *Analyzer) ReturnRatio(f float64) (complex128, error) {
	if a.ref < 0 {
		return cmplx.NaN(), ErrNoReference
	}
	cfg := mna.Config{F: f, Ref: a.ref}
	s, err := a.factor("base0", cfg)
	if err != nil {
		return cmplx.NaN(), a.explain(err, cfg, "with the reference gain at zero")
	}
	return a.returnRatio(s, f, a.Sys.N, a.bufs[0]), nil
}

var nan = cmplx.NaN()

// At analyzes the circuit at frequency f ≥ 0.
func (a *Analyzer) At(f float64) (Point, error) {
	if f < 0 || math.IsNaN(f) || math.IsInf(f, 0) {
		return Point{}, fmt.Errorf("frequency %g Hz: it must be finite and ≥ 0", f)
	}
	pt := Point{F: f, T: nan}
	notes := map[string]bool{}
	note := func(format string, args ...any) {
		s := fmt.Sprintf(format, args...)
		if !notes[s] {
			notes[s] = true
			pt.Notes = append(pt.Notes, s)
		}
	}
	N := a.Sys.N
	a.used = a.used[:0]
	cfgK := mna.Config{F: f, Ref: a.ref, RefGain: true}
	baseK, err := a.factor("baseK", cfgK)
	if err != nil {
		return Point{}, a.explain(err, cfgK, "")
	}
	if mp := baseK.lu.MinPivot(); !a.Condition && mp < 1e-8 {
		note("%s: the equations are ill-conditioned (smallest relative pivot %.1e): expect about %d good digits, not 15", hz(f), mp, max(1, int(16+math.Log10(mp))))
	}
	if a.Adjoint != nil {
		pt.Adjoint = make([]complex128, N)
		a.adjoint(baseK, pt.Adjoint)
	}
	if a.ref < 0 {
		return a.direct(pt, baseK, note), nil
	}
	cfg0 := mna.Config{F: f, Ref: a.ref}
	base0, err0 := a.factor("base0", cfg0)
	xr := a.bufs[0]
	var cr complex128
	if err0 != nil {
		note("%s: with %s's gain at zero the circuit has no solution (%v), so the return ratio is not finite; only the direct results are given", hz(f), a.C.Parts[a.Ref].Name, a.explain(err0, cfg0, "with the reference gain at zero"))
	} else {
		pt.T = a.returnRatio(base0, f, N, xr)
		cr = a.Sys.ControlSignal(a.ref, f, xr)
	}
	k := a.gainAt(f)
	if k == 0 {
		note("%s: %s has zero gain, so every return ratio is zero", hz(f), a.C.Parts[a.Ref].Name)
	}

	if g := a.Gain; g != nil {
		gr := &GainResult{G0: nan, GInf: nan, G: nan, GDirect: nan, Agreement: math.NaN()}
		b := a.bufs[1]
		a.sourceVector(b[:N])
		xs := a.bufs[2]
		baseK.lu.SolveTo(xs[:N], b[:N])
		gr.GDirect = a.output(xs)
		if err0 == nil {
			base0.lu.SolveTo(xs[:N], b[:N])
			gr.G0 = a.output(xs)
			cs := a.Sys.ControlSignal(a.ref, f, xs)
			vr := a.output(xr)
			// G = G∞·T/(1+T) + G₀/(1+T), written as G₀ + k·vr·cs/(1+T)
			// (the same expression), so that a vanishing T needs no
			// division by the returned signal.
			if 1+pt.T == 0 {
				note("%s: 1 + T = 0, so the asymptotic gain formula has no finite value", hz(f))
			} else {
				gr.G = gr.G0 + k*vr*cs/(1+pt.T)
			}
			if cr != 0 {
				gr.GInf = gr.G0 - vr*cs/cr
			} else {
				note("%s: the reference's control signal does not respond to its output (T = 0), so G∞ is not defined", hz(f))
			}
		}
		gr.Agreement = relDiff(gr.G, gr.GDirect)
		pt.Gain = gr
	}

	for pi := range a.Ports {
		pt.Ports = append(pt.Ports, a.port(pi, f, base0, err0, baseK, pt.T, note))
	}
	a.condition(&pt, note)
	return pt, nil
}

// NoReferenceNote says what an analysis without a reference element leaves
// out; a response carries it once, not per frequency.
const NoReferenceNote = "no reference element: Blackman’s terms, the return ratio, the margins and the asymptotic gain terms need a controlled source or an opamp as reference; impedances and gain are those of the direct nodal solution"

// direct completes pt from the full circuit alone, for an analyzer without
// a reference: every port's direct impedance and the direct gain.
func (a *Analyzer) direct(pt Point, baseK *slot, note func(string, ...any)) Point {
	N := a.Sys.N
	x, b := a.bufs[2], a.bufs[1]
	if a.Gain != nil {
		a.sourceVector(b[:N])
		baseK.lu.SolveTo(x[:N], b[:N])
		pt.Gain = &GainResult{G0: nan, GInf: nan, G: nan, GDirect: a.output(x), Agreement: math.NaN()}
	}
	for i := range a.Ports {
		p := &a.Ports[i]
		res := PortResult{Z0: nan, TShort: nan, TOpen: nan, Z: nan, ZDirect: nan, Y: nan, Agreement: math.NaN()}
		s, err := baseK, error(nil)
		if len(p.Drivers) > 0 {
			cfg := mna.Config{F: pt.F, Ref: -1, RefGain: true, Removed: p.Drivers}
			s, err = a.factor(p.key("openK"), cfg)
		}
		if err != nil {
			note("%s: port %s: with the port open the circuit has no solution, so the direct impedance is infinite", hz(pt.F), p.Name)
		} else {
			a.portVector(p, b)
			s.lu.SolveTo(x[:N], b[:N])
			res.ZDirect = portVoltage(p, x)
		}
		pt.Ports = append(pt.Ports, res)
	}
	a.condition(&pt, note)
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

// portVoltage reads V(A) − V(B) of port p from a solution.
func portVoltage(p *Port, x []complex128) complex128 {
	var v complex128
	if i := mna.NodeVar(p.A); i >= 0 {
		v += x[i]
	}
	if i := mna.NodeVar(p.B); i >= 0 {
		v -= x[i]
	}
	return v
}

// condition sets pt.Cond from the systems factored at this point, when
// asked, with a note when it leaves fewer than nine good digits.
func (a *Analyzer) condition(pt *Point, note func(string, ...any)) {
	if !a.Condition {
		return
	}
	for _, s := range a.used {
		pt.Cond = math.Max(pt.Cond, s.lu.Cond())
	}
	if digits := -math.Log10(pt.Cond * 0x1p-53); digits < 9 {
		note("%s: the equations are ill-conditioned (condition ≈ %.1e): expect about %d good digits, not 15", hz(pt.F), pt.Cond, max(1, int(digits)))
	}
}

// adjoint solves the adjoint system of the factored full circuit s for
// the read-out a.Adjoint into z (length Sys.N).
func (a *Analyzer) adjoint(s *slot, z []complex128) {
	d := a.bufs[3]
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
	a.adjoint(s, z)
	return nil
}

func (a *Analyzer) port(pi int, f float64, base0 *slot, err0 error, baseK *slot, T complex128, note func(string, ...any)) PortResult {
	p := &a.Ports[pi]
	N := a.Sys.N
	res := PortResult{Z0: nan, TShort: nan, TOpen: nan, Z: nan, ZDirect: nan, Y: nan, Agreement: math.NaN()}
	bp := a.bufs[1]
	a.portVector(p, bp)
	vp := func(x []complex128) complex128 { return portVoltage(p, x) }
	x := a.bufs[2]
	if len(p.HeldBy) > 0 && len(p.Drivers) == 0 && err0 == nil {
		// Exactly zero by structure; the direct solution still runs, so
		// its rounding residue shows as the agreement.
		res.Z0, res.Z, res.TOpen = 0, 0, T
		baseK.lu.SolveTo(x[:N], bp[:N])
		res.ZDirect = vp(x)
		res.Agreement = relDiff(res.Z, res.ZDirect)
		note("%s: port %s is held by ideal voltage sources (%s): its impedance is exactly 0, and T short is undefined", hz(f), p.Name, strings.Join(p.HeldBy, ", "))
		return res
	}
	open0, openK := base0, baseK
	errOpen0, errOpenK := err0, error(nil)
	var short0 *slot
	var errShort0 error
	if len(p.Drivers) > 0 {
		// The port's driver is removed for the open port; the driver,
		// zeroed, is itself the short.
		cfg := mna.Config{F: f, Ref: a.ref, Removed: p.Drivers}
		open0, errOpen0 = a.factor(p.key("open0"), cfg)
		cfg.RefGain = true
		openK, errOpenK = a.factor(p.key("openK"), cfg)
		short0, errShort0 = base0, err0
		res.TShort = T
	} else {
		cfg := mna.Config{F: f, Ref: a.ref, Short: &[2]int{p.A, p.B}}
		short0, errShort0 = a.factor(p.key("short0"), cfg)
		if errShort0 == nil {
			res.TShort = a.returnRatio(short0, f, N+1, a.bufs[3])
		}
	}
	if errOpen0 == nil {
		open0.lu.SolveTo(x[:N], bp[:N])
		res.Z0 = vp(x)
		res.TOpen = a.returnRatio(open0, f, N, a.bufs[3])
	} else {
		note("%s: port %s: with the reference gain at zero nothing connects the open port (%v), so Z₀ is infinite and T open is not finite", hz(f), p.Name, a.explain(errOpen0, mna.Config{F: f, Ref: a.ref, Removed: p.Drivers}, "with the port open and the reference gain at zero"))
	}
	if errOpenK == nil {
		openK.lu.SolveTo(x[:N], bp[:N])
		res.ZDirect = vp(x)
	} else {
		note("%s: port %s: with the port open the full circuit has no solution, so the direct impedance is infinite", hz(f), p.Name)
	}
	if errShort0 != nil && res.Z0 != 0 {
		note("%s: port %s: with the port shorted and the reference gain at zero the circuit has no solution, so T short is not finite", hz(f), p.Name)
	}
	if res.Z0 == 0 && !finite(res.TShort) && finite(res.TOpen) {
		// An ideal voltage source at the port: shorting it is undefined,
		// but Blackman's product is zero whatever T short is.
		note("%s: port %s: an ideal voltage source drives the port (Z₀ = 0), so T short is undefined and Z = 0", hz(f), p.Name)
		res.Z = 0
	} else if finite(res.Z0) && finite(res.TShort) && finite(res.TOpen) {
		den := 1 + res.TOpen
		if cmplx.Abs(den) <= 1e-14*math.Max(1, cmplx.Abs(res.TOpen)) {
			note("%s: port %s: 1 + T open = 0, so the impedance is infinite; its admittance is given instead", hz(f), p.Name)
			res.Y = den / (res.Z0 * (1 + res.TShort))
		} else {
			res.Z = res.Z0 * (1 + res.TShort) / den
		}
	}
	res.Agreement = relDiff(res.Z, res.ZDirect)
	return res
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

func (a *Analyzer) output(x []complex128) complex128 {
	var v complex128
	if i := mna.NodeVar(a.Gain.OutA); i >= 0 {
		v += x[i]
	}
	if i := mna.NodeVar(a.Gain.OutB); i >= 0 {
		v -= x[i]
	}
	return v
}

func finite(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }

func relDiff(a, b complex128) float64 {
	if !finite(a) || !finite(b) {
		return math.NaN()
	}
	// Relative, except that an exact zero (Blackman's product when Z₀ = 0)
	// against rounding residue is compared absolutely.
	d := cmplx.Abs(a - b)
	if a == 0 || b == 0 {
		return d
	}
	return d / math.Max(cmplx.Abs(a), cmplx.Abs(b))
}

// hz writes a frequency for notes.
func hz(f float64) string { return "at " + fmtHz(f) }

// Sweep analyzes the circuit at each frequency of grid.
func (a *Analyzer) Sweep(grid []float64) ([]Point, error) {
	pts := make([]Point, len(grid))
	for i, f := range grid {
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
