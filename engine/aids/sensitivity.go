package aids

import (
	"cmp"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"zport/engine/numeric"
)

// DefaultStep is the step h in ln p of the sensitivity differences.
const DefaultStep = 1e-3

// SensitivityEntry is one parameter's normalized sensitivity.
type SensitivityEntry struct {
	Param int // index in Model.Params
	Name  string
	// Mag is ∂ln|Q|/∂ln p for an impedance or gain Q (a 1 % rise of p moves
	// |Q| by about Mag %); for the phase margin it is ∂PM/∂ln p in degrees.
	// MagErr estimates its error.
	Mag, MagErr float64
	// Phase is ∂∠Q/∂ln p in degrees (0 for the phase margin), PhaseErr its
	// error estimate.
	Phase, PhaseErr float64
}

// SensitivityQuantity is the sensitivities of one quantity, sorted by |Mag|,
// largest first.
type SensitivityQuantity struct {
	Kind  QuantityKind // ZMag (an impedance), GainMag (the gain) or PhaseMargin
	Port  int          // index in Model.Ports for an impedance, else −1
	ID    string       // "z:PORT", "g" or "pm"
	Title string
	// Value is the nominal impedance or gain; PM the nominal phase margin.
	Value   complex128
	PM      float64
	Entries []SensitivityEntry
}

// SensitivityResult holds every quantity's sensitivities.
type SensitivityResult struct {
	Step       float64
	Quantities []SensitivityQuantity
	Notes      []string
}

