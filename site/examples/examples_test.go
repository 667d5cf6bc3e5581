package examples

import (
	"math"
	"math/cmplx"
	"regexp"
	"strings"
	"testing"

	"gonum.org/v1/gonum/cmplxs/cscalar"

	"zport/engine/api"
	"zport/engine/circuit"
)

// tol is what double precision can promise for a circuit of the given
// condition number (DEVELOPERS.md, "Tests stand on published sources").
func tol(cond *float64) float64 {
	c := 1.0
	if cond != nil {
		c = *cond
	}
	return math.Max(1e-9, 50*0x1p-53*c)
}

func near(t *testing.T, what string, got *api.Complex, want complex128, r *api.Response) {
	t.Helper()
	if got == nil {
		t.Errorf("%s: engine gave null, want %v", what, want)
		return
	}
	if e := tol(r.Condition); !cscalar.EqualWithinAbsOrRel(got.Value(), want, e, e) {
		t.Errorf("%s = %v, want %v (relative difference %.3g, tolerance %.3g)", what, got.Value(), want,
			cmplx.Abs(got.Value()-want)/cmplx.Abs(want), e)
	}
}

// at analyzes text at one frequency with the given reference, ports and
// gain (nil for none).
func at(t *testing.T, text, ref string, ports []string, gain *api.GainSpec, f float64) *api.Response {
	t.Helper()
	r, err := api.Analyze(api.Request{Circuit: text, Reference: ref, Ports: ports, Gain: gain, Frequency: f})
	if err != nil {
		t.Fatalf("analyze at %g Hz: %v", f, err)
	}
	return r
}

func port(t *testing.T, r *api.Response, name string) api.PortResult {
	t.Helper()
	for _, p := range r.Ports {
		if p.Name == name {
			return p
		}
	}
	t.Fatalf("no port %s in the response", name)
	return api.PortResult{}
}

// edit returns text with the line of part name replaced by line, or
// removed when line is empty; the part must be on exactly one line.
func edit(t *testing.T, text, name, line string) string {
	t.Helper()
	re := regexp.MustCompile(`(?m)^\w+\s+` + regexp.QuoteMeta(name) + `\s.*\n`)
	if n := len(re.FindAllString(text, -1)); n != 1 {
		t.Fatalf("part %s is on %d lines", name, n)
	}
	if line != "" {
		line += "\n"
	}
	return re.ReplaceAllLiteralString(text, line)
}

func s(f float64) complex128 { return complex(0, 2*math.Pi*f) }

// par is the parallel combination of two impedances.
func par(a, b complex128) complex128 { return a * b / (a + b) }

// opampGain is the opamp model's A(s) = a0/((1 + s/ω1)(1 + s/ω2)) with
// ω1 = 2π·gbw/a0 (the circuit text's definition; README, "Circuit text").
func opampGain(a0, gbw, p2, f float64) complex128 {
	a := complex(a0, 0) / (1 + s(f)/complex(2*math.Pi*gbw/a0, 0))
	if p2 > 0 {
		a /= 1 + s(f)/complex(2*math.Pi*p2, 0)
	}
	return a
}

var freqs = []float64{0, 1e3, 1e5, 3e6, 1e8}

