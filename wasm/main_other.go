//go:build !(js && wasm)

package main

import (
	"fmt"
	"os"
)

// main explains itself when the package is built for anything but the
// browser, which keeps go build ./... working on every platform.
func main() {
	fmt.Fprintln(os.Stderr, "zport/wasm runs in a browser: build it with GOOS=js GOARCH=wasm (go run ./build does)")
	os.Exit(2)
}
