package value

import (
	"math"
	"strconv"
	"strings"
)

var formatPrefixes = []struct {
	exp int
	sym string
}{
	{-15, "f"}, {-12, "p"}, {-9, "n"}, {-6, "µ"}, {-3, "m"}, {0, ""},
	{3, "k"}, {6, "M"}, {9, "G"}, {12, "T"},
}

// Format writes v in engineering notation with sig significant digits
// (at least 1) and an SI prefix chosen so the mantissa lies in [1, 1000),
// followed by unit. Zero is written "0 unit"; values beyond the prefix range
// fall back to an exponent. Non-finite values are written "—" so a page never
// shows NaN or Inf.
func Format(v float64, unit string, sig int) string {
	if sig < 1 {
		sig = 1
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	sep := " "
	if unit == "" {
		sep = ""
	}
	if v == 0 {
		return "0" + sep + unit
	}
	sign := ""
	if v < 0 {
		sign = "−" // U+2212, the typographic minus
		v = -v
	}
	// Round to sig digits first, so 999.96 becomes 1.00 k rather than 1000.
	e := int(math.Floor(math.Log10(v)))
	scale := math.Pow10(sig - 1 - e)
	r := math.Round(v*scale) / scale
	if r >= math.Pow10(e+1) {
		e++
	}
	eng := 3 * int(math.Floor(float64(e)/3))
	if eng < formatPrefixes[0].exp || eng > formatPrefixes[len(formatPrefixes)-1].exp {
		s := strconv.FormatFloat(r, 'e', sig-1, 64)
		return sign + strings.Replace(s, "e", "×10^", 1) + sep + unit
	}
	m := r / math.Pow10(eng)
	decimals := sig - 1 - (e - eng)
	if decimals < 0 {
		decimals = 0
	}
	sym := ""
	for _, p := range formatPrefixes {
		if p.exp == eng {
			sym = p.sym
		}
	}
	if unit == "" && sym != "" {
		sep = ""
	} else if sym != "" || unit != "" {
		sep = " "
	}
	return sign + strconv.FormatFloat(m, 'f', decimals, 64) + sep + sym + unit
}

// Exact writes x so that Parse reads back exactly the same float64, as
// briefly as it can: with an SI prefix where a short mantissa is exact
// (4.7e-10 → "470p", 10000 → "10k"), else in Go's shortest round-trip form.
// Generated circuit text uses it, so a user's edit of one value leaves every
// other value as it was.
func Exact(x float64) string {
	plain := strconv.FormatFloat(x, 'g', -1, 64)
	if x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return plain
	}
	e := int(math.Floor(math.Log10(math.Abs(x))/3)) * 3
	sym := ""
	found := false
	for _, p := range formatPrefixes {
		if p.exp == e {
			sym, found = p.sym, true
		}
	}
	if !found {
		return plain
	}
	// The shortest mantissa that reads back exactly: dividing by the power
	// of ten can leave a tail (470.00000000000006) that a shorter decimal
	// avoids.
	for digits := 1; digits <= 17; digits++ {
		m := strconv.FormatFloat(x/math.Pow10(e), 'f', -1, 64)
		if digits < 17 {
			m = strconv.FormatFloat(x/math.Pow10(e), 'g', digits, 64)
		}
		if strings.ContainsAny(m, "eE") {
			continue
		}
		if back, err := Parse(m+sym, ""); err == nil && back == x {
			return m + sym
		}
	}
	return plain
}
