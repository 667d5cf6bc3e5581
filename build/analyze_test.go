package main

import (
	"bytes"
	"encoding/json"
	"regexp"
	"strings"
	"testing"

	"zport/engine/api"
)

// The analyze command answers the contract on stdout, and bad input with
// exit status 1, the error object on stdout and "L:C: message" on stderr.
func TestAnalyzeCommand(t *testing.T) {
	req := `{"circuit": "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=100\nresistor R1 fb gnd 2k\nresistor R2 out fb 18k\nport out out gnd\n",
		"reference": "U1", "ports": ["out"], "frequency": 1000,
		"gain": {"source": "Vin", "output": "out"}, "sweep": {"from": 10, "to": 1e8, "points": 100}}`
	var out, errOut bytes.Buffer
	if code := runAnalyze(strings.NewReader(req), &out, &errOut); code != 0 {
		t.Fatalf("exit %d, stderr %s", code, errOut.String())
	}
	var resp api.Response
	if err := json.Unmarshal(out.Bytes(), &resp); err != nil {
		t.Fatal(err)
	}
	if len(resp.Ports) != 1 || resp.Ports[0].Z == nil || resp.Gain == nil || resp.Margins == nil || resp.Sweep == nil || len(resp.Sweep.Frequency) != 100 {
		t.Fatalf("incomplete response: %s", out.String())
	}
	if bad := regexp.MustCompile(`:\s*-?(NaN|Inf|Infinity)\b`).FindString(out.String()); bad != "" {
		t.Errorf("response carries a non-finite number: %s", bad)
	}
}

func TestAnalyzeCommandErrors(t *testing.T) {
	cases := []struct{ req, stderr string }{
		{`{"circuit": "resistor R1 a gnd 4k7k\n", "reference": "U1", "frequency": 1}`, "1:22: "},
		{`{"circuit": "resistor R1 a gnd 1k\nvcvs E1 b gnd sense=a,gnd gain=2\n", "reference": "R1", "frequency": 1}`, "0:0: reference: "},
		{`{"topology": "noninverting", "params": {"R1": "abc"}, "frequency": 1}`, "0:0: R1: "},
		{`{"circuit": 5}`, "0:0: request is not valid JSON"},
		{`not json`, "0:0: request is not valid JSON"},
	}
	for _, c := range cases {
		var out, errOut bytes.Buffer
		if code := runAnalyze(strings.NewReader(c.req), &out, &errOut); code != 1 {
			t.Errorf("%s: exit %d, want 1", c.req, code)
		}
		var e api.ErrorResponse
		if err := json.Unmarshal(out.Bytes(), &e); err != nil || e.Error.Message == "" {
			t.Errorf("%s: stdout %q is not an error object", c.req, out.String())
		}
		if !strings.HasPrefix(errOut.String(), c.stderr) {
			t.Errorf("%s: stderr %q, want prefix %q", c.req, errOut.String(), c.stderr)
		}
		if strings.Contains(errOut.String(), "goroutine") {
			t.Errorf("panic trace on stderr")
		}
	}
}
