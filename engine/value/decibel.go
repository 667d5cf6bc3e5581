package value

import (
	"math"
	"strings"
)

// DecibelSuffix marks a dimensionless gain written in decibels: 100dB.
const DecibelSuffix = "dB"

// ParseGain reads a dimensionless gain: anything Parse(text, "") accepts,
// or a plain decimal number followed by dB, read as 20·log10 of the gain
// (an amplitude ratio): 100dB is 1e5 exactly, −6dB about 0.501, 0dB is 1.
// A gain in decibels is positive; a decibel value takes no SI prefix and
// no RKM letter, since neither means anything on a logarithmic scale.
func ParseGain(text string) (float64, error) {
	body, ok := strings.CutSuffix(text, DecibelSuffix)
	if !ok {
		return Parse(text, "")
	}
	if body == "" {
		return 0, &SyntaxError{Text: text, Offset: 0, Msg: "a gain in dB needs a number before dB, as in 100dB"}
	}
	for i := 0; i < len(body); i++ {
		c := body[i]
		if !(c >= '0' && c <= '9' || c == '.' || c == '+' || c == '-' || c == 'e' || c == 'E') {
			return 0, &SyntaxError{Text: text, Offset: i, Msg: "a gain in dB is a plain number followed by dB (100dB, -6dB, 2.5e1dB); no prefix or RKM letter"}
		}
	}
	db, err := Parse(body, "")
	if err != nil {
		return 0, err
	}
	return fromDecibels(text, db)
}

// fromDecibels converts db decibels to the amplitude ratio 10^(db/20).
// Whole multiples of 20 dB use the exact powers of ten, so 100dB is 1e5
// to the last bit; text is for the error when the ratio overflows or
// underflows to zero.
func fromDecibels(text string, db float64) (float64, error) {
	e := db / 20
	var g float64
	if e == math.Trunc(e) && math.Abs(e) <= 308 {
		g = math.Pow10(int(e))
	} else {
		g = math.Pow(10, e)
	}
	if math.IsInf(g, 0) || g == 0 || math.IsNaN(g) {
		return 0, &SyntaxError{Text: text, Msg: "gain " + text + " is out of range"}
	}
	return g, nil
}
