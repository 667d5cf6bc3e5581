package site

import (
	"strconv"
	"strings"
)

// The engine's bytes are written into zport-engine.js as a JavaScript
// string in a base-122 encoding (after Kevin Albertson's Base-122, 2016
// [memory]): seven bits per character where base64 carries six, so the
// string is 8/7 of the bytes rather than 4/3 — a seventh smaller as
// loaded. The bits are read seven at a time, most significant first; a
// group is written as the ASCII character of that code, unless the code
// cannot stand in a double-quoted string of a script, inline in HTML
// included: NUL (the HTML parser replaces it), LF and CR (line
// terminators), the quote, the backslash and '<' (which could start
// "</script"). Such a group is written together with the group after it
// as one two-byte UTF-8 character, U+0080 + (i−1)·0x80 + next, where i
// (1…6) says which of those codes it stands for. The string starts with
// the number of bytes and a colon, so that the decoder knows where the
// padding of the last group begins. zport.js's decodeBase122 reads it.

// base122Banned are the seven-bit codes a string may not hold as
// themselves, in the order of their index i − 1.
var base122Banned = [...]byte{0, '\n', '\r', '"', '\\', '<'}

// base122Encode writes src in the base-122 encoding.
func base122Encode(src []byte) string {
	var b strings.Builder
	b.Grow(len(src)*8/7 + 16)
	b.WriteString(strconv.Itoa(len(src)))
	b.WriteByte(':')
	nbits := len(src) * 8
	group := func(k int) byte { // the k-th group of seven bits, zero-padded
		var g byte
		for i := 0; i < 7; i++ {
			g <<= 1
			if bit := k*7 + i; bit < nbits && src[bit/8]&(0x80>>(bit%8)) != 0 {
				g |= 1
			}
		}
		return g
	}
	groups := (nbits + 6) / 7
	for k := 0; k < groups; k++ {
		g := group(k)
		banned := -1
		for i, c := range base122Banned {
			if g == c {
				banned = i
			}
		}
		if banned < 0 {
			b.WriteByte(g)
			continue
		}
		k++
		next := group(k) // zero past the end
		b.WriteRune(rune(0x80 + banned<<7 + int(next)))
	}
	return b.String()
}
