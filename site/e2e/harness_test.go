//go:build !js

package e2e

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"maps"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"zport/site"
	"zport/site/browser"
)

// Built site and browser, shared by every test in the package.
var (
	distDir    string // the multi-page site
	singleFile string // the single-file export
	buildErr   error
	shared     = browser.Shared{Width: 1280, Height: 800}
)

func TestMain(m *testing.M) {
	flag.Parse()
	code := func() int {
		if testing.Short() {
			return m.Run() // every test skips: no site to build
		}
		tmp, err := os.MkdirTemp("", "zport-e2e-")
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			return 1
		}
		defer os.RemoveAll(tmp)
		distDir = filepath.Join(tmp, "dist")
		singleFile = filepath.Join(tmp, "single", "zport-single.html")
		buildErr = buildSite(distDir, singleFile)
		defer shared.Stop()
		return m.Run()
	}()
	os.Exit(code)
}

func buildSite(dist, single string) error {
	opt, err := site.ModuleOptions()
	if err != nil {
		return err
	}
	files, err := site.Build(opt)
	if err != nil {
		return err
	}
	if err := files.Write(dist); err != nil {
		return err
	}
	one, err := site.Single(opt)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(filepath.Dir(single), 0o755); err != nil {
		return err
	}
	return os.WriteFile(single, one, 0o644)
}

// start begins a browser test: t runs in parallel with the package's other
// browser tests, in a tab of its own in the shared browser (skipping or
// failing per package browser). It fails t if the site did not build. The
// tab carries a probe (see installProbe) from the first navigation on.
//
// Go's package timeout (go test -timeout, 10 minutes by default) is the
// only limit on how long a test may take; the tab's commands stop a little
// before it, so that a page that hangs fails its own test with the step it
// hung in rather than the whole package with a stack dump.
func start(t *testing.T) context.Context {
	t.Helper()
	t.Parallel()
	ctx := shared.Tab(t)
	if buildErr != nil {
		t.Fatalf("building the site: %v", buildErr)
	}
	if d, ok := t.Deadline(); ok {
		var cancel context.CancelFunc
		ctx, cancel = context.WithDeadline(ctx, d.Add(-15*time.Second))
		t.Cleanup(cancel)
	}
	return installProbe(t, ctx)
}

// newTab opens another tab of the browser of ctx, in the same browser
// context (as a link opened in a new tab does), with its own probe. It
// closes when t ends.
func newTab(t *testing.T, ctx context.Context) context.Context {
	t.Helper()
	tctx, cancel := chromedp.NewContext(ctx)
	t.Cleanup(cancel)
	return installProbe(t, tctx)
}

// probeScript runs in every document of a probed tab before the page's
// own scripts (DevTools injects it, so the page's Content-Security-Policy
// does not apply to it). It keeps the fragment the document was opened
// with (window.__e2e.hash), records uncaught errors, rejected promises and
// policy violations in window.__e2e.errors, and it marks the results
// panels the HTML itself carries (pre-rendered at build time) with
// data-e2e-prerendered when zport.js defines window.zportSite: every such
// panel is in the document by then (the multi-page site runs its scripts
// deferred, after parsing; the single file runs them inline at the end of
// body), and the engine has not started, so none has been replaced. (The
// end of parsing is too late a mark for the single file: its inline
// scripts can start the engine, and render live panels, before
// readyState becomes "interactive".) A panel the engine rendered has no
// mark.
const probeScript = `(function () {
  var p = window.__e2e = { errors: [], prerendered: -1, hash: location.hash };
  window.addEventListener('error', function (e) { p.errors.push('error: ' + e.message); });
  window.addEventListener('unhandledrejection', function (e) { p.errors.push('unhandled rejection: ' + e.reason); });
  document.addEventListener('securitypolicyviolation', function (e) { p.errors.push('csp: ' + e.violatedDirective + ' ' + e.blockedURI); });
  var site;
  Object.defineProperty(window, 'zportSite', { configurable: true, enumerable: true,
    get: function () { return site; },
    set: function (v) {
      if (p.prerendered < 0) {
        var panels = document.querySelectorAll('[data-role="results"] > .panel');
        for (var i = 0; i < panels.length; i++) panels[i].setAttribute('data-e2e-prerendered', '');
        p.prerendered = panels.length;
      }
      site = v;
    } });
})();`

// probe is what a tab's probe saw on the Go side: JavaScript dialogs
// (alert, confirm, prompt), which it dismisses so the page cannot hang.
type probe struct {
	mu      sync.Mutex
	dialogs []string
}

type probeKey struct{}

// installProbe adds probeScript to every new document of the tab of ctx
// and starts watching for dialogs; the returned context carries the probe.
func installProbe(t *testing.T, ctx context.Context) context.Context {
	t.Helper()
	p := &probe{}
	err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*page.EventJavascriptDialogOpening); ok {
			p.mu.Lock()
			p.dialogs = append(p.dialogs, string(e.Type)+": "+e.Message)
			p.mu.Unlock()
			// Listen's callback must not send commands itself.
			go chromedp.Call(ctx, page.HandleJavaScriptDialog, page.HandleJavaScriptDialogParams{Accept: false})
		}
	})
	if err != nil {
		t.Fatalf("listening to page events: %v", err)
	}
	if _, err := chromedp.Call(ctx, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: probeScript}); err != nil {
		t.Fatalf("installing the probe: %v", err)
	}
	return context.WithValue(ctx, probeKey{}, p)
}

