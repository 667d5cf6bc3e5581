package topology

import (
	"math"
	"math/cmplx"

	"zport/engine/feedback"
	"zport/engine/value"
)

func init() { register(transimpedance) }

var transimpedance = &Topology{
	ID:    "transimpedance",
	Title: "Transimpedance amplifier (photodiode / current sensor)",
	Description: "A current-output sensor — a photodiode, an ionization chamber, a current probe — drives the " +
		"op amp's summing node, and Rf turns its current into an output voltage of −Iin·Rf. The sensor's " +
		"capacitance Cd and the op amp's input capacitance Cin sit at the summing node, where with Rf they put " +
		"a second pole in the loop: without a feedback capacitor Cf the loop rings or oscillates. The page " +
		"suggests Cf two ways — the approximate \"45°\" rule and the exact second-order Butterworth value — and " +
		"shows the phase margin, crossover and closed-loop bandwidth each actually gives on this stage's full " +
		"model. The summing node is what the sensor sees: a low impedance that rises with frequency and, with a " +
		"single-pole op amp, looks like an inductance Rf/(2π·gbw).",
	Scenario: "Invented scenario: the light-level monitor of an optical test bench uses a photodiode with " +
		"20 pF and 500 MΩ shunt resistance, at 1 V per µA (Rf = 1 MΩ, Cf = 1 pF), with a FET-input op amp of " +
		"a0 = 1 000 000, gbw = 10 MHz, a second pole at 60 MHz, 4 pF input capacitance, rid = rcm = 1 TΩ, " +
		"ro = 50 Ω, into 10 kΩ ∥ 50 pF.",
	Params: append([]Param{
		{Name: "Rsh", Symbol: "R_sh", Meaning: "sensor shunt resistance (empty: none)", Unit: "Ω", Default: "500M", Min: 1, Max: 1e15, Optional: true, Group: "source"},
		{Name: "Cd", Symbol: "C_d", Meaning: "sensor capacitance (empty: none)", Unit: "F", Default: "20p", Min: 1e-15, Max: 1e-6, Optional: true, Group: "source"},
		{Name: "Cin", Symbol: "C_in", Meaning: "op-amp input capacitance, − input to gnd (empty: none)", Unit: "F", Default: "4p", Min: 1e-15, Max: 1e-6, Optional: true, Group: "amplifier"},
		{Name: "Rf", Symbol: "R_f", Meaning: "feedback (transimpedance) resistor", Unit: "Ω", Default: "1M", Min: 1, Max: 1e12, Group: "network"},
		{Name: "Cf", Symbol: "C_f", Meaning: "feedback capacitor across Rf (empty: none)", Unit: "F", Default: "1p", Min: 1e-16, Max: 1e-3, Optional: true, Group: "network"},
	}, append(opmAmpParams("1M", "10M", "60M", "1T", "1T", "50"), opmLoad("10k", "50p")...)...),
	Reference: "U1",
	Ports: []PortDef{
		{Name: "in", Title: "summing node, as the sensor sees it (the sensor's own Cd, Rsh included)", A: "sum", B: "gnd"},
		{Name: "out", Title: "output to gnd", A: "out", B: "gnd"},
	},
	Gain:      &GainDef{Source: "Iin", Output: "out", Unit: "V/A", Title: "transimpedance Iin → out"},
	Frequency: 1e3,
	Sweep:     Sweep{From: 10, To: 100e6, Points: 400},
	Cautions: []string{
		"Without Cf the summing-node capacitance and Rf make a second loop pole: the stage rings or oscillates.",
		"The \"45°\" rule for Cf lands near 52° on the ideal model; the Butterworth value gives about 66°. Both assume a single-pole op amp: a second pole or load capacitance lowers the margin, shown here from the full model.",
		"A photodiode biased in photoconductive mode may carry tens of volts; keep the bias supply current-limited and follow the sensor maker's and local safety practice.",
	},
	Circuit: transimpedanceCircuit,
	Forms:   transimpedanceForms,
}

