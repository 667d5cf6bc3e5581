package mna

import (
	"math"

	"zport/engine/circuit"
	"zport/engine/dd"
)

// twoPi is 2π in double-double.
var twoPi = dd.Float{Hi: 6.283185307179586, Lo: 2.4492935982947064e-16}

// Precise holds a System's coefficients at one frequency in double-double
// arithmetic, part by part as the parts contribute them (never summed into
// matrix entries), and computes from them residuals b − A·x accurate to
// about 2⁻¹⁰⁶ of the terms that make them up.
//
// That is what iterative refinement needs here. Assembling the matrix in
// float64 sums a small conductance into a large diagonal entry and loses
// it (1 TΩ beside 50 Ω keeps six of its digits); whatever depends on that
// conductance — a bootstrapped input impedance — then comes out wrong,
// and no residual of the assembled matrix can see it. The residual of the
// parts' own coefficients does, and corrections solved with the existing
// factorization recover the lost digits (Wilkinson, "Rounding Errors in
// Algebraic Processes", 1963; with the residual in twice the working
// precision: Demmel, Hida, Kahan, Li, Mukherjee and Riedy, ACM TOMS 32(2),
// 2006).
//
// A Precise is not safe for concurrent use.
type Precise struct {
	s     *System
	f     float64
	set   bool
	cw    []dd.Float   // ω times each c entry
	ctl   []stamp      // the controlled sources' terms at f, in an order fixed by s
	gains []dd.Complex // each control's gain k(f)
	rows  int          // the most terms one row of A·x sums, for rounding bounds

	r   []dd.Complex
	acc []dot2
	rd  []complex128
	dx  []complex128
	dxd []dd.Complex
	mag []float64
	rnd []float64
}

// stamp is one coefficient of a controlled source's rank-one term.
type stamp struct {
	v   dd.Complex
	d   complex128 // v rounded
	abs float64    // |d|
}

// NewPrecise returns the double-double view of s; call At before use.
func NewPrecise(s *System) *Precise {
	p := &Precise{s: s}
	count := make([]int, s.N+1)
	for _, e := range s.g {
		count[e.i]++
		count[e.j]++ // a transposed residual sums along columns
	}
	for _, e := range s.c {
		count[e.i]++
		count[e.j]++
	}
	for _, ctl := range s.Controls {
		for _, r := range ctl.R {
			count[r.I] += len(ctl.C0) + len(ctl.C1)
		}
		for _, c := range ctl.C0 {
			count[c.I] += len(ctl.R)
		}
		for _, c := range ctl.C1 {
			count[c.I] += len(ctl.R)
		}
	}
	for _, c := range count {
		p.rows = max(p.rows, c)
	}
	p.rows += 3 // the right-hand side, a removed branch's 1, a port short
	n := s.N + 1
	p.r = make([]dd.Complex, n)
	p.acc = make([]dot2, n)
	p.rd = make([]complex128, n)
	p.dx = make([]complex128, n)
	p.dxd = make([]dd.Complex, n)
	p.mag = make([]float64, n)
	p.rnd = make([]float64, n)
	return p
}

// At sets the frequency.
func (p *Precise) At(f float64) {
	if p.set && p.f == f {
		return
	}
	p.f, p.set = f, true
	s := p.s
	w := twoPi.MulF(f)
	p.cw = p.cw[:0]
	for _, e := range s.c {
		p.cw = append(p.cw, w.MulF(e.v))
	}
	p.ctl = p.ctl[:0]
	p.gains = p.gains[:0]
	for _, ctl := range s.Controls {
		g := gainDD(&s.C.Parts[ctl.Part], f)
		p.gains = append(p.gains, g)
		k := g.Neg()
		for _, r := range ctl.R {
			kr := k.Scale(dd.Float{Hi: r.V, Lo: r.Lo})
			for _, c := range ctl.C0 {
				v := kr.Scale(dd.Float{Hi: c.V, Lo: c.Lo})
				p.ctl = append(p.ctl, stamp{v, v.Complex128(), Abs(v.Complex128())})
			}
			for _, c := range ctl.C1 {
				v := kr.Scale(w.Mul(dd.Float{Hi: c.V, Lo: c.Lo})).MulJ()
				p.ctl = append(p.ctl, stamp{v, v.Complex128(), Abs(v.Complex128())})
			}
		}
	}
}

