//go:build !js

package e2e

import (
	"context"
	"fmt"
	"net/url"
	"path"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"

	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/chromedp"
)

// pages lists the HTML pages of the built site by name ("index", …). In
// -short mode, where the site is not built, it skips t.
func pages(t *testing.T) []string {
	t.Helper()
	if testing.Short() {
		t.Skip("browser tests are skipped in -short mode")
	}
	if buildErr != nil {
		t.Fatalf("building the site: %v", buildErr)
	}
	files, err := filepath.Glob(filepath.Join(distDir, "*.html"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no pages in %s (%v)", distDir, err)
	}
	var names []string
	for _, f := range files {
		names = append(names, strings.TrimSuffix(filepath.Base(f), ".html"))
	}
	sort.Strings(names)
	return names
}

// No page asks for anything outside its own folder, from file:// or over
// http: every request the DevTools protocol reports, while each page loads
// and is used (an edit, a chart hovered, the results copied, the menus and
// details opened), stays under the site's folder. Each page is checked in
// a tab of its own, side by side with the others.
func TestNoRequestLeavesTheFolder(t *testing.T) {
	t.Parallel()
	t.Run("file", func(t *testing.T) {
		base := (&url.URL{Scheme: "file", Path: filepath.ToSlash(distDir) + "/"}).String()
		checkRequests(t, base, func(name string) string { return fileURL(name, "") })
	})
	t.Run("http", func(t *testing.T) {
		base := serveSubpath(t, "/wiki/a/b/zport/")
		checkRequests(t, base, func(name string) string { return base + name + ".html" })
	})
}

func checkRequests(t *testing.T, base string, pageURL func(string) string) {
	names := pages(t)
	// What the watchers saw, over all the pages: the site's own files (so
	// they would see others).
	var mu sync.Mutex
	seen := map[string]bool{}
	t.Cleanup(func() {
		for _, f := range []string{"style.css", "zport.js", "zport-engine.js", "plothover.js"} {
			if !seen[f] {
				t.Errorf("no request for %s was reported: the watcher is not seeing the pages' requests", f)
			}
		}
	})
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			ctx := start(t)
			reqs := watchRequests(t, ctx)
			load(t, ctx, pageURL(name))
			use(t, ctx)
			checkHealthy(t, ctx)
			// Let anything the page started arrive.
			reqs.settle(t, ctx)
			if out := reqs.outside(base); len(out) > 0 {
				t.Errorf("requests outside %s:\n%s", base, strings.Join(out, "\n"))
			}
			reqs.mu.Lock()
			defer reqs.mu.Unlock()
			mu.Lock()
			defer mu.Unlock()
			for _, u := range reqs.urls {
				if p, err := url.Parse(u); err == nil {
					seen[path.Base(p.Path)] = true
				}
			}
			if !seen[name+".html"] {
				t.Errorf("no request for %s.html was reported", name)
			}
			t.Logf("%d requests, all under %s", len(reqs.urls), base)
		})
	}
}

// use does what a reader does on a page: opens the stage menu and every
// details element, and on a calculator edits a value, hovers a chart and
// copies the results.
func use(t *testing.T, ctx context.Context) {
	t.Helper()
	eval[bool](t, ctx, `document.querySelectorAll('details').forEach(function (d) { d.open = true; }), true`)
	id := eval[string](t, ctx, `(document.querySelector('[data-calculator]') || {}).id || ''`)
	if id == "" {
		return
	}
	topo := eval[string](t, ctx, `document.querySelector('[data-calculator]').getAttribute('data-topology')`)
	first := eval[string](t, ctx, `document.querySelector('[data-calculator] input[name]').name`)
	calls := eval[int](t, ctx, `performance.getEntriesByName('zport-engine-call').length`)
	typeInto(t, ctx, topo, first, eval[string](t, ctx, `document.querySelector('[data-calculator] input[name]').value`)+"0")
	poll(t, ctx, fmt.Sprintf(`performance.getEntriesByName('zport-engine-call').length > %d`, calls))
	box := eval[[]float64](t, ctx, `(function () { var s = document.querySelector('svg.zplot'); s.scrollIntoView(); var r = s.getBoundingClientRect(); return [r.left + r.width / 2, r.top + r.height / 3]; })()`)
	if err := chromedp.Do(ctx, chromedp.MouseEvent(input.DispatchMouseEventTypeMouseMoved, box[0], box[1])); err != nil {
		t.Fatal(err)
	}
	if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#`+id+` [data-action="copy"]`))); err != nil {
		t.Fatal(err)
	}
	poll(t, ctx, `document.querySelector('#`+id+` [data-role="action-msg"]').textContent !== ''`)
}
