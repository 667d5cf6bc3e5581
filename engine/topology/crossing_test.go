package topology_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/topology"
)

// sweptMargins is the slow, plain way to the margins of a stage's loop:
// the return ratio on a dense grid (50 points a decade over the span the
// extras search), crossings refined by feedback.Margins.
func sweptMargins(t *testing.T, st *topology.Topology, v topology.Values) feedback.MarginResult {
	t.Helper()
	c, err := circuit.Parse(st.Circuit(v))
	if err != nil {
		t.Fatal(err)
	}
	a, err := feedback.New(c, "U1", nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	grid := floats.LogSpan(make([]float64, 701), 1e-2, 1e12)
	T := make([]complex128, len(grid))
	for i, f := range grid {
		if T[i], err = a.ReturnRatio(f); err != nil {
			T[i] = cmplx.NaN()
		}
	}
	return feedback.Margins(grid, T, a.ReturnRatio)
}

// drawParams draws every parameter log-uniformly within a factor of 30 of
// its default (the geometric middle of its range when it has none), and
// leaves an optional one out one time in four. Seeded by the caller.
func drawParams(rng *rand.Rand, st *topology.Topology) map[string]string {
	defaults, _ := st.Values(nil)
	params := map[string]string{}
	for _, p := range st.Params {
		if p.Optional && rng.IntN(4) == 0 {
			params[p.Name] = ""
			continue
		}
		x, ok := defaults[p.Name]
		if !ok {
			x = math.Sqrt(math.Max(p.Min, 1e-300) * p.Max)
		}
		x *= math.Exp((rng.Float64()*2 - 1) * math.Log(30))
		params[p.Name] = strconv.FormatFloat(math.Min(math.Max(x, p.Min), p.Max), 'g', 17, 64)
	}
	return params
}

// The margin extras search for the crossings instead of sweeping; they
// must find what a dense sweep finds — the governing (smallest) phase
// margin and its crossover — also for loops that cross unity three times
// (an in-loop Cf far too small for the load), over seeded random
// parameters.
func TestMarginExtrasMatchDenseSweep(t *testing.T) {
	type variant struct {
		label string
		set   func(v topology.Values, fs topology.Forms) // the variant's change
	}
	cases := []struct {
		id       string
		variants []variant
		fixed    []map[string]string // cases the random draws might miss
	}{
		{"capload", []variant{
			{"as given", func(topology.Values, topology.Forms) {}},
			{"without CL", func(v topology.Values, _ topology.Forms) { delete(v, "CL") }},
		}, []map[string]string{
			// Rf·Cf = 0.47 µs against Riso·CL = 100 µs: the notch of the
			// in-loop network takes |T| below 1 from 22.0 to 24.8 kHz, a
			// twentieth of a decade (invented values).
			{"Cf": "47p", "Riso": "1k", "CL": "100n"},
		}},
		{"transimpedance", []variant{
			{"with Cf (Butterworth)", func(v topology.Values, fs topology.Forms) { v["Cf"] = extraOr(fs, "Cf (Butterworth)") }},
			{"with Cf (classic “45°” formula)", func(v topology.Values, fs topology.Forms) {
				v["Cf"] = extraPrefix(fs, "Cf (classic “45°” formula")
			}},
		}, nil},
	}
	multiple := 0
	for _, c := range cases {
		st, _ := topology.Lookup(c.id)
		rng := rand.New(rand.NewPCG(5, uint64(len(c.id))))
		draws := c.fixed
		for range 40 {
			draws = append(draws, drawParams(rng, st))
		}
		for i, params := range draws {
			fs := opmForms(t, c.id, params, 1e3)
			for _, vr := range c.variants {
				pm, fc := extraOr(fs, "phase margin "+vr.label), extraOr(fs, "crossover "+vr.label)
				v, err := st.Values(params)
				if err != nil {
					t.Fatal(err)
				}
				vr.set(v, fs)
				if math.IsNaN(v["Cf"]) {
					continue // no suggestion for this stage (no gbw or no Ci)
				}
				m := sweptMargins(t, st, v)
				if len(m.Crossovers) > 1 {
					multiple++
				}
				where := fmt.Sprintf("%s %s, case %d %v", c.id, vr.label, i, v)
				if math.IsNaN(m.PhaseMargin) != math.IsNaN(pm) || !math.IsNaN(pm) &&
					(math.Abs(pm-m.PhaseMargin) > 1e-6 || math.Abs(fc-m.Crossover) > 1e-9*m.Crossover) {
					t.Errorf("%s: searched PM %.12g° at %.12g Hz, swept %.12g° at %.12g Hz (%d crossovers)",
						where, pm, fc, m.PhaseMargin, m.Crossover, len(m.Crossovers))
				}
			}
		}
	}
	if multiple == 0 {
		t.Error("no loop crossed unity more than once: the case the search must not miss is not covered")
	}
}

// extraPrefix is the value of the first extra whose name starts with
// prefix (a name that also says what its value gives), NaN when there is
// none.
func extraPrefix(fs topology.Forms, prefix string) float64 {
	for _, x := range fs.Extras {
		if strings.HasPrefix(x.Name, prefix) {
			return x.Value
		}
	}
	return math.NaN()
}

// extraOr is the named extra's value, NaN when the stage does not offer it.
func extraOr(fs topology.Forms, name string) float64 {
	for _, x := range fs.Extras {
		if x.Name == name {
			return x.Value
		}
	}
	return math.NaN()
}

// The bare follower driving CL with a = ωt/s (a0 = 1e9 standing in) has the
// second-order loop T = ω₀²/[s(s + ω₀/Q)] of REFERENCES.md §4, ω₀² = ωt/(ro·CL),
// Q² = ωt·ro·CL; its phase margin is arccos x and its crossover ω₀·√x, with
// x = √(1 + 1/(4Q⁴)) − 1/(2Q²) (Franco 3rd ed., ch. 8 [found]; the crossover
// from |T| = 1 [derived]). The margin extras must give both, for Q from
// 0.5 to 5 — the table's rows and beyond.
func TestCaploadSecondOrderClosedForm(t *testing.T) {
	const gbw, ro = 1e6, 50.0
	wt := 2 * math.Pi * gbw
	for _, q := range []float64{0.5, 0.7071067811865476, 1, 1.189207115002721, 2, 5} {
		cl := q * q / (wt * ro)
		p := map[string]string{"Rs": "", "Rf": "10k", "R1": "", "Cf": "", "Riso": "", "a0": "1G", "gbw": "1M", "p2": "",
			"rid": "", "rcm": "", "ro": "50", "RL": "", "CL": strconv.FormatFloat(cl, 'g', 17, 64)}
		fs := opmForms(t, "capload", p, 0)
		x := math.Sqrt(1+1/(4*q*q*q*q)) - 1/(2*q*q)
		wantPM := math.Acos(x) * 180 / math.Pi
		wantFC := math.Sqrt(wt/(ro*cl)) * math.Sqrt(x) / (2 * math.Pi)
		pm, fc := opmExtra(t, fs, "phase margin as given"), opmExtra(t, fs, "crossover as given")
		// a0 = 1e9 moves the phase by about ωt/(a0·ωc) rad and |T| by less:
		// 1e-7° and 1e-8 relative are ample.
		if math.Abs(pm-wantPM) > 1e-6 || math.Abs(fc-wantFC) > 1e-8*wantFC {
			t.Errorf("Q = %.4g: PM %.9g° at %.9g Hz, want %.9g° at %.9g Hz (REFERENCES.md §4)", q, pm, fc, wantPM, wantFC)
		}
	}
}

// BenchmarkForms is a page recompute's closed forms at the defaults,
// extras included: the TIA's and the capacitive-load driver's searched
// margins dominate.
func BenchmarkForms(b *testing.B) {
	for _, id := range []string{"inverting", "transimpedance", "capload"} {
		st, _ := topology.Lookup(id)
		v, err := st.Values(nil)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(id, func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				st.Forms(v, st.Frequency)
			}
		})
	}
}
