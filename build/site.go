package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"

	"zport/site"
)

// moduleRoot finds the directory of zport's go.mod, from the working
// directory upwards, so the command works from any folder of the tree.
func moduleRoot() (string, error) {
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

// engine compiles zport/wasm and reads wasm_exec.js.
func engine(root string) (wasm, wasmExec []byte, err error) {
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

// buildSite builds dist/ under the module root and returns its path.
func buildSite() (dist string, opt site.Options, err error) {
	start := time.Now()
	root, err := moduleRoot()
	if err != nil {
		return "", opt, err
	}
	wasm, wasmExec, err := engine(root)
	if err != nil {
		return "", opt, err
	}
	compiled := time.Since(start)
	opt = site.Options{Engine: wasm, WasmExec: wasmExec}
	files, err := site.Build(opt)
	if err != nil {
		return "", opt, err
	}
	dist = filepath.Join(root, "dist")
	if err := os.RemoveAll(dist); err != nil {
		return "", opt, err
	}
	if err := files.Write(dist); err != nil {
		return "", opt, err
	}
	eng := files["zport-engine.js"]
	fmt.Fprintf(os.Stderr, "build: engine %s raw, %s as loaded (zport-engine.js); %d files; compile %v, total %v\n",
		mb(int64(len(wasm))), mb(int64(len(eng))), len(files), compiled.Round(time.Millisecond), time.Since(start).Round(time.Millisecond))
	return dist, opt, nil
}

// runBuild builds the site into dist/ and prints the path of its start page.
func runBuild(args []string) error {
	if len(args) > 0 {
		return fmt.Errorf("the site build takes no arguments (got %q)", args)
	}
	dist, _, err := buildSite()
	if err != nil {
		return err
	}
	fmt.Println(filepath.Join(dist, "index.html"))
	return nil
}

// runSingle builds the site, then dist/zport-single.html: every page in one
// self-contained file, and prints its path.
func runSingle(args []string) error {
	if len(args) > 0 {
		return fmt.Errorf("single takes no arguments (got %q)", args)
	}
	dist, opt, err := buildSite()
	if err != nil {
		return err
	}
	data, err := site.Single(opt)
	if err != nil {
		return err
	}
	p := filepath.Join(dist, "zport-single.html")
	if err := os.WriteFile(p, data, 0o644); err != nil {
		return err
	}
	fmt.Fprintf(os.Stderr, "build: single file %s\n", mb(int64(len(data))))
	fmt.Println(p)
	return nil
}
