package topology

import "zport/engine/value"

func init() { register(noninverting) }

var noninverting = &Topology{
	ID:    "noninverting",
	Title: "Non-inverting amplifier",
	Description: "The source drives the op amp's + input directly and R1, R2 divide the output back to the − input, " +
		"for a gain of 1 + R2/R1. Designers choose it when the source must not be loaded: the input impedance is " +
		"rid multiplied by the loop gain (gigaohms at low frequency), falling with frequency as the loop gain " +
		"falls, until the common-mode resistance rcm and the input capacitances you add take over. The output " +
		"impedance is ro divided by the loop gain, so it rises with frequency — it looks inductive above the " +
		"loop's first corner, which matters when the stage drives a capacitive load or a long cable.",
	Scenario: "Invented scenario: a vibration-sensor preamplifier in a test rig must give a gain of 10 " +
		"(R1 = 2 kΩ, R2 = 18 kΩ) from a sensor with 10 kΩ source resistance into 2 kΩ ∥ 470 pF of cable and " +
		"digitizer input, with a general-purpose op amp: a0 = 100 000, gbw = 1 MHz, a second pole at 10 MHz, " +
		"rid = 1 MΩ, rcm = 500 MΩ, ro = 100 Ω.",
	Params: append([]Param{
		opmRs("10k"),
		{Name: "R1", Meaning: "gain resistor, − input to gnd", Default: "2k", Min: 1e-3, Max: 1e10, Group: "network"},
		{Name: "R2", Meaning: "feedback resistor, output to − input", Default: "18k", Min: 1e-3, Max: 1e10, Group: "network"},
	}, append(append(opmAmpParams("100k", "1M", "10M", "1M", "500M", "100"), opmNoiseParams("8n", "5", "0.8p", "50")...), opmLoad("2k", "470p")...)...),
	Reference: "U1",
	Ports: []PortDef{
		{Name: "in", Title: "input, as the source Vin sees it (Rs included)", A: "src", B: "gnd"},
		{Name: "out", Title: "output to gnd", A: "out", B: "gnd"},
	},
	Gain:      &GainDef{Source: "Vin", Output: "out", Unit: "V/V", Title: "voltage gain Vin → out"},
	Frequency: 1e3,
	Sweep:     Sweep{From: 10, To: 100e6, Points: 400},
	Cautions: []string{
		"The very high input resistance holds only at low frequency: above the loop's corner the input impedance falls with the loop gain, and rcm and any input capacitance set the floor.",
		"The output impedance rises with frequency (inductive); with a capacitive load it resonates — check the margins with CL present.",
		"A source with no DC path to gnd leaves the + input without bias current return; add a resistor to gnd.",
	},
	Ratios:  []Ratio{{Num: "R2", Den: "R1", Plus1: true, Title: "gain 1 + R2/R1"}},
	Circuit: noninvertingCircuit,
	Forms:   noninvertingForms,
}

func noninvertingCircuit(v Values) string {
	var b opmText
	b.header("Non-inverting amplifier", "noninverting")
	plus := b.source(v, "plus")
	b.comment("Feedback divider: R1 from the − input to gnd, R2 from the output")
	b.part("resistor", "R1", "fb", "gnd", value.Exact(v["R1"]))
	b.part("resistor", "R2", "out", "fb", value.Exact(v["R2"]))
	b.opamp(v, plus, "fb", "out")
	b.load(v, "out")
	b.ports("in src gnd", "out out gnd")
	return b.String()
}

