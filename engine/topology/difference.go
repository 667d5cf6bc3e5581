package topology

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"zport/engine/value"
)

// This file holds the difference amplifier and the small helpers its
// siblings (howland.go, integrator.go, degenerated.go, shuntfeedback.go)
// share. The helpers carry a cf prefix ("closed form") so they stay clear of
// the names other stage files use in this package.

// cfSrcDerived is the source line of a closed form worked out for the
// stage's exact model.
const cfSrcDerived = "derived here by nodal analysis of the stage's exact small-signal model (node equations solved by cofactors) [derived]"

// cfShow writes x for a comment, with its unit.
func cfShow(x float64, unit string) string { return value.Format(x, unit, 4) }

// cfS is the complex frequency s = j2πf.
func cfS(f float64) complex128 { return complex(0, 2*math.Pi*f) }

// cfG is the conductance 1/r as a complex number.
func cfG(r float64) complex128 { return complex(1/r, 0) }

// cfGopt is 1/v[name], or 0 when the resistor is absent (open).
func cfGopt(v Values, name string) complex128 {
	if r, ok := v[name]; ok {
		return cfG(r)
	}
	return 0
}

// cfLoad is the admittance of the optional load RL ∥ CL at s (0 when both
// are absent).
func cfLoad(v Values, s complex128) complex128 {
	return cfGopt(v, "RL") + s*complex(v.Or("CL", 0), 0)
}

// cfF wraps a closed-form value with its text and source.
func cfF(x complex128, text, src string) *Formula {
	return &Formula{Value: x, Text: text, Source: src}
}

// cfNaN marks a term with no finite value.
var cfNaN = cmplx.NaN()

// cfAmp is the op-amp model every op-amp stage uses, read from Values; a
// zero gbw, p2, rid, rcm, cid or ccm means absent.
type cfAmp struct {
	a0, gbw, p2, rid, rcm, ro, cid, ccm float64
	noise                               []string // the line's noise options
}

func cfAmpOf(v Values) cfAmp {
	return cfAmp{a0: v["a0"], gbw: v.Or("gbw", 0), p2: v.Or("p2", 0), rid: v.Or("rid", 0), rcm: v.Or("rcm", 0), ro: v["ro"],
		cid: v.Or("cid", 0), ccm: v.Or("ccm", 0), noise: opmNoiseOptions(v)}
}

// gain is the open-loop gain A(s) = a0/((1 + s/ω1)(1 + s/ω2)) with
// ω1 = 2π·gbw/a0 and ω2 = 2π·p2 — the model the circuit text defines.
func (m cfAmp) gain(f float64) complex128 {
	g := complex(m.a0, 0)
	if m.gbw > 0 {
		g /= 1 + complex(0, f*m.a0/m.gbw)
	}
	if m.p2 > 0 {
		g /= 1 + complex(0, f/m.p2)
	}
	return g
}

// gd and gc are the input admittances at s: 1/rid + s·cid between the
// inputs and 1/rcm + s·ccm from each to gnd (absent parts add nothing).
func (m cfAmp) gd(s complex128) complex128 {
	y := s * complex(m.cid, 0)
	if m.rid > 0 {
		y += cfG(m.rid)
	}
	return y
}

func (m cfAmp) gc(s complex128) complex128 {
	y := s * complex(m.ccm, 0)
	if m.rcm > 0 {
		y += cfG(m.rcm)
	}
	return y
}

