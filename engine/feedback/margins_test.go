package feedback_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats"

	"zport/engine/feedback"
)

// Second-order loop T = ω₀²/[s(s + ω₀/Q)]: cos φm = √(1 + 1/(4Q⁴)) − 1/(2Q²)
// (Franco 3rd ed., ch. 8); table [derived] in REFERENCES.md §4. Checked two
// ways: Margins on the analytic T, and the engine on a follower whose opamp
// has a0 = 1e9 (standing in for ωt/s) and a second pole p2 = gbw/Q².
func TestPhaseMarginTable(t *testing.T) {
	table := []struct{ pm, q float64 }{
		{45, 1.1892}, {51.83, 1.0}, {60, 0.8165}, {65.53, 0.7071}, {76.35, 0.5},
	}
	for _, row := range table {
		// Formula check first: the table itself.
		q := row.q
		pm := math.Acos(math.Sqrt(1+1/(4*q*q*q*q))-1/(2*q*q)) * 180 / math.Pi
		if math.Abs(pm-row.pm) > 0.01 {
			t.Errorf("Q=%g: formula gives PM %.3f°, table %.2f°", q, pm, row.pm)
		}
		w0 := 2 * math.Pi * 1e6
		T := func(f float64) (complex128, error) {
			s := complex(0, 2*math.Pi*f)
			return complex(w0*w0, 0) / (s * (s + complex(w0/q, 0))), nil
		}
		grid := floats.LogSpan(make([]float64, 200), 1e3, 1e9)
		vals := make([]complex128, len(grid))
		for i, f := range grid {
			vals[i], _ = T(f)
		}
		m := feedback.Margins(grid, vals, T)
		if len(m.Crossovers) != 1 || math.Abs(m.PhaseMargin-pm) > 1e-6 {
			t.Errorf("Q=%g: Margins PM %v (crossovers %d), want %.6f°", q, m.PhaseMargin, len(m.Crossovers), pm)
		}
		// The same loop through the engine.
		text := fmt.Sprintf("vsource Vin in gnd 1\nopamp U1 in out out a0=1G gbw=1M p2=%.17g\n", 1e6/(q*q))
		a := analyzer(t, text, "U1", nil, nil)
		pts, err := a.Sweep(grid)
		if err != nil {
			t.Fatal(err)
		}
		for i := range pts {
			vals[i] = pts[i].T
		}
		m = feedback.Margins(grid, vals, a.ReturnRatio)
		if math.Abs(m.PhaseMargin-pm) > 1e-4 {
			t.Errorf("Q=%g: engine PM %.6f°, want %.6f°", q, m.PhaseMargin, pm)
		}
		want := feedback.Stable
		if pm < 45 {
			want = feedback.LowMargin
		}
		if m.Verdict != want {
			t.Errorf("Q=%g: verdict %q, want %q", q, m.Verdict, want)
		}
	}
}

// Three-pole loop [derived], pole set as in Franco 3rd ed., ch. 8:
// T₀ = 10⁴, poles at 100 Hz, 1 MHz, 10 MHz → crossover 784.408 kHz,
// PM = 47.411°, −180° at 3.16245 MHz, GM = 20.829 dB. Built from buffered RC
// sections so each pole is exact.
func TestThreePoleLoop(t *testing.T) {
	c := func(fp float64) float64 { return 1 / (2 * math.Pi * 1e3 * fp) }
	text := fmt.Sprintf(`
# invented test loop: gain stage and three buffered RC poles
vcvs E1 x gnd sense=gnd,fb gain=10k
resistor Ra x y 1k
capacitor Ca y gnd %.17g
vcvs E2 z gnd sense=y,gnd gain=1
resistor Rb z w 1k
capacitor Cb w gnd %.17g
vcvs E3 u gnd sense=w,gnd gain=1
resistor Rc u fb 1k
capacitor Cc fb gnd %.17g
`, c(100), c(1e6), c(10e6))
	a := analyzer(t, text, "E1", nil, nil)
	grid := floats.LogSpan(make([]float64, 400), 1, 1e9)
	pts, err := a.Sweep(grid)
	if err != nil {
		t.Fatal(err)
	}
	T := make([]complex128, len(pts))
	for i := range pts {
		T[i] = pts[i].T
	}
	near(t, "T(DC-ish)", complex(cmplx.Abs(T[0]), 0), 1e4, 1e-4)
	m := feedback.Margins(grid, T, a.ReturnRatio)
	if len(m.Crossovers) != 1 || len(m.PhaseCrossings) != 1 {
		t.Fatalf("crossovers %d, phase crossings %d; want 1 and 1", len(m.Crossovers), len(m.PhaseCrossings))
	}
	near(t, "crossover", complex(m.Crossover, 0), 784.408e3, 1e-6)
	near(t, "PM", complex(m.PhaseMargin, 0), 47.411, 1e-5)
	near(t, "f180", complex(m.PhaseCrossings[0].F, 0), 3.16245e6, 1e-6)
	near(t, "GM", complex(m.GainMargin, 0), 20.829, 1e-5)
	if m.Verdict != feedback.Stable {
		t.Errorf("verdict %q", m.Verdict)
	}
	// Raise the gain 20 dB past the margin: the verdict turns.
	a2 := analyzer(t, replace(text, "gain=10k", "gain=200k"), "E1", nil, nil)
	pts, _ = a2.Sweep(grid)
	for i := range pts {
		T[i] = pts[i].T
	}
	if m := feedback.Margins(grid, T, a2.ReturnRatio); m.Verdict != feedback.Unstable || !(m.PhaseMargin < 0) {
		t.Errorf("T₀ = 2·10⁵: verdict %q PM %v, want unstable", m.Verdict, m.PhaseMargin)
	}
}