// Gain returns Controls[ci]'s gain k at the frequency of the last At, in
// double-double.
func (p *Precise) Gain(ci int) dd.Complex { return p.gains[ci] }

// gainDD is Part.Gain in double-double.
func gainDD(p *circuit.Part, f float64) dd.Complex {
	if p.Kind != circuit.OpAmp {
		return dd.Complex{Re: dd.F(p.Value)}
	}
	a := p.Amp
	// A = a0/((1 + j·t1)(1 + j·t2)), t1 = f·a0/gbw, t2 = f/p2.
	var t1, t2 dd.Float
	if a.GBW > 0 {
		t1 = dd.F(f).MulF(a.A0).Div(dd.F(a.GBW))
	}
	if a.P2 > 0 {
		t2 = dd.F(f).Div(dd.F(a.P2))
	}
	den := dd.Complex{Re: dd.F(1).Sub(t1.Mul(t2)), Im: t1.Add(t2)}
	return dd.Complex{Re: dd.F(a.A0)}.Div(den)
}

// Active is the set of coefficients that make up the matrix of one
// Config, worked out once so that residuals at any frequency run over
// plain lists.
type Active struct {
	N    int
	g    []aterm // v: the conductance-like coefficient; k: its index in System.g
	c    []aterm // k: the index in System.c (the coefficient is j·ω·c)
	k    []aterm // k: the index of the controlled-source term in Precise
	unit []aterm // v: a removed branch's 1, a port short's ±1
	ax   []float64
	// gamma is, row by row, the relative bound ResidualBound puts on its
	// float64 residual, in moduli: a sum of m terms rounds by at most
	// (m−1)·2⁻⁵³ of the sum of their magnitudes, each product by 2⁻⁵³
	// (2√2 of them for a complex one), each coefficient rounded to float64
	// by 2⁻⁵⁴; with room.
	gamma []float64
}

// Symmetric reports whether the matrix of the Active is symmetric: no
// controlled source acts in it (conductances, capacitances, inductances,
// and the ±1 of branch currents, removed branches and shorts, are
// symmetric as New writes them).
func (a *Active) Symmetric() bool { return len(a.k) == 0 }

// Gamma returns the relative bounds of ResidualBound, row by row.
func (a *Active) Gamma() []float64 { return a.gamma }

// aterm is one coefficient of an Active: row, column, where to find it,
// its value and magnitude where they do not change with the frequency.
type aterm struct {
	i, j, k int32
	v, abs  float64
}

// Active returns cfg's set of coefficients (independent of cfg.F).
func (p *Precise) Active(cfg Config) *Active {
	s := p.s
	a := &Active{N: s.Size(cfg)}
	a.ax = make([]float64, a.N)
	skip := make([]bool, s.N+1)
	for _, pi := range cfg.Removed {
		skip[s.Branch[pi]] = true
	}
	for k, e := range s.g {
		if !skip[e.i] && !skip[e.j] {
			a.g = append(a.g, aterm{int32(e.i), int32(e.j), int32(k), e.v, math.Abs(e.v)})
		}
	}
	for k, e := range s.c {
		if !skip[e.i] && !skip[e.j] {
			a.c = append(a.c, aterm{int32(e.i), int32(e.j), int32(k), e.v, math.Abs(e.v)})
		}
	}
	// The control terms in the order At writes them.
	k := 0
	for ci, ctl := range s.Controls {
		for _, r := range ctl.R {
			for _, c := range append(append([]Term(nil), ctl.C0...), ctl.C1...) {
				if !(ci == cfg.Ref && !cfg.RefGain) && !skip[r.I] && !skip[c.I] {
					a.k = append(a.k, aterm{int32(r.I), int32(c.I), int32(k), 0, 0})
				}
				k++
			}
		}
	}
	for _, pi := range cfg.Removed {
		br := int32(s.Branch[pi])
		a.unit = append(a.unit, aterm{br, br, 0, 1, 1})
	}
	defer func() {
		terms := make([]int, a.N)
		for _, l := range [][]aterm{a.g, a.c, a.unit} {
			for _, t := range l {
				terms[t.i]++
			}
		}
		for _, t := range a.k {
			terms[t.i] += 3 // a complex product rounds by up to 2√2 units
		}
		a.gamma = make([]float64, a.N)
		for i, m := range terms {
			a.gamma[i] = float64(m+2) * dd.U * 1.01
		}
	}()
	if cfg.Short != nil {
		x, y, br := int32(NodeVar(cfg.Short[0])), int32(NodeVar(cfg.Short[1])), int32(s.N)
		if x >= 0 {
			a.unit = append(a.unit, aterm{x, br, 0, 1, 1}, aterm{br, x, 0, 1, 1})
		}
		if y >= 0 {
			a.unit = append(a.unit, aterm{y, br, 0, -1, 1}, aterm{br, y, 0, -1, 1})
		}
	}
	return a
}

