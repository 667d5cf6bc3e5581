package main

import (
	"fmt"
	"os"
	"path/filepath"
	"time"

	"zport/site"
)

// buildSite builds dist/ under the module root and returns its path.
func buildSite() (dist string, opt site.Options, err error) {
	start := time.Now()
	opt, err = site.ModuleOptions()
	if err != nil {
		return "", opt, err
	}
	compiled := time.Since(start)
	files, err := site.Build(opt)
	if err != nil {
		return "", opt, err
	}
	root, err := site.ModuleRoot()
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
		mb(int64(len(opt.Engine))), mb(int64(len(eng))), len(files), compiled.Round(time.Millisecond), time.Since(start).Round(time.Millisecond))
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

func mb(n int64) string { return fmt.Sprintf("%.3f MB", float64(n)/1e6) }
