package mna

// SolveTransTo solves Aᵀ·x = b into dst (len n) — the transpose, not the
// conjugate transpose — with the factorization of A, leaving b unchanged.
// dst and b may be the same slice.
//
// It is the adjoint system's solve: with d reading an output from the
// unknowns (y = dᵀx), z = A⁻ᵀd gives the output's response to every entry
// of a right-hand side at once, y = zᵀb, so the transfers from many
// sources to one output cost one solve rather than one per source.
//
// With P·Dr·A·Dc = L·U, A⁻ᵀ = Dr·Pᵀ·L⁻ᵀ·U⁻ᵀ·Dc: scale by the column
// factors, solve with Uᵀ (lower triangular) and Lᵀ (unit upper), undo the
// row interchanges in reverse order, and scale by the row factors. The
// factor is stored by rows, so both triangular solves run along rows,
// subtracting each solved unknown from those that follow it.
func (lu *LU) SolveTransTo(dst, b []complex128) []complex128 {
	n, a, y := lu.n, lu.a, lu.work
	for i := 0; i < n; i++ {
		y[i] = b[i] * complex(lu.cs[i], 0)
	}
	sym := lu.sym
	// Uᵀ·v = y, forward: v_i is final once the rows above have been
	// subtracted; row i of U then updates the unknowns after i.
	for i := 0; i < n; i++ {
		v := y[i] * lu.inv[i]
		y[i] = v
		if v == 0 {
			continue
		}
		row := a[i*n : i*n+n]
		if sym != nil {
			for _, j := range sym.ucols[i] {
				y[j] -= row[j] * v
			}
			continue
		}
		for j := i + 1; j < n; j++ {
			if u := row[j]; u != 0 {
				y[j] -= u * v
			}
		}
	}
	// Lᵀ·w = v, backward, unit diagonal: row i of L updates the unknowns
	// before i.
	for i := n - 1; i > 0; i-- {
		w := y[i]
		if w == 0 {
			continue
		}
		row := a[i*n : i*n+i]
		if sym != nil {
			for _, j := range sym.lcols[i] {
				y[j] -= row[j] * w
			}
			continue
		}
		for j, l := range row {
			if l != 0 {
				y[j] -= l * w
			}
		}
	}
	for k := n - 1; k >= 0; k-- {
		if p := lu.piv[k]; p != k {
			y[k], y[p] = y[p], y[k]
		}
	}
	for i := 0; i < n; i++ {
		dst[i] = y[i] * complex(lu.rs[i], 0)
	}
	return dst
}
