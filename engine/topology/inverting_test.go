package topology_test

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

// Helpers shared by the op-amp stages' tests (inverting, noninverting,
// follower, transimpedance, capload): prefix opm.

// opmWant checks got against a published value written with its printed
// digits; the tolerance is the rounding of the last printed digit.
func opmWant(t *testing.T, what string, got float64, want, source string) {
	t.Helper()
	w, err := strconv.ParseFloat(want, 64)
	if err != nil {
		t.Fatalf("bad check value %q", want)
	}
	tol := opmLastDigit(want) * 0.5000001
	if math.IsNaN(got) || math.Abs(got-w) > tol {
		t.Errorf("%s = %.12g, want %s ± %.2g (%s)", what, got, want, tol, source)
	}
}

// opmLastDigit is the place value of the last printed digit of s.
func opmLastDigit(s string) float64 {
	mant, exp := s, 0
	if i := strings.IndexAny(s, "eE"); i >= 0 {
		mant = s[:i]
		exp, _ = strconv.Atoi(s[i+1:])
	}
	dec := 0
	if i := strings.IndexByte(mant, '.'); i >= 0 {
		dec = len(mant) - i - 1
	}
	return math.Pow10(exp - dec)
}

// opmForms evaluates a stage's closed forms with params over its defaults.
func opmForms(t *testing.T, id string, params map[string]string, f float64) topology.Forms {
	t.Helper()
	st, ok := topology.Lookup(id)
	if !ok {
		t.Fatalf("no stage %q", id)
	}
	v, err := st.Values(params)
	if err != nil {
		t.Fatal(err)
	}
	return st.Forms(v, f)
}

func opmPort(t *testing.T, fs topology.Forms, name string) topology.PortForms {
	t.Helper()
	for _, p := range fs.Ports {
		if p.Name == name {
			return p
		}
	}
	t.Fatalf("no closed forms for port %q", name)
	return topology.PortForms{}
}

