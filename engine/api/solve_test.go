package api_test

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"zport/engine/api"
)

// solveFor analyzes req with the solve key s and returns the answer.
func solveFor(t *testing.T, req api.Request, s api.SolveRequest) *api.SolveResult {
	t.Helper()
	api.Solve.Ask(&req, &s)
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatalf("%v", err)
	}
	r := api.Solve.Result(resp)
	if r == nil {
		t.Fatal("no solve in the response")
	}
	return r
}

func num(x float64) *float64 { return &x }

// bisect finds, to full precision, where f rises or falls through 0
// between lo and hi on a log scale: the tests' own root finder, so that
// the engine's Brent is checked against something else.
func bisect(lo, hi float64, f func(x float64) float64) float64 {
	flo := f(lo)
	for range 300 {
		m := math.Sqrt(lo * hi)
		if m == lo || m == hi {
			break
		}
		if (f(m) > 0) == (flo > 0) {
			lo = m
		} else {
			hi = m
		}
	}
	return math.Sqrt(lo * hi)
}

// tiaPM is the phase margin of the photodiode transimpedance loop in
// closed form: T = a·(1 + s·Rf·Cf)/(1 + s·Rf·(Cd + Cf)) with
// a = a0/(1 + s·a0/ωt), the two-pole loop of REFERENCES.md §4/§5 (Franco
// 3rd ed. ch. 8 [found]) with the op amp's own pole kept. |T| = 1 is a
// quadratic in ω², and PM = 180° − atan(ω/ωp) + atan(ωτ1) − atan(ωτ2).
func tiaPM(rf, cd, a0, gbw, cf float64) float64 {
	wt := 2 * math.Pi * gbw
	wp := wt / a0
	t1, t2 := rf*cf, rf*(cd+cf)
	A := t2 * t2 / (wp * wp)
	B := 1/(wp*wp) + t2*t2 - a0*a0*t1*t1
	C := 1 - a0*a0
	x := (-B + math.Sqrt(B*B-4*A*C)) / (2 * A)
	w := math.Sqrt(x)
	deg := 180 / math.Pi
	return 180 - math.Atan(w/wp)*deg + math.Atan(w*t1)*deg - math.Atan(w*t2)*deg
}

func tiaText(rf, cd, a0, gbw string) api.Request {
	return api.Request{
		Circuit: "# photodiode transimpedance stage, values our own\n" +
			"isource   Iin gnd sum 1\n" +
			"capacitor Cd  sum gnd " + cd + "\n" +
			"resistor  Rf  out sum " + rf + "\n" +
			"capacitor Cf  out sum 1p\n" +
			"opamp     U1  gnd sum out a0=" + a0 + " gbw=" + gbw + "\n",
		Reference: "U1", Frequency: 1000, Gain: &api.GainSpec{Source: "Iin", Output: "out"},
	}
}

