package api

import (
	"math"
	"math/cmplx"

	"zport/engine/feedback"
	"zport/engine/numeric"
)

// bound converts an error bound to the wire: nil for a value that is not
// finite (v) or a bound that cannot be given (+Inf).
func bound(v complex128, e float64) *float64 {
	if !numeric.Finite(v) {
		return nil
	}
	return F(e)
}

func portErrors(pr feedback.PortResult) PortErrors {
	e := PortErrors{Z0: bound(pr.Z0, pr.Err.Z0), TShort: bound(pr.TShort, pr.Err.TShort), TOpen: bound(pr.TOpen, pr.Err.TOpen),
		Z: bound(pr.Z, pr.Err.Z), ZDirect: bound(pr.ZDirect, pr.Err.ZDirect),
		Agreement: agreementBound(pr.Z, pr.Err.Z, pr.ZDirect, pr.Err.ZDirect)}
	if !numeric.Finite(pr.Z) {
		e.Y = bound(pr.Y, pr.Err.Y)
	}
	return e
}

func gainErrors(g *feedback.GainResult) GainErrors {
	return GainErrors{G0: bound(g.G0, g.Err.G0), GInf: bound(g.GInf, g.Err.GInf), G: bound(g.G, g.Err.G), GDirect: bound(g.GDirect, g.Err.GDirect),
		Agreement: agreementBound(g.G, g.Err.G, g.GDirect, g.Err.GDirect)}
}

// agreementBound is how large the agreement of a and b (see
// PortResult.Agreement) can come out when their exact values are equal:
// (ea + eb) over the larger magnitude, or absolute where one is exactly 0.
func agreementBound(a complex128, ea float64, b complex128, eb float64) *float64 {
	if !numeric.Finite(a) || !numeric.Finite(b) {
		return nil
	}
	e := ea + eb
	if a != 0 && b != 0 {
		e /= math.Max(cmplx.Abs(a), cmplx.Abs(b))
	}
	return F(e)
}

// sweepErrors fills the sweep's error arrays from pts, from one backing
// array as sweepResult does for the values.
func sweepErrors(s *SweepResult, pts []feedback.Point) {
	n := len(pts)
	if n == 0 {
		return
	}
	per := 1 + 5*len(pts[0].Ports)
	if pts[0].Gain != nil {
		per += 4
	}
	arena := make([]float64, 0, n*per)
	f := func(v complex128, e float64) *float64 {
		if !numeric.Finite(v) || !(e <= maxFinite) {
			return nil
		}
		arena = append(arena, e)
		return &arena[len(arena)-1]
	}
	col := func() []*float64 { return make([]*float64, n) }
	s.ReturnRatioError = col()
	for j := range s.Ports {
		s.Ports[j].Errors = PortSweepErrors{Z0: col(), TShort: col(), TOpen: col(), Z: col(), ZDirect: col()}
	}
	if s.Gain != nil {
		s.Gain.Errors = GainSweepErrors{G0: col(), GInf: col(), G: col(), GDirect: col()}
	}
	for i, pt := range pts {
		s.ReturnRatioError[i] = f(pt.T, pt.TErr)
		for j, pr := range pt.Ports {
			e := &s.Ports[j].Errors
			e.Z0[i], e.TShort[i], e.TOpen[i] = f(pr.Z0, pr.Err.Z0), f(pr.TShort, pr.Err.TShort), f(pr.TOpen, pr.Err.TOpen)
			e.Z[i], e.ZDirect[i] = f(pr.Z, pr.Err.Z), f(pr.ZDirect, pr.Err.ZDirect)
		}
		if g := pt.Gain; g != nil {
			e := &s.Gain.Errors
			e.G0[i], e.GInf[i], e.G[i], e.GDirect[i] = f(g.G0, g.Err.G0), f(g.GInf, g.Err.GInf), f(g.G, g.Err.G), f(g.GDirect, g.Err.GDirect)
		}
	}
}

const maxFinite = 1.7976931348623157e308
