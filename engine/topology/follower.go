package topology

import "zport/engine/value"

func init() { register(follower) }

var follower = &Topology{
	ID:    "follower",
	Title: "Voltage follower",
	Description: "The unity-gain buffer: the output pin feeds straight back to the − input, so the loop gain is the " +
		"whole open-loop gain. Designers use it to isolate a high-impedance node (a divider, a reference, a sensor) " +
		"from whatever it must drive. It has the highest input impedance and the lowest output impedance of the " +
		"op-amp stages, and the least stability margin: the full-bandwidth loop meets the pole that ro makes with a " +
		"capacitive load. An optional isolation resistor Riso between the pin and the load keeps that pole out of " +
		"the loop (the feedback is taken at the pin, before Riso), at the cost of an output impedance of about " +
		"Riso at the load and a load-dependent gain error.",
	Scenario: "Invented scenario: the reference buffer of a bench calibrator must copy a 2.5 V reference, taken " +
		"from a divider with 10 kΩ Thevenin resistance, onto a 10 kΩ load decoupled by 1 nF, through a 47 Ω " +
		"isolation resistor; the op amp has a0 = 150 000, gbw = 3 MHz, a second pole at 20 MHz, rid = 1 MΩ, " +
		"rcm = 1 GΩ, ro = 50 Ω.",
	Params: append([]Param{
		opmRs("10k"),
		{Name: "Riso", Note: ", output pin to load (empty: none)", Default: "47", Min: 1e-3, Max: 1e7, Optional: true, Group: "network"},
	}, append(append(opmAmpParams("150k", "3M", "20M", "1M", "1G", "50"), opmNoiseParams("15n", "50", "20f", "")...), opmLoad("10k", "1n")...)...),
	Reference: "U1",
	Ports: []PortDef{
		{Name: "in", Title: "input, as the source Vin sees it (Rs included)", A: "src", B: "gnd"},
		{Name: "out", Title: "output at the load (after Riso) to gnd", A: "out", B: "gnd"},
	},
	Gain:      &GainDef{Source: "Vin", Output: "out", Unit: "V/V", Title: "voltage gain Vin → load"},
	Frequency: 1e3,
	Sweep:     Sweep{From: 10, To: 100e6, Points: 400},
	Cautions: []string{
		"Unity gain is the hardest case for stability: check the phase margin with the real load capacitance.",
		"With Riso the load sees about Riso at low frequency, and a resistive load makes a divider with it: the gain at the load is below 1.",
		"The input common-mode range, not the gain, usually limits a follower: the input swings as far as the output.",
	},
	Circuit: followerCircuit,
	Forms:   followerForms,
}

func followerCircuit(v Values) string {
	var b opmText
	b.header("Voltage follower", "follower")
	plus := b.source(v, "plus")
	pin := "out"
	if v.Has("Riso") {
		pin = "amp"
	}
	b.opamp(v, plus, pin, pin)
	if v.Has("Riso") {
		b.comment("Isolation resistor from the output pin (where the feedback is taken) to the load")
		b.part("resistor", "Riso", "amp", "out", value.Exact(v["Riso"]))
	}
	b.load(v, "out")
	b.ports("in src gnd", "out out gnd")
	return b.String()
}

