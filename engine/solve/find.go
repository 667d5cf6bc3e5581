package solve

import (
	"cmp"
	"math"
	"slices"

	"zport/engine/numeric"
)

// Point is one value x of the part and the quantity Q it gives (NaN
// where the quantity is undefined).
type Point struct{ X, Q float64 }

// Found is what a search along the part's range found.
type Found struct {
	// Solutions are where the quantity equals the target, ascending in x,
	// each refined to the tolerance.
	Solutions []Point
	// Curve holds every point evaluated on the grid, and the solutions and
	// refined extremes, ascending in x.
	Curve []Point
	// Best is the point closest to the target (least |Q − target|, with
	// ∠Z's difference wrapped), set when there is no solution.
	Best *Point
	// Jumps are where the quantity passes the target by a jump rather than
	// through it: the bracket closed on a discontinuity (a phase margin
	// whose governing crossover changes, ∠Z wrapping at ±180°). Each X is
	// the jump's place, Q the value on its far side.
	Jumps []Point
	// Undefined are the runs of grid points where the quantity is
	// undefined, as [first, last] values of x.
	Undefined [][2]float64
	// Lost are the brackets whose refinement met a value where the
	// quantity is undefined, as [lo, hi] values of x.
	Lost [][2]float64
}

// GridPoints is how many points Find's grid has for a range from..to:
// six a decade, at least 25 and at most 49, so that the whole search stays
// within some sixty evaluations of the circuit.
func GridPoints(from, to float64) int {
	dec := math.Abs(math.Log10(to / from))
	return min(49, max(25, int(math.Ceil(6*dec))+1))
}

// Tolerance is Find's accuracy: each solution is located to within this
// relative error in x (and the part's value is known to 1e-9).
const Tolerance = 1e-10

// maxExtremes bounds how many near approaches Find refines, the closest
// first.
const maxExtremes = 4

// finder holds one search.
type finder struct {
	q       func(x float64) float64
	sign    float64 // the sign of the range; the grid is on u = ln|x|
	target  float64
	angular bool
	curve   []Point
	found   Found
}

// diff is how far q is from the target, wrapped for an angle.
func (f *finder) diff(q float64) float64 {
	d := q - f.target
	if f.angular {
		d = numeric.Wrap180(d)
	}
	return d
}

func (f *finder) x(u float64) float64 { return f.sign * math.Exp(u) }

// at evaluates the quantity at u = ln|x|, records it for the curve when
// keep is set, and returns its difference from the target.
func (f *finder) at(u float64, keep bool) (q, d float64) { return f.atX(f.x(u), keep) }

// atX is at for x itself (the range's ends, exactly as given).
func (f *finder) atX(x float64, keep bool) (q, d float64) {
	q = f.q(x)
	if keep {
		f.curve = append(f.curve, Point{x, q})
	}
	return q, f.diff(q)
}

