package topology

import (
	"fmt"
	"math"
	"math/cmplx"

	"zport/engine/circuit"
	"zport/engine/value"
)

// The emitter follower driven from a source resistance: Vin behind Rs on
// the base, the collector at AC ground (the supply), the emitter loaded by
// RL (and optionally CL and a bias resistor RE). Its closed forms come from
// the hybrid-π model's node equations over the internal base b′ and the
// emitter e, with Rs + rb in series to the (zeroed) source:
//
//	[ Ybt + Yπ + Yμ        −Yπ          ] [vb′]   [Ybt·vin]
//	[ −Yπ − gm        Yπ + Ye + gm     ] [ve ] = [   0   ]
//
// Ybt = 1/(Rs + rb), Yπ = 1/rπ + sCπ, Yμ = sCμ (to the grounded collector),
// Ye = 1/RL + 1/RE + 1/ro + sCL. Its determinant is
// Δ = (Ybt + Yμ)(Yπ + gm) + (Ybt + Yπ + Yμ)·Ye, and Δ₀ the same with gm = 0.
type efNet struct {
	gm, ybt, ypi, ymu, ye complex128
}

// efBias is the transistor's hybrid-π model at v's bias, derived as the bjt
// line of the generated text derives it.
type efBias struct{ vt, gm, rpi, cpi, ro float64 } // ro = 0: infinite

func efBiasOf(v Values) efBias {
	b := efBias{vt: circuit.ThermalVoltage(v.Kelvin())}
	b.gm = v["IC"] / b.vt
	b.rpi = v["beta"] / b.gm
	b.cpi = b.gm/(2*math.Pi*v["fT"]) - v.Or("Cmu", 0)
	if v.Has("VA") {
		b.ro = v["VA"] / v["IC"]
	}
	return b
}

func efNetOf(v Values, f float64) efNet {
	b := efBiasOf(v)
	s := cfS(f)
	n := efNet{gm: complex(b.gm, 0), ybt: cfG(v["Rs"] + v.Or("rb", 0)),
		ypi: cfG(b.rpi) + s*complex(b.cpi, 0), ymu: s * complex(v.Or("Cmu", 0), 0),
		ye: cfG(v["RL"]) + cfGopt(v, "RE") + s*complex(v.Or("CL", 0), 0)}
	if b.ro > 0 {
		n.ye += cfG(b.ro)
	}
	return n
}

func (n efNet) det0() complex128 { return (n.ybt+n.ymu)*n.ypi + (n.ybt+n.ypi+n.ymu)*n.ye }
func (n efNet) det() complex128  { return n.det0() + n.gm*(n.ybt+n.ymu) }

// T is the return ratio of gm with the source zeroed: gm(Ybt + Yμ)/Δ₀.
func (n efNet) T() complex128 { return n.gm * (n.ybt + n.ymu) / n.det0() }

// efEquivalent returns the output's equivalent network at low and high
// frequency from the transistor alone (Ye = 0, Cμ = 0): Zo = R1 + R2 ∥ sL,
// with R1 = (Rbt + rπ)/(1 + β0), R2 = Rbt − R1 and L = R2/ωp, ωp = (1 + β0)/(rπ·Cπ),
// and the zero ωz = 1/(Cπ·(Rbt ∥ rπ)) above which Zo rises.
func efEquivalent(v Values) (r1, r2, l, wz, wp float64) {
	b := efBiasOf(v)
	rbt := v["Rs"] + v.Or("rb", 0)
	beta := v["beta"]
	r1 = (rbt + b.rpi) / (1 + beta)
	r2 = rbt - r1
	wp = (1 + beta) / (b.rpi * b.cpi)
	wz = (rbt + b.rpi) / (rbt * b.rpi * b.cpi)
	return r1, r2, r2 / wp, wz, wp
}

