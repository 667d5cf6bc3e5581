// Package value reads and writes the numbers a designer types: decimal
// numbers with an optional SI prefix and unit symbol, and the RKM code of
// IEC 60062 that resistor and capacitor markings use.
//
// Accepted forms, all case-sensitive as the SI Brochure (BIPM, 9th ed.,
// 2019) writes the prefixes — m is milli, M is mega:
//
//	2200        plain decimal
//	2.2e3       decimal with exponent
//	2.2k        SI prefix: f p n u µ m k M G T
//	2.2kΩ       prefix and unit symbol (Ω or ohm, F, H, V, A, S, Hz, and the
//	            noise densities V/√Hz and A/√Hz, also written V/rtHz, A/rtHz)
//	2k2  4K7    RKM: the multiplier letter stands for the decimal point
//	2R2  R47    RKM with R marking the decimal point of a plain number
//	4n7  1µ0    RKM with the other prefixes
//
// Anything else — 4k7k, 1..2, NaN, 1e999, a prefix with an exponent —
// is rejected with a *SyntaxError that carries the byte offset of the
// offending character, so callers can report a line and column. Writing
// mega as "meg" (1meg, 50MEG) gets a hint: M is mega and m is milli.
//
// ParseGain reads a dimensionless gain (an op amp's a0, a controlled
// source's gain) and also accepts it in decibels, a plain number followed
// by dB, read as an amplitude ratio 10^(x/20):
//
//	100dB       1e5, exactly
//	-6dB        0.501
//	106.02dB    about 200 000
//	200k        plain values as Parse reads them
//
// Format writes a value back in engineering notation with an SI prefix,
// the form every page of the project shows:
//
//	value.Format(4700, "Ω", 3)     // "4.70 kΩ"
//	value.Format(1.59e-4, "H", 3)  // "159 µH"
package value
