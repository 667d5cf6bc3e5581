//go:build js && wasm

package main

import (
	"encoding/json"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/calc"
)

// The solve functions of the bridge: a run started, stepped, rendered and
// released by id — the coroutine a run in slices is made of works under
// WebAssembly as natively — its form, and a value applied to circuit text.

const solveInput = `{"form": {"topology": "transimpedance", "id": "w", "settings": {"solve": {"part": "Cf", "quantity": "pm", "value": "60"}}}}`

func TestSolveRunInSlices(t *testing.T) {
	z, _ := setup(t)
	m := call(t, z, "solveStart", solveInput)
	if msg := errorMessage(m); msg != "" {
		t.Fatalf("solveStart: %s", msg)
	}
	id := m["run"].(float64)
	for i := 0; ; i++ {
		st := call(t, z, "solveStep", id, 7)
		if msg := errorMessage(st); msg != "" {
			t.Fatal(msg)
		}
		if st["finished"] == true {
			if st["done"] != st["total"] {
				t.Errorf("finished at %v of %v", st["done"], st["total"])
			}
			break
		}
		if i > 40 {
			t.Fatal("the run does not end")
		}
	}
	// The sliced answer is the contract's one-shot answer, rendered.
	req := api.Request{Topology: "transimpedance", Frequency: 1e3}
	api.Solve.Ask(&req, &api.SolveRequest{Part: "Cf", Target: api.SolveTarget{Quantity: "pm", Value: func() *float64 { x := 60.0; return &x }()}})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	p := call(t, z, "solvePanel", id)
	if html, _ := p["html"].(string); html != calc.SolvePanel(api.Solve.Result(resp), calc.Layout{ID: "w"}) {
		t.Errorf("solvePanel: %.200q differs from the one-shot panel", html)
	}
	if r := call(t, z, "solveRelease", id); r["released"] != true {
		t.Errorf("release: %v", r)
	}
	if msg := errorMessage(call(t, z, "solveStep", id, 1)); !strings.Contains(msg, "no solve") {
		t.Errorf("step after release: %q", msg)
	}
}

// A closed-loop target renders too: its curve (an overshoot that is 0
// over part of the range) once ran the module out of memory, where a
// float's conversion to int differs from native code.
func TestSolveResponsePanel(t *testing.T) {
	z, _ := setup(t)
	m := call(t, z, "solveStart", `{"form": {"topology": "follower", "id": "w", "settings": {"solve": {"part": "gbw", "quantity": "overshoot", "value": "5"}}}}`)
	if msg := errorMessage(m); msg != "" {
		t.Fatalf("solveStart: %s", msg)
	}
	id := m["run"].(float64)
	for i := 0; i < 200; i++ {
		if st := call(t, z, "solveStep", id, 20); st["finished"] == true {
			break
		}
	}
	p := call(t, z, "solvePanel", id)
	if html, _ := p["html"].(string); !strings.Contains(html, `class="zplot zplot-curve"`) {
		t.Errorf("solvePanel: %v", errorMessage(p))
	}
}

func TestSolveFormAndApply(t *testing.T) {
	z, _ := setup(t)
	f := call(t, z, "solveForm", solveInput)
	if html, _ := f["html"].(string); !strings.Contains(html, `data-solve="part"`) || !strings.Contains(html, `value="Cf" selected`) {
		t.Errorf("solveForm: %.300q", html)
	}
	in, _ := json.Marshal(calc.ApplyInput{Circuit: "resistor R1 a gnd 1k # load\nvsource V a gnd 1\n", Part: "R1", Text: "2.2k"})
	a := call(t, z, "solveApply", string(in))
	if a["circuit"] != "resistor R1 a gnd 2.2k # load\nvsource V a gnd 1\n" {
		t.Errorf("solveApply: %v", a)
	}
	for _, tc := range []struct {
		name  string
		args  []any
		param string
	}{
		{"solveStart", []any{`{"form": {"topology": "transimpedance", "settings": {"solve": {"part": "Cx", "quantity": "pm", "value": "60"}}}}`}, "solve.part"},
		{"solveStart", []any{`{"form": {"topology": "transimpedance", "settings": {"solve": {"part": "Cf", "quantity": "pm", "value": "400"}}}}`}, "solve.target.value"},
		{"solveStart", []any{`{"form": {"topology": "transimpedance", "settings": {"solve": {"part": "Cf", "quantity": "z", "value": "4"}}}}`}, "solve.target.port"},
		{"solveStart", []any{"{not json"}, ""},
		{"solveStep", []any{999, 5}, ""},
		{"solveApply", []any{`{"circuit": "resistor R1 a gnd 1k\n", "part": "R9", "text": "1k"}`}, "solve.part"},
	} {
		m := call(t, z, tc.name, tc.args...)
		if msg := errorMessage(m); msg == "" {
			t.Errorf("%s %v: no error", tc.name, tc.args)
		} else if tc.param != "" && m["error"].(map[string]any)["param"] != tc.param {
			t.Errorf("%s %v: error %v, want it to name %s", tc.name, tc.args, m["error"], tc.param)
		}
	}
}