// line writes the opamp line of the circuit text.
func (m cfAmp) line(name, plus, minus, out string) string {
	opts := []string{"a0=" + value.Exact(m.a0)}
	if m.gbw > 0 {
		opts = append(opts, "gbw="+value.Exact(m.gbw))
	}
	if m.p2 > 0 {
		opts = append(opts, "p2="+value.Exact(m.p2))
	}
	if m.rid > 0 {
		opts = append(opts, "rid="+value.Exact(m.rid))
	}
	if m.rcm > 0 {
		opts = append(opts, "rcm="+value.Exact(m.rcm))
	}
	if m.ro > 0 {
		opts = append(opts, "ro="+value.Exact(m.ro))
	}
	if m.cid > 0 {
		opts = append(opts, "cid="+value.Exact(m.cid))
	}
	if m.ccm > 0 {
		opts = append(opts, "ccm="+value.Exact(m.ccm))
	}
	opts = append(opts, m.noise...)
	return fmt.Sprintf("opamp    %s %s %s %s %s\n", name, plus, minus, out, strings.Join(opts, " "))
}

// cfAmpParams is the full op-amp model's parameter set with the stage's
// defaults (a0, gbw, rid, ro; p2, rcm, cid and ccm default to absent).
func cfAmpParams(a0, gbw, rid, ro string) []Param {
	return []Param{
		{Name: "a0", Default: a0, Min: 1, Max: 1e12, Group: "amplifier", Decibels: true},
		{Name: "gbw", Note: ", first pole at gbw/a₀ (empty: no pole)", Default: gbw, Min: 1, Max: 1e11, Optional: true, Group: "amplifier"},
		{Name: "p2", Note: " (empty: none)", Default: "", Min: 1, Max: 1e12, Optional: true, Group: "amplifier"},
		{Name: "rid", Note: " (empty: infinite)", Default: rid, Min: 1, Max: 1e15, Optional: true, Group: "amplifier"},
		{Name: "rcm", Note: " (empty: infinite)", Default: "", Min: 1, Max: 1e16, Optional: true, Group: "amplifier"},
		{Name: "ro", Default: ro, Min: 0, Max: 1e6, Group: "amplifier"},
		opmCid, opmCcm,
	}
}

// cfLoadParams is the load RL ∥ CL (RL required or optional by stage).
func cfLoadParams(rl string, rlOptional bool, cl string) []Param {
	return []Param{
		{Name: "RL", Default: rl, Min: 1e-3, Max: 1e12, Optional: rlOptional, Group: "load"},
		{Name: "CL", Note: " (empty: none)", Default: cl, Min: 1e-18, Max: 1, Optional: true, Group: "load"},
	}
}

// cfLoadLines writes the load's lines from node to gnd.
func cfLoadLines(v Values, node string) string {
	var b strings.Builder
	if v.Has("RL") || v.Has("CL") {
		b.WriteString("# load (RL noiseless: it is not part of the design)\n")
	}
	if v.Has("RL") {
		fmt.Fprintf(&b, "resistor RL %s gnd %s\n", node, noiseless(v["RL"]))
	}
	if v.Has("CL") {
		fmt.Fprintf(&b, "capacitor CL %s gnd %s\n", node, value.Exact(v["CL"]))
	}
	return b.String()
}

// cfAbsDB is 20·log10|x|.
func cfAbsDB(x complex128) float64 { return 20 * math.Log10(cmplx.Abs(x)) }

// diffNet is the difference amplifier's node equations at one frequency.
// Nodes p (+ input), n (− input) and out; the output row is multiplied by ro
// so that ro = 0 stays finite. With the op-amp gain A(s) the matrix is
//
//	[ a    −Gid   0 ] [vp]   [G3·v2]
//	[ −Gid  b    −G2] [vn] = [G1·v1]
//	[ −A    e     c ] [vo]   [  0  ]
//
// a = G3+G4+Gcm+Gid, b = G1+G2+Gcm+Gid, c = 1 + ro(YL+G2), e = A − ro·G2.
type diffNet struct {
	G1, G2, G3, G4, Gd, Gc, YL, A complex128
	ro                            float64
}

func (d diffNet) abc() (a, b, c complex128) {
	ro := complex(d.ro, 0)
	return d.G3 + d.G4 + d.Gc + d.Gd, d.G1 + d.G2 + d.Gc + d.Gd, 1 + ro*(d.YL+d.G2)
}

