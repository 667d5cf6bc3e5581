package mna

import (
	"math"

	"zport/engine/dd"
)

// DDPivotTolerance is the smallest pivot, relative to the row-equilibrated
// matrix, that LUDD accepts: a matrix closer than this to singular is
// singular for every purpose of a circuit analysis.
const DDPivotTolerance = 1e-28

// LUDD is a factorization P·D·A = L·U in double-double arithmetic, with
// row equilibration by powers of two and partial pivoting. It is the
// corrector of last resort for refinement: where the float64 factorization
// is too far from A for corrections to contract — the condition of the
// solution, counted against the rounding of the assembled entries, at or
// beyond 2⁵³ — this one, of a matrix assembled without loss, still is an
// accurate inverse. It costs some twenty times the float64 LU, so it is
// used only there.
type LUDD struct {
	n   int
	a   []dd.Complex
	piv []int
	rs  []float64
	inv []dd.Complex
	nz  []int
	y   []dd.Complex
}

// Factor factors the n×n row-major a in place (a is kept by lu).
func (lu *LUDD) Factor(a []dd.Complex, n int) error {
	lu.n, lu.a = n, a
	if cap(lu.piv) < n {
		lu.piv = make([]int, n)
		lu.rs = make([]float64, n)
		lu.inv = make([]dd.Complex, n)
		lu.y = make([]dd.Complex, n)
	}
	lu.piv, lu.rs, lu.inv, lu.y = lu.piv[:n], lu.rs[:n], lu.inv[:n], lu.y[:n]
	for i := 0; i < n; i++ {
		m := 0.0
		for _, v := range a[i*n : i*n+n] {
			m = math.Max(m, v.Abs1())
		}
		if m == 0 {
			return &Singular{Index: i, Kind: "row"}
		}
		s := pow2inv(m)
		lu.rs[i] = s
		for j := i * n; j < i*n+n; j++ {
			a[j] = a[j].ScaleF(s)
		}
	}
	for k := 0; k < n; k++ {
		p, pm := k, a[k*n+k].Abs1()
		for i := k + 1; i < n; i++ {
			if m := a[i*n+k].Abs1(); m > pm {
				p, pm = i, m
			}
		}
		lu.piv[k] = p
		if pm <= DDPivotTolerance {
			return &Singular{Index: k, Kind: "pivot"}
		}
		if p != k {
			rk, rp := a[k*n:k*n+n], a[p*n:p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := dd.Complex{Re: dd.F(1)}.Div(a[k*n+k])
		lu.inv[k] = inv
		nz := lu.nz[:0]
		for j := k + 1; j < n; j++ {
			if !isZero(a[k*n+j]) {
				nz = append(nz, j)
			}
		}
		lu.nz = nz
		rk := a[k*n : k*n+n]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k]
			if isZero(l) {
				continue
			}
			l = l.Mul(inv)
			a[i*n+k] = l
			ri := a[i*n : i*n+n]
			for _, j := range nz {
				ri[j] = ri[j].Sub(l.Mul(rk[j]))
			}
		}
	}
	return nil
}

func isZero(z dd.Complex) bool { return z.Re.Hi == 0 && z.Im.Hi == 0 }

// SolveTo solves A·x = b into dst; dst and b may be the same slice.
func (lu *LUDD) SolveTo(dst, b []dd.Complex) []dd.Complex {
	n, a, y := lu.n, lu.a, lu.y
	for i := 0; i < n; i++ {
		y[i] = b[i].ScaleF(lu.rs[i])
	}
	for k := 0; k < n; k++ {
		if p := lu.piv[k]; p != k {
			y[k], y[p] = y[p], y[k]
		}
	}
	for i := 1; i < n; i++ {
		s := y[i]
		for j, l := range a[i*n : i*n+i] {
			if !isZero(l) {
				s = s.Sub(l.Mul(y[j]))
			}
		}
		y[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := y[i]
		for j := i + 1; j < n; j++ {
			if u := a[i*n+j]; !isZero(u) {
				s = s.Sub(u.Mul(y[j]))
			}
		}
		y[i] = s.Mul(lu.inv[i])
	}
	copy(dst, y)
	return dst
}

// SolveTransTo solves Aᵀ·x = b into dst; dst and b may be the same slice.
func (lu *LUDD) SolveTransTo(dst, b []dd.Complex) []dd.Complex {
	// A = D⁻¹·Pᵀ·L·U, so Uᵀ·Lᵀ·(P·D⁻¹·x) = b.
	n, a, v := lu.n, lu.a, lu.y
	copy(v, b)
	for i := 0; i < n; i++ {
		w := v[i].Mul(lu.inv[i])
		v[i] = w
		if isZero(w) {
			continue
		}
		for j := i + 1; j < n; j++ {
			if u := a[i*n+j]; !isZero(u) {
				v[j] = v[j].Sub(u.Mul(w))
			}
		}
	}
	for i := n - 1; i > 0; i-- {
		z := v[i]
		if isZero(z) {
			continue
		}
		for j, l := range a[i*n : i*n+i] {
			if !isZero(l) {
				v[j] = v[j].Sub(l.Mul(z))
			}
		}
	}
	for k := n - 1; k >= 0; k-- {
		if p := lu.piv[k]; p != k {
			v[k], v[p] = v[p], v[k]
		}
	}
	for i := 0; i < n; i++ {
		dst[i] = v[i].ScaleF(lu.rs[i])
	}
	return dst
}

func (lu *LUDD) correct(d, r []dd.Complex, trans bool) {
	if trans {
		lu.SolveTransTo(d, r)
	} else {
		lu.SolveTo(d, r)
	}
}
