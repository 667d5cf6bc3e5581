package feedback_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

// The transistor elements are the hybrid-π model (Gray, Hurst, Lewis, Meyer,
// 5th ed., ch. 1 [memory]; REFERENCES.md §11) written as one line: a bjt or
// mos line must give, for every port term, the return ratio and the gain,
// what its composition from vccs, resistors and capacitors gives, to 1e-12.
// The compositions' values are computed here from the published relations
// with the exact SI constants (BIPM SI Brochure, 9th ed., 2019), not taken
// from the parser.
func TestTransistorLineEqualsComposition(t *testing.T) {
	const k, q = 1.380649e-23, 1.602176634e-19
	num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	vt := func(kelvin float64) float64 { return k * kelvin / q }

	// A common-emitter stage with emitter degeneration, partly bypassed, and
	// every bjt option (invented values).
	ic, beta, va, ft, cmu, rb := 2e-3, 150.0, 80.0, 500e6, 0.8e-12, 120.0
	gm := ic / vt(300)
	ce := `vsource Vin in gnd 1
resistor Rs in b 600
resistor RC c gnd 2.2k
capacitor CL c gnd 5p
resistor RE e gnd 47
resistor RE2 e x 220
capacitor CE x gnd 10n
port in in gnd
port out c gnd
port emit e gnd
`
	bjtLine := ce + fmt.Sprintf("bjt Q1 c b e ic=%s beta=%s va=%s ft=%s cmu=%s rb=%s\n", num(ic), num(beta), num(va), num(ft), num(cmu), num(rb))
	bjtComp := ce + fmt.Sprintf(`vccs Gq c e sense=bx,e gm=%s
resistor rb b bx %s
resistor rpi bx e %s
resistor ro c e %s
capacitor cpi bx e %s
capacitor cmu bx c %s
`, num(gm), num(rb), num(beta/gm), num(va/ic), num(gm/(2*math.Pi*ft)-cmu), num(cmu))

	// A cascode with body effect on the upper device (bulk at its own node,
	// held by a resistor to gnd) and gate capacitances (invented values).
	id, vov, lambda := 150e-6, 0.2, 0.12
	gmM := 2 * id / vov
	cas := `vsource Vin g1 gnd 1
resistor RL d gnd 400k
capacitor CL d gnd 50f
resistor Rbias g2 gnd 10k
resistor Rsub sub gnd 1k
port out d gnd
port mid x gnd
port gate g2 gnd
`
	mosLine := cas + fmt.Sprintf(`mos M1 x g1 gnd id=%s vov=%s lambda=%s cgs=60f cgd=8f
mos M2 d g2 x gm=1.3m ro=90k cgs=55f cgd=7f gmb=0.25m b=sub
`, num(id), num(vov), num(lambda))
	mosComp := cas + fmt.Sprintf(`vccs G1 x gnd sense=g1,gnd gm=%s
resistor ro1 x gnd %s
capacitor cgs1 g1 gnd 60f
capacitor cgd1 g1 x 8f
vccs G2 d x sense=g2,x gm=1.3m
vccs Gb2 d x sense=sub,x gm=0.25m
resistor ro2 d x 90k
capacitor cgs2 g2 x 55f
capacitor cgd2 g2 d 7f
`, num(gmM), num(1/(lambda*id)))

	// An op amp's input capacitances are capacitors across and beside its
	// inputs (invented values).
	ni := `vsource Vin in gnd 1
resistor Rs in p 10k
resistor R1 n gnd 2k
resistor R2 out n 18k
port in in gnd
port out out gnd
`
	ampLine := ni + "opamp U1 p n out a0=100dB gbw=5M ro=60 rid=2M rcm=1G cid=2p ccm=6p\n"
	ampComp := ni + `opamp U1 p n out a0=100k gbw=5M ro=60 rid=2M rcm=1G
capacitor Cid p n 2p
capacitor Ccm1 p gnd 6p
capacitor Ccm2 n gnd 6p
`
	cases := []struct {
		name             string
		line, comp       string
		refLine, refComp string
		ports            [][3]string
		gainOut          string
	}{
		{"bjt as reference", bjtLine, bjtComp, "Q1", "Gq", [][3]string{{"in", "in", "gnd"}, {"out", "c", "gnd"}, {"emit", "e", "gnd"}, {"base", "b", "gnd"}}, "c"},
		{"mos M1 as reference", mosLine, mosComp, "M1", "G1", [][3]string{{"out", "d", "gnd"}, {"mid", "x", "gnd"}, {"gate", "g2", "gnd"}}, "d"},
		{"mos M2 as reference", mosLine, mosComp, "M2", "G2", [][3]string{{"out", "d", "gnd"}, {"mid", "x", "gnd"}, {"gate", "g2", "gnd"}, {"across", "d", "x"}}, "d"},
		{"opamp input capacitance", ampLine, ampComp, "U1", "U1", [][3]string{{"in", "in", "gnd"}, {"out", "out", "gnd"}, {"plus", "p", "gnd"}}, "out"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, f := range []float64{0, 1e3, 1e6, 30e6, 1e9} {
				a := analyzer(t, c.line, c.refLine, c.ports, &[3]string{"Vin", c.gainOut, "gnd"})
				b := analyzer(t, c.comp, c.refComp, c.ports, &[3]string{"Vin", c.gainOut, "gnd"})
				pa, err := a.At(f)
				if err != nil {
					t.Fatalf("line at %g Hz: %v", f, err)
				}
				pb, err := b.At(f)
				if err != nil {
					t.Fatalf("composition at %g Hz: %v", f, err)
				}
				same := func(what string, x, y complex128) {
					t.Helper()
					if cmplx.IsNaN(x) && cmplx.IsNaN(y) {
						return // not finite in either (G∞ with M1's control at the source)
					}
					d := cmplx.Abs(x - y)
					if m := math.Max(cmplx.Abs(x), cmplx.Abs(y)); m > 0 {
						d /= m
					}
					if !(d <= 1e-12) {
						t.Errorf("%g Hz: %s: line %v, composition %v (rel %.2g)", f, what, x, y, d)
					}
				}
				same("T", pa.T, pb.T)
				for i := range pa.Ports {
					x, y := pa.Ports[i], pb.Ports[i]
					n := c.ports[i][0]
					same(n+" Z0", x.Z0, y.Z0)
					same(n+" T short", x.TShort, y.TShort)
					same(n+" T open", x.TOpen, y.TOpen)
					same(n+" Z", x.Z, y.Z)
					same(n+" Z direct", x.ZDirect, y.ZDirect)
				}
				same("G0", pa.Gain.G0, pb.Gain.G0)
				same("G∞", pa.Gain.GInf, pb.Gain.GInf)
				same("G", pa.Gain.G, pb.Gain.G)
				same("G direct", pa.Gain.GDirect, pb.Gain.GDirect)
			}
		})
	}

	// At another temperature the bjt line follows VT = kT/q.
	hot, err := circuit.ParseWith(bjtLine, circuit.Options{Temperature: 400})
	if err != nil {
		t.Fatal(err)
	}
	q1, _ := hot.Part("Q1")
	if d := math.Abs(q1.Dev.Gm-ic/vt(400)) / (ic / vt(400)); d > 1e-15 {
		t.Errorf("gm at 400 K = %.17g, want %.17g", q1.Dev.Gm, ic/vt(400))
	}
}

