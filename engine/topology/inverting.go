package topology

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"zport/engine/circuit"
	"zport/engine/value"
)

// This file holds the inverting amplifier and, below it, the helpers shared
// by the op-amp stages inverting, noninverting, follower, transimpedance and
// capload (prefix opm): the op-amp model parameters, exact value writing for
// generated text, admittance algebra with absent (infinite-resistance) parts,
// and loop-margin evaluation of a variant circuit through the engine.
//
// Closed forms of these stages are written in admittances: an absent rid or
// rcm is a zero conductance and a part shorted out is an infinite admittance,
// so one expression covers every combination of present and absent parts.
// The input capacitances enter the same way: the differential input is the
// admittance 1/rid + s·cid and each common-mode one 1/rcm + s·ccm, so every
// formula written with rid and rcm holds with cid and ccm beside them.

func init() { register(inverting) }

var inverting = &Topology{
	ID:    "inverting",
	Title: "Inverting amplifier",
	Description: "The workhorse gain stage: the source drives R1 into the op amp's summing node, R2 feeds the " +
		"output back, and the gain is −R2/(Rs + R1) while the loop gain is large. Designers use it where a " +
		"defined, modest input resistance is acceptable and the signal may be inverted. Watch three things: the " +
		"input resistance is only about Rs + R1, so the source sees a load, not a bridge; the summing node is a " +
		"virtual ground only as far as the loop gain reaches (its impedance rises with frequency); and the noise " +
		"gain 1 + R2/(Rs + R1), not the signal gain, sets the loop's bandwidth and the output impedance. The " +
		"input port is taken across the source terminals, so it includes Rs; the resistance R1 presents after " +
		"Rs is that value minus Rs, exactly, because Rs carries the whole port current.",
	Scenario: "Invented scenario: a field data logger must invert and amplify the ±0.5 V output of a bridge " +
		"conditioner with 1 kΩ source resistance by about −4.3 (R1 = 10 kΩ, R2 = 47 kΩ, Rs counted in the gain) " +
		"into an analog-to-digital converter driver that loads it with 10 kΩ and 100 pF of cable. A bias-" +
		"compensation resistor Rp ≈ (Rs + R1) ∥ R2 sits at the + input. The op amp is a general-purpose part " +
		"with a0 = 200 000, gbw = 1 MHz, a second pole at 8 MHz, rid = 2 MΩ, rcm = 1 GΩ, ro = 75 Ω.",
	Params: append([]Param{
		opmRs("1k"),
		{Name: "R1", Meaning: "input resistor, source to summing node", Default: "10k", Min: 1, Max: 1e9, Group: "network"},
		{Name: "R2", Meaning: "feedback resistor, output to summing node", Default: "47k", Min: 1, Max: 1e10, Group: "network"},
		{Name: "Rp", Note: ", + input to gnd (empty: + input grounded)", Default: "8.87k", Min: 1e-3, Max: 1e10, Optional: true, Group: "network"},
	}, append(append(opmAmpParams("200k", "1M", "8M", "2M", "1G", "75"), opmNoiseParams("10n", "10", "0.5p", "100")...), opmLoad("10k", "100p")...)...),
	Reference: "U1",
	Ports: []PortDef{
		{Name: "in", Title: "input, as the source Vin sees it (Rs included)", A: "src", B: "gnd"},
		{Name: "sum", Title: "summing node (− input) to gnd", A: "sum", B: "gnd"},
		{Name: "out", Title: "output to gnd", A: "out", B: "gnd"},
	},
	Gain:      &GainDef{Source: "Vin", Output: "out", Unit: "V/V", Title: "voltage gain Vin → out"},
	Frequency: 1e3,
	Sweep:     Sweep{From: 10, To: 100e6, Points: 400},
	Cautions: []string{
		"The input resistance is about Rs + R1: a high-impedance source is loaded and its own resistance becomes part of the gain.",
		"Loop bandwidth follows the noise gain 1 + R2/(Rs + R1); a gain of −1 has the loop bandwidth of a gain of +2.",
		"Rp only cancels bias-current offset when it matches (Rs + R1) ∥ R2; a capacitor across it keeps its noise out of the band.",
	},
	Ratios:  []Ratio{{Num: "R2", Den: "R1", Title: "gain-setting ratio R2/R1 (the gain is −R2/(Rs + R1))"}},
	Circuit: invertingCircuit,
	Forms:   invertingForms,
}

