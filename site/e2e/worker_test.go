//go:build !js

package e2e

import (
	"slices"
	"testing"
)

// The engine runs in a Web Worker started from a blob: (the page's CSP
// admits it, and the probe sees no violation): the page's own global scope
// has neither the engine nor Go's runtime. A calculator's recompute that
// is still waiting when a newer one comes is superseded (it answers
// {superseded: true}) and never reaches the engine; the one already
// running finishes.
func TestEngineInWorker(t *testing.T) {
	ctx := start(t)
	load(t, ctx, fileURL("inverting", ""))
	if eval[bool](t, ctx, `typeof globalThis.zport !== 'undefined' || typeof globalThis.Go !== 'undefined'`) {
		t.Error("the engine or Go's runtime is in the page's global scope")
	}
	n0 := eval[int](t, ctx, `performance.getEntriesByName('zport-engine-call').length`)
	eval[bool](t, ctx, `(() => {
		window.laneResults = [];
		for (const [i, name] of ['first', 'second', 'third'].entries()) {
			zportSite.call('panel', {topology: 'inverting', id: 'lane-test', params: {}, frequency: (i + 1) + 'k',
				sweep: {from: '10', to: '100M', points: '50'}, settings: {}})
				.then(out => window.laneResults.push(name + ':' + (out.superseded ? 'superseded' : out.error ? 'error ' + out.error.message : out.html ? 'html' : '?')));
		}
		return true;
	})()`)
	poll(t, ctx, `window.laneResults.length === 3`)
	got := eval[[]string](t, ctx, `window.laneResults`)
	if want := []string{"second:superseded", "first:html", "third:html"}; !slices.Equal(got, want) {
		t.Errorf("answers in the order %q, want %q", got, want)
	}
	// Each answer's measure is taken before its promise resolves; a warm-up
	// call the page makes is never measured.
	if n := eval[int](t, ctx, `performance.getEntriesByName('zport-engine-call').length`) - n0; n != 2 {
		t.Errorf("%d engine calls for three requests, one superseded: want 2", n)
	}
	checkHealthy(t, ctx)
}