func TestEveryExampleAnalyzes(t *testing.T) {
	seen := map[string]bool{}
	for _, e := range All() {
		t.Run(e.ID, func(t *testing.T) {
			if seen[e.ID] || !regexp.MustCompile(`^[a-z0-9]+$`).MatchString(e.ID) {
				t.Errorf("ID %q is repeated or not lower-case letters and digits", e.ID)
			}
			seen[e.ID] = true
			if !strings.Contains(e.Text, "(invented") || !strings.HasPrefix(e.Text, "# ") {
				t.Errorf("the text does not open with a comment labelling it an invented scenario")
			}
			if e.Title == "" || e.Scenario == "" || e.Look == "" {
				t.Errorf("title, scenario or what to look at is missing")
			}
			c, err := circuit.Parse(e.Text)
			if err != nil {
				t.Fatalf("parse: %v", err)
			}
			found := false
			for _, r := range c.References() {
				found = found || r == e.Reference
			}
			if !found {
				t.Errorf("reference %s is not a controlled source of the text", e.Reference)
			}
			if got, ok := Lookup(e.ID); !ok || got.Text != e.Text {
				t.Errorf("Lookup(%q) does not find the example", e.ID)
			}
			r, err := api.Analyze(e.Request())
			if err != nil {
				t.Fatalf("analyze: %v", err)
			}
			if len(r.Ports) != len(e.Ports) || r.Sweep == nil || r.Margins == nil || (e.Gain != nil) != (r.Gain != nil) {
				t.Fatalf("response lacks ports, sweep, margins or gain")
			}
			// Blackman's Z against the direct nodal solution at every point
			// (Blackman 1943; the engine's own cross-check, held here for
			// the examples the page offers).
			for i, ps := range r.Sweep.Ports {
				for k := range ps.Z {
					z, zd := ps.Z[k], ps.ZDirect[k]
					if z == nil || zd == nil {
						t.Fatalf("port %s at %g Hz: Z or Z direct is null", ps.Name, r.Sweep.Frequency[k])
					}
					if d := cmplx.Abs(z.Value()-zd.Value()) / cmplx.Abs(zd.Value()); d > 1e-9 {
						t.Errorf("port %s at %g Hz: Blackman and direct differ by %.3g", r.Ports[i].Name, r.Sweep.Frequency[k], d)
					}
				}
			}
			if r.Gain != nil && (r.Gain.Agreement == nil || *r.Gain.Agreement > 1e-9) {
				t.Errorf("gain: asymptotic gain model and direct solution disagree: %v", r.Gain.Agreement)
			}
			if len(r.Notes) != 0 {
				t.Errorf("an example should analyze without notes, got %q", r.Notes)
			}
		})
	}
	if _, ok := Lookup("nope"); ok {
		t.Error("Lookup found an example that does not exist")
	}
}

// The two-pole feedback network: T is Bode's return ratio of the opamp's
// gain source, a(s)·β(s), with β the voltage transfer of the RC ladder from
// the pin to the inverting input and the loading of ro on that ladder;
// the output impedance follows from Blackman's formula with T short = 0
// (the shorted output cuts the loop) and T open = T. Blackman 1943;
// Bode 1945; the ladder's transfer is plain circuit theory [derived].
func TestTwoPoleClosedForm(t *testing.T) {
	const (
		a0, gbw, rid, ro = 200e3, 20e6, 1e6, 40.0
		r2a, cm, r2b     = 4.5e3, 10e-12, 4.5e3
		r1, cin          = 1e3, 8e-12
	)
	for _, f := range freqs {
		zfb := 1 / (1/r1 + s(f)*cin + 1/rid) // Vin zeroed: rid goes to gnd
		zb := r2b + zfb
		ymid := s(f)*cm + 1/zb
		znet := r2a + 1/ymid
		beta := (znet / (ro + znet)) * ((1 / ymid) / znet) * (zfb / zb)
		T := opampGain(a0, gbw, 0, f) * beta
		z0 := par(ro, znet)
		r := at(t, twoPole.Text, "U1", []string{"out"}, nil, f)
		near(t, "T", r.ReturnRatio, T, r)
		p := port(t, r, "out")
		near(t, "out: Z₀", p.Z0, z0, r)
		near(t, "out: T open", p.TOpen, T, r)
		near(t, "out: Z", p.Z, z0/(1+T), r)
		if p.TShort == nil || p.TShort.Value() != 0 {
			t.Errorf("out: T short = %v, want exactly 0", p.TShort)
		}
	}
}