// noninvertingForms: the − input node n sees R1 and rcm to gnd, R2 to the
// output and rid to the + input, which is tied to gnd through ypg (Rs ∥ rcm
// with the source zeroed; rcm alone with the input port open); vd = −k·Vn with
// k = (Rs ∥ rcm)/(rid + Rs ∥ rcm).
func noninvertingForms(v Values, f float64) Forms {
	m := opmAmpAt(v, f)
	a := m.gain(f)
	r2 := complex(v["R2"], 0)
	g1 := complex(1/v["R1"], 0)
	g2 := 1 / r2
	yl := opmYL(v, opmS(f))
	yq := m.go_() + yl
	rs := complex(v.Or("Rs", 0), 0)
	ypgSC := opmInf
	if v.Has("Rs") {
		ypgSC = 1/rs + m.gcm
	}
	loop := func(ypg complex128) complex128 {
		k := opmShare(ypg, m.gid)
		yn := g1 + m.gcm + opmSeries(m.gid, ypg)
		yo := yl + opmSeries(g2, yn)
		return a * k / (1 + r2*yn) / (1 + m.ro*yo)
	}
	T := loop(ypgSC)
	Toc := loop(m.gcm)
	ynSC := g1 + m.gcm + opmSeries(m.gid, ypgSC)
	z0out := 1 / (yq + opmSeries(g2, ynSC))
	yne := g1 + m.gcm + opmSeries(g2, yq) // − input to gnd with the gain at zero
	yp0 := m.gcm + opmSeries(m.gid, yne)  // + input to gnd, likewise
	z0in := rs + 1/yp0
	gInf := (1 + r2*(g1+m.gcm)) / (1 + rs*m.gcm)
	g0 := 1 / (1 + rs*yp0) * opmShare(m.gid, yne) / (1 + r2*yq)

	kText := "k = (Rs ∥ rcm)/(rid + Rs ∥ rcm)"
	zn := "Zn = R1 ∥ rcm ∥ (rid + Rs ∥ rcm)"
	tOpen := opmF(Toc, "T_oc = a·k′·Zn′/(Zn′ + R2)·Zo″/(Zo″ + ro), k′ = rcm/(rid + rcm), Zn′ = R1 ∥ rcm ∥ (rid + rcm), Zo″ = ZL ∥ (R2 + Zn′)", opmSrcLoop)
	if Toc == 0 {
		// rcm absent: nothing ties the open + input to gnd, so no error
		// voltage appears and T_oc is exactly 0. The engine returns its
		// round-off floor there, where no relative comparison is meaningful;
		// the closed form is withheld rather than compared against noise.
		tOpen = nil
	}
	return Forms{
		T:    opmF(T, "T = a·k·Zn/(Zn + R2)·Zo′/(Zo′ + ro), "+kText+", "+zn+", Zo′ = ZL ∥ (R2 + Zn), ZL = RL ∥ 1/(sCL)"+opmCapNote, opmSrcLoop),
		Gain: opmGain(gInf, g0, T, "G∞ = (1 + R2/R1 + R2/rcm)·rcm/(Rs + rcm)", "G₀ = Zp/(Rs + Zp)·Zn₀/(rid + Zn₀)·Zq/(R2 + Zq), Zq = ro ∥ ZL, Zn₀ = R1 ∥ rcm ∥ (R2 + Zq), Zp = rcm ∥ (rid + Zn₀)"),
		Ports: []PortForms{
			{Name: "in",
				Z0:     opmF(z0in, "Z₀ = Rs + rcm ∥ (rid + R1 ∥ rcm ∥ (R2 + ro ∥ ZL))", opmSrcZ0),
				TShort: opmF(T, "T_sc = T (the port shorted is Vin zeroed)", opmSrcLoop),
				TOpen:  tOpen,
				Z:      opmBlackman(z0in, T, Toc, "with Rs, rcm and the load absent and a flat: Ri = rid·[1 + a/(1 + (R2 + ro)/R1)] + R1 ∥ (R2 + ro) (Franco)"),
			},
			{Name: "out",
				Z0:     opmF(z0out, "Z₀ = ro ∥ ZL ∥ (R2 + Zn), "+zn, opmSrcZ0),
				TShort: opmF(0, "T_sc = 0 (the output shorted returns nothing)", opmSrcLoop),
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0out, 0, T, "Zo = ro ∥ ZL ∥ (R2 + Zn)/(1 + T), inductive where T falls as 1/f (Franco 3rd ed., ch. 6 [found: as re-worked])"),
			},
		},
	}
}
