package topology

import (
	"fmt"
	"math"

	"zport/engine/value"
)

func init() { register(capload) }

var capload = &Topology{
	ID:    "capload",
	Title: "Capacitive-load driver (isolation resistor, in-loop compensation)",
	Description: "A follower (R1 absent) or non-inverting stage of gain 1 + Rf/R1 driving a capacitive load CL — " +
		"a cable, a reference's decoupling capacitor, an ADC's input. The op amp's output resistance ro and CL " +
		"put a pole at 1/(2π·ro·CL) inside the loop, which eats phase margin right where the loop crosses over. " +
		"Two classic fixes are modeled. Without Cf, the feedback (Rf) is taken at the op-amp pin and an isolation " +
		"resistor Riso separates the pin from CL: the pin then sees ro against Riso + 1/(sCL), a pole at " +
		"1/(2π(ro + Riso)CL) followed by a zero at 1/(2π·Riso·CL) that hands the phase back, but the load " +
		"sees Riso and a gain error with RL. With Cf present the stage switches to in-loop compensation: Rf " +
		"senses the load side (after Riso) and Cf feeds the pin back to the − input, so the DC gain at the load " +
		"is exact while above 1/(2π·Rf·Cf) the loop closes through Cf around the pin alone — the Riso·CL pole " +
		"leaves the loop. Derived here: with ideal inputs, the feedback fraction from the pin is " +
		"[1 + s·Rf·Cf(1 + s·Riso·CL)]/[(1 + s·Rf·Cf)(1 + s·Riso·CL)] for the follower, which is 1 at DC and at " +
		"high frequency and has no net phase dip when Rf·Cf is several times (ro + Riso)·CL.",
	Scenario: "Invented scenario: the excitation driver of a strain-gauge test rig must deliver a gain of 2 " +
		"(Rf = R1 = 10 kΩ) into 3 m of cable, 10 nF, terminated in 10 kΩ, with an op amp of a0 = 200 000, " +
		"gbw = 5 MHz, a second pole at 30 MHz, rid = 1 MΩ, rcm = 1 GΩ, ro = 50 Ω; the designer isolates the " +
		"cable with Riso = 50 Ω and closes the DC loop at the cable with Cf = 1 nF (Rf·Cf = 10 µs, ten times " +
		"(ro + Riso)·CL).",
	Params: append([]Param{
		opmRs(""),
		{Name: "Rf", Meaning: "feedback resistor (from the pin without Cf, from the load with Cf)", Default: "10k", Min: 1e-3, Max: 1e10, Group: "network"},
		{Name: "R1", Meaning: "gain resistor, − input to gnd (empty: follower)", Default: "10k", Min: 1e-3, Max: 1e10, Optional: true, Group: "network"},
		{Name: "Cf", Meaning: "in-loop feedback capacitor, pin to − input (empty: feedback at the pin through Rf)", Default: "1n", Min: 1e-15, Max: 1e-2, Optional: true, Group: "network"},
		{Name: "Riso", Note: ", pin to load (empty: none)", Default: "50", Min: 1e-3, Max: 1e6, Optional: true, Group: "network"},
	}, append(append(opmAmpParams("200k", "5M", "30M", "1M", "1G", "50"), opmNoiseParams("7n", "10", "1p", "200")...), []Param{
		{Name: "RL", Note: " (empty: none)", Default: "10k", Min: 1e-3, Max: 1e12, Optional: true, Group: "load"},
		{Name: "CL", Default: "10n", Min: 1e-15, Max: 1, Group: "load"},
	}...)...),
	Reference: "U1",
	Ports: []PortDef{
		{Name: "out", Title: "output at the load (after Riso) to gnd", A: "out", B: "gnd"},
		{Name: "in", Title: "input, as the source Vin sees it (Rs included)", A: "src", B: "gnd"},
	},
	Gain:      &GainDef{Source: "Vin", Output: "out", Unit: "V/V", Title: "voltage gain Vin → load"},
	Frequency: 10e3,
	Sweep:     Sweep{From: 10, To: 100e6, Points: 400},
	Cautions: []string{
		"Check the phase margin with the largest CL the load can present (longest cable, extra decoupling).",
		"Riso without Cf leaves a gain error Riso/(Riso + RL) at the load and an output impedance of about Riso.",
		"With Cf (in-loop), keep Rf·Cf several times (ro + Riso)·CL; too small a Cf brings the Riso·CL pole back into the loop.",
	},
	// With R1 left empty the stage is a follower and the ratio drops out.
	Ratios:  []Ratio{{Num: "Rf", Den: "R1", Plus1: true, Title: "gain 1 + Rf/R1"}},
	Circuit: caploadCircuit,
	Forms:   caploadForms,
}

