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
// DEVELOPERS.md for the benchmark).
package mna
