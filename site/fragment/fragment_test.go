package fragment

import (
	"strings"
	"testing"
)

func TestRoundTrip(t *testing.T) {
	var p Pairs
	p.Add("R1", "4k7")
	p.Add("f", "1.5 k") // a space survives as "+"
	p.Add("aid.t1", "pm<45")
	p.Add("port", "a,b")
	p.Add("port", "out")
	s := p.Encode()
	if s != "R1=4k7&f=1.5+k&aid.t1=pm%3C45&port=a%2Cb&port=out" {
		t.Errorf("Encode = %q", s)
	}
	for _, frag := range []string{s, "#" + s, s + "&", "&&" + s} {
		got, err := Parse(frag, Repeatable("port"))
		if err != nil {
			t.Fatalf("Parse(%q): %v", frag, err)
		}
		if got.Encode() != s {
			t.Errorf("Parse(%q) = %q", frag, got.Encode())
		}
	}
	if v, ok := p.Get("port"); !ok || v != "a,b" {
		t.Errorf("Get(port) = %q, %v: want the first", v, ok)
	}
}

// TestRefused: each malformed fragment is refused whole; a duplicate names
// its key.
func TestRefused(t *testing.T) {
	for _, c := range []struct{ frag, key, frag2 string }{
		{"R1", "", "no “=”"},
		{"R1=%zz", "", "escaped"},
		{"R1=%0", "", "escaped"},
		{"R1=%00", "", "not allowed"},
		{"R1=a%0Ab", "", "not allowed"},
		{"R1=%FF", "", "not allowed"},
		{"R1=" + strings.Repeat("9", MaxValue+1), "", "longer than 64"},
		{strings.Repeat("R1=1&", MaxLength/5+1), "", "longer than 4096"},
		{"R1=1&R1=2", "R1", `"R1" appears twice`},
		{"c=x&c=y", "c", "appears twice"},
	} {
		_, err := Parse(c.frag, Repeatable("port"))
		e, ok := err.(*Error)
		if !ok || e.Key != c.key || !strings.Contains(e.Msg, c.frag2) {
			t.Errorf("Parse(%.40q) = %v, want key %q and …%s…", c.frag, err, c.key, c.frag2)
		}
	}
	// Skipped keys are not read at all, so their values may be anything.
	got, err := Parse("c=%zz&R1=1", Skip("c"))
	if err != nil || got.Encode() != "R1=1" {
		t.Errorf("Skip: %q, %v", got.Encode(), err)
	}
}

func FuzzParse(f *testing.F) {
	f.Add("R1=10k&R2=4k7&f=1k&from=10&to=100M&points=400")
	f.Add("p=t&%zz=%%")
	f.Add("port=a&port=b&aid.t1=z%3Aout%3E1k")
	f.Fuzz(func(t *testing.T, frag string) {
		p, err := Parse(frag, Repeatable("port"))
		if err != nil {
			return
		}
		// What was accepted is written back and read again the same.
		q, err := Parse(p.Encode(), Repeatable("port"))
		if err != nil || q.Encode() != p.Encode() {
			t.Errorf("%q does not round-trip: %v", p.Encode(), err)
		}
	})
}
