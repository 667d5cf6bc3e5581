package response

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/mna"
)

// gainOf prepares the gain from source src to node out (to gnd) of
// circuit text, with the nodal analyzer that checks it.
func gainOf(t *testing.T, text, src, out string) (*mna.System, int, int, *feedback.Analyzer) {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	si, ok := c.PartIndex(src)
	o, ok2 := c.Node(out)
	if !ok || !ok2 {
		t.Fatalf("no source %s or node %s", src, out)
	}
	a, err := feedback.New(c, c.References()[0], nil, &feedback.Gain{Source: si, OutA: o, OutB: circuit.Gnd})
	if err != nil {
		t.Fatal(err)
	}
	return a.Sys, si, o, a
}

func run(t *testing.T, text, src, out string, opt Options) (*Result, *feedback.Analyzer) {
	t.Helper()
	sys, si, o, a := gainOf(t, text, src, out)
	r, err := Analyze(sys, si, o, circuit.Gnd, opt)
	if err != nil {
		t.Fatal(err)
	}
	return r, a
}

func within(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !scalar.EqualWithinRel(got, want, tol) {
		t.Errorf("%s = %.12g, want %.12g (relative difference %.1e, tolerance %.0e)", what, got, want, math.Abs(got-want)/math.Abs(want), tol)
	}
}

// A voltage follower whose op amp has one pole, a(s) = a0/(1 + s/ω1), is
// exactly first order: a/(1 + a) = K/(1 + sτ) with K = a0/(1 + a0) and
// τ = 1/((1 + a0)·ω1) [derived]. Its step is K(1 − e^(−t/τ)), its 10–90 %
// rise τ·ln 9, its settling to 1 % and 0.1 % τ·ln 100 and τ·ln 1000, its
// −3 dB bandwidth 1/(2πτ) (REFERENCES §8, first order).
func TestFirstOrderFollower(t *testing.T) {
	const a0, gbw = 1e5, 1e6
	r, _ := run(t, "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M\n", "Vin", "out", Options{})
	w1 := 2 * math.Pi * gbw / a0
	K, tau := a0/(1+a0), 1/((1+a0)*w1)
	if len(r.Poles) != 1 {
		t.Fatalf("%d poles, want 1: %v", len(r.Poles), r.Poles)
	}
	within(t, "pole", real(r.Poles[0].P), -1/tau, 1e-9)
	within(t, "final", r.Final, K, 1e-12)
	for k, tk := range r.Time {
		if want := K * -math.Expm1(-tk/tau); math.Abs(r.Step[k]-want) > 1e-12*K {
			t.Fatalf("step at %g s = %.15g, want %.15g", tk, r.Step[k], want)
		}
	}
	within(t, "rise time", r.RiseTime, tau*math.Log(9), 1e-6)
	within(t, "10 % time", r.Rise10, tau*math.Log(10.0/9), 1e-6)
	within(t, "settling to 1 %", r.Settling1, tau*math.Log(100), 1e-6)
	within(t, "settling to 0.1 %", r.Settling01, tau*math.Log(1000), 1e-6)
	within(t, "bandwidth", r.Bandwidth, 1/(2*math.Pi*tau), 1e-9)
	if r.Overshoot != 0 || !math.IsNaN(r.PeakingDB) || r.Kind != "low-pass" {
		t.Errorf("overshoot %g, peaking %g dB, kind %s: want 0, none, low-pass", r.Overshoot, r.PeakingDB, r.Kind)
	}
}

// secondOrder is the unity-feedback follower of an op amp with poles ω1,
// ω2: its closed loop a/(1 + a) is exactly second order with
// ωn² = (1 + a0)·ω1·ω2 and 2ζωn = ω1 + ω2 [derived]. ω1 is chosen for a
// wanted ζ; the truth is then computed back from the parts.
func secondOrder(zeta float64) (text string, K, wn, z float64) {
	const a0 = 1e5
	w2 := 2 * math.Pi * 1e6
	k := 2*zeta*zeta*(1+a0) - 1
	w1 := w2 * (k - math.Sqrt(k*k-1))
	text = fmt.Sprintf("vsource Vin in gnd 1\nopamp U1 in out out a0=%g gbw=%.17g p2=%.17g\n", a0, a0*w1/(2*math.Pi), w2/(2*math.Pi))
	// What the parser reads back, so the truth is the circuit's own.
	gbw := a0 * w1 / (2 * math.Pi)
	w1 = 2 * math.Pi * gbw / a0
	wn = math.Sqrt((1 + a0) * w1 * w2)
	return text, a0 / (1 + a0), wn, (w1 + w2) / (2 * wn)
}