func efCircuit(v Values) string {
	b := efBiasOf(v)
	var w opmText
	w.header("Emitter follower", "emitterfollower")
	fmt.Fprintf(&w, "# bias: IC = %s, β0 = %s at %s K → VT = kT/q = %s\n", cfShow(v["IC"], "A"), value.Exact(v["beta"]), value.Exact(v.Kelvin()), cfShow(b.vt, "V"))
	fmt.Fprintf(&w, "# Q1: gm = IC/VT = %s, rπ = β0/gm = %s, Cπ = gm/(2π·fT) − Cμ = %s", cfShow(b.gm, "S"), cfShow(b.rpi, "Ω"), cfShow(b.cpi, "F"))
	if b.ro > 0 {
		fmt.Fprintf(&w, ", ro = VA/IC = %s", cfShow(b.ro, "Ω"))
	}
	w.WriteString("\n")
	w.comment("Source: Vin behind its resistance Rs, on the base")
	w.part("vsource", "Vin", "in", "gnd", "1")
	w.part("resistor", "Rs", "in", "b", value.Exact(v["Rs"]))
	w.comment("Q1: collector at the supply (AC ground), base b, emitter e; the line derives its hybrid-π model")
	opts := fmt.Sprintf("ic=%s beta=%s ft=%s", value.Exact(v["IC"]), value.Exact(v["beta"]), value.Exact(v["fT"]))
	for _, o := range []struct{ key, opt string }{{"VA", "va"}, {"Cmu", "cmu"}, {"rb", "rb"}} {
		if v.Has(o.key) {
			opts += " " + o.opt + "=" + value.Exact(v[o.key])
		}
	}
	fmt.Fprintf(&w, "%-9s %-5s %-5s %-5s %-5s %s\n", "bjt", "Q1", "gnd", "b", "e", opts)
	if v.Has("RE") {
		w.comment("Emitter bias resistor (without it the bias current source is ideal)")
		w.part("resistor", "RE", "e", "gnd", value.Exact(v["RE"]))
	}
	w.comment("Load: RL ∥ CL")
	w.part("resistor", "RL", "e", "gnd", noiseless(v["RL"]))
	if v.Has("CL") {
		w.part("capacitor", "CL", "e", "gnd", value.Exact(v["CL"]))
	}
	w.ports("out e gnd", "in in gnd")
	return w.String()
}

const (
	efSrcGM    = "P. R. Gray, P. J. Hurst, S. H. Lewis, R. G. Meyer, Analysis and Design of Analog Integrated Circuits, 5th ed., Wiley, 2009, ch. 7 (emitter-follower output impedance) [memory]"
	efSrcModel = "hybrid-π model, Gray, Hurst, Lewis, Meyer, 5th ed., ch. 1 [memory]: gm = IC/VT, rπ = β0/gm, Cπ = gm/(2π·fT) − Cμ, ro = VA/IC"
)

