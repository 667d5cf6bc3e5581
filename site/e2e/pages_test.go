//go:build !js

package e2e

import (
	"context"
	"testing"

	"zport/engine/api"
	"zport/site/calc"
)

// Every topology page of the catalog, opened from file://, goes live and
// then shows exactly what the native engine computes for its defaults.
func TestTopologyPagesFromFile(t *testing.T) {
	t.Parallel()
	checkTopologyPages(t, func(id string) string { return fileURL(id, "") })
}

// The same pages served over http under a deep sub-path, as from a wiki.
func TestTopologyPagesUnderSubpath(t *testing.T) {
	t.Parallel()
	base := serveSubpath(t, "/wiki/a/b/zport/")
	checkTopologyPages(t, func(id string) string { return base + id + ".html" })
}

// checkTopologyPages checks every stage's page, each in a tab of its own.
func checkTopologyPages(t *testing.T, url func(id string) string) {
	cat := api.Catalog()
	if len(cat) < 10 {
		t.Fatalf("the catalog has %d stages, want the ten of the issue at least", len(cat))
	}
	for _, e := range cat {
		t.Run(e.ID, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, url(e.ID))
			checkLive(t, ctx, e.ID)
			// The inputs show the catalog's defaults, so the comparison
			// below is with the defaults' analysis.
			in := inputs(t, ctx, e.ID)
			d := calc.DefaultForm(e)
			for _, p := range e.Params {
				if in[p.Name] != d.Params[p.Name] {
					t.Errorf("input %s = %q, the catalog's default is %q", p.Name, in[p.Name], d.Params[p.Name])
				}
			}
			for name, v := range map[string]string{"frequency": d.Frequency, "sweep.from": d.Sweep.From, "sweep.to": d.Sweep.To, "sweep.points": d.Sweep.Points} {
				if in[name] != v {
					t.Errorf("input %s = %q, the catalog's default is %q", name, in[name], v)
				}
			}
			if want := defaultInputs(e); len(in) != len(want) {
				t.Errorf("%d inputs, want %d parameters, 4 analysis fields and %d analyses' settings", len(in), len(e.Params), len(want)-len(e.Params)-4)
			}
			resp := checkAgainstNative(t, ctx, e.ID)
			if n := eval[int](t, ctx, `document.querySelectorAll(`+jsString(calcSel(e.ID)+` tbody[data-port]`)+`).length`); n != len(resp.Ports) || n != len(e.Ports) {
				t.Errorf("%d port rows, the catalog has %d ports and the engine answered %d", n, len(e.Ports), len(resp.Ports))
			}
			for _, c := range clippedText(t, ctx, e.ID) {
				t.Errorf("chart text runs outside its chart: %s", c)
			}
			if got := eval[string](t, ctx, `document.querySelector('[data-role="engine-status"]').getAttribute('data-state')`); got != "ready" {
				t.Errorf("engine status %q, want ready", got)
			}
			checkHealthy(t, ctx)
		})
	}
}

// clippedText lists the text elements of calculator id's charts that
// reach outside their chart horizontally, where the SVG clips them (the
// extents are the browser's, with its fonts and the charts' transforms).
func clippedText(t *testing.T, ctx context.Context, id string) []string {
	t.Helper()
	return eval[[]string](t, ctx, `(function () {
  var out = [];
  document.querySelectorAll(`+jsString(calcSel(id)+` svg.zplot`)+`).forEach(function (s) {
    var box = s.getBoundingClientRect(), measured = 0;
    s.querySelectorAll('text').forEach(function (e) {
      if (e.closest('[display="none"]') || !e.textContent) return;
      var b = e.getBoundingClientRect();
      if (b.width > 0) measured++;
      if (b.left < box.left - 0.5 || b.right > box.right + 0.5) {
        out.push(s.id + ': "' + e.textContent + '" spans x ' + (b.left - box.left).toFixed(1) + ' to ' + (b.right - box.left).toFixed(1) + ' of ' + box.width.toFixed(1) + ' px');
      }
    });
    if (!(box.width > 0) || measured < 10) out.push(s.id + ': only ' + measured + ' of its texts could be measured');
  });
  return out;
})()`)
}
