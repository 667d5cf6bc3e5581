package circuit

import (
	"errors"
	"strings"
	"testing"
)

func TestParseAllKinds(t *testing.T) {
	text := `# every kind once (invented values)
vsource  Vin  in   gnd  1
isource  Ib   gnd  in   1u
resistor R1   in   a    4k7     # RKM
capacitor C1  a    gnd  2.2nF
inductor L1   a    b    10uH
vcvs     E1   c    gnd  sense=a,b gain=-2
vccs     G1   gnd  c    sense=b,gnd gm=1mS
ccvs     H1   d    gnd  sense=R1 r=1k
cccs     F1   gnd  d    sense=E1 gain=0.5
opamp    U1   a    b    e    a0=200k gbw=10MHz p2=50M rid=1M rcm=1G ro=25
resistor R2   b    gnd  1k
resistor R3   c    gnd  1k
resistor R4   d    gnd  1k
resistor R5   e    gnd  1k
port     in   in   gnd
`
	c, err := Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Parts) != 14 || len(c.Ports) != 1 {
		t.Fatalf("parts %d ports %d", len(c.Parts), len(c.Ports))
	}
	r1, _ := c.Part("R1")
	if r1.Value != 4700 || r1.Line != 4 || r1.Col != 10 {
		t.Errorf("R1 = %+v", r1)
	}
	u1, _ := c.Part("U1")
	if *u1.Amp != (Amp{A0: 200e3, GBW: 10e6, P2: 50e6, Rid: 1e6, Rcm: 1e9, Ro: 25}) {
		t.Errorf("U1 = %+v", u1.Amp)
	}
	h1, _ := c.Part("H1")
	if c.Parts[h1.Sense].Name != "R1" {
		t.Errorf("H1 senses %d", h1.Sense)
	}
	if got := strings.Join(c.References(), " "); got != "E1 F1 G1 H1 U1" {
		t.Errorf("References = %q", got)
	}
	u0, _ := Parse("opamp U1 a b c\nresistor R1 c b 1k\nresistor R2 b gnd 1k\nresistor R3 a gnd 1k\n")
	if p, _ := u0.Part("U1"); p.Amp.A0 != 100e3 || p.Amp.GBW != 0 || p.Amp.Ro != 0 {
		t.Errorf("opamp defaults %+v", p.Amp)
	}
}