func opmEngine(t *testing.T, id string, params map[string]string, f float64) *api.Response {
	t.Helper()
	r, err := api.Analyze(api.Request{Topology: id, Params: params, Frequency: f})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func opmEnginePort(t *testing.T, r *api.Response, name string) api.PortResult {
	t.Helper()
	for _, p := range r.Ports {
		if p.Name == name {
			return p
		}
	}
	t.Fatalf("engine reported no port %q", name)
	return api.PortResult{}
}

// opmExtra returns the named extra's value.
func opmExtra(t *testing.T, fs topology.Forms, name string) float64 {
	t.Helper()
	for _, x := range fs.Extras {
		if x.Name == name {
			return x.Value
		}
	}
	var names []string
	for _, x := range fs.Extras {
		names = append(names, x.Name)
	}
	t.Fatalf("no extra %q (have %q)", name, names)
	return 0
}

// opmAgree holds every closed form of the stage against the engine for
// every present/absent combination of the optional parameters listed, at
// random values and frequencies (seeded), so each branch of the admittance
// algebra is reached — beyond the shared suite's random draws.
func opmAgree(t *testing.T, id string, optional []string, trials int) {
	t.Helper()
	st, _ := topology.Lookup(id)
	rng := rand.New(rand.NewPCG(11, uint64(len(id))))
	var issues struct {
		floating, openFloor int
		floatEx, floorEx    string
	}
	defer func() {
		// Known engine limits, reproduced by TestOpmEngineFloatingInput and
		// TestOpmEngineOpenPortFloor; logged here, not counted twice.
		if issues.floating > 0 {
			t.Logf("%d comparisons where the closed form finds a floating + input (rid, rcm absent, port open) but the engine answers a finite value, e.g. %s", issues.floating, issues.floatEx)
		}
		if issues.openFloor > 0 {
			t.Logf("%d input impedances above about 1e10 Ω where the engine's open-port return ratio misses its exact 0, e.g. %s", issues.openFloor, issues.floorEx)
		}
	}()
	defaults, err := st.Values(nil)
	if err != nil {
		t.Fatal(err)
	}
	for mask := 0; mask < 1<<len(optional); mask++ {
		for trial := 0; trial < trials; trial++ {
			params := map[string]string{}
			for _, p := range st.Params {
				if x := defaults[p.Name]; x > 0 {
					x *= math.Exp((rng.Float64()*2 - 1) * math.Log(10))
					x = math.Min(math.Max(x, p.Min), p.Max)
					params[p.Name] = strconv.FormatFloat(x, 'g', 17, 64)
				}
			}
			for i, name := range optional {
				if mask&(1<<i) != 0 {
					params[name] = ""
				} else if _, ok := params[name]; !ok {
					p, _ := st.Param(name)
					params[name] = strconv.FormatFloat(math.Sqrt(math.Max(p.Min, 1e-300)*p.Max), 'g', 17, 64)
				}
			}
			f := math.Pow(10, rng.Float64()*8)
			if trial == 0 {
				f = 0
			}
			r := opmEngine(t, id, params, f)
			v, _ := st.Values(params)
			fs := st.Forms(v, f)
			where := func(what string) string {
				return id + " " + what + " f=" + strconv.FormatFloat(f, 'g', 6, 64) + " params " + opmParamString(params)
			}
			inExact0 := false // the in port's T_oc withheld as exactly 0 (rcm absent)
			for _, pf := range fs.Ports {
				if pf.Name == "in" && pf.TOpen == nil && pf.Z0 != nil {
					inExact0 = true
				}
			}
			cmp := func(what string, form *topology.Formula, eng *api.Complex) {
				t.Helper()
				if form == nil {
					return
				}
				got, ok := form.Value, !cmplx.IsNaN(form.Value)
				if ok != (eng != nil) {
					if !ok && strings.HasPrefix(what, "in.") {
						issues.floating++
						issues.floatEx = where(what)
						return
					}
					t.Errorf("%s: closed form %v, engine %v", where(what), got, eng)
					return
				}
				if !ok {
					return
				}
				tol := 1e-9
				if form.Tol > 0 {
					tol = form.Tol
				}
				// The engine states its own precision: double precision
				// times the condition of the systems it solved.
				if r.Condition != nil {
					tol = math.Max(tol, 50*0x1p-53**r.Condition)
				}
				e := eng.Value()
				d := cmplx.Abs(got-e) / math.Max(cmplx.Abs(e), 1e-300)
				floor := 1e-12
				if r.ReturnRatio != nil && (what == "T" || strings.Contains(what, ".t")) {
					floor *= math.Max(1, cmplx.Abs(r.ReturnRatio.Value()))
				}
				if d > tol && cmplx.Abs(got-e) <= floor {
					return
				}
				if d > tol && inExact0 && what == "in.z" && d < 1e-5 {
					issues.openFloor++
					issues.floorEx = where(what) + " rel " + strconv.FormatFloat(d, 'g', 2, 64)
					return
				}
				if d > tol {
					t.Errorf("%s: closed form %v, engine %v (rel %.2g)", where(what), got, e, d)
				}
			}
			cmp("T", fs.T, r.ReturnRatio)
			if r.Gain != nil {
				cmp("gain", fs.Gain, r.Gain.G)
			}
			for _, pf := range fs.Ports {
				pr := opmEnginePort(t, r, pf.Name)
				cmp(pf.Name+".z0", pf.Z0, pr.Z0)
				cmp(pf.Name+".tShort", pf.TShort, pr.TShort)
				cmp(pf.Name+".tOpen", pf.TOpen, pr.TOpen)
				cmp(pf.Name+".z", pf.Z, pr.Z)
			}
		}
	}
}

func opmParamString(p map[string]string) string {
	var b strings.Builder
	for _, k := range []string{"Rs", "R1", "R2", "Rp", "Rf", "Cf", "Riso", "Rsh", "Cd", "Cin", "a0", "gbw", "p2", "rid", "rcm", "ro", "RL", "CL"} {
		if v, ok := p[k]; ok {
			if v == "" {
				v = "—"
			}
			b.WriteString(k + "=" + v + " ")
		}
	}
	return b.String()
}

// The published check of REFERENCES.md §3, inverting stage: rd = 1 MΩ,
// ro = 50 Ω, a = 150 000 (flat), R1 = 10 kΩ, R2 = 47 kΩ, no source
// resistance, + input grounded, no load. [derived] there from Franco's exact
// formulas (S. Franco, Design with Operational Amplifiers and Analog
// Integrated Circuits, 3rd ed., 2002, ch. 1 [found: as re-worked]).
var invertingCheck = map[string]string{"Rs": "", "Rp": "", "R1": "10k", "R2": "47k", "a0": "150k", "gbw": "", "p2": "",
	"rid": "1M", "rcm": "", "ro": "50", "RL": "", "CL": ""}

const srcRefInv = "REFERENCES.md §3 inverting check [derived], Franco 3rd ed. ch. 1"

func TestInvertingFrancoCheck(t *testing.T) {
	fs := opmForms(t, "inverting", invertingCheck, 0)
	in, sum, out := opmPort(t, fs, "in"), opmPort(t, fs, "sum"), opmPort(t, fs, "out")
	opmWant(t, "A", real(fs.Gain.Value), "-4.699819743", srcRefInv)
	opmWant(t, "Ri", real(in.Z.Value), "10000.31366", srcRefInv)
	opmWant(t, "Ri Z0", real(in.Z0.Value), "54935.77193", srcRefInv)
	opmWant(t, "Ri Tsc", real(in.TShort.Value), "26077.65927", srcRefInv)
	opmWant(t, "Ri Toc", real(in.TOpen.Value), "143259.6342", srcRefInv)
	opmWant(t, "Ro", real(out.Z.Value), "1.915593209e-3", srcRefInv)
	opmWant(t, "Zsum", real(sum.Z.Value), "0.313654639", srcRefInv)

	// The engine, through the catalog, reproduces the same values.
	r := opmEngine(t, "inverting", invertingCheck, 0)
	opmWant(t, "engine A", real(r.Gain.G.Value()), "-4.699819743", srcRefInv)
	opmWant(t, "engine Ri", real(opmEnginePort(t, r, "in").Z.Value()), "10000.31366", srcRefInv)
	opmWant(t, "engine Ri Z0", real(opmEnginePort(t, r, "in").Z0.Value()), "54935.77193", srcRefInv)
	opmWant(t, "engine Ri Tsc", real(opmEnginePort(t, r, "in").TShort.Value()), "26077.65927", srcRefInv)
	opmWant(t, "engine Ri Toc", real(opmEnginePort(t, r, "in").TOpen.Value()), "143259.6342", srcRefInv)
	opmWant(t, "engine Ro", real(opmEnginePort(t, r, "out").ZDirect.Value()), "1.915593209e-3", srcRefInv)
	opmWant(t, "engine Zsum", real(opmEnginePort(t, r, "sum").ZDirect.Value()), "0.313654639", srcRefInv)
}

// With rd infinite: Ri = R1 + (R2 + ro)/(1 + a) (Franco 3rd ed., ch. 1 [found:
// as re-worked]), evaluated here from that formula with our own values.
func TestInvertingRiIdealRd(t *testing.T) {
	p := map[string]string{"Rs": "", "Rp": "", "R1": "10k", "R2": "47k", "a0": "150k", "gbw": "", "p2": "",
		"rid": "", "rcm": "", "ro": "50", "RL": "", "CL": ""}
	fs := opmForms(t, "inverting", p, 0)
	want := 10e3 + (47e3+50)/(1+150e3)
	if got := real(opmPort(t, fs, "in").Z.Value); math.Abs(got-want) > 1e-12*want {
		t.Errorf("Ri = %.12g, want R1 + (R2 + ro)/(1 + a) = %.12g (Franco ch. 1)", got, want)
	}
	// Rs in series: the port across the source adds exactly Rs.
	p["Rs"] = "1k"
	fs = opmForms(t, "inverting", p, 0)
	want = 11e3 + (47e3+50)/(1+150e3)
	if got := real(opmPort(t, fs, "in").Z.Value); math.Abs(got-want) > 1e-12*want {
		t.Errorf("Ri with Rs = %.12g, want Rs + R1 + (R2 + ro)/(1 + a) = %.12g", got, want)
	}
}

func TestInvertingAgreesWithEngine(t *testing.T) {
	opmAgree(t, "inverting", []string{"Rs", "Rp", "gbw", "p2", "rid", "rcm", "RL", "CL"}, 3)
}

func TestInvertingCircuitText(t *testing.T) {
	st, _ := topology.Lookup("inverting")
	v, _ := st.Values(nil)
	text := st.Circuit(v)
	for _, want := range []string{"vsource   Vin", "resistor  R1    in    sum   10k", "resistor  R2    out   sum   47k",
		"opamp     U1    plus  sum   out   a0=200k gbw=1M p2=8M rid=2M rcm=1G ro=75", "capacitor CL    out   gnd   100p", "port      sum   sum   gnd"} {
		if !strings.Contains(text, want) {
			t.Errorf("generated text lacks %q:\n%s", want, text)
		}
	}
	v, _ = st.Values(map[string]string{"Rs": "", "Rp": "", "CL": ""})
	text = st.Circuit(v)
	if !strings.Contains(text, "resistor  R1    src   sum") || !strings.Contains(text, "opamp     U1    gnd   sum") || strings.Contains(text, "capacitor") {
		t.Errorf("absent Rs, Rp, CL not left out:\n%s", text)
	}
}

// Engine reproducers, kept beside the stages that meet them.

// A + input reached only through Rs from the open input port floats (rid
// and rcm absent): Z₀, T_oc and the direct impedance have no finite value,
// and the engine must say so (null) rather than return the round-off of a
// near-singular solve. Non-inverting stage, our values, 0 Hz.
func TestOpmEngineFloatingInput(t *testing.T) {
	text := "vsource Vin src gnd 1\nresistor Rs src plus 1k\nopamp U1 plus fb out a0=150k ro=50\n" +
		"resistor R1 fb gnd 2k\nresistor R2 out fb 98k\nport in src gnd\n"
	r, err := api.Analyze(api.Request{Circuit: text, Reference: "U1", Ports: []string{"in"}, Frequency: 0})
	if err != nil {
		t.Fatal(err)
	}
	if p := r.Ports[0]; p.Z0 != nil || p.ZDirect != nil || p.TOpen != nil {
		t.Errorf("floating + input: engine z0 %v, tOpen %v, zDirect %v; want all null (no finite value)", p.Z0, p.TOpen, p.ZDirect)
	}
}

// With rcm absent the open input port leaves no error voltage: T_oc = 0
// exactly and Z = Z₀·(1 + T_sc) [derived]. Follower, our values, 0 Hz;
// the input impedance is 3.35 TΩ.
func TestOpmEngineOpenPortFloor(t *testing.T) {
	// A follower whose + input is reached through Rs with rid ≫ Rs: the
	// open-port return ratio is exactly 0, and nodal analysis in double
	// precision loses about log10(rid/Rs) digits to the rounding of the
	// diagonal sum at that node. The engine must say so (its condition
	// estimate) and stay within what it says.
	p := map[string]string{"Rs": "1960.5980921904495", "Riso": "15.38061929975362", "a0": "511605.81530220719",
		"gbw": "11586323.68197011", "p2": "9193052.7596012596", "rid": "6609537.9667946314", "rcm": "",
		"ro": "100.08416681895011", "RL": "11408.768984077506", "CL": ""}
	r := opmEngine(t, "follower", p, 0)
	in := opmEnginePort(t, r, "in")
	want := in.Z0.Value() * (1 + in.TShort.Value())
	if r.Condition == nil {
		t.Fatal("no condition estimate")
	}
	stated := 50 * 0x1p-53 * *r.Condition
	if d := cmplx.Abs(in.ZDirect.Value()-want) / cmplx.Abs(want); d > stated {
		t.Errorf("engine zDirect %v, tOpen %v; exact Z₀(1 + T_sc) = %v (rel %.2g beyond the stated %.2g)", in.ZDirect.Value(), in.TOpen.Value(), want, d, stated)
	}
}
