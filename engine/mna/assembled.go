package mna

import (
	"slices"

	"zport/engine/dd"
)

// assembled is an Active's float64 matrix entry by entry: each distinct
// (row, column) once, in rows and then columns ascending, with its value
// (the sum of its terms, in their order, as System.Assemble forms it) and
// the sum S of its terms' magnitudes. The terms that never change (the
// conductance-like ones, and the ±1) come first in every entry they share
// with others, so their partial sums are formed once; at each frequency
// only the capacitance-like and controlled-source terms are added.
type assembled struct {
	m       Matrix  // the entries: rows I, columns J, values val
	rowPtr  []int32 // row i's entries are rowPtr[i]:rowPtr[i+1]
	base    []complex128
	baseAbs []float64
	varE    []int32 // the terms added at each frequency: their entry
	varK    []int32 // and their index in System.Values
	val     []complex128
	sabs    []float64
	// gamma is, row by row, the relative bound ResidualBound puts on
	// what its float64 residual and the entries' rounding can hide (see
	// there); gbase its part that depends on the counts only.
	gamma, gbase []float64
	ax           []float64
}

// assemble works out a's entries from its terms.
func (a *Active) assemble(s *System) {
	m := &a.asm
	n := a.N
	type key struct{ i, j int32 }
	index := map[key]int32{}
	keys := make([]key, 0, len(a.I))
	for t := range a.I {
		k := key{a.I[t], a.J[t]}
		if _, ok := index[k]; !ok {
			index[k] = 0
			keys = append(keys, k)
		}
	}
	slices.SortFunc(keys, func(x, y key) int {
		if x.i != y.i {
			return int(x.i - y.i)
		}
		return int(x.j - y.j)
	})
	ne := len(keys)
	m.rowPtr = make([]int32, n+1)
	m.m = Matrix{N: n, I: make([]int32, ne), J: make([]int32, ne)}
	for e, k := range keys {
		index[k] = int32(e)
		m.m.I[e], m.m.J[e] = k.i, k.j
		m.rowPtr[k.i+1]++
	}
	for i := 0; i < n; i++ {
		m.rowPtr[i+1] += m.rowPtr[i]
	}
	m.base = make([]complex128, ne)
	m.baseAbs = make([]float64, ne)
	m.val = make([]complex128, ne)
	m.m.V = m.val
	m.sabs = make([]float64, ne)
	m.ax = make([]float64, n)
	varied := make([]bool, ne) // an entry has had a varying term
	terms := make([]int32, ne) // terms per entry
	nf := int32(len(s.g))
	for t := range a.I {
		e := index[key{a.I[t], a.J[t]}]
		terms[e]++
		k := a.K[t]
		fixed := t < len(a.g) || t >= len(a.I)-len(a.unit)
		if fixed && !varied[e] {
			v := complex(1, 0)
			switch {
			case k == 1:
				v = -1
			case k >= 2 && k < 2+nf:
				v = complex(s.g[k-2].v, 0)
			}
			m.base[e] += v
			m.baseAbs[e] += Abs(v)
			continue
		}
		varied[e] = true
		m.varE = append(m.varE, e)
		m.varK = append(m.varK, k)
	}
	m.gamma = make([]float64, n)
	m.gbase = make([]float64, n)
	for i := 0; i < n; i++ {
		lo, hi := m.rowPtr[i], m.rowPtr[i+1]
		most := int32(0)
		for e := lo; e < hi; e++ {
			most = max(most, terms[e])
		}
		m.gbase[i] = float64(hi-lo+most) - 0.5
	}
}

// Matrix returns the Active's float64 matrix, as its distinct entries with
// their values at the frequency of the last At.
func (a *Active) Matrix() *Matrix { return &a.asm.m }

// At sums the entries from the values v of Precise.Values and their
// magnitudes av.
func (a *Active) At(v []complex128, av []float64) {
	m := &a.asm
	copy(m.val, m.base)
	copy(m.sabs, m.baseAbs)
	for i, e := range m.varE {
		k := m.varK[i]
		m.val[e] += v[k]
		m.sabs[e] += av[k]
	}
}

// Entries is the number of the matrix's distinct entries: the complex
// multiply-adds of a ResidualBound.
func (a *Active) Entries() int { return len(a.asm.val) }

// Gamma returns the relative bounds of the last ResidualBound, row by row.
func (a *Active) Gamma() []float64 { return a.asm.gamma }

// ResidualBound writes w, a componentwise bound on the exact residual
// |b − A·x| of a float64 x for the exact coefficients of the parts, at the
// frequency of the last At; mag receives |b| + S·|x|, S the sums of the
// magnitudes of the coefficients that meet in each entry. The float64
// residual b − Â·x of the assembled entries Â is left in r, and
//
//	w = |r|·(1 + 4·2⁻⁵³) + γ·(|b| + S·|x|), row by row,
//
// where γ covers, in moduli, what the float64 residual's own rounding can
// hide ((nᵢ + p)·2⁻⁵³ of |b| + |Â|·|x| for a row of nᵢ entries: each sum
// rounds by 2⁻⁵³ of the partial sum, each product by p·2⁻⁵³, p = √5 for
// entries with a real and an imaginary part (Brent, Percival and
// Zimmermann, Math. Comp. 76, 2007), 1 where every entry of the row is
// real or imaginary) and how far each Â entry is from the sum of the exact
// coefficients ((m − 1)·2⁻⁵³ for the sum of its m terms, and 2⁻⁵⁴ for each
// term, a double-double coefficient rounded): γᵢ = (nᵢ + mᵢ − ½ + p)·
// 2⁻⁵³·1.01, mᵢ the most terms an entry of row i sums; the 1.01 covers
// the second-order terms and the rounding of S·|x| itself. The assembled entries are
// enough for this bound — it counts the loss of a small conductance
// summed beside a large one in γ·S·|x| — and there are fewer of them than
// terms; the refinement that recovers such a conductance needs the terms
// themselves (Residual).
func (a *Active) ResidualBound(w, mag []float64, r []complex128, b, x []complex128) {
	m := &a.asm
	n := a.N
	r, ax := r[:n], m.ax[:n]
	for i := range ax {
		ax[i] = Abs(x[i])
	}
	cols, val, sabs := m.m.J, m.val, m.sabs
	for i := 0; i < n; i++ {
		ri, mi := b[i], Abs(b[i])
		lo, hi := m.rowPtr[i], m.rowPtr[i+1]
		p := 1.0
		for e := lo; e < hi; e++ {
			j, v := cols[e], val[e]
			ri -= v * x[j]
			mi += sabs[e] * ax[j]
			if real(v) != 0 && imag(v) != 0 {
				p = 2.2361 // √5
			}
		}
		g := (m.gbase[i] + p) * (dd.U * 1.01)
		r[i], mag[i], m.gamma[i] = ri, mi, g
		w[i] = Abs(ri)*(1+4*dd.U) + g*mi
	}
}
