package feedback_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/internal/exact"
)

// spot analyzes text at f with the named reference, ports at the named
// nodes (to gnd) and the gain from the circuit's vsource Vin to node out.
func spot(t *testing.T, text, ref string, ports []string, out string, f float64) (feedback.Point, *circuit.Circuit) {
	t.Helper()
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	var ps []feedback.Port
	for _, p := range ports {
		n, ok := c.Node(p)
		if !ok {
			t.Fatalf("no node %s", p)
		}
		ps = append(ps, feedback.Port{Name: p, A: n})
	}
	var g *feedback.Gain
	if out != "" {
		o, _ := c.Node(out)
		vin, ok := c.PartIndex("Vin")
		if !ok {
			t.Fatal("no Vin")
		}
		g = &feedback.Gain{Source: vin, OutA: o}
	}
	a, err := feedback.New(c, ref, ps, g)
	if err != nil {
		t.Fatal(err)
	}
	pt, err := a.At(f)
	if err != nil {
		t.Fatal(err)
	}
	return pt, c
}

// hasNote reports whether a note of pt contains every one of parts.
func hasNote(pt feedback.Point, parts ...string) bool {
	for _, n := range pt.Notes {
		all := true
		for _, p := range parts {
			all = all && strings.Contains(n, p)
		}
		if all {
			return true
		}
	}
	return false
}

func isNull(z complex128) bool { return cmplx.IsNaN(z) }

