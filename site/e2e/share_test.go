//go:build !js

package e2e

import (
	"bytes"
	"context"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"

	"zport/engine/api"
	"zport/site/calc"
)

// loadFresh opens u as a new document even when the tab already shows the
// same page with another fragment (which would only fire hashchange).
func loadFresh(t *testing.T, ctx context.Context, u string) {
	t.Helper()
	if err := chromedp.Do(ctx, chromedp.Navigate("about:blank")); err != nil {
		t.Fatalf("navigate about:blank: %v", err)
	}
	load(t, ctx, u)
}

// A share link reproduces the page: two parameters and the spot frequency
// changed in one tab, the link opened in a fresh tab shows the same inputs
// and exactly the same results and charts.
func TestShareLinkRoundTrips(t *testing.T) {
	ctx := start(t)
	const id = "inverting"
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)
	typeInto(t, ctx, id, "Rs", "2k2")
	typeInto(t, ctx, id, "R2", "100k")
	typeInto(t, ctx, id, "frequency", "10k")
	state := waitState(t, ctx, id)
	for _, kv := range []string{"Rs=2k2", "R2=100k", "f=10k"} {
		if !strings.Contains(state, kv) {
			t.Errorf("the settings %q do not hold %s", state, kv)
		}
	}
	link := eval[string](t, ctx, `location.href`)
	if !strings.HasSuffix(link, state) || !strings.HasPrefix(link, "file://") {
		t.Fatalf("address %q does not end in the share link's settings %q", link, state)
	}
	// The share control copies the link rather than navigating.
	if err := chromedp.Do(ctx, chromedp.Click(chromedp.CSS(calcSel(id)+` [data-action="share"]`))); err != nil {
		t.Fatal(err)
	}
	poll(t, ctx, `document.querySelector(`+jsString(calcSel(id)+` [data-role="action-msg"]`)+`).textContent !== ''`)
	if got := eval[string](t, ctx, `location.href`); got != link {
		t.Errorf("clicking the share link moved the page to %q", got)
	}
	wantIn, wantShown, wantCharts := inputs(t, ctx, id), shownValues(t, ctx, id), charts(t, ctx, id)
	checkAgainstNative(t, ctx, id)

	tab := newTab(t, ctx)
	load(t, tab, link)
	checkLive(t, tab, id)
	if got := inputs(t, tab, id); !sameMap(got, wantIn) {
		t.Errorf("inputs from the link:\n got %v\nwant %v", got, wantIn)
	}
	if !sameShown(shownValues(t, tab, id), wantShown) {
		t.Error("the values from the link differ from the page that made it")
	}
	if !sameCharts(charts(t, tab, id), wantCharts) {
		t.Error("the charts from the link differ from the page that made it")
	}
	if h := eval[string](t, tab, `location.hash`); h != state {
		t.Errorf("the opened link's address became %q, want %q", h, state)
	}
	if eval[bool](t, tab, `!document.querySelector('[data-role="notice"]').hidden`) {
		t.Errorf("a good link shows a notice: %q", eval[string](t, tab, `document.querySelector('[data-role="notice"]').textContent`))
	}
	checkHealthy(t, tab)

	// A link followed on a page already open (only the fragment changes)
	// loads its settings too.
	e, _ := api.LookupEntry(id)
	f := calc.DefaultForm(e)
	f.Params["R1"] = "22k"
	f.Frequency = "3k3"
	next := "#" + f.State(e)
	eval[bool](t, tab, `location.hash = `+jsString(next)+`, true`)
	poll(t, tab, `document.querySelector(`+jsString(inputSel(id, "R1"))+`).value === '22k' && location.hash === `+jsString(next))
	if got := inputs(t, tab, id)["frequency"]; got != "3k3" {
		t.Errorf("frequency %q after following the link, want 3k3", got)
	}
	checkAgainstNative(t, tab, id)
	checkHealthy(t, tab)
}

func sameMap(a, b map[string]string) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || w != v {
			return false
		}
	}
	return true
}

// hostileFragments are fragments a link may carry that the page must
// refuse with a notice: markup, broken escapes, invalid UTF-8, control
// characters, unknown and repeated keys, and far too much text.
func hostileFragments() []struct{ name, raw string } {
	rng := rand.New(rand.NewPCG(4, 4))
	const junkChars = "abcXYZ019=&%<>\"'`;:/?#[]{}()!*+,-._~ \\|^$@"
	var junk strings.Builder
	junk.WriteString("R1=")
	for junk.Len() < 100<<10 {
		junk.WriteByte(junkChars[rng.IntN(len(junkChars))])
	}
	return []struct{ name, raw string }{
		{"markup", `R1=<img src=x onerror=alert(1)>`},
		{"markup key", `<script>alert(1)</script>=1`},
		{"script url", `R1=10k&javascript:alert(1)=1`},
		{"broken escape", `R1=%E0%A4%A`},
		{"invalid utf-8", `R1=%E0%A4`},
		{"control", `R1=1k%00`},
		{"repeated", `R1=1k&R1=2k`},
		{"unknown key", `R1=1k&nope=1`},
		{"100 KB of junk", junk.String()},
		{"long settings", strings.Repeat("R1=1k&", 1000)},
	}
}

