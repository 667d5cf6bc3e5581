package topology

import (
	"fmt"
	"math"
	"math/cmplx"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/value"
)

func init() {
	transimpedance.Cautions[1] = tiaCfCaution(transimpedance)
	register(transimpedance)
}

var transimpedance = &Topology{
	ID:    "transimpedance",
	Title: "Transimpedance amplifier (photodiode / current sensor)",
	Description: "A current-output sensor — a photodiode, an ionization chamber, a current probe — drives the " +
		"op amp's summing node, and Rf turns its current into an output voltage of −Iin·Rf. The sensor's " +
		"capacitance Cd and the op amp's input capacitance Cin sit at the summing node, where with Rf they put " +
		"a second pole in the loop: without a feedback capacitor Cf the loop rings or oscillates. The page " +
		"suggests Cf by two formulas — the classic \"45°\" one, whose label says the margin it really gives, and " +
		"the exact second-order Butterworth value — with the phase margin, crossover and closed-loop bandwidth " +
		"each gives on this stage's full model, and by the solver: the Cf for exactly 45° and for 60° on that " +
		"model. The summing node is what the sensor sees: a low impedance that rises with frequency and, with a " +
		"single-pole op amp, looks like an inductance Rf/(2π·gbw).",
	Scenario: "Invented scenario: the light-level monitor of an optical test bench uses a photodiode with " +
		"20 pF and 500 MΩ shunt resistance, at 1 V per µA (Rf = 1 MΩ, Cf = 1 pF), with a FET-input op amp of " +
		"a0 = 1 000 000, gbw = 10 MHz, a second pole at 60 MHz, 4 pF input capacitance, rid = rcm = 1 TΩ, " +
		"ro = 50 Ω, into 10 kΩ ∥ 50 pF.",
	Params: append([]Param{
		{Name: "Rsh", Note: " (empty: none)", Default: "500M", Min: 1, Max: 1e15, Optional: true, Group: "source"},
		{Name: "Cd", Note: " (empty: none)", Default: "20p", Min: 1e-15, Max: 1e-6, Optional: true, Group: "source"},
		{Name: "Cin", Note: ", − input to gnd, besides the model's ccm and cid: the op amp's, or board and wiring (empty: none)", Default: "4p", Min: 1e-15, Max: 1e-6, Optional: true, Group: "amplifier"},
		{Name: "Rf", Meaning: "feedback (transimpedance) resistor", Default: "1M", Min: 1, Max: 1e12, Group: "network"},
		{Name: "Cf", Meaning: "feedback capacitor across Rf (empty: none)", Default: "1p", Min: 1e-16, Max: 1e-3, Optional: true, Group: "network"},
	}, append(append(append(opmAmpParams("1M", "10M", "60M", "1T", "1T", "50"), opmNoiseParams("8n", "100", "1f", "")...),
		Param{Name: "Ipd", Note: " (invented default; empty: none)", Default: "100n", Min: 0, Max: 1, Optional: true, Group: "noise"}), opmLoad("10k", "50p")...)...),
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
		"", // tiaCfCaution: the margins the two Cf rules give, computed
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
	if v.Has("Ipd") {
		b.comment("The sensor's shot noise: √(2q·Ipd) of its DC current (signal and dark)")
		b.part("inoise", "Ipd", "gnd", "sum", "shot="+value.Exact(v["Ipd"]))
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
// sees Zi = Rsh ∥ 1/(s(Cd + Cin + ccm + cid)) ∥ rcm ∥ rid to gnd (the op
// amp's input admittances carry ccm and cid) and Zf = Rf ∥ 1/(sCf) to the
// output.
func transimpedanceForms(v Values, f float64) Forms {
	m := opmAmpAt(v, f)
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

	zi := "Zi = Rsh ∥ 1/(s(Cd + Cin + ccm + cid)) ∥ rcm ∥ rid"
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

// transimpedanceExtras suggests Cf by the classic "45°" formula and the
// exact Butterworth formula, with Ci the whole summing-node capacitance
// Cd + Cin + ccm + cid (the + input is grounded, so cid too goes to gnd; the
// other parts at the node, Rsh, rid and rcm, are resistive), and reports
// what each actually gives on this stage's full model: the engine analyzes
// the stage with that Cf substituted. Then the solver finds the Cf for
// exactly 45° and 60° on the full model, starting from the ideal model's.
func transimpedanceExtras(v Values) []Extra {
	ci := tiaCi(v)
	rf := v["Rf"]
	x := []Extra{{Name: "Ci (summing-node capacitance)", Value: ci, Unit: "F", Note: "Cd + Cin + ccm + cid: the capacitance from the summing node to gnd that the Cf formulas use (Rsh, rid, rcm are resistive and left out)", Source: opmSrcNodal}}
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
	x = append(x, tiaCfExtras(v, tiaClassic, c45, "Cf ≈ √(Ci/(2π·Rf·gbw))", tiaSrc45)...)
	if arg := 2*rf*ci*wt - 1; arg > 0 {
		cbw := math.Sqrt(arg) / (rf * wt)
		x = append(x, tiaCfExtras(v, "Butterworth", cbw, "Cf = √(2·Rf·Ci·ωt − 1)/(Rf·ωt)", tiaSrcBW)...)
	}
	for _, pm := range []float64{45, 60} {
		guess := firstRoot(1e-18, 1, 37, func(cf float64) float64 { pm0, _ := tiaIdeal(rf, ci, cf, gbw); return pm0 - pm })
		_, fc := tiaIdeal(rf, ci, guess, gbw)
		x = append(x, Extra{Name: fmt.Sprintf("Cf for %g°", pm), Value: opmSolvePM("transimpedance", v, "Cf", pm, guess, fc), Unit: "F",
			Note:   fmt.Sprintf("the Cf at which this stage's full model has exactly %g° of phase margin; none shown when no Cf within 3 times the ideal model's (%s) gives it", pm, value.Format(guess, "F", 4)),
			Source: opmSrcSolve})
	}
	return x
}

// tiaClassic labels the classic Cf formula: "45°" in quotes, because it
// gives more (its Cf's name says how much).
const tiaClassic = "classic “45°” formula"

// tiaCi is the summing node's capacitance to gnd: the sensor's Cd, the
// extra Cin, and the op amp's ccm and cid (its + input is grounded).
func tiaCi(v Values) float64 {
	return v.Or("Cd", 0) + v.Or("Cin", 0) + v.Or("ccm", 0) + v.Or("cid", 0)
}

// tiaCfExtras reports Cf, the Q it gives on the ideal model, and the phase
// margin, crossover and closed-loop −3 dB frequency the engine finds on the
// stage with that Cf.
func tiaCfExtras(v Values, label string, cf float64, formula, source string) []Extra {
	rf, ci := v["Rf"], tiaCi(v)
	wt := 2 * math.Pi * v["gbw"]
	q := math.Sqrt(rf*(ci+cf)/wt) / (rf*cf + 1/wt)
	w := opmWith(v, map[string]float64{"Cf": cf})
	text := transimpedanceCircuit(w)
	margins := opmMarginExtras(text, "with Cf ("+label+")", "the stage's full model with this Cf", opmSrcEngine)
	name := "Cf (" + label + ")"
	if pm := margins[0].Value; label == tiaClassic && !math.IsNaN(pm) {
		// The name says what the formula really gives.
		name = fmt.Sprintf("Cf (%s, gives %.1f°)", label, pm)
	}
	out := []Extra{
		{Name: name, Value: cf, Unit: "F", Note: formula + ", Ci = Cd + Cin + ccm + cid", Source: source},
		{Name: "Q with Cf (" + label + ")", Value: q, Unit: "", Note: "Q = √(Rf(Ci + Cf)/ωt)/(Rf·Cf + 1/ωt), on the ideal model a = ωt/s, no ro, no load", Source: tiaSrcBW},
	}
	out = append(out, margins...)
	out = append(out, Extra{Name: "f−3dB with Cf (" + label + ")", Value: tiaBandwidth(text), Unit: "Hz",
		Note: "where the closed-loop transimpedance falls 3 dB below its DC value", Source: opmSrcEngine})
	return out
}

// tiaBandwidth finds the first frequency where |G| falls to |G(0)|/√2 for
// the circuit text, by the engine: the walk brackets it, Brent's method on
// ln f closes it.
func tiaBandwidth(text string) float64 {
	a, err := loopAnalyzer(text, "U1", circuit.DefaultTemperature, "Iin", "out")
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

// tiaCfCaution says which phase margin the two Cf rules give on the ideal
// model at the stage's defaults — computed, so that the page and the
// design values never disagree about it.
func tiaCfCaution(t *Topology) string {
	def := map[string]float64{}
	for _, p := range t.Params {
		if x, err := value.Parse(p.Default, ""); err == nil {
			def[p.Name] = x
		}
	}
	rf, ci, gbw := def["Rf"], def["Cd"]+def["Cin"], def["gbw"]
	wt := 2 * math.Pi * gbw
	c45 := math.Sqrt(ci / (wt * rf))
	cbw := math.Sqrt(2*rf*ci*wt-1) / (rf * wt)
	return fmt.Sprintf("The \"45°\" rule for Cf gives about %.0f° of phase margin on the ideal model (a single-pole op amp, no output resistance, no load) with this page's default sensor, the Butterworth value about %.0f°. "+
		"A second pole or load capacitance lowers the margin: the design values show what each gives on the full model.",
		tiaIdealPM(rf, ci, c45, gbw), tiaIdealPM(rf, ci, cbw, gbw))
}

func tiaIdealPM(rf, ci, cf, gbw float64) float64 {
	pm, _ := tiaIdeal(rf, ci, cf, gbw)
	return pm
}

// tiaIdeal is the phase margin and crossover (Hz) of the ideal model
// with feedback capacitor cf: T(s) = (ωt/s)·(1 + s·τ1)/(1 + s·τ2),
// τ1 = Rf·Cf, τ2 = Rf·(Ci + Cf), the two-pole loop [derived here]. |T| = 1
// is a quadratic in ω², τ2²ω⁴ + (1 − ωt²τ1²)ω² − ωt² = 0, with one
// positive root, and the margin is 90° + atan(ωτ1) − atan(ωτ2) there.
func tiaIdeal(rf, ci, cf, gbw float64) (pm, fc float64) {
	wt := 2 * math.Pi * gbw
	t1, t2 := rf*cf, rf*(ci+cf)
	b := 1 - wt*wt*t1*t1
	w := math.Sqrt((-b + math.Sqrt(b*b+4*t2*t2*wt*wt)) / (2 * t2 * t2))
	return 90 + (math.Atan(w*t1)-math.Atan(w*t2))*180/math.Pi, w / (2 * math.Pi)
}
