//go:build !js

package e2e

import (
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/chromedp"

	"zport/site"
	"zport/site/browser"
)

// Built site, shared by every test in the package.
var (
	distDir    string // the multi-page site
	singleFile string // the single-file export
	buildErr   error
)

func TestMain(m *testing.M) {
	code := func() int {
		tmp, err := os.MkdirTemp("", "zport-e2e-")
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			return 1
		}
		defer os.RemoveAll(tmp)
		distDir = filepath.Join(tmp, "dist")
		singleFile = filepath.Join(tmp, "single", "zport-single.html")
		buildErr = buildSite(distDir, singleFile)
		return m.Run()
	}()
	os.Exit(code)
}

func buildSite(dist, single string) error {
	root, err := site.ModuleRoot()
	if err != nil {
		return err
	}
	wasm, exec, err := site.CompileEngine(root)
	if err != nil {
		return err
	}
	opt := site.Options{Engine: wasm, WasmExec: exec}
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

// start gives a browser for t (skipping or failing per package browser)
// and fails t if the site did not build.
func start(t *testing.T) context.Context {
	t.Helper()
	ctx := browser.ForTest(t)
	if buildErr != nil {
		t.Fatalf("building the site: %v", buildErr)
	}
	return ctx
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
	tctx, cancel := context.WithTimeout(ctx, 60*time.Second)
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
	deadline := time.Now().Add(60 * time.Second)
	for time.Now().Before(deadline) {
		state := eval[string](t, ctx, `document.documentElement.dataset.engine || ""`)
		switch state {
		case "ready", "none":
			return
		case "failed":
			t.Fatalf("engine failed: %s", eval[string](t, ctx, `document.body.innerText.slice(0, 400)`))
		}
		time.Sleep(20 * time.Millisecond)
	}
	t.Fatal("engine not ready after 60 s")
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

// poll evaluates cond (a JavaScript boolean expression) until it holds or
// the timeout passes.
func poll(t *testing.T, ctx context.Context, cond string, timeout time.Duration) {
	t.Helper()
	deadline := time.Now().Add(timeout)
	for time.Now().Before(deadline) {
		if eval[bool](t, ctx, cond) {
			return
		}
		time.Sleep(15 * time.Millisecond)
	}
	t.Fatalf("timed out after %v waiting for %s", timeout, cond)
}

// requests records every URL the page asks for, through the DevTools
// protocol's network events.
type requests struct {
	mu   sync.Mutex
	urls []string
}

func watchRequests(t *testing.T, ctx context.Context) *requests {
	t.Helper()
	r := &requests{}
	// chromedp enables the Network domain on every tab it attaches.
	err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*network.EventRequestWillBeSent); ok {
			r.mu.Lock()
			r.urls = append(r.urls, e.Request.URL)
			r.mu.Unlock()
		}
	})
	if err != nil {
		t.Fatalf("listening to network events: %v", err)
	}
	return r
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
// and returns its bytes.
func screenshot(t *testing.T, ctx context.Context, dir, name string) []byte {
	t.Helper()
	buf, err := chromedp.Run(ctx, chromedp.FullScreenshot(90))
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	if err := os.WriteFile(filepath.Join(dir, name+".png"), buf, 0o644); err != nil {
		t.Fatal(err)
	}
	return buf
}