// det0 is the determinant with the op-amp's gain at zero, detK with it.
func (d diffNet) det0() complex128 {
	a, b, c := d.abc()
	ro := complex(d.ro, 0)
	return a*(b*c-ro*d.G2*d.G2) - d.Gd*d.Gd*c
}

// loop is the numerator of T: T = A·G2·(G3+G4+Gcm)/Δ₀.
func (d diffNet) loop() complex128 { return d.G2 * (d.G3 + d.G4 + d.Gc) }

func (d diffNet) detK() complex128 { return d.det0() + d.A*d.loop() }

func (d diffNet) T() complex128 { return d.A * d.loop() / d.det0() }

// gains returns A1 = vo/v1 and A2 = vo/v2.
func (d diffNet) gains() (a1, a2 complex128) {
	a, b, _ := d.abc()
	e := d.A - complex(d.ro, 0)*d.G2
	D := d.detK()
	return -d.G1 * (a*e - d.Gd*d.A) / D, d.G3 * (d.A*b - d.Gd*e) / D
}

func diffNetOf(v Values, f float64) diffNet {
	m := cfAmpOf(v)
	s := cfS(f)
	return diffNet{
		G1: cfG(v.Or("Rs1", 0) + v["R1"]), G2: cfG(v["R2"]),
		G3: cfG(v.Or("Rs2", 0) + v["R3"]), G4: cfG(v["R4"]),
		Gd: m.gd(s), Gc: m.gc(s), YL: cfLoad(v, s), A: m.gain(f), ro: m.ro,
	}
}

func diffCircuit(v Values) string {
	var b strings.Builder
	b.WriteString("# difference amplifier (four-resistor subtractor) — generated by the zport catalog\n")
	b.WriteString("# vO ≈ (1 + R2/R1)·R4/(R3+R4)·v2 − (R2/R1)·v1; n is the − input, p the + input\n")
	b.WriteString("# sources (each one's port shows the impedance it sees, the other source zeroed)\n")
	b.WriteString("vsource  V1 in1 gnd 1\n")
	b.WriteString("vsource  V2 in2 gnd 1\n")
	a1, a2 := "in1", "in2"
	if v.Has("Rs1") {
		fmt.Fprintf(&b, "resistor Rs1 in1 s1 %s\n", value.Exact(v["Rs1"]))
		a1 = "s1"
	}
	if v.Has("Rs2") {
		fmt.Fprintf(&b, "resistor Rs2 in2 s2 %s\n", value.Exact(v["Rs2"]))
		a2 = "s2"
	}
	b.WriteString("# the resistor bridge (mismatch is in the values themselves)\n")
	fmt.Fprintf(&b, "resistor R1 %s n %s\n", a1, value.Exact(v["R1"]))
	fmt.Fprintf(&b, "resistor R2 n out %s\n", value.Exact(v["R2"]))
	fmt.Fprintf(&b, "resistor R3 %s p %s\n", a2, value.Exact(v["R3"]))
	fmt.Fprintf(&b, "resistor R4 p gnd %s\n", value.Exact(v["R4"]))
	b.WriteString("# op amp: + at p, − at n\n")
	b.WriteString(cfAmpOf(v).line("U1", "p", "n", "out"))
	b.WriteString(cfLoadLines(v, "out"))
	b.WriteString("# ports\n")
	b.WriteString("port     in1 in1 gnd\n")
	b.WriteString("port     in2 in2 gnd\n")
	b.WriteString("port     out out gnd\n")
	return b.String()
}

