package calc

import (
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/cmplxs/cscalar"
	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/api"
	"zport/site/fragment"
)

func TestCircuitStateRoundTrip(t *testing.T) {
	base := Form{Circuit: "text", Frequency: "1k", Sweep: SweepForm{From: "10", To: "1M", Points: "50"}}
	for _, f := range []Form{
		{Circuit: "text", Reference: "U1", Ports: []string{"out", "in", "n1,n2"}, Gain: &api.GainSpec{Source: "Vin", Output: "out,m"},
			Frequency: "2.5k", Sweep: SweepForm{From: "1", To: "100M", Points: "400"}},
		{Circuit: "text", Reference: "Ht", Ports: []string{hostile}, Frequency: "0", Sweep: SweepForm{}},
		{Circuit: "text", Reference: "a b&c=d%e+f", Frequency: "1 k", Sweep: SweepForm{From: "x", To: "y", Points: "z"}},
	} {
		state := f.CircuitState()
		if strings.ContainsAny(state, "<> #\"") {
			t.Errorf("state %q is not escaped for a URL", state)
		}
		got, refused := ReadCircuitFragment("#"+state, base)
		if len(refused) > 0 {
			t.Fatalf("%q: %+v", state, refused)
		}
		if !reflect.DeepEqual(got, f) {
			t.Errorf("round trip of %q:\n got %+v\nwant %+v", state, got, f)
		}
	}
	// A fragment that names no ports and no gain keeps the base's.
	b2 := base
	b2.Ports, b2.Gain = []string{"keep"}, &api.GainSpec{Source: "V", Output: "o"}
	got, refused := ReadCircuitFragment("c=ignored&p=custom&f=3k", b2)
	if len(refused) > 0 || got.Frequency != "3k" || !reflect.DeepEqual(got.Ports, b2.Ports) || got.Gain != b2.Gain {
		t.Errorf("partial fragment: %+v, %+v", got, refused)
	}
	// An empty source removes the gain.
	got, refused = ReadCircuitFragment("src=&out=", b2)
	if len(refused) > 0 || got.Gain != nil {
		t.Errorf("src= out=: gain %+v, %+v", got.Gain, refused)
	}
}

// A setting that cannot be read, or that the circuit page does not know,
// is refused by name and leaves the form's value for it alone; the rest of
// the link is read.
func TestCircuitFragmentRefused(t *testing.T) {
	base := Form{Circuit: "text", Reference: "U1", Frequency: "1k", Ports: []string{"p"}}
	for _, c := range []struct{ frag, key string }{
		{"ref=U1&ref=U2", "ref"},
		{"nope=1", "nope"},
		{"R1=10k", "R1"}, // a topology's key means nothing here
		{"ref", ""},
		{"ref=%zz", "ref"},
		{"ref=%00", "ref"},
		{"ref=" + strings.Repeat("x", fragment.MaxValue+1), "ref"},
		{strings.Repeat("port=a&", maxFragmentPorts) + "port=b", "port"},
		{"src=Vin", "src"},
		{"out=o", "out"},
		{strings.Repeat("f", fragment.MaxLength+1), ""},
	} {
		got, refused := ReadCircuitFragment(c.frag+"&points=7", base)
		if len(refused) != 1 || refused[0].Key != c.key {
			t.Errorf("%.60q: refused %+v, want one refusal of %q", c.frag, refused, c.key)
			continue
		}
		want := base
		if !refused[0].All {
			want.Sweep.Points = "7" // the rest of the link is read
		}
		if c.key == "port" {
			want.Ports = got.Ports // the first 32 ports are read
			if len(got.Ports) != maxFragmentPorts || got.Ports[0] != "a" {
				t.Errorf("%.60q: ports %q", c.frag, got.Ports)
			}
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%.60q: form %+v, want %+v", c.frag, got, want)
		}
	}
}

// Compute reads a circuit form's fragment and writes its state back.
func TestComputeCircuitFragment(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M ro=100\nport o out gnd\n"
	frag := "ref=U1&port=o&port=in&src=Vin&out=out&f=10k&from=10&to=1M&points=20"
	out := Compute(Form{Circuit: text, Frequency: "1k", Fragment: &frag})
	if out.Error != nil {
		t.Fatal(out.Error.Message)
	}
	if out.State != frag || out.Notice != "" || len(out.Refused) > 0 {
		t.Errorf("state %q, want %q; notice %q", out.State, frag, out.Notice)
	}
	if f := out.Form; f == nil || f.Frequency != "10k" || len(f.Ports) != 2 || f.Gain == nil || f.Fragment != nil {
		t.Errorf("form %+v", out.Form)
	}
	bad := "ref=U1&zz=1&f=10k"
	out = Compute(Form{Circuit: text, Frequency: "1k", Fragment: &bad})
	if out.Error != nil || len(out.Refused) != 1 || out.Refused[0].Key != "zz" || out.Form.Frequency != "10k" {
		t.Errorf("unknown key: %+v, %+v", out.Error, out.Refused)
	}
	if !strings.HasPrefix(out.Notice, `Not used from this link: zz = "1" (this page has no such setting). `) {
		t.Errorf("notice %q", out.Notice)
	}
}

