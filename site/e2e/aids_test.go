//go:build !js

package e2e

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"zport/engine/api"
)

// The design-aid section of the calculators (site/assets/aids.js): the
// tolerance study run in slices matches the engine's one-shot answer
// number for number, it can be cancelled without freezing or losing the
// previous results, its settings travel in the share link, and the
// standard values and sensitivities follow the calculator.

const aidCalc = "#calc-inverting"

// aidRelTol is how closely the page's numbers match the native engine's
// (the bit-for-bit checks are against the page's own engine).
const aidRelTol = 1e-12

// aidNumber is one number of a design-aid panel, by its data attributes.
type aidNumber struct {
	Aid       string `json:"aid"`
	Quantity  string `json:"quantity"`
	Stat      string `json:"stat"`
	Parameter string `json:"parameter"`
	Variant   string `json:"variant"`
	Index     string `json:"index"`
	Value     string `json:"value"`
}

func (n aidNumber) key() string {
	return strings.Join([]string{n.Aid, n.Quantity, n.Stat, n.Parameter, n.Variant, n.Index}, "|")
}

// aidNumbers reads every number the panels of aid show.
func aidNumbers(t *testing.T, ctx context.Context, aid string) map[string]string {
	t.Helper()
	raw := eval[string](t, ctx, `JSON.stringify(Array.from(document.querySelectorAll(`+jsString(aidCalc+` [data-aid="`+aid+`"][data-value]`)+`)).map(e => ({
		aid: e.dataset.aid, quantity: e.dataset.quantity || '', stat: e.dataset.stat || '', parameter: e.dataset.parameter || '',
		variant: e.dataset.variant || '', index: e.dataset.index || '', value: e.dataset.value})))`)
	var list []aidNumber
	if err := json.Unmarshal([]byte(raw), &list); err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for _, n := range list {
		if _, dup := out[n.key()]; dup {
			t.Errorf("two numbers carry the attributes %s", n.key())
		}
		out[n.key()] = n.Value
	}
	return out
}

// aidOpen opens the inverting calculator's design-aid section and waits
// for its settings.
func aidOpen(t *testing.T, ctx context.Context) {
	t.Helper()
	poll(t, ctx, `!document.querySelector(`+jsString(aidCalc+" details.aids")+`).hidden`)
	eval[bool](t, ctx, `(document.querySelector(`+jsString(aidCalc+" details.aids > summary")+`).click(), true)`)
	poll(t, ctx, `!!document.querySelector(`+jsString(aidCalc+` [data-role="tolerance-form"]`)+`)`)
}

// aidSet types value into the study input or select marked key.
func aidSet(t *testing.T, ctx context.Context, sel, value string) {
	t.Helper()
	ok := eval[bool](t, ctx, `(() => {
		const el = document.querySelector(`+jsString(aidCalc+" "+sel)+`);
		if (!el) return false;
		el.value = `+jsString(value)+`;
		el.dispatchEvent(new Event(el.tagName === 'SELECT' ? 'change' : 'input', {bubbles: true}));
		return true;
	})()`)
	if !ok {
		t.Fatalf("no element %s", sel)
	}
}

// aidSpot is the inverting stage's default spot frequency.
func aidSpot(t *testing.T) float64 {
	e, ok := api.LookupEntry("inverting")
	if !ok {
		t.Fatal("no inverting stage in the catalog")
	}
	return e.Frequency
}

func aidClick(t *testing.T, ctx context.Context, action string) {
	t.Helper()
	if !eval[bool](t, ctx, `(() => { const b = document.querySelector(`+jsString(aidCalc+` [data-aid-action="`+action+`"]`)+`); if (!b || b.disabled) return false; b.click(); return true; })()`) {
		t.Fatalf("no enabled %s button", action)
	}
}

func aidState(t *testing.T, ctx context.Context) string {
	return eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+" details.aids")+`).getAttribute('data-aid-state')`)
}