func caploadCircuit(v Values) string {
	var b opmText
	b.header("Capacitive-load driver", "capload")
	plus := b.source(v, "plus")
	pin := "out"
	if v.Has("Riso") {
		pin = "amp"
	}
	b.opamp(v, plus, "fb", pin)
	if v.Has("Riso") {
		b.comment("Isolation resistor from the op-amp pin to the load")
		b.part("resistor", "Riso", "amp", "out", value.Exact(v["Riso"]))
	}
	if v.Has("Cf") {
		b.comment("In-loop compensation: Rf senses the load (DC), Cf feeds the pin back (high frequency)")
		b.part("resistor", "Rf", "out", "fb", value.Exact(v["Rf"]))
		b.part("capacitor", "Cf", pin, "fb", value.Exact(v["Cf"]))
	} else {
		b.comment("Feedback taken at the op-amp pin through Rf")
		b.part("resistor", "Rf", pin, "fb", value.Exact(v["Rf"]))
	}
	if v.Has("R1") {
		b.part("resistor", "R1", "fb", "gnd", value.Exact(v["R1"]))
	}
	b.load(v, "out")
	b.ports("out out gnd", "in src gnd")
	return b.String()
}

// opmBridge solves a bridged network driven at node D: D–P y1, P–gnd y2,
// P–Q y3, D–Q y4, Q–gnd y5. It returns the admittance into D and the
// transfers Vp/Vd and Vq/Vd, written so that no term cancels:
// Δ = (y1 + y2)(y3 + y4 + y5) + y3(y4 + y5).
func opmBridge(y1, y2, y3, y4, y5 complex128) (yin, tp, tq complex128) {
	d := (y1+y2)*(y3+y4+y5) + y3*(y4+y5)
	tp = (y1*(y3+y4+y5) + y3*y4) / d
	tq = (y4*(y1+y2+y3) + y3*y1) / d
	yin = (y1*(y2*(y3+y4+y5)+y3*y5) + y4*(y5*(y1+y2+y3)+y2*y3)) / d
	return
}