// Functional is a read-out ℓᵀx with double-double coefficients.
type Functional []FTerm

// FTerm is one coefficient of a Functional.
type FTerm struct {
	I int
	V dd.Complex
}

// NodePair is the read-out V(a) − V(b) of circuit nodes a and b.
func NodePair(a, b int) Functional {
	var l Functional
	if i := NodeVar(a); i >= 0 {
		l = append(l, FTerm{i, dd.C(1)})
	}
	if i := NodeVar(b); i >= 0 {
		l = append(l, FTerm{i, dd.C(-1)})
	}
	return l
}

// Control appends to l the read-out of Controls[ci]'s control signal at
// the frequency of the last At, and returns it.
func (p *Precise) Control(l Functional, ci int) Functional {
	ctl := p.s.Controls[ci]
	for _, c := range ctl.C0 {
		l = append(l, FTerm{c.I, dd.Complex{Re: dd.Float{Hi: c.V, Lo: c.Lo}}})
	}
	w := twoPi.MulF(p.f)
	for _, c := range ctl.C1 {
		l = append(l, FTerm{c.I, dd.Complex{Im: w.Mul(dd.Float{Hi: c.V, Lo: c.Lo})}})
	}
	return l
}

// Scatter writes l, rounded, into the dense dst (after clearing it).
func (l Functional) Scatter(dst []complex128) {
	clear(dst)
	for _, t := range l {
		dst[t.I] += t.V.Complex128()
	}
}

// Apply returns ℓᵀx in double-double.
func (l Functional) Apply(x []dd.Complex) dd.Complex {
	var s dd.Complex
	for _, t := range l {
		s = s.Add(t.V.Mul(x[t.I]))
	}
	return s
}

