package topology

import (
	"fmt"
	"math"
	"math/cmplx"

	"zport/engine/numeric"
	"zport/engine/value"
)

// The two-stage Miller-compensated amplifier at transistor level, open loop:
// an n-channel input pair M1, M2 with tail device M5 and the p-channel
// mirror M3 (diode) and M4 as its load; the common-source second stage M6
// with its current-source load M7; Cc, optionally behind the nulling
// resistor Rz, from the first stage's output n1 to the output. Vin drives
// M2's gate (the non-inverting input); M1's gate is at AC ground.
//
// The first stage is exactly a Norton source at n1. With the mirror node's
// admittance ym = gm3 + go3 + s·Cm (Cm = both mirror gate capacitances),
// k = (gm1 + go1)/(ym + go1), D = go5 + gm2 + go2 + ym·k and
// N = go5 + k·(ym + gm4), the current it draws from n1 is
// Gs·vin + Ys·v1 with Gs = gm2·N/D and Ys = go2·N/D + go4. Node n1 then
// sees Y1 = Ys + s·Cgs6, the output Y2 = go6 + go7 + s·CL, and the two are
// joined by Yc = s·Cc/(1 + s·Rz·Cc) with gm6·v1 drawn from the output:
//
//	Δ = Y1·Y2 + Yc·(Y1 + Y2 + gm6),   Δ₀ = Y1·Y2 + Yc·(Y1 + Y2),
//	A(s) = Gs·(gm6 − Yc)/Δ,            T(M6) = gm6·Yc/Δ₀.
type mlNet struct {
	gs, y1, y2, yc, gm6 complex128
}

// mlDevices holds the small-signal values of the seven devices as the mos
// lines derive them: gm = 2·ID/Vov, go = λ·ID.
type mlDevices struct {
	gm1, go1, gm3, go3, go5, gm6, go6, go7 float64
}

func mlDevicesOf(v Values) mlDevices {
	id1, id6, l := v["ID1"], v["ID6"], v["lambda"]
	return mlDevices{
		gm1: 2 * id1 / v["Vov1"], go1: l * id1,
		gm3: 2 * id1 / v["Vov3"], go3: l * id1,
		go5: l * 2 * id1,
		gm6: 2 * id6 / v["Vov6"], go6: l * id6, go7: l * id6,
	}
}

// mlFirstStage returns Gs and Ys at s.
func mlFirstStage(d mlDevices, cm float64, s complex128) (gs, ys complex128) {
	c := func(x float64) complex128 { return complex(x, 0) }
	ym := c(d.gm3+d.go3) + s*c(cm)
	k := c(d.gm1+d.go1) / (ym + c(d.go1))
	den := c(d.go5+d.gm1+d.go1) + ym*k
	num := c(d.go5) + k*(ym+c(d.gm3))
	return c(d.gm1) * num / den, c(d.go1)*num/den + c(d.go3)
}

func mlNetOf(v Values, f float64) mlNet {
	d := mlDevicesOf(v)
	s := cfS(f)
	gs, ys := mlFirstStage(d, 2*v.Or("Cgs3", 0), s)
	yc := s * complex(v["Cc"], 0)
	if v.Has("Rz") {
		yc /= 1 + s*complex(v["Rz"]*v["Cc"], 0)
	}
	return mlNet{gs: gs, y1: ys + s*complex(v.Or("Cgs6", 0), 0), y2: complex(d.go6+d.go7, 0) + s*complex(v["CL"], 0), yc: yc, gm6: complex(d.gm6, 0)}
}

func (n mlNet) det0() complex128 { return n.y1*n.y2 + n.yc*(n.y1+n.y2) }
func (n mlNet) det() complex128  { return n.det0() + n.gm6*n.yc }

// T is M6's return ratio, the Miller loop: gm6·Yc/Δ₀.
func (n mlNet) T() complex128 { return n.gm6 * n.yc / n.det0() }

