package site

import (
	"bytes"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

// base122Decode mirrors zport.js's decodeBase122, for the round trip.
func base122Decode(s string) ([]byte, bool) {
	head, body, ok := strings.Cut(s, ":")
	n, err := strconv.Atoi(head)
	if !ok || err != nil {
		return nil, false
	}
	out := make([]byte, 0, n)
	acc, bits := 0, 0
	put := func(v int) {
		acc = acc<<7 | v
		bits += 7
		if bits >= 8 && len(out) < n {
			bits -= 8
			out = append(out, byte(acc>>bits))
			acc &= 1<<bits - 1
		}
	}
	for _, r := range body {
		if r < 0x80 {
			put(int(r))
			continue
		}
		i := int(r-0x80) >> 7
		if i >= len(base122Banned) {
			return nil, false
		}
		put(int(base122Banned[i]))
		put(int(r) & 0x7f)
	}
	return out, len(out) == n
}

// The encoding round-trips every length and byte pattern, never writes a
// character a script string cannot hold as itself, and costs 8/7 of the
// bytes (random bytes, like compressed ones).
func TestBase122(t *testing.T) {
	rng := rand.New(rand.NewPCG(122, 122))
	cases := [][]byte{nil, {0}, {0xff}, bytes.Repeat([]byte{0}, 50), bytes.Repeat([]byte{'\\'}, 7), []byte("</script>\n\r\"")}
	for n := 1; n < 300; n++ {
		b := make([]byte, n)
		for i := range b {
			b[i] = byte(rng.Uint32())
		}
		cases = append(cases, b)
	}
	big := make([]byte, 1<<20)
	for i := range big {
		big[i] = byte(rng.Uint32())
	}
	cases = append(cases, big)
	for _, c := range cases {
		s := base122Encode(c)
		if !utf8.ValidString(s) {
			t.Fatalf("%d bytes: not UTF-8", len(c))
		}
		if strings.ContainsAny(s, "\x00\n\r\"\\<") {
			t.Fatalf("%d bytes: the string holds a character it may not", len(c))
		}
		got, ok := base122Decode(s)
		if !ok || !bytes.Equal(got, c) {
			t.Fatalf("%d bytes do not survive the round trip", len(c))
		}
	}
	s := base122Encode(big)
	if r := float64(len(s)) / float64(len(big)); r > 8.0/7*1.002 {
		t.Errorf("%.4f bytes of text per byte; the encoding promises 8/7", r)
	}
}