// Sensitivities computes, at the spot frequency, the normalized
// sensitivity of each port's impedance, the gain and the phase margin to
// each parameter listed in params (indices into m.Params; nil means all).
//
// Each derivative is a central difference in ln p, D(k) = [Q(p·eᵏ) −
// Q(p·e⁻ᵏ)]/2k taken on ln Q (so the real part is ∂ln|Q|/∂ln p and the
// imaginary part ∂∠Q/∂ln p), at k = 2h, h and h/2, combined by Richardson
// extrapolation R(k) = [4·D(k/2) − D(k)]/3, whose error falls as k⁴. The
// result is R(h); the error estimate is |R(h) − R(2h)|, which bounds the
// truncation error of R(h) about fifteen times over and also shows the
// rounding noise of the evaluations; to it is added what the values' own
// error bounds can contribute. step is h; 0 means DefaultStep. Once m's
// Context is done it stops between parameters with a *feedback.Stopped
// error.
func Sensitivities(m *Model, params []int, step float64) (*SensitivityResult, error) {
	if step == 0 {
		step = DefaultStep
	}
	if !(step > 0 && step <= 0.05) {
		panic(fmt.Sprintf("aids: sensitivity step %g outside (0, 0.05]", step))
	}
	if params == nil {
		params = make([]int, len(m.Params))
		for i := range params {
			params[i] = i
		}
	}
	ev, nom, _, err := nominal(m)
	if err != nil {
		return nil, err
	}
	// Differences of nearby values need every value to its last digits
	// (and all of them obtained alike), not the 12 the engine promises by
	// default.
	ev.tol = 0x1p-50
	res := &SensitivityResult{Step: step}
	type target struct {
		kind QuantityKind
		port int
	}
	var targets []target
	for i, p := range m.Ports {
		targets = append(targets, target{ZMag, i})
		res.Quantities = append(res.Quantities, SensitivityQuantity{Kind: ZMag, Port: i, ID: QuantityID(ZMag, p.Name),
			Title: "Z at " + p.Name, Value: nom.Z[i], PM: math.NaN()})
	}
	if m.Gain != nil {
		targets = append(targets, target{GainMag, -1})
		res.Quantities = append(res.Quantities, SensitivityQuantity{Kind: GainMag, Port: -1, ID: "g", Title: "gain g", Value: nom.G, PM: math.NaN()})
	}
	if ev.loop != nil {
		targets = append(targets, target{PhaseMargin, -1})
		res.Quantities = append(res.Quantities, SensitivityQuantity{Kind: PhaseMargin, Port: -1, ID: "pm", Title: "phase margin",
			Value: cmplx.NaN(), PM: nom.PM})
	}
	// read returns ln Q as a complex number for an impedance or gain, and
	// the phase margin in degrees (as a real) for the margin.
	read := func(t target, s *Sample) complex128 {
		switch t.kind {
		case ZMag:
			return s.Z[t.port]
		case GainMag:
			return s.G
		}
		return complex(s.PM, 0)
	}
	// noise bounds what the values' own errors can put into diff's result
	// (in the units of its real part; times 180/π for the phase).
	noise := func(t target, plus, minus *Sample, k float64) float64 {
		rel := func(s *Sample) float64 {
			switch t.kind {
			case ZMag:
				return s.ZErr[t.port] / cmplx.Abs(s.Z[t.port])
			case GainMag:
				return s.GErr / cmplx.Abs(s.G)
			}
			return 0
		}
		return (rel(plus) + rel(minus)) / (2 * k)
	}
	diff := func(t target, plus, minus *Sample, k float64) complex128 {
		a, b := read(t, plus), read(t, minus)
		if t.kind == PhaseMargin {
			return complex(numeric.Wrap180(real(a)-real(b))/(2*k), 0)
		}
		if a == 0 || b == 0 {
			return cmplx.NaN()
		}
		// log(a/b) on the principal branch: the two values are close, so
		// their ratio's phase is small and never wraps.
		l := cmplx.Log(a / b)
		return complex(real(l), imag(l)*180/math.Pi) / complex(2*k, 0)
	}
	x := m.Nominal()
	ks := [3]float64{2 * step, step, step / 2}
	var plus, minus [3]Sample
	for i := range plus {
		plus[i], minus[i] = newSample(len(m.Ports)), newSample(len(m.Ports))
	}
	failed := 0
	for n, j := range params {
		if err := m.stopped(n, len(params), "parameters"); err != nil {
			return nil, err
		}
		p := m.Params[j]
		ok := true
		for i, k := range ks {
			for side, s := range []*Sample{&plus[i], &minus[i]} {
				x[j] = p.Nominal * math.Exp(k*float64(1-2*side))
				if err := ev.eval(x, s); err != nil {
					ok = false
				}
			}
		}
		x[j] = p.Nominal
		if !ok {
			failed++
		}
		for qi, t := range targets {
			var d [3]complex128
			for i, k := range ks {
				d[i] = diff(t, &plus[i], &minus[i], k)
			}
			rh := (4*d[2] - d[1]) / 3
			r2h := (4*d[1] - d[0]) / 3
			// What the values' error bounds can put into R(h).
			nz := (4*noise(t, &plus[2], &minus[2], ks[2]) + noise(t, &plus[1], &minus[1], ks[1])) / 3
			e := SensitivityEntry{Param: j, Name: p.Name, Mag: real(rh), Phase: imag(rh),
				MagErr: math.Abs(real(rh)-real(r2h)) + nz, PhaseErr: math.Abs(imag(rh)-imag(r2h)) + nz*180/math.Pi}
			if !ok || !numeric.Finite(rh) || !numeric.Finite(r2h) {
				nan := math.NaN()
				e.Mag, e.Phase, e.MagErr, e.PhaseErr = nan, nan, nan, nan
			}
			res.Quantities[qi].Entries = append(res.Quantities[qi].Entries, e)
		}
	}
	for i := range res.Quantities {
		slices.SortStableFunc(res.Quantities[i].Entries, func(a, b SensitivityEntry) int {
			an, bn := math.IsNaN(a.Mag), math.IsNaN(b.Mag)
			switch {
			case an && bn:
				return 0
			case an:
				return 1
			case bn:
				return -1
			}
			return cmp.Compare(math.Abs(b.Mag), math.Abs(a.Mag))
		})
	}
	if failed > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d parameters could not be varied without the circuit becoming unsolvable; their sensitivities are left out.", failed))
	}
	return res, nil
}