// The feedback capacitor of a transimpedance stage for a 45° and a 60°
// phase margin, against the closed form of its two-pole loop.
func TestSolveTransimpedanceCf(t *testing.T) {
	for _, c := range []struct {
		name            string
		rf, cd, a0, gbw float64
		text            [4]string
		want            map[float64]float64 // REFERENCES.md's check values, to their 6 digits
	}{
		// REFERENCES.md §9 [derived]: Cd = 20 pF, Rf = 100 kΩ, a0 = 1e5,
		// gbw = 10 MHz.
		{"§9", 100e3, 20e-12, 1e5, 10e6, [4]string{"100k", "20p", "1e5", "10M"}, map[float64]float64{45: 1.38326e-12, 60: 2.10088e-12}},
		// REFERENCES.md §5: Rf = 1 MΩ, Ci = 20 pF, gbw = 10 MHz, a0 = 1e9
		// standing in for a = ωt/s.
		{"§5", 1e6, 20e-12, 1e9, 10e6, [4]string{"1M", "20p", "1e9", "10M"}, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			for _, pm := range []float64{45, 60} {
				r := solveFor(t, tiaText(c.text[0], c.text[1], c.text[2], c.text[3]),
					api.SolveRequest{Part: "Cf", Target: api.SolveTarget{Quantity: "pm", Value: num(pm)}})
				want := bisect(1e-15, 1e-9, func(cf float64) float64 { return tiaPM(c.rf, c.cd, c.a0, c.gbw, cf) - pm })
				if len(r.Solutions) != 1 {
					t.Fatalf("PM %g°: solutions %+v, want one (notes %q)", pm, r.Solutions, r.Notes)
				}
				within(t, fmt.Sprintf("Cf for %g°", pm), r.Solutions[0].Value, want, 1e-9)
				if w, ok := c.want[pm]; ok {
					within(t, fmt.Sprintf("Cf for %g° (REFERENCES.md §9)", pm), r.Solutions[0].Value, w, 5e-6)
				}
				if a := r.Solutions[0].Achieved; a == nil || math.Abs(*a-pm) > 1e-8 {
					t.Errorf("achieved %v, want %g°", a, pm)
				}
				// Each standard value's margin, from the closed form.
				if len(r.Standard) != 1 || r.Series != "E12" {
					t.Fatalf("standard %+v in %q, want one pair of E12 values", r.Standard, r.Series)
				}
				for _, sv := range []api.SolvePoint{r.Standard[0].Below, r.Standard[0].Above} {
					within(t, fmt.Sprintf("PM with Cf = %g", sv.Value), *sv.Achieved, tiaPM(c.rf, c.cd, c.a0, c.gbw, sv.Value), 1e-9)
				}
			}
		})
	}
}

// extra returns the design value called name of a catalog stage's answer.
func extra(t *testing.T, resp *api.Response, name string) float64 {
	t.Helper()
	for _, x := range resp.Topology.Extras {
		if x.Name == name {
			if x.Value == nil {
				t.Fatalf("%s has no value: %s", name, x.Note)
			}
			return *x.Value
		}
	}
	t.Fatalf("no design value %q", name)
	return 0
}

// The transimpedance page's "Cf for 45°" and "Cf for 60°", on the stage
// reduced to the two-pole loop (REFERENCES.md §5's check: Rf = 1 MΩ,
// Cd = 20 pF, gbw = 10 MHz, a0 = 10⁹; ro = 1 mΩ, whose effect on T is
// below 10⁻⁹, because the stage needs one), against the closed form.
func TestTransimpedanceDesignValuesFromTheSolver(t *testing.T) {
	params := map[string]string{"Rsh": "", "Cd": "20p", "Cin": "", "Rf": "1M", "Cf": "", "a0": "1G", "gbw": "10M", "p2": "",
		"rid": "", "rcm": "", "ro": "1m", "RL": "", "CL": ""}
	resp, err := api.Analyze(api.Request{Topology: "transimpedance", Params: params, Frequency: 1e3})
	if err != nil {
		t.Fatal(err)
	}
	for _, pm := range []float64{45, 60} {
		want := bisect(1e-15, 1e-9, func(cf float64) float64 { return tiaPM(1e6, 20e-12, 1e9, 10e6, cf) - pm })
		within(t, fmt.Sprintf("design value Cf for %g°", pm), extra(t, resp, fmt.Sprintf("Cf for %g°", pm)), want, 1e-8)
	}
}

