package mna

import (
	"math"
	"math/cmplx"
)

// PivotTolerance is the smallest pivot magnitude, relative to the
// equilibrated matrix whose rows and columns all have largest entry 1, that
// Factor accepts.
const PivotTolerance = 1e-14

// LU is a factorization P·Dr·A·Dc = L·U of a dense complex matrix.
type LU struct {
	n      int
	a      []complex128 // L below the diagonal (unit), U on and above
	piv    []int
	rs, cs []float64 // row and column scale factors
	work   []complex128
	nz     []int
	pos    []int32      // nonzero positions of the assembled matrix
	rowEnd []int        // where each row's nonzeros end in pos
	sym    *symbolic    // the structure of the last full factorization
	full   int          // full factorizations so far
	orig   []complex128 // the equilibrated matrix, while a refactor is tried
	inv    []complex128 // reciprocals of U's diagonal
	norm1  float64      // 1-norm of the equilibrated matrix
	spare  []complex128
}

// Singular reports a failed factorization: the equilibrated matrix has a
// zero row, a zero column, or a pivot below PivotTolerance at Index (an
// unknown's index, before pivoting for columns).
type Singular struct {
	Index int
	Kind  string // "row", "column" or "pivot"
}

func (e *Singular) Error() string { return "singular system (" + e.Kind + ")" }

// Factor factors the n×n row-major matrix a in place (a is kept by lu and
// must not be reused by the caller until the next Factor).
func (lu *LU) Factor(a []complex128, n int) error {
	lu.n = n
	lu.a = a
	if cap(lu.piv) < n {
		lu.piv = make([]int, n)
		lu.rs = make([]float64, n)
		lu.cs = make([]float64, n)
		lu.work = make([]complex128, n)
		lu.nz = make([]int, 0, n)
		lu.inv = make([]complex128, n)
		lu.pos = make([]int32, 0, 4*n)
	}
	lu.inv = lu.inv[:n]
	lu.piv, lu.rs, lu.cs, lu.work = lu.piv[:n], lu.rs[:n], lu.cs[:n], lu.work[:n]
	// Equilibrate rows, then columns, to largest magnitude 1 (powers of two
	// so the scaling itself is exact). One pass over the whole matrix finds
	// the nonzeros and the row maxima; the rest runs over the nonzeros only.
	pos := lu.pos[:0]
	if cap(lu.rowEnd) < n {
		lu.rowEnd = make([]int, n)
	}
	rowEnd := lu.rowEnd[:n] // pos[rowEnd[i-1]:rowEnd[i]] are row i's
	for i := 0; i < n; i++ {
		m := 0.0
		row := a[i*n : i*n+n]
		for j, v := range row {
			if v != 0 {
				pos = append(pos, int32(i*n+j))
				if x := abs1(v); x > m {
					m = x
				}
			}
		}
		rowEnd[i] = len(pos)
		if m == 0 {
			lu.pos = pos
			return &Singular{Index: i, Kind: "row"}
		}
		lu.rs[i] = pow2inv(m)
	}
	lu.pos = pos
	cmax, csum := lu.cs, lu.work[:n] // work holds column sums (real parts) for now
	for j := range cmax {
		cmax[j] = 0
		csum[j] = 0
	}
	start := 0
	for i, end := range rowEnd {
		ri, base := lu.rs[i], i*n
		for _, q := range pos[start:end] {
			j := int(q) - base
			x := abs1(a[q]) * ri
			csum[j] += complex(x, 0)
			if x > cmax[j] {
				cmax[j] = x
			}
		}
		start = end
	}
	lu.norm1 = 0
	for j := 0; j < n; j++ {
		if cmax[j] == 0 {
			return &Singular{Index: j, Kind: "column"}
		}
		s := pow2inv(cmax[j])
		lu.norm1 = math.Max(lu.norm1, real(csum[j])*s) // the 1-norm, for Cond
		lu.cs[j] = s
	}
	start = 0
	for i, end := range rowEnd {
		ri, base := lu.rs[i], i*n
		for _, q := range pos[start:end] {
			sc := ri * lu.cs[int(q)-base]
			v := a[q]
			a[q] = complex(real(v)*sc, imag(v)*sc)
		}
		start = end
	}
	if sym := lu.sym; sym != nil && sym.n == n && sym.covers(pos) {
		// The same structure as last time: eliminate along the recorded
		// nonzeros while the pivots fall as they did.
		lu.orig = append(lu.orig[:0], a...)
		if lu.refactor(a, n) {
			return nil
		}
		copy(a, lu.orig)
	}
	if err := lu.eliminate(a, n); err != nil {
		lu.sym = nil
		return err
	}
	// The structure pays for itself only when the same system comes back
	// (a sweep); a one-off factorization (a Monte Carlo trial) skips it.
	lu.sym = nil
	if lu.full > 0 {
		lu.sym = symbolicOf(n, pos, lu.piv)
	}
	lu.full++
	return nil
}