// dialogs returns the dialogs the pages of ctx's tab opened so far.
func dialogs(ctx context.Context) []string {
	p, _ := ctx.Value(probeKey{}).(*probe)
	if p == nil {
		return nil
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	return append([]string(nil), p.dialogs...)
}

// checkHealthy fails t when the current page reported an uncaught error
// or a policy violation, or any page of the tab opened a dialog.
func checkHealthy(t *testing.T, ctx context.Context) {
	t.Helper()
	if errs := eval[[]string](t, ctx, `window.__e2e ? window.__e2e.errors : ["the probe is not installed"]`); len(errs) > 0 {
		t.Errorf("the page reported: %q", errs)
	}
	if d := dialogs(ctx); len(d) > 0 {
		t.Errorf("the page opened dialogs: %q", d)
	}
}

// fileURL is the file:// URL of a page of the built site ("inverting" →
// …/dist/inverting.html), with an optional fragment.
func fileURL(page, fragment string) string {
	u := url.URL{Scheme: "file", Path: filepath.ToSlash(filepath.Join(distDir, page+".html")), Fragment: fragment}
	if fragment != "" {
		u.RawFragment = fragment
	}
	return u.String()
}

// serveSubpath serves the built site under prefix (e.g. "/wiki/tools/zport/")
// and returns the server's URL of that prefix.
func serveSubpath(t *testing.T, prefix string) string {
	t.Helper()
	mux := http.NewServeMux()
	mux.Handle(prefix, http.StripPrefix(prefix, http.FileServer(http.Dir(distDir))))
	srv := httptest.NewServer(mux)
	t.Cleanup(srv.Close)
	return srv.URL + prefix
}

// load navigates to u and waits until the page's root element says the
// engine is ready (or fails the test with the page's own reason).
func load(t *testing.T, ctx context.Context, u string) {
	t.Helper()
	tctx, cancel := context.WithTimeout(ctx, waitFor)
	defer cancel()
	if err := chromedp.Do(tctx, chromedp.Navigate(u)); err != nil {
		t.Fatalf("navigate %s: %v", u, err)
	}
	waitEngine(t, ctx)
}

// waitEngine waits for data-engine="ready" on the root element (or
// "none": a page without a calculator does not start the engine).
func waitEngine(t *testing.T, ctx context.Context) {
	t.Helper()
	poll(t, ctx, `(function () {
  var state = document.documentElement.dataset.engine || "";
  if (state === "failed") throw new Error("engine failed: " + document.body.innerText.slice(0, 400));
  return state === "ready" || state === "none";
})()`)
}

// eval evaluates a JavaScript expression and returns its value as T.
func eval[T any](t *testing.T, ctx context.Context, js string) T {
	t.Helper()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](js))
	if err != nil {
		t.Fatalf("evaluate %.120q: %v", js, err)
	}
	return v
}

// jsString quotes s as a JavaScript string literal.
func jsString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// waitFor is how long a test waits for the page to reach a state before
// it fails. Only a failing test waits that long: it is a safety net, not a
// measure of speed, and generous because the machines the tests run on are
// shared and at times heavily loaded.
const waitFor = 2 * time.Minute

// poll evaluates cond (a JavaScript boolean expression) until it holds, or
// fails t after waitFor. An exception thrown by cond fails t at once with
// its message.
func poll(t *testing.T, ctx context.Context, cond string) {
	t.Helper()
	for deadline := time.Now().Add(waitFor); time.Now().Before(deadline); {
		if eval[bool](t, ctx, cond) {
			return
		}
		time.Sleep(15 * time.Millisecond)
	}
	t.Fatalf("timed out after %v waiting for %s", waitFor, cond)
}

// nextFrames waits until the page has drawn n more animation frames: what
// it changed before is then laid out and painted, and the tasks it queued
// before have run.
func nextFrames(t *testing.T, ctx context.Context, n int) {
	t.Helper()
	js := fmt.Sprintf(`new Promise(function (r) { var n = %d; (function f() { if (n-- > 0) requestAnimationFrame(f); else r(true); })(); })`, n)
	if _, err := chromedp.Run(ctx, chromedp.Evaluate[bool](js, chromedp.EvalAwaitPromise)); err != nil {
		t.Fatalf("waiting for %d frames: %v", n, err)
	}
}

// waitFile waits until the browser has written the file at path and
// complete says it is whole, and returns its bytes.
func waitFile(t *testing.T, path string, complete func([]byte) bool) []byte {
	t.Helper()
	for deadline := time.Now().Add(waitFor); time.Now().Before(deadline); time.Sleep(20 * time.Millisecond) {
		if b, err := os.ReadFile(path); err == nil && complete(b) {
			return b
		}
	}
	entries, _ := os.ReadDir(filepath.Dir(path))
	t.Fatalf("no complete %s after %v (the folder holds %v)", path, waitFor, entries)
	return nil
}

