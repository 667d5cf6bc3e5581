// Package eseries knows the preferred number series of IEC 60063 (the
// "E series" in which resistors and capacitors are made) and the tolerance
// letters of IEC 60062.
//
// # Series
//
// A series EN divides every decade into N steps of roughly equal ratio,
// 10^(1/N), so that parts with tolerance about half a step cover the decade
// without gaps. Each series is tabulated as mantissas in [1, 10) and repeats in
// every decade: E24 holds 1.0 1.1 1.2 … 9.1, so 4.7 Ω, 47 Ω, 4.7 kΩ and 4.7 pF
// are all E24 values.
//
// The tables are the published lists, not the formula round(10^(i/N)). For
// the three-digit series E48, E96 and E192 list and formula agree except that
// E192 has 9.20 where the formula gives 9.19. The two-digit series E6, E12 and
// E24 depart from the formula at 2.7 3.0 3.3 3.6 3.9 4.3 4.7 and 8.2. E12 is
// every second E24 value and E6 every fourth; E96 is every second E192 value
// and E48 every fourth. The package offers E6 to E192; E3 is left out.
//
// Each Series carries the tolerance it is customarily paired with (E24 ±5 %,
// E96 ±1 %, …). Look one up by name, in either case:
//
//	s, ok := eseries.ByName("e96") // s == eseries.E96, ok == true
//	s.Nearest(4990)                // 4990
//	s.Nearest(5000)                // 4990 (the next value is 5110)
//	lo, hi := s.Bracket(5000)      // 4990, 5110
//
// Nearest chooses in the ratio sense (which of x/lo and hi/x is smaller), the
// same sense in which the series are evenly spaced.
//
// # Ratios
//
// BestRatio picks the two series values, both within a range of allowed
// values, whose quotient is closest to a wanted ratio. A divider, a gain or a
// bridge is set by a ratio of two parts, so this is how a computed design
// becomes one that can be built. The caller turns the circuit's need into a
// ratio:
//
//	inverting gain −G:         R2/R1 = G
//	non-inverting gain G:      R2/R1 = G − 1  (G = 1 + R2/R1)
//	divider Vout = k·Vin:      Rtop/Rbottom = 1/k − 1
//
// For example, a non-inverting gain of 11 from E24 parts between 1 kΩ and
// 100 kΩ:
//
//	num, den, relErr, err := eseries.E24.BestRatio(11-1, 1e3, 100e3)
//	// num 33000, den 3300, relErr 0: R2 = 33 kΩ, R1 = 3.3 kΩ
//
// Several pairs are often equally good (10k/1k … 100k/10k here); BestRatio
// then takes the one centred in the range, so the choice is deterministic.
//
// # Tolerance letters
//
// IEC 60062 marks a part's tolerance with a letter: F ±1 %, J ±5 %, K ±10 %
// and so on. ToleranceCode looks a letter up; ParseTolerance accepts what a
// person types into a form, either a letter or a percentage:
//
//	eseries.ParseTolerance("F")     // 0.01
//	eseries.ParseTolerance("0.5 %") // 0.005
//	eseries.ParseTolerance("±2%")   // 0.02
//	eseries.ParseTolerance("2")     // 0.02 (a bare number is a percentage)
//
// # Errors and panics
//
// Trouble in what a user supplied (a ratio that is not positive, a range with
// no series value in it, a tolerance that does not parse) is returned as an
// error whose message names the parameter and the value. Misuse by the
// program panics: calling a method on the zero Series, or asking Nearest or
// Bracket about a value that is not positive and finite.
package eseries
