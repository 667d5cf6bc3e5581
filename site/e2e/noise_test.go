//go:build !js

package e2e

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/calc"
)

// The noise section of a stage page: the native engine's numbers, the
// TIA's input-referred current noise with the photodiode's shot noise
// among the sources; a temperature typed into the noise settings
// recomputes it and travels in the link; a bad temperature is refused at
// its input with the last good noise kept.
func TestNoiseOnStagePage(t *testing.T) {
	ctx := start(t)
	const id = "transimpedance"
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)
	resp := checkAgainstNative(t, ctx, id)
	n := api.Noise.Result(resp)
	if n == nil || n.InputUnit != "A/√Hz" {
		t.Fatalf("native noise %+v", n)
	}
	sec := calcSel(id) + ` [data-role="results"] [data-analysis="noise"]`
	text := eval[string](t, ctx, `document.querySelector(`+jsString(sec)+`).textContent`)
	for _, s := range []string{"Noise at out", "A/√Hz", "Ipd", "shot, 2qI", "invented defaults"} {
		if !strings.Contains(text, s) {
			t.Errorf("the noise section does not show %q", s)
		}
	}
	if got := eval[int](t, ctx, `document.querySelectorAll(`+jsString(sec+` svg.zplot`)+`).length`); got != 3 {
		t.Errorf("%d noise charts, want 3 (densities, input-referred, noise gain)", got)
	}
	rms := func() string { return valueOf(shownValues(t, ctx, id), "noiseRms") }
	warm := rms()

	typeInto(t, ctx, id, "noise.temperature", "77")
	state := waitState(t, ctx, id)
	if !strings.Contains(state, "noise.temperature=77") {
		t.Errorf("the link %q does not carry the temperature", state)
	}
	cold := checkAgainstNative(t, ctx, id)
	coldRms := rms()
	if c := api.Noise.Result(cold); c.Temperature != 77 || coldRms == warm {
		t.Errorf("at 77 K: temperature %g, rms %s (was %s)", c.Temperature, coldRms, warm)
	}

	pasteInto(t, ctx, id, "noise.temperature", "0")
	out := calc.Compute(form(id, inputs(t, ctx, id)))
	if out.Error == nil || out.Error.Param != "noise.temperature" {
		t.Fatalf("the native engine does not refuse temperature 0 by its field: %+v", out.Error)
	}
	msgSel := jsString(calcSel(id) + ` .field[data-field="noise.temperature"] [data-role="msg"]`)
	poll(t, ctx, `document.querySelector(`+msgSel+`).textContent === `+jsString(out.Error.Message))
	if got := rms(); got != coldRms {
		t.Errorf("the rms shows %s after a bad temperature; the last good one (77 K) is %s", got, coldRms)
	}
	if !eval[bool](t, ctx, `document.querySelector(`+jsString(calcSel(id)+` [data-role="results"]`)+`).classList.contains('is-stale')`) {
		t.Error("the results are not marked stale")
	}
	if h := eval[string](t, ctx, `location.hash`); h != state {
		t.Errorf("the address changed to %q after a bad temperature", h)
	}
	checkHealthy(t, ctx)
}

// A passive RC typed on the custom page has no reference element: it is
// analysed as it is, with the direct solution, no loop, and its noise,
// which over a wide band is √(kT/C) whatever R (Gray, Hurst, Lewis,
// Meyer, 5th ed., ch. 11 [memory]; 2.0352 µV for 1 nF at 300 K [derived]).
func TestNoiseOnCustomPage(t *testing.T) {
	ctx := start(t)
	edLoad(t, ctx, fileURL("custom", ""))
	edSetText(t, ctx, "# RC low-pass (invented)\nvsource Vin in gnd 0\nresistor R in out 10k\ncapacitor C out gnd 1n\nport out out gnd\n")
	edChoose(t, ctx, "gain-source", "Vin")
	poll(t, ctx, `document.querySelector('[data-circuit-editor] [data-analysis="noise"] [data-quantity="noiseRms"]') !== null`)
	s := edRead(t, ctx)
	if s.Reference != "" || s.Output != "out" {
		t.Fatalf("editor state %+v", s)
	}
	if n := eval[int](t, ctx, `document.querySelectorAll('[data-circuit-editor] [data-analysis="loop"]').length`); n != 0 {
		t.Errorf("a loop section without a reference element")
	}
	req := edRequest(t, s)
	T, from, to := 300.0, 10.0, 100e6
	req.Temperature = &T
	api.Noise.Ask(&req, &api.NoiseRequest{Band: &api.NoiseBand{From: &from, To: &to}})
	resp := edNative(t, req)
	edCompare(t, "passive RC", edValues(t, ctx, "[data-circuit-editor]"), resp)
	got := edValues(t, ctx, "[data-circuit-editor]")
	n := api.Noise.Result(resp)
	for k, x := range map[string]*float64{"noiseRms": n.RMS.Output, "noiseOutput": n.Spot.Output, "noiseBandwidth": n.Bandwidth, "contributorShare:R": n.Contributors[0].Share} {
		v, err := strconv.ParseFloat(got[k].Value, 64)
		if err != nil || x == nil || math.Abs(v-*x) > edTol*math.Abs(*x) {
			t.Errorf("%s = %q on the page, %v natively", k, got[k].Value, x)
		}
	}
	// The band 10 Hz – 100 MHz leaves out 2/π·(10 Hz/fc + fc/100 MHz) of
	// the power, fc = 15.9 kHz: about 5e-4 of the rms.
	if v, _ := strconv.ParseFloat(got["noiseRms"].Value, 64); v < 2.0352e-6*(1-6e-4) || v > 2.0352e-6 {
		t.Errorf("rms %g V, want √(kT/C) = 2.0352 µV less 5e-4 of it", v)
	}
	note := eval[string](t, ctx, `document.querySelector('[data-circuit-editor] [data-analysis="notes"]').textContent`)
	if !strings.Contains(note, "no reference element") {
		t.Errorf("notes %q do not say that there is no reference element", note)
	}
	checkHealthy(t, ctx)
}

// The single-file export carries the noise, and a link's noise settings.
func TestNoiseInSingleFile(t *testing.T) {
	ctx := start(t)
	load(t, ctx, singleURL("p=noninverting&noise.band.from=100&noise.band.to=20k"))
	shownSection(t, ctx, "noninverting")
	poll(t, ctx, `document.querySelector(`+jsString(calcSel("noninverting")+` [data-role="results"] > .panel:not([data-e2e-prerendered])`)+`) !== null`)
	resp := checkAgainstNative(t, ctx, "noninverting")
	n := api.Noise.Result(resp)
	if n == nil || n.Band.From != 100 || n.Band.To != 20e3 || n.InputUnit != "V/√Hz" {
		t.Fatalf("noise %+v", n)
	}
	if got := eval[string](t, ctx, `document.querySelector(`+jsString(calcSel("noninverting")+` [data-role="results"] [data-analysis="noise"]`)+`).textContent`); !strings.Contains(got, "100.0 Hz to 20.00 kHz") {
		t.Errorf("the section does not show the linked band")
	}
	checkHealthy(t, ctx)
}