func invertingCircuit(v Values) string {
	var b opmText
	b.header("Inverting amplifier", "inverting")
	r1 := b.source(v, "in")
	b.comment("Feedback network: R1 into the summing node, R2 back from the output")
	b.part("resistor", "R1", r1, "sum", value.Exact(v["R1"]))
	b.part("resistor", "R2", "out", "sum", value.Exact(v["R2"]))
	plus := "gnd"
	if v.Has("Rp") {
		b.comment("Bias-compensation resistor at the + input")
		b.part("resistor", "Rp", "plus", "gnd", value.Exact(v["Rp"]))
		plus = "plus"
	}
	b.opamp(v, plus, "sum", "out")
	b.load(v, "out")
	b.ports("in src gnd", "sum sum gnd", "out out gnd")
	return b.String()
}

// invertingForms: node n (summing) sees Rs + R1 to the source, the branch
// rid + (Rp ∥ rcm) and rcm to gnd, and R2 to the output; vd = −k·Vn with
// k = rid/(rid + Rp ∥ rcm).
func invertingForms(v Values, f float64) Forms {
	m := opmAmpAt(v, f)
	s := opmS(f)
	a := m.gain(f)
	ra := v.Or("Rs", 0) + v["R1"]
	r2 := v["R2"]
	yl := opmYL(v, s)
	ypg := opmInf // + input grounded
	if v.Has("Rp") {
		ypg = complex(1/v["Rp"], 0) + m.gcm
	}
	k := opmShare(ypg, m.gid)
	yno := m.gcm + opmSeries(m.gid, ypg) // n to gnd, the R1 path aside
	ynsc := yno + complex(1/ra, 0)       // … with the source shorted
	loop := func(yn complex128) complex128 {
		yo := yl + opmSeries(complex(1/r2, 0), yn)
		return a * k / (1 + complex(r2, 0)*yn) / (1 + m.ro*yo)
	}
	T := loop(ynsc)
	Toc := loop(yno)
	yq := m.go_() + yl // ro ∥ ZL
	z0in := complex(ra, 0) + 1/(yno+1/(complex(r2, 0)+1/yq))
	z0sum := 1 / (ynsc + 1/(complex(r2, 0)+1/yq))
	z0out := 1 / (yq + opmSeries(complex(1/r2, 0), ynsc))
	gInf := complex(-r2/ra, 0)
	zx := 1 / (yno + 1/(complex(r2, 0)+1/yq))
	g0 := zx / (complex(ra, 0) + zx) * (1 / yq) / (complex(r2, 0) + 1/yq)

	kText := "k = rid/(rid + Rp ∥ rcm) (1 with Rp absent or rid infinite)"
	zn := "Zn = (Rs + R1) ∥ rcm ∥ (rid + Rp ∥ rcm)"
	tText := "T = a·k·Zn/(Zn + R2)·Zo′/(Zo′ + ro), " + kText + ", " + zn + ", Zo′ = ZL ∥ (R2 + Zn), ZL = RL ∥ 1/(sCL)" + opmCapNote
	return Forms{
		T:    opmF(T, tText, opmSrcLoop),
		Gain: opmGain(gInf, g0, T, "G∞ = −R2/(Rs + R1)", "G₀ = Zx/(Rs + R1 + Zx)·Zq/(R2 + Zq), Zx = rcm ∥ (rid + Rp ∥ rcm) ∥ (R2 + Zq), Zq = ro ∥ ZL"),
		Ports: []PortForms{
			{Name: "in",
				Z0:     opmF(z0in, "Z₀ = Rs + R1 + [rcm ∥ (rid + Rp ∥ rcm) ∥ (R2 + ro ∥ ZL)]", opmSrcZ0),
				TShort: opmF(T, "T_sc = T (the port shorted is Vin zeroed)", opmSrcLoop),
				TOpen:  opmF(Toc, "T_oc = a·k·Zn′/(Zn′ + R2)·Zo″/(Zo″ + ro), Zn′ = rcm ∥ (rid + Rp ∥ rcm), Zo″ = ZL ∥ (R2 + Zn′)", opmSrcLoop),
				Z:      opmBlackman(z0in, T, Toc, "with Rs, Rp, rcm and the load absent and a flat: Ri = R1 + (R2 + ro)/(1 + a) for rid infinite"),
			},
			{Name: "sum",
				Z0:     opmF(z0sum, "Z₀ = Zn ∥ (R2 + ro ∥ ZL), "+zn, opmSrcZ0),
				TShort: opmF(0, "T_sc = 0 (the summing node shorted leaves no error voltage)", opmSrcLoop),
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0sum, 0, T, ""),
			},
			{Name: "out",
				Z0:     opmF(z0out, "Z₀ = ro ∥ ZL ∥ (R2 + Zn), "+zn, opmSrcZ0),
				TShort: opmF(0, "T_sc = 0 (the output shorted returns nothing)", opmSrcLoop),
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0out, 0, T, "Ro = ro ∥ ZL ∥ (R2 + Zn)/(1 + T): the output impedance rises with frequency as T falls"),
			},
		},
	}
}

