// Command wasm is zport's engine as a WebAssembly module for the pages'
// calculators: the only package that imports syscall/js. Build it with
//
//	GOOS=js GOARCH=wasm go build -trimpath -ldflags='-s -w' -o zport.wasm ./wasm
//
// (go run ./build does this and packs the module into zport-engine.js).
//
// Started by Go's wasm_exec.js, main registers one global object, zport,
// and waits until zport.exit() is called. Its functions take and return
// strings of JSON; none of them throws:
//
//	zport.circuit(requestJSON)  one edit of the custom-circuit page
//	                            (calc.ComputeCircuit): what the text offers
//	                            the pickers, or every error with its line
//	                            and column, the choices fitted to the text,
//	                            and the rendered panel
//	zport.panel(formJSON)       a calculator's rendered results (package
//	                            zport/site/calc): {"html", "markdown",
//	                            "csv", "state", "form"} or {"error": {...}}
//	zport.aidsForm(inJSON)      the design-aid settings of a calculator
//	zport.aidsPanels(inJSON)    its standard values and sensitivities
//	                            (both: calc.AidsInput in, calc.AidsOutput
//	                            out)
//	zport.toleranceStart(inJSON)   start a tolerance study in slices:
//	                            {"run": id, "done": 0, "total": n}
//	zport.toleranceStep(id, n)  run n more trials: {"done", "total"}
//	zport.tolerancePanel(id)    the same rendered: {"html", "done", "total"}
//	zport.toleranceRelease(id)  forget the run (after it is done or to cancel)
//	zport.solveForm(inJSON)     a calculator's solve settings (calc.SolveInput
//	                            in, calc.SolveOutput out)
//	zport.solveStart(inJSON)    start a solve in slices: {"run", "done", "total"}
//	zport.solveStep(id, n)      analyze the circuit up to n more times:
//	                            {"done", "total", "finished"}
//	zport.solvePanel(id)        the answer rendered: {"html", "done", "total"}
//	zport.solveRelease(id)      stop and forget the run
//	zport.solveApply(inJSON)    circuit text with one number set
//	                            (calc.ApplyInput in, calc.ApplyOutput out)
//	zport.exit()                releases the functions and ends main
//
// These are the functions the pages call, and no more: the engine's JSON
// contract itself is reached through "go run ./build analyze", and the
// tests compare the pages with it natively.
//
// A call with the wrong arguments, or a panic anywhere below, comes back as
// {"error": {"message": ...}} rather than as a JavaScript exception. All
// the logic lives in ordinary packages tested natively; this one only
// checks arguments, converts, calls and reports.
//
// Its own tests run under Node.js:
//
//	PATH=$(go env GOROOT)/lib/wasm:$PATH GOOS=js GOARCH=wasm go test ./wasm/
package main
