//go:build js && wasm

package main

import (
	"encoding/json"
	"fmt"
	"slices"
	"strings"
	"syscall/js"
	"testing"
)

// setup registers the bridge on a fresh object standing in for the page's
// global scope and returns it with a cleanup.
func setup(t *testing.T) (z js.Value, exited *bool) {
	t.Helper()
	global := js.Global().Get("Object").New()
	done := false
	release := register(global, func() { done = true })
	t.Cleanup(release)
	return global.Get("zport"), &done
}

// call invokes a bridge function and decodes its JSON answer.
func call(t *testing.T, z js.Value, name string, args ...any) map[string]any {
	t.Helper()
	res := z.Call(name, args...)
	if res.Type() != js.TypeString {
		t.Fatalf("zport.%s returned a %s, want a string", name, res.Type())
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(res.String()), &m); err != nil {
		t.Fatalf("zport.%s returned invalid JSON %q: %v", name, res.String(), err)
	}
	return m
}

func errorMessage(m map[string]any) string {
	e, ok := m["error"].(map[string]any)
	if !ok {
		return ""
	}
	s, _ := e["message"].(string)
	return s
}

func TestWrongArguments(t *testing.T) {
	z, _ := setup(t)
	for _, tc := range []struct {
		name string
		args []any
	}{
		{"panel", nil},
		{"panel", []any{42}},
		{"panel", []any{"{}", "{}"}},
		{"panel", []any{js.Null()}},
		{"circuit", nil},
		{"circuit", []any{7}},
	} {
		m := call(t, z, tc.name, tc.args...)
		if errorMessage(m) == "" {
			t.Errorf("zport.%s(%v): want an error object, got %v", tc.name, tc.args, m)
		}
	}
}

func TestNotJSON(t *testing.T) {
	z, _ := setup(t)
	for _, name := range []string{"panel", "aidsForm"} {
		if m := call(t, z, name, "{not json"); errorMessage(m) == "" {
			t.Errorf("zport.%s: want an error object for malformed JSON, got %v", name, m)
		}
	}
}

// The bridge offers what the pages call, and nothing more: the engine's
// contract is "go run ./build analyze", compared with the pages natively.
func TestOnlyWhatPagesCall(t *testing.T) {
	z, _ := setup(t)
	keys := js.Global().Get("Object").Call("keys", z)
	var names []string
	for i := range keys.Length() {
		names = append(names, keys.Index(i).String())
	}
	want := "aidsForm aidsPanels circuit exit panel solveApply solveForm solvePanel solveRelease solveStart solveStep tolerancePanel toleranceRelease toleranceStart toleranceStep"
	if slices.Sort(names); strings.Join(names, " ") != want {
		t.Errorf("zport has %v, want %s", names, want)
	}
}

func TestPanel(t *testing.T) {
	z, _ := setup(t)
	m := call(t, z, "panel", `{"topology": "inverting", "id": "t"}`)
	if msg := errorMessage(m); msg != "" {
		t.Fatalf("panel: %s", msg)
	}
	html, _ := m["html"].(string)
	if !strings.Contains(html, `data-quantity="zDirect"`) {
		t.Errorf("panel html lacks the zDirect values")
	}
	if s, _ := m["state"].(string); s == "" {
		t.Errorf("panel gave no state")
	}
	// A bad parameter names itself.
	m = call(t, z, "panel", `{"topology": "inverting", "params": {"R2": "4k7k"}}`)
	e, ok := m["error"].(map[string]any)
	if !ok || e["param"] != "R2" {
		t.Fatalf("want an error naming R2, got %v", m)
	}
}

func TestPanicIsReported(t *testing.T) {
	f := guard(func([]js.Value) string { panic("boom") })
	defer f.Release()
	res := f.Invoke()
	if res.Type() != js.TypeString || !strings.Contains(res.String(), "internal error: boom") {
		t.Fatalf("panic came back as %v", res)
	}
}

func TestExitAndRelease(t *testing.T) {
	global := js.Global().Get("Object").New()
	exits := 0
	release := register(global, func() { exits++ })
	z := global.Get("zport")
	z.Call("exit")
	z.Call("exit")
	if exits != 1 {
		t.Errorf("exit ran %d times, want once", exits)
	}
	release()
	if !global.Get("zport").IsUndefined() {
		t.Errorf("zport is still set after release")
	}
}

func TestCircuit(t *testing.T) {
	z, _ := setup(t)
	m := call(t, z, "circuit", `{"circuit": "vsource Vin in gnd 1\nopamp U1 in out out\nport o out gnd\n", "ports": ["o"], "frequency": "1k", "offered": null}`)
	ins, _ := m["inspection"].(map[string]any)
	refs, _ := ins["references"].([]any)
	if len(refs) != 1 || refs[0].(map[string]any)["name"] != "U1" {
		t.Errorf("references = %v, want U1", ins["references"])
	}
	if f, _ := m["form"].(map[string]any); f["reference"] != "U1" {
		t.Errorf("form = %v, want the reference chosen", m["form"])
	}
	if out, _ := m["output"].(map[string]any); !strings.Contains(fmt.Sprint(out["html"]), `data-quantity="zDirect"`) {
		t.Errorf("output = %v, want a panel", out)
	}
	m = call(t, z, "circuit", `{"circuit": "resistor R1 a gnd 1k\nresistor R2 a\n", "frequency": "1k"}`)
	errs, _ := m["inspection"].(map[string]any)["errors"].([]any)
	if len(errs) != 1 || errs[0].(map[string]any)["line"] != 2.0 || m["output"] != nil {
		t.Errorf("errors = %v, output = %v; want one error on line 2 and no panel", errs, m["output"])
	}
}
