package response

import (
	"math"
	"math/cmplx"

	"zport/engine/mna"
)

// direct solves the pencil itself at complex s, (G + sC)·x = b, with the
// engine's complex LU: it evaluates the gain independently of the model,
// and refines natural frequencies as zeros of det(G + sC).
type direct struct {
	p    *mna.Pencil
	b, c []float64
	lu   mna.LU
	m    []complex128
	x, r []complex128
	// cols are the nonzero columns of C, for tr((G + sC)⁻¹C).
	cols []column
}

type column struct {
	j int
	v []complex128 // C[:, j]
}

func newDirect(p *mna.Pencil, b, c []float64) *direct {
	n := p.N
	d := &direct{p: p, b: b, c: c, m: make([]complex128, n*n), x: make([]complex128, n), r: make([]complex128, n)}
	for j := 0; j < n; j++ {
		var v []complex128
		for i := 0; i < n; i++ {
			if p.C[i*n+j] != 0 {
				if v == nil {
					v = make([]complex128, n)
				}
				v[i] = complex(p.C[i*n+j], 0)
			}
		}
		if v != nil {
			d.cols = append(d.cols, column{j, v})
		}
	}
	return d
}

// factor factors G + sC.
func (d *direct) factor(s complex128) error {
	for i := range d.m {
		d.m[i] = complex(d.p.G[i], 0) + s*complex(d.p.C[i], 0)
	}
	return d.lu.Factor(d.m, d.p.N)
}

// gain returns cᵀ(G + sC)⁻¹b, NaN where G + sC is singular.
func (d *direct) gain(s complex128) complex128 {
	if d.factor(s) != nil {
		return cmplx.NaN()
	}
	for i, v := range d.b {
		d.r[i] = complex(v, 0)
	}
	d.lu.SolveTo(d.x, d.r)
	var g complex128
	for i, v := range d.c {
		g += complex(v, 0) * d.x[i]
	}
	return g
}

// logSlope returns d ln det(G + sC)/ds = tr((G + sC)⁻¹C), and false when
// G + sC is singular to working precision (s is a natural frequency).
func (d *direct) logSlope(s complex128) (complex128, bool) {
	if d.factor(s) != nil {
		return 0, false
	}
	var tr complex128
	for _, col := range d.cols {
		d.lu.SolveTo(d.x, col.v)
		tr += d.x[col.j]
	}
	return tr, true
}

// refine polishes the natural frequencies p (conjugate pairs adjacent,
// upper first) as zeros of det(G + sC) by the Aberth–Ehrlich iteration:
// Newton's correction N = 1/tr((G + sC)⁻¹C), deflated by the other
// estimates, Δ = N/(1 − N·Σⱼ 1/(s − pⱼ)), which converges cubically to
// simple zeros and keeps estimates from falling onto one zero together
// (O. Aberth, "Iteration methods for finding all zeros of a polynomial
// simultaneously", Math. Comp. 27, 1973 [memory]). det(G + sC) is a
// polynomial whose zeros are exactly the finite natural frequencies, so
// the sum runs over all of them. A pair is refined through its upper
// member and kept conjugate; a real zero is kept real. It returns how many
// iterations it took, maxRefine when it stopped unconverged.
func (d *direct) refine(p []complex128) int {
	upper := func(i int) bool { return imag(p[i]) >= 0 }
	for it := 1; it <= maxRefine; it++ {
		worst := 0.0
		for i := range p {
			if !upper(i) {
				continue
			}
			tr, ok := d.logSlope(p[i])
			if !ok || tr == 0 {
				continue // on a zero to working precision
			}
			var sum complex128
			for j := range p {
				if j != i && p[j] != p[i] {
					sum += 1 / (p[i] - p[j])
				}
			}
			n := 1 / tr
			delta := n / (1 - n*sum)
			if cmplx.IsNaN(delta) || cmplx.IsInf(delta) {
				continue
			}
			if imag(p[i]) == 0 {
				delta = complex(real(delta), 0)
			}
			p[i] -= delta
			worst = math.Max(worst, cmplx.Abs(delta)/math.Max(cmplx.Abs(p[i]), math.SmallestNonzeroFloat64))
		}
		for i := range p {
			if i > 0 && imag(p[i-1]) > 0 && imag(p[i]) < 0 {
				p[i] = cmplx.Conj(p[i-1])
			}
		}
		if worst <= 1e-15 {
			return it
		}
	}
	return maxRefine
}

// maxRefine bounds the refinement; simple zeros need two or three steps
// from the eigenvalues' estimates, a multiple zero converges only
// linearly and stops here close to where it started.
const maxRefine = 12
