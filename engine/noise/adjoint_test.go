package noise_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"zport/engine/mna"
)

// randomNoisy is an invented random circuit with every kind of noise
// source: a resistor ladder from gnd through every node (so nothing
// floats), random resistors and capacitors across it, an opamp with en
// and in and its output through ro into the ladder, a vnoise in series
// with one ladder resistor and an inoise between two nodes.
func randomNoisy(rng *rand.Rand) (text string, nodes int) {
	n := 4 + rng.IntN(8)
	val := func(lo, hi float64) float64 { return math.Pow(10, lo+(hi-lo)*rng.Float64()) }
	node := func(i int) string {
		if i == 0 {
			return "gnd"
		}
		return fmt.Sprintf("n%d", i)
	}
	var b strings.Builder
	split := 1 + rng.IntN(n-1)
	for i := 1; i <= n; i++ {
		if i == split {
			// The vnoise sits in series with this step of the ladder.
			fmt.Fprintf(&b, "vnoise Vn %s m%d density=%g fc=%g\n", node(i-1), i, val(-9, -7), val(0, 3))
			fmt.Fprintf(&b, "resistor Rl%d m%d %s %g\n", i, i, node(i), val(2, 4))
			continue
		}
		fmt.Fprintf(&b, "resistor Rl%d %s %s %g\n", i, node(i-1), node(i), val(2, 4))
	}
	for k := 0; k < n; k++ {
		x, y := rng.IntN(n+1), rng.IntN(n+1)
		if x == y {
			continue
		}
		if rng.IntN(2) == 0 {
			fmt.Fprintf(&b, "resistor Rx%d %s %s %g\n", k, node(x), node(y), val(2, 5))
		} else {
			fmt.Fprintf(&b, "capacitor Cx%d %s %s %g\n", k, node(x), node(y), val(-11, -8))
		}
	}
	p, m, o := 1+rng.IntN(n), 1+rng.IntN(n), 1+rng.IntN(n)
	if p == m {
		p = 0
	}
	fmt.Fprintf(&b, "opamp U1 %s %s %s a0=%g gbw=%g ro=%g en=%g fce=%g in=%g fci=%g\n",
		node(p), node(m), node(o), val(3, 5), val(5, 7), val(1, 2), val(-9, -8), val(0, 2), val(-15, -11), val(1, 3))
	x, y := rng.IntN(n+1), 1+rng.IntN(n)
	if x == y {
		x = 0
	}
	fmt.Fprintf(&b, "inoise In %s %s density=%g\n", node(x), node(y), val(-13, -10))
	return b.String(), n
}

// The adjoint transfers (one transposed solve per frequency) equal the
// direct ones (one solve per source) on random circuits to 1e-12, relative
// to the transfer, or to ‖z‖∞·‖b‖₁ where the transfer is far smaller. The
// direct solves use gonum's LU on the real-equivalent system, a solver
// independent of ours. Both solves carry rounding of about cond·2⁻⁵³, so
// a system whose (equilibrated) condition passes 10⁴ is held to the
// project's max(1e-12, 50·2⁻⁵³·cond) instead, and counted apart.
func TestAdjointEqualsDirect(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 13))
	worst := 0.0
	strict, loose := 0, 0
	for trial := 0; trial < 60; trial++ {
		text, n := randomNoisy(rng)
		out := fmt.Sprintf("n%d", 1+rng.IntN(n))
		s := newSetup(t, text, "", out, "", 300)
		o, _ := s.c.Node(out)
		sys := s.a.Sys
		for _, f := range []float64{math.Pow(10, 1+4*rng.Float64()), math.Pow(10, 1+4*rng.Float64())} {
			z := make([]complex128, sys.N)
			if err := s.a.AdjointAt(f, z); err != nil {
				t.Fatalf("trial %d: %v\n%s", trial, err, text)
			}
			m := sys.Assemble(nil, mna.Config{F: f, Ref: -1, RefGain: true})
			lu := realLU(m, sys.N)
			var ours mna.LU
			if err := ours.Factor(m, sys.N); err != nil {
				t.Fatal(err)
			}
			cond := ours.Cond()
			tol := 1e-12
			if cond > 1e4 {
				tol = math.Max(tol, 50*0x1p-53*cond)
			}
			zmax := 0.0
			for _, v := range z {
				zmax = math.Max(zmax, cmplx.Abs(v))
			}
			for _, src := range s.n.Sources {
				b := make([]complex128, sys.N)
				for _, e := range src.RHS {
					b[e.I] += complex(e.V, 0)
				}
				x := realSolve(lu, b)
				direct := x[mna.NodeVar(o)]
				if src.Through != nil {
					direct *= src.Through(f)
				}
				adj := src.Transfer(z, f)
				// Relative to the transfer, or normwise where it is far
				// below ‖z‖·‖b‖ (a resistor between two nodes the output
				// sees alike, an output the source barely reaches): the
				// solves are good to their largest entries, not to each
				// small difference of entries.
				scale := cmplx.Abs(direct)
				if norm := zmax * float64(len(src.RHS)); src.Through != nil {
					scale = math.Max(scale, norm*cmplx.Abs(src.Through(f)))
				} else {
					scale = math.Max(scale, norm)
				}
				d := cmplx.Abs(adj-direct) / scale
				if cond <= 1e4 {
					strict++
					worst = math.Max(worst, d)
				} else {
					loose++
				}
				if d > tol {
					t.Errorf("trial %d, f = %.4g Hz, %s: adjoint %v, direct %v (relative %.2g, condition %.2g)\n%s", trial, f, src.Name, adj, direct, d, cond, text)
				}
			}
		}
	}
	if strict < 300 {
		t.Errorf("only %d transfers compared at 1e-12", strict)
	}
	t.Logf("%d transfers held to 1e-12 (largest difference %.2g), %d more of ill-conditioned systems to 50·2⁻⁵³·cond", strict, worst, loose)
}

// realLU factors the complex n×n row-major matrix as the 2n×2n real
// system [Re −Im; Im Re] with gonum.
func realLU(a []complex128, n int) *mat.LU {
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
	var lu mat.LU
	lu.Factorize(m)
	return &lu
}

func realSolve(lu *mat.LU, b []complex128) []complex128 {
	n := len(b)
	rhs := mat.NewVecDense(2*n, nil)
	for i := range b {
		rhs.SetVec(i, real(b[i]))
		rhs.SetVec(i+n, imag(b[i]))
	}
	var x mat.VecDense
	_ = lu.SolveVecTo(&x, false, rhs)
	out := make([]complex128, n)
	for i := range out {
		out[i] = complex(x.AtVec(i), x.AtVec(i+n))
	}
	return out
}
