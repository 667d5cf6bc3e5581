// Command build is zport's one command: it builds the documentation site
// with its live calculators, and answers analysis requests for scripts.
//
//	go run ./build                 build dist/ and print the path of dist/index.html
//	go run ./build open            build, then open dist/index.html in the browser
//	go run ./build serve [addr]    build, then serve dist/ on 127.0.0.1 (default :8080)
//	go run ./build single          build one self-contained HTML file
//	go run ./build analyze [-timeout d]  read a request (JSON) on stdin, write the response
//	go run ./build topologies      print the topology catalog as JSON
//
// The browser benchmark is a command of its own, go run ./build/bench, so
// that this one does not carry the browser driver.
package main

import (
	"context"
	"fmt"
	"os"
)

func main() {
	args := os.Args[1:]
	cmd := ""
	if len(args) > 0 {
		cmd, args = args[0], args[1:]
	}
	var err error
	switch cmd {
	case "", "site":
		err = runBuild(args)
	case "open":
		err = runOpen(args)
	case "serve":
		err = runServe(args)
	case "single":
		err = runSingle(args)
	case "analyze":
		os.Exit(runAnalyze(context.Background(), args, os.Stdin, os.Stdout, os.Stderr))
	case "topologies":
		err = runTopologies(os.Stdout)
	case "help", "-h", "--help":
		fmt.Print(usage)
		return
	default:
		fmt.Fprintf(os.Stderr, "build: unknown command %q\n\n%s", cmd, usage)
		os.Exit(2)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "build:", err)
		os.Exit(1)
	}
}

const usage = `usage: go run ./build [command]

  (none)       build the site into dist/ and print the path of dist/index.html
  open         build, then open dist/index.html in the system's browser
  serve [addr] build, then serve dist/ over http on 127.0.0.1 (default 127.0.0.1:8080)
  single       build one self-contained HTML file, dist/zport-single.html
  analyze [-timeout d]
               read an analysis request (JSON) on stdin, write the response JSON;
               -timeout stops a long analysis with an error after d (e.g. 30s)
  topologies   print the topology catalog as JSON

The browser benchmark is a command of its own: go run ./build/bench
`
