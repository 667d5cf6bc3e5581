package mna

import (
	"math"
	"math/cmplx"
)

// PivotTolerance is the smallest pivot magnitude, relative to the
// equilibrated matrix whose rows and columns all have largest entry 1, that
// Factor accepts.
const PivotTolerance = 1e-14

// Matrix is a sparse n×n matrix as its entries: entry e is V[e], at row
// I[e] and column J[e]. Each position appears at most once, and the
// entries go row by row (rows ascending), as Active.Matrix gives them.
//
// I and J are the matrix's structure: an LU records its factorization's
// structure for them and reuses it for as long as they are the same slices
// (so they must not be changed in place once factored); V may change
// between factorizations.
type Matrix struct {
	N    int
	I, J []int32
	V    []complex128
}

// LU is a factorization P·Dr·A·Dc = L·U of a complex matrix.
//
// The first factorizations of a Matrix run the dense elimination; from the
// second on, the structure of the factorization (its pivot order and
// where L and U have nonzeros, fill included) is recorded for the Matrix's
// terms, and the next ones assemble the terms straight into that layout
// and eliminate along it, in time proportional to the nonzeros, for as
// long as partial pivoting picks the same pivots. Either way the result is
// bit for bit what the dense elimination gives.
type LU struct {
	n      int
	piv    []int
	rs, cs []float64    // row and column scale factors
	inv    []complex128 // reciprocals of U's diagonal
	norm1  float64      // 1-norm of the equilibrated matrix
	work   []complex128
	spare  []complex128
	cmax   []float64

	// The dense elimination: a holds L below the diagonal (unit) and U on
	// and above, while sparse is false.
	a  []complex128
	nz []int

	sym    *symbolic    // the structure of the factors in vals
	syms   []*symbolic  // the structures recorded, the last used first
	vals   []complex128 // the factors in sym's layout, while sparse is true
	sparse bool
	full   int    // dense factorizations so far
	dm     Matrix // Factor's matrix, as terms

	count int // complex multiply-adds so far (MulAdds)
	nnz   int // nonzeros of the dense factors, a dense solve's count
}

// Singular reports a failed factorization: the equilibrated matrix has a
// zero row, a zero column, or a pivot below PivotTolerance at Index (an
// unknown's index, before pivoting for columns).
type Singular struct {
	Index int
	Kind  string // "row", "column" or "pivot"
}

func (e *Singular) Error() string { return "singular system (" + e.Kind + ")" }

// Factor factors the n×n row-major matrix a, which it leaves unchanged.
// Its nonzeros are the entries of a Matrix, whose structure is kept while
// the nonzeros of later matrices stay within it.
func (lu *LU) Factor(a []complex128, n int) error {
	m := &lu.dm
	same := m.N == n && len(lu.syms) > 0
	if same {
		// Within the recorded structure: its positions, the new values.
		seen := 0
		for t := range m.I {
			v := a[int(m.I[t])*n+int(m.J[t])]
			m.V[t] = v
			if v != 0 {
				seen++
			}
		}
		for _, v := range a[:n*n] {
			if v != 0 {
				seen--
			}
		}
		same = seen == 0
	}
	if !same {
		*m = Matrix{N: n}
		for q, v := range a[:n*n] {
			if v != 0 {
				m.I = append(m.I, int32(q/n))
				m.J = append(m.J, int32(q%n))
				m.V = append(m.V, v)
			}
		}
	}
	return lu.FactorMatrix(m)
}

