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
// (below 1 f or from 1000 T) fall back to an exponent, "4.941×10^-324 Hz".
// Non-finite values are written "—" so a page never shows NaN or Inf.
//
// The digits are those of the shortest decimal that reads back as v (Go's
// strconv and JavaScript's Number both give it), rounded half up to sig
// digits: 0.15 written with one digit is 0.2, as it was typed. Every
// float64, from the smallest subnormal to the largest, is written without
// overflow (a subnormal's digits come from its exact value). The pages' script formats its chart readouts the same way
// (formatValue in site/assets/plothover.js, held to this function by a
// browser test).
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
	digits, e := roundDigits(v, sig)
	eng := 3 * int(math.Floor(float64(e)/3))
	if eng < formatPrefixes[0].exp || eng > formatPrefixes[len(formatPrefixes)-1].exp {
		mant := digits[:1]
		if sig > 1 {
			mant += "." + digits[1:]
		}
		exp := strconv.Itoa(max(e, -e))
		if len(exp) < 2 {
			exp = "0" + exp
		}
		if e < 0 {
			exp = "-" + exp
		} else {
			exp = "+" + exp
		}
		return sign + mant + "×10^" + exp + sep + unit
	}
	// The mantissa has e−eng+1 digits before its point.
	whole := e - eng + 1
	mant := digits + strings.Repeat("0", max(0, whole-sig))
	if sig > whole {
		mant = digits[:whole] + "." + digits[whole:]
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
	return sign + mant + sep + sym + unit
}

// smallestNormal is the smallest positive float64 with a full 53-bit
// significand; below it (the subnormals) precision falls away bit by bit.
const smallestNormal = 0x1p-1022

// roundDigits returns the first sig significant digits of v > 0, rounded
// half up from the shortest decimal that reads back as v, and the power of
// ten of the first: ("471", 3) for 4705.2 and sig 3. A subnormal's shortest
// decimal can have fewer digits than its value deserves (the smallest is
// "5e-324", and is 4.94…e-324), so its digits are rounded from its exact
// value instead; a tie is impossible there.
func roundDigits(v float64, sig int) (digits string, exp int) {
	prec := -1
	if v < smallestNormal {
		prec = sig - 1
	}
	s := strconv.FormatFloat(v, 'e', prec, 64) // "4.7052e+03", "5e-324"
	i := strings.IndexByte(s, 'e')
	exp, _ = strconv.Atoi(s[i+1:])
	d := []byte(s[:1] + strings.Replace(s[1:i], ".", "", 1))
	if len(d) <= sig {
		return string(d) + strings.Repeat("0", sig-len(d)), exp
	}
	up := d[sig] >= '5'
	d = d[:sig]
	for k := sig - 1; up && k >= 0; k-- {
		if d[k] == '9' {
			d[k] = '0'
			continue
		}
		d[k]++
		up = false
	}
	if up { // 9.99… became 10.0…
		d[0] = '1'
		exp++
	}
	return string(d), exp
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
