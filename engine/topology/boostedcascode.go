package topology

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"zport/engine/value"
)

// The gain-boosted (regulated) cascode current sink: M1 sets the current,
// M2 is the cascode device, and the booster A1 holds M2's source x at its
// reference by driving M2's gate. Its closed forms come from the node
// equations over (x, d), with the booster's output u on M2's gate:
//
//	x: (Y1 + Yx + Ygs + Yo2 + gm2 + gmb2)·vx − Yo2·vd − (Ygs + gm2)·u = Ix
//	d: −(Yo2 + gm2 + gmb2)·vx + (Yo2 + Ygd + Yd)·vd + (gm2 − Ygd)·u = Id
//
// and u = −A(s)·vx. Written X, P = Yo2 + gm2 + gmb2, Q = Ygs + gm2,
// R = gm2 − Ygd, D = Yo2 + Ygd + Yd, the determinant is Δ₀ + A·N with
//
//	Δ₀ = (Y1 + Yx + Ygs)·D + P·(Ygd + Yd),   N = Ygs·D + gm2·(Ygd + Yd) + Yo2·Ygd,
//
// both expanded so that no difference of large terms is left.
type bcNet struct {
	yo1, yx, ygs, yo2, gm2, gmb, ygd, yd complex128
	a                                    complex128 // the booster's A(s)
}

func bcNetOf(v Values, f float64) bcNet {
	s := cfS(f)
	gm, ro := bcDevice(v, "Vov2")
	_, ro1 := bcDevice(v, "Vov1")
	n := bcNet{
		yo1: cfG(ro1), yo2: cfG(ro), gm2: complex(gm, 0), gmb: complex(v.Or("gmb2", 0), 0),
		yx: s * complex(v.Or("Cx", 0), 0), ygs: s * complex(v.Or("Cgs2", 0), 0), ygd: s * complex(v.Or("Cgd2", 0), 0),
		yd: cfGopt(v, "RL") + s*complex(v.Or("CL", 0), 0),
		a:  bcBooster(v, f),
	}
	return n
}

// bcDevice is the square-law gm = 2·ID/Vov and ro = 1/(λ·ID) of a device
// whose overdrive parameter is vov.
func bcDevice(v Values, vov string) (gm, ro float64) {
	return 2 * v["ID"] / v[vov], 1 / (v["lambda"] * v["ID"])
}

// bcBooster is the booster's gain A(s) = A_b/(1 + s·A_b/(2π·gbw_b)), the
// opamp model of the circuit text.
func bcBooster(v Values, f float64) complex128 {
	a := complex(v["Ab"], 0)
	if v.Has("gbwb") {
		a /= 1 + complex(0, f*v["Ab"]/v["gbwb"])
	}
	return a
}

func (n bcNet) d() complex128 { return n.yo2 + n.ygd + n.yd }
func (n bcNet) p() complex128 { return n.yo2 + n.gm2 + n.gmb }
func (n bcNet) x() complex128 { return n.yo1 + n.yx + n.ygs + n.p() }
func (n bcNet) det0() complex128 {
	return (n.yo1+n.yx+n.ygs)*n.d() + n.p()*(n.ygd+n.yd)
}
func (n bcNet) num() complex128 { return n.ygs*n.d() + n.gm2*(n.ygd+n.yd) + n.yo2*n.ygd }
func (n bcNet) det() complex128 { return n.det0() + n.a*n.num() }

// T is the booster's return ratio with the ports as the circuit has them.
func (n bcNet) T() complex128 { return n.a * n.num() / n.det0() }

// bcLowFreq returns the exact low-frequency output resistance of the sink
// (load and capacitances aside), and without the booster.
func bcLowFreq(v Values) (boosted, plain float64) {
	gm, ro2 := bcDevice(v, "Vov2")
	_, ro1 := bcDevice(v, "Vov1")
	gmb := v.Or("gmb2", 0)
	plain = ro1 + ro2 + (gm+gmb)*ro1*ro2
	return plain + v["Ab"]*gm*ro1*ro2, plain
}

func bcCircuit(v Values) string { return bcText(v, false) }