// The standard values beside a solution are the IEC 60063 values on
// either side of it (REFERENCES.md §6: E24 1.2 1.3 1.5 …; E96 137 140 …;
// E192 137 138 140 …; E12 every second E24 value, E6 every fourth), here
// around Cf = 1.383 pF.
func TestSolveStandardNeighbours(t *testing.T) {
	for series, want := range map[string][2]float64{
		"E6": {1.0e-12, 1.5e-12}, "E12": {1.2e-12, 1.5e-12}, "E24": {1.3e-12, 1.5e-12},
		"E48": {1.33e-12, 1.40e-12}, "E96": {1.37e-12, 1.40e-12}, "E192": {1.38e-12, 1.40e-12}} {
		r := solveFor(t, tiaText("100k", "20p", "1e5", "10M"),
			api.SolveRequest{Part: "Cf", Target: api.SolveTarget{Quantity: "pm", Value: num(45)}, Series: series})
		if len(r.Standard) != 1 || r.Standard[0].Below.Value != want[0] || r.Standard[0].Above.Value != want[1] || r.Series != series {
			t.Errorf("%s: %+v, want %g and %g", series, r.Standard, want[0], want[1])
		}
	}
}

// capLoop is the capacitive-load follower's loop with the feedback taken
// at the pin [derived here]: the pin sees ro against Riso + 1/(sCL), so
// T = a(s)·(1 + s·Riso·CL)/(1 + s·(ro + Riso)·CL) with
// a = a0/((1 + s·a0/ωt)(1 + s/ω2)) and ideal inputs (the Rf to the −
// input carries no current). Its phase margin: |T| falls monotonically
// through 1 (found by bisection), PM = 180° + ∠T there.
func capLoopPM(a0, gbw, p2, ro, cl, riso float64) float64 {
	w1, w2 := 2*math.Pi*gbw/a0, 2*math.Pi*p2
	T := func(w float64) complex128 {
		s := complex(0, w)
		return complex(a0, 0) / ((1 + s/complex(w1, 0)) * (1 + s/complex(w2, 0))) *
			(1 + s*complex(riso*cl, 0)) / (1 + s*complex((ro+riso)*cl, 0))
	}
	w := bisect(1, 1e12, func(w float64) float64 { return cmplx.Abs(T(w)) - 1 })
	return 180 + (-math.Atan(w/w1)-math.Atan(w/w2)+math.Atan(w*riso*cl)-math.Atan(w*(ro+riso)*cl))*180/math.Pi
}

// Riso for a target margin on the capacitive-load stage, against the loop
// derived above; the margin rises with Riso to about 83° and falls back
// toward 80.7°, so 82° is met twice.
func TestSolveCaploadRiso(t *testing.T) {
	params := map[string]string{"Rs": "", "R1": "", "Cf": "", "Riso": "50", "rid": "", "rcm": "", "RL": "", "CL": "10n",
		"a0": "200k", "gbw": "5M", "p2": "30M", "ro": "50"}
	pm := func(riso float64) float64 { return capLoopPM(2e5, 5e6, 30e6, 50, 10e-9, riso) }
	// A check of the derivation itself: the engine's margin with the
	// stage's Riso = 50 Ω.
	resp, err := api.Analyze(api.Request{Topology: "capload", Params: params, Frequency: 1e3, Sweep: &api.SweepSpec{From: 10, To: 1e9, Points: 800}})
	if err != nil {
		t.Fatal(err)
	}
	within(t, "the engine's PM with Riso = 50 Ω against the derived loop", *resp.Margins.PhaseMargin, pm(50), 1e-9)
	for _, c := range []struct {
		target float64
		want   []float64
	}{
		{45, []float64{bisect(1, 30, func(r float64) float64 { return pm(r) - 45 })}},
		{60, []float64{bisect(1, 30, func(r float64) float64 { return pm(r) - 60 })}},
		{82, []float64{bisect(30, 100, func(r float64) float64 { return pm(r) - 82 }), bisect(100, 1e4, func(r float64) float64 { return pm(r) - 82 })}},
	} {
		r := solveFor(t, api.Request{Topology: "capload", Params: params, Frequency: 1e3},
			api.SolveRequest{Part: "Riso", Target: api.SolveTarget{Quantity: "pm", Value: num(c.target)}})
		if len(r.Solutions) != len(c.want) {
			t.Fatalf("%g°: %d solutions %+v, want %v (notes %q)", c.target, len(r.Solutions), r.Solutions, c.want, r.Notes)
		}
		for i, w := range c.want {
			within(t, fmt.Sprintf("Riso for %g° (#%d)", c.target, i+1), r.Solutions[i].Value, w, 1e-9)
		}
		if r.Range.From != 1e-3 || r.Range.To != 1e6 || r.Unit != "Ω" {
			t.Errorf("range %+v %s, want the stage's allowed 1 mΩ … 1 MΩ", r.Range, r.Unit)
		}
		// The page's own "Riso for 45°" and "Riso for 60°".
		if c.target != 82 {
			within(t, fmt.Sprintf("design value Riso for %g°", c.target), extra(t, resp, fmt.Sprintf("Riso for %g°", c.target)), c.want[0], 1e-9)
		}
	}
}