// The cable driver. With the cable straight on the pin (no Riso), ro and
// CL put a pole into the loop at 1/(2π·ro·CL) [memory, REFERENCES.md §4]:
// T/a(s) = 1/(1 + s·ro·CL), which is 1/√2 ∠ −45° at that frequency. With
// Riso between the pin and the cable, T/a(s) = (1 + s·Riso·CL)/(1 +
// s·(ro + Riso)·CL): the pole moves to 1/(2π(ro + Riso)CL) and a zero
// appears at 1/(2π·Riso·CL) [derived; the isolation resistor itself is
// common practice]. The example as given adds Rdaq across the cable, which
// the last form includes exactly.
func TestCableLoopPole(t *testing.T) {
	const (
		a0, gbw, ro     = 100e3, 10e6, 50.0
		riso, cl, rdaq  = 47.0, 200e-12, 1e6
		bareCable       = "capacitor Ccab pin gnd 200p"
		isolatedNoInput = ""
	)
	bare := edit(t, edit(t, edit(t, edit(t, cable.Text, "Riso", ""), "Ccab", bareCable), "Rdaq", ""), "load", "")
	fp := 1 / (2 * math.Pi * ro * cl)
	for _, f := range append([]float64{fp}, freqs[1:]...) {
		r := at(t, bare, "U1", nil, nil, f)
		near(t, "bare cable: T", r.ReturnRatio, opampGain(a0, gbw, 0, f)/(1+s(f)*ro*cl), r)
	}
	r := at(t, bare, "U1", nil, nil, fp)
	ratio := r.ReturnRatio.Value() / opampGain(a0, gbw, 0, fp)
	if math.Abs(cmplx.Abs(ratio)-1/math.Sqrt2) > 1e-9 || math.Abs(cmplx.Phase(ratio)*180/math.Pi+45) > 1e-7 {
		t.Errorf("at 1/(2π·ro·CL) = %.6g Hz, T/a = %v, want 1/√2 ∠ −45°", fp, ratio)
	}

	isolated := edit(t, cable.Text, "Rdaq", isolatedNoInput)
	for _, f := range freqs[1:] {
		r := at(t, isolated, "U1", nil, nil, f)
		want := opampGain(a0, gbw, 0, f) * (1 + s(f)*riso*cl) / (1 + s(f)*(ro+riso)*cl)
		near(t, "with Riso: T", r.ReturnRatio, want, r)
	}
	for _, f := range freqs {
		zl := riso + par(1/(s(f)*cl), rdaq)
		if f == 0 {
			zl = riso + rdaq
		}
		r := at(t, cable.Text, "U1", []string{"pin"}, nil, f)
		T := opampGain(a0, gbw, 0, f) * zl / (ro + zl)
		near(t, "as given: T", r.ReturnRatio, T, r)
		near(t, "as given: Z at pin", port(t, r, "pin").Z, par(ro, zl)/(1+T), r)
	}
}

// The degenerated MOS stage at DC (CL open). Without RL the drain sees
// Rout = rO + RS + gm·rO·RS, with Blackman's terms Z₀ = rO + RS,
// T short = gm·(RS ∥ rO), T open = 0 (B. Razavi, Design of Analog CMOS
// Integrated Circuits, 2nd ed., ch. 3 [memory]; REFERENCES.md §3). With RL
// the port is RL ∥ Rout, T open = gm·RS·rO/(rO + RS + RL), and the gain
// from the gate is −gm·rO·RL/(RL + Rout) [derived: the loaded stage by the
// same superposition on gm·vgs].
func TestDegeneratedClosedForm(t *testing.T) {
	const gm, rO, rs, rl = 2e-3, 50e3, 500.0, 200e3
	rout := complex(rO+rs+gm*rO*rs, 0)

	alone := edit(t, edit(t, degenerated.Text, "RL", ""), "CL", "")
	r := at(t, alone, "Gm1", []string{"out"}, nil, 0)
	p := port(t, r, "out")
	near(t, "alone: Z₀", p.Z0, rO+rs, r)
	near(t, "alone: T short", p.TShort, gm*par(rs, rO), r)
	near(t, "alone: Z = rO + RS + gm·rO·RS", p.Z, rout, r)
	near(t, "alone: Z direct", p.ZDirect, rout, r)
	near(t, "alone: T open", p.TOpen, 0, r)

	r = at(t, degenerated.Text, "Gm1", []string{"out"}, degenerated.Gain, 0)
	p = port(t, r, "out")
	near(t, "with RL: Z₀", p.Z0, par(rl, rO+rs), r)
	near(t, "with RL: T open", p.TOpen, complex(gm*rs*rO/(rO+rs+rl), 0), r)
	near(t, "with RL: Z", p.Z, par(rl, rout), r)
	near(t, "with RL: gain", r.Gain.G, -gm*rO*rl/(rl+rout), r)
}

