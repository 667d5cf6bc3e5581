package response

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack"
)

// Small dense real matrices, row-major, for the model's own algebra: the
// products of the matrix exponential and the solves with the shifted
// pencil.

// mul writes the n×n product a·b into dst and returns it.
func mul(dst, a, b []float64, n int) []float64 {
	if cap(dst) < n*n {
		dst = make([]float64, n*n)
	}
	dst = dst[:n*n]
	clear(dst)
	for i := 0; i < n; i++ {
		row := dst[i*n : i*n+n]
		for k := 0; k < n; k++ {
			if v := a[i*n+k]; v != 0 {
				bk := b[k*n : k*n+n]
				for j, w := range bk {
					row[j] += v * w
				}
			}
		}
	}
	return dst
}

// factorization is an LU of a real n×n matrix, by gonum's LAPACK
// (Dgetrf: partial pivoting, which keeps the exact zeros of a row with a
// single entry, such as a voltage source's; the model's instantaneous
// modes depend on them).
type factorization struct {
	n    int
	a    []float64
	ipiv []int
}

// factorReal factors the n×n real matrix a (left unchanged); an error
// when it is singular, or so nearly that its reciprocal condition
// estimate is below 10⁻¹³.
func factorReal(a []float64, n int) (*factorization, error) {
	f := &factorization{n: n, a: append([]float64(nil), a...), ipiv: make([]int, n)}
	work := make([]float64, 4*n)
	anorm := impl.Dlange(lapack.MaxColumnSum, n, n, f.a, n, work)
	if !impl.Dgetrf(n, n, f.a, n, f.ipiv) {
		return nil, errSingular
	}
	if rc := impl.Dgecon(lapack.MaxColumnSum, n, f.a, n, anorm, work, make([]int, n)); !(rc > 1e-13) {
		return nil, errSingular
	}
	return f, nil
}

var errSingular = errors.New("singular matrix")

// solve overwrites the real vector b (len n) with a⁻¹b.
func (f *factorization) solve(b []float64) {
	impl.Dgetrs(blas.NoTrans, f.n, 1, f.a, f.n, f.ipiv, b, 1)
}

// solveColumns overwrites the n×k row-major b with a⁻¹b.
func (f *factorization) solveColumns(b []float64, k int) {
	impl.Dgetrs(blas.NoTrans, f.n, k, f.a, f.n, f.ipiv, b, k)
}

// norm1 is the largest column sum of |a|.
func norm1M(a []float64, n int) float64 {
	m := 0.0
	for j := 0; j < n; j++ {
		s := 0.0
		for i := 0; i < n; i++ {
			s += math.Abs(a[i*n+j])
		}
		m = math.Max(m, s)
	}
	return m
}

// expm returns e^a for the n×n matrix a by the scaling and squaring
// method with the Padé approximants of degree 3, 5, 7, 9 or 13 chosen by
// ‖a‖₁ (N. J. Higham, "The scaling and squaring method for the matrix
// exponential revisited", SIAM J. Matrix Anal. Appl. 26(4), 2005
// [memory]: the θ bounds and coefficients of its Table 2.3 and
// Algorithm 2.3). It is gonum's mat.Dense.Exp method, kept here on plain
// slices so the WebAssembly need not carry gonum's matrix package; the
// tests hold the two to each other.
func expm(a []float64, n int) []float64 {
	id := make([]float64, n*n)
	for i := 0; i < n; i++ {
		id[i*n+i] = 1
	}
	norm := norm1M(a, n)
	type pade struct {
		theta float64
		b     []float64
	}
	for _, p := range []pade{
		{1.495585217958292e-2, []float64{120, 60, 12, 1}},
		{2.539398330063230e-1, []float64{30240, 15120, 3360, 420, 30, 1}},
		{9.504178996162932e-1, []float64{17297280, 8648640, 1995840, 277200, 25200, 1512, 56, 1}},
		{2.097847961257068e0, []float64{17643225600, 8821612800, 2075673600, 302702400, 30270240, 2162160, 110880, 3960, 90, 1}},
	} {
		if norm > p.theta {
			continue
		}
		// U = A·Σ b_odd·A^(2k), V = Σ b_even·A^(2k).
		a2 := mul(nil, a, a, n)
		u := make([]float64, n*n)
		v := make([]float64, n*n)
		pow := id
		for k := 0; 2*k+1 < len(p.b); k++ {
			axpy(v, p.b[2*k], pow)
			axpy(u, p.b[2*k+1], pow)
			pow = mul(nil, pow, a2, n)
		}
		return padeSolve(mul(nil, a, u, n), v, n, 0)
	}
	const theta13 = 5.371920351148152
	b := [...]float64{64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800,
		129060195264000, 10559470521600, 670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1}
	s := 0
	as := a
	if norm > theta13 {
		s = int(math.Ceil(math.Log2(norm / theta13)))
		as = make([]float64, n*n)
		axpy(as, math.Ldexp(1, -s), a)
	}
	a2 := mul(nil, as, as, n)
	a4 := mul(nil, a2, a2, n)
	a6 := mul(nil, a2, a4, n)
	// U = A·[A6·(b13·A6 + b11·A4 + b9·A2) + b7·A6 + b5·A4 + b3·A2 + b1·I]
	// V = A6·(b12·A6 + b10·A4 + b8·A2) + b6·A6 + b4·A4 + b2·A2 + b0·I:
	// odd coefficients for U, even ones for V.
	half := func(k int) []float64 {
		t := make([]float64, n*n)
		axpy(t, b[12+k], a6)
		axpy(t, b[10+k], a4)
		axpy(t, b[8+k], a2)
		x := mul(nil, a6, t, n)
		axpy(x, b[6+k], a6)
		axpy(x, b[4+k], a4)
		axpy(x, b[2+k], a2)
		axpy(x, b[k], id)
		return x
	}
	u := mul(nil, as, half(1), n)
	v := half(0)
	return padeSolve(u, v, n, s)
}

// padeSolve returns (V − U)⁻¹(V + U) squared s times.
func padeSolve(u, v []float64, n, s int) []float64 {
	p := make([]float64, n*n)
	q := make([]float64, n*n)
	for i := range p {
		p[i] = v[i] + u[i]
		q[i] = v[i] - u[i]
	}
	f, err := factorReal(q, n)
	if err != nil {
		// Only a matrix that is not finite (a step grown past float64)
		// gets here: its exponential is not finite either.
		for i := range p {
			p[i] = math.NaN()
		}
		return p
	}
	f.solveColumns(p, n)
	for ; s > 0; s-- {
		p = mul(nil, p, p, n)
	}
	return p
}
