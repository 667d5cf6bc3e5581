// Package solve designs to a target: it finds every value of one part
// — a resistor, a capacitor, an op amp's gbw, a controlled source's gain,
// a stage's parameter — at which a quantity of the circuit reaches a
// target value: a phase or gain margin, a crossover frequency, a port's
// |Z|, Re Z or ∠Z or the gain's magnitude at the spot frequency, or the
// closed-loop peaking, bandwidth or step overshoot.
//
// # The search
//
// Many targets are not monotonic in the part (the phase margin against a
// feedback capacitor rises and then falls), so Find does not assume one
// answer. It scans a grid evenly spaced in ln|x| over the part's range,
// brackets every change of sign of q − target, and refines each bracket
// by Brent's method (package zport/engine/numeric) to Tolerance, 10⁻¹⁰
// relative. A bracket whose ends stay apart by the height of a step has
// closed on a jump, not a root — a phase margin whose governing crossover
// changes, ∠Z wrapping at ±180° — and is reported as such. Where the
// grid shows |q − target| with a local minimum (the quantity comes toward
// the target and turns away), Brent's minimizer finds the true minimum
// between the neighbouring grid points; a minimum past the target gives
// two solutions, so a sharp resonance that reaches the target between
// grid points is not missed. When nothing in the range meets
// the target, the answer is the closest approach (Best) and where it is.
//
//	m := &solve.Model{Build: build, Reference: "U1", Quantity: solve.PhaseMargin}
//	p := &solve.Problem{Model: m, Target: 45, From: 0.1e-12, To: 100e-12,
//		Nominal: math.NaN(), Series: &eseries.E12, Part: "Cf", Unit: "F"}
//	a := p.Solve() // a.Solutions, a.Standard, a.Curve, a.Best, a.Notes
//
// Problem.Start runs the same search in slices (a Run, stepped a few
// evaluations at a time), so a page stays responsive while it works.
//
// # The quantities
//
// Model.At builds the circuit for a value of the part (Model.Build) and
// reads the quantity: the loop's margins as the page's margins are read
// (feedback.Margins over LoopGrid, 1 mHz to 1 THz, every crossing refined
// on the circuit itself); a port's Z or the gain at the spot frequency
// (Blackman's value, or the direct solution where that is not finite); the
// closed-loop response's figures from package zport/engine/response, a
// stable low-pass response without peaking or overshoot counting as 0.
// A quantity that does not exist at some value (a margin without a
// crossover, a bandwidth of an unstable loop) is NaN there, and the search
// goes round it.
//
// # Errors and panics
//
// A Problem with an empty range, or a Model without Build, is misuse and
// panics; the callers (package zport/engine/api) check a request's range
// and target first, naming the field at fault. A circuit that cannot be
// analyzed at some value of the part is data trouble: that value counts as
// undefined and a note says how often it happened and why.
package solve