// followerForms: the output pin is the − input; it sees ro to the gain
// source, rcm and Riso + ZL to gnd, and rid to the + input, which is tied to
// gnd through ypg (Rs ∥ rcm with the source zeroed, rcm with the input port
// open). vd = −k·Vpin with k = (Rs ∥ rcm)/(rid + Rs ∥ rcm).
func followerForms(v Values, f float64) Forms {
	m := opmAmpAt(v, f)
	a := m.gain(f)
	yl := opmYL(v, opmS(f))
	rs := complex(v.Or("Rs", 0), 0)
	riso := complex(v.Or("Riso", 0), 0)
	yload := yl // what the pin sees through Riso
	if v.Has("Riso") {
		yload = opmSeries(1/riso, yl)
	}
	ypgSC := opmInf
	if v.Has("Rs") {
		ypgSC = 1/rs + m.gcm
	}
	loop := func(ypg, ypin complex128) complex128 {
		return a * opmShare(ypg, m.gid) / (1 + m.ro*(ypin+opmSeries(m.gid, ypg)))
	}
	T := loop(ypgSC, m.gcm+yload)
	Toc := loop(m.gcm, m.gcm+yload)
	ypinSC := m.go_() + m.gcm + opmSeries(m.gid, ypgSC) // the pin's own shunt, E at zero, source zeroed
	var z0out, Tsc complex128
	var z0Text, tscText string
	if v.Has("Riso") {
		z0out = 1 / (yl + opmSeries(1/riso, ypinSC))
		Tsc = loop(ypgSC, m.gcm+1/riso)
		z0Text = "Z₀ = ZL ∥ (Riso + ro ∥ rcm ∥ (rid + Rs ∥ rcm))"
		tscText = "T_sc = a·k/(1 + ro·[1/rcm + 1/Riso + 1/(rid + Rs ∥ rcm)]) (the load shorted: Riso to gnd)"
	} else {
		z0out = 1 / (yl + ypinSC)
		z0Text = "Z₀ = ZL ∥ ro ∥ rcm ∥ (rid + Rs ∥ rcm)"
		tscText = "T_sc = 0 (the output shorted returns nothing)"
	}
	ypin0 := m.go_() + m.gcm + yload // pin to gnd with the gain at zero, + side aside
	yp0 := m.gcm + opmSeries(m.gid, ypin0)
	z0in := rs + 1/yp0
	toLoad := complex(1, 0)
	if v.Has("Riso") {
		toLoad = 1 / (1 + riso*yl)
	}
	gInf := toLoad / (1 + rs*m.gcm)
	g0 := toLoad / (1 + rs*yp0) * opmShare(m.gid, ypin0)

	tText := "T = a·k/(1 + ro·Y), k = (Rs ∥ rcm)/(rid + Rs ∥ rcm), Y = 1/rcm + 1/(Riso + ZL) + 1/(rid + Rs ∥ rcm), ZL = RL ∥ 1/(sCL)"
	tOpen := opmF(Toc, "T_oc = a·k′/(1 + ro·Y′), k′ = rcm/(rid + rcm), Y′ = 1/rcm + 1/(Riso + ZL) + 1/(rid + rcm)", opmSrcLoop)
	if Toc == 0 {
		// rcm absent: the open + input carries no error voltage, T_oc is
		// exactly 0, and the engine's value there is its round-off floor.
		tOpen = nil
	}
	return Forms{
		T:    opmF(T, tText+opmCapNote, opmSrcLoop),
		Gain: opmGain(gInf, g0, T, "G∞ = rcm/(Rs + rcm)·ZL/(Riso + ZL)", "G₀ = Zp/(Rs + Zp)·Zpin/(rid + Zpin)·ZL/(Riso + ZL), Zpin = ro ∥ rcm ∥ (Riso + ZL), Zp = rcm ∥ (rid + Zpin)"),
		Ports: []PortForms{
			{Name: "in",
				Z0:     opmF(z0in, "Z₀ = Rs + rcm ∥ (rid + ro ∥ rcm ∥ (Riso + ZL))", opmSrcZ0),
				TShort: opmF(T, "T_sc = T (the port shorted is Vin zeroed)", opmSrcLoop),
				TOpen:  tOpen,
				Z:      opmBlackman(z0in, T, Toc, "with Rs, Riso, rcm and the load absent and a flat: Ri = rid(1 + a) + ro (Franco)"),
			},
			{Name: "out",
				Z0:     opmF(z0out, z0Text, opmSrcZ0),
				TShort: opmF(Tsc, tscText, opmSrcLoop),
				TOpen:  opmF(T, "T_oc = T", opmSrcLoop),
				Z:      opmBlackman(z0out, Tsc, T, "without Riso, Rs, rcm and load: Ro = ro·rid/[rid(1 + a) + ro] (Franco)"),
			},
		},
	}
}