// Residual writes r = b − A·x (or b − Aᵀ·x when trans) for the
// configuration of act at the frequency of the last At, from the parts'
// double-double coefficients; mag = |b| + S·|x|, where S sums the
// magnitudes of the coefficients that meet in each matrix entry (|·| is
// |Re| + |Im| throughout); and rnd, a bound on |r − (b − A·x)| for the
// exact coefficients. Each product is formed exactly (TwoProd) and summed
// with its error carried beside the sum (TwoSum): the compensated dot
// product of Ogita, Rump and Oishi (SIAM J. Sci. Comput. 26(6), 2005), as
// accurate as a sum in twice the precision. rnd is a posteriori: what the
// float64 sum of the carried errors can have rounded, plus what the
// coefficients' double-double values are off (nothing for a ±1, a few
// 2⁻¹⁰⁶ of the rest), so it is zero where the sum cancels exactly.
func (p *Precise) Residual(r []dd.Complex, mag, rnd []float64, act *Active, b []complex128, x []dd.Complex, trans bool) {
	s := p.s
	acc := p.acc[:act.N]
	for i := range acc {
		acc[i] = dot2{re: real(b[i]), im: imag(b[i])}
		mag[i] = abs1(b[i])
	}
	for _, t := range act.g {
		i, j := t.i, t.j
		if trans {
			i, j = j, i
		}
		xj := &x[j]
		lo := s.g[t.k].lo
		acc[i].subReal(t.v, lo, xj)
		m := math.Abs(t.v) * (math.Abs(xj.Re.Hi) + math.Abs(xj.Im.Hi))
		mag[i] += m
		if lo != 0 {
			acc[i].coef += 4 * dd.U2 * m // a conductance from dd.Recip
		}
	}
	if p.f != 0 {
		for _, t := range act.c {
			i, j := t.i, t.j
			if trans {
				i, j = j, i
			}
			a := p.cw[t.k] // the coefficient is j·a
			xj := &x[j]
			acc[i].subImag(a.Hi, a.Lo, xj)
			m := math.Abs(a.Hi) * (math.Abs(xj.Re.Hi) + math.Abs(xj.Im.Hi))
			mag[i] += m
			acc[i].coef += 8 * dd.U2 * m // ω·C from 2π, f and C
		}
	}
	for _, t := range act.k {
		st := &p.ctl[t.k]
		i, j := t.i, t.j
		if trans {
			i, j = j, i
		}
		xj := &x[j]
		v := &st.v
		acc[i].subReal(v.Re.Hi, v.Re.Lo, xj)
		acc[i].subImag(v.Im.Hi, v.Im.Lo, xj)
		m := abs1(st.d) * (math.Abs(xj.Re.Hi) + math.Abs(xj.Im.Hi))
		mag[i] += m
		acc[i].coef += 64 * dd.U2 * m // a gain through gainDD and the sensed values
	}
	for _, t := range act.unit {
		i, j := t.i, t.j
		if trans {
			i, j = j, i
		}
		xj := &x[j]
		acc[i].subReal(t.v, 0, xj)
		mag[i] += math.Abs(xj.Re.Hi) + math.Abs(xj.Im.Hi)
	}
	g := float64(3*p.rows+6) * dd.U
	for i, a := range acc {
		re, rl := dd.TwoSum(a.re, a.rc)
		im, il := dd.TwoSum(a.im, a.ic)
		r[i] = dd.Complex{Re: dd.Float{Hi: re, Lo: rl}, Im: dd.Float{Hi: im, Lo: il}}
		// The carried errors were summed in float64.
		rnd[i] = g*a.comp + a.coef
	}
}

// dot2 accumulates a complex sum as float64 sums with their rounding
// errors carried apart; comp sums the magnitudes of what went into the
// carried errors, coef what the coefficients' errors can add.
type dot2 struct{ re, rc, im, ic, comp, coef float64 }

// subReal subtracts (ah + al)·x for a real double-double coefficient.
func (d *dot2) subReal(ah, al float64, x *dd.Complex) {
	p, e := dd.TwoProd(ah, x.Re.Hi)
	s, q := dd.TwoSum(d.re, -p)
	d.re = s
	t := ah*x.Re.Lo + al*x.Re.Hi + al*x.Re.Lo
	d.rc += q - e - t
	p2, e2 := dd.TwoProd(ah, x.Im.Hi)
	s, q2 := dd.TwoSum(d.im, -p2)
	d.im = s
	t2 := ah*x.Im.Lo + al*x.Im.Hi + al*x.Im.Lo
	d.ic += q2 - e2 - t2
	d.comp += math.Abs(q) + math.Abs(e) + math.Abs(t) + math.Abs(q2) + math.Abs(e2) + math.Abs(t2)
}