// mlTransfer is the open-loop gain as exact polynomials A(s) = num(s)/den(s)
// (the first stage's mirror pole cleared by multiplying through with
// ym + go1, the nulling resistor's by 1 + s·Rz·Cc).
func mlTransfer(v Values) (num, den poly) {
	d := mlDevicesOf(v)
	ym := poly{d.gm3 + d.go3, 2 * v.Or("Cgs3", 0)}
	ymg := ym.add(poly{d.go1})
	dd := ymg.scale(d.go5 + d.gm1 + d.go1).add(ym.scale(d.gm1 + d.go1))  // D·(ym + go1)
	nn := ymg.scale(d.go5).add(ym.add(poly{d.gm3}).scale(d.gm1 + d.go1)) // N·(ym + go1)
	n1 := nn.scale(d.go1).add(dd.scale(d.go3)).add(dd.mul(poly{0, v.Or("Cgs6", 0)}))
	y2 := poly{d.go6 + d.go7, v["CL"]}
	dc := poly{1, v.Or("Rz", 0) * v["Cc"]}
	nc := poly{0, v["Cc"]}
	den = n1.mul(y2).mul(dc).add(nc.mul(n1.add(y2.add(poly{d.gm6}).mul(dd))))
	num = nn.scale(d.gm1).mul(dc.scale(d.gm6).add(nc.scale(-1)))
	return num.trim(), den.trim()
}

// mlFollower is the phase margin and unity-gain frequency of the amplifier
// connected as a unity-gain follower, whose loop gain is the open-loop A(s)
// (M1's gate draws no current, so closing the loop loads nothing): the
// first downward crossing of |A| = 1, refined by Brent's method on log f,
// and PM = 180° + ∠A there.
func mlFollower(v Values) (pm, fu float64) {
	num, den := mlTransfer(v)
	zeros, poles := num.roots(), den.roots()
	if len(poles) == 0 {
		return math.NaN(), math.NaN()
	}
	a0 := num[0] / den[0]
	mag := func(f float64) float64 {
		s := complex(0, 2*math.Pi*f)
		m := math.Abs(a0)
		for _, z := range zeros {
			m *= cmplx.Abs(1 - s/z)
		}
		for _, p := range poles {
			m /= cmplx.Abs(1 - s/p)
		}
		return m
	}
	if !(math.Abs(a0) > 1) {
		return math.NaN(), math.NaN()
	}
	// |A| > 1 at the start, so the first crossing is downward.
	fu = firstRoot(1e-3, 1e15, 187, func(f float64) float64 { return math.Log(mag(f)) })
	if math.IsNaN(fu) {
		return math.NaN(), math.NaN()
	}
	return 180 + rootPhase(2*math.Pi*fu, zeros, poles), fu
}

func mlCircuit(v Values) string {
	d := mlDevicesOf(v)
	var b opmText
	b.header("Two-stage Miller-compensated amplifier", "miller")
	fmt.Fprintf(&b, "# input pair: gm1 = gm2 = %s, mirror: gm3 = gm4 = %s, second stage: gm6 = %s (1/gm6 = %s)\n",
		cfShow(d.gm1, "S"), cfShow(d.gm3, "S"), cfShow(d.gm6, "S"), cfShow(1/d.gm6, "Ω"))
	dev := func(name, dn, g, s string, id float64, vov, extra string) {
		fmt.Fprintf(&b, "%-9s %-5s %-5s %-5s %-5s id=%s vov=%s lambda=%s%s\n", "mos", name, dn, g, s,
			value.Exact(id), value.Exact(v[vov]), value.Exact(v["lambda"]), extra)
	}
	opt := func(key, o string) string {
		if v.Has(key) {
			return " " + o + "=" + value.Exact(v[key])
		}
		return ""
	}
	b.comment("Input: Vin on M2's gate, the non-inverting input; M1's gate, the inverting input, at AC ground")
	b.part("vsource", "Vin", "inp", "gnd", "1")
	b.comment("First stage: input pair M1, M2 with tail M5; mirror M3 (diode) and M4 as the load; output n1")
	dev("M1", "m", "gnd", "s", v["ID1"], "Vov1", "")
	dev("M2", "n1", "inp", "s", v["ID1"], "Vov1", "")
	dev("M3", "m", "m", "gnd", v["ID1"], "Vov3", opt("Cgs3", "cgs"))
	dev("M4", "n1", "m", "gnd", v["ID1"], "Vov3", opt("Cgs3", "cgs"))
	dev("M5", "s", "gnd", "gnd", 2*v["ID1"], "Vovcs", "")
	b.comment("Second stage: common-source M6 with its current-source load M7")
	dev("M6", "out", "n1", "gnd", v["ID6"], "Vov6", opt("Cgs6", "cgs"))
	dev("M7", "out", "gnd", "gnd", v["ID6"], "Vovcs", "")
	if v.Has("Rz") {
		b.comment("Miller compensation: Cc behind the nulling resistor Rz")
		b.part("resistor", "Rz", "n1", "z", value.Exact(v["Rz"]))
		b.part("capacitor", "Cc", "z", "out", value.Exact(v["Cc"]))
	} else {
		b.comment("Miller compensation: Cc from n1 to the output")
		b.part("capacitor", "Cc", "n1", "out", value.Exact(v["Cc"]))
	}
	b.comment("Load")
	b.part("capacitor", "CL", "out", "gnd", value.Exact(v["CL"]))
	b.ports("out out gnd", "n1 n1 gnd")
	return b.String()
}