// "Open as circuit": a topology's generated text with CircuitLinkState's
// settings analyzes to exactly the topology's own numbers.
func TestCircuitLinkReproducesTopology(t *testing.T) {
	for _, e := range api.Catalog() {
		f := DefaultForm(e)
		req, bad := f.request()
		if bad != nil {
			t.Fatalf("%s: %s", e.ID, bad.Message)
		}
		want, err := api.Analyze(req)
		if err != nil {
			t.Fatalf("%s: %v", e.ID, err)
		}
		state := CircuitLinkState(want)
		if !strings.Contains(state, "ref="+fragment.Escape(e.Reference)) {
			t.Errorf("%s: state %q lacks the reference", e.ID, state)
		}
		// The page starts from its own defaults and reads the link over them.
		cf, refused := ReadCircuitFragment(state, Form{Circuit: want.Topology.Circuit, Frequency: "1"})
		if len(refused) > 0 {
			t.Fatalf("%s: %+v", e.ID, refused)
		}
		creq, bad := cf.request()
		if bad != nil {
			t.Fatalf("%s: %s", e.ID, bad.Message)
		}
		got, err := api.Analyze(creq)
		if err != nil {
			t.Fatalf("%s: %v", e.ID, err)
		}
		if got.Frequency != want.Frequency || len(got.Ports) != len(want.Ports) || (got.Gain == nil) != (want.Gain == nil) ||
			len(got.Sweep.Frequency) != len(want.Sweep.Frequency) {
			t.Fatalf("%s: the circuit analysis has a different shape", e.ID)
		}
		same := func(what string, a, b *api.Complex) {
			if (a == nil) != (b == nil) || a != nil && !cscalar.EqualWithinAbsOrRel(a.Value(), b.Value(), 1e-300, 1e-12) {
				t.Errorf("%s: %s = %v as a circuit, %v as the stage", e.ID, what, a, b)
			}
		}
		same("T", got.ReturnRatio, want.ReturnRatio)
		for i := range want.Ports {
			same(want.Ports[i].Name+" Z", got.Ports[i].Z, want.Ports[i].Z)
			same(want.Ports[i].Name+" Z direct", got.Ports[i].ZDirect, want.Ports[i].ZDirect)
		}
		if want.Gain != nil {
			same("g", got.Gain.G, want.Gain.G)
		}
		for k, fr := range want.Sweep.Frequency {
			if !scalar.EqualWithinRel(got.Sweep.Frequency[k], fr, 1e-13) {
				t.Fatalf("%s: sweep point %d at %g Hz, want %g Hz", e.ID, k, got.Sweep.Frequency[k], fr)
			}
		}
	}
}

