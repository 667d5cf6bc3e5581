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
)

// randomCircuit writes a random connected circuit of n nodes: a spanning
// chain of resistors (so every node has a DC path), random extra R, C and L,
// one part of each controlled kind, an opamp with input capacitances, and a
// bjt and a mos, each from its bias. Values are our own random
// choices, log-uniform over several decades.
func randomCircuit(rng *rand.Rand, n int) string {
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
		fmt.Fprintf(&b, "resistor Rc%d %s %s %.6g\n", i, node(rng.IntN(i)), node(i), logu(10, 1e6))
	}
	for i := 0; i < n; i++ {
		a, c := two()
		switch rng.IntN(3) {
		case 0:
			fmt.Fprintf(&b, "resistor Rx%d %s %s %.6g\n", i, a, c, logu(10, 1e6))
		case 1:
			fmt.Fprintf(&b, "capacitor Cx%d %s %s %.6g\n", i, a, c, logu(1e-12, 1e-6))
		case 2:
			fmt.Fprintf(&b, "resistor Rl%d %s m%d %.6g\ninductor Lx%d m%d %s %.6g\n", i, a, i, logu(1, 1e3), i, i, c, logu(1e-6, 1e-2))
		}
	}
	a, c := two()
	p, q := two()
	fmt.Fprintf(&b, "vcvs E1 %s mid_e sense=%s,%s gain=%.6g\nresistor Re mid_e %s %.6g\n", a, p, q, logu(0.1, 100), c, logu(100, 1e4))
	a, c = two()
	p, q = two()
	fmt.Fprintf(&b, "vccs G1 %s %s sense=%s,%s gm=%.6g\n", a, c, p, q, logu(1e-5, 1e-2))
	a, c = two()
	fmt.Fprintf(&b, "ccvs H1 %s mid_h sense=Rc1 r=%.6g\nresistor Rh mid_h %s %.6g\n", a, logu(10, 1e4), c, logu(100, 1e4))
	a, c = two()
	fmt.Fprintf(&b, "cccs F1 %s %s sense=Rc2 gain=%.6g\n", a, c, logu(0.1, 10))
	a, c = two()
	o := pick()
	if o == "gnd" {
		o = "n1"
	}
	fmt.Fprintf(&b, "opamp U1 %s %s uo a0=%.6g gbw=%.6g ro=%.6g rid=%.6g cid=%.6g ccm=%.6g\nresistor Ru uo %s %.6g\n", a, c, logu(1e3, 1e6), logu(1e5, 1e8), logu(1, 100), logu(1e5, 1e9), logu(1e-13, 1e-11), logu(1e-13, 1e-11), o, logu(100, 1e5))
	// A bjt from its bias, with every option, and a mos from its bias
	// with body effect on a random bulk.
	a, c = two()
	ic, cmu := logu(1e-5, 1e-2), logu(1e-14, 1e-12)
	ft := ic / 0.0259 / (2 * math.Pi * cmu * logu(2, 100)) // Cπ between 1 and 99 times Cμ
	fmt.Fprintf(&b, "bjt Q1 %s %s mid_q ic=%.6g beta=%.6g va=%.6g ft=%.6g cmu=%.6g rb=%.6g\nresistor Rq mid_q %s %.6g\n",
		a, c, ic, logu(30, 500), logu(10, 200), ft, cmu, logu(1, 500), pick(), logu(10, 1e4))
	a, c = two()
	fmt.Fprintf(&b, "mos M1 %s %s mid_m id=%.6g vov=%.6g lambda=%.6g cgs=%.6g cgd=%.6g gmb=%.6g b=%s\nresistor Rm mid_m %s %.6g\n",
		a, c, logu(1e-6, 1e-3), logu(0.05, 0.5), logu(0.01, 0.5), logu(1e-15, 1e-12), logu(1e-16, 1e-13), logu(1e-6, 1e-3), pick(), pick(), logu(10, 1e4))
	fmt.Fprintf(&b, "vsource Vs src gnd 1\nresistor Rs src %s %.6g\n", node(1+rng.IntN(n)), logu(10, 1e4))
	return b.String()
}

// Blackman's formula against the direct nodal solution on seeded random
// circuits, for every reference kind and random ports and frequencies.
func TestBlackmanMatchesDirectRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(2026, 12))
	checked := 0
	for trial := 0; trial < 300; trial++ {
		n := 3 + rng.IntN(10)
		text := randomCircuit(rng, n)
		c, err := circuit.Parse(text)
		if err != nil {
			t.Fatalf("trial %d: generated circuit does not parse: %v\n%s", trial, err, text)
		}
		refs := c.References()
		ref := refs[rng.IntN(len(refs))]
		var ports []feedback.Port
		for k := 0; k < 3; k++ {
			a := 1 + rng.IntN(len(c.Nodes)-1)
			b := rng.IntN(len(c.Nodes))
			if a == b {
				continue
			}
			ports = append(ports, feedback.Port{Name: fmt.Sprint(k), A: a, B: b})
		}
		src, _ := c.Node("src")
		ports = append(ports, feedback.Port{Name: "src", A: src, B: circuit.Gnd})
		an, err := feedback.New(c, ref, ports, nil)
		if err != nil {
			t.Fatal(err)
		}
		f := math.Pow(10, rng.Float64()*8)
		p, err := an.At(f)
		if err != nil {
			continue // a random circuit may be singular; the diagnostics have their own tests
		}
		illConditioned := false
		for _, n := range p.Notes {
			illConditioned = illConditioned || strings.Contains(n, "ill-conditioned")
		}
		for i, pr := range p.Ports {
			if math.IsNaN(pr.Agreement) || illConditioned {
				continue
			}
			// A port held at zero impedance by a structure the engine does
			// not recognize gives rounding residue on both sides.
			if cmplx.Abs(pr.Z) < 1e-12 && cmplx.Abs(pr.ZDirect) < 1e-12 {
				continue
			}
			checked++
			if pr.Agreement > 1e-9 {
				t.Errorf("trial %d f=%g ref %s port %s: Blackman %v vs direct %v (rel %.2g)\n%s", trial, f, ref, ports[i].Name, pr.Z, pr.ZDirect, pr.Agreement, text)
			}
		}
	}
	t.Logf("%d port results compared", checked)
	if checked < 600 {
		t.Errorf("only %d port results were comparable; the generator has drifted", checked)
	}
}