// The R2 that gives a non-inverting stage a wanted |Zo| at a frequency.
// Franco's exact output resistance with rd = ∞ (REFERENCES.md §3),
// Zo = ro/{1 + (a + ro/R1)/(1 + R2/R1)} = ro·S/(S + ro + a·R1) with
// S = R1 + R2 — ro/(1 + aβ) (Franco ch. 6) with the feedback network's
// loading kept — makes |Zo| = X a quadratic in S [derived]:
// (1 − ro²/X²)S² + 2·Re K·S + |K|² = 0, K = ro + a·R1.
func TestSolveOutputImpedanceR2(t *testing.T) {
	req := api.Request{
		Circuit:   "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=100\nresistor R1 fb gnd 2k\nresistor R2 out fb 18k\nport out out gnd\n",
		Reference: "U1", Ports: []string{"out"},
	}
	closed := func(f, x float64) float64 {
		a := complex(1e5, 0) / (1 + complex(0, f*1e5/1e6))
		k := 100 + a*2000
		A := 1 - 100*100/(x*x)
		kr, k2 := real(k), real(k)*real(k)+imag(k)*imag(k)
		s := (kr + math.Sqrt(kr*kr-A*k2)) / -A
		return s - 2000
	}
	for _, c := range []struct{ f, x float64 }{{1e3, 0.5}, {1e5, 20}, {1e5, 70.530597}} {
		req.Frequency = c.f
		r := solveFor(t, req, api.SolveRequest{Part: "R2", Target: api.SolveTarget{Quantity: "z", Port: "out", Value: num(c.x)}})
		if len(r.Solutions) != 1 {
			t.Fatalf("|Zo| = %g Ω at %g Hz: solutions %+v (notes %q)", c.x, c.f, r.Solutions, r.Notes)
		}
		within(t, fmt.Sprintf("R2 for |Zo| = %g Ω at %g Hz", c.x, c.f), r.Solutions[0].Value, closed(c.f, c.x), 1e-9)
	}
	// REFERENCES.md §3 [derived]: R2 = 18 kΩ gives |Zo| = 0.99989902 Ω at
	// 1 kHz and 70.530597 Ω at 100 kHz; solving back gives 18 kΩ to the
	// digits of those check values.
	for _, c := range []struct{ f, x, tol float64 }{{1e3, 0.99989902, 1e-7}, {1e5, 70.530597, 1e-6}} {
		req.Frequency = c.f
		r := solveFor(t, req, api.SolveRequest{Part: "R2", Target: api.SolveTarget{Quantity: "z", Port: "out", Value: num(c.x)}})
		if len(r.Solutions) != 1 {
			t.Fatalf("solutions %+v", r.Solutions)
		}
		within(t, fmt.Sprintf("R2 from |Zo| = %g Ω at %g Hz (REFERENCES.md §3)", c.x, c.f), r.Solutions[0].Value, 18e3, c.tol)
	}
}