// caploadForms: the pin (amp) drives the load node (out) through Riso and
// the − input (fb) through ya; out and fb are joined by yb. Without Cf,
// ya = 1/Rf and yb = 0; with Cf (in-loop), ya = sCf and yb = 1/Rf. The −
// input sees R1 and rcm to gnd and rid to the + input, tied to gnd through
// ypg; vd = −k·Vfb.
func caploadForms(v Values, f float64) Forms {
	m := opmAmpAt(v, f)
	a := m.gain(f)
	s := opmS(f)
	yl := opmYL(v, s)
	gf := complex(1/v["Rf"], 0)
	ya, yb := gf, complex(0, 0)
	if v.Has("Cf") {
		ya, yb = s*complex(v["Cf"], 0), gf
	}
	yab := ya + yb
	yn1 := m.gcm
	if v.Has("R1") {
		yn1 += complex(1/v["R1"], 0)
	}
	rs := complex(v.Or("Rs", 0), 0)
	ypgSC := opmInf
	if v.Has("Rs") {
		ypgSC = 1/rs + m.gcm
	}
	iso := v.Has("Riso")
	gi := complex(1/v.Or("Riso", 1), 0)
	loop := func(ypg complex128) complex128 {
		yn := yn1 + opmSeries(m.gid, ypg)
		var yin, tq complex128
		if iso {
			yin, _, tq = opmBridge(gi, yl, yb, ya, yn)
		} else {
			yin, tq = yl+opmSeries(yab, yn), yab/(yab+yn)
		}
		return a * opmShare(ypg, m.gid) * tq / (1 + m.ro*yin)
	}
	T := loop(ypgSC)
	Toc := loop(m.gcm)
	ynSC := yn1 + opmSeries(m.gid, ypgSC)

	// Output port at the load.
	var z0out, Tsc complex128
	if iso {
		yin, _, _ := opmBridge(gi, m.go_(), ya, yb, ynSC)
		z0out = 1 / (yl + yin)
		Tsc = a * opmShare(ypgSC, m.gid) * ya / (ya + yb + ynSC) / (1 + m.ro*(gi+opmSeries(ya, yb+ynSC)))
	} else {
		z0out = 1 / (m.go_() + yl + opmSeries(yab, ynSC))
	}
	// The − input with the gain at zero, and what it passes to the load.
	var yfb0, tout0 complex128
	if iso {
		yin, _, tq := opmBridge(ya, m.go_(), gi, yb, yl)
		yfb0, tout0 = yn1+yin, tq
	} else {
		yfb0, tout0 = yn1+opmSeries(yab, m.go_()+yl), yab/(yab+m.go_()+yl)
	}
	yp0 := m.gcm + opmSeries(m.gid, yfb0)
	z0in := rs + 1/yp0
	var ratio complex128 // Vout/Vfb with vd nulled
	if iso {
		ratio = (gi*(yn1+yab) + ya*yb) / (ya*(gi+yl+yb) + gi*yb)
	} else {
		ratio = (yn1 + yab) / yab
	}
	gInf := ratio / (1 + rs*m.gcm)
	g0 := 1 / (1 + rs*yp0) * opmShare(m.gid, yfb0) * tout0

	net := "ya = 1/Rf, yb = 0 without Cf; ya = sCf, yb = 1/Rf with Cf (in-loop)"
	tText := "T = a·k·(Vfb/Vpin)/(1 + ro·Ypin): the pin drives Riso to the load (ZL = RL ∥ 1/(sCL)) and ya to the − input, load and − input joined by yb, " +
		net + "; the − input sees R1 ∥ rcm ∥ (rid + Rs ∥ rcm) to gnd; k = (Rs ∥ rcm)/(rid + Rs ∥ rcm); Vfb/Vpin and Ypin from the bridged-T solution, Δ = (y1 + y2)(y3 + y4 + y5) + y3(y4 + y5)"
	tOpen := opmF(Toc, "T_oc: as T with the + input tied to gnd only by rcm (k′ = rcm/(rid + rcm))", opmSrcLoop)
	if Toc == 0 {
		// rcm absent: the open + input carries no error voltage, T_oc is
		// exactly 0, and the engine's value there is its round-off floor.
		tOpen = nil
	}
	outTsc := opmF(0, "T_sc = 0 (the output shorted returns nothing)", opmSrcLoop)
	outZ0 := "Z₀ = ro ∥ ZL ∥ (1/(ya + yb) + R1 ∥ rcm ∥ (rid + Rs ∥ rcm))"
	if iso {
		outTsc = opmF(Tsc, "T_sc = a·k·ya/(ya + yb + Yn)/(1 + ro·[1/Riso + ya ∥ (yb + Yn)]) (the load shorted: Riso to gnd), Yn = 1/R1 + 1/rcm + 1/(rid + Rs ∥ rcm)", opmSrcLoop)
		outZ0 = "Z₀ = ZL ∥ (bridged T: Riso to the pin, ro from the pin to gnd, ya pin to − input, yb load to − input, Yn − input to gnd)"
	}
	return Forms{
		T:    opmF(T, tText+opmCapNote, opmSrcLoop),
		Gain: opmGain(gInf, g0, T, "G∞ = rcm/(Rs + rcm)·Vout/Vfb|vd=0 = rcm/(Rs + rcm)·[(Yn₁ + ya + yb) + Riso·ya·yb]/[ya(1 + Riso(YL + yb)) + yb], Yn₁ = 1/R1 + 1/rcm", "G₀ = Zp/(Rs + Zp)·Zfb/(rid + Zfb)·(Vout/Vfb with the gain at zero)"),
		Ports: []PortForms{
			{Name: "out",
				Z0:     opmF(z0out, outZ0, opmSrcZ0),
				TShort: outTsc,
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0out, Tsc, T, ""),
			},
			{Name: "in",
				Z0:     opmF(z0in, "Z₀ = Rs + rcm ∥ (rid + Zfb), Zfb = the − input's impedance to gnd with the gain at zero", opmSrcZ0),
				TShort: opmF(T, "T_sc = T (the port shorted is Vin zeroed)", opmSrcLoop),
				TOpen:  tOpen,
				Z:      opmBlackman(z0in, T, Toc, ""),
			},
		},
		Extras: caploadExtras(v),
	}
}

const caploadSrcPole = "ro with CL adds a loop pole at 1/(2π·ro·CL) [memory; a standard result of op-amp stability texts, not re-read]"

