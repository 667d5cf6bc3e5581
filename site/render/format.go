package render

import (
	"math"
	"math/cmplx"
	"strconv"

	"zport/engine/value"
)

// sig is the number of significant digits the panel shows.
const sig = 4

// negligible is the relative size below which one part of a complex value is
// treated as zero when naming an equivalent element: a reactance of 1e-12 Ω
// beside 10 kΩ is rounding, not a 16 F capacitor.
const negligible = 1e-9

// num writes x in the shortest form that reads back to the same float64;
// it is what data-re, data-im and data-value hold.
func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// degrees writes an angle in degrees with two decimals and a typographic
// minus, e.g. "−12.34°".
func degrees(d float64) string {
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
func phase(z complex128) float64 { return cmplx.Phase(z) * 180 / math.Pi }

// polar writes z as magnitude ∠ phase, e.g. "54.94 kΩ ∠ −0.01°".
func polar(z complex128, unit string) string {
	return value.Format(cmplx.Abs(z), unit, sig) + " ∠ " + degrees(phase(z))
}

// rect writes z as real ± j imaginary, each part with its own prefix and
// the unit, e.g. "54.94 kΩ − j3.210 Ω". A unit that reads badly with a
// prefix (a ratio such as V/V) is written once at the end instead:
// "−4.700 − j1.230m V/V".
func rect(z complex128, unit string) string {
	re, im := real(z), imag(z)
	sign := " + j"
	if im < 0 || (im == 0 && math.Signbit(im)) {
		sign = " − j"
	}
	if unit == "V/V" {
		return value.Format(re, "", sig) + sign + value.Format(math.Abs(im), "", sig) + " V/V"
	}
	return value.Format(re, unit, sig) + sign + value.Format(math.Abs(im), unit, sig)
}

// decibels writes 20·log10|z|, e.g. "88.33 dB".
func decibels(z complex128) string {
	m := cmplx.Abs(z)
	if m == 0 {
		return "−∞ dB"
	}
	db := 20 * math.Log10(m)
	s := strconv.FormatFloat(math.Abs(db), 'f', 2, 64) + " dB"
	if db < 0 && s != "0.00 dB" {
		s = "−" + s
	}
	return s
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
func sci(x float64) (mant, exp string) {
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