// eliminate factors the equilibrated a with partial pivoting.
func (lu *LU) eliminate(a []complex128, n int) error {
	for k := 0; k < n; k++ {
		p, pm := k, abs1(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := a[i*n+k]; v != 0 {
				if m := abs1(v); m > pm {
					p, pm = i, m
				}
			}
		}
		lu.piv[k] = p
		if pm <= PivotTolerance {
			return &Singular{Index: k, Kind: "pivot"}
		}
		if p != k {
			rk, rp := a[k*n:k*n+n], a[p*n:p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := recip(a[k*n+k])
		lu.inv[k] = inv
		// Circuit matrices are sparse: update only the pivot row's nonzero
		// columns, so a ladder costs O(n²) rather than O(n³).
		nz := lu.nz[:0]
		for j := k + 1; j < n; j++ {
			if a[k*n+j] != 0 {
				nz = append(nz, j)
			}
		}
		lu.nz = nz
		for i := k + 1; i < n; i++ {
			l := a[i*n+k]
			if l == 0 {
				continue
			}
			l *= inv
			a[i*n+k] = l
			ri := a[i*n : i*n+n]
			rk := a[k*n : k*n+n]
			for _, j := range nz {
				ri[j] -= l * rk[j]
			}
		}
	}
	return nil
}

// refactor eliminates a along the recorded structure when partial
// pivoting picks the recorded pivot order again; it reports false (and the
// caller runs the full elimination) as soon as it would not. So the result
// is bit for bit what the full elimination gives, whatever was factored
// before: only the search for nonzeros is saved, never a pivoting decision.
func (lu *LU) refactor(a []complex128, n int) bool {
	sym := lu.sym
	for k := 0; k < n; k++ {
		p, pm := k, abs1(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := a[i*n+k]; v != 0 {
				if m := abs1(v); m > pm {
					p, pm = i, m
				}
			}
		}
		if p != sym.piv[k] || pm <= PivotTolerance {
			return false
		}
		lu.piv[k] = p
		if p != k {
			rk, rp := a[k*n:k*n+n], a[p*n:p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := recip(a[k*n+k])
		lu.inv[k] = inv
		rk := a[k*n : k*n+n]
		uc := sym.ucols[k]
		for _, i := range sym.lrows[k] {
			ri := a[int(i)*n : int(i)*n+n]
			l := ri[k]
			if l == 0 {
				continue
			}
			l *= inv
			ri[k] = l
			for _, j := range uc {
				if u := rk[j]; u != 0 {
					ri[j] -= l * u
				}
			}
		}
	}
	return true
}

// symbolic is the structure of a factorization: the pattern it was made
// for, its pivot order, and where L and U have nonzeros (fill included).
type symbolic struct {
	n       int
	pattern []bool    // n×n: positions that may be nonzero in the matrix
	piv     []int     // row interchanges, as LU.piv
	lrows   [][]int32 // step k: rows below k with a nonzero in column k
	ucols   [][]int32 // row k of U: columns after k that are nonzero
	lcols   [][]int32 // row i of the final L: columns before i that are nonzero
}

// covers reports whether every position in pos is in the pattern.
func (s *symbolic) covers(pos []int32) bool {
	for _, q := range pos {
		if !s.pattern[q] {
			return false
		}
	}
	return true
}

// symbolicOf runs the elimination on booleans: the pattern pos, the pivot
// order piv, full-row interchanges as the numeric factorization makes them.
func symbolicOf(n int, pos []int32, piv []int) *symbolic {
	s := &symbolic{n: n, pattern: make([]bool, n*n), piv: append([]int(nil), piv...),
		lrows: make([][]int32, n), ucols: make([][]int32, n), lcols: make([][]int32, n)}
	b := make([]bool, n*n)
	for _, q := range pos {
		s.pattern[q] = true
		b[q] = true
	}
	for k := 0; k < n; k++ {
		if p := piv[k]; p != k {
			rk, rp := b[k*n:k*n+n], b[p*n:p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		for j := k + 1; j < n; j++ {
			if b[k*n+j] {
				s.ucols[k] = append(s.ucols[k], int32(j))
			}
		}
		for i := k + 1; i < n; i++ {
			if !b[i*n+k] {
				continue
			}
			s.lrows[k] = append(s.lrows[k], int32(i))
			for _, j := range s.ucols[k] {
				b[i*n+int(j)] = true
			}
		}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < i; j++ {
			if b[i*n+j] {
				s.lcols[i] = append(s.lcols[i], int32(j))
			}
		}
	}
	return s
}

// SolveTo solves A·x = b into dst (len n), leaving b unchanged. dst and b
// may be the same slice.
func (lu *LU) SolveTo(dst, b []complex128) []complex128 {
	n, y := lu.n, lu.work
	for i := 0; i < n; i++ {
		y[i] = b[i] * complex(lu.rs[i], 0)
	}
	for k := 0; k < n; k++ {
		if p := lu.piv[k]; p != k {
			y[k], y[p] = y[p], y[k]
		}
	}
	sym := lu.sym
	if sym == nil {
		lu.denseSolve(y)
	} else {
		lu.sparseSolve(y, sym)
	}
	for i := 0; i < n; i++ {
		dst[i] = y[i] * complex(lu.cs[i], 0)
	}
	return dst
}

// sparseSolve runs the triangular solves along the recorded nonzeros.
func (lu *LU) sparseSolve(y []complex128, sym *symbolic) {
	n, a := lu.n, lu.a
	for i := 1; i < n; i++ {
		s := y[i]
		row := a[i*n : i*n+n]
		for _, j := range sym.lcols[i] {
			if l := row[j]; l != 0 {
				s -= l * y[j]
			}
		}
		y[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := y[i]
		row := a[i*n : i*n+n]
		for _, j := range sym.ucols[i] {
			if u := row[j]; u != 0 {
				s -= u * y[j]
			}
		}
		y[i] = s * lu.inv[i]
	}
}

// denseSolve runs the triangular solves over the whole factor, skipping
// zeros.
func (lu *LU) denseSolve(y []complex128) {
	n, a := lu.n, lu.a
	for i := 1; i < n; i++ {
		s := y[i]
		row := a[i*n : i*n+i]
		for j, l := range row {
			if l != 0 {
				s -= l * y[j]
			}
		}
		y[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := y[i]
		row := a[i*n+i+1 : i*n+n]
		yy := y[i+1 : n]
		for j, u := range row {
			if u != 0 {
				s -= u * yy[j]
			}
		}
		y[i] = s * lu.inv[i]
	}
}

// SolveTransTo solves Aᵀ·x = b (the transpose, not the conjugate
// transpose) into dst (len n), leaving b unchanged; dst and b may be the
// same slice. It is the adjoint solve that error bounds of read-outs ℓᵀx
// need: with Aᵀ·y = ℓ, the error of ℓᵀx is yᵀ(A·x_exact − A·x).
func (lu *LU) SolveTransTo(dst, b []complex128) []complex128 {
	// A = Dr⁻¹·Pᵀ·L·U·Dc⁻¹, so Uᵀ·Lᵀ·(P·Dr⁻¹·x) = Dc·b.
	n, a, v := lu.n, lu.a, lu.work
	for i := 0; i < n; i++ {
		v[i] = b[i] * complex(lu.cs[i], 0)
	}
	sym := lu.sym
	// Uᵀ is lower triangular: finish each unknown, then push it into the
	// later rows along row i of U.
	for i := 0; i < n; i++ {
		w := v[i] * lu.inv[i]
		v[i] = w
		if w == 0 {
			continue
		}
		row := a[i*n : i*n+n]
		if sym != nil {
			for _, j := range sym.ucols[i] {
				if u := row[j]; u != 0 {
					v[j] -= u * w
				}
			}
			continue
		}
		for j := i + 1; j < n; j++ {
			if u := row[j]; u != 0 {
				v[j] -= u * w
			}
		}
	}
	// Lᵀ is unit upper triangular: from the last unknown up, pushing along
	// row i of L.
	for i := n - 1; i > 0; i-- {
		z := v[i]
		if z == 0 {
			continue
		}
		row := a[i*n : i*n+n]
		if sym != nil {
			for _, j := range sym.lcols[i] {
				if l := row[j]; l != 0 {
					v[j] -= l * z
				}
			}
			continue
		}
		for j := 0; j < i; j++ {
			if l := row[j]; l != 0 {
				v[j] -= l * z
			}
		}
	}
	for k := n - 1; k >= 0; k-- {
		if p := lu.piv[k]; p != k {
			v[k], v[p] = v[p], v[k]
		}
	}
	for i := 0; i < n; i++ {
		dst[i] = v[i] * complex(lu.rs[i], 0)
	}
	return dst
}

// work2 is scratch of length n for callers of SolveTo within the package.
func (lu *LU) work2(n int) []complex128 {
	if cap(lu.spare) < n {
		lu.spare = make([]complex128, n)
	}
	return lu.spare[:n]
}

// recip is 1/z without the care Go's complex division takes for values
// near overflow: pivots here are equilibrated to magnitudes near 1.
func recip(z complex128) complex128 {
	r, i := real(z), imag(z)
	d := r*r + i*i
	return complex(r/d, -i/d)
}

// Cond estimates the 1-norm condition number of the equilibrated matrix of
// the last successful Factor (Hager's method as refined by Higham, the one
// LAPACK's xLACON uses): a relative error in the solution of about
// Cond·2⁻⁵³ is to be expected. It costs a few extra solves, so callers use
// it at a spot frequency rather than in sweeps.
func (lu *LU) Cond() float64 {
	n := lu.n
	x := make([]complex128, n)
	y := make([]complex128, n)
	for i := range x {
		x[i] = complex(1/float64(n), 0)
	}
	est := 0.0
	for iter := 0; iter < 5; iter++ {
		lu.solveScaled(y, x, false)
		e := 0.0
		for _, v := range y {
			e += cmplx.Abs(v)
		}
		if iter > 0 && e <= est {
			break
		}
		est = e
		for i, v := range y {
			if m := cmplx.Abs(v); m > 0 {
				y[i] = v / complex(m, 0)
			} else {
				y[i] = 1
			}
		}
		lu.solveScaled(x, y, true)
		j, zmax := 0, 0.0
		for i, v := range x {
			if m := cmplx.Abs(v); m > zmax {
				j, zmax = i, m
			}
		}
		clear(x)
		x[j] = 1
	}
	return est * lu.norm1
}

// solveScaled solves the equilibrated system Ã·x = b, or Ãᴴ·x = b.
func (lu *LU) solveScaled(dst, b []complex128, conjTrans bool) {
	n, a := lu.n, lu.a
	y := dst
	copy(y, b)
	if !conjTrans {
		for k := 0; k < n; k++ {
			if p := lu.piv[k]; p != k {
				y[k], y[p] = y[p], y[k]
			}
		}
		for i := 1; i < n; i++ {
			s := y[i]
			for j := 0; j < i; j++ {
				s -= a[i*n+j] * y[j]
			}
			y[i] = s
		}
		for i := n - 1; i >= 0; i-- {
			s := y[i]
			for j := i + 1; j < n; j++ {
				s -= a[i*n+j] * y[j]
			}
			y[i] = s * lu.inv[i]
		}
		return
	}
	// (P·L·U)ᴴ: solve Uᴴ·w = b, Lᴴ·v = w, then undo the pivoting.
	for i := 0; i < n; i++ {
		s := y[i]
		for j := 0; j < i; j++ {
			s -= cmplx.Conj(a[j*n+i]) * y[j]
		}
		y[i] = s * cmplx.Conj(lu.inv[i])
	}
	for i := n - 1; i >= 0; i-- {
		s := y[i]
		for j := i + 1; j < n; j++ {
			s -= cmplx.Conj(a[j*n+i]) * y[j]
		}
		y[i] = s
	}
	for k := n - 1; k >= 0; k-- {
		if p := lu.piv[k]; p != k {
			y[k], y[p] = y[p], y[k]
		}
	}
}

// abs1 is |re| + |im|, a cheap norm good enough for pivoting and scaling.
func abs1(v complex128) float64 {
	r, i := real(v), imag(v)
	if r < 0 {
		r = -r
	}
	if i < 0 {
		i = -i
	}
	return r + i
}

// pow2inv returns the power of two 2^(1−e) for 2^(e−1) ≤ m < 2^e, so
// that m·pow2inv(m) lies in [1, 2).
func pow2inv(m float64) float64 {
	// For a normal m with biased exponent E, e = E − 1022 and the result's
	// biased exponent is 2046 − E; outside that range, the general way.
	if E := int(math.Float64bits(m)>>52) & 0x7ff; E > 0 && E < 2046 {
		return math.Float64frombits(uint64(2046-E) << 52)
	}
	_, e := math.Frexp(m)
	return math.Ldexp(1, -e+1)
}
