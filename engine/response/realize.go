package response

import (
	"errors"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"

	"zport/engine/mna"
)

var impl gonum.Implementation

// model is one gain's realisation as a state-space system: for a unit step
// of the source at t = 0 from rest,
//
//	y(t) = d + cᵀξ(t),  ξ′ = A·ξ + b,  ξ(0) = 0  (t > 0),
//
// and g(s) = d + cᵀ(sI − A)⁻¹b, plus a polynomial in s when the gain is
// improper (which shows as impulses in the step, not drawn). A is m×m and
// upper quasi-triangular (real Schur form): its eigenvalues, the finite
// natural frequencies, sit in 1×1 and 2×2 diagonal blocks.
type model struct {
	m    int
	a    []float64 // m×m, row-major
	b, c []float64
	d    float64
	// raw are the natural frequencies read off A's diagonal blocks,
	// before refinement; conjugate pairs are adjacent, upper first.
	raw []complex128
}

// Why realize can fail.
var (
	errShift = errors.New("the shift is a natural frequency")
	errSchur = errors.New("the eigenvalue iteration did not converge")
)

// infinite is how much smaller than the largest |μ| an eigenvalue of the
// shift-inverted matrix may be and still count as a finite natural
// frequency: one more than 10⁹ times farther from the shift than the
// nearest is taken as instantaneous (its μ is at the level of rounding in
// a matrix whose infinite modes have index 2, about √ε of the largest).
const infinite = 1e-9

