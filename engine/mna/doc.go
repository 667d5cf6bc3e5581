// Package mna assembles and solves the modified nodal equations of a
// circuit at one frequency.
//
// Unknowns are the voltages of the non-reference nodes followed by branch
// currents for the parts that force a voltage (inductors, voltage sources,
// the voltage-output controlled sources, the opamp's internal source). At
// s = j2πf the system is
//
//	M(s)·x = b,  M(s) = G + s·C − Σ kᵢ(s)·rᵢ·cᵢ(s)ᵀ
//
// where each controlled source i contributes a rank-one term: rᵢ is where
// its output enters the equations (its branch row, or the KCL rows of the
// nodes it drives) and cᵢ reads its control signal (a node-voltage
// difference or a sensed current). Writing the controlled sources this way
// is what the feedback analyses rely on: setting one gain to zero, or
// replacing it by an independent test source, only touches its own term.
//
// A Config picks the variant being solved: the reference gain on or off, a
// port driver removed, a port shorted. LU factors the assembled matrix
// with row and column equilibration and partial pivoting, in complex128;
// gonum has no complex LU, and a small dense one is about ten times faster
// than gonum's real-equivalent 2n×2n path at the sizes zport meets (see
// DEVELOPERS.md for the benchmark). SolveTransTo solves with the transpose,
// for the adjoints that error bounds need.
//
// Assembly in float64 loses a small conductance summed into a large
// diagonal entry (1 TΩ beside 50 Ω keeps six digits), and with it whatever
// depends on that conductance. Precise keeps the parts' coefficients apart,
// in double-double (package zport/engine/dd), and computes from them what
// the assembled matrix cannot give:
//
//	p := mna.NewPrecise(sys)
//	p.At(f)
//	act := p.Active(cfg)               // cfg's coefficients, once
//	p.ResidualBound(w, mag, r, act, b, x) // |b − A·x| ≤ w, in one float64 pass
//	p.Refine(&lu, act, b, xdd, w, mag, rnd, false, 0, 4, good) // refine x in double-double
//
// Refine runs mixed-precision iterative refinement: residuals from the
// parts in double-double, corrections from a factorization of the
// equations — the float64 LU, or LUDD, the same elimination in
// double-double, where the float64 one is too far off to contract.
package mna