// ---- shared helpers of the op-amp stages ----

// Sources cited by the op-amp stages' closed forms.
const (
	opmSrcFranco   = "S. Franco, Design with Operational Amplifiers and Analog Integrated Circuits, 3rd ed., McGraw-Hill, 2002, ch. 1 [found: formulas as re-worked]"
	opmSrcBlackman = "R. B. Blackman, \"Effect of feedback on impedance\", Bell System Technical Journal, 1943 [found: year], vol. 22 [memory]"
	opmSrcAGM      = "asymptotic gain model, R. D. Middlebrook, Proc. National Electronics Conference XX, 1964 [found: citation]; S. Rosenstark, Feedback Amplifier Principles, 1986 [memory]"
	opmSrcNodal    = "derived here by nodal analysis of the stage's small-signal model [derived]"
	opmSrcZ0       = "the passive network with the op amp's gain source at zero (a 0 V source behind ro), " + opmSrcNodal
	opmSrcLoop     = "return ratio as a product of dividers around the loop (Bode's definition), " + opmSrcNodal
)

// opmInf is the admittance of a short.
var opmInf = complex(math.Inf(1), 0)

// opmAmp is the op-amp model of a stage's Values at one frequency.
type opmAmp struct {
	amp circuit.Amp // the engine's own model, for A(s)
	// gid and gcm are the input admittances 1/rid + s·cid and
	// 1/rcm + s·ccm; 0 when the parts are absent.
	gid, gcm complex128
	ro       complex128
}

// opmAmpAt is the op-amp model of v at frequency f.
func opmAmpAt(v Values, f float64) opmAmp {
	m := opmAmp{amp: circuit.Amp{A0: v["a0"], GBW: v.Or("gbw", 0), P2: v.Or("p2", 0), Rid: v.Or("rid", 0), Rcm: v.Or("rcm", 0), Ro: v["ro"],
		Cid: v.Or("cid", 0), Ccm: v.Or("ccm", 0)}}
	s := opmS(f)
	if v.Has("rid") {
		m.gid = complex(1/v["rid"], 0)
	}
	if v.Has("rcm") {
		m.gcm = complex(1/v["rcm"], 0)
	}
	m.gid += s * complex(m.amp.Cid, 0)
	m.gcm += s * complex(m.amp.Ccm, 0)
	m.ro = complex(v["ro"], 0)
	return m
}

// opmCapNote says how the formulas' rid and rcm read with the input
// capacitances present.
const opmCapNote = "; with the input capacitances, read rid as rid ∥ 1/(s·cid) and rcm as rcm ∥ 1/(s·ccm) throughout [derived: the same node equations with admittances]"

// gain is the open-loop gain A(j2πf), by the engine's own Amp.Gain so the
// pole placement is defined in one place.
func (m opmAmp) gain(f float64) complex128 { return m.amp.Gain(f) }