func transimpedanceCircuit(v Values) string {
	var b opmText
	b.header("Transimpedance amplifier", "transimpedance")
	b.comment("Sensor: current source Iin into the summing node, with its capacitance Cd and shunt resistance Rsh")
	b.part("isource", "Iin", "gnd", "sum", "1")
	if v.Has("Cd") {
		b.part("capacitor", "Cd", "sum", "gnd", value.Exact(v["Cd"]))
	}
	if v.Has("Rsh") {
		b.part("resistor", "Rsh", "sum", "gnd", value.Exact(v["Rsh"]))
	}
	if v.Has("Cin") {
		b.comment("Op-amp input capacitance at the − input")
		b.part("capacitor", "Cin", "sum", "gnd", value.Exact(v["Cin"]))
	}
	b.comment("Feedback: Rf ∥ Cf from the output to the summing node")
	b.part("resistor", "Rf", "out", "sum", value.Exact(v["Rf"]))
	if v.Has("Cf") {
		b.part("capacitor", "Cf", "out", "sum", value.Exact(v["Cf"]))
	}
	b.opamp(v, "gnd", "sum", "out")
	b.load(v, "out")
	b.ports("in sum gnd", "out out gnd")
	return b.String()
}

// transimpedanceForms: + input grounded, so vd = −Vsum; the summing node
// sees Zi = Rsh ∥ 1/(s(Cd + Cin)) ∥ rcm ∥ rid to gnd and Zf = Rf ∥ 1/(sCf) to
// the output.
func transimpedanceForms(v Values, f float64) Forms {
	m := opmAmpOf(v)
	a := m.gain(f)
	s := opmS(f)
	yl := opmYL(v, s)
	yq := m.go_() + yl
	yi := m.gcm + m.gid + s*complex(v.Or("Cd", 0)+v.Or("Cin", 0), 0)
	if v.Has("Rsh") {
		yi += complex(1/v["Rsh"], 0)
	}
	yf := complex(1/v["Rf"], 0) + s*complex(v.Or("Cf", 0), 0)
	zf := 1 / yf
	T := a / (1 + zf*yi) / (1 + m.ro*(yl+opmSeries(yf, yi)))
	z0out := 1 / (yq + opmSeries(yf, yi))
	z0in := 1 / (yi + opmSeries(yf, yq))
	g0 := z0in * yf / (yf + yq)

	zi := "Zi = Rsh ∥ 1/(s(Cd + Cin)) ∥ rcm ∥ rid"
	return Forms{
		T:    opmF(T, "T = a·Zi/(Zi + Zf)·Zo′/(Zo′ + ro), "+zi+", Zf = Rf ∥ 1/(sCf), Zo′ = ZL ∥ (Zf + Zi); with no load: a·Zi/(Zi + Zf + ro) [derived here from the node equations]", opmSrcLoop),
		Gain: opmGain(-zf, g0, T, "G∞ = −Zf", "G₀ = [Zi ∥ (Zf + Zq)]·Zq/(Zf + Zq), Zq = ro ∥ ZL"),
		Ports: []PortForms{
			{Name: "in",
				Z0:     opmF(z0in, "Z₀ = Zi ∥ (Zf + ro ∥ ZL), "+zi, opmSrcZ0),
				TShort: opmF(0, "T_sc = 0 (the summing node shorted leaves no error voltage)", opmSrcLoop),
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0in, 0, T, "Zin = [Zi ∥ (Zf + ro)]/(1 + T) with no load; without Ci and rd, (Zf + ro)/(1 + a) [derived here from the node equations]"),
			},
			{Name: "out",
				Z0:     opmF(z0out, "Z₀ = ro ∥ ZL ∥ (Zf + Zi)", opmSrcZ0),
				TShort: opmF(0, "T_sc = 0 (the output shorted returns nothing)", opmSrcLoop),
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0out, 0, T, ""),
			},
		},
		Extras: transimpedanceExtras(v),
	}
}

// Sources of the TIA's design aids.
const (
	tiaSrc45 = "approximate \"45°\" choice, J. Graeme, Photodiode Amplifiers: Op Amp Solutions, McGraw-Hill, 1996 [memory]"
	tiaSrcBW = "exact second-order Butterworth value for a = ωt/s, Z_T = −Rf/[1 + s(Rf·Cf + 1/ωt) + s²·Rf(Ci + Cf)/ωt] [derived here]"
)

