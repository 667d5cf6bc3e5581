package main

import (
	"encoding/json"
	"fmt"
	"io"

	"zport/engine/api"
)

// MaxRequestBytes bounds a request read from stdin.
const MaxRequestBytes = 4 << 20

// runAnalyze reads one request from in and writes the response to out. Bad
// input writes the error object to out and "L:C: message" to errOut (a line
// for each problem of circuit text that has several), and returns exit
// status 1.
func runAnalyze(in io.Reader, out, errOut io.Writer) int {
	data, err := io.ReadAll(io.LimitReader(in, MaxRequestBytes+1))
	if err == nil && len(data) > MaxRequestBytes {
		err = fmt.Errorf("request is larger than %d MB", MaxRequestBytes>>20)
	}
	if err != nil {
		b, _ := json.Marshal(api.ErrorResponse{Error: api.ErrorBody{Message: err.Error()}})
		fmt.Fprintf(out, "%s\n", b)
		fmt.Fprintf(errOut, "0:0: %v\n", err)
		return 1
	}
	resp, ok := api.AnalyzeJSON(data)
	fmt.Fprintf(out, "%s\n", resp)
	if !ok {
		var e api.ErrorResponse
		_ = json.Unmarshal(resp, &e)
		all := e.Error.Errors
		if len(all) == 0 {
			all = []api.ErrorBody{e.Error}
		}
		for _, b := range all {
			where := fmt.Sprintf("%d:%d", b.Line, b.Column)
			if b.Param != "" {
				where += ": " + b.Param
			}
			fmt.Fprintf(errOut, "%s: %s\n", where, b.Message)
		}
		return 1
	}
	return 0
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
