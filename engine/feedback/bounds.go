package feedback

import (
	"math"
	"math/cmplx"

	"zport/engine/dd"
	"zport/engine/mna"
	"zport/engine/numeric"
)

// Error bounds.
//
// Every value the analyzer reports is a read-out ℓᵀx of the solution x of
// one configuration's equations A·x = b (a port voltage, the reference's
// control signal, the gain's output), or a formula of such read-outs
// (Blackman's, the asymptotic gain model's). The error of a read-out is
// exactly yᵀ(b − A·x̂), where y solves the adjoint system Aᵀ·y = ℓ; so with
// w a componentwise bound on the exact residual, |ℓᵀx − ℓᵀx̂| ≤ |y|ᵀw. The
// adjoint is one more solve with the same factorization, and w comes from
// the parts' own coefficients (mna.Precise), which is what makes the bound
// componentwise and honest where the assembled matrix has lost a small
// conductance. A factor of 2 covers the adjoint's own rounding while the
// factorization is a good inverse; where it is not, the double-double one
// gives the adjoints (see eval). The formulas then carry the bounds by
// first-order ball arithmetic, with their midpoints in double-double.
//
// Beside its bound each value carries its sensitivity s = |y|ᵀ(|b| + S·|x|):
// how far it can move when every coefficient of the equations moves by one
// part in 1 (to first order). s/|v| is the value's condition number — the
// componentwise one, counted part by part. It bounds what refinement
// leaves, about s·2⁻¹⁰⁰, and usually far less: the bound after refinement
// counts the rounding of the double-double residual as it happened.

// tolRefine is the relative bound above which a read-out asks for
// refinement: at or below it, at least 12 digits are certain.
const tolRefine = 1e-12

// u is the unit roundoff of float64.
const u = dd.U

// ball is a value with a bound on its error: the exact value lies within
// e of v, which is d rounded. e = +Inf means no bound can be given (the
// value is not to be trusted); a NaN v is a value that does not exist. s
// is the value's sensitivity (see above).
type ball struct {
	v    complex128
	d    dd.Complex
	e, s float64
}

var nanBall = ball{v: cmplx.NaN(), e: math.NaN(), s: math.NaN()}

// exact is a value known exactly.
func exact(v complex128) ball { return ball{v: v, d: dd.C(v)} }

// covers reports whether the ball contains zero.
func (b ball) covers() bool { return !(b.e < mna.Abs(b.v)) }

// ok reports whether the value exists.
func (b ball) ok() bool { return numeric.Finite(b.v) }

// make forms the ball of midpoint d, with e the bound of the operation's
// inputs and ulps the rounding of d to float64 and of the operation
// itself, in units of u·|v|.
func mk(d dd.Complex, e, s, ulps float64) ball {
	v := d.Complex128()
	return ball{v, d, e + ulps*u*mna.Abs(v), s}
}

// The operations run their midpoints in double-double (a few units of
// 2⁻¹⁰⁶, counted as one u below with ample room), so a sum that cancels
// keeps the digits its inputs have. mul and div have float64 variants,
// mulF and divF, for where nothing cancels after them: they count their
// own rounding and that of their inputs' midpoints instead.
func (a ball) add(b ball) ball { return mk(a.d.Add(b.d), a.e+b.e, a.s+b.s, 1) }

func (a ball) sub(b ball) ball { return mk(a.d.Sub(b.d), a.e+b.e, a.s+b.s, 1) }

func (a ball) mul(b ball) ball {
	ma, mb := mna.Abs(a.v), mna.Abs(b.v)
	return mk(a.d.Mul(b.d), ma*b.e+mb*a.e+a.e*b.e, ma*b.s+mb*a.s, 1)
}

func (a ball) mulF(b ball) ball {
	ma, mb := mna.Abs(a.v), mna.Abs(b.v)
	v := a.v * b.v
	return ball{v, dd.C(v), ma*b.e + mb*a.e + a.e*b.e + 6*u*ma*mb, ma*b.s + mb*a.s}
}