// Against the second-order closed forms (Ogata, "Modern Control
// Engineering" [memory]; Franco 3rd ed. ch. 8 [found]; REFERENCES §4, §8):
// poles −ζωn ± jωn√(1−ζ²), step K[1 − e^(−ζωn t)(cos ωd t + ζ/√(1−ζ²)
// sin ωd t)], overshoot exp(−πζ/√(1−ζ²)) at t = π/ωd, resonant peak
// 1/(2ζ√(1−ζ²)) at ωn√(1−2ζ²), −3 dB bandwidth
// ωn√(1 − 2ζ² + √(4ζ⁴ − 4ζ² + 2)). Rise and settling times are solved
// here from the closed-form step by bisection.
func TestSecondOrder(t *testing.T) {
	for _, zeta := range []float64{0.3, 0.5, 0.7} {
		t.Run(fmt.Sprint(zeta), func(t *testing.T) {
			text, K, wn, z := secondOrder(zeta)
			r, _ := run(t, text, "Vin", "out", Options{})
			wd := wn * math.Sqrt(1-z*z)
			if len(r.Poles) != 2 {
				t.Fatalf("%d poles, want 2", len(r.Poles))
			}
			want := complex(-z*wn, wd)
			if d := cmplx.Abs(r.Poles[0].P-want) / cmplx.Abs(want); d > 1e-9 || r.Poles[1].P != cmplx.Conj(r.Poles[0].P) {
				t.Errorf("poles %v, want %v and its conjugate (relative difference %.1e)", r.Poles[:2], want, d)
			}
			within(t, "Q", r.Poles[0].Q(), 1/(2*z), 1e-9)
			within(t, "final", r.Final, K, 1e-12)
			y := func(tt float64) float64 {
				return K * (1 - math.Exp(-z*wn*tt)*(math.Cos(wd*tt)+z/math.Sqrt(1-z*z)*math.Sin(wd*tt)))
			}
			for k, tk := range r.Time {
				if math.Abs(r.Step[k]-y(tk)) > 1e-10*K {
					t.Fatalf("step at %g s = %.15g, want %.15g", tk, r.Step[k], y(tk))
				}
			}
			within(t, "overshoot (%)", r.Overshoot, 100*math.Exp(-math.Pi*z/math.Sqrt(1-z*z)), 1e-6)
			within(t, "peak time", r.PeakTime, math.Pi/wd, 1e-6)
			within(t, "peak |g| / K", math.Pow(10, r.PeakingDB/20), 1/(2*z*math.Sqrt(1-z*z)), 1e-9)
			within(t, "peak frequency", 2*math.Pi*r.PeakingFrequency, wn*math.Sqrt(1-2*z*z), 1e-6)
			within(t, "bandwidth", 2*math.Pi*r.Bandwidth, wn*math.Sqrt(1-2*z*z+math.Sqrt(4*z*z*z*z-4*z*z+2)), 1e-9)

			// Rise: the first times y reaches 10 % and 90 % of K.
			first := func(level float64) float64 {
				step := 1e-3 / wn
				tt := 0.0
				for y(tt+step) < level*K {
					tt += step
				}
				return bisect(func(x float64) float64 { return y(x) - level*K }, tt, tt+step)
			}
			within(t, "rise time", r.RiseTime, first(0.9)-first(0.1), 1e-6)
			// Settling: the last time |y − K| = band·K, found from the end
			// of a span where the envelope is far inside the band.
			settle := func(band float64) float64 {
				step := 1e-3 / wn
				tt := math.Log(1e5) / (z * wn)
				for math.Abs(y(tt-step)-K) <= band*K {
					tt -= step
				}
				lv := K * (1 + band)
				if y(tt-step) < K {
					lv = K * (1 - band)
				}
				return bisect(func(x float64) float64 { return y(x) - lv }, tt-step, tt)
			}
			within(t, "settling to 1 %", r.Settling1, settle(0.01), 1e-6)
			within(t, "settling to 0.1 %", r.Settling01, settle(0.001), 1e-6)
		})
	}
}