// subImag subtracts j·(ah + al)·x.
func (d *dot2) subImag(ah, al float64, x *dd.Complex) {
	// j·a·(xr + j·xi) = −a·xi + j·a·xr
	p, e := dd.TwoProd(ah, x.Im.Hi)
	s, q := dd.TwoSum(d.re, p)
	d.re = s
	t := ah*x.Im.Lo + al*x.Im.Hi + al*x.Im.Lo
	d.rc += q + e + t
	p2, e2 := dd.TwoProd(ah, x.Re.Hi)
	s, q2 := dd.TwoSum(d.im, -p2)
	d.im = s
	t2 := ah*x.Re.Lo + al*x.Re.Hi + al*x.Re.Lo
	d.ic += q2 - e2 - t2
	d.comp += math.Abs(q) + math.Abs(e) + math.Abs(t) + math.Abs(q2) + math.Abs(e2) + math.Abs(t2)
}

// ResidualBound writes w, a componentwise bound on the exact residual
// |b − A·x| of a float64 x: the residual computed in float64 from the
// parts' coefficients, plus what that computation and the rounding of the
// coefficients to float64 can hide, γ·(|b| + S·|x|) row by row; mag receives
// |b| + S·|x|. It costs one pass over the parts, several times cheaper
// than Residual: it is the check that decides whether a solution needs
// refining. The float64 residual itself is left in r.
func (p *Precise) ResidualBound(w, mag []float64, r []complex128, act *Active, b, x []complex128) {
	n := act.N
	r, ax := r[:n], act.ax[:n]
	for i := range r {
		r[i] = b[i]
		mag[i] = Abs(b[i])
		ax[i] = Abs(x[i])
	}
	for _, t := range act.g {
		xj := x[t.j]
		r[t.i] -= complex(t.v*real(xj), t.v*imag(xj))
		mag[t.i] += t.abs * ax[t.j]
	}
	if p.f != 0 {
		cw := p.cw
		for _, t := range act.c {
			a, xj := cw[t.k].Hi, x[t.j]
			r[t.i] -= complex(-a*imag(xj), a*real(xj))
			mag[t.i] += math.Abs(a) * ax[t.j]
		}
	}
	for _, t := range act.k {
		st := &p.ctl[t.k]
		r[t.i] -= st.d * x[t.j]
		mag[t.i] += st.abs * ax[t.j]
	}
	for _, t := range act.unit {
		r[t.i] -= complex(t.v, 0) * x[t.j]
		mag[t.i] += ax[t.j]
	}
	for i, g := range act.gamma {
		w[i] = Abs(r[i])*(1+4*dd.U) + g*mag[i]
	}
}

// Abs is |z|, computed as √(re² + im²): without math.Hypot's guard
// against overflow, which values met in circuit equations never need,
// and within two units of rounding.
func Abs(z complex128) float64 {
	re, im := real(z), imag(z)
	return math.Sqrt(re*re + im*im)
}

// AssembleDD writes the matrix of act (its transpose when trans) in
// double-double, entries summed without loss, into dst (row-major,
// act.N×act.N, grown as needed) and returns it.
func (p *Precise) AssembleDD(dst []dd.Complex, act *Active, trans bool) []dd.Complex {
	n := act.N
	if cap(dst) < n*n {
		dst = make([]dd.Complex, n*n)
	}
	dst = dst[:n*n]
	clear(dst)
	at := func(i, j int) *dd.Complex {
		if trans {
			i, j = j, i
		}
		return &dst[i*n+j]
	}
	for _, t := range act.g {
		q := at(int(t.i), int(t.j))
		q.Re = q.Re.Add(dd.Float{Hi: t.v, Lo: p.s.g[t.k].lo})
	}
	if p.f != 0 {
		for _, t := range act.c {
			q := at(int(t.i), int(t.j))
			q.Im = q.Im.Add(p.cw[t.k])
		}
	}
	for _, t := range act.k {
		q := at(int(t.i), int(t.j))
		*q = q.Add(p.ctl[t.k].v)
	}
	for _, t := range act.unit {
		q := at(int(t.i), int(t.j))
		q.Re = q.Re.AddF(t.v)
	}
	return dst
}