func efForms(v Values, f float64) Forms {
	n := efNetOf(v, f)
	T := n.T()
	defs := "Ybt = 1/(Rs + rb), Yπ = 1/rπ + sCπ, Yμ = sCμ, Ye = 1/RL + 1/RE + 1/ro + sCL, " +
		"Δ₀ = (Ybt + Yμ)·Yπ + (Ybt + Yπ + Yμ)·Ye; " + efSrcModel
	var out Forms
	out.T = cfF(T, "T = gm·(Ybt + Yμ)/Δ₀ (source zeroed); "+defs, cfSrcDerived)
	out.Gain = cfF(n.ybt*(n.ypi+n.gm)/n.det(), "vE/Vin = Ybt·(Yπ + gm)/(Δ₀ + gm·(Ybt + Yμ)); low frequency: (1 + β0)·Re′/(Rs + rb + rπ + (1 + β0)·Re′), Re′ = RL ∥ RE ∥ ro; "+defs, cfSrcDerived)

	// The in port: Vin removed, Rs + rb lead to b′, which sees the
	// two-node network with Ybt = 0.
	o := n
	o.ybt = 0
	zs := complex(v["Rs"]+v.Or("rb", 0), 0)
	zin0 := zs + (o.ypi+o.ye)/o.det0()
	zin := zs + (o.ypi+o.ye+o.gm)/(o.ymu*(o.ypi+o.ye+o.gm)+o.ypi*o.ye)
	src := efSrcGM + "; exact for the model " + cfSrcDerived
	out.Ports = []PortForms{
		{Name: "out",
			Z0:     cfF((n.ybt+n.ypi+n.ymu)/n.det0(), "Z₀ = (Ybt + Yπ + Yμ)/Δ₀: gm off, the emitter sees Ze ∥ (Zπ + Rs + rb ∥ 1/Yμ …)", cfSrcDerived),
			TShort: cfF(0, "T_sc = 0 (the shorted emitter returns nothing to vbe)", cfSrcDerived),
			TOpen:  cfF(T, "T_oc = T", cfSrcDerived),
			Z: cfF((n.ybt+n.ypi+n.ymu)/n.det(), "Z = Z₀/(1 + T) = (Ybt + Yπ + Yμ)/(Δ₀ + gm(Ybt + Yμ)); low frequency: (Rs + rb + rπ)/(1 + β0) ∥ RL ∥ RE ∥ ro; "+
				"above about fT/β0 the transistor alone gives R1 + R2 ∥ sL, R1 = (Rs + rb + rπ)/(1 + β0), R2 = Rs + rb − R1, L = R2·rπ·Cπ/(1 + β0): inductive when Rs + rb > 1/gm", src),
		},
		{Name: "in",
			Z0:     cfF(zin0, "Z₀ = Rs + rb + (Yπ + Ye)/(Yμ(Yπ + Ye) + Yπ·Ye)", cfSrcDerived),
			TShort: cfF(T, "T_sc = T (the port shorted is Vin zeroed)", cfSrcDerived),
			TOpen:  cfF(o.T(), "T_oc = gm·Yμ/(Yμ·Yπ + (Yπ + Yμ)·Ye) (Ybt = 0: the source open)", cfSrcDerived),
			Z:      cfF(zin, "Z = Rs + rb + (Yπ + Ye + gm)/(Yμ(Yπ + Ye + gm) + Yπ·Ye); low frequency: Rs + rb + rπ + (1 + β0)·Re′", cfSrcDerived),
		},
	}

	b := efBiasOf(v)
	r1, r2, l, wz, wp := efEquivalent(v)
	re := 1 / real(cfG(v["RL"])+cfGopt(v, "RE"))
	if b.ro > 0 {
		re = 1 / (1/re + 1/b.ro)
	}
	x := []Extra{
		{Name: "fT/β0", Value: v["fT"] / v["beta"], Unit: "Hz", Note: "where β(f) starts to fall; roughly where the output impedance leaves its low-frequency value", Source: efSrcGM},
		{Name: "transistor's low-frequency output resistance R1 = (Rs + rb + rπ)/(1 + β0)", Value: r1, Unit: "Ω", Note: "the emitter's own, before RL, RE and ro in parallel", Source: efSrcGM + " [derived here exactly]"},
		{Name: "low-frequency output resistance R1 ∥ RL ∥ RE ∥ ro", Value: r1 * re / (r1 + re), Unit: "Ω", Source: cfSrcDerived},
		{Name: "1/gm", Value: 1 / b.gm, Unit: "Ω", Note: "the output turns inductive above fT/β0 when Rs + rb exceeds it", Source: efSrcModel},
	}
	if r2 > 0 {
		x = append(x,
			Extra{Name: "equivalent inductance L = R2·rπ·Cπ/(1 + β0)", Value: l, Unit: "H",
				Note: "in Zo = R1 + R2 ∥ sL, R2 = Rs + rb − R1 (about (Rs + rb)/ωT): the transistor alone, Cμ and the load aside", Source: efSrcGM + " [derived here exactly]"},
			Extra{Name: "R2 = Rs + rb − R1", Value: r2, Unit: "Ω", Note: "the resistance the output climbs to at high frequency, above R1", Source: efSrcGM + " [derived here exactly]"},
			Extra{Name: "inductive band from", Value: wz / (2 * math.Pi), Unit: "Hz", Note: "the zero 1/(2π·Cπ·((Rs + rb) ∥ rπ)), near fT/β0 when Rs + rb ≫ rπ", Source: cfSrcDerived},
			Extra{Name: "inductive band to", Value: wp / (2 * math.Pi), Unit: "Hz", Note: "the pole (1 + β0)/(2π·rπ·Cπ), about fT", Source: cfSrcDerived})
		if v.Has("CL") {
			cl := v["CL"]
			x = append(x, Extra{Name: "resonance of L with CL", Value: 1 / (2 * math.Pi * math.Sqrt(l*cl)), Unit: "Hz",
				Note: "1/(2π√(L·CL)): where the follower rings into its capacitive load; a base stopper or an emitter resistor damps it", Source: cfSrcDerived})
		}
	} else {
		x = append(x, Extra{Name: "equivalent inductance", Value: math.NaN(), Unit: "H",
			Note: "none: Rs + rb is below R1, so the output impedance falls (capacitive) rather than rises", Source: cfSrcDerived})
	}
	zo := (n.ybt + n.ypi + n.ymu) / n.det()
	x = append(x, Extra{Name: "output impedance at the spot frequency, magnitude", Value: cmplx.Abs(zo), Unit: "Ω",
		Note: fmt.Sprintf("phase %.4g° (positive: inductive)", cmplx.Phase(zo)*180/math.Pi), Source: cfSrcDerived})
	out.Extras = x
	return out
}