// bisect finds a zero of f between a and b, where it changes sign.
func bisect(f func(float64) float64, a, b float64) float64 {
	fa := f(a)
	for range 200 {
		m := (a + b) / 2
		if fm := f(m); (fm > 0) == (fa > 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return (a + b) / 2
}

// randomCircuit writes a random circuit with dynamics of every kind the
// pencil realises: RC and RL branches, an op amp with two poles and its
// output resistance, a vcvs, and a cccs sensing a capacitor's current
// (a gain that lands in C). Values are our own, log-uniform.
func randomCircuit(rng *rand.Rand, n int) string {
	var b strings.Builder
	node := func(i int) string {
		if i == 0 {
			return "gnd"
		}
		return fmt.Sprintf("n%d", i)
	}
	logu := func(lo, hi float64) float64 { return lo * math.Pow(hi/lo, rng.Float64()) }
	fmt.Fprintf(&b, "vsource Vs src gnd 1\nresistor Rs src n1 %.6g\n", logu(10, 1e4))
	for i := 2; i <= n; i++ {
		fmt.Fprintf(&b, "resistor R%d %s %s %.6g\n", i, node(1+rng.IntN(i-1)), node(i), logu(100, 1e5))
	}
	other := func(i int) string { // any node but i
		j := rng.IntN(n)
		if j >= i {
			j++
		}
		return node(j)
	}
	for i := 1; i <= n; i++ {
		a, c := other(i), node(i)
		switch rng.IntN(3) {
		case 0:
			fmt.Fprintf(&b, "capacitor C%d %s %s %.6g\n", i, a, c, logu(1e-12, 1e-7))
		case 1:
			fmt.Fprintf(&b, "resistor Rl%d %s m%d %.6g\ninductor L%d m%d %s %.6g\n", i, a, i, logu(1, 1e3), i, i, c, logu(1e-6, 1e-3))
		default:
			fmt.Fprintf(&b, "capacitor C%d %s gnd %.6g\n", i, c, logu(1e-12, 1e-9))
		}
	}
	fmt.Fprintf(&b, "capacitor Cs n1 gnd %.6g\n", logu(1e-12, 1e-9))
	fmt.Fprintf(&b, "opamp U1 %s %s uo a0=%.6g gbw=%.6g p2=%.6g ro=%.6g\nresistor Ru uo %s %.6g\n",
		node(1), other(1), logu(1e3, 1e6), logu(1e5, 1e8), logu(1e6, 1e9), logu(1, 100), node(1+rng.IntN(n)), logu(100, 1e5))
	fmt.Fprintf(&b, "vcvs E1 e gnd sense=%s,gnd gain=%.6g\nresistor Re e %s %.6g\n", node(1+rng.IntN(n)), logu(0.1, 10), node(1+rng.IntN(n)), logu(1e3, 1e5))
	fmt.Fprintf(&b, "cccs F1 gnd %s sense=Cs gain=%.6g\n", node(1+rng.IntN(n)), logu(0.01, 1))
	return b.String()
}

// The realisation g(s) = d + cᵀ(sI − A)⁻¹b against the nodal analyzer's
// direct solution, which assembles A(s) of each op amp as a rational
// function rather than as states: on seeded random circuits over seven
// decades of frequency, to what double precision can promise for each
// (1e-9, or 100·2⁻⁵³ times the nodal system's estimated condition number
// where that is more; these circuits reach 10¹⁰). The unstable ones are
// left out: for them the model only draws the growing step.
func TestRealisationMatchesNodal(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 2026))
	checked := 0
	for trial := 0; trial < 200; trial++ {
		text := randomCircuit(rng, 3+rng.IntN(8))
		sys, si, o, a := gainOf(t, text, "Vs", fmt.Sprintf("n%d", 1+rng.IntN(3)))
		a.Condition = true
		P := sys.Pencil()
		b, c := make([]float64, P.N), make([]float64, P.N)
		for _, tm := range sys.Excitation(si) {
			b[tm.I] += tm.V
		}
		c[mna.NodeVar(o)] = 1
		md, err := build(P, b, c)
		if err != nil {
			t.Fatalf("trial %d: %v\n%s", trial, err, text)
		}
		if slices.ContainsFunc(md.raw, func(p complex128) bool { return real(p) > 0 }) {
			continue
		}
		checked++
		x := make([]complex128, md.m)
		worst, big, cond := 0.0, 0.0, 0.0
		for _, f := range []float64{0, 1, 1e2, 1e4, 1e5, 1e6, 1e7} {
			pt, err := a.At(f)
			if err != nil {
				t.Fatal(err)
			}
			g := md.at(complex(0, 2*math.Pi*f), x)
			worst = math.Max(worst, cmplx.Abs(g-pt.Gain.GDirect))
			big = math.Max(big, cmplx.Abs(pt.Gain.GDirect))
			cond = math.Max(cond, pt.Cond)
		}
		if tol := math.Max(1e-9, 100*0x1p-53*cond); worst > tol*big {
			t.Errorf("trial %d: realisation and nodal solution differ by %.1e of the largest |g| %.3g (tolerance %.0e, condition %.1e)\n%s", trial, worst/big, big, tol, cond, text)
		}
	}
	if checked < 100 {
		t.Errorf("only %d stable circuits of 200", checked)
	}
}

