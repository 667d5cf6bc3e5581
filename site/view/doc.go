// Package view writes the markup of the site's results: a small HTML
// element writer, the formatting of engine numbers for people (magnitude
// ∠ phase, engineering prefixes, decibels, the equivalent series element),
// the widgets the analyses' sections are made of, and the design-aid
// panels. It renders; package zport/site/calc decides what to render.
//
// Charts go into the panel through Figures or Figure, which add the
// "Save as SVG" and "Save as PNG" buttons that site/assets/zport.js
// handles.
//
// The writer escapes every piece of text and every attribute value on the
// way out; only SVG from package zport/site/plot enters as markup (Raw).
// html/template would do the same job, but its reflection keeps every
// exported method of the program alive and more than doubles the
// WebAssembly download, so the writer is kept deliberately small.
//
//	var w view.Writer
//	w.Section("calc", "ports", "Port impedances")
//	w.Complex(view.Complex{Z: z, Unit: "Ω", Series: true, At: 1e3,
//		Attrs: []string{"data-port", "out", "data-quantity", "z"}})
//	w.Close("section")
//
// A complex value carries data-re and data-im, a real one data-value, each
// in strconv's shortest round-trip form, or data-null="true" where it is
// not finite (shown as a dash). The design-aid panels' numbers carry
// data-aid (tolerance, standard, sensitivity), data-quantity (z:PORT,
// phase:PORT, r:PORT, g, pm; a part name for standard values; "target" and
// "ratio" with data-index), data-stat (nominal, p0.1 … p99.9, min, max,
// cornerMin, cornerMax; value, phase, error; misses, fraction …),
// data-parameter for a sensitivity's parameter, data-variant for a
// standard-value variant, and data-value, the engine's number in full.
package view
