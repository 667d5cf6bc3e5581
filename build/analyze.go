package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"

	"zport/engine/api"
)

// MaxRequestBytes bounds a request read from stdin.
const MaxRequestBytes = 4 << 20

// runAnalyze reads one request from in and writes the response to out. Bad
// input writes the error object to out and "L:C: message" to errOut (a line
// for each problem of circuit text that has several), and returns exit
// status 1; bad flags return 2. args are the command's flags:
// -timeout bounds the analysis's time (the engine stops between units of
// work — a sweep's frequencies, a tolerance study's trials — and answers
// with an error saying where). The analysis runs under ctx too.
func runAnalyze(ctx context.Context, args []string, in io.Reader, out, errOut io.Writer) int {
	fs := flag.NewFlagSet("analyze", flag.ContinueOnError)
	fs.SetOutput(errOut)
	timeout := fs.Duration("timeout", 0, "stop the analysis with an error after this long (e.g. 30s, 2m); 0 means no limit")
	fs.Usage = func() {
		fmt.Fprintf(errOut, "usage: go run ./build analyze [-timeout d] < request.json\n")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() > 0 || *timeout < 0 {
		fmt.Fprintf(errOut, "analyze: the request comes on stdin; unexpected %q\n", fs.Args())
		if *timeout < 0 {
			fmt.Fprintf(errOut, "analyze: -timeout must not be negative\n")
		}
		fs.Usage()
		return 2
	}
	data, err := io.ReadAll(io.LimitReader(in, MaxRequestBytes+1))
	if err == nil && len(data) > MaxRequestBytes {
		err = fmt.Errorf("request is larger than %d MB", MaxRequestBytes>>20)
	}
	if err != nil {
		return fail(out, errOut, api.ErrorBody{Message: err.Error()})
	}
	if *timeout > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, *timeout)
		defer cancel()
	}
	resp, ok := api.AnalyzeJSONContext(ctx, data)
	if !ok {
		var e api.ErrorResponse
		_ = json.Unmarshal(resp, &e)
		if errors.Is(ctx.Err(), context.DeadlineExceeded) {
			e.Error.Message += fmt.Sprintf(" (-timeout %v): raise the budget, or ask for fewer sweep points, trials or sensitivities", *timeout)
		}
		return fail(out, errOut, e.Error)
	}
	fmt.Fprintf(out, "%s\n", resp)
	return 0
}

// fail writes an error: the error object on out, "L:C: param: message" on
// errOut, a line for each problem of circuit text that has several; it
// returns the exit status, 1.
func fail(out, errOut io.Writer, body api.ErrorBody) int {
	b, _ := json.Marshal(api.ErrorResponse{Error: body})
	fmt.Fprintf(out, "%s\n", b)
	all := body.Errors
	if len(all) == 0 {
		all = []api.ErrorBody{body}
	}
	for _, e := range all {
		where := fmt.Sprintf("%d:%d", e.Line, e.Column)
		if e.Param != "" {
			where += ": " + e.Param
		}
		fmt.Fprintf(errOut, "%s: %s\n", where, e.Message)
	}
	return 1
}

// runTopologies prints the catalog.
func runTopologies(out io.Writer) error {
	b, err := json.MarshalIndent(api.Catalog(), "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(out, "%s\n", b)
	return err
}