func replace(s, old, new string) string {
	for i := 0; i+len(old) <= len(s); i++ {
		if s[i:i+len(old)] == old {
			return s[:i] + new + s[i+len(old):]
		}
	}
	return s
}

func TestNoCrossover(t *testing.T) {
	grid := floats.LogSpan(make([]float64, 50), 1, 1e6)
	low := make([]complex128, len(grid))
	high := make([]complex128, len(grid))
	for i := range grid {
		low[i], high[i] = 0.5, 50
	}
	eval := func(float64) (complex128, error) { return 0.5, nil }
	if m := feedback.Margins(grid, low, eval); m.Verdict != feedback.NoCrossover || !math.IsNaN(m.PhaseMargin) {
		t.Errorf("|T| = 0.5: %+v", m)
	}
	if m := feedback.Margins(grid, high, eval); m.Verdict != feedback.NoCrossover {
		t.Errorf("|T| = 50: %+v", m)
	}
	// Positive feedback with |T| > 1 at low frequency: T = −50/(1 + s/ω).
	pos := func(f float64) (complex128, error) { return -50 / (1 + complex(0, f/1e3)), nil }
	vals := make([]complex128, len(grid))
	for i, f := range grid {
		vals[i], _ = pos(f)
	}
	if m := feedback.Margins(grid, vals, pos); m.Verdict != feedback.Unstable {
		t.Errorf("positive feedback: verdict %q PM %v, want unstable", m.Verdict, m.PhaseMargin)
	}
}

// A loop whose |T| rises through 1 with phase lead (a feedforward path, as
// a transistor's Cμ gives) is far from −1 there: its margin is above 180°,
// and the verdict rests on the falling crossover. A double integrator with
// a zero (a type-2 loop) starts near −180° and is stable with its margin
// positive; neither may be taken for positive feedback.
func TestMarginsLeadAndTypeTwo(t *testing.T) {
	grid := floats.LogSpan(make([]float64, 300), 1, 1e9)
	// T = 0.5·(1 + s/ωz)/(1 + s/ωp)² · (1 + s/ωz)… rising above 1 with lead,
	// falling back with lag: zeros at 1 MHz (two), poles at 100 MHz (three).
	lead := func(f float64) (complex128, error) {
		s := complex(0, f)
		z := (1 + s/1e6) * (1 + s/1e6)
		p := (1 + s/1e7) * (1 + s/1e7) * (1 + s/1e7)
		return 0.5 * z / p, nil
	}
	vals := make([]complex128, len(grid))
	for i, f := range grid {
		vals[i], _ = lead(f)
	}
	m := feedback.Margins(grid, vals, lead)
	if len(m.Crossovers) != 2 || m.Verdict != feedback.Stable || m.Crossovers[0].PhaseMargin <= 180 {
		t.Errorf("lead loop: %d crossovers, verdict %q, margins %+v", len(m.Crossovers), m.Verdict, m.Crossovers)
	}
	// Type 2: T = (ωc/s)²·(1 + s/(ωc/3))/(1 + s/(3ωc)), PM = 2·atan(3) − 90° ≈ 53.13°.
	wc := 1e4
	type2 := func(f float64) (complex128, error) {
		s := complex(0, f)
		return complex(wc*wc, 0) / (s * s) * (1 + s/complex(wc/3, 0)) / (1 + s/complex(3*wc, 0)) / 3, nil
	}
	for i, f := range grid {
		vals[i], _ = type2(f)
	}
	m = feedback.Margins(grid, vals, type2)
	want := 2*math.Atan(3)*180/math.Pi - 90
	if m.Verdict != feedback.Stable || math.Abs(m.PhaseMargin-want) > 1e-6 {
		t.Errorf("type-2 loop: verdict %q PM %.6f°, want stable %.6f°", m.Verdict, m.PhaseMargin, want)
	}
}