// div returns a/b; its bound is +Inf when b's ball contains zero.
func (a ball) div(b ball) ball {
	q := a.d.Div(b.d)
	v := q.Complex128()
	mb, mv := mna.Abs(b.v), mna.Abs(v)
	s := (a.s + mv*b.s) / mb
	if !(b.e < mb) {
		return ball{v, q, math.Inf(1), s}
	}
	return mk(q, (a.e+mv*b.e)/(mb-b.e), s, 1)
}

func (a ball) divF(b ball) ball {
	v := a.v / b.v
	mb, mv := mna.Abs(b.v), mna.Abs(v)
	s := (a.s + mv*b.s) / mb
	if !(b.e < mb) {
		return ball{v, dd.C(v), math.Inf(1), s}
	}
	return ball{v, dd.C(v), (a.e+mv*b.e)/(mb-b.e) + 8*u*mv, s}
}

// ratio is a return ratio T = −k·c with 1 + T.
type ratio struct{ T, one ball }

var nanRatio = ratio{nanBall, nanBall}

// ratioOf forms T = −k·c from the control signal c.
func (a *Analyzer) ratioOf(c ball) ratio {
	if !c.ok() {
		return nanRatio
	}
	t := a.k.Mul(c.d).Neg()
	e, s := a.kAbs*c.e, a.kAbs*c.s
	return ratio{mk(t, e, s, 1), mk(t.Add(dd.C(1)), e, s, 1)}
}

// Read-outs, by index: the reference's control signal, the gain's output,
// then one per port.
const (
	readCtl = iota
	readOut
	readPort
)

// functional returns read-out id at the current frequency.
func (a *Analyzer) functional(id int) mna.Functional { return a.fns[id] }

// adjoint returns the adjoint solution for read-out id on slot s (solved
// with s's float64 factorization, cached for the frequency).
func (a *Analyzer) adjoint(s *slot, id int) []complex128 {
	id = a.same[id] // a port at the gain's output reads what the gain reads
	for len(s.adj) <= id {
		s.adj = append(s.adj, adjoint{})
	}
	ad := &s.adj[id]
	if ad.ok && ad.f == s.f {
		return ad.y
	}
	n := s.act.N
	if cap(ad.y) < n {
		ad.y = make([]complex128, n)
	}
	ad.y = ad.y[:n]
	a.functional(id).Scatter(ad.y)
	s.lu.SolveTransTo(ad.y, ad.y)
	ad.f, ad.ok = s.f, true
	return ad.y
}

// setAdjoint caches y as the adjoint of read-out id on slot s.
func (a *Analyzer) setAdjoint(s *slot, id int, y []complex128) {
	id = a.same[id]
	for len(s.adj) <= id {
		s.adj = append(s.adj, adjoint{})
	}
	ad := &s.adj[id]
	if ad.ok && ad.f == s.f {
		return
	}
	ad.y = append(ad.y[:0], y...)
	ad.f, ad.ok = s.f, true
}

// adjoint is a cached adjoint solution.
type adjoint struct {
	y  []complex128
	f  float64
	ok bool
}

// bounds returns 2·|y|ᵀw, the bound of a read-out (the factor 2 for the
// adjoint's own error), and |y|ᵀmag, its sensitivity.
func bounds(y []complex128, w, mag []float64) (e, s float64) {
	for i, wi := range w {
		if ay := mna.Abs(y[i]); ay != 0 {
			e += ay * wi
			s += ay * mag[i]
		}
	}
	return 2 * e * (1 + 0x1p-40), s
}

// dotAbs is |y|ᵀv.
func dotAbs(y []complex128, v []float64) float64 {
	s := 0.0
	for i, vi := range v {
		if vi != 0 {
			s += mna.Abs(y[i]) * vi
		}
	}
	return s
}