// The degenerate cases answer with null and a note, never a number. Each
// circuit is our own construction; the facts it rests on are derived in
// its comment.
func TestDegenerateCases(t *testing.T) {
	t.Run("balanced bridge: T = 0, so g∞ is undefined", func(t *testing.T) {
		// E1 drives the bridge's top through Rf; the bridge 1k/3k, 2k/6k is
		// balanced (both dividers 3/4), so its control V(a) − V(b) is zero
		// whatever E1 does: T = 0 exactly, and g∞ = g₀ − v_r·c_s/c_r
		// divides zero by zero [derived].
		pt, _ := spot(t, "vsource Vin src gnd 1\nresistor Rs src top 1k\nresistor R1 top a 1k\nresistor R2 a gnd 3k\n"+
			"resistor R3 top b 2k\nresistor R4 b gnd 6k\nvcvs E1 out gnd sense=a,b gain=50\nresistor Rf out top 10k\n",
			"E1", []string{"top"}, "out", 1e3)
		if !(pt.TErr >= cmplx.Abs(pt.T)) {
			t.Errorf("T = %v ± %g: want zero within its bound", pt.T, pt.TErr)
		}
		if !isNull(pt.Gain.GInf) || !hasNote(pt, "T is zero within its error bound", "g∞ is not defined") {
			t.Errorf("g∞ = %v, notes %q: want null with a note", pt.Gain.GInf, pt.Notes)
		}
	})
	t.Run("1 + T = 0: the closed loop has no finite solution", func(t *testing.T) {
		// E1 (gain 2) sees half its own output through the 1k/1k divider
		// with the source zeroed: T = −2·½ = −1 [derived], so the full
		// circuit is singular (its determinant is that at zero gain times
		// 1 + T).
		pt, _ := spot(t, "vsource Vin in gnd 1\nresistor Rin in a 1k\nvcvs E1 out gnd sense=a,gnd gain=2\nresistor R1 out a 1k\n",
			"E1", []string{"a"}, "out", 0)
		if cmplx.Abs(pt.T+1) > 1e-15 {
			t.Fatalf("T = %v, want −1", pt.T)
		}
		if g := pt.Gain; !isNull(g.G) || !isNull(g.GDirect) || !hasNote(pt, "1 + T = 0", "the closed loop has no finite solution here") {
			t.Errorf("g = %v, g direct = %v, notes %q: want both null with a note", g.G, g.GDirect, pt.Notes)
		}
		// At the port the loop is the same (T open = T): no direct
		// impedance, and Blackman's admittance instead of Z.
		p := pt.Ports[0]
		if !isNull(p.ZDirect) || !isNull(p.Z) || isNull(p.Y) || !hasNote(pt, "port a", "full circuit is singular") {
			t.Errorf("Z = %v, Z direct = %v, Y = %v, notes %q", p.Z, p.ZDirect, p.Y, pt.Notes)
		}
	})
	t.Run("1 + T open = 0: no direct impedance at that port", func(t *testing.T) {
		// G1 injects 1 mA/V into x, which R1 = 1 kΩ holds: with the port's
		// driver removed, T open = gm·R1 = −1 [derived]; with the driver
		// the circuit is fine.
		pt, _ := spot(t, "vsource Vin x gnd 0\nresistor R1 x gnd 1k\nvccs G1 x gnd sense=x,gnd gm=-1m\n", "G1", []string{"x"}, "", 0)
		p := pt.Ports[0]
		if !isNull(p.ZDirect) || !hasNote(pt, "port x", "1 + T open = 0 within its error bound", "no direct impedance") {
			t.Errorf("Z direct = %v, notes %q: want null with a note", p.ZDirect, pt.Notes)
		}
		if !isNull(p.Z) || cmplx.Abs(p.Y) > p.Err.Y || !hasNote(pt, "its admittance is given instead") {
			t.Errorf("Z = %v, Y = %v ± %g: want Z null and Y zero within its bound", p.Z, p.Y, p.Err.Y)
		}
	})
	t.Run("an inductor shorts the port at DC", func(t *testing.T) {
		pt, _ := spot(t, "vsource Vin in gnd 1\nresistor R1 in a 1k\ninductor L1 a gnd 1m\nopamp U1 a out out a0=100k\nresistor RL out gnd 1k\n",
			"U1", []string{"a"}, "out", 0)
		p := pt.Ports[0]
		if p.Z != 0 || p.Err.Z != 0 || !isNull(p.TShort) {
			t.Errorf("Z = %v ± %g, T short = %v: want exactly 0 and null", p.Z, p.Err.Z, p.TShort)
		}
		if !hasNote(pt, "port a is shorted at DC by inductor L1") || hasNote(pt, "voltage source") {
			t.Errorf("notes %q: want the inductor named, not a voltage source", pt.Notes)
		}
	})
	t.Run("beyond double-double: values that cannot be computed say so", func(t *testing.T) {
		// 1 mΩ beside rid = 10³⁰ Ω at the follower's input: with the port
		// open the input node's equations cannot tell 10³ S from 10³ S +
		// 10⁻³⁰ S even with 32 digits, so Z₀, T open and the direct
		// impedance cannot be computed; the rest of the point can.
		pt, _ := spot(t, "vsource Vin src gnd 1\nresistor Rs src in 1m\nopamp U1 in out out a0=1e30 rid=1e30\nresistor RL out gnd 1k\n",
			"U1", []string{"src"}, "out", 0)
		p := pt.Ports[0]
		if !isNull(p.Z0) || !isNull(p.TOpen) || !isNull(p.ZDirect) {
			t.Errorf("Z₀ %v, T open %v, Z direct %v: want null", p.Z0, p.TOpen, p.ZDirect)
		}
		if !hasNote(pt, "port src: Z₀ and T open cannot be computed", "double-double") || !hasNote(pt, "the direct impedance cannot be computed") {
			t.Errorf("notes %q: want each value named as not computable", pt.Notes)
		}
		if g := pt.Gain; cmplx.Abs(g.G-1) > g.Err.G || g.Err.G > 1e-12 {
			t.Errorf("g = %v ± %g: want 1 (a follower with a0 = 10³⁰) to 12 digits", g.G, g.Err.G)
		}
	})
}

