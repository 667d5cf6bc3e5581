package noise

import (
	"math"
	"slices"
)

// The 15-point Gauss–Kronrod rule and its embedded 7-point Gauss rule on
// [−1, 1]: A. S. Kronrod, "Nodes and weights of quadrature formulas",
// 1965; the values as QUADPACK's QK15 tabulates them (R. Piessens,
// E. de Doncker-Kapenga, C. W. Überhuber, D. K. Kahaner, QUADPACK,
// Springer, 1983) [memory]. TestGaussKronrodExact checks them: K15
// integrates polynomials up to degree 22 exactly, G7 up to degree 13.
var (
	// gkX are the non-negative Kronrod nodes, largest first; the odd
	// indices are the Gauss nodes.
	gkX = [8]float64{
		0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
		0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
		0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
		0.207784955007898467600689403773245, 0,
	}
	gkW = [8]float64{
		0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
		0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
		0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
		0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
	}
	// gW are the Gauss weights of the nodes gkX[1], gkX[3], gkX[5], gkX[7].
	gW = [4]float64{
		0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
		0.381830050505118944950369775488975, 0.417959183673469387755102040816327,
	}
)

// panel is one interval of an adaptive integration with its estimates.
type panel struct {
	a, b float64
	k    []float64 // Kronrod estimate of each component
	e    []float64 // |Kronrod − Gauss| of each component
}

// quadrature integrates a vector-valued function over [a, b] by adaptive
// Gauss–Kronrod: the interval starts as `panels` equal panels, and the
// panel with the largest error, relative to each controlled component's
// tolerance, is halved until every controlled component's error estimate
// is within its tolerance or maxEval evaluations are spent.
type quadrature struct {
	// f writes the integrand's components at x into v.
	f func(x float64, v []float64) error
	// dim is the number of components; the first ctrl decide when to
	// stop, each to rtol relative (atol absolute for a zero integral).
	dim, ctrl  int
	rtol, atol float64
	maxEval    int
}

// result is an integral with its error estimate.
type result struct {
	I, E        []float64 // integral and error estimate per component
	Evaluations int
	Converged   bool
}

func (q *quadrature) integrate(a, b float64, panels int) (result, error) {
	var r result
	ps := make([]panel, 0, 4*panels)
	h := (b - a) / float64(panels)
	for i := range panels {
		lo, hi := a+float64(i)*h, a+float64(i+1)*h
		if i == panels-1 {
			hi = b
		}
		p, err := q.panel(lo, hi)
		if err != nil {
			return r, err
		}
		ps = append(ps, p)
		r.Evaluations += 15
	}
	r.I, r.E = make([]float64, q.dim), make([]float64, q.dim)
	tol := make([]float64, q.ctrl)
	for {
		clear(r.I)
		clear(r.E)
		for _, p := range ps {
			for c := range q.dim {
				r.I[c] += p.k[c]
				r.E[c] += p.e[c]
			}
		}
		done := true
		for c := range q.ctrl {
			tol[c] = math.Max(q.rtol*math.Abs(r.I[c]), q.atol)
			done = done && r.E[c] <= tol[c]
		}
		if done {
			r.Converged = true
			return r, nil
		}
		if r.Evaluations+30 > q.maxEval {
			return r, nil
		}
		worst, wv := 0, -1.0
		for i, p := range ps {
			v := 0.0
			for c := range q.ctrl {
				v += p.e[c] / tol[c]
			}
			if v > wv {
				worst, wv = i, v
			}
		}
		p := ps[worst]
		mid := (p.a + p.b) / 2
		left, err := q.panel(p.a, mid)
		if err != nil {
			return r, err
		}
		right, err := q.panel(mid, p.b)
		if err != nil {
			return r, err
		}
		r.Evaluations += 30
		ps[worst] = left
		ps = slices.Insert(ps, worst+1, right)
	}
}

// panel applies the 15-point rule on [a, b].
func (q *quadrature) panel(a, b float64) (panel, error) {
	p := panel{a: a, b: b, k: make([]float64, q.dim), e: make([]float64, q.dim)}
	g := make([]float64, q.dim)
	v := make([]float64, q.dim)
	c, h := (a+b)/2, (b-a)/2
	add := func(x, wk, wg float64) error {
		if err := q.f(x, v); err != nil {
			return err
		}
		for i, y := range v {
			p.k[i] += wk * y
			g[i] += wg * y
		}
		return nil
	}
	if err := add(c, gkW[7], gW[3]); err != nil {
		return p, err
	}
	for j := 0; j < 7; j++ {
		wg := 0.0
		if j%2 == 1 {
			wg = gW[j/2]
		}
		for _, x := range [2]float64{c - h*gkX[j], c + h*gkX[j]} {
			if err := add(x, gkW[j], wg); err != nil {
				return p, err
			}
		}
	}
	for i := range p.k {
		p.k[i] *= h
		p.e[i] = math.Abs(p.k[i] - g[i]*h)
	}
	return p, nil
}
