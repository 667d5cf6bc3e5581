//go:build !js

package site

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
)

// ModuleRoot finds the directory of zport's go.mod, from the working
// directory upwards, so the command works from any folder of the tree.
func ModuleRoot() (string, error) {
	dir, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for {
		data, err := os.ReadFile(filepath.Join(dir, "go.mod"))
		if err == nil && bytes.HasPrefix(bytes.TrimSpace(data), []byte("module zport")) {
			return dir, nil
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "", errors.New("not inside the zport module (no go.mod with “module zport” above the working directory)")
		}
		dir = parent
	}
}

// toolchain returns the Go command and GOROOT of the toolchain on PATH, the
// one running this command under go run, so that the engine and its
// wasm_exec.js come from the same release.
func toolchain() (goCmd, goroot string, err error) {
	goCmd, err = exec.LookPath("go")
	if err != nil {
		return "", "", fmt.Errorf("the go command is not on PATH: %w", err)
	}
	out, err := exec.Command(goCmd, "env", "GOROOT").Output()
	if err != nil {
		return "", "", fmt.Errorf("go env GOROOT: %w", err)
	}
	goroot = strings.TrimSpace(string(out))
	// Prefer that GOROOT's own go binary, in case PATH holds a wrapper.
	if p := filepath.Join(goroot, "bin", "go"); fileExists(p) {
		goCmd = p
	}
	return goCmd, goroot, nil
}

func fileExists(p string) bool {
	st, err := os.Stat(p)
	return err == nil && !st.IsDir()
}

// CompileEngine compiles zport/wasm for GOOS=js GOARCH=wasm with the Go
// toolchain on PATH (-trimpath -ldflags=-s -w) and reads that toolchain's
// wasm_exec.js. root is the module root.
func CompileEngine(root string) (wasm, wasmExec []byte, err error) {
	goCmd, goroot, err := toolchain()
	if err != nil {
		return nil, nil, err
	}
	tmp, err := os.MkdirTemp("", "zport-wasm-")
	if err != nil {
		return nil, nil, err
	}
	defer os.RemoveAll(tmp)
	out := filepath.Join(tmp, "zport.wasm")
	cmd := exec.Command(goCmd, "build", "-trimpath", "-ldflags=-s -w", "-o", out, "./wasm")
	cmd.Dir = root
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		return nil, nil, fmt.Errorf("compiling the engine (GOOS=js GOARCH=wasm go build ./wasm): %v\n%s", err, stderr.Bytes())
	}
	wasm, err = os.ReadFile(out)
	if err != nil {
		return nil, nil, err
	}
	wasmExec, err = os.ReadFile(filepath.Join(goroot, "lib", "wasm", "wasm_exec.js"))
	if err != nil {
		return nil, nil, fmt.Errorf("wasm_exec.js: %w", err)
	}
	return wasm, wasmExec, nil
}

// ModuleOptions returns the Options that Build and Single take for the
// zport module the working directory lies in: its engine compiled by
// CompileEngine, and the toolchain's wasm_exec.js. The command, the
// browser tests and the benchmark all build the site from it.
func ModuleOptions() (Options, error) {
	root, err := ModuleRoot()
	if err != nil {
		return Options{}, err
	}
	wasm, wasmExec, err := CompileEngine(root)
	if err != nil {
		return Options{}, err
	}
	return Options{Engine: wasm, WasmExec: wasmExec}, nil
}
