// Package site is zport's documentation site: Markdown pages with live
// calculators, built into static files that work from file:// with no
// network, under any sub-path, and with scripts turned off (showing the
// results computed at build time).
//
// # Sources
//
// The site is data, embedded as Sources and replaceable by any fs.FS:
//
//	content/     one Markdown file per page: index, method, about, custom
//	             (the custom-circuit page), and one per topology of the
//	             catalog, named after its ID
//	templates/   html/template: page.html (a page), single.html (the
//	             single-file export), calculator.html (a calculator's
//	             inputs, and the catalog table), editor.html (the
//	             custom-circuit page's editor)
//	assets/      style.css; zport.js (the one loader of the engine and
//	             the library the page scripts share), calculator.js (the
//	             stage calculators), circuit.js (the custom-circuit page's
//	             editor), solve.js (design to a target, on both), aids.js
//	             (the design aids of both), plothover.js (chart readout);
//	             icon.svg
//	schematics/  one SVG schematic per topology, part names as in the
//	             generated circuit text
//
// # Markdown
//
// Pages are converted by one goldmark instance with an explicit list of
// extensions: GitHub tables and Blocks, this package's extension, which
// gives three fenced-block info strings a meaning:
//
//	```calculator            a live calculator; the body is "key: value"
//	topology: inverting      lines: the stage (required), any parameter
//	R2: 100k                 default to override, the spot frequency and
//	frequency: 1k            the sweep (FROM TO POINTS)
//	sweep: 10 100M 400
//	```
//
//	```catalog               the catalog as a table linking every stage
//	```
//
//	```math                  a display formula, converted to MathML at
//	Z = Z_0 \, \frac{1 + T_{sc}}{1 + T_{oc}}    build time (see MathML)
//	```
//
// A second extension, Editor, gives "circuit-editor" its meaning: the
// custom-circuit page's editor (circuit text with line numbers, pickers
// for the reference, ports and gain, the results panel), opening with one
// of the examples of package zport/site/examples ("example: ID", default
// the first), pre-rendered like a calculator. A page holds one editor.
//
// Each block becomes a node of its own kind (KindCalculator, KindCatalog,
// KindMath, KindCircuitEditor) and is rendered by a renderer registered
// for that kind, the shape of goldmark's own extensions. A calculator's and
// the editor's form hold, besides the circuit's own inputs, the settings of
// every analysis that declares some (calc.Analysis.Settings). A calculator is rendered with its
// default results already computed by the native engine through
// zport/site/calc, the same code the WebAssembly engine runs on every
// edit, so the page shows real numbers and charts before the engine starts.
// Raw HTML in the Markdown is not passed through (goldmark's safe default).
//
// # Output
//
// Build and Single take Options: the engine, compiled from zport/wasm by
// CompileEngine with the toolchain on PATH, and that toolchain's
// wasm_exec.js (ModuleOptions gives both). Build returns the multi-file
// site; Single returns one HTML file holding every page as a section
// chosen by the fragment (#p=NAME), with its style sheet and scripts
// inline and allowed by their SHA-256 hashes in its
// Content-Security-Policy. The engine is written as zport-engine.js, the
// module gzip-compressed and base-122-encoded into one global string
// beside Go's wasm_exec.js as the body of a function (see EngineScript),
// because browsers refuse to fetch a .wasm file from file:// or to start
// a worker from one: zport.js runs the engine in a worker made from a
// blob:. Every page carries the Content-Security-Policy CSP; nothing is
// inline but the data of the pages themselves, and every link is relative.
//
// Output is deterministic: files are produced in lexical order, the
// catalog in its own order, and nothing depends on the time or the
// machine, so two builds of one tree are byte-identical.
package site