func TestFit(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U2 in fb out\nvcvs E1 x gnd sense=out,gnd gain=2\nresistor R1 fb gnd 1k\nresistor R2 out fb 1k\nresistor R3 x gnd 1k\nport po out gnd\nport pn fb gnd\nport px x gnd\n"
	in := api.Inspect(text)
	was := &Offered{References: []string{"U1", "E1"}, Ports: []string{"po", "pn"}}
	for _, tc := range []struct {
		name    string
		f       Form
		offered *Offered
		want    Form
	}{
		{"kept", Form{Reference: "E1", Ports: []string{"pn", "fb"}, Gain: &api.GainSpec{Source: "Vin", Output: "out,x"}}, was,
			Form{Reference: "E1", Ports: []string{"pn", "px", "fb"}, Gain: &api.GainSpec{Source: "Vin", Output: "out,x"}}},
		{"renamed reference", Form{Reference: "U1", Ports: []string{"po"}}, was,
			Form{Reference: "U2", Ports: []string{"po", "px"}}},
		{"gone, nothing new", Form{Reference: "U9", Ports: []string{"pq", "nowhere", "x,x", "in,x"}}, &Offered{References: []string{"U2", "E1"}, Ports: []string{"po", "pn", "px"}},
			Form{Reference: "U2", Ports: []string{"in,x"}}},
		{"exact", Form{Reference: "gone", Ports: []string{"pn"}, Gain: &api.GainSpec{Source: "Vx", Output: "out"}}, nil,
			Form{Reference: "U2", Ports: []string{"pn"}}},
		{"gain to a gone node", Form{Reference: "U2", Gain: &api.GainSpec{Source: "Vin", Output: "y"}}, nil,
			Form{Reference: "U2", Ports: []string{}}},
	} {
		got := tc.f.Fit(in, tc.offered)
		if !reflect.DeepEqual(got, tc.want) {
			t.Errorf("%s:\n got %+v\nwant %+v", tc.name, got, tc.want)
		}
	}
	if got := (Form{Reference: "X"}).Fit(api.Inspect("resistor R1 a gnd 1k\n"), nil); got.Reference != "" {
		t.Errorf("no controlled source: reference %q", got.Reference)
	}

	// One independent source, new in the text: the gain is taken from it,
	// to node out, or else to the + node of the last port line. A source
	// the pickers showed already keeps the user's "none".
	one := "vsource Vs a gnd 1\nopamp U1 a n y\nresistor Rf y n 1k\nport py y gnd\n"
	for _, c := range []struct {
		text    string
		offered *Offered
		want    *api.GainSpec
	}{
		{one, &Offered{Sources: []string{}}, &api.GainSpec{Source: "Vs", Output: "y"}},
		{strings.ReplaceAll(one, " y", " out"), &Offered{Sources: []string{"Vx"}}, &api.GainSpec{Source: "Vs", Output: "out"}},
		{one, &Offered{Sources: []string{"Vs"}}, nil},
		{one, &Offered{}, nil}, // the page did not say what it offered
		{one + "isource I2 gnd y 1\n", &Offered{Sources: []string{}}, nil},
	} {
		got := (Form{Reference: "U1"}).Fit(api.Inspect(c.text), c.offered)
		if !reflect.DeepEqual(got.Gain, c.want) {
			t.Errorf("offered %+v: gain %+v, want %+v", c.offered, got.Gain, c.want)
		}
	}
}

func TestComputeCircuit(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M ro=100\nport o out gnd\n"
	base := Form{Circuit: text, Frequency: "1k", Sweep: SweepForm{From: "10", To: "1M", Points: "20"}, ID: "c"}

	out := ComputeCircuit(CircuitRequest{Form: base, Offered: &Offered{}})
	if out.Output == nil || out.Output.Error != nil || out.Form == nil {
		t.Fatalf("good text: %+v", out)
	}
	if out.Form.Reference != "U1" || !reflect.DeepEqual(out.Form.Ports, []string{"o"}) || !strings.Contains(out.Output.HTML, `data-port="o"`) {
		t.Errorf("fitted form %+v", out.Form)
	}

	bad := base
	bad.Circuit = "resistor R1 a\nresistor R2 b gnd 4k7k\n"
	out = ComputeCircuit(CircuitRequest{Form: bad})
	if out.Output != nil || out.Form != nil || len(out.Inspection.Errors) != 2 || out.Inspection.Errors[1].Line != 2 {
		t.Errorf("text with errors: %+v", out)
	}

	frag := "ref=U1&port=out&src=Vin&out=out&f=2k"
	linked := base
	linked.Fragment = &frag
	out = ComputeCircuit(CircuitRequest{Form: linked})
	if out.Output == nil || out.Output.Error != nil || out.Form.Frequency != "2k" || out.Form.Gain == nil || out.Form.Fragment != nil {
		t.Errorf("link: %+v", out.Form)
	}
	hostile := "ref=" + fragment.Escape(hostile) + "&f=3k"
	linked.Fragment = &hostile
	out = ComputeCircuit(CircuitRequest{Form: linked})
	if o := out.Output; o == nil || o.Error != nil || len(o.Refused) != 1 || o.Refused[0].Key != "ref" || o.Refused[0].Default != "U1" ||
		out.Form.Reference != "U1" || out.Form.Frequency != "3k" {
		t.Errorf("hostile reference in a link: %+v", out.Output)
	}

	// A passive circuit has no reference: the direct solution, and a note.
	js := string(ComputeCircuitJSON([]byte(`{"circuit": "resistor R1 a gnd 1k\nport p a gnd\n", "frequency": "1", "ports": ["p"], "offered": null}`)))
	if !strings.Contains(js, `"errors":[]`) || strings.Contains(js, `"error"`) || !strings.Contains(js, `data-quantity=\"zDirect\" data-re=\"1000`) ||
		!strings.Contains(js, "no reference element") {
		t.Errorf("JSON answer %s", js)
	}
	if js := string(ComputeCircuitJSON([]byte(`{"circuit": 1}`))); !strings.Contains(js, "not valid") {
		t.Errorf("bad JSON answer %s", js)
	}
}
