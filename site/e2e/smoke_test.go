//go:build !js

package e2e

import "testing"

// A calculator page loads from file:// and its engine starts.
func TestCalculatorPageLoads(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	if n := eval[int](t, ctx, `document.querySelectorAll("[data-quantity=z]").length`); n == 0 {
		t.Error("no Z values on the inverting page")
	}
}
