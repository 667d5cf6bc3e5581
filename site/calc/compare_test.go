package calc

import (
	"encoding/csv"
	"math"
	"math/cmplx"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/api"
	"zport/site/internal/sitetest"
)

// readCSV reads a CSV the way a script would: encoding/csv with the
// header's comment lines skipped.
func readCSV(t *testing.T, s string) [][]string {
	t.Helper()
	r := csv.NewReader(strings.NewReader(s))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatalf("the CSV does not read back: %v", err)
	}
	return rows
}

// The CSV reads back through encoding/csv with its comments skipped; in
// every row each complex column's magnitude, phase and dB agree with its
// real and imaginary parts (to the last bits of float64: |z| by
// math.Hypot, the phase by math.Atan2 in degrees, 20·log10|z|); every
// column name carries its unit; the header names the stage, every
// parameter with its unit (an absent one as absent) and the link.
func TestCSVRoundTrip(t *testing.T) {
	f := Form{Topology: "inverting", ID: "c", CSV: true, Link: "file:///x/inverting.html#Rp=",
		Params: map[string]string{"Rp": ""}, Sweep: SweepForm{From: "10", To: "100M", Points: "50"}}
	out := Compute(f)
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	rows := readCSV(t, out.CSV)
	head := rows[0]
	if len(rows) != 51 || head[0] != "frequency_Hz" {
		t.Fatalf("%d rows, header %q", len(rows), head[:1])
	}
	complexCols := 0
	for i, h := range head {
		base, ok := strings.CutSuffix(h, "_phase_deg")
		if !ok {
			continue
		}
		complexCols++
		// NAME_re[_unit], NAME_im[_unit], NAME_mag[_unit] precede it.
		if !strings.HasPrefix(head[i-3], base+"_re") || !strings.HasPrefix(head[i-2], base+"_im") || !strings.HasPrefix(head[i-1], base+"_mag") {
			t.Fatalf("columns %q do not lead up to %q", head[i-3:i], h)
		}
		db := i+1 < len(head) && head[i+1] == base+"_dB"
		if strings.HasPrefix(base, "gain.") || base == "T" || base == "A" || base == "noiseGain" || strings.HasSuffix(base, ".tShort") || strings.HasSuffix(base, ".tOpen") {
			if !db {
				t.Errorf("ratio %s has no dB column", base)
			}
		} else if db || !strings.HasSuffix(head[i-3], "_Ohm") {
			t.Errorf("impedance column %s: %q (dB %v)", base, head[i-3], db)
		}
		for r, row := range rows[1:] {
			if row[i] == "" {
				if row[i-3] != "" {
					t.Errorf("row %d %s: phase empty, re %q", r, base, row[i-3])
				}
				continue
			}
			num := func(j int) float64 {
				x, err := strconv.ParseFloat(row[j], 64)
				if err != nil {
					t.Fatalf("row %d column %s: %v", r, head[j], err)
				}
				return x
			}
			re, im, mag, ph := num(i-3), num(i-2), num(i-1), num(i)
			if want := math.Hypot(re, im); !scalar.EqualWithinRel(mag, want, 4e-16) {
				t.Errorf("row %d %s: |z| = %g, hypot(re, im) = %g", r, base, mag, want)
			}
			if want := math.Atan2(im+0, re+0) * 180 / math.Pi; !scalar.EqualWithinAbs(ph, want, 1e-12) {
				t.Errorf("row %d %s: phase %g°, atan2 gives %g°", r, base, ph, want)
			}
			if db && mag > 0 {
				if want := 20 * math.Log10(mag); !scalar.EqualWithinAbs(num(i+1), want, 1e-12) {
					t.Errorf("row %d %s: %g dB, 20·log10|z| = %g", r, base, num(i+1), want)
				}
			}
		}
	}
	// Three ports of five terms, the gain's four, and the loop's T, A
	// (the op amp's open-loop gain) and the noise gain A/T.
	if complexCols != 3*5+4+3 {
		t.Errorf("%d complex quantities in the CSV, want 22", complexCols)
	}
	for _, want := range []string{
		"# stage: Inverting amplifier (inverting)\r\n",
		"#   R1 = 10000 Ohm (10k): input resistor; source to summing node\r\n",
		"#   a0 = 200000 (200k): op-amp DC open-loop gain\r\n",
		"#   Rp = absent: bias-compensation resistor; + input to gnd (empty: + input grounded)\r\n",
		"#   CL = 0.0000000001 F (100p): load capacitance (empty: none)\r\n",
		"#   gbw = 1000000 Hz (1M): gain-bandwidth product; first pole at gbw/a₀ (empty: no pole)\r\n",
		"# reference element (its return ratio T): U1\r\n",
		"# link: file:///x/inverting.html#Rp=\r\n",
	} {
		if !strings.Contains(out.CSV, want) {
			t.Errorf("the CSV's header lacks %q:\n%s", want, out.CSV[:strings.Index(out.CSV, "frequency_Hz")])
		}
	}

	// Circuit text goes into the header line by line; a line a
	// spreadsheet would split at a comma into a formula is guarded.
	c := Form{Circuit: "vsource Vin in gnd 1\nopamp U1 in out out\nport o out gnd # ,=1+1\n", Reference: "U1", Ports: []string{"o"}, Frequency: "1k", CSV: true}
	got := Compute(c)
	if got.Error != nil {
		t.Fatal(got.Error)
	}
	for _, want := range []string{"# circuit text:\r\n", "#   | vsource Vin in gnd 1\r\n", "#   | port o out gnd # ,'=1+1\r\n"} {
		if !strings.Contains(got.CSV, want) {
			t.Errorf("the circuit's CSV lacks %q:\n%s", want, got.CSV)
		}
	}
	if rows := readCSV(t, got.CSV); len(rows) != 2 {
		t.Errorf("without a sweep the CSV has %d rows, want the header and the spot frequency", len(rows))
	}
}