// Circuits whose instantaneous modes have index 2 (an ideal op-amp output
// loaded by a capacitor; a voltage source straight across a capacitor)
// have no spurious natural frequencies, and their step and gain agree with
// the nodal solution: at late time the step equals the gain at DC, and the
// area between the step and its final value equals −dg/ds at s = 0
// (∫(y∞ − y)dt = −g′(0), from the final-value theorem applied to
// (g(0) − g(s))/s [derived]).
func TestStepCrossChecks(t *testing.T) {
	for _, c := range []struct {
		name, text string
		poles      int
	}{
		{"ideal output into CL", "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M p2=10M\nresistor R2 out fb 9k\nresistor R1 fb gnd 1k\ncapacitor CL out gnd 1n\nresistor RL out gnd 1k\n", 2},
		{"source across C", "vsource Vin in gnd 1\ncapacitor C1 in gnd 1n\nresistor R1 in a 1k\ncapacitor C2 a gnd 1n\nvcvs E1 out gnd sense=a,gnd gain=1\n", 1},
		{"RLC ladder", "vsource Vin in gnd 1\nresistor R1 in a 50\ninductor L1 a b 10u\ncapacitor C1 b gnd 1n\nresistor R2 b c 100\ncapacitor C2 c gnd 2n\nvcvs E1 out gnd sense=c,gnd gain=2\n", 3},
		{"non-inverting with ro and CL", "vsource Vin in gnd 1\nopamp U1 in fb out a0=200k gbw=5M p2=30M ro=50\nresistor R2 out fb 10k\nresistor R1 fb gnd 10k\ncapacitor CL out gnd 4.7n\n", 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			r, a := run(t, c.text, "Vin", "out", Options{Points: 20000})
			if len(r.Poles) != c.poles {
				t.Errorf("%d natural frequencies, want %d: %v", len(r.Poles), c.poles, r.Poles)
			}
			dc, err := a.At(0)
			if err != nil {
				t.Fatal(err)
			}
			g0 := real(dc.Gain.GDirect)
			within(t, "final", r.Final, g0, 1e-12)
			// Run the step far past settling to check where it ends.
			late, _ := run(t, c.text, "Vin", "out", Options{To: 50 * r.Settling01, Points: 1000})
			within(t, "step at late time", late.Step[len(late.Step)-1], g0, 1e-9)
			// −g′(0) from the nodal solution at a frequency far below every
			// pole: Im g(jω)/ω, accurate to O(ω²).
			w := 1e-5 * math.Abs(real(r.Poles[0].P))
			lo, err := a.At(w / (2 * math.Pi))
			if err != nil {
				t.Fatal(err)
			}
			want := -imag(lo.Gain.GDirect) / w
			// The area by Simpson's rule on the exact samples, over the
			// default span (the step has settled to 1e-12 by then).
			full, _ := run(t, c.text, "Vin", "out", Options{To: 30 * r.Settling01, Points: 20001})
			h := full.Time[1]
			area := 0.0
			for k, v := range full.Step {
				wgt := 2.0
				switch {
				case k == 0 || k == len(full.Step)-1:
					wgt = 1
				case k%2 == 1:
					wgt = 4
				}
				area += wgt * (g0 - v)
			}
			area *= h / 3
			within(t, "∫(y∞ − y)dt", area, want, 1e-6)
		})
	}
}