// bcText writes the stage's circuit; with drainAtGround, M2's drain is tied
// to gnd (the load and the out port left out), for the booster loop as the
// sink sees it when its drain is held by a low impedance.
func bcText(v Values, drainAtGround bool) string {
	var b opmText
	b.header("Gain-boosted cascode current sink", "boostedcascode")
	gm1, ro1 := bcDevice(v, "Vov1")
	gm2, ro2 := bcDevice(v, "Vov2")
	boosted, plain := bcLowFreq(v)
	fmt.Fprintf(&b, "# M1: gm = 2·ID/Vov1 = %s, ro = 1/(λ·ID) = %s; M2: gm = %s, ro = %s\n",
		cfShow(gm1, "S"), cfShow(ro1, "Ω"), cfShow(gm2, "S"), cfShow(ro2, "Ω"))
	fmt.Fprintf(&b, "# low-frequency Rout: %s boosted, %s as a plain cascode\n", cfShow(boosted, "Ω"), cfShow(plain, "Ω"))
	dev := func(name, d, g, s, vov, extra string) {
		fmt.Fprintf(&b, "%-9s %-5s %-5s %-5s %-5s id=%s vov=%s lambda=%s%s\n", "mos", name, d, g, s,
			value.Exact(v["ID"]), value.Exact(v[vov]), value.Exact(v["lambda"]), extra)
	}
	b.comment("M1, the current-source device: drain x, gate at its bias (AC ground), source gnd")
	dev("M1", "x", "gnd", "gnd", "Vov1", "")
	drain := "out"
	if drainAtGround {
		drain = "gnd"
	}
	var extra []string
	for _, o := range []struct{ key, opt string }{{"Cgs2", "cgs"}, {"Cgd2", "cgd"}, {"gmb2", "gmb"}} {
		if v.Has(o.key) {
			extra = append(extra, o.opt+"="+value.Exact(v[o.key]))
		}
	}
	comment := "M2, the cascode device: drain " + drain + ", gate g2 driven by the booster, source x"
	if v.Has("gmb2") {
		comment += "; its bulk is at gnd, so gmb acts on v(gnd, x)"
	}
	b.comment(comment)
	tail := ""
	if len(extra) > 0 {
		tail = " " + strings.Join(extra, " ")
	}
	dev("M2", drain, "g2", "x", "Vov2", tail)
	b.comment("Booster A1: + input at its reference (AC ground), − input at x, output on M2's gate")
	opts := "a0=" + value.Exact(v["Ab"])
	if v.Has("gbwb") {
		opts += " gbw=" + value.Exact(v["gbwb"])
	}
	fmt.Fprintf(&b, "%-9s %-5s %-5s %-5s %-5s %s\n", "opamp", "A1", "gnd", "x", "g2", opts)
	if v.Has("Cx") {
		b.comment("Capacitance at x: M1's drain, M2's source, the booster's input")
		b.part("capacitor", "Cx", "x", "gnd", value.Exact(v["Cx"]))
	}
	if drainAtGround {
		return b.String()
	}
	b.load(v, "out")
	b.ports("out out gnd", "x x gnd")
	return b.String()
}

const (
	bcSrcRazavi = "B. Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., McGraw-Hill, 2017, ch. 9 (gain boosting) [memory]"
	bcSrcPlain  = "the cascode's output resistance, B. Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., 2017, ch. 3 and 9 [memory]; exact here [derived]"
)