// realize builds the model of the gain cᵀx for the excitation b of the
// pencil (G + sC)x = b·u, by shift and invert: with F = G + σC and
// K = F⁻¹C, G + sC = F(I + (s − σ)K), so each finite natural frequency p is
// σ − 1/μ for an eigenvalue μ ≠ 0 of K, and each μ = 0 is an
// instantaneous (algebraic) mode. K is balanced, brought to real Schur
// form K = S·T·S⁻¹ (Hessenberg reduction and the QR algorithm), and the
// finite blocks are moved to the top (T11, μ ≠ 0) above the rest (T22,
// nilpotent up to rounding). In z = S⁻¹x the Laplace transform of the
// step response splits exactly: with W = T11⁻¹,
//
//	A = σI − W,  b = W·β₁ + Σₖ W^(k+2)·T12·T22^k·β₂,
//
// and d collects the constant parts of the algebraic modes (a closed sum
// over the powers of T22, which stop at its nilpotency index). Derived
// here; tested against direct nodal solutions at complex s.
func realize(P *mna.Pencil, bvec, cvec []float64, sigma float64) (*model, error) {
	n := P.N
	if n == 0 {
		return &model{}, nil
	}
	// F = G + σC, equilibrated: rows then columns scaled to largest entry
	// 1 by powers of two (exact), so that F⁻¹ is as accurate as the
	// circuit allows whatever its units (a conductance of 1 nS beside an
	// opamp gain of 10⁶). K = F⁻¹C = Dc·(Dr·F·Dc)⁻¹·Dr·C.
	F := make([]float64, n*n)
	for i := range F {
		F[i] = P.G[i] + sigma*P.C[i]
	}
	rs, cs := make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		m := 0.0
		for j := 0; j < n; j++ {
			m = math.Max(m, math.Abs(F[i*n+j]))
		}
		if m == 0 {
			return nil, errShift
		}
		rs[i] = pow2inv(m)
	}
	for j := 0; j < n; j++ {
		m := 0.0
		for i := 0; i < n; i++ {
			m = math.Max(m, math.Abs(F[i*n+j])*rs[i])
		}
		if m == 0 {
			return nil, errShift
		}
		cs[j] = pow2inv(m)
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			F[i*n+j] *= rs[i] * cs[j]
		}
	}
	fl, err := factorReal(F, n)
	if err != nil {
		return nil, errShift
	}
	K := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			K[i*n+j] = P.C[i*n+j] * rs[i]
		}
	}
	fl.solveColumns(K, n)
	bt := make([]float64, n)
	for i := range bt {
		bt[i] = bvec[i] * rs[i]
	}
	fl.solve(bt)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			K[i*n+j] *= cs[i]
		}
		bt[i] *= cs[i]
	}
	work := make([]float64, max(n, 1))

	// Balance (a diagonal similarity D⁻¹KD), then the Schur form
	// D⁻¹KD = Q·T·Qᵀ, so S = D·Q.
	scale := make([]float64, n)
	impl.Dgebal(lapack.Scale, n, K, n, scale)
	ct := append([]float64(nil), cvec...)
	for i := range bt {
		bt[i] /= scale[i]
		ct[i] *= scale[i]
	}
	Q, ok := schur(K, n)
	if !ok {
		return nil, errSchur
	}
	T := K

	// Move the finite blocks to the top.
	rho := 0.0
	for _, bl := range blocks(T, n) {
		rho = math.Max(rho, bl.abs)
	}
	finite := func(bl block) bool { return bl.abs > infinite*rho }
	for moved := true; moved; {
		moved = false
		first := -1
		for _, bl := range blocks(T, n) {
			if !finite(bl) {
				if first < 0 {
					first = bl.i
				}
				continue
			}
			if first >= 0 {
				if _, _, ok := impl.Dtrexc(lapack.UpdateSchur, n, T, n, Q, n, bl.i, first, work); !ok {
					return nil, errSchur
				}
				moved = true
				break
			}
		}
	}
	m := 0
	var raw []complex128
	for _, bl := range blocks(T, n) {
		if !finite(bl) {
			break
		}
		m += bl.size
		for _, mu := range bl.mu {
			raw = append(raw, complex(sigma, 0)-1/mu)
		}
	}
	q := n - m

	// β = Qᵀ·D⁻¹·F⁻¹·b and γ = Qᵀ·D·c.
	beta := make([]float64, n)
	gamma := make([]float64, n)
	for i := 0; i < n; i++ {
		for k := 0; k < n; k++ {
			beta[i] += Q[k*n+i] * bt[k]
			gamma[i] += Q[k*n+i] * ct[k]
		}
	}
	md := &model{m: m, raw: raw}
	at := func(i, j int) float64 { return T[i*n+j] }

	// W = T11⁻¹, with the block structure of T11 kept exactly.
	W := make([]float64, m*m)
	if m > 0 {
		for i := 0; i < m; i++ {
			copy(W[i*m:i*m+m], T[i*n:i*n+m])
		}
		inv := make([]float64, m*m)
		for i := 0; i < m; i++ {
			inv[i*m+i] = 1
		}
		ft, err := factorReal(W, m)
		if err != nil {
			return nil, errShift
		}
		ft.solveColumns(inv, m)
		W = inv
		for i := 0; i < m; i++ {
			for j := 0; j < i; j++ {
				if !(j == i-1 && at(i, j) != 0) {
					W[i*m+j] = 0
				}
			}
		}
	}
	mulW := func(x []float64) []float64 {
		y := make([]float64, m)
		for i := 0; i < m; i++ {
			s := 0.0
			for j := max(i-1, 0); j < m; j++ {
				s += W[i*m+j] * x[j]
			}
			y[i] = s
		}
		return y
	}

	// The algebraic modes: f2 = (I − σ·T22)⁻¹β₂ is their constant part.
	f2 := make([]float64, q)
	if q > 0 {
		M := make([]float64, q*q)
		for i := 0; i < q; i++ {
			for j := 0; j < q; j++ {
				M[i*q+j] = -sigma * at(m+i, m+j)
			}
			M[i*q+i]++
		}
		copy(f2, beta[m:])
		fm, err := factorReal(M, q)
		if err != nil {
			return nil, errShift
		}
		fm.solve(f2)
	}
	// Σₖ over the powers of T22: u collects W^(k+2)·T12·T22^k·β₂ and h
	// collects (−1)^k·Σⱼ₌₀ᵏ (−W)^j·(−σ)^(k−j)·T12·T22^k·β₂.
	u := make([]float64, m)
	h := make([]float64, m)
	if m > 0 && q > 0 {
		wnorm := 0.0
		for _, v := range W {
			wnorm = math.Max(wnorm, math.Abs(v))
		}
		wnorm *= float64(m)
		nk := append([]float64(nil), beta[m:]...)
		n0 := norm1(nk)
		reach := 1.0 // ‖W‖^k, so that the test below compares like with like
		for k := 0; k < q && n0 > 0; k++ {
			x := make([]float64, m)
			for i := 0; i < m; i++ {
				for j := 0; j < q; j++ {
					x[i] += at(i, m+j) * nk[j]
				}
			}
			t := x
			for range k + 2 {
				t = mulW(t)
			}
			axpy(u, 1, t)
			sum := make([]float64, m)
			wj := x
			for j := 0; j <= k; j++ {
				axpy(sum, math.Pow(-sigma, float64(k-j)), wj)
				wj = mulW(wj)
				for i := range wj {
					wj[i] = -wj[i]
				}
			}
			axpy(h, math.Pow(-1, float64(k)), sum)
			next := make([]float64, q)
			for i := 0; i < q; i++ {
				for j := max(i-1, 0); j < q; j++ {
					next[i] += at(m+i, m+j) * nk[j]
				}
			}
			nk = next
			reach *= wnorm
			if norm1(nk)*reach <= 1e-17*n0 {
				break
			}
		}
	}
	md.a = make([]float64, m*m)
	for i := range md.a {
		md.a[i] = -W[i]
	}
	for i := 0; i < m; i++ {
		md.a[i*m+i] += sigma
	}
	md.b = mulW(beta[:m])
	axpy(md.b, 1, u)
	md.c = append([]float64(nil), gamma[:m]...)
	wh := mulW(h)
	for i := 0; i < q; i++ {
		md.d += gamma[m+i] * f2[i]
	}
	for i := 0; i < m; i++ {
		md.d -= gamma[i] * wh[i]
	}
	return md, nil
}