// Copied results write parameters in engineering notation with their
// units, an absent one as absent.
func TestCopyParameters(t *testing.T) {
	out := Compute(Form{Topology: "inverting", Params: map[string]string{"Rp": "", "CL": "4n7"}})
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	for _, want := range []string{"| a0 | 200 k |", "| R1 | 10 kΩ |", "| Rp | absent |", "| CL | 4.7 nF |", "| gbw | 1 MHz |", "| ro | 75 Ω |"} {
		if !strings.Contains(out.Markdown, want) {
			t.Errorf("copied results lack %q:\n%s", want, out.Markdown)
		}
	}
}

// Pins: the share link carries each pin's name and what it changes, and
// reads back to the same pins and the same panel; the comparison's
// differences are those of the pinned and current answers, each computed
// here on its own from the native engine; a recompute takes the pins'
// answers from the cache.
func TestPins(t *testing.T) {
	f := Form{Topology: "transimpedance", ID: "c", Params: map[string]string{"Cf": "3p3"},
		Pins: []Pin{{Name: "Cf 1 pF", Slot: 1, Params: map[string]string{"Cf": "1p"}}, {Name: "no Cf", Slot: 3, Params: map[string]string{"Cf": ""}}}}
	out := Compute(f)
	if out.Error != nil {
		t.Fatal(out.Error)
	}
	if !strings.HasSuffix(out.State, "&pin1=Cf+1+pF&pin1.Cf=1p&pin3=no+Cf&pin3.Cf=") {
		t.Errorf("state %q", out.State)
	}
	e, _ := api.LookupEntry("transimpedance")
	back, err := ReadFragment(out.State, Form{Topology: "transimpedance"}, e)
	if err != nil {
		t.Fatal(err)
	}
	if len(back.Pins) != 2 || back.Pins[0].Name != "Cf 1 pF" || back.Pins[0].Params["Cf"] != "1p" || back.Pins[1].Slot != 3 || back.Pins[1].Params["Cf"] != "" ||
		!reflect.DeepEqual(out.Form.Pins[0].Params, back.Pins[0].Params) {
		t.Errorf("pins read back: %+v", back.Pins)
	}
	frag := out.State
	again := Compute(Form{Topology: "transimpedance", ID: "c", Fragment: &frag})
	if again.Error != nil || again.HTML != out.HTML {
		t.Errorf("the link does not reproduce the panel (%v)", again.Error)
	}

	// The differences, against the native answers.
	answer := func(cf string) *api.Response {
		r, err := api.Analyze(api.Request{Topology: "transimpedance", Params: map[string]string{"Cf": cf}, Frequency: 1e3,
			Sweep: &api.SweepSpec{From: 10, To: 1e8, Points: 400}})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	cur, pin1 := answer("3p3"), answer("1p")
	cells := map[string]*sitetest.Element{}
	for _, el := range sitetest.Parse(t, out.HTML) {
		if el.Attrs["data-stat"] != "" {
			cells[el.Attrs["data-compare"]+"/"+el.Attrs["data-pin"]+"/"+el.Attrs["data-stat"]] = el
		}
	}
	num := func(k, attr string) float64 {
		el := cells[k]
		if el == nil {
			t.Fatalf("no comparison cell %s", k)
		}
		x, err := strconv.ParseFloat(el.Attrs[attr], 64)
		if err != nil {
			t.Fatalf("%s %s: %v", k, attr, err)
		}
		return x
	}
	if d, want := num("pm/1/diff", "data-value"), *cur.Margins.PhaseMargin-*pin1.Margins.PhaseMargin; d != want {
		t.Errorf("phase margin difference %g°, want %g°", d, want)
	}
	zc, zp := cur.Ports[1].Z.Value(), pin1.Ports[1].Z.Value()
	if d, want := num("z:out/1/diff", "data-value"), 100*(cmplx.Abs(zc)/cmplx.Abs(zp)-1); !scalar.EqualWithinRel(d, want, 1e-12) {
		t.Errorf("|Z out| difference %g %%, want %g %%", d, want)
	}
	if d, want := num("z:out/1/diff", "data-phase"), (cmplx.Phase(zc)-cmplx.Phase(zp))*180/math.Pi; !scalar.EqualWithinAbs(d, want, 1e-9) {
		t.Errorf("∠Z out difference %g°, want %g°", d, want)
	}
	tc, tp := cur.ReturnRatio.Value(), pin1.ReturnRatio.Value()
	if d, want := num("T/1/diff", "data-value"), 20*math.Log10(cmplx.Abs(tc))-20*math.Log10(cmplx.Abs(tp)); !scalar.EqualWithinAbs(d, want, 1e-12) {
		t.Errorf("T difference %g dB, want %g dB", d, want)
	}
	if v := num("z:out/1/value", "data-re"); v != real(zp) {
		t.Errorf("pin 1's Z at out is %g, the engine's %g", v, real(zp))
	}
	// The copied results carry the pins and the comparison.
	for _, want := range []string{"| Pinned design | Differs from this design in |", "| Cf 1 pF | Cf 1 pF \\(here 3\\.3 pF\\)\\. |",
		"| Loop vs pins | This design | Cf 1 pF | Δ this vs Cf 1 pF | no Cf | Δ this vs no Cf |"} {
		if !strings.Contains(out.Markdown, want) {
			t.Errorf("copied results lack %q:\n%s", want, out.Markdown)
		}
	}

	// The cache: the same pins at the same frequencies are not analyzed
	// again (the same answer comes back).
	g := out.Form
	a := analyzePins(g, &e, &api.SweepSpec{From: 10, To: 1e8, Points: 400})
	b := analyzePins(g, &e, &api.SweepSpec{From: 10, To: 1e8, Points: 400})
	if a[0].Resp == nil || a[0].Resp != b[0].Resp {
		t.Error("a recompute analyzed the pins again")
	}
}

// Pins a page could not have made, and pin keys a link cannot have, are
// refused with a message.
func TestPinsRefused(t *testing.T) {
	six := make([]Pin, MaxPins+1)
	for i := range six {
		six[i] = Pin{Name: "p", Slot: i + 1}
	}
	for _, c := range []struct {
		name string
		pins []Pin
	}{
		{"too many", six},
		{"slot twice", []Pin{{Name: "a", Slot: 1}, {Name: "b", Slot: 1}}},
		{"slot 0", []Pin{{Name: "a", Slot: 0}}},
		{"long name", []Pin{{Name: strings.Repeat("x", MaxPinName+1), Slot: 2}}},
	} {
		out := Compute(Form{Topology: "inverting", Pins: c.pins})
		if out.Error == nil || out.Error.Param != "pins" {
			t.Errorf("%s: %+v", c.name, out.Error)
		}
	}
	e, _ := api.LookupEntry("inverting")
	for _, frag := range []string{"pin1.Rx=1", "pin5=a", "pin1.f=2k", "pin2=" + strings.Repeat("n", MaxPinName+1)} {
		if _, err := ReadFragment(frag, Form{Topology: "inverting"}, e); err == nil {
			t.Errorf("fragment %q read without complaint", frag)
		}
	}
	// A pin whose design the engine refuses is shown as not analyzed; the
	// current design is not held up by it.
	out := Compute(Form{Topology: "inverting", Pins: []Pin{{Name: "bad", Slot: 1, Params: map[string]string{"R1": "-1"}}}})
	if out.Error != nil || !strings.Contains(out.HTML, "Not analyzed: R1: ") {
		t.Errorf("a bad pin: %+v", out.Error)
	}
}

// Pins of a circuit travel in its link: a different reference, ports and
// gain as keys; the text is the page's.
func TestCircuitPins(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=100\nvcvs E1 x gnd sense=out,gnd gain=1\nresistor R1 fb gnd 2k\nresistor R2 out fb 18k\nresistor R3 x gnd 1k\nport o out gnd\nport i in gnd\n"
	f := Form{Circuit: text, Reference: "U1", Ports: []string{"o"}, Gain: &api.GainSpec{Source: "Vin", Output: "out"}, Frequency: "1k",
		Pins: []Pin{{Name: "both ports", Slot: 2, Circuit: text, Reference: "U1", Ports: []string{"o", "i"}}}}
	state := f.CircuitState()
	if !strings.HasSuffix(state, "&pin2=both+ports&pin2.port=o&pin2.port=i&pin2.src=&pin2.out=") {
		t.Errorf("state %q", state)
	}
	back, err := ReadCircuitFragment(state, Form{Circuit: text})
	if err != nil {
		t.Fatal(err)
	}
	p := back.Pins[0]
	if p.Slot != 2 || p.Reference != "U1" || !reflect.DeepEqual(p.Ports, []string{"o", "i"}) || p.Gain != nil || p.Circuit != text {
		t.Errorf("pin read back: %+v", p)
	}
	out := ComputeCircuit(CircuitRequest{Form: Form{Circuit: text, Frequency: "1k", Fragment: &state}, PinCircuits: map[string]string{"2": strings.Replace(text, "18k", "8k", 1)}})
	if out.Output == nil || out.Output.Error != nil {
		t.Fatalf("%+v", out.Output)
	}
	if !strings.Contains(out.Output.HTML, "its own circuit text, with “resistor R2 out fb 8k” where this one has “resistor R2 out fb 18k”; ports o, i; no gain.") || out.Form.Pins[0].Circuit != "" {
		t.Errorf("the pin's own text was not used, or was echoed back")
	}
}
