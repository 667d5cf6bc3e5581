// Package render turns an analysis response into the results panel of a
// calculator: HTML for the page, a Markdown table for "copy results" and a
// CSV file of the sweep. The site builder calls it to pre-render each
// calculator's default results, and the WebAssembly bridge calls it on every
// edit, so the numbers a page shows before and after the engine starts come
// from one code path.
//
// # Forms
//
// A calculator holds text exactly as typed. Form carries it: the topology
// ID, its parameters, the spot frequency and the sweep, each in the engine's
// value syntax. Compute reads a Form, asks the engine, and renders:
//
//	out := render.Compute(render.Form{
//		Topology:  "inverting",
//		Params:    map[string]string{"R2": "100k"},
//		Frequency: "1k",
//	})
//	// out.HTML, out.Markdown, out.State (and out.CSV when Form.CSV is set);
//	// or out.Error naming the field
//
// A bad field gives an Output whose Error names it (Param is the parameter
// name, "frequency", "sweep.from", "sweep.to", "sweep.points" or
// "fragment"); the page shows the message beside that input and keeps the
// last good panel.
//
// # URL fragment
//
// State is the form as a URL fragment (without "#"), so a shared link
// reproduces the calculator: form-encoded key=value pairs joined by "&",
// the topology's parameters in catalog order followed by f (spot
// frequency), from, to and points (the sweep). The key p is reserved for the
// single-file export, which uses it to choose the page, and is ignored here.
// Form.Fragment, when set, is read back over the defaults by the same rules;
// anything malformed — an unknown key, a repeated key, bad escaping, an
// over-long value, control characters — is refused whole with an error
// whose Param is "fragment", and the page falls back to its defaults with a
// notice.
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
// port), src, out, f, from, to, points — read back by ReadCircuitFragment
// as strictly as a topology's. CircuitLinkState writes the same keys for a
// topology's response, for its "open as an editable circuit" link.
//
// # HTML
//
// The panel is written by a small element writer in which every piece of
// text and every attribute value is escaped on the way out; only the SVG
// from package zport/site/plot is inserted as markup. html/template would do
// the same job, but its reflection keeps every exported method of the
// program alive and more than doubles the WebAssembly download, so the
// writer is kept deliberately small instead.
//
// Every displayed value carries machine-readable attributes: data-quantity,
// data-port on port quantities, and data-re/data-im (complex) or data-value
// (real) written with strconv's shortest round-trip form. The quantities:
//
//	per port   z0 tShort tOpen z zDirect (complex), agreement (real),
//	           y (complex, the admittance, only where z is not finite)
//	gain       g0 gInf g gDirect (complex), gainAgreement (real)
//	loop       T (complex), fc (Hz), pm (degrees), gm (dB), verdict (text)
//	extras     extra, with data-name (real, in the extra's own unit)
//
// A value that is not finite has data-null="true" and shows a dash.
// Hand-formula values carry data-closed-form (z0, tShort, tOpen, z,
// agreement, g, gainAgreement, T) instead of data-quantity, so selectors
// for the engine's numbers match exactly one element.
//
// # Design aids
//
// The "Design aids" section under each calculator (site/assets/aids.js)
// is rendered here too, from an AidsInput: the circuit (a calculator's
// Form, or an engine Request for a circuit of the page's own) and a Study,
// the settings as typed. AidsForm renders the settings (the passive parts
// with their tolerance inputs, the opamps' min–typ spreads, distribution,
// seed, trials, targets, the standard-value series); AidsPanels the
// standard values and the sensitivities; StartTolerance prepares the
// tolerance study that the page steps in slices and ToleranceOutput
// renders. A Study also travels in the URL fragment, as pairs whose keys
// start with "aid." after the calculator's own (Study.State, ReadStudy):
//
//	aid.tol=J&aid.dist=normal&aid.seed=7&aid.n=2000&aid.tol.Rp=none&aid.a0.U1=100k&aid.t1=pm%3C45
//
// Each input of the settings carries data-param, the path of the contract
// (DEVELOPERS.md, "Design aids in the JSON contract") that names it in the engine's errors
// ("tolerance.parts.R1", "tolerance.targets[0].value", "standardValues.series"),
// so a message lands beside its input. The panels' numbers carry data-aid
// (tolerance, standard, sensitivity), data-quantity (z:PORT, phase:PORT,
// r:PORT, g, pm; a part name for standard values; "target" and "ratio" with
// data-index), data-stat (nominal, p0.1 … p99.9, min, max, cornerMin,
// cornerMax; value, phase, error; misses, fraction …), data-parameter for a
// sensitivity's parameter, data-variant for a standard-value variant, and
// data-value, the engine's number in full.
package render
