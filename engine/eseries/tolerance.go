package eseries

import (
	"fmt"
	"strconv"
	"strings"
)

// ToleranceCode returns the tolerance, as a fraction, that an IEC 60062
// letter stands for: B ±0.1 %, C ±0.25 %, D ±0.5 %, F ±1 %, G ±2 %, J ±5 %,
// K ±10 %, M ±20 %. The standard writes capitals; a lower-case letter is
// accepted too. ok is false for anything else, including the standard's
// letters for asymmetric or finer tolerances, which this package does not
// cover.
func ToleranceCode(letter string) (fraction float64, ok bool) {
	// F and K are checked against a located text; the other six are recalled
	// from memory (see the tests).
	switch strings.ToUpper(letter) {
	case "B":
		return 0.001, true
	case "C":
		return 0.0025, true
	case "D":
		return 0.005, true
	case "F":
		return 0.01, true
	case "G":
		return 0.02, true
	case "J":
		return 0.05, true
	case "K":
		return 0.1, true
	case "M":
		return 0.2, true
	}
	return 0, false
}

// ParseTolerance reads a tolerance as a person types it and returns it as a
// fraction. It accepts an IEC 60062 letter ("F"), or a percentage with or
// without the sign and a space before it ("1%", "0.5 %", "1"), optionally
// preceded by "±" or "+/-". A percentage must be above 0 and below 100.
// Surrounding spaces are ignored. The error says what was wrong.
func ParseTolerance(s string) (float64, error) {
	t := strings.TrimSpace(s)
	for _, p := range []string{"±", "+/-"} {
		if rest, ok := strings.CutPrefix(t, p); ok {
			t = strings.TrimSpace(rest)
			break
		}
	}
	if t == "" {
		return 0, fmt.Errorf(`eseries: tolerance %q is empty; want a letter such as "F" or a percentage such as "1%%"`, s)
	}
	if isLetters(t) {
		if f, ok := ToleranceCode(t); ok {
			return f, nil
		}
		return 0, fmt.Errorf("eseries: tolerance %q: %q is not an IEC 60062 tolerance letter known here (B C D F G J K M)", s, t)
	}
	num := strings.TrimSpace(strings.TrimSuffix(t, "%"))
	if !isDecimal(num) {
		return 0, fmt.Errorf(`eseries: tolerance %q: %q is not a number; want a letter such as "F" or a percentage such as "1%%"`, s, num)
	}
	// Parsing "n e-2" rounds once, so "0.1%" is exactly the float64 0.001.
	f, err := strconv.ParseFloat(num+"e-2", 64)
	if err != nil {
		return 0, fmt.Errorf("eseries: tolerance %q: %q is not a number", s, num)
	}
	switch {
	case f < 0:
		return 0, fmt.Errorf("eseries: tolerance %q is negative; a tolerance is written without its sign, as in \"5%%\"", s)
	case f == 0:
		return 0, fmt.Errorf("eseries: tolerance %q is zero; it must be above 0 %%", s)
	case f >= 1:
		return 0, fmt.Errorf("eseries: tolerance %q is 100 %% or more; it must be below 100 %%", s)
	}
	return f, nil
}

func isLetters(s string) bool {
	for _, r := range s {
		if !('A' <= r && r <= 'Z' || 'a' <= r && r <= 'z') {
			return false
		}
	}
	return true
}

// isDecimal reports whether s is an optionally signed decimal number without
// exponent: digits with at most one point, at least one digit.
func isDecimal(s string) bool {
	s = strings.TrimPrefix(strings.TrimPrefix(s, "-"), "+")
	digits, points := 0, 0
	for _, r := range s {
		switch {
		case '0' <= r && r <= '9':
			digits++
		case r == '.':
			points++
		default:
			return false
		}
	}
	return digits > 0 && points <= 1
}