func bcForms(v Values, f float64) Forms {
	n := bcNetOf(v, f)
	T := n.T()
	x, q := n.x(), n.ygs+n.gm2
	defs := "node equations over (x, d) with the booster's output u = −A(s)·v_x on M2's gate: Y1 = 1/ro1, Yo2 = 1/ro2, " +
		"Yx = sCx, Ygs = sCgs2, Ygd = sCgd2, Yd = 1/RL + sCL, X = Y1 + Yx + Ygs + Yo2 + gm2 + gmb2, D = Yo2 + Ygd + Yd, " +
		"Δ₀ = (Y1 + Yx + Ygs)·D + (Yo2 + gm2 + gmb2)(Ygd + Yd), N = Ygs·D + gm2(Ygd + Yd) + Yo2·Ygd, A(s) = A_b/(1 + s·A_b/(2π·GBW_b))"
	var out Forms
	out.T = cfF(T, "T = A(s)·N/Δ₀ (the booster's loop with the drain as the circuit leaves it: 0 at low frequency with the drain open); "+defs, cfSrcDerived)
	src := bcSrcRazavi + "; Blackman terms " + cfSrcDerived
	out.Ports = []PortForms{
		{Name: "out",
			Z0:     cfF(x/n.det0(), "Z₀ = X/Δ₀: the plain cascode, booster off (low frequency, no load: ro1 + ro2 + (gm2 + gmb2)·ro1·ro2)", src),
			TShort: cfF(n.a*q/x, "T_sc = A(s)·(gm2 + sCgs2)/X: the booster's loop with the drain held (low frequency: A·gm2·(ro1 ∥ ro2)/(1 + (gm2 + gmb2)(ro1 ∥ ro2)))", src),
			TOpen:  cfF(T, "T_oc = T (0 at low frequency with no load: with the drain open no current can change)", src),
			Z:      cfF((x+n.a*q)/n.det(), "Z = Z₀(1 + T_sc)/(1 + T_oc) = (X + A·(gm2 + sCgs2))/(Δ₀ + A·N); low frequency, no load: ro1 + ro2 + [gm2(1 + A_b) + gmb2]·ro1·ro2 ≈ gm2·ro2·ro1·(1 + A_b)", src),
		},
		{Name: "x",
			Z0:     cfF(n.d()/n.det0(), "Z₀ = D/Δ₀ (low frequency, no load: ro1, since with the drain open M2 carries no current)", cfSrcDerived),
			TShort: cfF(0, "T_sc = 0 (x shorted leaves the booster no input)", cfSrcDerived),
			TOpen:  cfF(T, "T_oc = T", cfSrcDerived),
			Z:      cfF(n.d()/n.det(), "Z = Z₀/(1 + T) = D/(Δ₀ + A·N)", cfSrcDerived),
		},
	}

	boosted, plain := bcLowFreq(v)
	gm2, ro2 := bcDevice(v, "Vov2")
	_, ro1 := bcDevice(v, "Vov1")
	razavi := gm2 * ro2 * ro1 * (1 + v["Ab"])
	alone := n
	alone.yd = 0
	zAlone := (alone.x() + alone.a*q) / alone.det()
	out.Extras = []Extra{
		{Name: "low-frequency output resistance ro1 + ro2 + [gm2(1 + A_b) + gmb2]·ro1·ro2", Value: boosted, Unit: "Ω",
			Note: "exact for the model; the load and the capacitances aside", Source: cfSrcDerived + "; the gain-boosted form of " + bcSrcRazavi},
		{Name: "gm2·ro2·ro1·(1 + A_b)", Value: razavi, Unit: "Ω",
			Note: fmt.Sprintf("the textbook approximation, %+.3g %% from the exact value: it drops ro1 + ro2 and the body effect", 100*(razavi/boosted-1)), Source: bcSrcRazavi},
		{Name: "plain cascode ro1 + ro2 + (gm2 + gmb2)·ro1·ro2", Value: plain, Unit: "Ω", Note: "the same devices without the booster (A_b = 0): Blackman's Z₀ at low frequency", Source: bcSrcPlain},
		{Name: "boost factor", Value: boosted / plain, Unit: "", Note: "≈ 1 + A_b", Source: cfSrcDerived},
		{Name: "output impedance of the sink alone, magnitude", Value: cmplx.Abs(zAlone), Unit: "Ω",
			Note: fmt.Sprintf("at the spot frequency, RL and CL removed; phase %.4g°", cmplx.Phase(zAlone)*180/math.Pi), Source: cfSrcDerived},
	}
	if v.Has("gbwb") {
		out.Extras = append(out.Extras, Extra{Name: "booster's first pole GBW_b/A_b", Value: v["gbwb"] / v["Ab"], Unit: "Hz",
			Note: "above it the booster's gain, and with it the boost, falls as 1/f", Source: "the opamp model of the circuit text [derived]"})
	}
	pm, fc := math.NaN(), math.NaN()
	if m, err := loopMargins(bcText(v, true), "A1", v.Kelvin()); err == nil {
		pm, fc = m.PhaseMargin, m.Crossover
	}
	out.Extras = append(out.Extras,
		Extra{Name: "booster loop, drain at AC ground: phase margin", Value: pm, Unit: "°",
			Note: "the loop as the sink runs when its drain sees a low impedance (T_sc's loop); no value when |T| does not cross 1", Source: opmSrcEngine},
		Extra{Name: "booster loop, drain at AC ground: crossover", Value: fc, Unit: "Hz", Note: "where |T_sc| = 1", Source: opmSrcEngine})
	return out
}

