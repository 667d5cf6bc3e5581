//go:build js && wasm

package main

import (
	"strings"
	"syscall/js"
	"testing"

	"zport/engine/api"
	"zport/site/view"
)

// The design-aid functions of the bridge: a tolerance study started,
// stepped, read and released by id; the fast panels; the study's fragment.

const aidInput = `{"form": {"topology": "inverting", "id": "w", "settings": {"aid": {"seed": "11", "n": "300", "tol": "J"}}}}`

func TestToleranceRunInSlices(t *testing.T) {
	z, _ := setup(t)
	m := call(t, z, "toleranceStart", aidInput)
	if msg := errorMessage(m); msg != "" {
		t.Fatalf("toleranceStart: %s", msg)
	}
	id, total := m["run"].(float64), m["total"].(float64)
	if id < 1 || total != 300+8 { // R1, R2, Rp at J: 2³ corners
		t.Fatalf("run %v, total %v", id, total)
	}
	for i := 0; ; i++ {
		st := call(t, z, "toleranceStep", id, 41)
		if msg := errorMessage(st); msg != "" {
			t.Fatal(msg)
		}
		if st["done"] == st["total"] {
			break
		}
		if i > 20 {
			t.Fatal("the run does not end")
		}
	}
	// The sliced result is the one-shot answer of the contract, rendered.
	req := api.Request{Topology: "inverting", Frequency: 1e3}
	seed := uint64(11)
	api.Tolerance.Ask(&req, &api.ToleranceRequest{Default: "J", Seed: &seed, Trials: 300})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	p := call(t, z, "tolerancePanel", id)
	if html, _ := p["html"].(string); html != view.TolerancePanel(api.Tolerance.Result(resp), "w", 0) || p["done"] != total {
		t.Errorf("tolerancePanel: done %v, html %.100q differs from the one-shot panel", p["done"], html)
	}
	if r := call(t, z, "toleranceRelease", id); r["released"] != true {
		t.Errorf("release: %v", r)
	}
	if msg := errorMessage(call(t, z, "toleranceStep", id, 1)); !strings.Contains(msg, "no tolerance run") {
		t.Errorf("step after release: %q", msg)
	}
}

func TestToleranceBadInput(t *testing.T) {
	z, _ := setup(t)
	for _, tc := range []struct {
		name  string
		args  []any
		param string
	}{
		{"toleranceStart", []any{"{not json"}, ""},
		{"toleranceStart", []any{`{"form": {"topology": "inverting", "settings": {"aid": {"seed": "-1"}}}}`}, "tolerance.seed"},
		{"toleranceStart", []any{`{"form": {"topology": "inverting", "settings": {"aid": {"tol.R9": "F"}}}}`}, "tolerance.parts.R9"},
		{"toleranceStart", []any{42}, ""},
		{"toleranceStep", []any{1}, ""},
		{"toleranceStep", []any{"1", 5}, ""},
		{"toleranceStep", []any{999, 5}, ""},
		{"tolerancePanel", []any{js.Null()}, ""},
		{"toleranceRelease", []any{12345}, ""},
		{"aidsForm", []any{`{"form": {"topology": "nope"}}`}, "topology"},
		{"aidsPanels", nil, ""},
		{"aidsForm", []any{`{"form": {"topology": "inverting", "settings": {"aid": {"bogus": "1"}}}}`}, "aid.bogus"},
	} {
		m := call(t, z, tc.name, tc.args...)
		e, ok := m["error"].(map[string]any)
		if !ok || e["message"] == "" {
			t.Errorf("zport.%s(%v): want an error object, got %v", tc.name, tc.args, m)
			continue
		}
		if tc.param != "" && e["param"] != tc.param {
			t.Errorf("zport.%s(%v): error names %v, want %s", tc.name, tc.args, e["param"], tc.param)
		}
	}
}

// A page that never releases its runs cannot make the module hold more
// than maxRuns of them.
func TestToleranceRunsAreBounded(t *testing.T) {
	z, _ := setup(t)
	var ids []float64
	for i := 0; i < maxRuns+3; i++ {
		m := call(t, z, "toleranceStart", aidInput)
		ids = append(ids, m["run"].(float64))
	}
	if msg := errorMessage(call(t, z, "toleranceStep", ids[0], 1)); msg == "" {
		t.Error("the oldest run is still held")
	}
	if msg := errorMessage(call(t, z, "toleranceStep", ids[len(ids)-1], 1)); msg != "" {
		t.Errorf("the newest run: %s", msg)
	}
}

func TestAidsFormAndPanels(t *testing.T) {
	z, _ := setup(t)
	f := call(t, z, "aidsForm", aidInput)
	if html, _ := f["html"].(string); !strings.Contains(html, `data-role="tolerance-form"`) || !strings.Contains(html, `value="11"`) {
		t.Errorf("aidsForm: html %.80q", html)
	}
	p := call(t, z, "aidsPanels", aidInput)
	if s, _ := p["sensitivity"].(string); !strings.Contains(s, `data-aid="sensitivity"`) {
		t.Errorf("aidsPanels: no sensitivity panel")
	}
	if s, _ := p["standard"].(string); !strings.Contains(s, `data-aid="standard"`) {
		t.Errorf("aidsPanels: no standard-value panel")
	}
}