// A target crossed twice: a Howland pump's |Z| peaks at balance (R4/R3 =
// R2/R1), in a peak about 10⁻⁴ wide in R4, far narrower than the grid.
// Blackman form (REFERENCES.md §3 [derived]):
// Ro = (R1∥R2)(1 + a·βN)/(1 + a(βN − βP)), βN = R3/(R3 + R4),
// βP = R1/(R1 + R2); |Ro| = X on either side of balance is linear in βN:
// βN = (±X(1 − a·βP) − Rp)/(a(Rp ∓ X)).
func TestSolveHowlandTwice(t *testing.T) {
	req := api.Request{
		Circuit: "vsource Vin in gnd 1\nresistor R1 in p 15k\nresistor R2 p vo 4.5k\nresistor R3 n gnd 15k\nresistor R4 n vo 4.5k\n" +
			"opamp U1 p n vo a0=100k\nport out p gnd\n",
		Reference: "U1", Ports: []string{"out"}, Frequency: 0,
	}
	const a, r1, r2, r3, x = 1e5, 15e3, 4.5e3, 15e3, 100e6
	rp, bp := r1*r2/(r1+r2), r1/(r1+r2)
	var want []float64
	for _, s := range []float64{1, -1} {
		bn := (s*x*(1-a*bp) - rp) / (a * (rp - s*x))
		want = append(want, r3*(1/bn-1))
	}
	if want[0] > want[1] {
		want[0], want[1] = want[1], want[0]
	}
	r := solveFor(t, req, api.SolveRequest{Part: "R4", Target: api.SolveTarget{Quantity: "z", Port: "out", Value: num(x)}})
	if len(r.Solutions) != 2 {
		t.Fatalf("solutions %+v, want two (%v); notes %q", r.Solutions, want, r.Notes)
	}
	for i := range want {
		within(t, fmt.Sprintf("R4 #%d for |Z| = 100 MΩ", i+1), r.Solutions[i].Value, want[i], 1e-9)
	}
	if !strings.Contains(strings.Join(r.Notes, " "), "not monotonic") {
		t.Errorf("notes %q: want one saying the quantity is not monotonic", r.Notes)
	}
}

// An unreachable target: the transimpedance loop's margin never exceeds
// about 90°, so 95° gives the best achievable, where, and a note.
func TestSolveUnreachable(t *testing.T) {
	r := solveFor(t, tiaText("100k", "20p", "1e5", "10M"), api.SolveRequest{Part: "Cf", Target: api.SolveTarget{Quantity: "pm", Value: num(95)}})
	if len(r.Solutions) != 0 || r.Best == nil || r.Best.Achieved == nil {
		t.Fatalf("solutions %+v, best %+v", r.Solutions, r.Best)
	}
	// The margin rises with Cf over the whole default range, so the best
	// is at its top end, 1000 × 1 pF, and is what the closed form gives
	// there.
	if r.Best.Value != 1e-9 {
		t.Errorf("best at Cf = %g, want the range's end 1 nF", r.Best.Value)
	}
	within(t, "best margin", *r.Best.Achieved, tiaPM(100e3, 20e-12, 1e5, 10e6, 1e-9), 1e-9)
	if len(r.Notes) == 0 || !strings.Contains(r.Notes[0], "No value of Cf") {
		t.Errorf("notes %q", r.Notes)
	}
}

