// Package plot draws the charts of frequency-domain results as SVG: a
// two-panel Bode chart (magnitude over phase on a shared log frequency
// axis; NoPhase keeps the magnitude alone, for a noise density), a
// histogram (linear or log x axis) and a horizontal bar chart of signed
// values (Bars, for rankings such as sensitivities). The same code
// runs when the site is built, to put pre-rendered charts into static
// pages, and inside the WebAssembly engine, to redraw them as a user edits
// values, so it uses only the standard library and zport/engine/value,
// whose Format writes every engineering label ("10 kHz", "4.70 kΩ").
//
// A chart is a value with exported fields; SVG, WriteTo and AppendSVG
// render it:
//
//	c := plot.Bode{
//		ID:      "p-out",
//		Title:   "Output impedance",
//		Freq:    freqs, // Hz, ascending
//		MagUnit: "Ω",
//		Traces: []plot.Trace{
//			{Name: "Z (Blackman)", Class: "z", Values: z},
//			{Name: "Z₀ (gain zero)", Class: "z0", Values: z0, Dashed: true},
//		},
//		Markers: []plot.Marker{{Freq: 784e3, Label: "crossover 784 kHz"}},
//	}
//	html := c.SVG()
//
// # What a caller may rely on
//
// Output is deterministic: the same chart gives the same bytes. It is
// well-formed XML whatever the input: every piece of text (titles, trace
// names, labels) is escaped, so text a user typed stays inert text. No
// input panics: NaN, Inf and zero values leave gaps in a line; traces
// with nothing finite, empty frequency lists and malformed histograms draw
// empty axes with a note. Output stays small: coordinates are rounded to
// 0.1 px, each trace is one path per panel in relative coordinates, and
// points the eye cannot see (within 0.1 px of the line drawn without them)
// are left out of the path — the hover data keeps every point.
//
// Phase is unwrapped per trace, continuously from its first finite point
// (each step is taken as the one of least magnitude, modulo 360°), so a
// phase falling through −180° keeps falling rather than jumping.
//
// # Styling
//
// Colours are not written into the elements. Parts carry classes (svg.zplot,
// trace trace-<Class>, grid, axis, tick, marker, hline, legend, note, bar)
// and each SVG embeds the style sheet CSS, whose colours are CSS custom
// properties with fallbacks; a page themes its charts for light and dark by
// setting those properties (see CSS). Presentation attributes (currentColor,
// no fill) keep a chart legible where no style sheet applies at all, for
// instance under a Content-Security-Policy that forbids inline styles;
// such a page links CSS as a file and sets NoStyle.
//
// # Hover readout
//
// site/assets/plothover.js adds a cursor and readout to every svg.zplot
// with a data-freq attribute. The contract between the two: the root
// carries data-freq (the frequencies, NaN where skipped), data-fmin and
// data-fmax (the axis ends, Hz), data-x0 and data-x1 (the plot area's
// horizontal extent in SVG pixels), data-my and data-py ("top bottom lo hi":
// each panel's vertical extent and the axis coordinates at its bottom and
// top: log10|v| or dB for magnitude, degrees for phase), data-mscale ("log"
// or "db") and data-unit. Each trace's magnitude path carries data-name and
// data-values: pairs "|v| phase" per frequency, |v| to 6 significant digits
// and the unwrapped phase in degrees to 0.01°, NaN for a gap.
package plot