func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// eval solves slot s's equations for b and returns the read-outs ids as
// balls in out (len(ids)). tgt, when not nil, asks for an absolute bound of
// tgt[k] on out[k] (where a formula needs more of it than its own digits).
// It is the one place where accuracy is decided:
//
//  1. Solve with the float64 factorization, bound the exact residual from
//     the parts (mna.Precise.ResidualBound) and each read-out through its
//     adjoint. If every bound leaves 12 digits (or meets its target), that
//     is the answer: the common case costs one pass over the parts and
//     one adjoint solve per read-out and configuration.
//  2. Otherwise refine x in double-double with the float64 factorization
//     (classical mixed-precision refinement, residual from the parts,
//     Demmel et al., ACM TOMS 32(2), 2006), until the bounds leave 12
//     digits or reach what a double-double residual can resolve.
//  3. Where that factorization is too far from the equations for that —
//     its first correction is beyond 10⁻³ of the solution: it lost a
//     conductance the answer depends on — factor the equations assembled
//     in double-double (mna.LUDD) and solve, refine and take the adjoints
//     with that.
//
// A matrix singular even in double-double, or refinement that does not
// settle, gives values without a bound (+Inf).
func (a *Analyzer) eval(s *slot, b []complex128, ids []int, out []ball, tgt []float64) {
	if s.err != nil {
		// The float64 factorization failed on a pivot; usable has
		// made the double-double one.
		a.Solves[a.refine(s, b, ids, out, tgt, 3)]++
		return
	}
	n := s.act.N
	x, r := a.sx[:n], a.sr[:n]
	s.lu.SolveTo(x, b[:n])
	if len(ids) == 1 && ids[0] >= readPort && s.act.Symmetric() {
		// A port's current read as its voltage, on symmetric equations (no
		// controlled source acting: a passive network, or one opamp at
		// zero gain): the adjoint is the solution itself.
		a.setAdjoint(s, ids[0], x)
	}
	w, mag := a.sw[:n], a.smag[:n]
	for pass := 0; ; pass++ {
		a.prec.ResidualBound(w, mag, r, s.act, b[:n], x)
		need, floor := false, true
		for k, id := range ids {
			y := a.adjoint(s, id)
			v, ev := applyD(a.functional(id), x)
			e, sens := bounds(y, w, mag)
			out[k] = ball{v, dd.C(v), e + ev, sens}
			if t := a.target(id, v, out[k].e, k, tgt); !(out[k].e <= t) && out[k].e != 0 {
				need = true
				// Would the bound meet the target with the residual
				// at its float64 floor?
				floor = floor && 2*dotGamma(y, mag, s.act)+ev <= t
			}
		}
		if !need {
			a.Solves[1]++
			return
		}
		if pass > 0 || !floor {
			break
		}
		// The residual, not its rounding, is what is large: the float64
		// elimination has left some component off (one that should be
		// zero, say). One step of refinement in float64 — the residual
		// computed from the parts, the correction from the same
		// factorization — restores componentwise backward stability
		// (Skeel, Math. Comp. 35, 1980 [memory]), at the price of a solve.
		d := a.sd[:n]
		s.lu.SolveTo(d, r)
		for i := range x {
			x[i] += d[i]
		}
	}
	a.Solves[a.refine(s, b, ids, out, tgt, 2)]++
}

// dotGamma is |y|ᵀ(γ·mag), the part of a read-out's bound that comes from
// the rounding of the float64 residual rather than from the residual.
func dotGamma(y []complex128, mag []float64, act *mna.Active) float64 {
	s := 0.0
	g := act.Gamma()
	for i, m := range mag {
		s += mna.Abs(y[i]) * g[i] * m
	}
	return s
}

// target is the absolute bound read-out id (the k-th asked, value v with
// bound e) must meet: tgt[k] when given, else 12 digits of its scale — its
// magnitude, and for the control signal c also |1 + T|/|k| with T = −k·c,
// since Blackman's formula and the gain model divide by 1 + T (and only
// that, where T is zero within its bound).
func (a *Analyzer) target(id int, v complex128, e float64, k int, tgt []float64) float64 {
	if tgt != nil && tgt[k] > 0 {
		return tgt[k]
	}
	m := mna.Abs(v)
	if id == readCtl && a.kAbs != 0 {
		one := mna.Abs(1-a.k.Complex128()*v) / a.kAbs
		if m <= e {
			// T zero within its bound is shown as such; what it must
			// give is 1 + T.
			m = one
		}
		m = math.Min(m, one)
	}
	if a.Tol > 0 {
		return a.Tol * m
	}
	return tolRefine * m
}

