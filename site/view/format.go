package view

import (
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"zport/engine/value"
)

// sig is the number of significant digits the panel shows.
const Sig = 4

// negligible is the relative size below which one part of an impedance is
// left out when naming its equivalent series element: a part that leaves
// the phase within 0.005° of 0° or ±90°, so that the series element agrees
// with the phase as the panel writes it (two decimals of a degree). Without
// it, 74 Ω in parallel with 100 pF would read "74.3 Ω + 45.8 mF" at 1 kHz,
// hiding that the element is a resistor.
var negligible = math.Tan(0.005 * math.Pi / 180)

// rounding is the relative size below which a part of a complex value is
// written as zero: it is the residue of floating-point arithmetic, and a
// display of "j9.8 × 10⁻²¹" would only hide the digits that matter.
const rounding = 1e-13

// num writes x in the shortest form that reads back to the same float64;
// it is what data-re, data-im and data-value hold.
func Num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// degrees writes an angle in degrees with two decimals and a typographic
// minus, e.g. "−12.34°".
func Degrees(d float64) string {
	if math.IsNaN(d) || math.IsInf(d, 0) {
		return "—"
	}
	s := strconv.FormatFloat(math.Abs(d), 'f', 2, 64) + "°"
	if d < 0 && s != "0.00°" {
		s = "−" + s
	}
	return s
}

// phase is the argument of z in degrees.
// A zero part counts as +0, so that −0 + j0 does not read as 180°.
func Phase(z complex128) float64 {
	re, im := real(z), imag(z)
	if re == 0 {
		re = 0
	}
	if im == 0 {
		im = 0
	}
	return math.Atan2(im, re) * 180 / math.Pi
}

// Polar writes z as magnitude ∠ phase, e.g. "54.94 kΩ ∠ −0.01°".
func Polar(z complex128, unit string) string { return PolarN(z, unit, Sig) }

// PolarN is Polar with n significant digits in the magnitude (at most
// Sig: fewer where fewer are certain).
func PolarN(z complex128, unit string, n int) string {
	m := cmplx.Abs(z)
	if m == 0 {
		return Magnitude(0, unit)
	}
	return MagnitudeN(m, unit, n) + " ∠ " + Degrees(Phase(z))
}

// CertainDigits is the number of significant digits of z that the error
// bound e leaves certain, ⌊−log₁₀(e/|z|)⌋, at least 1 (a value with none
// is shown as zero within its bound instead).
func CertainDigits(z complex128, e float64) int {
	if e == 0 {
		return 16
	}
	return max(1, int(math.Floor(-math.Log10(e/cmplx.Abs(z)))))
}

// Magnitude writes a real value in unit as the panel shows it: with an SI
// prefix for a physical unit ("4.700 kΩ"), as a plain number for a ratio
// ("" or "V/V"), where a prefix such as the m of "986.0m" reads badly, in
// degrees for "°" and decibels for "dB".
func Magnitude(v float64, unit string) string { return MagnitudeN(v, unit, Sig) }

// MagnitudeN is Magnitude with n significant digits.
func MagnitudeN(v float64, unit string, n int) string {
	switch unit {
	case "":
		return PlainN(v, n)
	case "V/V":
		return PlainN(v, n) + " V/V"
	case "°":
		return Degrees(v)
	case "dB":
		return DB(v)
	}
	s := value.Format(v, unit, n)
	if strings.Contains(s, "×10^") { // beyond the SI prefixes
		s = PlainN(v, n) + " " + unit
	}
	return s
}

// superscripts are the digits and minus of a written power of ten.
var superscripts = map[rune]string{'0': "⁰", '1': "¹", '2': "²", '3': "³", '4': "⁴",
	'5': "⁵", '6': "⁶", '7': "⁷", '8': "⁸", '9': "⁹", '-': "⁻"}

// plain writes a dimensionless number with sig significant digits: fixed
// point from 0.001 to 100 000, else mantissa × 10ⁿ; a typographic minus.
func Plain(v float64) string { return PlainN(v, Sig) }

// PlainN is Plain with n significant digits.
func PlainN(v float64, n int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	if v == 0 {
		return "0"
	}
	a := math.Abs(v)
	var s string
	if a >= 1e-3 && a < 1e5 {
		e := int(math.Floor(math.Log10(a)))
		d := n - 1 - e
		if d < 0 {
			d = 0
		}
		s = strconv.FormatFloat(a, 'f', d, 64)
		if r, _ := strconv.ParseFloat(s, 64); r >= math.Pow10(e+1) && d > 0 {
			s = strconv.FormatFloat(a, 'f', d-1, 64) // 9.9996 rounds to 10.000
		}
	} else {
		m := strconv.FormatFloat(a, 'e', n-1, 64)
		i := strings.IndexByte(m, 'e')
		exp, _ := strconv.Atoi(m[i+1:])
		var b strings.Builder
		for _, r := range strconv.Itoa(exp) {
			b.WriteString(superscripts[r])
		}
		s = m[:i] + " × 10" + b.String()
	}
	if v < 0 {
		s = "−" + s
	}
	return s
}