// The two-stage loop. Bode's return ratio of each opamp, with the other
// one working (both ideal-output, ro absent), by hand [derived]:
//
//	T(U1) = a1·(1/R2 + G2/Rg)/Gs,                G2 = a2/(1 + a2·β2)
//	T(U2) = a2·β2 + a2·a1/(Rg·(Gs + a1/R2)),     β2 = R3/(R3 + R4)
//
// with Gs = 1/R1 + 1/R2 + 1/Rg. Blackman's formula holds for any choice of
// reference (Blackman 1943): the terms differ, Z does not.
func TestTwoStageReferences(t *testing.T) {
	const (
		r1, r2, r3, r4, rg = 10e3, 100e3, 1e3, 4e3, 20e3
		a0, gbw1, gbw2     = 100e3, 1e6, 10e6
	)
	gs := 1/r1 + 1/r2 + 1/rg
	b2 := r3 / (r3 + r4)
	for _, f := range freqs {
		a1, a2 := opampGain(a0, gbw1, 0, f), opampGain(a0, gbw2, 0, f)
		g2 := a2 / (1 + a2*complex(b2, 0))
		t1 := a1 * (complex(1/r2, 0) + g2/complex(rg, 0)) / complex(gs, 0)
		t2 := a2*complex(b2, 0) + a2*a1/(complex(rg, 0)*(complex(gs, 0)+a1/complex(r2, 0)))
		ru1 := at(t, twoStage.Text, "U1", twoStage.Ports, nil, f)
		ru2 := at(t, twoStage.Text, "U2", twoStage.Ports, nil, f)
		near(t, "T(U1)", ru1.ReturnRatio, t1, ru1)
		near(t, "T(U2)", ru2.ReturnRatio, t2, ru2)
		for _, name := range twoStage.Ports {
			p1, p2 := port(t, ru1, name), port(t, ru2, name)
			near(t, name+": Z with U2 against Z with U1", p2.Z, p1.Z.Value(), ru2)
			near(t, name+": Z direct", p1.ZDirect, p1.Z.Value(), ru1)
			// Above a few megahertz U1 has no gain left and both
			// references see the same passive network; below, they differ.
			if f > 0 && f < 1e7 && cmplx.Abs(p1.Z0.Value()-p2.Z0.Value()) < 1e-3*cmplx.Abs(p1.Z0.Value()) {
				t.Errorf("%s at %g Hz: Z₀ is the same for both references (%v); the example should show them differ", name, f, p1.Z0.Value())
			}
		}
	}
}

// The current-feedback-style stage. The return ratio of the ccvs Ht, by
// hand [derived]: Ht's output through the two-section RC ladder (transfer
// 1/(1 + s(RtCt + Rt2Ct2 + RtCt2) + s²RtCtRt2Ct2)), the output buffer, Ro
// into RL ∥ (Rf + Rg ∥ Rn), the divider Rf against Rg ∥ Rn, and the current
// −V(inv)/Rn it senses:
//
//	T = (r/Rn)·H(s)·ZL/(Ro + ZL)·(Rg∥Rn)/(Rf + Rg∥Rn)
//
// With Ro and RL gone this is the current-feedback amplifier's loop gain
// Z(s)/(Rf + Rn(1 + Rf/Rg)) (S. Franco, Design with Operational Amplifiers
// and Analog Integrated Circuits, 3rd ed., ch. 6 [memory]), and the ideal
// gain is g∞ = 1 + Rf/Rg whatever Z is (ibid. [memory]).
func TestCurrentFeedbackClosedForm(t *testing.T) {
	const (
		rn, rf, rg, r      = 50.0, 1e3, 1e3, 1e6
		rt, ct, rt2, ct2   = 1e3, 2e-9, 100.0, 5e-12
		ro, rl             = 10.0, 150.0
		direct, lineNoLoad = "vcvs Eo out gnd sense=z2,gnd gain=1", ""
	)
	h := func(f float64) complex128 {
		x := s(f)
		return 1 / (1 + x*complex(rt*ct+rt2*ct2+rt*ct2, 0) + x*x*complex(rt*ct*rt2*ct2, 0))
	}
	rgn := complex(rg*rn/(rg+rn), 0)
	for _, f := range freqs {
		zl := par(rl, rf+rgn)
		T := complex(r/rn, 0) * h(f) * zl / (ro + zl) * rgn / (rf + rgn)
		res := at(t, currentFeedback.Text, "Ht", []string{"out"}, currentFeedback.Gain, f)
		near(t, "T", res.ReturnRatio, T, res)
		near(t, "g∞", res.Gain.GInf, 1+rf/rg, res)
	}
	bare := edit(t, edit(t, edit(t, currentFeedback.Text, "Ro", ""), "RL", lineNoLoad), "Eo", direct)
	for _, f := range freqs {
		res := at(t, bare, "Ht", nil, nil, f)
		near(t, "without Ro and RL: T = Z/(Rf + Rn(1 + Rf/Rg))", res.ReturnRatio, complex(r, 0)*h(f)/complex(rf+rn*(1+rf/rg), 0), res)
	}
}

