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

// TestRefused: a malformed setting is left out and reported, naming its
// key when it could be read; the others are read. A fragment too long to
// be a link is refused whole.
func TestRefused(t *testing.T) {
	for _, c := range []struct{ frag, key, msg string }{
		{"R1", "", "no “=”"},
		{"R1=%zz", "R1", "escaped"},
		{"%zz=1", "", "escaped"},
		{"R1=%0", "R1", "escaped"},
		{"R1=%00", "R1", "not allowed"},
		{"R1=a%0Ab", "R1", "not allowed"},
		{"R1=%FF", "R1", "not allowed"},
		{"a%00b=1", "", "not allowed"},
		{"R1=" + strings.Repeat("9", MaxValue+1), "R1", "longer than 64"},
		{"R1=1&R1=2", "R1", `"R1" appears twice`},
		{"R1=1&R1=2&R1=3", "R1", `"R1" appears twice`},
		{"c=x&c=y", "c", `"c" appears twice`},
	} {
		got, err := Parse(c.frag+"&f=1k", Repeatable("port"), Skip("c"))
		list, ok := err.(Errors)
		if !ok || len(list) != 1 || list[0].Key != c.key || !strings.Contains(list[0].Msg, c.msg) {
			t.Errorf("Parse(%.40q) = %v, want one error with key %q and …%s…", c.frag, err, c.key, c.msg)
		}
		if got.Encode() != "f=1k" {
			t.Errorf("Parse(%.40q) read %q, want the good setting alone", c.frag, got.Encode())
		}
	}
	got, err := Parse(strings.Repeat("R1=1&", MaxLength/5+1))
	if e, ok := err.(*Error); !ok || got != nil || !strings.Contains(e.Msg, "longer than 4096") {
		t.Errorf("an over-long fragment: %v, %v", got, err)
	}
	// Skipped keys are not read at all, so their values may be anything.
	got, err = Parse("c=%zz&R1=1", Skip("c"))
	if err != nil || got.Encode() != "R1=1" {
		t.Errorf("Skip: %q, %v", got.Encode(), err)
	}
	// Repeatable keys keep every value, in order.
	got, err = Parse("port=a&R1=1&port=b", Repeatable("port"))
	if err != nil || got.Encode() != "port=a&R1=1&port=b" {
		t.Errorf("Repeatable: %q, %v", got.Encode(), err)
	}
}

func FuzzParse(f *testing.F) {
	f.Add("R1=10k&R2=4k7&f=1k&from=10&to=100M&points=400")
	f.Add("p=t&%zz=%%")
	f.Add("port=a&port=b&aid.t1=z%3Aout%3E1k")
	f.Fuzz(func(t *testing.T, frag string) {
		p, err := Parse(frag, Repeatable("port"))
		if _, whole := err.(*Error); whole {
			return
		}
		// What was accepted is written back and read again the same.
		q, err := Parse(p.Encode(), Repeatable("port"))
		if err != nil || q.Encode() != p.Encode() {
			t.Errorf("%q does not round-trip: %v", p.Encode(), err)
		}
	})
}