const (
	mlSrcGHLM   = "P. R. Gray, P. J. Hurst, S. H. Lewis, R. G. Meyer, Analysis and Design of Analog Integrated Circuits, 5th ed., Wiley, 2009, ch. 9 (Miller compensation, pole splitting) [memory]"
	mlSrcRazavi = "B. Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., McGraw-Hill, 2017, ch. 10 [memory]"
)

func mlForms(v Values, f float64) Forms {
	n := mlNetOf(v, f)
	T := n.T()
	defs := "Y1 = Ys + sCgs6 (Ys the first stage's output admittance, with the mirror pole), Y2 = go6 + go7 + sCL, Yc = sCc/(1 + sRzCc), " +
		"Δ₀ = Y1·Y2 + Yc(Y1 + Y2), Δ = Δ₀ + gm6·Yc; gm = 2·ID/Vov, go = λ·ID"
	var out Forms
	out.T = cfF(T, "T = gm6·Yc/Δ₀: the Miller loop around M6 (0 at DC, where Cc is open); "+defs, cfSrcDerived)
	out.Gain = cfF(n.gs*(n.gm6-n.yc)/n.det(), "A(s) = Gs·(gm6 − Yc)/Δ, Gs the first stage's transconductance (gm1 with the mirror): zeros at gm6 − Yc = 0, "+
		"i.e. s = 1/(Cc(1/gm6 − Rz)); low frequency Gs·gm6/(Y1·Y2) ≈ gm1·(ro2 ∥ ro4)·gm6·(ro6 ∥ ro7); "+defs, cfSrcDerived+"; the form of "+mlSrcGHLM)
	out.Ports = []PortForms{
		{Name: "out",
			Z0:     cfF((n.y1+n.yc)/n.det0(), "Z₀ = (Y1 + Yc)/Δ₀: M6's gm off, the output sees ro6 ∥ ro7 ∥ CL ∥ (Cc, Rz to n1)", cfSrcDerived),
			TShort: cfF(0, "T_sc = 0 (the shorted output returns nothing through Cc)", cfSrcDerived),
			TOpen:  cfF(T, "T_oc = T", cfSrcDerived),
			Z: cfF((n.y1+n.yc)/n.det(), "Z = Z₀/(1 + T) = (Y1 + Yc)/Δ: where Cc conducts, M6 is diode-connected through it and the output falls to about (1/gm6)(1 + C1/Cc)",
				cfSrcDerived+"; "+mlSrcGHLM),
		},
		{Name: "n1",
			Z0:     cfF((n.y2+n.yc)/n.det0(), "Z₀ = (Y2 + Yc)/Δ₀", cfSrcDerived),
			TShort: cfF(0, "T_sc = 0 (n1 shorted: M6 sees no input)", cfSrcDerived),
			TOpen:  cfF(T, "T_oc = T", cfSrcDerived),
			Z:      cfF((n.y2+n.yc)/n.det(), "Z = Z₀/(1 + T) = (Y2 + Yc)/Δ: Cc multiplied by M6's gain — the Miller effect read through Blackman's formula", cfSrcDerived),
		},
	}
	out.Extras = mlExtras(v)
	return out
}

