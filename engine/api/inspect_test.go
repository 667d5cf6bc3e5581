package api

import (
	"encoding/json"
	"fmt"
	"reflect"
	"strings"
	"testing"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

func TestInspectCandidates(t *testing.T) {
	// A two-stage circuit of our own; the candidates come in text order.
	text := `# test circuit
vsource  Vin src gnd 1
resistor R1  src sum 10k
opamp    U2  gnd sum m a0=100k
ccvs     H1  out gnd sense=R1 r=1k
isource  Ib  gnd m 1u
vccs     G1  m gnd sense=out,gnd gm=1m
port     in  src gnd
port     o   out m
`
	in := Inspect(text)
	want := Inspection{
		References: []InspectedPart{{"U2", "opamp", 4}, {"H1", "ccvs", 5}, {"G1", "vccs", 7}},
		Sources:    []InspectedPart{{"Vin", "vsource", 2}, {"Ib", "isource", 6}},
		Ports:      []InspectedPort{{"in", "src", "gnd", 8}, {"o", "out", "m", 9}},
		Nodes:      []string{"src", "sum", "m", "out"},
		Errors:     []ErrorBody{},
	}
	if !reflect.DeepEqual(in, want) {
		t.Errorf("Inspect =\n%+v\nwant\n%+v", in, want)
	}
}

// Every problem comes back with its place; ^ marks each expected column
// on the line above it, as in the parser's own tests.
func TestInspectErrors(t *testing.T) {
	marked := `resistor R1 a gnd 4k7k
                     ^
capacitor C1 a b 1u
vcvs E1 b gnd sense=a gain=2
                    ^
resistor R1 b gnd 1k
         ^
`
	var text []string
	var want [][2]int
	for _, l := range strings.Split(marked, "\n") {
		if i := strings.IndexByte(l, '^'); i >= 0 && strings.TrimSpace(l) == "^" {
			want = append(want, [2]int{len(text), i + 1})
			continue
		}
		text = append(text, l)
	}
	in := Inspect(strings.Join(text, "\n"))
	if len(in.References)+len(in.Sources)+len(in.Ports)+len(in.Nodes) != 0 {
		t.Errorf("text with errors offers candidates: %+v", in)
	}
	var got [][2]int
	for _, e := range in.Errors {
		got = append(got, [2]int{e.Line, e.Column})
		if e.Message == "" {
			t.Errorf("error at %d:%d has no message", e.Line, e.Column)
		}
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("error places %v, want %v (%+v)", got, want, in.Errors)
	}
}

func TestInspectLimits(t *testing.T) {
	// 100 KB of junk: the parser's cap holds, the last entry says so.
	junk := strings.Repeat("<img src=x onerror=alert(1)> ~~ 1..2 \x00\n", 100<<10/40)
	in := Inspect(junk)
	if n := len(in.Errors); n != circuit.MaxErrors+1 || !strings.Contains(in.Errors[n-1].Message, "too many errors") {
		t.Errorf("junk: %d errors, last %+v", n, in.Errors[len(in.Errors)-1])
	}
	// Text over MaxCircuitBytes is refused at once.
	in = Inspect(strings.Repeat("# comment\n", MaxCircuitBytes/10+1))
	if len(in.Errors) != 1 || in.Errors[0].Line != 1 || !strings.Contains(in.Errors[0].Message, "limit") {
		t.Errorf("over-long text: %+v", in.Errors)
	}
	// A ladder one node over the engine's limit parses, and says why it
	// will not be analyzed, in the engine's own words.
	var b strings.Builder
	b.WriteString("vsource Vin n0 gnd 1\nopamp U1 n0 f out\nresistor Rf out f 1k\nresistor Rg f gnd 1k\n")
	for i := 0; i < feedback.MaxNodes-3+1; i++ {
		fmt.Fprintf(&b, "resistor R%d out x%d 1k\nresistor Q%d x%d gnd 1k\n", i, i, i, i)
	}
	in = Inspect(b.String())
	if len(in.Errors) != 0 || len(in.Nodes)+len(in.References)+len(in.Sources) != 0 {
		t.Fatalf("ladder: %d errors, %d nodes listed; want none, only the limit", len(in.Errors), len(in.Nodes))
	}
	if !strings.Contains(in.Limit, fmt.Sprint(feedback.MaxNodes+1)+" nodes") {
		t.Errorf("limit %q does not count the nodes", in.Limit)
	}
	_, err := Analyze(Request{Circuit: b.String(), Reference: "U1", Frequency: 1})
	if in.Limit == "" || err == nil || !strings.Contains(err.Error(), in.Limit) {
		t.Errorf("limit %q; Analyze says %v", in.Limit, err)
	}
}

// The lists encode as [] rather than null, and the limit only when set.
func TestInspectJSON(t *testing.T) {
	b, err := json.Marshal(Inspect("resistor R1 a gnd 1k\n"))
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"references", "sources", "ports", "errors"} {
		if string(m[k]) != "[]" {
			t.Errorf("%s = %s, want []", k, m[k])
		}
	}
	if string(m["nodes"]) != `["a"]` {
		t.Errorf("nodes = %s", m["nodes"])
	}
	if _, ok := m["limit"]; ok {
		t.Errorf("limit present without a limit")
	}
}

// PrepareParsed answers exactly as Prepare, from the circuit InspectParsed
// parsed.
func TestPrepareParsed(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M ro=100\nport o out gnd\n"
	req := Request{Circuit: text, Reference: "U1", Ports: []string{"o"}, Frequency: 1e5}
	in, c := InspectParsed(text)
	if c == nil || len(in.Errors) != 0 {
		t.Fatalf("InspectParsed: %+v", in)
	}
	p1, err1 := Prepare(req)
	p2, err2 := PrepareParsed(req, c)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	r1, _ := p1.Run()
	r2, _ := p2.Run()
	a, _ := json.Marshal(r1)
	b, _ := json.Marshal(r2)
	if string(a) != string(b) {
		t.Errorf("PrepareParsed differs from Prepare:\n%s\n%s", a, b)
	}
	if _, err := PrepareParsed(req, nil); err == nil {
		t.Error("PrepareParsed without a circuit was accepted")
	}
	if _, c := InspectParsed("resistor R1 a\n"); c != nil {
		t.Error("InspectParsed gave a circuit for text with an error")
	}
}
