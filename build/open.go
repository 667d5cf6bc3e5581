package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"

	"zport/site"
)

// runOpen builds the site, then opens dist/index.html in the system's
// browser. Where no opener exists (a headless machine), it says so and
// leaves the printed path to the user.
func runOpen(args []string) error {
	if err := runBuild(args); err != nil {
		return err
	}
	root, err := site.ModuleRoot()
	if err != nil {
		return err
	}
	index := filepath.Join(root, "dist", "index.html")
	var cmd *exec.Cmd
	switch runtime.GOOS {
	case "darwin":
		cmd = exec.Command("open", index)
	case "windows":
		cmd = exec.Command("rundll32", "url.dll,FileProtocolHandler", index)
	default:
		if os.Getenv("DISPLAY") == "" && os.Getenv("WAYLAND_DISPLAY") == "" {
			fmt.Fprintln(os.Stderr, "build: no display here; open the path above in a browser")
			return nil
		}
		cmd = exec.Command("xdg-open", index)
	}
	if err := cmd.Start(); err != nil {
		fmt.Fprintf(os.Stderr, "build: could not start a browser (%v); open the path above\n", err)
		return nil
	}
	return cmd.Process.Release()
}