// svgWhole says whether b is a whole SVG file: its root element closed.
func svgWhole(b []byte) bool { return bytes.HasSuffix(bytes.TrimSpace(b), []byte("</svg>")) }

// pngWhole says whether b is a whole PNG file: it ends with the IEND chunk
// (its type and CRC, which are always the same).
func pngWhole(b []byte) bool { return bytes.HasSuffix(b, []byte("IEND\xaeB`\x82")) }

// requests records every URL the page asks for, through the DevTools
// protocol's network events, and which requests are still in flight.
type requests struct {
	mu      sync.Mutex
	urls    []string
	pending map[network.RequestID]string // URL by request
}

func watchRequests(t *testing.T, ctx context.Context) *requests {
	t.Helper()
	r := &requests{pending: map[network.RequestID]string{}}
	// chromedp enables the Network domain on every tab it attaches.
	err := chromedp.Listen(ctx, func(ev any) {
		r.mu.Lock()
		defer r.mu.Unlock()
		switch e := ev.(type) {
		case *network.EventRequestWillBeSent:
			r.urls = append(r.urls, e.Request.URL)
			// The browser's own fetches (the tab's icon) and the page's
			// blob: URLs (the engine's worker script) are recorded but not
			// waited for: Chromium does not always report their end.
			if !strings.HasPrefix(e.Request.URL, "blob:") &&
				(e.Type != network.ResourceTypeOther || e.Initiator == nil || e.Initiator.Type != network.InitiatorTypeOther) {
				r.pending[e.RequestID] = e.Request.URL
			}
		case *network.EventLoadingFinished:
			delete(r.pending, e.RequestID)
		case *network.EventLoadingFailed:
			delete(r.pending, e.RequestID)
		}
	})
	if err != nil {
		t.Fatalf("listening to network events: %v", err)
	}
	return r
}

// settle waits until the page of ctx has drawn two more frames (so that
// what it started has been sent) and every request it sent has finished or
// failed.
func (r *requests) settle(t *testing.T, ctx context.Context) {
	t.Helper()
	nextFrames(t, ctx, 2)
	var left []string
	for deadline := time.Now().Add(waitFor); time.Now().Before(deadline); time.Sleep(15 * time.Millisecond) {
		r.mu.Lock()
		left = slices.Sorted(maps.Values(r.pending))
		r.mu.Unlock()
		if len(left) == 0 {
			return
		}
	}
	t.Fatalf("requests still in flight after %v: %.200q", waitFor, left)
}

// outside returns the requested URLs that are not under base (a folder
// URL ending in /) and not data: or blob: URLs of the page itself.
func (r *requests) outside(base string) []string {
	r.mu.Lock()
	defer r.mu.Unlock()
	var out []string
	for _, u := range r.urls {
		if strings.HasPrefix(u, base) || strings.HasPrefix(u, "data:") || strings.HasPrefix(u, "blob:") {
			continue
		}
		out = append(out, u)
	}
	return out
}

// screenshot writes a full-page PNG of the current page to dir/name.png
// and returns its bytes. The viewport is stretched to the page's height for
// the capture, and then set back: parts of the page below the window may
// not be painted otherwise (the charts use content-visibility: auto). opts
// are the viewport options in force (e.g. chromedp.EmulateMobile), kept
// while stretching.
func screenshot(t *testing.T, ctx context.Context, dir, name string, opts ...chromedp.EmulateViewportOption) []byte {
	t.Helper()
	size := eval[[]int64](t, ctx, `[window.innerWidth, window.innerHeight]`)
	w, h := size[0], size[1]
	stretch := append([]chromedp.EmulateViewportOption{chromedp.EmulateScale(1)}, opts...)
	// Parts rendered for the first time take their real height in place
	// of their placeholder's, so the page's height is measured again
	// until it settles.
	for full, i := h, 0; i < 4; i++ {
		// Two animation frames: one to lay out at the new size, one to paint.
		nextFrames(t, ctx, 2)
		// scrollHeight never falls below the viewport's height, so the
		// root element's own box measures the page.
		next := max(h, eval[int64](t, ctx, `Math.ceil(document.documentElement.getBoundingClientRect().height)`))
		if next == full && i > 0 {
			break
		}
		full = next
		if err := chromedp.Do(ctx, chromedp.EmulateViewport(w, full, stretch...)); err != nil {
			t.Fatalf("stretching the viewport: %v", err)
		}
	}
	buf, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	if err := chromedp.Do(ctx, chromedp.EmulateViewport(w, h, stretch...)); err != nil {
		t.Fatalf("restoring the viewport: %v", err)
	}
	if err := os.WriteFile(filepath.Join(dir, name+".png"), buf, 0o644); err != nil {
		t.Fatal(err)
	}
	return buf
}