// Closed-loop response targets on the two-pole unity follower, whose
// closed loop a/(1 + a) is exactly second order (REFERENCES.md §8
// [derived]): ωn² = (1 + a0)ω1ω2, 2ζωn = ω1 + ω2. For a wanted ζ the
// second pole solves (ω1 + ω2)² = 4ζ²(1 + a0)ω1ω2; overshoot
// exp(−πζ/√(1 − ζ²)), peaking 1/(2ζ√(1 − ζ²)) and the bandwidth
// ωn√(1 − 2ζ² + √(4ζ⁴ − 4ζ² + 2)) (Ogata [memory]) name ζ.
func TestSolveResponseTargets(t *testing.T) {
	req := api.Request{Circuit: "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M p2=3M\n", Reference: "U1",
		Frequency: 0, Gain: &api.GainSpec{Source: "Vin", Output: "out"}}
	const a0, w1 = 1e5, 2 * math.Pi * 10
	// p2 (Hz) for damping ζ: the larger root of ω2² + (2 − 4ζ²(1 + a0))ω1ω2 + ω1² = 0.
	p2For := func(z float64) float64 {
		b := (2 - 4*z*z*(1+a0)) * w1
		return (-b + math.Sqrt(b*b-4*w1*w1)) / 2 / (2 * math.Pi)
	}
	bw := func(p2 float64) float64 {
		w2 := 2 * math.Pi * p2
		wn := math.Sqrt((1 + a0) * w1 * w2)
		z := (w1 + w2) / (2 * wn)
		return wn * math.Sqrt(1-2*z*z+math.Sqrt(4*z*z*z*z-4*z*z+2)) / (2 * math.Pi)
	}
	zOvershoot := func(pc float64) float64 { l := math.Log(pc / 100); return -l / math.Sqrt(math.Pi*math.Pi+l*l) }
	zPeaking := func(db float64) float64 {
		m := math.Pow(10, db/20) // 1/(2ζ√(1−ζ²)) = m: ζ² = (1 − √(1 − 1/m²))/2
		return math.Sqrt((1 - math.Sqrt(1-1/(m*m))) / 2)
	}
	// The bandwidth peaks (at √2 × gbw, near p2 = 2 MHz) and is met twice.
	bwAt := func(x float64) float64 { return bw(x) - 1.2e6 }
	for _, c := range []struct {
		q    string
		x    float64
		want []float64
	}{
		{"overshoot", 10, []float64{p2For(zOvershoot(10))}},
		{"peaking", 1, []float64{p2For(zPeaking(1))}},
		{"bandwidth", 1.2e6, []float64{bisect(1e5, 2e6, bwAt), bisect(2e6, 1e8, bwAt)}},
	} {
		r := solveFor(t, req, api.SolveRequest{Part: "U1.p2", Target: api.SolveTarget{Quantity: c.q, Value: num(c.x)}})
		if len(r.Solutions) != len(c.want) {
			t.Fatalf("%s %g: solutions %+v, want %v (notes %q)", c.q, c.x, r.Solutions, c.want, r.Notes)
		}
		for i, w := range c.want {
			within(t, fmt.Sprintf("p2 for %s %g (#%d)", c.q, c.x, i+1), r.Solutions[i].Value, w, 1e-8)
		}
		if r.Series != "" || r.Standard != nil {
			t.Errorf("an op amp's p2 got standard values: %q %+v", r.Series, r.Standard)
		}
	}
}

