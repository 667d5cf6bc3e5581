// Package response computes what a closed-loop gain does in time and
// frequency: the response to a unit step of its source (final value,
// overshoot, 10–90 % rise time, settling to ±1 % and ±0.1 %), the figures
// of |g(jω)| (peaking above the low-frequency gain, the −3 dB bandwidth,
// the lower corner of a band-pass gain), and the circuit's natural
// frequencies with their frequency, Q and damping, the dominant ones named
// and set beside what a second-order pair alone would do.
//
//	r, err := response.Analyze(sys, source, outA, outB, response.Options{})
//	// r.Step over r.Time; r.Overshoot, r.RiseTime, r.Settling1 …;
//	// r.PeakingDB, r.Bandwidth; r.Poles
//
// # Method
//
// The modified nodal equations are written as a real pencil
// (G + s·C)·x = b·u with every gain at its value (mna.System.Pencil); an
// opamp's A(s) = a0/((1 + s/ω1)(1 + s/ω2)) becomes two internal states, so
// its poles are natural frequencies like any capacitor's. The natural
// frequencies are the finite s where G + s·C is singular. With a real
// shift σ near their middle, K = (G + σC)⁻¹C has the eigenvalue
// μ = 1/(σ − p) for each of them and μ = 0 for each instantaneous mode;
// K is balanced and brought to real Schur form by gonum's LAPACK
// (Hessenberg reduction, the QR algorithm, Dtrexc to put the finite
// blocks first). From that form the gain's step response splits exactly
// into a constant from the instantaneous modes and a state-space system
// ξ′ = Aξ + b on the finite ones, however the instantaneous modes are
// structured (see realize). Each natural frequency is then refined as a
// zero of det(G + s·C) on the pencil itself, with the engine's complex
// LU, by the Aberth–Ehrlich iteration.
//
// The step is sampled by exact propagation, ζₖ₊₁ = e^(Ãh)·ζₖ with
// Ã = [A b; 0 0] (Van Loan's block form of the integral, the exponential
// by gonum's Padé approximant with scaling and squaring), so every sample
// is exact to rounding whatever the poles: repeated, clustered or
// growing. Between samples each figure is refined by false position on
// the sum of modes g(0) + Σ(rᵢ/pᵢ)·e^(pᵢt), with residues rᵢ from the
// trapezoidal rule on a circle around each pole, where that sum reproduces
// the exact samples to 10⁻⁹; otherwise (repeated poles) by the exponential
// itself. The frequency figures come from g(jω) = d + cᵀ(jωI − A)⁻¹b by
// back substitution through the quasi-triangular A, sampled forty times a
// decade and at each pole's frequency, refined the same way: the peak
// where d|g|²/dω changes sign, each corner where |g|² = ref²/2. A gain
// that rises without bound (improper) is evaluated by the nodal solution
// instead.
//
// The step's time span, unless given, reaches the time every mode that
// shows in the step has decayed below 5·10⁻⁴ of the response (at least
// three of its time constants), rounded up to 1, 2 or 5 times a power of
// ten; its points give the fastest ringing 25 samples a period. The
// figures are measured on a grid of their own over that span (longer if
// the step has not settled within ±0.1 %), so they do not depend on the
// span chosen for the plot.
//
// A circuit with a natural frequency in the right half plane still
// answers: its growing step, no final value, overshoot, rise or settling
// time, and a note. Data trouble (no shift avoiding the natural
// frequencies, an eigenvalue iteration that does not converge, a circuit
// above MaxUnknowns) is an error.
package response

// Method says in a line how the response is computed, for the contract.
const Method = "natural frequencies: shift-and-invert of the pencil G + sC (op-amp poles as states), real Schur form (gonum LAPACK), refined as zeros of det(G + sC) by Aberth's iteration; step: exact propagation by the matrix exponential of the finite part; figures refined by false position"
