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
//	zport.analyze(requestJSON)  the engine's contract (zport/engine/api): a
//	                            Response, or {"error": {...}} for bad input
//	zport.catalog()             the topology catalog, a JSON array
//	zport.panel(formJSON)       a calculator's rendered results (package
//	                            zport/site/render): {"html", "markdown",
//	                            "csv", "state", "form"} or {"error": {...}}
//	zport.exit()                releases the functions and ends main
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