// dB writes a level in decibels with two decimals, e.g. "−3.01 dB".
func DB(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "—"
	}
	s := strconv.FormatFloat(math.Abs(x), 'f', 2, 64) + " dB"
	if x < 0 && s != "0.00 dB" {
		s = "−" + s
	}
	return s
}

// Rect writes z as real ± j imaginary, each part with its own prefix and
// the unit, e.g. "54.94 kΩ − j3.210 Ω". A ratio ("" or V/V) is written
// without prefixes, the unit once at the end: "−4.700 − j0.001230 V/V".
func Rect(z complex128, unit string) string { return RectN(z, unit, Sig, 0) }

// RectN is Rect with n significant digits, and a part within the error
// bound e written as zero.
func RectN(z complex128, unit string, n int, e float64) string {
	re, im := real(z), imag(z)
	m := cmplx.Abs(z)
	if math.Abs(re) <= math.Max(rounding*m, e) {
		re = 0
	}
	if math.Abs(im) <= math.Max(rounding*m, e) {
		im = 0
	}
	sign := " + j"
	if im < 0 {
		sign = " − j"
	}
	// Each part shows the digits the bound leaves it.
	nr, ni := n, n
	if e > 0 {
		if re != 0 {
			nr = min(n, CertainDigits(complex(re, 0), e))
		}
		if im != 0 {
			ni = min(n, CertainDigits(complex(im, 0), e))
		}
	}
	switch unit {
	case "", "V/V":
		s := PlainN(re, nr) + sign + PlainN(math.Abs(im), ni)
		if unit != "" {
			s += " " + unit
		}
		return s
	}
	return value.Format(re, unit, nr) + sign + value.Format(math.Abs(im), unit, ni)
}

// decibels writes 20·log10|z|, e.g. "88.33 dB".
func Decibels(z complex128) string {
	m := cmplx.Abs(z)
	if m == 0 {
		return "−∞ dB"
	}
	return DB(20 * math.Log10(m))
}

// SeriesElement names the two-element series circuit that has impedance z
// at frequency f hertz: a resistance in series with an inductance when the
// reactance is positive, with a capacitance when it is negative, written
// with three significant digits, e.g. "370 mΩ + 159 µH" or
// "12.0 kΩ + 3.30 nF". A part smaller than a billionth of |z| is dropped,
// as is the reactive part at f = 0; a value that is not finite gives "—".
func SeriesElement(z complex128, f float64) string {
	if cmplx.IsNaN(z) || cmplx.IsInf(z) {
		return "—"
	}
	r, x := real(z), imag(z)
	mag := cmplx.Abs(z)
	rs := value.Format(r, "Ω", 3)
	if f <= 0 || math.Abs(x) <= negligible*mag || math.IsInf(f, 0) {
		return rs
	}
	w := 2 * math.Pi * f
	var elem string
	if x > 0 {
		elem = value.Format(x/w, "H", 3)
	} else {
		elem = value.Format(-1/(w*x), "F", 3)
	}
	if math.Abs(r) <= negligible*mag {
		return elem
	}
	return rs + " + " + elem
}

// sci writes a small positive ratio such as an agreement as mantissa and
// power of ten for display, e.g. ("2.1", "−15") for 2.1e-15.
func Sci(x float64) (mant, exp string) {
	if x == 0 {
		return "0", ""
	}
	s := strconv.FormatFloat(x, 'e', 1, 64)
	i := len(s) - 1
	for i > 0 && s[i] != 'e' {
		i--
	}
	mant = s[:i]
	e, _ := strconv.Atoi(s[i+1:])
	exp = strconv.Itoa(e)
	if e < 0 {
		exp = "−" + strconv.Itoa(-e)
	}
	return mant, exp
}

// Eng writes v in engineering notation with as few digits as say it
// exactly, then a space, the SI prefix and the unit — how a parameter reads
// in copied results: 100000 → "100 k", 4700 Ω → "4.7 kΩ", 1e-12 F →
// "1 pF", 50 Ω → "50 Ω". A value beyond the prefixes keeps its exponent.
func Eng(v float64, unit string) string {
	s := value.Exact(v)
	mant, prefix := s, ""
	for _, p := range []string{"f", "p", "n", "µ", "m", "k", "M", "G", "T"} {
		if m, ok := strings.CutSuffix(s, p); ok {
			mant, prefix = m, p
			break
		}
	}
	if strings.HasPrefix(mant, "-") {
		mant = "−" + mant[1:]
	}
	if prefix+unit == "" {
		return mant
	}
	return mant + " " + prefix + unit
}