// applyD is ℓᵀx for a float64 x, with a bound on its rounding.
func applyD(l mna.Functional, x []complex128) (complex128, float64) {
	var v complex128
	m := 0.0
	for _, t := range l {
		c := t.V.Complex128()
		v += c * x[t.I]
		m += abs1(c) * abs1(x[t.I])
	}
	return v, float64(len(l)+3) * u * m
}

// refine is eval's steps 2 and 3, from step tier; it returns the step
// that answered, or 0 when none could bound the values.
func (a *Analyzer) refine(s *slot, b []complex128, ids []int, out []ball, tgt []float64, tier int) int {
	n := s.act.N
	p := a.prec
	bb := b[:n]
	xd := a.sxd[:n]
	w, mag, rnd := a.sw[:n], a.smag[:n], a.srnd[:n]
	ys := a.ys[:len(ids)]
	ls := a.ls[:len(ids)]
	for k, id := range ids {
		ls[k] = a.functional(id)
		if tier == 2 {
			ys[k] = a.adjoint(s, id)
		}
	}
	if tier == 2 {
		mna.ToDD(xd, a.sx[:n])
	}
	// good: every bound meets its target, or is down to its floor, what
	// the double-double residual's own rounding allows.
	good := func(w []float64) bool {
		for k, id := range ids {
			v := ls[k].Apply(xd).Complex128()
			e, _ := bounds(ys[k], w, mag)
			if e > a.target(id, v, e, k, tgt) && e > 4*dotAbs(ys[k], rnd) {
				return false
			}
		}
		return true
	}
	if tier == 2 {
		// The first correction measures how far the float64
		// factorization is from an inverse of the equations. Within
		// 10⁻³ it contracts fast, and the adjoints it gave are good to
		// about as much, which the factor 2 of the bounds covers; beyond,
		// the double-double factorization takes over.
		rep := p.Refine(&s.lu, s.act, bb, xd, w, mag, rnd, false, 0, 4, good)
		if rep.First > 1e-3 || !good(w) {
			tier = 3
		}
	}
	if tier == 3 {
		ludd, err := a.ddFactor(s)
		if err != nil {
			for k := range out {
				if s.err != nil {
					out[k] = nanBall
				} else {
					out[k].e = math.Inf(1)
				}
			}
			return 0
		}
		bd := a.sbd[:n]
		mna.ToDD(bd, bb)
		ludd.SolveTo(xd, bd)
		for k := range ids {
			clear(bd)
			for _, t := range ls[k] {
				bd[t.I] = bd[t.I].Add(t.V)
			}
			if cap(a.sy[k]) < n {
				a.sy[k] = make([]complex128, n)
			}
			ys[k] = roundDD(a.sy[k][:n], ludd.SolveTransTo(bd, bd))
		}
		rep := p.Refine(ludd, s.act, bb, xd, w, mag, rnd, false, 0, 3, good)
		if !good(w) && !(rep.Last <= 1e-10) {
			for k, l := range ls {
				d := l.Apply(xd)
				_, sens := bounds(ys[k], w, mag)
				out[k] = ball{d.Complex128(), d, math.Inf(1), sens}
			}
			return 0
		}
	}
	for k, l := range ls {
		e, sens := bounds(ys[k], w, mag)
		out[k] = mk(l.Apply(xd), e, sens, 1)
	}
	return tier
}

// ddFactor returns slot s's equations factored in double-double at s's
// frequency.
func (a *Analyzer) ddFactor(s *slot) (*mna.LUDD, error) {
	if s.ddOK && s.ddF == s.f {
		return &s.ludd, s.ddErr
	}
	s.ddMat = a.prec.AssembleDD(s.ddMat, s.act, false)
	s.ddErr = s.ludd.Factor(s.ddMat, s.act.N)
	s.ddF, s.ddOK = s.f, true
	return &s.ludd, s.ddErr
}

func roundDD(dst []complex128, x []dd.Complex) []complex128 {
	for i, v := range x {
		dst[i] = v.Complex128()
	}
	return dst
}