func diffForms(v Values, f float64) Forms {
	d := diffNetOf(v, f)
	T := d.T()
	a, b, _ := d.abc()
	ro := complex(d.ro, 0)
	defs := "a = G3+G4+G_cm+G_id, b = G1+G2+G_cm+G_id, c = 1 + r_o(Y_L+G2), G1 = 1/(R_s1+R1), G3 = 1/(R_s2+R3), " +
		"G_id = 1/r_id + s·c_id, G_cm = 1/r_cm + s·c_cm (the op amp's input admittances), Y_L = 1/R_L + sC_L, Δ₀ = a(b·c − r_o·G2²) − G_id²·c"
	var out Forms
	out.T = cfF(T, "T = A(s)·G2·(G3 + G4 + G_cm)/Δ₀; "+defs+" (ideal limit: T = A·R1/(R1+R2))", cfSrcDerived)

	a1, a2 := d.gains()
	out.Gain = cfF(a2, "A2 = vO/v2 = G3·(A·b − G_id·(A − r_o·G2))/(Δ₀ + A·G2·(G3+G4+G_cm)); "+defs+
		" (ideal: (1 + R2/R1)·R4/(R3+R4))", cfSrcDerived)

	// in1: the port is V1's terminal; open, R_s1+R1 leaves node n.
	Ra := v.Or("Rs1", 0) + v["R1"]
	d1 := d
	d1.G1 = 0
	a1o, _, c1o := d1.abc()
	z01 := complex(Ra, 0) + a1o*c1o/d1.det0()
	z1 := complex(Ra, 0) + a1o*c1o/d1.detK()
	out.Ports = append(out.Ports, PortForms{Name: "in1",
		Z0:     cfF(z01, "Z₀ = R_s1 + R1 + a′c/Δ₀′ (′: with R_s1+R1 removed, G1 = 0; A = 0)", cfSrcDerived),
		TShort: cfF(T, "T_sc = T (V1 zeroed)", cfSrcDerived),
		TOpen:  cfF(d1.T(), "T_oc = A·G2·(G3+G4+G_cm)/Δ₀′ (G1 = 0)", cfSrcDerived),
		Z:      cfF(z1, "Z = R_s1 + R1 + a′c/(Δ₀′ + A·G2·(G3+G4+G_cm)) ≈ R1 + R_s1 + (R2 + r_o)/(1 + A) for large r_id, r_cm", cfSrcDerived),
	})

	// in2: V2's terminal; open, R_s2+R3 leaves node p.
	Rb := v.Or("Rs2", 0) + v["R3"]
	d2 := d
	d2.G3 = 0
	_, b2o, c2o := d2.abc()
	e := d.A - ro*d.G2
	z02 := complex(Rb, 0) + (b2o*c2o-ro*d.G2*d.G2)/d2.det0()
	z2 := complex(Rb, 0) + (b2o*c2o+d.G2*e)/d2.detK()
	out.Ports = append(out.Ports, PortForms{Name: "in2",
		Z0:     cfF(z02, "Z₀ = R_s2 + R3 + (b·c − r_o·G2²)/Δ₀′ (′: G3 = 0; A = 0)", cfSrcDerived),
		TShort: cfF(T, "T_sc = T (V2 zeroed)", cfSrcDerived),
		TOpen:  cfF(d2.T(), "T_oc = A·G2·(G4+G_cm)/Δ₀′ (G3 = 0)", cfSrcDerived),
		Z:      cfF(z2, "Z = R_s2 + R3 + (b·c + G2·(A − r_o·G2))/(Δ₀′ + A·G2·(G4+G_cm)) ≈ R_s2 + R3 + R4 for large r_id, r_cm", cfSrcDerived),
	})

	// out: shorting the output kills the loop (T_sc = 0); with ro = 0 the
	// op amp's ideal source would be shorted, which has no finite value.
	tsc := complex128(0)
	if d.ro == 0 {
		tsc = cfNaN
	}
	out.Ports = append(out.Ports, PortForms{Name: "out",
		Z0:     cfF(ro*(a*b-d.Gd*d.Gd)/d.det0(), "Z₀ = r_o·(a·b − G_id²)/Δ₀ = r_o ∥ Z_L ∥ (R2 + the bridge)", cfSrcDerived),
		TShort: cfF(tsc, "T_sc = 0 (the shorted output returns nothing to the inputs)", cfSrcDerived),
		TOpen:  cfF(T, "T_oc = T", cfSrcDerived),
		Z:      cfF(ro*(a*b-d.Gd*d.Gd)/d.detK(), "Z = Z₀/(1 + T) ≈ r_o/(1 + A·R1/(R1+R2))", cfSrcDerived),
	})

	// Differential and common-mode gains from the two single-source gains:
	// v1 = vcm − vd/2, v2 = vcm + vd/2 ⇒ vO = (A2 − A1)/2·vd + (A1 + A2)·vcm.
	ad := (a2 - a1) / 2
	acm := a1 + a2
	R1, R2, R4 := Ra, v["R2"], v["R4"]
	R3 := Rb
	idA2 := (1 + R2/R1) * R4 / (R3 + R4)
	idA1 := -R2 / R1
	idAd := (idA2 - idA1) / 2
	idAcm := idA1 + idA2
	pct := 0.01
	out.Extras = []Extra{
		{Name: "A1 = vO/v1 (V2 zeroed), magnitude", Value: cmplx.Abs(a1), Unit: "V/V", Note: fmt.Sprintf("phase %.4g°", cmplx.Phase(a1)*180/math.Pi), Source: cfSrcDerived},
		{Name: "differential gain A_d = (A2 − A1)/2, magnitude", Value: cmplx.Abs(ad), Unit: "V/V", Note: "vd = v2 − v1", Source: cfSrcDerived},
		{Name: "common-mode gain A_cm = A1 + A2, magnitude", Value: cmplx.Abs(acm), Unit: "V/V", Note: "vcm = (v1 + v2)/2", Source: cfSrcDerived},
		{Name: "CMRR = |A_d/A_cm|", Value: cfAbsDB(ad / acm), Unit: "dB", Note: "full op-amp model and the resistor values as given, at the spot frequency", Source: cfSrcDerived},
		{Name: "ideal op amp: coefficient of v2, (1 + R2/R1)·R4/(R3+R4)", Value: idA2, Unit: "V/V", Note: "source resistances folded into R1 and R3", Source: "S. Franco, Design with Operational Amplifiers and Analog Integrated Circuits, 3rd ed., 2002, ch. 2 [memory]"},
		{Name: "ideal op amp: coefficient of v1, −R2/R1", Value: idA1, Unit: "V/V", Note: "source resistances folded into R1", Source: "S. Franco, Design with Operational Amplifiers and Analog Integrated Circuits, 3rd ed., 2002, ch. 2 [memory]"},
		{Name: "CMRR from the resistor mismatch alone (ideal op amp)", Value: 20 * math.Log10(math.Abs(idAd/idAcm)), Unit: "dB", Note: "no value (infinite) when R4/R3 = R2/R1 exactly", Source: "ideal-op-amp gains above [derived]"},
		{Name: "worst-case CMRR for 1 % resistors ≈ (1 + R2/R1)/(4p)", Value: 20 * math.Log10((1+R2/R1)/(4*pct)), Unit: "dB", Note: "p = 0.01, first order in p; a design guide, not this circuit's value", Source: "S. Franco, Design with Operational Amplifiers and Analog Integrated Circuits, 3rd ed., 2002, ch. 2 [memory]"},
	}
	return out
}