// A malformed or hostile fragment is refused, setting by setting, with a
// visible notice saying exactly what was not used: no script runs, nothing
// of it becomes markup, the page shows the rest of the link with defaults
// in place of what was refused, stays alive, and the address drops the
// hostile text.
//
// Each fragment is opened in a tab of its own, side by side.
func TestHostileFragmentIsRefused(t *testing.T) {
	t.Parallel()
	const id = "inverting"
	e, _ := api.LookupEntry(id)
	check := func(t *testing.T, ctx context.Context, frag string) {
		t.Helper()
		// The page's own script elements, as its HTML holds them.
		html, err := os.ReadFile(filepath.Join(distDir, id+".html"))
		if err != nil {
			t.Fatal(err)
		}
		scripts := bytes.Count(html, []byte("<script"))
		msg := calc.Compute(calc.Form{Topology: id, ID: "calc-" + id, Fragment: &frag})
		if msg.Error != nil || len(msg.Refused) == 0 {
			t.Fatalf("the native engine refuses nothing of the fragment %.80q: %+v", frag, msg.Error)
		}
		want := msg.Notice
		poll(t, ctx, `(function () { var n = document.querySelector('[data-role="notice"]'); return !n.hidden && n.offsetHeight > 0 && n.textContent === `+jsString(want)+`; })()`)
		if got := inputs(t, ctx, id); !sameMap(got, formInputs(*msg.Form)) {
			t.Errorf("inputs after a refused link: %v, want %v", got, formInputs(*msg.Form))
		}
		checkAgainstNative(t, ctx, id)
		if h := eval[string](t, ctx, `location.hash`); h != "#"+msg.State {
			t.Errorf("the address holds %.80q, want the settings in use %.80q", h, msg.State)
		}
		if n := eval[int](t, ctx, `document.querySelectorAll('img, iframe, object, embed').length`); n != 0 {
			t.Errorf("%d embedded elements appeared", n)
		}
		if n := eval[int](t, ctx, `document.scripts.length`); n != scripts {
			t.Errorf("%d scripts on the page, %d in its HTML", n, scripts)
		}
		if got := eval[string](t, ctx, `document.documentElement.dataset.engine`); got != "ready" {
			t.Errorf("engine %q", got)
		}
		checkHealthy(t, ctx)
	}

	for _, h := range hostileFragments() {
		t.Run(h.name, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, fileURL(id, "")+"#"+h.raw)
			checkLive(t, ctx, id)
			// The browser escapes some characters of a fragment; the page
			// reads what the address holds, and so does the check.
			frag := strings.TrimPrefix(eval[string](t, ctx, `window.__e2e.hash`), "#")
			if frag == "" {
				t.Fatal("the page was opened without the fragment")
			}
			check(t, ctx, frag)
		})
	}

	// The same through hashchange on a page that is already live.
	t.Run("hashchange", func(t *testing.T) {
		ctx := start(t)
		load(t, ctx, fileURL(id, ""))
		checkLive(t, ctx, id)
		raw := `R2=<img src=x onerror=alert(2)>`
		frag := eval[string](t, ctx, `location.hash = `+jsString(raw)+`, location.hash.slice(1)`)
		check(t, ctx, frag)
	})

	// A fragment without "=" is an in-page anchor: left alone, no notice.
	t.Run("anchor", func(t *testing.T) {
		ctx := start(t)
		load(t, ctx, fileURL(id, "")+"#%E0%A4%A")
		checkLive(t, ctx, id)
		if eval[bool](t, ctx, `!document.querySelector('[data-role="notice"]').hidden`) {
			t.Errorf("notice for an anchor: %q", eval[string](t, ctx, `document.querySelector('[data-role="notice"]').textContent`))
		}
		if got := inputs(t, ctx, id); !sameMap(got, defaultInputs(e)) {
			t.Errorf("inputs after an anchor: %v", got)
		}
		checkAgainstNative(t, ctx, id)
		checkHealthy(t, ctx)
	})
}

// defaultInputs is what a calculator's inputs hold at the catalog defaults.
func defaultInputs(e api.CatalogEntry) map[string]string { return formInputs(calc.DefaultForm(e)) }

// formInputs is what a calculator's inputs hold for a form.
func formInputs(f calc.Form) map[string]string {
	m := map[string]string{"frequency": f.Frequency, "sweep.from": f.Sweep.From, "sweep.to": f.Sweep.To, "sweep.points": f.Sweep.Points}
	for k, v := range f.Params {
		m[k] = v
	}
	for _, a := range calc.Analyses {
		for _, s := range a.Settings {
			m[a.Field(s.Name)] = s.Default
		}
	}
	return m
}
