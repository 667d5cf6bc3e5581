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
	if u1.Noise != (Noise{}) || r1.Noise.Off {
		t.Errorf("noise defaults: U1 %+v, R1 %+v", u1.Noise, r1.Noise)
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
		{"opamp bad cid", "opamp U1 a b out cid=^0", "opamp U1: option cid= must be > 0"},
		{"opamp negative ro", "opamp U1 a b out ro=^-1", "must be ≥ 0"},
		{"opamp unknown option", "opamp U1 a b out ^gain=2", "unknown option"},
		{"port arity", "port p1 a^", "port NAME A B"},
		{"port same", "port p1 a ^a", "both ends"},
		{"column counts characters", "capacitor C0 a gnd 1µ # µµ\n# µµ\nresistor R1 a gnd 4µ7^µ", "unexpected"},
		{"tab separated", "resistor\tR1\ta\tgnd\t1^x", "unexpected \"x\""},
		{"comment after", "resistor R1 a gnd ^k  # 1k", "no digits"},
		{"empty", "^# nothing here", "no parts"},
		{"unknown option on resistor", "resistor R1 a gnd 1k ^tol=1%", "unknown option \"tol=\" for resistor (takes noise=)"},
		{"resistor noise word", "resistor R1 a gnd 1k noise=^no", "takes on or off"},
		{"capacitor noise", "capacitor C1 a gnd 1n ^noise=off", "takes no options"},
		{"opamp negative en", "opamp U1 a b out en=^-1n", "must be ≥ 0"},
		{"opamp en unit", "opamp U1 a b out en=4n^A/√Hz", "unexpected \"A\""},
		{"opamp zero corner", "opamp U1 a b out in=1p fci=^0", "must be > 0"},
		{"vnoise needs density", "vnoise Vn a gnd^", "needs density="},
		{"vnoise value", "vnoise Vn a gnd ^1n", "takes 2 nodes; unexpected"},
		{"vnoise negative", "vnoise Vn a gnd density=^-1n", "must be ≥ 0"},
		{"inoise needs one", "inoise In gnd a fc=1k^", "needs one of density=, shot= or thermal="},
		{"inoise two ways", "inoise In gnd a density=1p ^shot=1u", "not two"},
		{"inoise negative shot", "inoise In gnd a shot=^-1u", "must be ≥ 0"},
		{"inoise shot with corner", "inoise In gnd a shot=1u ^fc=10", "1/f corner of a density="},
		{"inoise shot unit", "inoise In gnd a shot=1u^V", "unexpected \"V\""},
		{"sense inoise", "inoise In gnd a density=1p\nresistor R1 a gnd 1k\ncccs F1 b gnd sense=^In gain=2", "cannot be sensed"},

		// Hints for the usual slips.
		{"meg lower case", "resistor R1 a gnd 1^meg", "M is mega and m is milli (SI); did you mean 1M?"},
		{"MEG upper case", "resistor R1 a gnd 50^MEG", "did you mean 50M?"},
		{"Meg with unit", "resistor R1 a gnd 4.7^Megohm", "did you mean 4.7M?"},
		{"meg in an option", "opamp U1 a b out rid=10^meg", "did you mean 10M?"},
		{"sense with a space", "vccs G1 c e sense=b^ e gm=1m", "did you mean sense=b,e?"},
		{"sense with a space after the comma", "vcvs E1 a gnd sense=b,^ e gain=2", "did you mean sense=b,e?"},
		{"sense missing its second node", "vcvs E1 a gnd gain=2 sense=b,^", "the second is missing"},
		{"option typo", "bjt Q1 c b e ic=1m ^bta=200", "did you mean beta=?"},
		{"option in the wrong case", "mos M1 d g s ^ID=1m vov=0.2", "did you mean id=?"},
		{"opamp option typo", "opamp U1 a b out ^gbv=1M", "did you mean gbw=?"},
		{"kind typo", "^mosfet M1 d g s gm=1m", "did you mean mos?"},
		{"dB on a gain", "vcvs E1 a gnd sense=b,gnd gain=20^db", "unexpected \"d\""},
		{"dB with a prefix", "opamp U1 a b out a0=1^kdB", "plain number"},

		// Transistors: each error names the part and the option.
		{"bjt zero ic", "bjt Q1 c b e ic=^0", "bjt Q1: option ic= (the collector bias current) must be > 0"},
		{"bjt negative ic", "bjt Q1 c b e ic=^-1m", "bjt Q1: option ic="},
		{"bjt zero beta", "bjt Q1 c b e ic=1m beta=^0", "bjt Q1: option beta= (the small-signal current gain) must be > 0"},
		{"bjt negative beta", "bjt Q1 c b e ic=1m beta=^-50", "option beta="},
		{"bjt zero ft", "bjt Q1 c b e ic=1m ft=^0", "bjt Q1: option ft= (the transition frequency) must be > 0"},
		{"bjt negative ft", "bjt Q1 c b e ic=1m ft=^-1G", "option ft="},
		{"bjt negative Cpi", "bjt Q1 c b e ic=1m cmu=10p ^ft=1G", "bjt Q1: the derived Cπ = gm/(2π·ft) − cmu = −3.84 pF is negative"},
		{"bjt gm and ic", "bjt Q1 c b e gm=40m ^ic=1m", "bjt Q1: give gm= or ic=, not both"},
		{"bjt ic and gm", "bjt Q1 c b e ic=1m ^gm=40m", "bjt Q1: give gm= or ic=, not both"},
		{"bjt no bias", "bjt ^Q1 c b e beta=100", "bjt Q1 needs its collector bias current ic="},
		{"bjt va without ic", "bjt Q1 c b e gm=40m ^va=50", "bjt Q1: va= needs ic="},
		{"bjt va and ro", "bjt Q1 c b e ic=1m va=50 ^ro=10k", "bjt Q1: give va= or ro=, not both"},
		{"bjt collector on emitter", "bjt ^Q1 c b c ic=1m", "collector and emitter on one node"},
		{"bjt too few nodes", "bjt Q1 c b^ ic=1m", "takes 3 nodes"},
		{"bjt sensed", "bjt Q1 c b gnd ic=1m\nresistor R1 c gnd 1k\ncccs F1 a gnd sense=^Q1 gain=2", "cannot be sensed"},
		{"mos zero id", "mos M1 d g s id=^0 vov=0.2", "mos M1: option id= (the drain bias current) must be > 0"},
		{"mos negative id", "mos M1 d g s id=^-1u vov=0.2", "mos M1: option id="},
		{"mos gm and id", "mos M1 d g s gm=1m ^id=100u vov=0.2", "mos M1: give gm= or id= with vov=, not both"},
		{"mos id without vov", "mos M1 d g s ^id=100u", "mos M1: id= needs vov="},
		{"mos vov without id", "mos M1 d g s gm=1m ^vov=0.2", "mos M1: give gm= or id= with vov=, not both"},
		{"mos lambda without id", "mos M1 d g s gm=1m ^lambda=0.1", "mos M1: lambda= needs id="},
		{"mos lambda and ro", "mos M1 d g s id=1m vov=0.2 lambda=0.1 ^ro=10k", "give lambda= or ro=, not both"},
		{"mos no gm", "mos ^M1 d g s ro=10k", "mos M1 needs gm="},
		{"mos drain on source", "mos ^M1 d g d gm=1m", "drain and source on one node"},
		{"mos bad bulk", "mos M1 d g s gm=1m gmb=0.1m b=^x.y", "node name"},
		{"mos negative cgs", "mos M1 d g s gm=1m cgs=^-1f", "mos M1: option cgs= (the gate-source capacitance) must be ≥ 0"},
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

func TestParseNoise(t *testing.T) {
	text := `# noise options and sources (invented values)
opamp    U1 a b c en=4nV/√Hz fce=10Hz in=1fA/rtHz fci=100
resistor RL c gnd 10k noise=off
resistor R1 c b 1k noise=on
vnoise   Vn a gnd density=2n fc=1k
inoise   Ia gnd a density=3p
inoise   Id gnd b shot=1u
inoise   Ig gnd b thermal=1m
`
	c, err := Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	for name, want := range map[string]Noise{
		"U1": {V: 4e-9, VCorner: 10, I: 1e-15, ICorner: 100},
		"RL": {Off: true},
		"R1": {},
		"Vn": {V: 2e-9, VCorner: 1e3},
		"Ia": {I: 3e-12},
		"Id": {Shot: 1e-6},
		"Ig": {Thermal: 1e-3},
	} {
		p, _ := c.Part(name)
		if p.Noise != want {
			t.Errorf("%s: noise %+v, want %+v", name, p.Noise, want)
		}
	}
	if vn, _ := c.Part("Vn"); vn.Kind != VNoise || !vn.Kind.VoltageOutput() || vn.Kind.Controlled() {
		t.Errorf("vnoise kind %v", vn.Kind)
	}
	if in, _ := c.Part("Ia"); in.Kind != INoise || in.Kind.String() != "inoise" {
		t.Errorf("inoise kind %v", in.Kind)
	}
	if got := strings.Join(c.References(), " "); got != "U1" {
		t.Errorf("References = %q: noise sources are not references", got)
	}
	if got := strings.Join(c.Sources(), " "); got != "" {
		t.Errorf("Sources = %q: noise sources are not a gain's input", got)
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
		"bjt Q1 c b e ic=1m beta=120 va=60 ft=400M cmu=0.5p rb=150\nresistor RE e gnd 1k",
		"bjt Q1 c b e gm=40m ic=1m\nbjt Q2 c b c ic=1m cmu=10p ft=1G",
		"mos M1 d g s id=200u vov=0.25 lambda=0.08 cgs=40f cgd=5f gmb=0.3m b=sub gamma=1",
		"mos M1 d g s gm=1m ro=50k\nmos M2 d d gnd id=1u\nmos M3 d g s ID=1m bta=2",
		"opamp U1 a b out a0=100dB cid=2p ccm=5p\nvcvs E1 x gnd sense=a b gain=-6dB\nresistor R1 a gnd 1MEG",
		"resistor RL out gnd 10k noise=off\nvnoise Vn a b density=4nV/√Hz fc=10\ninoise Id gnd a shot=1u",
		"opamp U1 a b c en=4n fce=10 in=1f fci=100",
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