func init() {
	params := []Param{
		{Name: "R1", Meaning: "input resistor, V1 to the − input", Default: "10k", Min: 1e-3, Max: 1e9, Group: "network"},
		{Name: "R2", Meaning: "feedback resistor, − input to the output", Default: "100k", Min: 1e-3, Max: 1e9, Group: "network"},
		{Name: "R3", Meaning: "input resistor, V2 to the + input", Default: "10k", Min: 1e-3, Max: 1e9, Group: "network"},
		{Name: "R4", Meaning: "+ input to gnd (set e.g. 101k against R2 = 100k for a 1 % mismatch)", Default: "100.5k", Min: 1e-3, Max: 1e9, Group: "network"},
		{Name: "Rs1", Note: " (empty: none)", Default: "", Min: 1e-3, Max: 1e9, Optional: true, Group: "source"},
		{Name: "Rs2", Note: " (empty: none)", Default: "", Min: 1e-3, Max: 1e9, Optional: true, Group: "source"},
	}
	params = append(params, cfAmpParams("200k", "1M", "2M", "50")...)
	params = append(params, opmNoiseParams("12n", "20", "0.4p", "100")...)
	params = append(params, cfLoadParams("10k", false, "100p")...)
	register(&Topology{
		ID:    "difference",
		Title: "Difference amplifier",
		Description: "Four resistors and an op amp subtract two voltages: vO = (1 + R2/R1)·R4/(R3+R4)·v2 − (R2/R1)·v1, " +
			"which is (R2/R1)(v2 − v1) when R4/R3 = R2/R1. Designers use it to read a current shunt, to strip a ground offset, " +
			"or to turn a differential signal single-ended. What to watch: the common-mode rejection rests on the resistor " +
			"ratios matching — each resistor is its own parameter, so type the mismatched value (R4 = 101k against R2 = 100k is a 1 % error) " +
			"and read the CMRR; source resistances add straight to R1 and R3 and unbalance the bridge. The two input impedances " +
			"differ and depend on the other source: the engine zeroes the other source, so in1 shows R_s1 + R1 plus the nearly " +
			"virtual-ground − input (≈ R1), and in2 shows R_s2 + R3 + R4; in real use the current V1 draws is (v1 − v2·R4/(R3+R4))/R1. " +
			"The stage's gain is taken from V2 to the output; the differential gain, common-mode gain and CMRR come from both single-source gains.",
		Scenario: "Invented scenario: a battery-pack current monitor reads a shunt with a gain-of-10 difference stage into an ADC " +
			"(10 kΩ ∥ 100 pF input). The resistors are 0.5 % parts and one sits at the edge of its band (R4 = 100.5 kΩ); the " +
			"design needs CMRR above 40 dB at 1 kHz with a 1 MHz, 200 k-gain op amp.",
		Params:    params,
		Reference: "U1",
		Ports: []PortDef{
			{Name: "in1", Title: "input 1, as V1 sees it (V2 zeroed)", A: "in1", B: "gnd"},
			{Name: "in2", Title: "input 2, as V2 sees it (V1 zeroed)", A: "in2", B: "gnd"},
			{Name: "out", Title: "output", A: "out", B: "gnd"},
		},
		Gain:      &GainDef{Source: "V2", Output: "out", Unit: "V/V", Title: "gain from V2 (the + leg) to the output, V1 zeroed"},
		Frequency: 1e3,
		Sweep:     Sweep{From: 10, To: 10e6, Points: 400},
		Cautions: []string{
			"CMRR depends on resistor ratio matching: 1 % parts can leave as little as (1 + R2/R1)/(4·0.01) worst case; trimmed or matched networks do far better.",
			"Source resistance in either leg adds to R1 or R3 and unbalances the bridge; buffer high-impedance sources (an instrumentation amplifier does this).",
			"The common-mode voltage at the op-amp inputs is v2·R4/(R3+R4): keep it inside the op amp's input range.",
			"Where the inputs connect to mains or high-voltage circuits, use a rated isolation or high-voltage difference amplifier and follow local codes and licensed practice.",
		},
		Ratios: []Ratio{
			{Num: "R2", Den: "R1", Title: "differential gain R2/R1"},
			{Num: "R4", Den: "R3", Title: "bridge ratio R4/R3 (match it to R2/R1 for common-mode rejection)"},
		},
		Circuit: diffCircuit,
		Forms:   diffForms,
	})
}
