// Package calc is the application layer of the site's calculators: what a
// calculator holds (Form), what it asks the engine, and what it shows. The
// site builder calls it to pre-render each calculator's default results,
// and the WebAssembly bridge calls it on every edit, so the numbers a page
// shows before and after the engine starts come from one code path. The
// markup itself is written with package zport/site/view.
//
// # Analyses
//
// Everything a calculator shows is an Analysis, listed once in Analyses:
// the port impedances, the gain, the loop and its margins, the noise, a
// stage's design values, the engine's notes, a stage's generated circuit
// text, the design aids. An analysis declares its key, its settings, how it asks the
// engine (Ask), and how it writes its section of the panel, its columns of
// the CSV and its rows of the copied results. Adding one is writing one
// file and adding it to the list; DEVELOPERS.md walks through it, and
// seam_test.go does it with a port-admittance analysis.
//
// # Forms
//
// A calculator holds text exactly as typed. Form carries it: the topology
// ID and its parameters (or circuit text with its reference, ports and
// gain), the spot frequency, the sweep, and each analysis's settings, each
// in the engine's value syntax. Compute reads a Form, asks the engine, and
// renders:
//
//	out := calc.Compute(calc.Form{
//		Topology:  "inverting",
//		Params:    map[string]string{"R2": "100k"},
//		Frequency: "1k",
//	})
//	// out.HTML, out.Markdown, out.State (and out.CSV when Form.CSV is set);
//	// or out.Error naming the field
//
// A bad field gives an Output whose Error names it (Param is the parameter
// name, "frequency", "sweep.from", "sweep.to", "sweep.points", or an
// analysis's setting such as "admittance.unit"); the page shows the
// message beside that input and keeps the last good panel.
//
// # URL fragment
//
// State is the form as a URL fragment (without "#"), written and read by
// package zport/site/fragment, so a shared link reproduces the calculator:
// the topology's parameters in catalog order, then f (spot frequency),
// from, to and points (the sweep), then each analysis's settings under its
// key ("aid.seed=7"), a declared setting only where it differs from its
// default. The key p is reserved for the single-file export, which uses it
// to choose the page, and is ignored here.
//
// Form.Fragment, when set, is a link to read, by one rule on every page:
// the link stands on the page's defaults (not on what the page showed
// before it); each setting the page knows and can use is used; each one it
// cannot — unreadable, unknown, given twice, or a value that the form, the
// engine's preparation, an analysis's Ask or Check refuses — is left out,
// its default used in its place, and named in Output.Refused. Output.Notice
// says so in one sentence, Output.Form holds the values in use for the
// inputs, and Output.State the link the page writes back. Only a fragment
// too long to be a link is refused whole. The settings of an analysis that
// runs only on request are checked as the link is read (Check), so that
// "aid.n=abc" is refused then, not when the study is run.
//
// # Pinned designs
//
// Form.Pins holds up to MaxPins designs kept for comparison, each with a
// name and a slot (1 … MaxPins: its line style and its link keys). Compute
// analyzes each at the current spot frequency, sweep and settings (answers
// cached by request), and every analysis reads them from Context.Pins:
// charts overlay them with BodePins or, for any chart type, PinTraces;
// Analysis.Compare declares the rows of a comparison table, written after
// the section or where Section calls Context.Comparison, and into the
// copied results. The link carries each pin as its name (pin1=NAME) and
// the keys of its design that differ from the current one (pin1.R2=100k).
//
// # Circuits of the user's own
//
// A Form with Circuit set instead of Topology analyzes circuit text with
// its Reference, Ports and Gain. The custom-circuit page sends every edit
// as a CircuitRequest to ComputeCircuit, which parses the text once, lists
// what it offers (api.Inspection) or every problem in it, fits the form's
// choices to the text (Form.Fit: a reference or port that is gone is
// replaced, a new port line is ticked) and analyzes; Form.Budget keeps the
// sweep within a time budget, shortening it (Output.SweepCut) rather than
// holding the page. Its URL fragment is the text compressed under c (by
// the page's script) followed by Form.CircuitState — ref, port (one per
// port), src, out, f, from, to, points, then the analyses' settings — read
// back by the same rule as a topology's (ReadCircuitFragment), over the
// circuit's default choices: its first reference, every port line, no
// gain, 1 kHz and a sweep from 10 Hz to 100 MHz in 400 points.
// CircuitLinkState writes the same keys for a topology's response, for its
// "open as an editable circuit" link.
//
// # Data attributes
//
// Every displayed value carries machine-readable attributes: data-quantity,
// data-port on port quantities, and data-re/data-im (complex) or data-value
// (real) written with strconv's shortest round-trip form. The quantities:
//
//	per port   z0 tShort tOpen z zDirect (complex), agreement (real),
//	           y (complex, the admittance, only where z is not finite)
//	gain       g0 gInf g gDirect (complex), gainAgreement (real)
//	loop       T (complex), fc (Hz), pm (degrees), gm (dB), verdict (text),
//	           closure (dB/decade), closureVerdict (text)
//	response   stability (text), final, overshoot (%), peakTime (s),
//	           riseTime, settling1, settling01 (s), referenceGain,
//	           referenceFrequency (Hz), peaking (dB), peakingFrequency,
//	           bandwidth, lowerCorner (Hz); per natural frequency, with
//	           data-pole (its index in the engine's poles): poleFrequency
//	           (Hz), poleQ, poleZeta, pole (complex, rad/s), poleWeight
//	noise      noiseOutput, noiseInput (densities at the spot frequency),
//	           noiseRms, noiseRmsInput, noiseBandwidth, noiseTemperature,
//	           noiseError (real); per source, with data-source,
//	           contributorSpot, contributorRms, contributorShare (a
//	           fraction, shown as a percentage)
//	extras     extra, with data-name (real, in the extra's own unit)
//
// A comparison with the pins carries, on each number, data-compare (the
// row: z:PORT, g, T, fc, pm, gm, extra:N, the response's overshoot,
// riseTime, settling1, bandwidth, peaking, the noise's noiseOutput,
// noiseRms, noiseInput), data-pin (the pin's slot, 0 for the current
// design), data-stat (value or diff) and the number
// (data-re/data-im, data-value, and for a complex difference data-phase);
// its table carries data-compare-of, the analysis's key.
//
// A value that is not finite has data-null="true" and shows a dash.
// Hand-formula values carry data-closed-form (z0, tShort, tOpen, z,
// agreement, g, gainAgreement, T) instead of data-quantity, so selectors
// for the engine's numbers match exactly one element. Each section carries
// data-analysis, its analysis's key.
//
// # Design aids
//
// The "Design aids" section under each calculator (site/assets/aids.js)
// is an analysis that runs on request. Its bridge functions take an
// AidsInput, the calculator's Form, whose Settings["aid"] are the study as
// typed (Study; keys "tol", "tol.R1", "a0.U1", "gbw.U1", "dist", "seed",
// "n", "t1" … "t8", "e", "ec"): AidsForm renders the settings (the passive
// parts with their tolerance inputs, the opamps' min–typ spreads,
// distribution, seed, trials, targets, the standard-value series);
// AidsPanels the standard values and the sensitivities; StartTolerance
// prepares the tolerance study that the page steps in slices and
// ToleranceOutput renders. In the share link the study follows the
// calculator's own settings:
//
//	aid.dist=normal&aid.n=2000&aid.seed=7&aid.t1=pm%3C45&aid.tol=J&aid.tol.Rp=none
//
// Each input of the settings carries data-param, the path of the contract
// (DEVELOPERS.md, "Design aids in the JSON contract") that names it in the
// engine's errors ("tolerance.parts.R1", "tolerance.targets[0].value",
// "standardValues.series"), so a message lands beside its input. The
// panels' numbers are described in package zport/site/view.
//
// # Design to a target
//
// The "Design to a target" section (site/assets/solve.js) is another
// analysis that runs on request: the engine's "solve" key. Its settings,
// SolveSettings, are the part, the quantity and its port, the target
// value, the range and the series, in the link as
//
//	solve.part=Cf&solve.quantity=pm&solve.value=45
//
// and its inputs carry data-solve (the setting) and data-param (the
// contract path: solve.part, solve.target.quantity, solve.target.value,
// solve.range.from …). SolveForm renders them, StartSolve and
// SolveOutputOf run and render a search (SolvePanel), ApplyValue sets a
// part's value in circuit text. The panel's rows are tr[data-solve]
// (solution, below, above, standard, best, nominal) with data-index;
// their numbers carry data-stat (value, achieved) and data-value; each
// button that applies a value carries data-solve-apply, data-part and
// data-text (the value as typed into the input or the text).
package calc