func mlExtras(v Values) []Extra {
	d := mlDevicesOf(v)
	num, den := mlTransfer(v)
	poles := den.roots()
	a0 := num[0] / den[0]
	gs0, ys0 := mlFirstStage(d, 0, 0)
	r1, r2 := 1/real(ys0), 1/(d.go6+d.go7)
	cc, c1, cl := v["Cc"], v.Or("Cgs6", 0), v["CL"]
	hz := func(w float64) float64 { return w / (2 * math.Pi) }
	x := []Extra{
		{Name: "amplifier DC open-loop gain A₀", Value: a0, Unit: "V/V", Note: fmt.Sprintf("%.4g dB", 20*math.Log10(math.Abs(a0))), Source: cfSrcDerived},
		{Name: "first stage's output resistance R1 = 1/Ys(0)", Value: r1, Unit: "Ω",
			Note: "≈ ro2 ∥ ro4; its transconductance Gs(0) = " + cfShow(real(gs0), "S") + " ≈ gm1", Source: cfSrcDerived},
	}
	mag := func(i int) float64 {
		if i < len(poles) {
			return hz(cmplx.Abs(poles[i]))
		}
		return math.NaN()
	}
	note := func(i int) string {
		if i < len(poles) && imag(poles[i]) != 0 {
			return "a complex pair: |p| given, Q = " + fmt.Sprintf("%.3g", cmplx.Abs(poles[i])/(-2*real(poles[i])))
		}
		return "a root of the exact denominator, found numerically [derived]"
	}
	x = append(x,
		Extra{Name: "dominant pole (exact)", Value: mag(0), Unit: "Hz", Note: note(0), Source: cfSrcDerived},
		Extra{Name: "dominant pole, pole-splitting estimate 1/(2π·gm6·R1·R2·Cc)", Value: hz(1 / (d.gm6 * r1 * r2 * cc)), Unit: "Hz",
			Note: "holds while gm6·R2·Cc ≫ C1 + CL and the poles are far apart", Source: mlSrcGHLM},
		Extra{Name: "non-dominant pole (exact)", Value: mag(1), Unit: "Hz", Note: note(1), Source: cfSrcDerived},
		Extra{Name: "non-dominant pole, pole-splitting estimate gm6·Cc/(2π(C1·CL + Cc(C1 + CL)))", Value: hz(d.gm6 * cc / (c1*cl + cc*(c1+cl))), Unit: "Hz",
			Note: "C1 = Cgs6; without Rz and the mirror", Source: mlSrcGHLM},
	)
	rz := v.Or("Rz", 0)
	zero := math.NaN()
	zNote := "none: Rz = 1/gm6 moves it to infinity"
	// Rz within rounding of 1/gm6 (as typed from the design value) has
	// moved the zero to infinity.
	if k := 1/d.gm6 - rz; math.Abs(k) > 1e-9/d.gm6 {
		zero = hz(1 / (cc * k))
		zNote = "right half-plane: it adds phase lag as a pole would, while raising the gain"
		if k < 0 {
			zNote = "negative: Rz > 1/gm6 has moved it into the left half-plane, where it gives phase lead"
		}
	}
	x = append(x,
		Extra{Name: "Miller zero 1/(2π·Cc·(1/gm6 − Rz))", Value: zero, Unit: "Hz", Note: zNote, Source: mlSrcGHLM + "; " + mlSrcRazavi},
		Extra{Name: "nulling resistor that cancels it, 1/gm6", Value: 1 / d.gm6, Unit: "Ω", Note: "try Rz a little above it for a zero in the left half-plane", Source: mlSrcGHLM},
		Extra{Name: "unity-gain bandwidth estimate gm1/(2π·Cc)", Value: hz(d.gm1 / cc), Unit: "Hz", Source: mlSrcGHLM},
	)
	pm, fu := mlFollower(v)
	x = append(x,
		Extra{Name: "phase margin as a unity-gain follower", Value: pm, Unit: "°",
			Note: "of the open-loop A(s) at |A| = 1: the loop gain with the output tied to M1's gate, which draws no current", Source: cfSrcDerived},
		Extra{Name: "unity-gain frequency of A(s)", Value: fu, Unit: "Hz", Source: cfSrcDerived})
	if p2 := mag(1); !math.IsNaN(fu) && !math.IsNaN(p2) {
		est := 90 - math.Atan(fu/p2)*180/math.Pi
		if !math.IsNaN(zero) {
			est -= math.Atan(fu/zero) * 180 / math.Pi
		}
		x = append(x, Extra{Name: "phase-margin estimate 90° − atan(fu/fp2) − atan(fu/fz)", Value: est, Unit: "°",
			Note: "two poles and the zero, at the exact fu and fp2", Source: mlSrcGHLM + "; " + mlSrcRazavi})
	}
	for _, k := range []float64{0.5, 2} {
		pmk, _ := mlFollower(opmWith(v, map[string]float64{"Cc": k * cc}))
		x = append(x, Extra{Name: fmt.Sprintf("phase margin with Cc = %s", cfShow(k*cc, "F")), Value: pmk, Unit: "°",
			Note: "the same amplifier as a unity-gain follower, Cc scaled", Source: cfSrcDerived})
	}
	x = append(x, Extra{Name: "Cc for a 60° phase margin", Value: mlCcFor(v, 60), Unit: "F",
		Note: "the smallest Cc that gives 60° as a unity-gain follower (no value when no Cc up to 100 times this one does)", Source: cfSrcDerived})
	return x
}