// Every error, with the line and column it must be reported at. The ^ in
// each input marks the expected position (and is removed before parsing),
// in the manner of encoding/csv's reader tests.
func TestParseErrors(t *testing.T) {
	cases := []struct {
		name, text, msg string
	}{
		{"unknown kind", "^resistr R1 a b 1k", "unknown part kind"},
		{"no name", "resistor^", "needs a name"},
		{"bad name", "resistor ^R-1 a gnd 1k", "letters, digits and _"},
		{"duplicate", "resistor R1 a gnd 1k\nresistor ^R1 a gnd 2k", "already used on line 1"},
		{"duplicate with port", "resistor R1 a gnd 1k\nport ^R1 a gnd", "already used"},
		{"too few", "resistor R1 a gnd^", "takes 2 nodes and a value"},
		{"too many", "resistor R1 a gnd 1k ^2k", "unexpected \"2k\""},
		{"bad node", "resistor R1 ^a.b gnd 1k", "node name"},
		{"same node", "resistor R1 a ^a 1k", "both ends on node a"},
		{"RKM twice", "resistor R1 a gnd 4k7^k", "unexpected \"k\""},
		{"double point", "resistor R1 a gnd 1.^.2", "unexpected"},
		{"space in value", "resistor R1 a gnd 10 ^k", "unexpected \"k\""},
		{"NaN", "resistor R1 a gnd ^NaN", "unexpected \"N\""},
		{"overflow", "resistor R1 a gnd ^1e999", "out of range"},
		{"zero", "resistor R1 a gnd ^0", "value > 0"},
		{"negative C", "capacitor C1 a gnd ^-1p", "value > 0"},
		{"wrong unit", "capacitor C1 a gnd 1n^H", "unexpected \"H\""},
		{"missing gain", "vcvs E1 a gnd sense=b,gnd^", "needs gain="},
		{"missing sense", "vccs G1 a gnd gm=1m^", "needs sense="},
		{"sense one node", "vcvs E1 a gnd sense=^b gain=2", "two nodes"},
		{"sense same node", "vcvs E1 a gnd sense=^b,b gain=2", "twice"},
		{"unknown option", "vcvs E1 a gnd sense=b,gnd ^gm=2", "unknown option \"gm=\""},
		{"option twice", "vcvs E1 a gnd sense=b,gnd gain=1 ^gain=2", "given twice"},
		{"empty option", "vcvs E1 a gnd sense=b,gnd gain=^", "has no value"},
		{"bad option value", "vccs G1 a gnd sense=b,gnd gm=1m^m", "unexpected"},
		{"positional after option", "vcvs E1 a gnd sense=b,gnd gain=2 ^x", "after the options"},
		{"sense unknown part", "resistor R1 a gnd 1k\nccvs H1 b gnd sense=^R9 r=1k", "no part called R9"},
		{"sense isource", "isource I1 gnd a 1m\nresistor R1 a gnd 1k\ncccs F1 b gnd sense=^I1 gain=2", "cannot be sensed"},
		{"sense vccs", "vccs G1 a gnd sense=b,gnd gm=1m\ncccs F1 b gnd sense=^G1 gain=2", "cannot be sensed"},
		{"opamp same inputs", "opamp U1 a ^a out", "both inputs"},
		{"opamp bad a0", "opamp U1 a b out a0=^0", "must be > 0"},
		{"opamp negative ro", "opamp U1 a b out ro=^-1", "must be ≥ 0"},
		{"opamp unknown option", "opamp U1 a b out ^gain=2", "unknown option"},
		{"port arity", "port p1 a^", "port NAME A B"},
		{"port same", "port p1 a ^a", "both ends"},
		{"column counts characters", "capacitor C0 a gnd 1µ # µµ\n# µµ\nresistor R1 a gnd 4µ7^µ", "unexpected"},
		{"tab separated", "resistor\tR1\ta\tgnd\t1^x", "unexpected \"x\""},
		{"comment after", "resistor R1 a gnd ^k  # 1k", "no digits"},
		{"empty", "^# nothing here", "no parts"},
		{"options on resistor", "resistor R1 a gnd 1k ^tol=1%", "takes no options"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			line, col := 0, 0
			var clean strings.Builder
			for i, l := range strings.Split(c.text, "\n") {
				if j := strings.Index(l, "^"); j >= 0 {
					line, col = i+1, len([]rune(l[:j]))+1
					l = l[:j] + l[j+1:]
				}
				if i > 0 {
					clean.WriteByte('\n')
				}
				clean.WriteString(l)
			}
			_, err := Parse(clean.String())
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("Parse(%q) = %v, want an ErrorList", clean.String(), err)
			}
			e := list[0]
			if e.Line != line || e.Column != col || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("got %d:%d: %s\nwant %d:%d: …%s…", e.Line, e.Column, e.Msg, line, col, c.msg)
			}
		})
	}
}

func TestParseErrorLimit(t *testing.T) {
	junk := strings.Repeat("bogus line\n", 10000)
	_, err := Parse(junk)
	var list ErrorList
	if !errors.As(err, &list) || len(list) != MaxErrors+1 {
		t.Fatalf("got %d errors, want %d", len(list), MaxErrors+1)
	}
	if !strings.Contains(list[MaxErrors].Msg, "too many errors") {
		t.Errorf("last error %q", list[MaxErrors].Msg)
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"resistor R1 a gnd 4k7\nport p a gnd",
		"opamp U1 in fb out a0=100k gbw=1M ro=50\nresistor R1 fb gnd 2k",
		"ccvs H1 a gnd sense=R1 r=1k\nresistor R1 a gnd 1",
		"vcvs E1 a gnd sense=b,gnd gain=2 # c",
		"port p a\n\t\tresistor",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, err := Parse(s)
		if err == nil {
			if c == nil || len(c.Parts) == 0 {
				t.Fatal("nil circuit without error")
			}
			return
		}
		var list ErrorList
		if !errors.As(err, &list) || len(list) == 0 {
			t.Fatalf("error %v is not a non-empty ErrorList", err)
		}
		lines := strings.Count(s, "\n") + 1
		for _, e := range list {
			if e.Line < 1 || e.Line > lines || e.Column < 1 {
				t.Fatalf("error %v outside the text (%d lines)", e, lines)
			}
		}
	})
}

// Ladder has the nodes it is asked for, and parses.
func TestLadder(t *testing.T) {
	for _, n := range []int{4, 5, 50, 200} {
		c, err := Parse(Ladder(n))
		if err != nil {
			t.Fatalf("Ladder(%d): %v", n, err)
		}
		if got := len(c.Nodes) - 1; got != n { // Nodes[0] is gnd
			t.Errorf("Ladder(%d) has %d nodes besides gnd", n, got)
		}
	}
}