// A loop with three poles and too much gain is unstable: the response
// still answers, with the growing step and no figures.
func TestUnstable(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in fb x a0=100k gbw=10M p2=3M\nresistor R x out 1k\ncapacitor C out gnd 1n\nresistor Rf out fb 1\n"
	r, _ := run(t, text, "Vin", "out", Options{})
	if r.Stability != Unstable {
		t.Fatalf("stability %v, want unstable; poles %v", r.Stability, r.Poles)
	}
	for name, v := range map[string]float64{"final": r.Final, "overshoot": r.Overshoot, "rise": r.RiseTime, "settling": r.Settling1, "bandwidth": r.Bandwidth} {
		if !math.IsNaN(v) {
			t.Errorf("%s = %g, want none", name, v)
		}
	}
	n := len(r.Step)
	if !(math.Abs(r.Step[n-1]) > 100*math.Abs(r.Step[n/10])) {
		t.Errorf("the step does not grow: %g at 10 %% of the span, %g at the end", r.Step[n/10], r.Step[n-1])
	}
	if len(r.Notes) == 0 || !strings.Contains(r.Notes[0], "Unstable") {
		t.Errorf("notes %q lack the unstable one", r.Notes)
	}
}

// A lossless LC is marginally stable: its natural frequencies ±j/√(LC)
// (to 1e-9), a step that rings forever, no final value.
func TestMarginal(t *testing.T) {
	r, _ := run(t, "vsource Vin in gnd 1\ninductor L1 in out 1m\ncapacitor C1 out gnd 1u\nvcvs E1 x gnd sense=out,gnd gain=1\n", "Vin", "out", Options{})
	if r.Stability != Marginal || len(r.Poles) != 2 {
		t.Fatalf("stability %v with poles %v, want marginal with two", r.Stability, r.Poles)
	}
	within(t, "ω of the LC", imag(r.Poles[0].P), 1/math.Sqrt(1e-3*1e-6), 1e-9)
	if !math.IsNaN(r.Final) {
		t.Errorf("final %g, want none", r.Final)
	}
}

// An AC-coupled stage, a buffered high-pass τ1 = R1·C1 into a low-pass
// τ2 = R2·C2: g = sτ1/((1 + sτ1)(1 + sτ2)), a band-pass whose largest
// gain τ1/(τ1 + τ2) is at 1/√(τ1τ2) and whose corners are where |g|² falls
// to half of that (solved here by bisection on the closed form). Its step
// returns to 0.
func TestBandPass(t *testing.T) {
	const t1, t2 = 1e-3, 1e-6
	r, _ := run(t, "vsource Vin in gnd 1\ncapacitor C1 in a 1u\nresistor R1 a gnd 1k\nvcvs E1 b gnd sense=a,gnd gain=1\nresistor R2 b out 1k\ncapacitor C2 out gnd 1n\n", "Vin", "out", Options{})
	if r.Kind != "band-pass" {
		t.Fatalf("kind %q, want band-pass", r.Kind)
	}
	g2 := func(w float64) float64 { return w * w * t1 * t1 / ((1 + w*w*t1*t1) * (1 + w*w*t2*t2)) }
	peak := t1 / (t1 + t2)
	within(t, "largest gain", r.Reference, peak, 1e-9)
	within(t, "its frequency", 2*math.Pi*r.ReferenceFrequency, 1/math.Sqrt(t1*t2), 1e-6)
	half := func(x float64) float64 { return g2(math.Exp(x)) - peak*peak/2 }
	centre := math.Log(1 / math.Sqrt(t1*t2))
	within(t, "lower corner", 2*math.Pi*r.LowerCorner, math.Exp(bisect(half, centre-20, centre)), 1e-9)
	within(t, "upper corner", 2*math.Pi*r.Bandwidth, math.Exp(bisect(half, centre, centre+20)), 1e-9)
	if math.Abs(r.Final) > 1e-12 || !math.IsNaN(r.Overshoot) || !math.IsNaN(r.PeakingDB) {
		t.Errorf("final %g, overshoot %g, peaking %g: want 0, none, none", r.Final, r.Overshoot, r.PeakingDB)
	}
}

