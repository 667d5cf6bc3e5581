//go:build !(js && wasm)

package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestBridgeUnderNode runs this package's own tests (main_test.go, built
// for js/wasm) the way its doc comment says, so that `go test ./...` on
// the native platform covers the bridge too: GOOS=js GOARCH=wasm, with
// $(go env GOROOT)/lib/wasm first on PATH so that `go test` finds
// go_js_wasm_exec, which runs the test binary under node.
//
// Without node the test skips with a loud message, unless
// ZPORT_BROWSER=required (as CI sets), when it fails.
func TestBridgeUnderNode(t *testing.T) {
	if testing.Short() {
		t.Skip("the bridge's js/wasm tests are skipped in -short mode")
	}
	if _, err := exec.LookPath("node"); err != nil {
		msg := "no node on PATH (install it with: apt-get install -y nodejs)"
		if os.Getenv("ZPORT_BROWSER") == "required" {
			t.Fatalf("ZPORT_BROWSER=required but %s", msg)
		}
		t.Skipf("SKIPPING THE WASM BRIDGE TESTS: %s; set ZPORT_BROWSER=required to make this a failure", msg)
	}
	goCmd, err := exec.LookPath("go")
	if err != nil {
		t.Fatalf("no go command on PATH: %v", err)
	}
	out, err := exec.Command(goCmd, "env", "GOROOT").Output()
	if err != nil {
		t.Fatalf("go env GOROOT: %v", err)
	}
	wasmDir := filepath.Join(strings.TrimSpace(string(out)), "lib", "wasm")
	if _, err := os.Stat(filepath.Join(wasmDir, "go_js_wasm_exec")); err != nil {
		t.Fatalf("the toolchain has no go_js_wasm_exec: %v", err)
	}

	trackSources(t, goCmd, wasmDir)

	args := []string{"test", "-count=1"}
	if testing.Verbose() {
		args = append(args, "-v")
	}
	cmd := exec.Command(goCmd, append(args, ".")...)
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm",
		"PATH="+wasmDir+string(os.PathListSeparator)+os.Getenv("PATH"))
	var buf bytes.Buffer
	cmd.Stdout, cmd.Stderr = &buf, &buf
	err = cmd.Run()
	if err != nil {
		t.Fatalf("GOOS=js GOARCH=wasm go test ./wasm/ under node: %v\n%s", err, buf.String())
	}
	// A run that tested nothing would also succeed; it must have run the
	// bridge's tests.
	if !strings.Contains(buf.String(), "ok ") {
		t.Fatalf("unexpected output from the js/wasm tests:\n%s", buf.String())
	}
	t.Logf("%s", strings.TrimSpace(buf.String()))
}

// trackSources reads every source file of the module that the js/wasm
// test build of this package uses. go test caches a passing result
// against the files a test opened, and this package's native test binary
// contains none of the bridge's code, so without this an edit to the
// bridge or the engine below it would leave an old pass in the cache.
func trackSources(t *testing.T, goCmd, wasmDir string) {
	t.Helper()
	root, err := filepath.Abs("..")
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(goCmd, "list", "-deps", "-test", "-f",
		`{{if and .Module .Module.Main}}{{$d := .Dir}}{{range .GoFiles}}{{$d}}{{"\t"}}{{.}}{{"\n"}}{{end}}{{range .TestGoFiles}}{{$d}}{{"\t"}}{{.}}{{"\n"}}{{end}}{{range .EmbedFiles}}{{$d}}{{"\t"}}{{.}}{{"\n"}}{{end}}{{end}}`, ".")
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm")
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go list the js/wasm sources: %v", err)
	}
	files := []string{filepath.Join(root, "go.mod"), filepath.Join(root, "go.sum"), filepath.Join(wasmDir, "wasm_exec.js")}
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		dir, file, _ := strings.Cut(line, "\t")
		if !filepath.IsAbs(file) {
			file = filepath.Join(dir, file)
		}
		// The generated test main lives in the build cache; skip it.
		if strings.HasPrefix(file, root+string(filepath.Separator)) {
			files = append(files, file)
		}
	}
	if len(files) < 10 {
		t.Fatalf("go list found only %q", files)
	}
	for _, f := range files {
		if _, err := os.ReadFile(f); err != nil {
			t.Fatalf("reading %s: %v", f, err)
		}
	}
}