// A floating gate is reported as such, and a source tied only through its
// transconductance to a biased gate is not.
func TestTransistorStructure(t *testing.T) {
	c, err := circuit.Parse("vsource Vin in gnd 1\nmos M1 d g s gm=1m ro=10k\nresistor RL d gnd 1k\nresistor RS s gnd 1k\nport out d gnd\n")
	if err != nil {
		t.Fatal(err)
	}
	a, err := feedback.New(c, "M1", []feedback.Port{{Name: "out", A: 1, B: 0}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := a.At(1e3); err == nil || !strings.Contains(err.Error(), "node g floats") {
		t.Errorf("floating gate: %v", err)
	}
	// A source follower whose source node has nothing but the device: the
	// transconductance alone fixes it once the gate is driven.
	c, err = circuit.Parse("vsource Vin g gnd 1\nmos M1 gnd g s gm=1m\nmos M2 s gnd gnd gm=1m ro=100k\nport out s gnd\n")
	if err != nil {
		t.Fatal(err)
	}
	s, _ := c.Node("s")
	a, err = feedback.New(c, "M2", []feedback.Port{{Name: "out", A: s, B: 0}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.At(1e3)
	if err != nil {
		t.Fatalf("source follower: %v", err)
	}
	// 1/gm ∥ ro of the lower device (its gate and source at gnd).
	if z := p.Ports[0].ZDirect; cmplx.Abs(z-complex(1/(1e-3+1e-5), 0)) > 1e-9*cmplx.Abs(z) {
		t.Errorf("source follower output: %v, want 1/gm ∥ ro", z)
	}
}
