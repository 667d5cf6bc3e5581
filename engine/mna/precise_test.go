package mna

import (
	"math/cmplx"
	"testing"

	"zport/engine/circuit"
	"zport/engine/dd"
)

// allKinds is an invented circuit with every part kind, two opamps (one
// with every model number) and a current-sensing source on a resistor and
// on a capacitor.
const allKinds = `
vsource V1 in gnd 1
isource I1 gnd n3 1m
resistor R1 in n1 1k
capacitor C1 n1 gnd 10n
inductor L1 n1 n2 1m
resistor R2 n2 gnd 3k3
opamp U1 n2 n3 n4 a0=200k gbw=5M p2=80M rid=2M rcm=1G ro=75
resistor R3 n4 n3 47k
vcvs E1 n5 gnd sense=n4,n1 gain=2.5
resistor R4 n5 n6 220
vccs G1 n6 gnd sense=n2,gnd gm=3m
ccvs H1 n7 gnd sense=R4 r=150
capacitor C2 n7 n6 2.2n
cccs F1 gnd n6 sense=C2 gain=0.7
resistor R5 n6 gnd 10k
opamp U2 n6 n8 n8 a0=1e5
resistor R6 n8 gnd 1k
`

// Residual is linear in x, so Residual(0 − e_j) is column j of A; it must
// match the assembled matrix (rounded to float64, so to within its own
// rounding) for every configuration, and Residual with trans its row.
func TestResidualMatchesAssembly(t *testing.T) {
	c, err := circuit.Parse(allKinds)
	if err != nil {
		t.Fatal(err)
	}
	s := New(c)
	p := NewPrecise(s)
	n2, _ := c.Node("n2")
	n6, _ := c.Node("n6")
	v1, _ := c.PartIndex("V1")
	cfgs := []Config{
		{F: 0, Ref: 0, RefGain: true},
		{F: 1234.5, Ref: 0, RefGain: true},
		{F: 1234.5, Ref: 0},
		{F: 2e6, Ref: 2, RefGain: true, Removed: []int{v1}},
		{F: 2e6, Ref: 1, Short: &[2]int{n2, n6}},
		{F: 3e3, Ref: 3, RefGain: true, Short: &[2]int{n6, circuit.Gnd}},
	}
	for ci, cfg := range cfgs {
		p.At(cfg.F)
		act := p.Active(cfg)
		n := s.Size(cfg)
		a := s.Assemble(nil, cfg)
		add := p.AssembleDD(nil, act, false)
		addT := p.AssembleDD(nil, act, true)
		b := make([]complex128, n)
		x := make([]dd.Complex, n)
		r := make([]dd.Complex, n)
		mag := make([]float64, n)
		rnd := make([]float64, n)
		for _, trans := range []bool{false, true} {
			for j := 0; j < n; j++ {
				clear(x)
				x[j] = dd.C(-1)
				p.Residual(r, mag, rnd, act, b, x, trans)
				for i := 0; i < n; i++ {
					want, wantDD := a[i*n+j], add[i*n+j]
					if trans {
						want, wantDD = a[j*n+i], addT[i*n+j]
					}
					got := r[i].Complex128()
					if d := cmplx.Abs(got - want); d > 1e-15*mag[i] || (want == 0) != (mag[i] == 0) && d > 0 {
						t.Errorf("config %d trans=%v: A[%d,%d] from the parts %v, assembled %v (scale %g)", ci, trans, i, j, got, want, mag[i])
					}
					if d := got - wantDD.Complex128(); d != 0 {
						t.Errorf("config %d trans=%v: A[%d,%d] from the residual %v, from AssembleDD %v", ci, trans, i, j, got, wantDD.Complex128())
					}
				}
			}
		}
	}
}

