// Package feedback computes what a designer asks of a feedback stage at its
// ports: Blackman's impedance formula with its three terms, Bode's return
// ratio of a chosen reference element, the asymptotic gain model, and the
// stability margins of the loop.
//
// The reference element is a controlled source, an opamp or a transistor
// (its transconductance) of the circuit.
// Its return ratio T is found the way Bode defined it: zero every
// independent source, replace the reference's controlled output by an
// independent source of the same kind with test value 1, and take
// T = −k·x, where x is the control signal that comes back and k the
// reference's gain. T > 0 at DC means negative feedback.
//
// For a port (A, B):
//
//	Z₀      the port impedance with the reference's gain set to zero
//	T short the return ratio with the port shorted
//	T open  the return ratio with the port open
//	Z       = Z₀·(1 + T short)/(1 + T open)   (Blackman, 1943)
//
// and Z direct, the impedance of the full circuit from a nodal solution with
// a 1 A test current, as an independent check of Z. A voltage source wired
// exactly across a port is that port's driver: it is removed while the
// port's terms are computed, so a port at a source reports the impedance the
// source sees.
//
// Gains follow the asymptotic gain model (Middlebrook 1964; Rosenstark 1986):
// G = G∞·T/(1 + T) + G₀/(1 + T), with G₀ the gain at reference gain zero
// and G∞ the gain with the reference's control signal nulled; G direct
// checks it.
//
// Margins reads T over a sweep: every unity crossing of |T| (refined by
// re-evaluating the circuit, not interpolated), the phase margin 180° + ∠T
// there with the phase unwrapped continuously from the lowest frequency, the
// −180° crossings with their gain margins, and a plain verdict.
//
// Without a reference element (New with ""), an Analyzer gives the direct
// solution alone: every port's Z direct and the gain's G direct, with the
// other terms NaN and ReturnRatio an error — what a passive network has.
//
// An Analyzer asked for an adjoint read-out (Analyzer.Adjoint, an output
// y = dᵀx) also solves Mᵀz = d at every point, with the full circuit's
// factorization the point makes anyway: y's response to any right-hand
// side b is then zᵀb, the transfer from every source at once (package
// zport/engine/noise).
//
// Quantities that are not finite at a frequency (an infinite Z₀ when the
// port has no path at zero gain, a zero 1 + T open) are NaN in the results
// and explained in the notes; callers show them as absent, never as NaN.
//
// Every value comes with an error bound (PortResult.Err, GainResult.Err,
// Point.TErr): the exact value for the circuit as given lies within it. A
// read-out's bound is |y|ᵀw, with y its adjoint solution and w a bound on
// the residual formed from the parts' own coefficients; formulas carry the
// bounds by ball arithmetic. Where a bound leaves fewer than 12 digits the
// solution is refined — in float64, in double-double with the float64 LU,
// or with the double-double LU (see bounds.go and DEVELOPERS.md) — and a
// note names every value still short of 12 digits. Degenerate cases answer
// with NaN and a note: g∞ where T is zero within its bound, g, g direct and
// the direct Z where 1 + T is (the full circuit is singular there).
package feedback
