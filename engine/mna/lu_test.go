package mna

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func randomSystem(rng *rand.Rand, n int, sparse bool) []complex128 {
	a := make([]complex128, n*n)
	for i := range a {
		if sparse && rng.IntN(4) != 0 {
			continue
		}
		// Entries spanning twelve decades, as circuit matrices do.
		mag := math.Pow(10, rng.Float64()*12-6)
		a[i] = cmplx.Rect(mag, rng.Float64()*2*math.Pi)
	}
	for i := 0; i < n; i++ {
		a[i*n+i] += complex(math.Pow(10, rng.Float64()*6-3), 0)
	}
	return a
}

// realEquivalent solves A·x = b as the 2n×2n real system [Re −Im; Im Re],
// with gonum's LU: the reference our complex LU is held against.
func realEquivalent(a []complex128, b []complex128, n int) ([]complex128, error) {
	m := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := a[i*n+j]
			m.Set(i, j, real(v))
			m.Set(i, j+n, -imag(v))
			m.Set(i+n, j, imag(v))
			m.Set(i+n, j+n, real(v))
		}
	}
	rhs := mat.NewVecDense(2*n, nil)
	for i := 0; i < n; i++ {
		rhs.SetVec(i, real(b[i]))
		rhs.SetVec(i+n, imag(b[i]))
	}
	var lu mat.LU
	lu.Factorize(m)
	var x mat.VecDense
	if err := lu.SolveVecTo(&x, false, rhs); err != nil {
		return nil, err
	}
	out := make([]complex128, n)
	for i := range out {
		out[i] = complex(x.AtVec(i), x.AtVec(i+n))
	}
	return out, nil
}

// The complex LU against gonum's real-equivalent solve (gonum.org/v1/gonum/mat),
// seeded sizes 1…50, tolerance scaled with the condition of the problem as
// gonum's own lu_test.go does.
func TestLUAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for n := 1; n <= 50; n++ {
		for _, sparse := range []bool{false, true} {
			a := randomSystem(rng, n, sparse)
			b := make([]complex128, n)
			for i := range b {
				b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			want, err := realEquivalent(a, b, n)
			if err != nil {
				continue // gonum reports it ill-conditioned; so may we
			}
			var lu LU
			m := append([]complex128(nil), a...)
			if err := lu.Factor(m, n); err != nil {
				t.Errorf("n=%d sparse=%v: %v", n, sparse, err)
				continue
			}
			got := lu.SolveTo(make([]complex128, n), b)
			// Residual check, independent of either solver.
			var rmax, bmax float64
			for i := 0; i < n; i++ {
				var s complex128
				for j := 0; j < n; j++ {
					s += a[i*n+j] * got[j]
				}
				rmax = math.Max(rmax, cmplx.Abs(s-b[i]))
				bmax = math.Max(bmax, cmplx.Abs(b[i]))
			}
			var dmax, xmax float64
			for i := range got {
				dmax = math.Max(dmax, cmplx.Abs(got[i]-want[i]))
				xmax = math.Max(xmax, cmplx.Abs(want[i]))
			}
			if rmax > 1e-9*bmax*float64(n) && dmax > 1e-8*xmax*float64(n) {
				t.Errorf("n=%d sparse=%v: residual %.2g, difference from gonum %.2g (|x| %.2g)", n, sparse, rmax, dmax, xmax)
			}
		}
	}
}

func TestLUSingular(t *testing.T) {
	var lu LU
	// Zero row.
	if err := lu.Factor([]complex128{1, 2, 0, 0}, 2); err == nil {
		t.Error("zero row accepted")
	}
	// Rank-deficient.
	if err := lu.Factor([]complex128{1, 2, 2, 4}, 2); err == nil {
		t.Error("rank-deficient matrix accepted")
	}
}

func benchLU(b *testing.B, n int) {
	rng := rand.New(rand.NewPCG(3, 3))
	a := randomSystem(rng, n, true)
	rhs := make([]complex128, n)
	rhs[0] = 1
	m := make([]complex128, n*n)
	x := make([]complex128, n)
	var lu LU
	b.ReportAllocs()
	for b.Loop() {
		copy(m, a)
		if err := lu.Factor(m, n); err != nil {
			b.Fatal(err)
		}
		lu.SolveTo(x, rhs)
	}
}