// An inverting stage with a0 = 10¹² at DC (our values: R1 = 10 kΩ,
// R2 = 47 kΩ, rid = 1 MΩ, ro = 50 Ω), once beyond the float64 engine's
// reach, answers every value to 12 digits against the 256-bit reference:
// its summing node is at 4.7·10⁻⁸ Ω and the output at 2.9·10⁻¹⁰ Ω.
func TestHugeOpenLoopGainAtDC(t *testing.T) {
	text := "vsource Vin src gnd 1\nresistor R1 src n 10k\nopamp U1 gnd n out a0=1e12 rid=1M ro=50\nresistor R2 out n 47k\n"
	ports := []string{"src", "n", "out"}
	pt, c := spot(t, text, "U1", ports, "out", 0)
	var xp []exact.Port
	for _, p := range ports {
		n, _ := c.Node(p)
		xp = append(xp, exact.Port{A: n})
	}
	u1, _ := c.PartIndex("U1")
	vin, _ := c.PartIndex("Vin")
	out, _ := c.Node("out")
	x := exact.Analyze(c, u1, 0, xp, &exact.Gain{Source: vin, OutA: out})
	check := func(what string, got complex128, e float64, want *exact.Complex) {
		t.Helper()
		w := want.Complex128()
		d := cmplx.Abs(got - w)
		if d > e || (w != 0 && d > 1e-12*cmplx.Abs(w)) || (w == 0 && got != 0 && e < cmplx.Abs(got)) {
			t.Errorf("%s = %.15g ± %.2g, reference %.15g", what, got, e, w)
		}
	}
	check("T", pt.T, pt.TErr, x.T)
	check("g", pt.Gain.G, pt.Gain.Err.G, x.Gain.G)
	check("g direct", pt.Gain.GDirect, pt.Gain.Err.GDirect, x.Gain.G)
	check("g∞", pt.Gain.GInf, pt.Gain.Err.GInf, x.Gain.GInf)
	for i, p := range pt.Ports {
		check("Z at "+ports[i], p.Z, p.Err.Z, x.Ports[i].Z)
		check("Z direct at "+ports[i], p.ZDirect, p.Err.ZDirect, x.Ports[i].Z)
	}
	if len(pt.Notes) != 0 {
		t.Errorf("notes %q: want none", pt.Notes)
	}
}

// The electrometer-input buffer: Rs = 50 Ω feeding an opamp follower with
// rid = 1 TΩ, a0 = 10⁶, gbw = 10 MHz (our values). The input impedance seen
// at the source, Rs + rid·(1 + a) [derived: KCL at the + input with
// V− = V_out = a·(V+ − V−)], reaches 10¹⁸ Ω; float64 assembly keeps only six
// digits of 1/rid beside 1/Rs. Every point of the sweep, Blackman's and the
// direct Z, must be within 1e-12 of the 256-bit reference and within its
// own bound, with no note.
func TestElectrometerInputSweep(t *testing.T) {
	text := "vsource Vin src gnd 1\nresistor Rs src in 50\nopamp U1 in out out a0=1e6 gbw=10M rid=1T\nresistor RL out gnd 10k\n"
	c, err := circuit.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	src, _ := c.Node("src")
	a, err := feedback.New(c, "U1", []feedback.Port{{Name: "in", A: src}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	u1, _ := c.PartIndex("U1")
	grid := floats.LogSpan(make([]float64, 29), 1, 1e7)
	pts, err := a.Sweep(grid)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for i, pt := range pts {
		f := grid[i]
		x := exact.Analyze(c, u1, f, []exact.Port{{A: src}}, nil)
		want := x.Ports[0].Z.Complex128()
		// The closed form, for scale: the reference agrees with it.
		if cf := 50 + 1e12*(1+c.Parts[u1].Amp.Gain(f)); cmplx.Abs(cf/want-1) > 1e-12 {
			t.Fatalf("f = %g: reference %v, closed form %v", f, want, cf)
		}
		p := pt.Ports[0]
		for _, v := range []struct {
			what string
			z    complex128
			e    float64
		}{{"Z", p.Z, p.Err.Z}, {"Z direct", p.ZDirect, p.Err.ZDirect}} {
			d := cmplx.Abs(v.z - want)
			rel := d / cmplx.Abs(want)
			worst = math.Max(worst, rel)
			if rel > 1e-12 || d > v.e {
				t.Errorf("f = %.4g Hz: %s = %.15g, reference %.15g: relative error %.2g (bound %.2g)", f, v.what, v.z, want, rel, v.e/cmplx.Abs(want))
			}
		}
		if len(pt.Notes) != 0 {
			t.Errorf("f = %.4g Hz: notes %q", f, pt.Notes)
		}
	}
	t.Logf("worst relative error %.2g; solves by how they ended %v", worst, a.Solves)
}