// The common-emitter example at DC (CL open), against the degenerated
// transistor's output resistance with base resistance (P. R. Gray, P. J.
// Hurst, S. H. Lewis, R. G. Meyer, 5th ed., ch. 3 [memory]; derived here by
// KCL at the emitter): with Re′ = RE ∥ (rπ + Rs + rb),
//
//	R_Q = Re′ + ro·[1 + gm·Re′·rπ/(rπ + Rs + rb)],
//
// the collector port shows RC ∥ R_Q; gm = IC/VT with VT = kT/q from the
// exact SI constants (BIPM SI Brochure, 9th ed., 2019), rπ = β0/gm,
// ro = VA/IC (the hybrid-π model, GHLM ch. 1 [memory]). The input port
// (Rs included) at DC is Rs + rb + rπ + (1 + β0)·RE when ro is removed
// (delete va=) [same references].
func TestCommonEmitterClosedForm(t *testing.T) {
	const ic, beta, va, rs, rb, re, rc = 1e-3, 150.0, 80.0, 1e3, 100.0, 220.0, 4.7e3
	gm := ic / (1.380649e-23 * 300 / 1.602176634e-19)
	rpi, ro := beta/gm, va/ic
	rep := 1 / (1/re + 1/(rpi+rs+rb))
	rq := rep + ro*(1+gm*rep*rpi/(rpi+rs+rb))
	r := at(t, commonEmitter.Text, "Q1", []string{"out"}, nil, 0)
	near(t, "out at DC", port(t, r, "out").Z, complex(rc*rq/(rc+rq), 0), r)
	if math.Abs(r.Devices[0].Gm-gm) > 1e-15*gm {
		t.Errorf("gm %v, want %v", r.Devices[0].Gm, gm)
	}

	noEarly := strings.Replace(commonEmitter.Text, " va=80", "", 1)
	r = at(t, noEarly, "Q1", []string{"in"}, nil, 0)
	near(t, "in at DC without ro", port(t, r, "in").Z, complex(rs+rb+rpi+(1+beta)*re, 0), r)
}

// Request carries everything the example names.
// The photodiode front end's noise at low frequency, far below the loop's
// crossover, where the opamp is ideal to 1e-6: Rf's thermal noise 4kT·Rf,
// the light's shot noise 2qI and the opamp's iₙ through Rf, and eₙ(f)
// through the noise gain 1 + Zf/Zi, Zi = 1/(sCd), Zf = Rf ∥ 1/(sCf)
// [derived from the node equations; Johnson 1928, Nyquist 1928, Schottky
// 1918 for the sources]; 1/f as en²(1 + fce/f) (common practice).
func TestPhotodiodeNoise(t *testing.T) {
	const (
		kT, q           = 1.380649e-23 * 300, 1.602176634e-19
		rf, cf, cd, ish = 100e3, 2e-12, 50e-12, 2e-6
		en, fce, in     = 6e-9, 200.0, 2e-15
	)
	req := photodiodeNoise.Request()
	api.Noise.Ask(&req, &api.NoiseRequest{})
	r, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	n := api.Noise.Result(r)
	for i, f := range n.Frequency {
		if f > 100 {
			break
		}
		zf := 1 / (1/complex(rf, 0) + s(f)*cf)
		ng := 1 + zf*s(f)*cd
		az := cmplx.Abs(zf)
		want := math.Sqrt((4*kT/rf+2*q*ish+in*in)*az*az + en*en*(1+fce/f)*sq(cmplx.Abs(ng)))
		if d := math.Abs(*n.Output[i]/want - 1); d > 1e-5 {
			t.Errorf("at %.4g Hz: output density %.6g V/√Hz, want %.6g (%.2g)", f, *n.Output[i], want, d)
		}
		if d := math.Abs(*n.Input[i]*az/want - 1); d > 1e-5 {
			t.Errorf("at %.4g Hz: input density %.6g A/√Hz, want %.6g", f, *n.Input[i], want/az)
		}
	}
	names := map[string]bool{}
	for _, c := range n.Contributors {
		names[c.Name] = true
	}
	if !names["Ish"] || !names["Rf"] || !names["U1.en"] || names["RL"] || n.InputUnit != "A/√Hz" {
		t.Errorf("contributors %v, input unit %s", names, n.InputUnit)
	}
}

func sq(x float64) float64 { return x * x }

func TestRequest(t *testing.T) {
	req := twoStage.Request()
	if req.Circuit != twoStage.Text || req.Reference != "U1" || len(req.Ports) != 2 || req.Gain == nil ||
		req.Frequency != 10e3 || req.Sweep == nil || *req.Sweep != (api.SweepSpec{From: 10, To: 100e6, Points: 400}) {
		t.Errorf("Request() = %+v", req)
	}
	req.Ports[0] = "changed"
	req.Gain.Source = "changed"
	if twoStage.Ports[0] != "in" || twoStage.Gain.Source != "Vin" {
		t.Error("Request() shares its slices with the example")
	}
}
