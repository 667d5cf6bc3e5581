//go:build !js

package e2e

import (
	"context"
	"net/url"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"

	"zport/engine/api"
	"zport/site/calc"
)

// singleURL is the file:// URL of the single-file export, with an
// optional fragment.
func singleURL(fragment string) string {
	u := url.URL{Scheme: "file", Path: filepath.ToSlash(singleFile)}
	if fragment != "" {
		u.Fragment, u.RawFragment = fragment, fragment
	}
	return u.String()
}

// shownSection waits until the single-file export shows exactly one
// section, page-NAME, and the title follows it.
func shownSection(t *testing.T, ctx context.Context, name string) {
	t.Helper()
	poll(t, ctx, `(function () {
  var shown = document.querySelectorAll('section.page:not([hidden])');
  return shown.length === 1 && shown[0].id === `+jsString("page-"+name)+` && shown[0].offsetHeight > 0 &&
    document.title === shown[0].querySelector('h1').textContent + ' · zport';
})()`)
}

// The single-file export works from file://: the engine starts, every
// calculator goes live, its sections are reached through its own links,
// a calculator answers edits with the native engine's numbers, a link to
// a section with settings opens them, and nothing is requested but the
// file itself.
func TestSingleFileExport(t *testing.T) {
	ctx := start(t)
	reqs := watchRequests(t, ctx)
	load(t, ctx, singleURL(""))
	shownSection(t, ctx, "index")
	n := eval[int](t, ctx, `document.querySelectorAll('[data-calculator]').length`)
	if n != len(api.Catalog()) {
		t.Errorf("%d calculators in the single file, the catalog has %d stages", n, len(api.Catalog()))
	}
	for _, e := range api.Catalog() {
		checkLive(t, ctx, e.ID)
		checkAgainstNative(t, ctx, e.ID)
	}

	// The start page's catalog links to a stage's section.
	if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#page-index table.catalog a[href="#p=inverting"]`))); err != nil {
		t.Fatal(err)
	}
	shownSection(t, ctx, "inverting")
	typeInto(t, ctx, "inverting", "R2", "100k")
	state := waitState(t, ctx, "inverting")
	if !strings.HasPrefix(state, "#p=inverting&") {
		t.Errorf("settings %q do not name the section first", state)
	}
	checkAgainstNative(t, ctx, "inverting")

	// The pager leads to the next stage, whose calculator works too.
	next := eval[string](t, ctx, `document.querySelector('#page-inverting a[rel=next]').getAttribute('href')`)
	name := strings.TrimPrefix(next, "#p=")
	if name == next || name == "" {
		t.Fatalf("the pager's next link is %q", next)
	}
	if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#page-inverting a[rel=next]`))); err != nil {
		t.Fatal(err)
	}
	shownSection(t, ctx, name)
	topo := eval[string](t, ctx, `document.querySelector('#page-`+name+` [data-calculator]').getAttribute('data-topology')`)
	checkAgainstNative(t, ctx, topo)
	in := inputs(t, ctx, topo)
	var param string
	for _, p := range mustEntry(t, topo).Params {
		if !p.Optional {
			param = p.Name
			break
		}
	}
	typeInto(t, ctx, topo, param, in[param]+"0")
	waitState(t, ctx, topo)
	checkAgainstNative(t, ctx, topo)

	// The site navigation reaches the pages without a calculator.
	for _, page := range []string{"method", "about", "index"} {
		sel := `section.page:not([hidden]) .site-nav a[href="#p=` + page + `"]`
		if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(sel))); err != nil {
			t.Fatalf("click %s: %v", sel, err)
		}
		shownSection(t, ctx, page)
	}
	checkHealthy(t, ctx)

	// A link to a section with settings opens them.
	e := mustEntry(t, "transimpedance")
	f := calc.DefaultForm(e)
	f.Params["Rf"] = "470k"
	f.Frequency = "20k"
	loadFresh(t, ctx, singleURL("p=transimpedance&"+f.State(e)))
	shownSection(t, ctx, "transimpedance")
	checkLive(t, ctx, "transimpedance")
	if got := inputs(t, ctx, "transimpedance"); got["Rf"] != "470k" || got["frequency"] != "20k" {
		t.Errorf("inputs from the link: Rf %q, frequency %q", got["Rf"], got["frequency"])
	}
	checkAgainstNative(t, ctx, "transimpedance")

	// A hostile one is refused there too.
	loadFresh(t, ctx, singleURL("p=inverting&R1=<img src=x onerror=alert(1)>"))
	shownSection(t, ctx, "inverting")
	poll(t, ctx, `(function () { var n = document.querySelector('#page-inverting [data-role="notice"]'); return !n.hidden && /^Not used from this link: R1 = /.test(n.textContent); })()`)
	if got := inputs(t, ctx, "inverting"); !sameMap(got, defaultInputs(mustEntry(t, "inverting"))) {
		t.Errorf("inputs after a refused link: %v", got)
	}
	if n := eval[int](t, ctx, `document.querySelectorAll('img').length`); n != 0 {
		t.Errorf("%d img elements appeared", n)
	}
	checkAgainstNative(t, ctx, "inverting")
	checkHealthy(t, ctx)

	reqs.settle(t, ctx)
	if out := reqs.outside(singleURL("")); len(out) > 0 {
		t.Errorf("the single file asked for other resources:\n%s", strings.Join(out, "\n"))
	}
}

func mustEntry(t *testing.T, id string) api.CatalogEntry {
	t.Helper()
	e, ok := api.LookupEntry(id)
	if !ok {
		t.Fatalf("no stage %s", id)
	}
	return e
}