func init() {
	register(&Topology{
		ID:    "boostedcascode",
		Title: "Gain-boosted cascode current sink",
		Description: "A cascode current sink whose cascode device M2 has its gate driven by an auxiliary amplifier, the booster A1, that " +
			"holds M2's source x at a fixed voltage. Any change of the output voltage that reaches x is amplified and fed back to M2's gate, so the " +
			"output resistance is multiplied once more, by 1 + A: about gm2·ro2·ro1·(1 + A), gigaohms from devices of a hundred kilohms. Designers " +
			"use it for high-accuracy current sources and for the output branches of high-gain single-stage amplifiers. The reference is the booster " +
			"A1: with its gain at zero the circuit is a plain cascode (Z₀); shorting the output leaves the booster's loop whole (T short ≈ A); " +
			"opening it stops all current, so T open is close to zero — Blackman's Z = Z₀·(1 + T short) is the boost itself. The booster's " +
			"bandwidth sets where the boost fades, and its own loop must be stable when the drain sees a low impedance.",
		Scenario: "Invented scenario: the reference branch of a precision current-steering converter in a mixed-signal chip needs a 100 µA sink " +
			"whose current moves less than 2 ppm per volt of drain swing (at least 5 GΩ); the devices run at Vov = 0.2 V with λ = 0.1 V⁻¹ " +
			"(gm = 1 mS, ro = 100 kΩ), so a plain cascode gives only 10 MΩ, and a booster with 60 dB of gain and 200 MHz gain-bandwidth is added. " +
			"M2 has Cgs = 50 fF and Cgd = 5 fF; x carries 20 fF.",
		Params: []Param{
			{Name: "ID", Symbol: "I_D", Meaning: "bias current of M1 and M2", Unit: "A", Default: "100u", Min: 1e-9, Max: 1, Group: "amplifier"},
			{Name: "Vov1", Symbol: "V_ov1", Meaning: "overdrive of M1 (gm1 = 2·ID/Vov1; M1's gm does not act, its gate being at AC ground)", Unit: "V", Default: "0.2", Min: 0.01, Max: 2, Group: "amplifier"},
			{Name: "Vov2", Symbol: "V_ov2", Meaning: "overdrive of M2 (gm2 = 2·ID/Vov2)", Unit: "V", Default: "0.2", Min: 0.01, Max: 2, Group: "amplifier"},
			{Name: "lambda", Symbol: "λ", Meaning: "channel-length modulation of both devices, per volt (ro = 1/(λ·ID))", Unit: "", Default: "0.1", Min: 1e-4, Max: 10, Group: "amplifier"},
			{Name: "gmb2", Symbol: "g_mb2", Meaning: "body transconductance of M2, bulk at gnd (empty: none)", Unit: "S", Default: "", Min: 1e-12, Max: 10, Optional: true, Group: "amplifier"},
			{Name: "Cgs2", Symbol: "C_gs2", Meaning: "gate-source capacitance of M2 (empty: none)", Unit: "F", Default: "50f", Min: 1e-18, Max: 1e-9, Optional: true, Group: "amplifier"},
			{Name: "Cgd2", Symbol: "C_gd2", Meaning: "gate-drain capacitance of M2 (empty: none)", Unit: "F", Default: "5f", Min: 1e-18, Max: 1e-9, Optional: true, Group: "amplifier"},
			{Name: "Ab", Symbol: "A_b", Meaning: "booster DC gain", Unit: "", Default: "1000", Min: 1e-3, Max: 1e8, Group: "amplifier", Decibels: true},
			{Name: "gbwb", Symbol: "GBW_b", Meaning: "booster gain-bandwidth product, its first pole at this over the booster gain (empty: flat gain)", Unit: "Hz", Default: "200M", Min: 1, Max: 1e12, Optional: true, Group: "amplifier"},
			{Name: "Cx", Symbol: "C_x", Meaning: "capacitance from x to gnd: M1's drain, M2's source, the booster's input (empty: none)", Unit: "F", Default: "20f", Min: 1e-18, Max: 1e-9, Optional: true, Group: "network"},
			{Name: "RL", Symbol: "R_L", Meaning: "load resistance at the drain to AC ground (empty: none, the port shows the sink alone)", Unit: "Ω", Default: "", Min: 1e-3, Max: 1e15, Optional: true, Group: "load"},
			{Name: "CL", Symbol: "C_L", Meaning: "load capacitance at the drain (empty: none)", Unit: "F", Default: "", Min: 1e-18, Max: 1e-6, Optional: true, Group: "load"},
		},
		Reference: "A1",
		Ports: []PortDef{
			{Name: "out", Title: "drain of M2 to gnd: the sink's output impedance", A: "out", B: "gnd"},
			{Name: "x", Title: "source of M2, the node the booster holds", A: "x", B: "gnd"},
		},
		Frequency: 1e3,
		Sweep:     Sweep{From: 1, To: 10e9, Points: 400},
		Cautions: []string{
			"Small-signal only: every device must stay in saturation over the drain's swing, which the booster's output and M2's overdrive both limit.",
			"The boost fades above the booster's first pole GBW_b/A_b; between there and the booster's unity-gain frequency the output impedance falls as 1/f, and a pole–zero doublet of the booster can slow the settling of a circuit built on the sink.",
			"The booster's own loop is stable only if its unity-gain frequency stays below the non-dominant poles it meets; the design values give its margin with the drain held at AC ground.",
		},
		Circuit: bcCircuit,
		Forms:   bcForms,
	})
}