func init() {
	register(&Topology{
		ID:    "emitterfollower",
		Title: "Emitter follower driven from a source resistance",
		Description: "A bipolar transistor with its collector at the supply and the load on its emitter: the voltage follows the base, and the " +
			"output resistance is the source's resistance divided by β, (Rs + rb + rπ)/(1 + β0). Designers use it to buffer a high-impedance node " +
			"into a low-impedance or capacitive load. What to watch: β falls above fT/β0, so the source resistance is divided less and less, and " +
			"the output impedance rises with frequency — it looks inductive when Rs + rb is larger than 1/gm. Into a capacitive load that " +
			"inductance resonates, a classic cause of ringing and oscillation. The reference is Q1's transconductance; shorting the emitter kills " +
			"the loop (T short = 0), so the output impedance is Z₀/(1 + T). The transistor is given by its bias (IC, β0, VA, fT, Cμ, rb) at the " +
			"request's temperature, not by Cπ: the bjt line derives gm, rπ, ro and Cπ.",
		Scenario: "Invented scenario: a discrete buffer in a lab signal source takes the 5 kΩ node of a filter to a 1 kΩ termination; Q1 runs " +
			"at IC = 2 mA, set by a 2.2 kΩ emitter resistor, with β0 = 120, VA = 60 V, fT = 300 MHz, Cμ = 1 pF and rb = 80 Ω, at 300 K. The " +
			"termination sits at the end of a cable of about 100 pF: enter it as CL to see the output's inductance ring with it.",
		Params: []Param{
			{Name: "IC", Symbol: "I_C", Meaning: "collector bias current", Unit: "A", Default: "2m", Min: 1e-9, Max: 10, Group: "amplifier"},
			{Name: "beta", Note: " at low frequency, β₀", Default: "120", Min: 1, Max: 1e5, Group: "amplifier"},
			{Name: "fT", Symbol: "f_T", Meaning: "transition frequency (Cπ = gm/(2π·fT) − Cμ)", Unit: "Hz", Default: "300M", Min: 1e3, Max: 1e12, Group: "amplifier"},
			{Name: "Cmu", Symbol: "C_μ", Meaning: "base-collector capacitance (empty: none)", Unit: "F", Default: "1p", Min: 1e-18, Max: 1e-6, Optional: true, Group: "amplifier"},
			{Name: "rb", Symbol: "r_b", Meaning: "base spreading resistance (empty: none)", Unit: "Ω", Default: "80", Min: 1e-3, Max: 1e6, Optional: true, Group: "amplifier"},
			{Name: "VA", Symbol: "V_A", Meaning: "Early voltage (empty: ro infinite)", Unit: "V", Default: "60", Min: 0.1, Max: 1e5, Optional: true, Group: "amplifier"},
			{Name: "Rs", Symbol: "R_s", Meaning: "source resistance driving the base", Unit: "Ω", Default: "5k", Min: 1e-3, Max: 1e9, Group: "source"},
			{Name: "RE", Symbol: "R_E", Meaning: "emitter bias resistor to gnd (empty: an ideal bias current source)", Unit: "Ω", Default: "2.2k", Min: 1e-3, Max: 1e9, Optional: true, Group: "network"},
			{Name: "RL", Symbol: "R_L", Meaning: "load resistance on the emitter", Unit: "Ω", Default: "1k", Min: 1e-3, Max: 1e12, Group: "load"},
			{Name: "CL", Symbol: "C_L", Meaning: "load capacitance on the emitter (empty: none)", Unit: "F", Default: "", Min: 1e-18, Max: 1e-3, Optional: true, Group: "load"},
		},
		Reference: "Q1",
		Ports: []PortDef{
			{Name: "out", Title: "emitter to gnd: the follower's output, load included", A: "e", B: "gnd"},
			{Name: "in", Title: "input, as Vin sees it (Rs included)", A: "in", B: "gnd"},
		},
		Gain:      &GainDef{Source: "Vin", Output: "e", Unit: "V/V", Title: "voltage gain Vin → emitter"},
		Frequency: 10e6,
		Sweep:     Sweep{From: 1e3, To: 10e9, Points: 400},
		Cautions: []string{
			"Small-signal only: the hybrid-π values hold at one bias point and temperature; a large negative swing into a capacitive load can cut the transistor off (slew), which no linear analysis shows.",
			"An inductive output into a capacitive load resonates: check the gain's peaking and the output impedance's phase across the band, and damp it with a base stopper resistor or a small resistor in series with the load.",
			"The collector is taken as a perfect AC ground; supply inductance and missing decoupling make the follower oscillate more readily.",
		},
		Circuit: efCircuit,
		Forms:   efForms,
	})
}
