// Package plot draws the charts of the results as SVG: a two-panel Bode
// chart (magnitude over phase on a shared log frequency axis, or the
// magnitude alone with NoPhase), a Time chart (values against time on
// linear axes, for a step response), a Nyquist chart (a return ratio on
// the complex plane with a compressed radius; see NyquistRadius), a
// histogram (linear or log x axis), a horizontal bar chart of signed
// values (Bars, for rankings such as sensitivities) and a Curve of a
// quantity against a part's value on a log axis (a phase margin against a
// feedback capacitor, the target and the solutions marked). The same code
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
// A trace may carry its own dash pattern (Trace.Dash): pinned designs are
// drawn in four patterns and the colours of classes trace-pin1 …
// trace-pin4. Swatch draws a trace's line style alone, for a legend
// outside a chart. A title longer than the chart is wide wraps at spaces.
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
// with a data-freq (Bode), data-time (Time) or data-nyquist (Nyquist)
// attribute. The contract between the two, for a Bode chart: the root
// carries data-freq (the frequencies, NaN where skipped), data-fmin and
// data-fmax (the axis ends, Hz), data-x0 and data-x1 (the plot area's
// horizontal extent in SVG pixels), data-my and data-py ("top bottom lo hi":
// each panel's vertical extent and the axis coordinates at its bottom and
// top: log10|v| or dB for magnitude, degrees for phase; data-py is absent
// without a phase panel), data-mscale ("log" or "db") and data-unit. Each
// trace's magnitude path carries data-name and data-values: pairs
// "|v| phase" per frequency, |v| to 6 significant digits and the unwrapped
// phase in degrees to 0.01°, NaN for a gap.
//
// A Time chart's root carries data-time (the times, s), data-tmin and
// data-tmax (the axis ends), data-x0 and data-x1, data-y ("top bottom lo
// hi" of the value axis) and data-unit; each trace's path data-name and
// data-values, one value per time. A Nyquist chart's root carries
// data-nyquist (the frequencies), data-cx, data-cy and data-r (the centre
// and radius in SVG pixels) and data-floor and data-ceil (the constants of
// the radius compression); its curve's path data-name and data-values,
// pairs "|T| phase" as on a Bode chart (the phase not unwrapped). The
// readout shows the frequency or time and each trace's value at the point
// nearest the pointer (on a Nyquist chart, nearest in the plane), and the
// arrow keys step through the points.
//
// A Curve's root carries data-curve (the part's values, signed), data-xmin
// and data-xmax (the ends of its axis, which is log10 of |x|), data-x0 and
// data-x1, data-y ("top bottom lo hi" of the value axis, in log10 of the
// value when data-yscale is "log"), data-unit (the values'), data-xunit
// and data-xname (the part's unit and name); each trace's path data-name
// and data-values, one value per x. The readout shows "Cf = 1.383 pF" and
// each trace's value there.
package plot