func aidWaitState(t *testing.T, ctx context.Context, want string) {
	t.Helper()
	for deadline := time.Now().Add(waitFor); time.Now().Before(deadline); {
		s := aidState(t, ctx)
		if s == want {
			return
		}
		if s == "error" && want != "error" {
			t.Fatalf("the study failed: %s / %s", eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-role="run-status"]`)+`).textContent`),
				eval[string](t, ctx, `Array.from(document.querySelectorAll(`+jsString(aidCalc+` [data-role="msg"], `+aidCalc+` [data-role="tolerance-msg"]`)+`)).map(e => e.textContent).join(' | ')`))
		}
		time.Sleep(20 * time.Millisecond)
	}
	t.Fatalf("design aids: state %q after %v, want %q", aidState(t, ctx), waitFor, want)
}

// aidSlices watches the page's calls of the engine's toleranceStep (the
// messages to the engine's worker) so that the test can see how a study
// runs: in how many calls (slices, each a task of its own), the
// most trials one call was asked for, and how many animation frames the page
// drew while the study was running. A study run in one piece would be one
// call of all its trials, with no frame drawn until it ended.
const aidSlices = `(() => {
	const c = window.__aidSlices = {calls: 0, most: 0, frames: 0};
	const post = Worker.prototype.postMessage;
	Worker.prototype.postMessage = function (m) {
		if (m && m.name === 'toleranceStep') { c.calls++; c.most = Math.max(c.most, m.args[1]); }
		return post.apply(this, arguments);
	};
	const details = document.querySelector(` + "`" + aidCalc + ` details.aids` + "`" + `);
	const f = () => { if (details.getAttribute('data-aid-state') === 'running') c.frames++; requestAnimationFrame(f); };
	requestAnimationFrame(f);
	return true;
})()`

// aidSliceCount is what aidSlices has seen so far.
type aidSliceCount struct {
	Calls  int `json:"calls"`
	Most   int `json:"most"`
	Frames int `json:"frames"`
}

func aidSliced(t *testing.T, ctx context.Context) aidSliceCount {
	t.Helper()
	return eval[aidSliceCount](t, ctx, `window.__aidSlices`)
}

// aidMaxSlice is the most trials aids.js asks of one toleranceStep call.
const aidMaxSlice = 2000

// toleranceNative is the engine's one-shot answer, natively, to the study
// the test asked of the page (tol, the "tolerance" key as JSON).
func toleranceNative(t *testing.T, tol string) *api.ToleranceResult {
	t.Helper()
	var q api.ToleranceRequest
	if err := json.Unmarshal([]byte(tol), &q); err != nil {
		t.Fatal(err)
	}
	req := api.Request{Topology: "inverting", Frequency: aidSpot(t)}
	api.Tolerance.Ask(&req, &q)
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatalf("native tolerance study: %v", err)
	}
	return api.Tolerance.Result(resp)
}

// checkToleranceShown compares every number of the page's tolerance panel
// with the native engine's one-shot result. They agree to aidRelTol:
// WebAssembly's math functions are Go's portable ones, amd64's partly
// assembly, and may differ in the last bit. (That the sliced run equals the
// one-shot run bit for bit is tested natively, in package calc.)
func checkToleranceShown(t *testing.T, shown map[string]string, want *api.ToleranceResult) {
	t.Helper()
	n := 0
	same := func(key string, v *float64) {
		got, ok := shown[key]
		if !ok {
			return // a quantity the panel leaves out (Re Z of a port that stays positive)
		}
		n++
		if v == nil {
			t.Errorf("%s: page shows %s, engine has no value", key, got)
			return
		}
		g, err := strconv.ParseFloat(got, 64)
		if err != nil || math.Abs(g-*v) > aidRelTol*math.Max(math.Abs(g), math.Abs(*v)) {
			t.Errorf("%s: page %s, native engine %v", key, got, *v)
		}
	}
	for _, q := range want.Quantities {
		k := func(stat string) string { return "tolerance|" + q.ID + "|" + stat + "|||" }
		if q.Quantity != "r" {
			if _, ok := shown[k("p50")]; !ok {
				t.Errorf("the panel lacks the median of %s", q.ID)
			}
		}
		same(k("nominal"), q.Nominal)
		for _, p := range q.Percentiles {
			same(k("p"+strconv.FormatFloat(p.P, 'g', -1, 64)), p.Value)
		}
		same(k("min"), q.Min)
		same(k("max"), q.Max)
		if q.Corners != nil {
			same(k("cornerMin"), q.Corners.Min)
			same(k("cornerMax"), q.Corners.Max)
		}
	}
	for i, tg := range want.Targets {
		f := tg.Fraction
		m := float64(tg.Misses)
		same("tolerance|target|fraction|||"+strconv.Itoa(i), &f)
		same("tolerance|target|misses|||"+strconv.Itoa(i), &m)
	}
	if n < 40 {
		t.Errorf("only %d numbers of the tolerance panel compared", n)
	}
}

// A 2,000-trial study of the inverting stage runs in slices, keeps the
// page drawing frames, and shows exactly the engine's one-shot numbers.
func TestAidsToleranceMatchesEngine(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	// Nothing of the aids runs at page start.
	if n := eval[int](t, ctx, `document.querySelectorAll('[data-aid]').length + performance.getEntriesByName('zport-aids-panels').length`); n != 0 {
		t.Fatalf("%d design-aid results exist before the section is opened", n)
	}
	if eval[bool](t, ctx, `document.querySelector(`+jsString(aidCalc+" details.aids")+`).open`) {
		t.Fatal("the design aids start open")
	}
	aidOpen(t, ctx)
	aidSet(t, ctx, `[data-study="seed"]`, "7")
	aidSet(t, ctx, `[data-study="a0Min-U1"]`, "100k")
	aidSet(t, ctx, `[data-study="gbwMin-U1"]`, "700k")
	aidClick(t, ctx, "add-target")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(1) [data-study="target-value"]`, "0.45")
	aidClick(t, ctx, "add-target")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(2) [data-study="target-quantity"]`, "pm")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(2) [data-study="target-op"]`, "<")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(2) [data-study="target-value"]`, "88.2")

	eval[bool](t, ctx, aidSlices)
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "done")
	// The study ran in slices, each a task of its own between which the
	// page draws and answers; how long it took is the benchmark's business
	// (go run ./build/bench).
	sl := aidSliced(t, ctx)
	t.Logf("2000 trials + 32 corners in %d slices of at most %d trials; %d frames drawn meanwhile", sl.Calls, sl.Most, sl.Frames)
	if sl.Calls < 2 || sl.Most > aidMaxSlice {
		t.Errorf("the study ran in %d engine calls of up to %d trials: not in slices", sl.Calls, sl.Most)
	}

	const study = `{"default": "F", "amps": {"U1": {"a0Min": "100k", "gbwMin": "700k"}}, "seed": 7, "trials": 2000,
		"targets": [{"quantity": "z", "port": "out", "op": ">", "value": 0.45}, {"quantity": "pm", "op": "<", "value": 88.2}]}`
	want := toleranceNative(t, study)
	if want.Done != 2000 || len(want.Targets) != 2 || want.Targets[0].Misses == 0 {
		t.Fatalf("native study: %d trials, targets %+v", want.Done, want.Targets)
	}
	shown := aidNumbers(t, ctx, "tolerance")
	checkToleranceShown(t, shown, want)
	if n := eval[int](t, ctx, `document.querySelectorAll(`+jsString(aidCalc+` [data-role="tolerance-results"] svg.zplot-hist`)+`).length`); n < 8 {
		t.Errorf("%d histograms, want one per quantity shown", n)
	}
	checkHealthyAids(t, ctx)
}

// checkHealthyAids fails on any script error or policy violation the
// probe recorded.
func checkHealthyAids(t *testing.T, ctx context.Context) {
	t.Helper()
	if errs := eval[[]string](t, ctx, `(window.__e2e && window.__e2e.errors) || []`); len(errs) > 0 {
		t.Errorf("page errors: %q", errs)
	}
}

// Cancel stops a long study mid-way: the page keeps drawing and answering
// edits, the previous results stay, and the next run works.
func TestAidsCancel(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	aidOpen(t, ctx)
	aidSet(t, ctx, `[data-study="trials"]`, "300")
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "done")
	if got := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` .tol-panel`)+`).dataset.trials`); got != "300" {
		t.Fatalf("first run: %s trials", got)
	}

	aidSet(t, ctx, `[data-study="trials"]`, "100000")
	eval[bool](t, ctx, aidSlices)
	aidClick(t, ctx, "run")
	poll(t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-role="progress"]`)+`).value > 200`)
	if s := aidState(t, ctx); s != "running" {
		t.Fatalf("state %q during the run", s)
	}
	// The calculator still answers an edit while the study runs.
	n0 := eval[int](t, ctx, `performance.getEntriesByName('zport-recompute').length`)
	eval[bool](t, ctx, `(() => { const i = document.querySelector(`+jsString(aidCalc+` input[name="frequency"]`)+`); i.value = '2k'; i.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	poll(t, ctx, fmt.Sprintf(`performance.getEntriesByName('zport-recompute').length > %d`, n0))
	// And it draws: a frame comes while the study is still running.
	nextFrames(t, ctx, 1)
	if s := aidState(t, ctx); s != "running" {
		t.Fatalf("the edit stopped the study (state %q)", s)
	}
	// 100,000 trials held in one task would freeze the page for seconds;
	// the study runs them in slices of at most aidMaxSlice trials.
	if sl := aidSliced(t, ctx); sl.Calls < 2 || sl.Most > aidMaxSlice || sl.Frames < 1 {
		t.Errorf("during the study: %d engine calls of up to %d trials, %d frames drawn; want slices and frames between them", sl.Calls, sl.Most, sl.Frames)
	}
	aidClick(t, ctx, "cancel")
	aidWaitState(t, ctx, "cancelled")
	stopped := aidSliced(t, ctx)
	t.Logf("cancelled after %d slices of up to %d trials, %d frames drawn meanwhile", stopped.Calls, stopped.Most, stopped.Frames)
	status := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-role="run-status"]`)+`).textContent`)
	if !strings.Contains(status, "Cancelled after") || !strings.Contains(status, "previous run") {
		t.Errorf("status after cancel: %q", status)
	}
	if got := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` .tol-panel`)+`).dataset.trials`); got != "300" {
		t.Errorf("after cancel the panel shows a run of %s trials, want the previous 300", got)
	}
	// The results are for a different spot frequency now: marked stale.
	if !eval[bool](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-role="tolerance-results"]`)+`).classList.contains('is-stale')`) {
		t.Error("results of the earlier circuit are not marked out of date")
	}
	// A slice already queued when Cancel was pressed has run once two
	// frames have been drawn since; none may have called the engine.
	done := eval[float64](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-role="progress"]`)+`).value`)
	nextFrames(t, ctx, 2)
	if later := eval[float64](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-role="progress"]`)+`).value`); later != done {
		t.Errorf("the study went on after cancel: %v → %v", done, later)
	}
	if sl := aidSliced(t, ctx); sl.Calls != stopped.Calls {
		t.Errorf("the engine was called %d more times after cancel", sl.Calls-stopped.Calls)
	}
	// Run again: a fresh, complete study.
	aidSet(t, ctx, `[data-study="trials"]`, "200")
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "done")
	if got := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` .tol-panel`)+`).dataset.trials`); got != "200" {
		t.Errorf("the run after cancel shows %s trials", got)
	}
	checkHealthyAids(t, ctx)
}

// The study's settings go into the share link, and the link reproduces
// the study exactly after a reload.
func TestAidsShareLink(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	aidOpen(t, ctx)
	aidSet(t, ctx, `[data-study="tolerance"]`, "J")
	aidSet(t, ctx, `[data-study="part"][data-name="Rp"]`, "none")
	aidSet(t, ctx, `[data-study="distribution"]`, "normal")
	aidSet(t, ctx, `[data-study="seed"]`, "424242")
	aidSet(t, ctx, `[data-study="trials"]`, "500")
	aidSet(t, ctx, `[data-study="series"]`, "E96")
	aidClick(t, ctx, "add-target")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(1) [data-study="target-quantity"]`, "g")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(1) [data-study="target-op"]`, "<")
	aidSet(t, ctx, `[data-role="targets"] > li:nth-child(1) [data-study="target-value"]`, "4.2")
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "done")
	before := aidNumbers(t, ctx, "tolerance")

	// The address follows once the edits pause.
	poll(t, ctx, `location.hash.includes('aid.t1=')`)
	hash := eval[string](t, ctx, `location.hash`)
	for _, want := range []string{"aid.tol=J", "aid.tol.Rp=none", "aid.dist=normal", "aid.seed=424242", "aid.n=500", "aid.e=E96", "aid.t1=g%3C4.2"} {
		if !strings.Contains(hash, want) {
			t.Errorf("the link %s lacks %s", hash, want)
		}
	}
	if share := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-action="share"]`)+`).getAttribute('href')`); share != hash {
		t.Errorf("share link %s, address %s", share, hash)
	}

	// A fresh document, as opening the link in a new tab gives.
	if err := chromedp.Do(ctx, chromedp.Navigate("about:blank")); err != nil {
		t.Fatal(err)
	}
	// (The hash is used as it stands: it is escaped already.)
	load(t, ctx, fileURL("inverting", "")+hash)
	// The link opens the section with its settings; nothing runs by itself.
	poll(t, ctx, `!!document.querySelector(`+jsString(aidCalc+` [data-study="seed"]`)+`)`)
	for sel, want := range map[string]string{
		`[data-study="tolerance"]`: "J", `[data-study="part"][data-name="Rp"]`: "none", `[data-study="distribution"]`: "normal",
		`[data-study="seed"]`: "424242", `[data-study="trials"]`: "500", `[data-study="series"]`: "E96",
		`[data-role="targets"] > li:nth-child(1) [data-study="target-quantity"]`: "g",
		`[data-role="targets"] > li:nth-child(1) [data-study="target-value"]`:    "4.2",
	} {
		if got := eval[string](t, ctx, `(document.querySelector(`+jsString(aidCalc+" "+sel)+`) || {}).value || ''`); got != want {
			t.Errorf("after reload %s = %q, want %q", sel, got, want)
		}
	}
	if n := eval[int](t, ctx, `document.querySelectorAll(`+jsString(aidCalc+` .tol-panel`)+`).length`); n != 0 {
		t.Error("the study ran by itself on opening the link")
	}
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "done")
	after := aidNumbers(t, ctx, "tolerance")
	if len(after) == 0 || len(after) != len(before) {
		t.Fatalf("%d numbers after reload, %d before", len(after), len(before))
	}
	for k, v := range before {
		if after[k] != v {
			t.Errorf("%s: %s before, %s after the reload", k, v, after[k])
		}
	}
	// And they are the engine's.
	const study = `{"default": "J", "parts": {"Rp": "none"}, "distribution": "normal", "seed": 424242, "trials": 500,
		"targets": [{"quantity": "g", "op": "<", "value": 4.2}]}`
	checkToleranceShown(t, after, toleranceNative(t, study))
	checkHealthyAids(t, ctx)
}