// Find looks for every x in [from, to] where q(x) equals target: it scans
// a grid of the given number of points (GridPoints when 0) evenly spaced
// in ln|x| — from and to must be of one sign, not zero — brackets every
// change of sign of q − target, and refines each by Brent's method to
// Tolerance in ln|x|; a bracket that closes on a jump rather than a root
// is reported as one. Where |q − target| has a local minimum on the grid
// (the quantity comes toward the target and turns away), it minimizes
// |q − target| between the neighbouring grid points by Brent's method; a
// minimum past the target yields the two solutions on either side of it,
// so a sharp peak between grid points is not missed. When nothing reaches
// the target, Best is the closest approach: a refined minimum, or an end
// of the range. angular wraps q − target into (−180°, 180°], for ∠Z.
//
// q returns NaN where the quantity is undefined. Find evaluates q only
// through that function, in order, so a caller may count or interleave
// the evaluations.
func Find(q func(x float64) float64, from, to, target float64, angular bool, points int) Found {
	if !(from != 0 && to != 0 && (from > 0) == (to > 0)) || math.IsNaN(from) || math.IsNaN(to) {
		panic("solve: Find needs a range of one sign without 0")
	}
	if points == 0 {
		points = GridPoints(from, to)
	}
	if points < 2 {
		panic("solve: Find needs at least two grid points")
	}
	f := &finder{q: q, sign: 1, target: target, angular: angular}
	if from < 0 {
		f.sign = -1
	}
	u0, u1 := math.Log(math.Abs(from)), math.Log(math.Abs(to))
	n := points
	us := make([]float64, n)
	qs := make([]float64, n)
	ds := make([]float64, n)
	for i := range us {
		us[i] = u0 + (u1-u0)*float64(i)/float64(n-1)
		x := f.x(us[i])
		switch i {
		case 0:
			x = from
		case n - 1:
			x = to
		}
		qs[i], ds[i] = f.atX(x, true)
	}
	ok := func(i int) bool { return !math.IsNaN(ds[i]) }

	// Every change of sign between neighbours, and every grid point on
	// the target.
	for i := range n {
		if ok(i) && ds[i] == 0 {
			f.found.Solutions = append(f.found.Solutions, f.curve[i])
		}
		if i+1 < n && ok(i) && ok(i+1) && ds[i]*ds[i+1] < 0 {
			f.root(us[i], us[i+1], ds[i], ds[i+1])
		}
	}

	// Near approaches: local minima of |d| between neighbours of one sign,
	// where the quantity comes toward the target and turns away — perhaps
	// after reaching it between grid points, as a sharp resonance can
	// (a Howland pump's |Z| at balance). Each is minimized, the closest
	// first, up to maxExtremes of them.
	type approach struct {
		i   int
		gap float64 // |d| at the grid point
	}
	var near []approach
	for i := 1; i+1 < n; i++ {
		if !ok(i-1) || !ok(i) || !ok(i+1) || ds[i] == 0 {
			continue
		}
		s := math.Copysign(1, ds[i])
		a, b, c := s*ds[i-1], s*ds[i], s*ds[i+1]
		if a > 0 && c > 0 && b < a && b <= c {
			near = append(near, approach{i: i, gap: b})
		}
	}
	// The closest first (insertion: a handful at most).
	for i := 1; i < len(near); i++ {
		for j := i; j > 0 && near[j].gap < near[j-1].gap; j-- {
			near[j], near[j-1] = near[j-1], near[j]
		}
	}
	for _, a := range near[:min(len(near), maxExtremes)] {
		f.extreme(us[a.i-1], us[a.i+1], ds[a.i-1], ds[a.i+1], math.Copysign(1, ds[a.i]))
	}

	// Runs of grid points where the quantity is undefined.
	for i := 0; i < n; {
		if ok(i) {
			i++
			continue
		}
		j := i
		for j+1 < n && !ok(j+1) {
			j++
		}
		f.found.Undefined = append(f.found.Undefined, [2]float64{f.curve[i].X, f.curve[j].X})
		i = j + 1
	}

	byX := func(a, b Point) int { return cmp.Compare(a.X, b.X) }
	slices.SortStableFunc(f.found.Solutions, byX)
	f.found.Solutions = slices.CompactFunc(f.found.Solutions, func(a, b Point) bool {
		return math.Abs(a.X-b.X) <= 2*Tolerance*math.Abs(a.X)
	})
	slices.SortStableFunc(f.curve, byX)
	f.found.Curve = f.curve
	if len(f.found.Solutions) == 0 {
		for _, p := range f.curve {
			if d := math.Abs(f.diff(p.Q)); !math.IsNaN(d) && (f.found.Best == nil || d < math.Abs(f.diff(f.found.Best.Q))) {
				best := p
				f.found.Best = &best
			}
		}
	}
	return f.found
}

// root refines a change of sign of d between ua and ub and records the
// solution, or the jump, it closes on.
func (f *finder) root(ua, ub, da, db float64) {
	g := func(u float64) (float64, bool) {
		_, d := f.at(u, false)
		return d, !math.IsNaN(d)
	}
	r := numeric.Brent(ua, ub, da, db, Tolerance, g)
	if !r.OK {
		f.found.Lost = append(f.found.Lost, [2]float64{f.x(ua), f.x(ub)})
		return
	}
	// A root of a continuous quantity leaves the final bracket's ends
	// nearly equal; a jump keeps them apart by its height. (An exact zero
	// ends the search with the bracket still wide.)
	if r.GX != 0 && math.Abs(r.GX-r.GOther) > 1e-3*math.Abs(da-db) {
		f.found.Jumps = append(f.found.Jumps, Point{f.x(r.X), f.target + r.GOther})
		return
	}
	// The quantity at the solution: the target plus what is left of the
	// difference (the difference of an angle is already wrapped).
	q := f.target + r.GX
	if f.angular {
		q = numeric.Wrap180(q)
	}
	p := Point{f.x(r.X), q}
	f.found.Solutions = append(f.found.Solutions, p)
	f.curve = append(f.curve, p)
}

// extreme minimizes s·d between ua and ub, where d has sign s at both
// ends and comes closer to the target inside. If the minimum reaches the
// target, the solutions on either side of it are refined; otherwise the
// minimum joins the curve (for Best).
func (f *finder) extreme(ua, ub, da, db, s float64) {
	var cross, crossQ float64
	crossed := false
	h := func(u float64) (float64, bool) {
		q, d := f.at(u, false)
		if math.IsNaN(d) {
			return math.Inf(1), false
		}
		if s*d <= 0 {
			cross, crossQ, crossed = u, q, true
			return s * d, false
		}
		return s * d, true
	}
	m := numeric.Minimize(ua, ub, 1e-9, h)
	if !crossed {
		if !math.IsInf(m.F, 1) {
			q := f.target + s*m.F
			if f.angular {
				q = numeric.Wrap180(q)
			}
			f.curve = append(f.curve, Point{f.x(m.X), q})
		}
		return
	}
	dc := f.diff(crossQ)
	if dc == 0 {
		p := Point{f.x(cross), crossQ}
		f.found.Solutions = append(f.found.Solutions, p)
		f.curve = append(f.curve, p)
		return
	}
	f.root(ua, cross, da, dc)
	f.root(cross, ub, dc, db)
}