// FactorMatrix factors m.
func (lu *LU) FactorMatrix(m *Matrix) error {
	n := m.N
	lu.n = n
	if cap(lu.piv) < n {
		lu.piv = make([]int, n)
		lu.rs = make([]float64, n)
		lu.cs = make([]float64, n)
		lu.cmax = make([]float64, n)
		lu.work = make([]complex128, n)
		lu.nz = make([]int, 0, n)
		lu.inv = make([]complex128, n)
	}
	lu.piv, lu.rs, lu.cs, lu.cmax = lu.piv[:n], lu.rs[:n], lu.cs[:n], lu.cmax[:n]
	lu.inv, lu.work = lu.inv[:n], lu.work[:n]
	if len(lu.syms) > 0 && lu.syms[0].of(m) && lu.equilibrate(m) {
		// Circuits switch between a few pivot orders across a sweep:
		// each recorded structure is tried, the last used first.
		for i, s := range lu.syms {
			if lu.refactor(m, s) {
				copy(lu.syms[1:i+1], lu.syms[:i])
				lu.syms[0] = s
				lu.sym, lu.sparse = s, true
				lu.count += len(s.upd) + len(s.candPos) + n
				return nil
			}
		}
	}
	lu.sparse = false
	if cap(lu.a) < n*n {
		lu.a = make([]complex128, n*n)
	}
	a := lu.a[:n*n]
	lu.a = a
	clear(a)
	for e, v := range m.V {
		a[int(m.I[e])*n+int(m.J[e])] = v
	}
	if err := lu.factorDense(a, n); err != nil {
		return err
	}
	lu.nnz = 0
	for _, v := range a {
		if v != 0 {
			lu.nnz++
		}
	}
	// The structure pays for itself only when the same system comes back
	// (a sweep); a one-off factorization (a Monte Carlo trial) skips it.
	if len(lu.syms) > 0 && !lu.syms[0].of(m) {
		lu.syms = lu.syms[:0] // another matrix
	}
	if lu.full > 0 {
		s := symbolicOf(m, lu.piv)
		if len(lu.syms) < maxStructures {
			lu.syms = append(lu.syms, nil)
		}
		copy(lu.syms[1:], lu.syms)
		lu.syms[0] = s
		if cap(lu.vals) < len(s.cols) {
			lu.vals = make([]complex128, len(s.cols))
		}
	}
	lu.full++
	return nil
}

// maxStructures is how many structures an LU keeps: the pivot orders a
// sweep keeps coming back to.
const maxStructures = 4

// factorDense equilibrates and factors the dense a in place.
func (lu *LU) factorDense(a []complex128, n int) error {
	// Equilibrate rows, then columns, to largest magnitude 1 (powers of two
	// so the scaling itself is exact).
	for i := 0; i < n; i++ {
		m := 0.0
		for _, v := range a[i*n : i*n+n] {
			if v != 0 {
				if x := abs1(v); x > m {
					m = x
				}
			}
		}
		if m == 0 {
			return &Singular{Index: i, Kind: "row"}
		}
		lu.rs[i] = pow2inv(m)
	}
	cmax, csum := lu.cmax, lu.cs // cs holds column sums for now
	clear(cmax)
	clear(csum)
	for i := 0; i < n; i++ {
		ri := lu.rs[i]
		for j, v := range a[i*n : i*n+n] {
			if v != 0 {
				x := abs1(v) * ri
				csum[j] += x
				if x > cmax[j] {
					cmax[j] = x
				}
			}
		}
	}
	if err := lu.colScales(); err != nil {
		return err
	}
	for i := 0; i < n; i++ {
		ri := lu.rs[i]
		row := a[i*n : i*n+n]
		for j, v := range row {
			if v != 0 {
				sc := ri * lu.cs[j]
				row[j] = complex(real(v)*sc, imag(v)*sc)
			}
		}
	}
	return lu.eliminate(a, n)
}

