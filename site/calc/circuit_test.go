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
		got, err := ReadCircuitFragment("#"+state, base)
		if err != nil {
			t.Fatalf("%q: %v", state, err)
		}
		if !reflect.DeepEqual(got, f) {
			t.Errorf("round trip of %q:\n got %+v\nwant %+v", state, got, f)
		}
	}
	// A fragment that names no ports and no gain keeps the base's.
	b2 := base
	b2.Ports, b2.Gain = []string{"keep"}, &api.GainSpec{Source: "V", Output: "o"}
	got, err := ReadCircuitFragment("c=ignored&p=custom&f=3k", b2)
	if err != nil || got.Frequency != "3k" || !reflect.DeepEqual(got.Ports, b2.Ports) || got.Gain != b2.Gain {
		t.Errorf("partial fragment: %+v, %v", got, err)
	}
	// An empty source removes the gain.
	got, err = ReadCircuitFragment("src=&out=", b2)
	if err != nil || got.Gain != nil {
		t.Errorf("src= out=: gain %+v, %v", got.Gain, err)
	}
}

func TestCircuitFragmentRefused(t *testing.T) {
	base := Form{Circuit: "text", Reference: "U1", Frequency: "1k"}
	for _, frag := range []string{
		"ref=U1&ref=U2",
		"nope=1",
		"R1=10k", // a topology's key means nothing here
		"ref",
		"ref=%zz",
		"ref=%00",
		"ref=" + strings.Repeat("x", fragment.MaxValue+1),
		strings.Repeat("port=a&", maxFragmentPorts+1),
		"src=Vin",
		"out=o",
		strings.Repeat("f", fragment.MaxLength+1),
	} {
		got, err := ReadCircuitFragment(frag, base)
		if err == nil {
			t.Errorf("%.60q: accepted as %+v", frag, got)
			continue
		}
		if !reflect.DeepEqual(got, base) {
			t.Errorf("%.60q: the refused fragment changed the form", frag)
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
	if out.State != frag {
		t.Errorf("state %q, want %q", out.State, frag)
	}
	if f := out.Form; f == nil || f.Frequency != "10k" || len(f.Ports) != 2 || f.Gain == nil || f.Fragment != nil {
		t.Errorf("form %+v", out.Form)
	}
	bad := "ref=U1&zz=1"
	out = Compute(Form{Circuit: text, Frequency: "1k", Fragment: &bad})
	if out.Error == nil || out.Error.Param != FieldFragment {
		t.Errorf("bad fragment: %+v", out.Error)
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
		cf, err := ReadCircuitFragment(state, Form{Circuit: want.Topology.Circuit, Frequency: "1"})
		if err != nil {
			t.Fatalf("%s: %v", e.ID, err)
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
	hostile := "ref=" + fragment.Escape(hostile)
	linked.Fragment = &hostile
	out = ComputeCircuit(CircuitRequest{Form: linked})
	if out.Output == nil || out.Output.Error == nil || out.Output.Error.Param != "reference" {
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