// transimpedanceExtras suggests Cf by the approximate 45° rule and the exact
// Butterworth formula, with Ci the whole summing-node capacitance Cd + Cin
// (the other parts at the node, Rsh, rid and rcm, are resistive), and
// reports what each actually gives on this stage's full model: the engine
// analyzes the stage with that Cf substituted.
func transimpedanceExtras(v Values) []Extra {
	ci := v.Or("Cd", 0) + v.Or("Cin", 0)
	rf := v["Rf"]
	x := []Extra{{Name: "Ci (summing-node capacitance)", Value: ci, Unit: "F", Note: "Cd + Cin: the capacitance from the summing node to gnd that the Cf formulas use (Rsh, rid, rcm are resistive and left out)", Source: opmSrcNodal}}
	if !v.Has("gbw") {
		x = append(x, Extra{Name: "Cf suggestions", Value: math.NaN(), Note: "need gbw: with no first pole the formulas for Cf and Rf/(2π·gbw) have no meaning"})
		return x
	}
	gbw := v["gbw"]
	wt := 2 * math.Pi * gbw
	x = append(x, Extra{Name: "equivalent input inductance Rf/(2π·gbw)", Value: rf / wt, Unit: "H",
		Note: "with a = ωt/s the summing node looks like this inductance (in series with ro, in parallel with Ci)", Source: "derived here from Zin = (Zf + ro)/(1 + a) with a = ωt/s [derived]"})
	if ci <= 0 {
		return x
	}
	c45 := math.Sqrt(ci / (wt * rf))
	x = append(x, tiaCfExtras(v, "45° rule", c45, "Cf ≈ √(Ci/(2π·Rf·gbw))", tiaSrc45)...)
	if arg := 2*rf*ci*wt - 1; arg > 0 {
		cbw := math.Sqrt(arg) / (rf * wt)
		x = append(x, tiaCfExtras(v, "Butterworth", cbw, "Cf = √(2·Rf·Ci·ωt − 1)/(Rf·ωt)", tiaSrcBW)...)
	}
	return x
}

// tiaCfExtras reports Cf, the Q it gives on the ideal model, and the phase
// margin, crossover and closed-loop −3 dB frequency the engine finds on the
// stage with that Cf.
func tiaCfExtras(v Values, label string, cf float64, formula, source string) []Extra {
	rf, ci := v["Rf"], v.Or("Cd", 0)+v.Or("Cin", 0)
	wt := 2 * math.Pi * v["gbw"]
	q := math.Sqrt(rf*(ci+cf)/wt) / (rf*cf + 1/wt)
	w := opmWith(v, map[string]float64{"Cf": cf})
	text := transimpedanceCircuit(w)
	out := []Extra{
		{Name: "Cf (" + label + ")", Value: cf, Unit: "F", Note: formula + ", Ci = Cd + Cin", Source: source},
		{Name: "Q with Cf (" + label + ")", Value: q, Unit: "", Note: "Q = √(Rf(Ci + Cf)/ωt)/(Rf·Cf + 1/ωt), on the ideal model a = ωt/s, no ro, no load", Source: tiaSrcBW},
	}
	out = append(out, opmMarginExtras(text, "with Cf ("+label+")", "the stage's full model with this Cf", opmSrcEngine)...)
	out = append(out, Extra{Name: "f−3dB with Cf (" + label + ")", Value: tiaBandwidth(text), Unit: "Hz",
		Note: "where the closed-loop transimpedance falls 3 dB below its DC value", Source: opmSrcEngine})
	return out
}

// tiaBandwidth finds the first frequency where |G| falls to |G(0)|/√2 for
// the circuit text, by the engine: the walk brackets it, Illinois false
// position on ln f closes it.
func tiaBandwidth(text string) float64 {
	a, err := opmLoopAnalyzer(text, "Iin", "out")
	if err != nil {
		return math.NaN()
	}
	gain := func(f float64) (complex128, bool) {
		p, err := a.At(f)
		if err != nil || p.Gain == nil {
			return 0, false
		}
		return p.Gain.GDirect, true
	}
	g0, ok := gain(0)
	if !ok {
		return math.NaN()
	}
	level := math.Log(cmplx.Abs(g0) / math.Sqrt2)
	// above is ln|G| less the level: positive until |G| has fallen 3 dB.
	above := func(f float64) (float64, bool) {
		g, ok := gain(f)
		d := math.Log(cmplx.Abs(g)) - level
		return d, ok && !math.IsNaN(d) && !math.IsInf(d, 0)
	}
	f3 := math.NaN()
	pf, pd := 0.0, math.NaN()
	walk(gain, func(f float64, g complex128) bool {
		d := math.Log(cmplx.Abs(g)) - level
		if d < 0 && pd >= 0 {
			f3 = feedback.Refine(pf, f, pd, d, above)
			return false
		}
		pf, pd = f, d
		return true
	})
	return f3
}
