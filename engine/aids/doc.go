// Package aids answers a designer's questions after "what is the port
// impedance": what it will be on the production line (tolerance spread),
// which part it depends on (sensitivity), and which standard values to buy
// (IEC 60063 series).
//
// # The model
//
// A Model is a circuit with the numbers the aids may vary (its Params), the
// reference element, the ports, the gain and a spot frequency. For circuit
// text, CircuitParams lists every resistor, capacitor, inductor and
// controlled-source value, each opamp's a0, gbw, p2, rid, rcm, ro, cid and
// ccm, and each transistor's gm (as "Q1.gm"); for a catalog stage, StageParams lists the stage's parameters and checks
// where each one lands in the generated circuit. Every evaluation writes the
// values into a scratch copy of the circuit and builds a fresh
// feedback.Analyzer (the nodal equations are cheap to rebuild: about ten
// microseconds for a catalog stage), so a Model is never changed by use:
//
//	c, _ := circuit.Parse(text)
//	m := &aids.Model{Circuit: c, Reference: "U1", Frequency: 1e3,
//		Ports:  []feedback.Port{{Name: "out", A: out, B: circuit.Gnd}},
//		Params: aids.CircuitParams(c)}
//
// A stage parameter that is not one number of its circuit (a transistor's
// gm computed from a bias current, say) makes StageParams return a Rebuild
// function that regenerates and parses the stage's text for each
// evaluation: correct, and about twice as slow over a whole study.
//
// Every evaluation yields, at the spot frequency, each port's Z (Blackman's
// formula, or the direct solution where that is not finite), the gain, and
// the governing phase margin of the loop. The quantities read from it are
// |Z|, ∠Z and Re Z of each port (Re Z shows a negative resistance, as a
// Howland pump's output has on one side of balance), |g| and the phase
// margin (see Quantity).
//
// # Phase margin per variant
//
// The nominal loop's margins come from feedback.Margins over the model's
// Grid (DefaultGrid: 1 mHz to 1 THz, twenty points a decade). A variant's
// crossovers lie near the nominal ones, so each is found by the secant
// method on ln|T| against ln f, started at the nominal crossover with the
// nominal slope there; it converges in three to five evaluations of T, about
// a fiftieth of the cost of a sweep. The governing margin is the smallest
// over the crossovers, as feedback.Margins reports it. If a search fails (no
// convergence, T not finite, a root three decades away, or two searches
// ending on one root), the variant gets a coarse sweep and feedback.Margins
// instead. Results count how many evaluations took each path.
//
// # Tolerance spread
//
// A Spread says how one parameter varies. Tolerance(j, nominal, tol) is a
// passive part with relative tolerance tol (IEC 60062 letters: F is 1 %):
// limits nominal·(1 ∓ tol). MinTyp(j, min, typ) is an opamp's a0 or gbw
// between its guaranteed minimum and its typical (nominal) value. Draws are
// Uniform between the limits, or Normal with the tolerance at 3σ (for
// min–typ: centred on typ with min at −3σ), drawn with gonum's distuv.
//
// A MonteCarlo runs in slices, so a page can show progress and cancel:
//
//	mc, err := aids.NewMonteCarlo(m, spreads, aids.Options{Seed: 7, Corners: true})
//	for mc.Step(100) < mc.Total() {
//		// update a progress bar; stop calling Step to cancel
//	}
//	r, err := mc.Result(30, []aids.Target{{ID: "pm", Below: true, Value: 45}})
//
// Trial i draws from a PCG generator seeded (Seed, i) — the draws depend
// only on the seed and the trial's number, so a run sliced into steps of any
// size gives the same numbers as one run, and a seed in a share link
// reproduces a result exactly. Result gives, per quantity, the nominal
// value, mean and sample standard deviation, the 0.1, 1, 50, 99 and 99.9 %
// percentiles (stat.Quantile, Empirical, on the sorted defined values), a
// histogram (stat.Histogram; bins equal in ratio for |Z| and |g| spread
// over more than a decade), and for each Target the fraction of trials that
// miss it.
//
// # Worst case by corners
//
// With Options.Corners, the study also evaluates corners: every spread at
// one of its limits. For up to MaxFullCorners (12) spreads, all 2ⁿ
// combinations run. Beyond that, two corners per quantity: each spread is
// moved alone from its low to its high limit to see which way it pushes the
// quantity, then one corner puts every spread at the limit that raises the
// quantity and one at the limit that lowers it. Each quantity reports its
// minimum and maximum over all corners run and the corner where each
// occurs, and flags where the Monte Carlo range falls short of the corners
// (common: 2000 random trials seldom put every part at a limit together) or
// reaches past them (a normal draw beyond the tolerance, or a quantity that
// is not monotonic in its parts, such as a Howland pump's |Z| peaking at
// balance inside the tolerance box). Corners bound the worst case of a
// quantity that is monotonic in each part over its range; they say nothing
// certain about one that is not.
//
// # Sensitivity
//
// Sensitivities gives the normalized sensitivity ∂ln|Q|/∂ln p of each port
// impedance and the gain to every parameter (a 1 % rise of p moves |Q| by
// about that many per cent), the phase sensitivity ∂∠Q/∂ln p in degrees,
// and ∂PM/∂ln p in degrees, sorted by size. Each is a central difference of
// ln Q in ln p at steps 2h, h and h/2 (h = 10⁻³), Richardson-extrapolated,
// with an error estimate from the two extrapolations plus what the values'
// own error bounds can contribute (the values are refined to about 15
// digits for this); the tests hold it to closed forms to better than 10⁻⁸
// relative.
//
// # Standard values
//
// Snap puts each chosen resistor and capacitor at its nearest value of an
// IEC 60063 series (package eseries), and each RatioPair at the pair of
// series values that best realizes its quotient (eseries.BestRatio; a
// non-inverting gain 1 + Num/Den asks for Num/Den = G − 1), then analyzes
// the circuit with the snapped values and reports every port impedance,
// the gain and the phase margin beside the nominal ones.
//
// # Errors and panics
//
// Misuse by the program panics: a spread of a parameter the model does not
// have, a negative trial count, a step outside (0, 0.05]. Trouble in the
// circuit is an error: a nominal circuit that cannot be analyzed is
// returned as one; a trial or corner that cannot be analyzed counts as
// undefined and is reported in the notes.
package aids