// schur overwrites the n×n matrix a with its real Schur form T and returns
// Q with a = Q·T·Qᵀ on entry; false when the QR iteration did not converge.
// It is LAPACK's unblocked path — Householder reduction to Hessenberg form
// (Dgehd2), its Q (Dorg2r), and the double-shift QR algorithm (Dlahqr) —
// which is the fast one at the sizes met here and keeps the WebAssembly
// small.
func schur(a []float64, n int) ([]float64, bool) {
	tau := make([]float64, max(n-1, 1))
	work := make([]float64, max(n, 1))
	impl.Dgehd2(n, 0, n-1, a, n, tau, work)
	// Q = H(0)·H(1)…: reflector j has v[j+1] = 1 and v[j+2:] below the
	// subdiagonal of column j; shifted up one row they are Dorg2r's.
	q := make([]float64, n*n)
	q[0] = 1
	if m := n - 1; m > 0 {
		v := make([]float64, m*m)
		for r := 0; r < m; r++ {
			for c := 0; c < r; c++ {
				v[r*m+c] = a[(r+1)*n+c]
			}
		}
		impl.Dorg2r(m, m, m-1, v, m, tau[:m-1], work)
		for r := 0; r < m; r++ {
			copy(q[(r+1)*n+1:(r+2)*n], v[r*m:(r+1)*m])
		}
	}
	for i := 2; i < n; i++ {
		for j := 0; j < i-1; j++ {
			a[i*n+j] = 0
		}
	}
	wr, wi := make([]float64, n), make([]float64, n)
	if impl.Dlahqr(true, true, n, 0, n-1, a, n, wr, wi, 0, n-1, q, n) != 0 {
		return nil, false
	}
	return q, true
}

// block is a diagonal block of a real Schur form: rows i … i+size−1, its
// eigenvalues mu (a conjugate pair, upper first, for a 2×2 block) and
// their magnitude.
type block struct {
	i, size int
	mu      []complex128
	abs     float64
}

// blocks lists the diagonal blocks of the n×n Schur form t.
func blocks(t []float64, n int) []block {
	var out []block
	for i := 0; i < n; {
		if i+1 < n && t[(i+1)*n+i] != 0 {
			re := t[i*n+i]
			im := math.Sqrt(math.Abs(t[i*n+i+1] * t[(i+1)*n+i]))
			mu := complex(re, im)
			out = append(out, block{i: i, size: 2, mu: []complex128{mu, cmplx.Conj(mu)}, abs: cmplx.Abs(mu)})
			i += 2
			continue
		}
		out = append(out, block{i: i, size: 1, mu: []complex128{complex(t[i*n+i], 0)}, abs: math.Abs(t[i*n+i])})
		i++
	}
	return out
}

func axpy(dst []float64, a float64, x []float64) {
	for i, v := range x {
		dst[i] += a * v
	}
}

func norm1(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += math.Abs(v)
	}
	return s
}

// at evaluates g(s) = d + cᵀ(sI − A)⁻¹b by back substitution through A's
// quasi-triangular blocks; x receives (sI − A)⁻¹b (len m).
func (md *model) at(s complex128, x []complex128) complex128 {
	md.solve(x, s, nil)
	g := complex(md.d, 0)
	for i, v := range md.c {
		g += complex(v, 0) * x[i]
	}
	return g
}

// slope returns dg/ds at s, given x = (sI − A)⁻¹b from at; y is scratch.
func (md *model) slope(s complex128, x, y []complex128) complex128 {
	md.solve(y, s, x)
	var d complex128
	for i, v := range md.c {
		d -= complex(v, 0) * y[i]
	}
	return d
}

// solve writes (sI − A)⁻¹·rhs into x, where rhs is md.b when nil.
func (md *model) solve(x []complex128, s complex128, rhs []complex128) {
	m, a := md.m, md.a
	r := func(i int) complex128 {
		if rhs == nil {
			return complex(md.b[i], 0)
		}
		return rhs[i]
	}
	for i := m - 1; i >= 0; {
		two := i > 0 && a[i*m+i-1] != 0
		top := i
		if two {
			top = i - 1
		}
		// The right-hand side of rows top … i, less what the rows below
		// contribute.
		var v [2]complex128
		for k := top; k <= i; k++ {
			t := r(k)
			for j := i + 1; j < m; j++ {
				t += complex(a[k*m+j], 0) * x[j]
			}
			v[k-top] = t
		}
		if !two {
			x[i] = v[0] / (s - complex(a[i*m+i], 0))
			i--
			continue
		}
		// 2×2: [s − a11, −a12; −a21, s − a22]·[x1; x2] = v.
		p, q := s-complex(a[top*m+top], 0), complex(-a[top*m+i], 0)
		u, w := complex(-a[i*m+top], 0), s-complex(a[i*m+i], 0)
		det := p*w - q*u
		x[top] = (w*v[0] - q*v[1]) / det
		x[i] = (p*v[1] - u*v[0]) / det
		i -= 2
	}
}

// pow2inv is the power of two nearest 1/m from below in magnitude, so
// that scaling by it is exact.
func pow2inv(m float64) float64 {
	_, e := math.Frexp(m)
	return math.Ldexp(1, -e)
}