// colScales turns the column maxima (lu.cmax) and sums of the
// row-equilibrated matrix (in lu.cs) into the column scales and the
// 1-norm of the equilibrated matrix.
func (lu *LU) colScales() error {
	lu.norm1 = 0
	for j, c := range lu.cmax {
		if c == 0 {
			return &Singular{Index: j, Kind: "column"}
		}
		s := pow2inv(c)
		if x := lu.cs[j] * s; x > lu.norm1 {
			lu.norm1 = x // the 1-norm, for Cond
		}
		lu.cs[j] = s
	}
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
		lu.count++
		for i := k + 1; i < n; i++ {
			l := a[i*n+k]
			if l == 0 {
				continue
			}
			lu.count += 1 + len(nz)
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

// equilibrate computes the row and column scales of m as factorDense
// does: row maxima, then the column maxima and sums of the row-scaled
// entries, summed in row order. It reports false when a row or a column
// is zero (the dense elimination then says which).
func (lu *LU) equilibrate(m *Matrix) bool {
	rows, cols := m.I, m.J
	rmax := lu.rs
	clear(rmax)
	for e, v := range m.V {
		if x := abs1(v); x > rmax[rows[e]] {
			rmax[rows[e]] = x
		}
	}
	for r, x := range rmax {
		if x == 0 {
			return false
		}
		rmax[r] = pow2inv(x)
	}
	cmax, csum := lu.cmax, lu.cs
	clear(cmax)
	clear(csum)
	for e, v := range m.V {
		if v != 0 {
			j := cols[e]
			x := abs1(v) * lu.rs[rows[e]]
			csum[j] += x
			if x > cmax[j] {
				cmax[j] = x
			}
		}
	}
	return lu.colScales() == nil
}

// refactor places m's entries, equilibrated, in the layout of s and
// eliminates along it when partial pivoting picks the pivots of s again;
// it reports false as soon as it would not. Every operation is the dense
// elimination's, in its order, on the same values: only the search for
// nonzeros is saved, never a pivoting decision.
func (lu *LU) refactor(m *Matrix, s *symbolic) bool {
	n := s.n
	rows, cols := m.I, m.J
	vals := lu.vals[:len(s.cols)]
	for _, q := range s.fill {
		vals[q] = 0
	}
	for e, v := range m.V {
		sc := lu.rs[rows[e]] * lu.cs[cols[e]]
		vals[s.entryPos[e]] = complex(real(v)*sc, imag(v)*sc)
	}
	c, u := 0, 0 // the next candidate, and its update positions
	for k := 0; k < n; k++ {
		d := s.diag[k]
		pm := abs1(vals[d])
		if pm <= PivotTolerance {
			return false
		}
		inv := recip(vals[d])
		lu.inv[k] = inv
		urow := vals[d+1 : s.rowStart[k+1]]
		for ce := s.candEnd[k]; c < ce; c++ {
			q := s.candPos[c]
			upd := s.upd[u : u+len(urow)]
			u += len(urow)
			l := vals[q]
			// Partial pivoting takes the first largest candidate in the
			// rows' order at this step: the recorded pivot must beat those
			// before it and not lose to those after. (Updating a candidate
			// leaves the others' column k alone; on failure the caller
			// places the entries again.)
			if m := abs1(l); m > pm || m == pm && s.candBefore[c] {
				return false
			}
			if l == 0 {
				continue
			}
			l *= inv
			vals[q] = l
			for t, w := range urow {
				if w != 0 {
					vals[upd[t]] -= l * w
				}
			}
		}
	}
	copy(lu.piv, s.piv)
	return true
}

// symbolic is the structure of a factorization of a Matrix's terms: its
// pivot order, and a layout holding L and U row by row (fill included),
// with the elimination's steps written out as positions in it.
type symbolic struct {
	n     int
	I, J  []int32 // the Matrix's structure it was made for
	piv   []int   // row interchanges, as LU.piv
	order []int32 // row i of the factors is row order[i] of the matrix

	rowStart []int32 // row i's entries are rowStart[i]:rowStart[i+1]
	cols     []int32 // the column of each entry, ascending within a row
	diag     []int32 // the position of row i's diagonal: L before it, U after
	entryPos []int32 // where each entry of the Matrix goes
	fill     []int32 // the positions no entry of the Matrix takes

	// Step k eliminates column k from the rows candPos[candEnd[k−1]:candEnd[k]]
	// (the positions of their column-k entries), each along U's row k at the
	// next len(U row k) positions of upd; candBefore marks the rows that
	// came before the pivot's in the dense elimination's order at step k.
	candPos    []int32
	candBefore []bool
	candEnd    []int
	upd        []int32
}

// of reports whether s was recorded for m's structure.
func (s *symbolic) of(m *Matrix) bool {
	return s.n == m.N && same(s.I, m.I) && same(s.J, m.J)
}

// same reports whether a and b are the same slice.
func same(a, b []int32) bool {
	return len(a) == len(b) && (len(a) == 0 || &a[0] == &b[0])
}

// symbolicOf runs the elimination on booleans: m's structure, the pivot
// order piv, full-row interchanges as the dense elimination makes them.
func symbolicOf(m *Matrix, piv []int) *symbolic {
	n := m.N
	s := &symbolic{n: n, I: m.I, J: m.J, piv: append([]int(nil), piv...),
		order: make([]int32, n), rowStart: make([]int32, n+1),
		diag: make([]int32, n), entryPos: make([]int32, len(m.I)), candEnd: make([]int, n)}
	b := make([]bool, n*n) // by the matrix's own rows
	for t := range m.I {
		b[int(m.I[t])*n+int(m.J[t])] = true
	}
	cur := make([]int32, n) // the dense elimination's row at each position
	for i := range cur {
		cur[i] = int32(i)
	}
	type cand struct {
		row    int32
		before bool
	}
	steps := make([][]cand, n)
	for k := 0; k < n; k++ {
		p := int32(piv[k])
		r := cur[p]
		rr := b[int(r)*n : int(r)*n+n]
		for pos := k; pos < n; pos++ {
			c := cur[pos]
			if c == r || !b[int(c)*n+k] {
				continue
			}
			steps[k] = append(steps[k], cand{c, int32(pos) < p})
			rc := b[int(c)*n : int(c)*n+n]
			for j := k + 1; j < n; j++ {
				if rr[j] {
					rc[j] = true
				}
			}
		}
		cur[k], cur[p] = cur[p], cur[k]
		s.order[k] = r
	}
	// The layout, and where each (row, column) of the matrix lies in it.
	at := make([]int32, n*n)
	for i := 0; i < n; i++ {
		r := int(s.order[i])
		s.rowStart[i] = int32(len(s.cols))
		for j, nz := range b[r*n : r*n+n] {
			if nz {
				if j == i {
					s.diag[i] = int32(len(s.cols))
				}
				at[r*n+j] = int32(len(s.cols))
				s.cols = append(s.cols, int32(j))
			}
		}
	}
	s.rowStart[n] = int32(len(s.cols))
	taken := make([]bool, len(s.cols))
	for e := range m.I {
		q := at[int(m.I[e])*n+int(m.J[e])]
		s.entryPos[e] = q
		taken[q] = true
	}
	for q, t := range taken {
		if !t {
			s.fill = append(s.fill, int32(q))
		}
	}
	for k := 0; k < n; k++ {
		ucols := s.cols[s.diag[k]+1 : s.rowStart[k+1]]
		for _, c := range steps[k] {
			row := int(c.row) * n
			s.candPos = append(s.candPos, at[row+k])
			s.candBefore = append(s.candBefore, c.before)
			for _, j := range ucols {
				s.upd = append(s.upd, at[row+int(j)])
			}
		}
		s.candEnd[k] = len(s.candPos)
	}
	return s
}

// MulAdds returns the complex multiply-adds lu has done so far, in its
// factorizations (one per update of an entry, per multiplier and per
// reciprocal pivot) and solves (one per nonzero of L and U): the
// arithmetic its work needs, which benchmarks hold its time against.
func (lu *LU) MulAdds() int { return lu.count }

// solveCount is the multiply-adds of one solve with the current factors.
func (lu *LU) solveCount() int {
	if lu.sparse {
		return len(lu.sym.cols)
	}
	return lu.nnz
}

// SolveTo solves A·x = b into dst (len n), leaving b unchanged. dst and b
// may be the same slice.
func (lu *LU) SolveTo(dst, b []complex128) []complex128 {
	n, y := lu.n, lu.work
	if lu.sparse {
		// The rows in the factors' order: the interchanges, at once.
		for i, r := range lu.sym.order {
			y[i] = scale(b[r], lu.rs[r])
		}
		lu.sparseSolve(y)
	} else {
		for i := 0; i < n; i++ {
			y[i] = scale(b[i], lu.rs[i])
		}
		for k := 0; k < n; k++ {
			if p := lu.piv[k]; p != k {
				y[k], y[p] = y[p], y[k]
			}
		}
		lu.denseSolve(y)
	}
	lu.count += lu.solveCount()
	for i := 0; i < n; i++ {
		dst[i] = scale(y[i], lu.cs[i])
	}
	return dst
}

// sparseSolve runs the triangular solves along the recorded layout.
func (lu *LU) sparseSolve(y []complex128) {
	s, vals := lu.sym, lu.vals
	for i := 1; i < s.n; i++ {
		sum := y[i]
		lo, d := s.rowStart[i], s.diag[i]
		for p, l := range vals[lo:d] {
			if l != 0 {
				sum -= l * y[s.cols[lo+int32(p)]]
			}
		}
		y[i] = sum
	}
	for i := s.n - 1; i >= 0; i-- {
		sum := y[i]
		d, hi := s.diag[i]+1, s.rowStart[i+1]
		for p, u := range vals[d:hi] {
			if u != 0 {
				sum -= u * y[s.cols[d+int32(p)]]
			}
		}
		y[i] = sum * lu.inv[i]
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
	n, v := lu.n, lu.work
	for i := 0; i < n; i++ {
		v[i] = scale(b[i], lu.cs[i])
	}
	lu.count += lu.solveCount()
	if lu.sparse {
		lu.sparseSolveTrans(v)
		for i, r := range lu.sym.order {
			dst[r] = scale(v[i], lu.rs[r])
		}
		return dst
	}
	lu.denseSolveTrans(v)
	for k := n - 1; k >= 0; k-- {
		if p := lu.piv[k]; p != k {
			v[k], v[p] = v[p], v[k]
		}
	}
	for i := 0; i < n; i++ {
		dst[i] = scale(v[i], lu.rs[i])
	}
	return dst
}

// sparseSolveTrans solves Uᵀ·Lᵀ·x = v in place along the layout.
func (lu *LU) sparseSolveTrans(v []complex128) {
	s, vals := lu.sym, lu.vals
	// Uᵀ is lower triangular: finish each unknown, then push it into the
	// later rows along row i of U.
	for i := 0; i < s.n; i++ {
		w := v[i] * lu.inv[i]
		v[i] = w
		if w == 0 {
			continue
		}
		d, hi := s.diag[i]+1, s.rowStart[i+1]
		for p, u := range vals[d:hi] {
			if u != 0 {
				v[s.cols[d+int32(p)]] -= u * w
			}
		}
	}
	// Lᵀ is unit upper triangular: from the last unknown up, pushing along
	// row i of L.
	for i := s.n - 1; i > 0; i-- {
		z := v[i]
		if z == 0 {
			continue
		}
		lo, d := s.rowStart[i], s.diag[i]
		for p, l := range vals[lo:d] {
			if l != 0 {
				v[s.cols[lo+int32(p)]] -= l * z
			}
		}
	}
}

// denseSolveTrans is sparseSolveTrans over the dense factor.
func (lu *LU) denseSolveTrans(v []complex128) {
	n, a := lu.n, lu.a
	for i := 0; i < n; i++ {
		w := v[i] * lu.inv[i]
		v[i] = w
		if w == 0 {
			continue
		}
		row := a[i*n : i*n+n]
		for j := i + 1; j < n; j++ {
			if u := row[j]; u != 0 {
				v[j] -= u * w
			}
		}
	}
	for i := n - 1; i > 0; i-- {
		z := v[i]
		if z == 0 {
			continue
		}
		row := a[i*n : i*n+n]
		for j := 0; j < i; j++ {
			if l := row[j]; l != 0 {
				v[j] -= l * z
			}
		}
	}
}

// work2 is scratch of length n for callers of SolveTo within the package.
func (lu *LU) work2(n int) []complex128 {
	if cap(lu.spare) < n {
		lu.spare = make([]complex128, n)
	}
	return lu.spare[:n]
}

// scale is z·s for a real s (a power of two here, so exact).
func scale(z complex128, s float64) complex128 { return complex(real(z)*s, imag(z)*s) }

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
	n, a := lu.n, lu.dense()
	x := make([]complex128, n)
	y := make([]complex128, n)
	for i := range x {
		x[i] = complex(1/float64(n), 0)
	}
	est := 0.0
	for iter := 0; iter < 5; iter++ {
		lu.solveScaled(a, y, x, false)
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
		lu.solveScaled(a, x, y, true)
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

// dense returns the factors as a dense n×n matrix.
func (lu *LU) dense() []complex128 {
	if !lu.sparse {
		return lu.a
	}
	s, n := lu.sym, lu.n
	a := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for p := s.rowStart[i]; p < s.rowStart[i+1]; p++ {
			a[i*n+int(s.cols[p])] = lu.vals[p]
		}
	}
	return a
}

// solveScaled solves the equilibrated system Ã·x = b, or Ãᴴ·x = b.
// a is the factors as dense returns them.
func (lu *LU) solveScaled(a, dst, b []complex128, conjTrans bool) {
	n := lu.n
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