// A resistive gain has no natural frequencies: its step is a step.
func TestStatic(t *testing.T) {
	r, _ := run(t, "vsource Vin in gnd 1\nresistor R1 in out 3k\nresistor R2 out gnd 1k\nvcvs E1 x gnd sense=out,gnd gain=1\n", "Vin", "out", Options{})
	if len(r.Poles) != 0 || r.Final != 0.25 || r.Overshoot != 0 || r.RiseTime != 0 || r.Settling01 != 0 {
		t.Errorf("poles %v, final %g, overshoot %g, rise %g, settling %g", r.Poles, r.Final, r.Overshoot, r.RiseTime, r.Settling01)
	}
	for _, v := range r.Step {
		if v != 0.25 {
			t.Fatalf("step %v, want 0.25 throughout", r.Step)
		}
	}
}

// The time axis is the one asked for; the figures do not depend on it.
func TestTimeAxis(t *testing.T) {
	text, _, _, _ := secondOrder(0.5)
	auto, _ := run(t, text, "Vin", "out", Options{})
	short, _ := run(t, text, "Vin", "out", Options{To: auto.To / 10, Points: 37})
	if len(short.Time) != 37 || short.Time[36] != auto.To/10 || short.To != auto.To/10 {
		t.Errorf("axis of %d points ending at %g, want 37 ending at %g", len(short.Time), short.Time[len(short.Time)-1], auto.To/10)
	}
	if short.Overshoot != auto.Overshoot || short.Settling01 != auto.Settling01 {
		t.Errorf("figures changed with the span: overshoot %g vs %g, settling %g vs %g", short.Overshoot, auto.Overshoot, short.Settling01, auto.Settling01)
	}
	if auto.Settling01 > auto.To {
		t.Errorf("the automatic span %g ends before the step settles (%g)", auto.To, auto.Settling01)
	}
}

// Two equal buffered RC sections make a double pole, 1/(1 + sτ)², whose
// step is 1 − (1 + t/τ)·e^(−t/τ) (the inverse Laplace transform of
// 1/(s(1 + sτ)²), a standard table entry [memory]). Its residues do not
// exist as simple ones, so the figures come from the exponential itself.
// A double zero of det(G + sC) is found only to about √ε.
func TestDoublePole(t *testing.T) {
	const tau = 1e-6
	r, _ := run(t, "vsource Vin in gnd 1\nresistor R1 in a 1k\ncapacitor C1 a gnd 1n\nvcvs E1 b gnd sense=a,gnd gain=1\nresistor R2 b out 1k\ncapacitor C2 out gnd 1n\nvcvs E2 x gnd sense=out,gnd gain=1\n", "Vin", "out", Options{})
	if len(r.Poles) != 2 {
		t.Fatalf("poles %v, want two", r.Poles)
	}
	for _, p := range r.Poles {
		if d := cmplx.Abs(p.P+1/tau) * tau; d > 1e-7 {
			t.Errorf("pole %v, want −1/τ = %g (relative difference %.1e)", p.P, -1/tau, d)
		}
	}
	y := func(tt float64) float64 { return 1 - (1+tt/tau)*math.Exp(-tt/tau) }
	for k, tk := range r.Time {
		if math.Abs(r.Step[k]-y(tk)) > 1e-12 {
			t.Fatalf("step at %g s = %.15g, want %.15g", tk, r.Step[k], y(tk))
		}
	}
	cross := func(level float64) float64 {
		return bisect(func(x float64) float64 { return y(x) - level }, 0, 100*tau)
	}
	within(t, "rise time", r.RiseTime, cross(0.9)-cross(0.1), 1e-6)
	within(t, "settling to 1 %", r.Settling1, cross(0.99), 1e-6)
	within(t, "settling to 0.1 %", r.Settling01, cross(0.999), 1e-6)
	// |g|² = 1/(1 + ω²τ²)² = ½ at ω = √(√2 − 1)/τ.
	within(t, "bandwidth", 2*math.Pi*r.Bandwidth, math.Sqrt(math.Sqrt2-1)/tau, 1e-9)
	if r.Overshoot != 0 {
		t.Errorf("overshoot %g, want 0", r.Overshoot)
	}
}