func benchGonum(b *testing.B, n int) {
	rng := rand.New(rand.NewPCG(3, 3))
	a := randomSystem(rng, n, true)
	rhs := make([]complex128, n)
	rhs[0] = 1
	b.ReportAllocs()
	for b.Loop() {
		if _, err := realEquivalent(a, rhs, n); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkComplexLU12(b *testing.B)      { benchLU(b, 12) }
func BenchmarkGonumRealEquiv12(b *testing.B) { benchGonum(b, 12) }
func BenchmarkComplexLU52(b *testing.B)      { benchLU(b, 52) }
func BenchmarkGonumRealEquiv52(b *testing.B) { benchGonum(b, 52) }

// Cond against the exact 1-norm condition number of small matrices
// (computed from the explicit inverse): Hager's estimate is a lower bound
// that is usually exact and rarely off by more than a factor of 3.
func TestCondEstimate(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	for n := 1; n <= 12; n++ {
		a := randomSystem(rng, n, false)
		var lu LU
		m := append([]complex128(nil), a...)
		if err := lu.Factor(m, n); err != nil {
			t.Fatal(err)
		}
		// Exact: ‖Ã‖₁·‖Ã⁻¹‖₁ of the equilibrated matrix.
		inv := make([]complex128, n*n)
		col := make([]complex128, n)
		e := make([]complex128, n)
		for j := 0; j < n; j++ {
			clear(e)
			e[j] = 1
			lu.solveScaled(col, e, false)
			for i := 0; i < n; i++ {
				inv[i*n+j] = col[i]
			}
		}
		ninv := 0.0
		for j := 0; j < n; j++ {
			c := 0.0
			for i := 0; i < n; i++ {
				c += cmplx.Abs(inv[i*n+j])
			}
			ninv = math.Max(ninv, c)
		}
		exact := lu.norm1 * ninv
		est := lu.Cond()
		if est > exact*(1+1e-9) || est < exact/3 {
			t.Errorf("n=%d: Cond estimate %.3g, exact %.3g", n, est, exact)
		}
	}
}

// Refactoring a matrix of the same structure walks the recorded nonzeros;
// it must give bit for bit what a fresh factorization gives, including when
// the pivot order changes (trial 5) and the full elimination takes over.
func TestRefactorMatchesFresh(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 8))
	for n := 2; n <= 40; n += 3 {
		a := randomSystem(rng, n, true)
		var reused LU
		if err := reused.Factor(append([]complex128(nil), a...), n); err != nil {
			t.Fatal(err)
		}
		for trial := 0; trial < 6; trial++ {
			// Same pattern, new values; trial 5 moves the weight of every
			// diagonal into the first off-diagonal entry of its column, so
			// the old pivots fail the threshold.
			b := append([]complex128(nil), a...)
			for i := range b {
				if b[i] != 0 {
					b[i] *= complex(math.Pow(10, rng.Float64()*4-2), 0)
				}
			}
			if trial == 5 {
				for k := 0; k < n; k++ {
					b[k*n+k] *= 1e-9
				}
			}
			rhs := make([]complex128, n)
			for i := range rhs {
				rhs[i] = complex(rng.NormFloat64(), 0)
			}
			var fresh LU
			errF := fresh.Factor(append([]complex128(nil), b...), n)
			errR := reused.Factor(append([]complex128(nil), b...), n)
			if (errF == nil) != (errR == nil) {
				t.Fatalf("n=%d trial %d: fresh %v, reused %v", n, trial, errF, errR)
			}
			if errF != nil {
				continue
			}
			x1 := fresh.SolveTo(make([]complex128, n), rhs)
			x2 := reused.SolveTo(make([]complex128, n), rhs)
			var d, m float64
			for i := range x1 {
				d = math.Max(d, cmplx.Abs(x1[i]-x2[i]))
				m = math.Max(m, cmplx.Abs(x1[i]))
			}
			if d != 0 {
				t.Errorf("n=%d trial %d: refactored solution differs by %.2g (|x| %.2g); it must be bit for bit the fresh one", n, trial, d, m)
			}
		}
	}
}

// The transposed solve against gonum's real-equivalent solve of Aᵀ, dense
// and sparse, fresh and along a recorded structure.
func TestSolveTrans(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	checked := 0
	for n := 1; n <= 30; n++ {
		sparse := n%4 < 2
		a := randomSystem(rng, n, sparse)
		var lu LU
		// Even sizes: one factorization (dense triangular solves); odd:
		// three, so the last walks the recorded structure.
		for round := 0; round < 1+2*(n%2); round++ {
			if err := lu.Factor(append([]complex128(nil), a...), n); err != nil {
				t.Fatal(err)
			}
		}
		at := make([]complex128, n*n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				at[j*n+i] = a[i*n+j]
			}
		}
		b := make([]complex128, n)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		want, err := realEquivalent(at, b, n)
		if err != nil {
			continue // too ill-conditioned for the reference to judge
		}
		checked++
		got := lu.SolveTransTo(make([]complex128, n), b)
		var d, m float64
		for i := range got {
			d = math.Max(d, cmplx.Abs(got[i]-want[i]))
			m = math.Max(m, cmplx.Abs(want[i]))
		}
		if tol := 1e-13 * lu.Cond(); d > tol*m {
			t.Errorf("n=%d sparse=%v: |Δ| %.3g of |x| %.3g, tolerance %.3g relative", n, sparse, d, m, tol)
		}
	}
	if checked < 25 {
		t.Errorf("only %d of 30 systems could be checked", checked)
	}
}

// pow2inv's bit-level path against the general one (math.Frexp and
// math.Ldexp) over the whole exponent range, subnormals included.
func TestPow2inv(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	for k := 0; k < 100000; k++ {
		m := math.Float64frombits(rng.Uint64() &^ (1 << 63))
		if math.IsInf(m, 0) || math.IsNaN(m) || m == 0 {
			continue
		}
		_, e := math.Frexp(m)
		if got, want := pow2inv(m), math.Ldexp(1, -e+1); got != want {
			t.Fatalf("pow2inv(%g) = %g, want %g", m, got, want)
		}
	}
}
