package main

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"math"
	"regexp"
	"strings"
	"testing"
	"time"

	"zport/engine/api"
	"zport/engine/feedback"
)

// The analyze command answers the contract on stdout, and bad input with
// exit status 1, the error object on stdout and "L:C: message" on stderr.
func TestAnalyzeCommand(t *testing.T) {
	req := `{"circuit": "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=100\nresistor R1 fb gnd 2k\nresistor R2 out fb 18k\nport out out gnd\n",
		"reference": "U1", "ports": ["out"], "frequency": 1000,
		"gain": {"source": "Vin", "output": "out"}, "sweep": {"from": 10, "to": 1e8, "points": 100}}`
	var out, errOut bytes.Buffer
	if code := runAnalyze(context.Background(), nil, strings.NewReader(req), &out, &errOut); code != 0 {
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
		{`{"circuit": 5}`, "0:0: circuit: want a string, not a JSON number"},
		{`not json`, "0:0: request is not valid JSON"},
	}
	for _, c := range cases {
		var out, errOut bytes.Buffer
		if code := runAnalyze(context.Background(), nil, strings.NewReader(c.req), &out, &errOut); code != 1 {
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

// A request is one JSON object: anything after it but white space is an
// error, not silently ignored.
func TestAnalyzeCommandTrailingData(t *testing.T) {
	for _, c := range []struct {
		req, stderr string
		code        int
	}{
		{`{"topology": "inverting", "frequency": 1000} {"garbage": ]]]`, `0:0: request is not valid JSON for this contract: unexpected "{\"garbage\": ]]]" after the request object (at byte 46)`, 1},
		{`{"topology": "inverting", "frequency": 1000}{"topology": "follower", "frequency": 1}`, `0:0: request is not valid JSON for this contract: unexpected "{\"topology\": \"follower\", \"frequ"… after the request object (at byte 45)`, 1},
		{`{"topology": "inverting", "frequency": 1000} x`, `0:0: request is not valid JSON for this contract: unexpected "x" after the request object (at byte 46)`, 1},
		{"{\"topology\": \"inverting\", \"frequency\": 1000}\n\t \n", "", 0},
	} {
		var out, errOut bytes.Buffer
		if code := runAnalyze(context.Background(), nil, strings.NewReader(c.req), &out, &errOut); code != c.code {
			t.Errorf("%q: exit %d, want %d (stderr %q)", c.req, code, c.code, errOut.String())
		}
		if !strings.HasPrefix(errOut.String(), c.stderr) || (c.stderr == "") != (errOut.Len() == 0) {
			t.Errorf("%q: stderr %q, want %q", c.req, errOut.String(), c.stderr)
		}
	}
}

// -timeout bounds the analysis: past it, the engine stops between two
// units of work and the command answers with an error naming the budget.
// The test's clock is a context already past its deadline, so nothing here
// depends on how fast the machine is.
func TestAnalyzeCommandTimeout(t *testing.T) {
	req := `{"topology": "inverting", "frequency": 1000, "sweep": {"from": 10, "to": 1e8, "points": 100}}`
	expired, cancel := context.WithDeadline(context.Background(), time.Now().Add(-time.Second))
	defer cancel()
	var out, errOut bytes.Buffer
	if code := runAnalyze(expired, []string{"-timeout", "1h"}, strings.NewReader(req), &out, &errOut); code != 1 {
		t.Fatalf("exit %d, want 1; stderr %q", code, errOut.String())
	}
	want := "0:0: the time budget ran out in the sweep, after 0 of 100 frequencies (-timeout 1h0m0s): raise the budget, or ask for fewer sweep points, trials or sensitivities\n"
	if errOut.String() != want {
		t.Errorf("stderr %q, want %q", errOut.String(), want)
	}
	var e api.ErrorResponse
	if err := json.Unmarshal(out.Bytes(), &e); err != nil || !strings.HasPrefix(e.Error.Message, "the time budget ran out") {
		t.Errorf("stdout %q is not the error object", out.String())
	}

	// Within the budget, the answer is the same as without one.
	out.Reset()
	errOut.Reset()
	if code := runAnalyze(context.Background(), []string{"-timeout", "1h"}, strings.NewReader(req), &out, &errOut); code != 0 {
		t.Fatalf("exit %d with an hour to spare: %s", code, errOut.String())
	}
	var plain bytes.Buffer
	runAnalyze(context.Background(), nil, strings.NewReader(req), &plain, io.Discard)
	if out.String() != plain.String() {
		t.Error("the answer within the budget differs from the one without")
	}

	for _, args := range [][]string{{"-timeout", "abc"}, {"-timeout=-1s"}, {"request.json"}} {
		errOut.Reset()
		if code := runAnalyze(context.Background(), args, strings.NewReader(req), io.Discard, &errOut); code != 2 {
			t.Errorf("%q: exit %d, want 2", args, code)
		}
		if !strings.Contains(errOut.String(), "usage: go run ./build analyze [-timeout d]") {
			t.Errorf("%q: no usage on stderr: %q", args, errOut.String())
		}
	}
}

// A circuit with nothing that can be the reference says so, rather than
// offering an empty list to choose from; without a reference asked for,
// it is answered by the direct solution, with a note saying what that
// leaves out.
func TestAnalyzeCommandNoCandidates(t *testing.T) {
	var out, errOut bytes.Buffer
	passive := `{"circuit": "vsource V1 a gnd 1\nresistor R1 a b 1k\nresistor R2 b gnd 1k\nport p b gnd\n", "ports": ["p"], "frequency": 1}`
	if code := runAnalyze(context.Background(), nil, strings.NewReader(passive), &out, &errOut); code != 0 {
		t.Errorf("a passive network: exit %d (%s), want 0", code, errOut.String())
	}
	var resp api.Response
	if err := json.Unmarshal(out.Bytes(), &resp); err != nil || len(resp.Ports) != 1 || resp.Ports[0].ZDirect == nil ||
		math.Abs(resp.Ports[0].ZDirect.Re-500) > 1e-9 || len(resp.Notes) == 0 || resp.Notes[0] != feedback.NoReferenceNote {
		t.Errorf("a passive network: %s (%v)", out.String(), err)
	}
	for _, c := range []struct{ req, stderr string }{
		{`{"circuit": "resistor R1 a gnd 1k\n", "reference": "U1", "frequency": 1}`,
			"0:0: reference: reference \"U1\": no part of that name (the circuit has none: add a controlled source (vcvs, vccs, ccvs, cccs), an opamp or a transistor (bjt, mos))\n"},
		{`{"circuit": "resistor R1 a gnd 1k\nvcvs E2 b gnd sense=a,gnd gain=2\nvcvs E1 c gnd sense=a,gnd gain=2\n", "reference": "U1", "frequency": 1}`,
			"0:0: reference: reference \"U1\": no part of that name (choose one of: E1, E2)\n"},
	} {
		var errOut bytes.Buffer
		if code := runAnalyze(context.Background(), nil, strings.NewReader(c.req), io.Discard, &errOut); code != 1 {
			t.Errorf("%s: exit %d, want 1", c.req, code)
		}
		if errOut.String() != c.stderr {
			t.Errorf("stderr %q, want %q", errOut.String(), c.stderr)
		}
	}
}

// Circuit text with several problems: every one is reported, in the
// error object and on stderr, each with its line and column.
func TestAnalyzeCommandReportsEveryProblem(t *testing.T) {
	req := `{"circuit": "resistor R1 a gnd 4k7k\nresistor R2 a\ncapacitor C1 a gnd -1p\n", "reference": "U1", "frequency": 1}`
	var out, errOut bytes.Buffer
	if code := runAnalyze(context.Background(), nil, strings.NewReader(req), &out, &errOut); code != 1 {
		t.Fatalf("exit %d, want 1", code)
	}
	var e api.ErrorResponse
	if err := json.Unmarshal(out.Bytes(), &e); err != nil {
		t.Fatal(err)
	}
	if len(e.Error.Errors) != 3 || e.Error.Errors[0].Line != 1 || e.Error.Errors[1].Line != 2 || e.Error.Errors[2].Line != 3 {
		t.Errorf("errors %+v, want one on each of lines 1, 2 and 3", e.Error.Errors)
	}
	lines := strings.Split(strings.TrimSpace(errOut.String()), "\n")
	if len(lines) != 3 || !strings.HasPrefix(lines[0], "1:22: ") || !strings.HasPrefix(lines[1], "2:") || !strings.HasPrefix(lines[2], "3:") {
		t.Errorf("stderr %q, want three located lines", errOut.String())
	}
}

// A circuit that cannot be solved names the nodes and parts it is traced
// to in the error object, not only in its message.
func TestAnalyzeCommandNamesSingularParts(t *testing.T) {
	req := `{"circuit": "vsource V1 a gnd 1\nvsource V2 a gnd 2\nvcvs E1 b gnd sense=a,gnd gain=1\nresistor R1 b gnd 1k\n", "reference": "E1", "frequency": 1}`
	var out, errOut bytes.Buffer
	if code := runAnalyze(context.Background(), nil, strings.NewReader(req), &out, &errOut); code != 1 {
		t.Fatalf("exit %d, want 1", code)
	}
	var e api.ErrorResponse
	if err := json.Unmarshal(out.Bytes(), &e); err != nil {
		t.Fatal(err)
	}
	if strings.Join(e.Error.Parts, ",") != "V1,V2" {
		t.Errorf("parts %v in %s, want V1, V2 (a loop of voltage sources)", e.Error.Parts, out.String())
	}
}