// Bad input names the field at fault.
func TestSolveErrors(t *testing.T) {
	tia := tiaText("100k", "20p", "1e5", "10M")
	noGain := tia
	noGain.Gain = nil
	for _, c := range []struct {
		name  string
		req   api.Request
		solve string
		param string
		has   string
	}{
		{"unknown part", tia, `{"part": "R7", "target": {"quantity": "pm", "value": 45}}`, "solve.part", "no part called R7"},
		{"independent source", tia, `{"part": "Iin", "target": {"quantity": "pm", "value": 45}}`, "solve.part", "independent source"},
		{"op amp without a number", tia, `{"part": "U1", "target": {"quantity": "pm", "value": 45}}`, "solve.part", "U1.gbw"},
		{"op amp number absent", tia, `{"part": "U1.p2", "target": {"quantity": "pm", "value": 45}}`, "solve.part", "no p2"},
		{"no part", tia, `{"target": {"quantity": "pm", "value": 45}}`, "solve.part", "name the part"},
		{"port needed", tia, `{"part": "Cf", "target": {"quantity": "z", "value": 45}}`, "solve.target.port", "name the port"},
		{"unknown port", tia, `{"part": "Cf", "target": {"quantity": "z", "value": 45, "port": "x"}}`, "solve.target.port", "not a port"},
		{"port not wanted", tia, `{"part": "Cf", "target": {"quantity": "pm", "value": 45, "port": "out"}}`, "solve.target.port", "takes no port"},
		{"empty range", tia, `{"part": "Cf", "target": {"quantity": "pm", "value": 45}, "range": {"from": 1e-12, "to": 1e-13}}`, "solve.range", "empty range"},
		{"range through 0", tia, `{"part": "Cf", "target": {"quantity": "pm", "value": 45}, "range": {"from": -1e-12, "to": 1e-12}}`, "solve.range", "0"},
		{"phase margin of 400°", tia, `{"part": "Cf", "target": {"quantity": "pm", "value": 400}}`, "solve.target.value", "from −180° to 360°"},
		{"negative bandwidth", tia, `{"part": "Cf", "target": {"quantity": "bandwidth", "value": -1}}`, "solve.target.value", "above 0"},
		{"no value", tia, `{"part": "Cf", "target": {"quantity": "pm"}}`, "solve.target.value", "give the value"},
		{"unknown quantity", tia, `{"part": "Cf", "target": {"quantity": "noise", "value": 1}}`, "solve.target.quantity", "not a quantity"},
		{"gain needed", noGain, `{"part": "Cf", "target": {"quantity": "overshoot", "value": 10}}`, "solve.target.quantity", "no \"gain\""},
		{"unknown series", tia, `{"part": "Cf", "target": {"quantity": "pm", "value": 45}, "series": "E7"}`, "solve.series", "E12"},
		{"stage parameter", api.Request{Topology: "transimpedance", Frequency: 1e3}, `{"part": "Cx", "target": {"quantity": "pm", "value": 45}}`, "solve.part", "no parameter called Cx"},
		{"outside a stage's range", api.Request{Topology: "transimpedance", Frequency: 1e3}, `{"part": "Cf", "target": {"quantity": "pm", "value": 45}, "range": {"to": 1}}`, "solve.range.to", "largest allowed"},
		{"unknown field", tia, `{"part": "Cf", "goal": 1}`, "solve", "unknown field"},
	} {
		t.Run(c.name, func(t *testing.T) {
			base, _ := json.Marshal(c.req)
			in := strings.TrimSuffix(string(base), "}") + `,"solve":` + c.solve + "}"
			var req api.Request
			err := json.Unmarshal([]byte(in), &req)
			if err == nil {
				_, err = api.Analyze(req)
			}
			var p *api.Problem
			if !errors.As(err, &p) || p.Param != c.param || !strings.Contains(p.Msg, c.has) {
				t.Errorf("got %v, want an error naming %s that says %q", err, c.param, c.has)
			}
		})
	}
}

// The contract's shape, through the JSON the analyze command writes.
func TestSolveContract(t *testing.T) {
	out, ok := api.AnalyzeJSON([]byte(`{"topology": "transimpedance", "frequency": 1000,
		"solve": {"part": "Cf", "target": {"quantity": "pm", "value": 60}, "series": "E24"}}`))
	if !ok {
		t.Fatalf("%s", out)
	}
	var raw struct {
		Solve map[string]json.RawMessage `json:"solve"`
	}
	if err := json.Unmarshal(out, &raw); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"part", "unit", "quantity", "title", "quantityUnit", "target", "range", "series", "nominal", "solutions", "standard", "curve", "evaluations", "notes"} {
		if _, ok := raw.Solve[k]; !ok {
			t.Errorf("solve lacks %q", k)
		}
	}
	var curve api.SolveCurve
	json.Unmarshal(raw.Solve["curve"], &curve)
	if len(curve.Values) < 25 || len(curve.Values) != len(curve.Quantities) {
		t.Errorf("curve of %d values and %d quantities", len(curve.Values), len(curve.Quantities))
	}
	var std []map[string]map[string]float64
	json.Unmarshal(raw.Solve["standard"], &std)
	if len(std) != 1 || std[0]["below"]["value"] == 0 || std[0]["above"]["achieved"] == 0 {
		t.Errorf("standard %v", std)
	}
}