// Refinement reports how iterative refinement went.
type Refinement struct {
	// Steps is the number of corrections applied.
	Steps int
	// First is ‖dx₁‖/‖x‖ (largest magnitudes): the relative error of the
	// solution before refinement, as the first correction measured it.
	First float64
	// Last is ‖dx‖/‖x‖ of the last correction.
	Last float64
	// Ratio is the largest ratio of one correction to the one before: how
	// fast refinement contracts; near or above 1 it does not.
	Ratio float64
	// Converged reports that the last correction was within the tolerance
	// asked for, or that the caller's test was met while corrections were
	// still shrinking.
	Converged bool
}

// Corrector solves a correction equation A·d = r (Aᵀ·d = r when trans)
// approximately: a factorization of A.
type Corrector interface {
	correct(d, r []dd.Complex, trans bool)
}

func (p *Precise) correctWith(c Corrector, n int, r []dd.Complex, trans bool) []dd.Complex {
	d := p.dxd[:n]
	c.correct(d, r[:n], trans)
	return d
}

// correct rounds r to float64 and solves with the float64 factorization:
// the correction of classical mixed-precision refinement, whose rounding is
// harmless while the correction only needs a few digits.
func (lu *LU) correct(d, r []dd.Complex, trans bool) {
	n := len(r)
	rd := lu.work2(n)
	for i := range r {
		rd[i] = r[i].Complex128()
	}
	if trans {
		lu.SolveTransTo(rd, rd)
	} else {
		lu.SolveTo(rd, rd)
	}
	ToDD(d, rd)
}

// Refine improves x, a solution of A·x = b (Aᵀ·x = b when trans) for the
// configuration of act, carried in double-double, by iterative refinement:
// the residual from Residual, the correction from c (a factorization of
// that matrix: the float64 LU, or LUDD where that cannot contract), x
// updated in double-double. It stops when the relative correction falls to
// tol, when a correction fails to halve the one before, after maxSteps
// corrections, or — when w is not nil — as soon as good(w) holds, w being
// the componentwise bound on the exact residual of the current x (from the
// double-double residual, as ResidualBound gives it from a float64 one).
// With w not nil, w, mag (|b| + S·|x|) and rnd (what of w is the
// residual's own rounding, see Residual) describe the x returned.
func (p *Precise) Refine(c Corrector, act *Active, b []complex128, x []dd.Complex, w, mag, rnd []float64, trans bool, tol float64, maxSteps int, good func(w []float64) bool) Refinement {
	n := act.N
	var rep Refinement
	if mag == nil {
		mag, rnd = p.mag, p.rnd
	}
	prev := math.Inf(1)
	done := false
	for step := 0; ; step++ {
		if w == nil && (done || step == maxSteps) {
			return rep
		}
		p.Residual(p.r, mag, rnd, act, b, x, trans)
		if w != nil {
			for i := 0; i < n; i++ {
				w[i] = p.r[i].Abs1()*(1+4*dd.U) + rnd[i]
			}
			if good != nil && good(w) {
				rep.Converged = rep.Ratio < 0.5
				return rep
			}
		}
		if done || step == maxSteps {
			return rep
		}
		dx := p.correctWith(c, n, p.r, trans)
		dmax, xmax := 0.0, 0.0
		for i := 0; i < n; i++ {
			xmax = math.Max(xmax, x[i].Abs1())
			dmax = math.Max(dmax, dx[i].Abs1())
			x[i] = x[i].Add(dx[i])
		}
		rel := dmax / xmax
		if xmax == 0 {
			rel = 0
			if dmax > 0 {
				rel = math.Inf(1)
			}
		}
		rep.Steps++
		if step == 0 {
			rep.First = rel
		} else {
			rep.Ratio = math.Max(rep.Ratio, rel/prev)
		}
		rep.Last = rel
		switch {
		case rel <= tol:
			rep.Converged = true
			done = true
		case step > 0 && rel > prev/2:
			done = true
		}
		prev = rel
	}
}

// ToDD writes the float64 x into the double-double dst and returns dst.
func ToDD(dst []dd.Complex, x []complex128) []dd.Complex {
	for i, v := range x {
		dst[i] = dd.C(v)
	}
	return dst
}
