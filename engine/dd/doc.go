// Package dd is double-double arithmetic: a number carried as the unevaluated
// sum hi + lo of two float64, which gives about 106 bits of significand —
// twice the working precision — at a few times the cost of float64.
//
// It exists for one job: residuals of the circuit equations accurate enough
// that iterative refinement can recover what assembling the matrix in
// float64 loses (see package zport/engine/mna). Everything rests on two
// error-free transformations, which return a result and its exact rounding
// error as a pair of float64:
//
//	s, e := dd.TwoSum(a, b)   // s + e == a + b exactly (Knuth)
//	p, e := dd.TwoProd(a, b)  // p + e == a · b exactly (Dekker; an FMA where the hardware has one)
//
// Float and Complex build the arithmetic on them in the usual way (Dekker,
// "A floating-point technique for extending the available precision",
// Numer. Math. 18, 1971; the accurate sum of Ogita, Rump and Oishi, SIAM J.
// Sci. Comput. 26(6), 2005, is the same idea applied to a whole sum). Each
// operation's relative error is a small multiple of U2 = 2⁻¹⁰⁶ (Joldes,
// Muller and Popescu, ACM TOMS 44(2), 2017, give tight constants: 3·U2 for
// Add, 5·U2 for Mul [memory]); callers that state error bounds use generous
// multiples of U2.
//
//	x := dd.Recip(3)              // 1/3 to about 32 digits
//	y := x.MulF(3).Add(dd.F(-1))  // about 1e-33, not 0: 1/3 is not exact
//
// TwoProd gives bit-identical results on every platform: where Go has no
// FMA instruction (GOARCH=wasm) it splits the operands instead (Veltkamp's
// splitting), which is exact too as long as no operand exceeds about 1e300.
// Overflow and underflow are not handled: the values met in circuit
// equations lie far inside the float64 range.
package dd