// Standard values and sensitivities appear on opening the section, equal
// the engine's, and follow an edit of the calculator.
func TestAidsStandardValuesAndSensitivity(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	aidOpen(t, ctx)
	poll(t, ctx, `!!document.querySelector(`+jsString(aidCalc+` .sens-panel`)+`) && !!document.querySelector(`+jsString(aidCalc+` .std-panel`)+`)`)
	req := api.Request{Topology: "inverting", Frequency: aidSpot(t)}
	api.Sensitivity.Ask(&req, &api.SensitivityRequest{})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	sens := aidNumbers(t, ctx, "sensitivity")
	n := 0
	for _, q := range api.Sensitivity.Result(resp).Quantities {
		for _, en := range q.Entries {
			key := "sensitivity|" + q.ID + "|value|" + en.Parameter + "||"
			got, ok := sens[key]
			if !ok || en.Value == nil {
				t.Errorf("sensitivity of %s to %s: page %q, engine %v", q.ID, en.Parameter, got, en.Value)
				continue
			}
			n++
			// The difference quotients magnify a last-bit difference of
			// the math functions between wasm and native by 1/h, so
			// within 1e-10 absolute.
			if g, _ := strconv.ParseFloat(got, 64); math.Abs(g-*en.Value) > 1e-10*math.Max(1, math.Abs(*en.Value)) {
				t.Errorf("%s: page %s, native %v", key, got, *en.Value)
			}
		}
	}
	if n < 50 {
		t.Errorf("only %d sensitivities compared", n)
	}
	// The gain-setting pair of the inverting stage: R2/R1 = 4.7 is exact in E24.
	std := aidNumbers(t, ctx, "standard")
	if std["standard|ratio|num|||0"] != "47000" || std["standard|ratio|den|||0"] != "10000" {
		t.Errorf("ratio pair %s/%s, want 47000/10000", std["standard|ratio|num|||0"], std["standard|ratio|den|||0"])
	}
	if got := std["standard|Rp|value||nearest|"]; got != "9100" {
		t.Errorf("Rp = 8.87 kΩ snapped to %s in E24, want 9100 (IEC 60063 E24 has 8.2k and 9.1k)", got)
	}

	// An edit of the calculator updates them: R2 = 50k → 51k nearest in E24.
	n0 := eval[int](t, ctx, `performance.getEntriesByName('zport-aids-panels').length`)
	eval[bool](t, ctx, `(() => { const i = document.querySelector(`+jsString(aidCalc+` input[name="R2"]`)+`); i.value = '50k'; i.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	poll(t, ctx, fmt.Sprintf(`performance.getEntriesByName('zport-aids-panels').length > %d`, n0))
	std = aidNumbers(t, ctx, "standard")
	if got := std["standard|R2|value||nearest|"]; got != "51000" {
		t.Errorf("after R2 = 50k the nearest E24 value shows %s, want 51000", got)
	}
	// The resistor series is the user's choice.
	n1 := eval[int](t, ctx, `performance.getEntriesByName('zport-aids-panels').length`)
	aidSet(t, ctx, `[data-study="series"]`, "E96")
	poll(t, ctx, fmt.Sprintf(`performance.getEntriesByName('zport-aids-panels').length > %d`, n1))
	if got := aidNumbers(t, ctx, "standard")["standard|R2|value||nearest|"]; got != "49900" {
		t.Errorf("R2 = 50k nearest in E96 shows %s, want 49900", got)
	}
	d := eval[[]float64](t, ctx, `performance.getEntriesByName('zport-aids-panels').map(e => e.duration)`)
	t.Logf("standard values + sensitivity updates: %v ms", d)
	checkHealthyAids(t, ctx)
}

// A bad setting gets its message beside the input and nothing runs.
func TestAidsBadSetting(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	aidOpen(t, ctx)
	aidSet(t, ctx, `[data-study="part"][data-name="R1"]`, "Q")
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "error")
	msg := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` tr[data-part="R1"] [data-role="msg"]`)+`).textContent`)
	if msg == "" || !eval[bool](t, ctx, `document.querySelector(`+jsString(aidCalc+` [data-name="R1"]`)+`).getAttribute('aria-invalid') === 'true'`) {
		t.Errorf("no message beside R1's tolerance (got %q)", msg)
	}
	aidSet(t, ctx, `[data-study="part"][data-name="R1"]`, "")
	aidSet(t, ctx, `[data-study="seed"]`, "-3")
	aidClick(t, ctx, "run")
	aidWaitState(t, ctx, "error")
	if msg := eval[string](t, ctx, `document.querySelector(`+jsString(aidCalc+` .seed-field [data-role="msg"]`)+`).textContent`); !strings.Contains(msg, "seed") {
		t.Errorf("seed message %q", msg)
	}
	checkHealthyAids(t, ctx)
}

// Screenshots of the design-aid section of the Howland pump's page at
// desktop and phone width, one per screenful from its top, written to
// ZPORT_AIDS_SHOTS when that is set (for looking at) and checked to be
// real images; the page must not grow wider than the screen.
func TestAidsScreenshots(t *testing.T) {
	browser := start(t)
	dir := os.Getenv("ZPORT_AIDS_SHOTS")
	if dir == "" {
		dir = t.TempDir()
	}
	const calc = "#calc-howland"
	for _, sz := range []struct {
		name string
		w, h int64
	}{{"desktop", 1280, 800}, {"phone", 390, 844}} {
		// A tab of its own: the page would bring back what the other
		// size's run typed (its draft).
		ctx := newTab(t, browser)
		if err := chromedp.Do(ctx, chromedp.EmulateViewport(sz.w, sz.h)); err != nil {
			t.Fatal(err)
		}
		load(t, ctx, fileURL("howland", ""))
		eval[bool](t, ctx, `(document.querySelector(`+jsString(calc+" details.aids > summary")+`).click(), true)`)
		poll(t, ctx, `!!document.querySelector(`+jsString(calc+` .sens-panel`)+`) && !!document.querySelector(`+jsString(calc+` .std-panel`)+`)`)
		// The load left out, the pump's own output resistance swings
		// through zero with 1 % parts; a target on it.
		eval[bool](t, ctx, `(() => { const i = document.querySelector(`+jsString(calc+` input[name="RL"]`)+`); i.value = ''; i.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
		poll(t, ctx, `!document.querySelector(`+jsString(calc+` tr[data-part="RL"]`)+`)`)
		eval[bool](t, ctx, `(() => {
			const b = document.querySelector(`+jsString(calc+` [data-aid-action="add-target"]`)+`); b.click();
			const row = document.querySelector(`+jsString(calc+` [data-role="targets"] > li`)+`);
			row.querySelector('[data-study="target-quantity"]').value = 'z:out';
			row.querySelector('[data-study="target-op"]').value = '<';
			const v = row.querySelector('[data-study="target-value"]'); v.value = '1M';
			v.dispatchEvent(new Event('input', {bubbles: true}));
			document.querySelector(`+jsString(calc+` [data-role="tolerance-form"]`)+`).requestSubmit();
			return true; })()`)
		poll(t, ctx, `document.querySelector(`+jsString(calc+" details.aids")+`).dataset.aidState === 'done'`)
		if wide := eval[float64](t, ctx, `document.documentElement.scrollWidth`); wide > float64(sz.w)+1 {
			t.Errorf("%s: the page is %v px wide at a %d px viewport", sz.name, wide, sz.w)
		}
		top := eval[float64](t, ctx, `document.querySelector(`+jsString(calc+" details.aids")+`).getBoundingClientRect().top + scrollY`)
		height := eval[float64](t, ctx, `document.querySelector(`+jsString(calc+" details.aids")+`).getBoundingClientRect().height`)
		for i, y := 0, top; y < top+height && i < 40; i, y = i+1, y+float64(sz.h) {
			eval[bool](t, ctx, `(scrollTo(0, `+strconv.FormatFloat(y, 'f', 0, 64)+`), true)`)
			nextFrames(t, ctx, 2) // let content-visibility paint what scrolled in
			shot, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
			if err != nil {
				t.Fatal(err)
			}
			if len(shot) < 10000 {
				t.Errorf("%s screenshot %d is only %d bytes", sz.name, i, len(shot))
			}
			if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("aids-%s-%02d.png", sz.name, i)), shot, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		checkHealthyAids(t, ctx)
	}
}

// The custom-circuit page has the same design aids: a link with a circuit
// and aid settings opens the section with them, lists the circuit's parts,
// keeps an edit of a setting in the address, and runs the study to the
// engine's numbers.
func TestAidsOnCustomPage(t *testing.T) {
	ctx := start(t)
	// A non-inverting stage as circuit text (values our own).
	const circuit = "vsource Vin in gnd 1\nopamp U1 in fb out a0=100k gbw=1M ro=100\nresistor R1 fb gnd 2k\nresistor R2 out fb 18k\nport out out gnd\n"
	frag := "c=" + edCompress(t, []byte(circuit)) + "&ref=U1&port=out&src=Vin&out=out&f=1k&from=10&to=100M&points=200&aid.seed=3&aid.n=400&aid.a0.U1=50k"
	load(t, ctx, fileURL("custom", frag))
	const d = `document.querySelector('[data-circuit-editor] details.aids')`
	poll(t, ctx, `!!`+d+` && `+d+`.open && !!`+d+`.querySelector('.sens-panel') && !!`+d+`.querySelector('.std-panel')`)
	parts := eval[[]string](t, ctx, `Array.from(`+d+`.querySelectorAll('[data-study="part"]')).map(e => e.dataset.name)`)
	if strings.Join(parts, ",") != "R1,R2" {
		t.Errorf("parts %v, want R1, R2", parts)
	}
	if v := eval[string](t, ctx, d+`.querySelector('[data-study="a0Min-U1"]').value`); v != "50k" {
		t.Errorf("a0 minimum from the link: %q", v)
	}
	eval[bool](t, ctx, `(() => { const s = `+d+`.querySelector('[data-study="seed"]'); s.value = '8'; s.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	poll(t, ctx, `location.hash.includes('aid.seed=8') && location.hash.includes('aid.a0.U1=50k')`)
	eval[bool](t, ctx, `(`+d+`.querySelector('[data-role="tolerance-form"]').requestSubmit(), true)`)
	poll(t, ctx, d+`.dataset.aidState === 'done'`)
	raw := eval[string](t, ctx, `JSON.stringify(Array.from(`+d+`.querySelectorAll('[data-aid="tolerance"][data-value]')).map(e => [e.dataset.quantity, e.dataset.stat, e.dataset.value]))`)
	var shown [][3]string
	if err := json.Unmarshal([]byte(raw), &shown); err != nil {
		t.Fatal(err)
	}
	r := api.Request{Circuit: circuit, Reference: "U1", Ports: []string{"out"}, Gain: &api.GainSpec{Source: "Vin", Output: "out"}, Frequency: 1000}
	seed := uint64(8)
	api.Tolerance.Ask(&r, &api.ToleranceRequest{Seed: &seed, Trials: 400, Amps: map[string]api.AmpSpreadRequest{"U1": {A0Min: "50k"}}})
	resp, err := api.Analyze(r)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{}
	for _, q := range api.Tolerance.Result(resp).Quantities {
		for _, p := range q.Percentiles {
			want[q.ID+"|p"+strconv.FormatFloat(p.P, 'g', -1, 64)] = *p.Value
		}
	}
	n := 0
	for _, s := range shown {
		w, ok := want[s[0]+"|"+s[1]]
		if !ok {
			continue
		}
		n++
		if g, _ := strconv.ParseFloat(s[2], 64); math.Abs(g-w) > aidRelTol*math.Abs(w) {
			t.Errorf("%s %s: page %s, native %v", s[0], s[1], s[2], w)
		}
	}
	if n < 20 {
		t.Errorf("only %d percentiles compared", n)
	}
	checkHealthy(t, ctx)
}

// The single-file export carries the design aids too.
func TestAidsSingleFile(t *testing.T) {
	ctx := start(t)
	u := (&url.URL{Scheme: "file", Path: filepath.ToSlash(singleFile)}).String() + "#p=inverting&aid.n=150&aid.seed=2"
	load(t, ctx, u)
	const d = `document.querySelector('#page-inverting details.aids')`
	poll(t, ctx, `!!`+d+` && `+d+`.open && !!`+d+`.querySelector('[data-role="tolerance-form"]')`)
	if v := eval[string](t, ctx, d+`.querySelector('[data-study="trials"]').value`); v != "150" {
		t.Errorf("trials from the link: %q", v)
	}
	eval[bool](t, ctx, `(`+d+`.querySelector('[data-role="tolerance-form"]').requestSubmit(), true)`)
	poll(t, ctx, d+`.dataset.aidState === 'done'`)
	if n := eval[string](t, ctx, d+`.querySelector('.tol-panel').dataset.trials`); n != "150" {
		t.Errorf("single file: a study of %s trials", n)
	}
	if h := eval[string](t, ctx, `location.hash`); !strings.HasPrefix(h, "#p=inverting&") || !strings.Contains(h, "aid.seed=2") {
		t.Errorf("single-file link %s", h)
	}
	checkHealthyAids(t, ctx)
}
