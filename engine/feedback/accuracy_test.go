package feedback_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/internal/exact"
)

// wideCircuit writes a random connected circuit of n nodes whose values
// span what designers meet at the extremes: resistances 1 mΩ–1 TΩ,
// capacitances 1 fF–1 mF, inductances 1 nH–1 H, opamps with a0 up to 10⁹
// and gbw up to 10 GHz, and one part of each controlled kind. A spanning
// chain of resistors gives every node a DC path; inductors sit behind a
// series resistor, so no loop of inductors shorts anything at DC. The
// values are our own random choices, log-uniform.
func wideCircuit(rng *rand.Rand, n int) string {
	var b strings.Builder
	node := func(i int) string {
		if i == 0 {
			return "gnd"
		}
		return fmt.Sprintf("n%d", i)
	}
	pick := func() string { return node(rng.IntN(n + 1)) }
	logu := func(lo, hi float64) float64 { return lo * math.Pow(hi/lo, rng.Float64()) }
	two := func() (string, string) {
		for {
			a, c := pick(), pick()
			if a != c {
				return a, c
			}
		}
	}
	for i := 1; i <= n; i++ {
		fmt.Fprintf(&b, "resistor Rc%d %s %s %.6g\n", i, node(rng.IntN(i)), node(i), logu(1e-3, 1e12))
	}
	for i := 0; i < n; i++ {
		a, c := two()
		switch rng.IntN(3) {
		case 0:
			fmt.Fprintf(&b, "resistor Rx%d %s %s %.6g\n", i, a, c, logu(1e-3, 1e12))
		case 1:
			fmt.Fprintf(&b, "capacitor Cx%d %s %s %.6g\n", i, a, c, logu(1e-15, 1e-3))
		case 2:
			fmt.Fprintf(&b, "resistor Rl%d %s m%d %.6g\ninductor Lx%d m%d %s %.6g\n", i, a, i, logu(1e-3, 1e6), i, i, c, logu(1e-9, 1))
		}
	}
	a, c := two()
	p, q := two()
	fmt.Fprintf(&b, "vcvs E1 %s mid_e sense=%s,%s gain=%.6g\nresistor Re mid_e %s %.6g\n", a, p, q, logu(0.1, 100), c, logu(1, 1e6))
	a, c = two()
	p, q = two()
	fmt.Fprintf(&b, "vccs G1 %s %s sense=%s,%s gm=%.6g\n", a, c, p, q, logu(1e-6, 1))
	a, c = two()
	fmt.Fprintf(&b, "ccvs H1 %s mid_h sense=Rc1 r=%.6g\nresistor Rh mid_h %s %.6g\n", a, logu(1, 1e6), c, logu(1, 1e6))
	a, c = two()
	fmt.Fprintf(&b, "cccs F1 %s %s sense=Rc2 gain=%.6g\n", a, c, logu(0.1, 10))
	for k := 1; k <= 1+rng.IntN(3); k++ {
		a, c = two()
		o := pick()
		if o == "gnd" {
			o = "n1"
		}
		opts := fmt.Sprintf("a0=%.6g gbw=%.6g", logu(1e3, 1e9), logu(1e5, 1e10))
		if rng.IntN(4) > 0 {
			opts += fmt.Sprintf(" ro=%.6g", logu(1e-3, 1e3))
		}
		if rng.IntN(4) > 0 {
			opts += fmt.Sprintf(" rid=%.6g", logu(1e3, 1e12))
		}
		if rng.IntN(3) == 0 {
			opts += fmt.Sprintf(" rcm=%.6g", logu(1e6, 1e12))
		}
		if rng.IntN(3) == 0 {
			opts += fmt.Sprintf(" p2=%.6g", logu(1e6, 1e10))
		}
		fmt.Fprintf(&b, "opamp U%d %s %s uo%d %s\nresistor Ru%d uo%d %s %.6g\n", k, a, c, k, opts, k, k, o, logu(1e-3, 1e6))
	}
	fmt.Fprintf(&b, "vsource Vs src gnd 1\nresistor Rs src %s %.6g\n", node(1+rng.IntN(n)), logu(1e-3, 1e6))
	return b.String()
}

// comparison is one engine value beside the reference's.
type comparison struct {
	what string
	got  complex128
	err  float64 // the engine's bound
	sens float64 // its sensitivity: sens/|got| is its condition
	want *exact.Complex
}