// The bootstrapped input of a follower behind a 50 Ω source resistance,
// with a 1 TΩ differential input resistance: the conductances 1/50 and
// 1/10¹² meet at the input node, where float64 assembly keeps six digits
// of the small one, and the impedance seen at the source node depends on
// exactly that one. The closed form is Zs = Rs + rid·(1 + a) (KCL at the
// input of an ideal-output follower: the current (V+ − V−)/rid with
// V− = V_out = a·(V+ − V−) [derived]). Unrefined, the float64 solution is
// wrong in its first digit at low frequencies; refinement with the float64
// factorization recovers it where that factorization contracts, and with
// LUDD everywhere.
func TestRefineRecoversAbsorbedConductance(t *testing.T) {
	c, err := circuit.Parse("resistor Rs src in 50\nopamp U1 in out out a0=1e6 gbw=10M rid=1T\nresistor RL out gnd 10k\n")
	if err != nil {
		t.Fatal(err)
	}
	s := New(c)
	p := NewPrecise(s)
	src, _ := c.Node("src")
	for _, f := range []float64{0, 1, 10, 100, 1e3, 1e5, 1e7} {
		cfg := Config{F: f, Ref: 0, RefGain: true}
		p.At(f)
		act := p.Active(cfg)
		n := act.N
		var lu LU
		if err := lu.Factor(s.Assemble(nil, cfg), n); err != nil {
			t.Fatal(err)
		}
		var ludd LUDD
		if err := ludd.Factor(p.AssembleDD(nil, act, false), n); err != nil {
			t.Fatal(err)
		}
		b := make([]complex128, n)
		b[NodeVar(src)] = 1
		want := 50 + 1e12*(1+c.Parts[1].Amp.Gain(f))
		for _, trans := range []bool{false, true} {
			// The impedance is (A⁻¹)ₛₛ, so the transposed solve gives it too.
			var x0 []complex128
			if trans {
				x0 = lu.SolveTransTo(make([]complex128, n), b)
			} else {
				x0 = lu.SolveTo(make([]complex128, n), b)
			}
			e0 := cmplx.Abs(x0[NodeVar(src)]/want - 1)
			w := make([]float64, n)
			mag := make([]float64, n)
			rnd := make([]float64, n)
			x := ToDD(make([]dd.Complex, n), x0)
			rep := p.Refine(&lu, act, b, x, w, mag, rnd, trans, 1e-30, 20, nil)
			e1 := cmplx.Abs(x[NodeVar(src)].Complex128()/want - 1)
			xd := ToDD(make([]dd.Complex, n), x0)
			repD := p.Refine(&ludd, act, b, xd, w, mag, rnd, trans, 1e-30, 5, nil)
			e2 := cmplx.Abs(xd[NodeVar(src)].Complex128()/want - 1)
			t.Logf("f = %g Hz, trans %v: unrefined %.2g; with the LU %.2g (%d steps, contraction %.2g); with LUDD %.2g (%d steps)", f, trans, e0, e1, rep.Steps, rep.Ratio, e2, repD.Steps)
			if e2 > 4e-16 {
				t.Errorf("f = %g Hz, trans %v: refined with LUDD, Z is off by %.2g", f, trans, e2)
			}
			if rep.First < 0.1 && e1 > 4e-16 {
				t.Errorf("f = %g Hz, trans %v: the LU was good to %.2g, yet refinement with it left Z off by %.2g", f, trans, rep.First, e1)
			}
			scale := 0.0
			for _, m := range mag[:n] {
				scale = max(scale, m)
			}
			for i := 0; i < n; i++ {
				if w[i] > 1e-28*scale {
					t.Errorf("f = %g Hz, row %d: residual bound %g of scale %g: not at the double-double level", f, i, w[i], scale)
				}
			}
		}
	}
}

// Symmetric says so exactly when the assembled matrix is: a network of
// passive parts and sources with its one controlled source at zero gain
// (invented circuit), open, driver removed, or shorted.
func TestActiveSymmetric(t *testing.T) {
	c, err := circuit.Parse("vsource V1 in gnd 1\nresistor R1 in a 1k\ncapacitor C1 a gnd 1n\ninductor L1 a b 1m\nopamp U1 b o o a0=1e5 rid=1M rcm=1G ro=50\nresistor R2 o b 10k\n")
	if err != nil {
		t.Fatal(err)
	}
	s := New(c)
	p := NewPrecise(s)
	a, _ := c.Node("a")
	v1, _ := c.PartIndex("V1")
	for _, cfg := range []Config{
		{F: 1e3, Ref: 0}, {F: 0, Ref: 0}, {F: 1e3, Ref: 0, Removed: []int{v1}}, {F: 1e3, Ref: 0, Short: &[2]int{a, circuit.Gnd}},
		{F: 1e3, Ref: 0, RefGain: true},
	} {
		m := s.Assemble(nil, cfg)
		n := s.Size(cfg)
		sym := true
		for i := 0; i < n; i++ {
			for j := 0; j < i; j++ {
				sym = sym && m[i*n+j] == m[j*n+i]
			}
		}
		if got := p.Active(cfg).Symmetric(); got != sym {
			t.Errorf("%+v: Symmetric() = %v, the matrix is symmetric: %v", cfg, got, sym)
		}
	}
}