// go_ is the output conductance 1/ro.
func (m opmAmp) go_() complex128 { return 1 / m.ro }

func opmS(f float64) complex128 { return complex(0, 2*math.Pi*f) }

// opmYL is the load admittance 1/RL + sCL (absent parts contribute nothing).
func opmYL(v Values, s complex128) complex128 {
	var y complex128
	if v.Has("RL") {
		y += complex(1/v["RL"], 0)
	}
	if v.Has("CL") {
		y += s * complex(v["CL"], 0)
	}
	return y
}

// opmSeries is the admittance of two admittances in series; a short
// (infinite admittance) passes the other one through.
func opmSeries(a, b complex128) complex128 {
	switch {
	case cmplx.IsInf(a):
		return b
	case cmplx.IsInf(b):
		return a
	case a == 0 || b == 0:
		return 0
	}
	return a * b / (a + b)
}

// opmShare is k = ya/(ya + yb) for an op-amp input tied to gnd through ya
// and to the other input through rid (conductance yb): the other input's
// voltage V gives vd = −k·V. A grounded input (ya infinite) gives k = 1; with
// ya and yb both zero the input floats and k is not defined.
func opmShare(ya, yb complex128) complex128 {
	if cmplx.IsInf(ya) {
		return 1
	}
	if ya == 0 && yb == 0 {
		return cmplx.NaN()
	}
	return ya / (ya + yb)
}

func opmFinite(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }

// opmF builds a formula; a value that is not finite becomes NaN ("no finite
// value here").
func opmF(v complex128, text, source string) *Formula {
	if !opmFinite(v) {
		v = cmplx.NaN()
	}
	return &Formula{Value: v, Text: text, Source: source}
}

// opmBlackman is Blackman's formula over the stage's own closed-form terms.
func opmBlackman(z0, tsc, toc complex128, note string) *Formula {
	text := "Z = Z₀·(1 + T_sc)/(1 + T_oc)"
	if note != "" {
		text += "; " + note
	}
	src := opmSrcBlackman + "; terms " + opmSrcNodal + "; agrees with " + opmSrcFranco + " where the model reduces to Franco's"
	if !opmFinite(z0) || !opmFinite(tsc) || !opmFinite(toc) {
		return opmF(cmplx.NaN(), text, src)
	}
	return opmF(z0*(1+tsc)/(1+toc), text, src)
}

// opmGain is the asymptotic gain model G = (G∞·T + G₀)/(1 + T) over closed
// forms of G∞, G₀ and T — exact for a single gain source.
func opmGain(gInf, g0, T complex128, infText, zeroText string) *Formula {
	return opmF((gInf*T+g0)/(1+T), "G = G∞·T/(1 + T) + G₀/(1 + T), "+infText+", "+zeroText,
		opmSrcAGM+"; G∞, G₀ and T "+opmSrcNodal+"; agrees with Franco's exact A ("+opmSrcFranco+") where the model reduces to his")
}

// opmAmpParams is the full op-amp model with the given defaults ("" leaves
// an optional parameter absent by default).
func opmAmpParams(a0, gbw, p2, rid, rcm, ro string) []Param {
	return []Param{
		{Name: "a0", Default: a0, Min: 10, Max: 1e10, Group: "amplifier", Decibels: true},
		{Name: "gbw", Note: ", first pole at gbw/a₀ (empty: no pole)", Default: gbw, Min: 1, Max: 1e11, Optional: true, Group: "amplifier"},
		{Name: "p2", Note: " (empty: none)", Default: p2, Min: 1, Max: 1e12, Optional: true, Group: "amplifier"},
		{Name: "rid", Note: " (empty: infinite)", Default: rid, Min: 1, Max: 1e16, Optional: true, Group: "amplifier"},
		{Name: "rcm", Note: " (empty: infinite)", Default: rcm, Min: 1, Max: 1e16, Optional: true, Group: "amplifier"},
		{Name: "ro", Default: ro, Min: 1e-3, Max: 1e6, Group: "amplifier"},
		opmCid, opmCcm,
	}
}