// Every value the engine reports, on seeded random circuits of wide
// spread, against the 256-bit reference of package exact (an independent
// nodal solution from the definitions, itself checked against published
// values): each must lie within its stated bound, and within 1e-12 of the
// reference wherever its condition after refinement is below 1e14. A value the
// engine leaves out (null, with a note) is counted, not compared. The
// condition of a value is its own, componentwise (its sensitivity over its
// magnitude, as the engine reports it): where that passes 1e14 even a
// double-double residual cannot promise 12 digits, and the bound says so.
func TestAccuracyAgainstReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(2027, 10))
	trials := 120
	if testing.Short() {
		trials = 30
	}
	var compared, within, nulled, unbounded, hard int
	worst := 0.0
	for trial := 0; trial < trials; trial++ {
		text := wideCircuit(rng, 3+rng.IntN(6))
		c, err := circuit.Parse(text)
		if err != nil {
			t.Fatalf("trial %d: generated circuit does not parse: %v\n%s", trial, err, text)
		}
		refs := c.References()
		ref := refs[rng.IntN(len(refs))]
		refIdx, _ := c.PartIndex(ref)
		var ports []feedback.Port
		var xports []exact.Port
		for k := 0; k < 2; k++ {
			a := 1 + rng.IntN(len(c.Nodes)-1)
			b := rng.IntN(len(c.Nodes))
			if a == b {
				continue
			}
			ports = append(ports, feedback.Port{Name: fmt.Sprint(k), A: a, B: b})
			xports = append(xports, exact.Port{A: a, B: b})
		}
		src, _ := c.Node("src")
		ports = append(ports, feedback.Port{Name: "src", A: src, B: circuit.Gnd})
		xports = append(xports, exact.Port{A: src, B: circuit.Gnd})
		vs, _ := c.PartIndex("Vs")
		out := 1 + rng.IntN(len(c.Nodes)-1)
		an, err := feedback.New(c, ref, ports, &feedback.Gain{Source: vs, OutA: out})
		if err != nil {
			t.Fatal(err)
		}
		an.Condition = true
		f := 0.0
		if rng.IntN(5) > 0 {
			f = math.Pow(10, -3+12*rng.Float64())
		}
		pt, err := an.At(f)
		if err != nil {
			continue // a random circuit may be singular; the diagnostics have their own tests
		}
		x := exact.Analyze(c, refIdx, f, xports, &exact.Gain{Source: vs, OutA: out})
		cs := []comparison{{"T", pt.T, pt.TErr, pt.TSens, x.T}}
		for i, pr := range pt.Ports {
			xp := x.Ports[i]
			at := " at " + ports[i].Name
			z := xp.Blackman()
			if z == nil {
				// Blackman's terms are not all finite (a port held at
				// zero, say); the impedance itself still is.
				z = xp.Z
			}
			cs = append(cs,
				comparison{"Z₀" + at, pr.Z0, pr.Err.Z0, pr.Sens.Z0, xp.Z0},
				comparison{"T short" + at, pr.TShort, pr.Err.TShort, pr.Sens.TShort, xp.TShort},
				comparison{"T open" + at, pr.TOpen, pr.Err.TOpen, pr.Sens.TOpen, xp.TOpen},
				comparison{"Z" + at, pr.Z, pr.Err.Z, pr.Sens.Z, z},
				comparison{"Z direct" + at, pr.ZDirect, pr.Err.ZDirect, pr.Sens.ZDirect, xp.Z})
		}
		g, xg := pt.Gain, x.Gain
		cs = append(cs,
			comparison{"g₀", g.G0, g.Err.G0, g.Sens.G0, xg.G0},
			comparison{"g∞", g.GInf, g.Err.GInf, g.Sens.GInf, xg.GInf},
			comparison{"g", g.G, g.Err.G, g.Sens.G, xg.G},
			comparison{"g direct", g.GDirect, g.Err.GDirect, g.Sens.GDirect, xg.G})
		for _, cmp := range cs {
			switch {
			case cmplx.IsNaN(cmp.got):
				nulled++
				if cmp.want != nil && testing.Verbose() {
					t.Logf("trial %d: %s null, reference %.3g", trial, cmp.what, cmp.want.Complex128())
				}
				continue
			case math.IsInf(cmp.err, 1):
				unbounded++
				continue
			case cmp.want == nil:
				t.Errorf("trial %d, f = %g Hz, reference %s: %s = %v ± %.2g, but the reference has no finite value\n%s", trial, f, ref, cmp.what, cmp.got, cmp.err, text)
				continue
			}
			compared++
			want := cmp.want.Complex128()
			d := cmplx.Abs(cmp.got - want)
			// The reference is good to about 2⁻²⁵⁰ of the quantities
			// it combines; allow 1e-60, far below any value here.
			if d > cmp.err+1e-60 {
				t.Errorf("trial %d, f = %g Hz, reference %s: %s = %.17g, reference %.17g: off by %.3g, beyond its bound %.3g\n%s", trial, f, ref, cmp.what, cmp.got, want, d, cmp.err, text)
				continue
			}
			if cmp.got == 0 && cmp.err == 0 || cmp.err >= cmplx.Abs(cmp.got) {
				continue // exact by structure, or zero within its bound: "0 (below ±x)"
			}
			if cond := cmp.sens / cmplx.Abs(cmp.got); !(cond < 1e14) {
				hard++
				continue
			}
			rel := d / cmplx.Abs(want)
			worst = math.Max(worst, rel)
			if rel > 1e-12 {
				t.Errorf("trial %d, f = %g Hz, reference %s, condition %.2g: %s = %.17g, reference %.17g: relative error %.3g > 1e-12 (bound %.3g)\n%s", trial, f, ref, cmp.sens/cmplx.Abs(cmp.got), cmp.what, cmp.got, want, rel, cmp.err/cmplx.Abs(want), text)
			} else {
				within++
			}
		}
	}
	t.Logf("%d values compared, all within their bounds; %d within 1e-12 where their condition is below 1e14 (worst %.2g); %d null, %d without a bound; %d with condition ≥ 1e14",
		compared, within, worst, nulled, unbounded, hard)
	if compared < 10*trials {
		t.Errorf("only %d values compared; the generator has drifted", compared)
	}
}