// mlCcFor finds, by Brent's method on log Cc between Cc/100 and 100·Cc,
// the Cc at which the follower's phase margin reaches pm (it rises with
// Cc).
func mlCcFor(v Values, pm float64) float64 {
	at := func(u float64) (float64, bool) {
		p, _ := mlFollower(opmWith(v, map[string]float64{"Cc": math.Exp(u)}))
		return p - pm, !math.IsNaN(p)
	}
	lo, hi := math.Log(v["Cc"]/100), math.Log(v["Cc"]*100)
	ghi, _ := at(hi)
	if !(ghi >= 0) {
		return math.NaN()
	}
	glo, _ := at(lo)
	if glo >= 0 {
		return math.Exp(lo)
	}
	return math.Exp(numeric.Root(lo, hi, glo, ghi, at))
}

func init() {
	register(&Topology{
		ID:    "miller",
		Title: "Two-stage Miller-compensated amplifier",
		Description: "The classic two-stage CMOS amplifier at transistor level: a differential pair with a current-mirror load, then a " +
			"common-source stage, with the compensation capacitor Cc across the second stage. The Miller loop around M6 splits the poles: the " +
			"first stage's output sees Cc multiplied by the second stage's gain (the dominant pole falls), while at high frequency Cc ties M6's " +
			"gate to its drain and the output resistance drops to about 1/gm6 (the non-dominant pole rises). The same path through Cc feeds " +
			"forward and puts a zero in the right half-plane at gm6/Cc; a nulling resistor Rz = 1/gm6 removes it. The reference here is M6's " +
			"transconductance: Blackman's Z₀ is each node's impedance without the Miller loop, and Z = Z₀/(1 + T) with it. The gain is the " +
			"open-loop A(s) from the non-inverting input; the design values give its poles and zero exactly and by the pole-splitting estimates, " +
			"and the phase margin as a unity-gain follower against Cc. Note that the margins box shows the Miller loop's own, which is not the amplifier's.",
		Scenario: "Invented scenario: the buffer amplifier of a sensor chip's reference must drive 2 pF as a unity-gain follower with at least " +
			"60° of phase margin. The pair runs at 20 µA a side with Vov = 0.15 V (gm1 ≈ 267 µS), the mirror at Vov = 0.25 V, the second stage at " +
			"200 µA with Vov = 0.2 V (gm6 = 2 mS), the current sources at Vov = 0.3 V, λ = 0.1 V⁻¹ throughout; Cgs6 = 200 fF, each mirror gate " +
			"50 fF, and Cc = 1 pF without a nulling resistor to start.",
		Params: []Param{
			{Name: "ID1", Symbol: "I_D1", Meaning: "bias current of each input device (the tail carries twice it)", Unit: "A", Default: "20u", Min: 1e-9, Max: 1, Group: "amplifier"},
			{Name: "Vov1", Symbol: "V_ov1", Meaning: "overdrive of the input pair M1, M2", Unit: "V", Default: "0.15", Min: 0.01, Max: 2, Group: "amplifier"},
			{Name: "Vov3", Symbol: "V_ov3", Meaning: "overdrive of the mirror M3, M4", Unit: "V", Default: "0.25", Min: 0.01, Max: 2, Group: "amplifier"},
			{Name: "ID6", Symbol: "I_D6", Meaning: "bias current of the second stage M6 (and its load M7)", Unit: "A", Default: "200u", Min: 1e-9, Max: 1, Group: "amplifier"},
			{Name: "Vov6", Symbol: "V_ov6", Meaning: "overdrive of M6", Unit: "V", Default: "0.2", Min: 0.01, Max: 2, Group: "amplifier"},
			{Name: "Vovcs", Symbol: "V_ov,cs", Meaning: "overdrive of the current-source devices M5, M7 (their gm does not act)", Unit: "V", Default: "0.3", Min: 0.01, Max: 2, Group: "amplifier"},
			{Name: "lambda", Symbol: "λ", Meaning: "channel-length modulation of every device, per volt (ro = 1/(λ·ID))", Unit: "", Default: "0.1", Min: 1e-4, Max: 10, Group: "amplifier"},
			{Name: "Cgs3", Symbol: "C_gs3", Meaning: "gate capacitance of each mirror device, at the mirror node (empty: none)", Unit: "F", Default: "50f", Min: 1e-18, Max: 1e-9, Optional: true, Group: "amplifier"},
			{Name: "Cgs6", Symbol: "C_gs6", Meaning: "gate-source capacitance of M6, with the first stage's drains lumped in: C1 (empty: none)", Unit: "F", Default: "200f", Min: 1e-18, Max: 1e-9, Optional: true, Group: "amplifier"},
			{Name: "Cc", Symbol: "C_c", Meaning: "Miller compensation capacitor, n1 to the output", Unit: "F", Default: "1p", Min: 1e-16, Max: 1e-6, Group: "network"},
			{Name: "Rz", Symbol: "R_z", Meaning: "nulling resistor in series with Cc (empty: none)", Unit: "Ω", Default: "", Min: 1e-3, Max: 1e9, Optional: true, Group: "network"},
			{Name: "CL", Symbol: "C_L", Meaning: "load capacitance at the output", Unit: "F", Default: "2p", Min: 1e-16, Max: 1e-3, Group: "load"},
		},
		Reference: "M6",
		Ports: []PortDef{
			{Name: "out", Title: "output to gnd, open loop", A: "out", B: "gnd"},
			{Name: "n1", Title: "first stage's output (M6's gate) to gnd", A: "n1", B: "gnd"},
		},
		Gain:      &GainDef{Source: "Vin", Output: "out", Unit: "V/V", Title: "open-loop gain from the non-inverting input"},
		Frequency: 1e6,
		Sweep:     Sweep{From: 10, To: 10e9, Points: 400},
		Cautions: []string{
			"Small-signal, open loop: every device must stay in saturation, which the output swing and the common-mode range limit; the slew rate (tail current over Cc) is not shown.",
			"The margins box is that of the Miller loop around M6; the amplifier's own margin as a follower is in the design values, computed from A(s).",
			"Without Rz the right-half-plane zero at gm6/Cc costs phase; a resistor near 1/gm6 tracks gm6 only if it is built to (a transistor in triode, as usual on chip).",
		},
		Circuit: mlCircuit,
		Forms:   mlForms,
	})
}