// The op amp's input capacitances, absent by default in every stage.
var (
	opmCid = Param{Name: "cid", Note: " (empty: none)", Default: "", Min: 1e-16, Max: 1e-6, Optional: true, Group: "amplifier"}
	opmCcm = Param{Name: "ccm", Note: " (empty: none)", Default: "", Min: 1e-16, Max: 1e-6, Optional: true, Group: "amplifier"}
)

func opmRs(def string) Param {
	return Param{Name: "Rs", Note: " (empty: ideal source)", Default: def, Min: 1e-3, Max: 1e10, Optional: true, Group: "source"}
}

func opmLoad(rl, cl string) []Param {
	return []Param{
		{Name: "RL", Note: " (empty: none)", Default: rl, Min: 1e-3, Max: 1e12, Optional: true, Group: "load"},
		{Name: "CL", Note: " (empty: none)", Default: cl, Min: 1e-15, Max: 1, Optional: true, Group: "load"},
	}
}

// opmText builds commented circuit text with aligned columns.
type opmText struct{ strings.Builder }

func (b *opmText) header(title, id string) {
	fmt.Fprintf(b, "# %s — generated by zport from the catalog stage %q.\n", title, id)
	b.WriteString("# Edit freely: as it stands, this text analyzes exactly as the stage does.\n")
}

func (b *opmText) comment(c string) { fmt.Fprintf(b, "\n# %s\n", c) }

// source writes Vin at node src and, when present, Rs from src to node
// after; it returns the node the source drives (after, or src without Rs).
func (b *opmText) source(v Values, after string) string {
	if !v.Has("Rs") {
		b.comment("Source: Vin, ideal (no source resistance); the input port is across Vin")
		b.part("vsource", "Vin", "src", "gnd", "1")
		return "src"
	}
	b.comment("Source: Vin behind its source resistance Rs; the input port is across Vin, Rs included")
	b.part("vsource", "Vin", "src", "gnd", "1")
	b.part("resistor", "Rs", "src", after, value.Exact(v["Rs"]))
	return after
}

func (b *opmText) part(kind, name, n1, n2, val string) {
	fmt.Fprintf(b, "%-9s %-5s %-5s %-5s %s\n", kind, name, n1, n2, val)
}

// opamp writes U1 with the model options present in v.
func (b *opmText) opamp(v Values, plus, minus, out string) {
	b.comment("Op amp U1: + input, − input, output; open-loop gain a0/((1 + s/ω1)(1 + s/ω2)), ω1 = 2π·gbw/a0, ω2 = 2π·p2")
	opts := []string{"a0=" + value.Exact(v["a0"])}
	for _, k := range []string{"gbw", "p2", "rid", "rcm", "ro", "cid", "ccm"} {
		if v.Has(k) {
			opts = append(opts, k+"="+value.Exact(v[k]))
		}
	}
	opts = append(opts, opmNoiseOptions(v)...)
	fmt.Fprintf(b, "%-9s %-5s %-5s %-5s %-5s %s\n", "opamp", "U1", plus, minus, out, strings.Join(opts, " "))
}

// load writes RL ∥ CL at node.
func (b *opmText) load(v Values, node string) {
	if !v.Has("RL") && !v.Has("CL") {
		return
	}
	b.comment("Load: RL ∥ CL (RL noiseless: the load is not part of the design)")
	if v.Has("RL") {
		b.part("resistor", "RL", node, "gnd", noiseless(v["RL"]))
	}
	if v.Has("CL") {
		b.part("capacitor", "CL", node, "gnd", value.Exact(v["CL"]))
	}
}

func (b *opmText) ports(lines ...string) {
	b.comment("Ports: name, + node, − node")
	for _, l := range lines {
		f := strings.Fields(l)
		fmt.Fprintf(b, "%-9s %-5s %-5s %s\n", "port", f[0], f[1], f[2])
	}
}

// opmWith returns a copy of v with the given parameters set, and those
// named in drop removed.
func opmWith(v Values, set map[string]float64, drop ...string) Values {
	w := Values{}
	for k, x := range v {
		w[k] = x
	}
	for k, x := range set {
		w[k] = x
	}
	for _, k := range drop {
		delete(w, k)
	}
	return w
}