// caploadExtras: the ro·CL pole, the pole–zero pair Riso makes, and the
// phase margin the engine finds as given, without Riso and without CL.
func caploadExtras(v Values) []Extra {
	ro, cl := v["ro"], v["CL"]
	x := []Extra{{Name: "loop pole ro·CL", Value: 1 / (2 * math.Pi * ro * cl), Unit: "Hz",
		Note: "1/(2π·ro·CL): where CL starts to eat the loop's phase without Riso", Source: caploadSrcPole}}
	if v.Has("Riso") && !v.Has("Cf") {
		riso := v["Riso"]
		x = append(x,
			Extra{Name: "loop pole with Riso", Value: 1 / (2 * math.Pi * (ro + riso) * cl), Unit: "Hz",
				Note: "1/(2π(ro + Riso)CL), the pin seeing ro against Riso + 1/(sCL); RL and the feedback network's loading neglected", Source: opmSrcNodal},
			Extra{Name: "loop zero with Riso", Value: 1 / (2 * math.Pi * riso * cl), Unit: "Hz",
				Note: "1/(2π·Riso·CL): the phase comes back above it", Source: opmSrcNodal})
	}
	if v.Has("Riso") && v.Has("Cf") {
		x = append(x, Extra{Name: "Rf·Cf/((ro + Riso)·CL)", Value: v["Rf"] * v["Cf"] / ((ro + v["Riso"]) * cl), Unit: "",
			Note: "in-loop compensation keeps the Riso·CL pole out of the loop when this is several times 1", Source: opmSrcNodal})
	}
	x = append(x, opmMarginExtras(caploadCircuit(v), "as given", "the stage as entered", opmSrcEngine)...)
	if v.Has("Riso") {
		x = append(x, opmMarginExtras(caploadCircuit(opmWith(v, nil, "Riso")), "without Riso", "Riso removed (the pin drives CL directly)", opmSrcEngine)...)
	}
	x = append(x, opmMarginExtras(caploadCircuit(opmWith(v, nil, "CL")), "without CL", "the stage unloaded by CL, for comparison", opmSrcEngine)...)
	with := ""
	if v.Has("Cf") {
		with = " (with Cf as given)"
	}
	for _, pm := range []float64{45, 60} {
		guess := firstRoot(1e-3, 1e6, 37, func(r float64) float64 { pm0, _ := caploadSimple(v, r); return pm0 - pm })
		_, fc := caploadSimple(v, guess)
		x = append(x, Extra{Name: fmt.Sprintf("Riso for %g°", pm), Value: opmSolvePM("capload", v, "Riso", pm, guess, fc), Unit: "Ω",
			Note:   fmt.Sprintf("the smallest Riso at which this stage's full model%s has exactly %g° of phase margin; none shown when no Riso within 3 times the simple loop's (%s) gives it", with, pm, value.Format(guess, "Ω", 4)),
			Source: opmSrcSolve + "; the estimate from T = a·β·(1 + s·Riso·CL)/(1 + s(ro + Riso)CL), β = R1/(R1 + Rf) (1 without R1), with RL, rid, rcm, Cf and the feedback network's loading neglected [derived here]"})
	}
	return x
}

// caploadSimple is the phase margin and crossover (Hz) of the isolated
// load's simple loop T = a(s)·β·(1 + s·Riso·CL)/(1 + s(ro + Riso)CL)
// [derived here: the pin sees ro against Riso + 1/(sCL)], the estimate the
// solver starts from.
func caploadSimple(v Values, riso float64) (pm, fc float64) {
	beta := 1.0
	if v.Has("R1") {
		beta = v["R1"] / (v["R1"] + v["Rf"])
	}
	m := opmAmpAt(v, 0)
	tz, tp := riso*v["CL"], (v["ro"]+riso)*v["CL"]
	T := func(w float64) complex128 {
		s := complex(0, w)
		return m.gain(w/(2*math.Pi)) * complex(beta, 0) * (1 + s*complex(tz, 0)) / (1 + s*complex(tp, 0))
	}
	phase := func(w float64) float64 {
		p := math.Atan(w*tz) - math.Atan(w*tp)
		if a := m.amp; a.GBW > 0 {
			p -= math.Atan(w / (2 * math.Pi * a.GBW / a.A0))
		}
		if a := m.amp; a.P2 > 0 {
			p -= math.Atan(w / (2 * math.Pi * a.P2))
		}
		return p * 180 / math.Pi
	}
	return idealPM(T, phase)
}
