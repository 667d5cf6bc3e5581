//go:build !js

// Package browser starts Debian's Chromium, headless, the way every zport
// browser test and the browser benchmark need it: a fresh profile, no GPU,
// and the flags that keep it from reaching for the network (this workplace
// has none, and refused connections slow a start).
//
//	ctx := browser.ForTest(t) // skips loudly without Chromium, fails when required
//	chromedp.Run(ctx, chromedp.Navigate(url))
//
// A package with many browser tests shares one browser between them
// (Shared), each test in a tab of its own.
//
// When /usr/bin/chromium is absent, ForTest and Shared.Tab skip the test
// with a message saying how to install it — unless ZPORT_BROWSER=required
// (as CI sets), when they fail the test instead. In -short mode they skip
// it: `go test -short ./...` is the quick run without a browser.
package browser

import (
	"context"
	"fmt"
	"os"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// Path is where Debian's chromium package installs the browser.
const Path = "/usr/bin/chromium"

// Required reports whether ZPORT_BROWSER=required is set.
func Required() bool { return os.Getenv("ZPORT_BROWSER") == "required" }

// Available reports whether Chromium is installed.
func Available() error {
	if _, err := os.Stat(Path); err != nil {
		return fmt.Errorf("no Chromium at %s (install it with: apt-get install -y chromium)", Path)
	}
	return nil
}

// Options are chromedp's defaults plus the flags this project always uses.
func Options(profile string, width, height int) []chromedp.ExecAllocatorOption {
	return append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(Path),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(profile),
		chromedp.WindowSize(width, height),
	)
}

// Start launches a browser with a fresh profile in a temporary folder; stop
// ends it and removes the profile.
func Start(width, height int) (ctx context.Context, stop func(), err error) {
	if err := Available(); err != nil {
		return nil, nil, err
	}
	dir, err := os.MkdirTemp("", "zport-chromium-")
	if err != nil {
		return nil, nil, err
	}
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), Options(dir, width, height)...)
	ctx, cancelB := chromedp.NewContext(actx)
	stop = func() {
		cancelB()
		cancelA()
		os.RemoveAll(dir)
	}
	// The first Run starts the browser; it must not carry a timeout.
	if err := chromedp.Do(ctx); err != nil {
		stop()
		return nil, nil, err
	}
	return ctx, stop, nil
}

// ForTest starts a 1280×800 browser for t, stopped when t ends. Without
// Chromium it skips t loudly, or fails it when ZPORT_BROWSER=required; in
// -short mode it skips t.
func ForTest(t testing.TB) context.Context {
	t.Helper()
	skipUnlessRunnable(t)
	ctx, stop, err := Start(1280, 800)
	if err != nil {
		t.Fatalf("starting Chromium: %v", err)
	}
	t.Cleanup(stop)
	return ctx
}

// skipUnlessRunnable skips t in -short mode, and without Chromium skips it
// loudly, or fails it when ZPORT_BROWSER=required.
func skipUnlessRunnable(t testing.TB) {
	t.Helper()
	if testing.Short() {
		t.Skip("browser test skipped in -short mode")
	}
	if err := Available(); err != nil {
		if Required() {
			t.Fatalf("ZPORT_BROWSER=required but %v", err)
		}
		t.Skipf("SKIPPING BROWSER TEST: %v; set ZPORT_BROWSER=required to make this a failure", err)
	}
}

// Shared is one browser for all the tests of a package, started by the
// first test that asks for a tab and stopped by Stop (call it from
// TestMain after m.Run). Starting Chromium costs about as much as a short
// test, and tests that run in parallel (t.Parallel) share it: each gets a
// tab in a browser context of its own (its own storage, cookies and
// downloads, as a fresh incognito window), so none sees another's state.
//
//	var shared = browser.Shared{Width: 1280, Height: 800}
//	func TestMain(m *testing.M) { code := m.Run(); shared.Stop(); os.Exit(code) }
//	func TestPage(t *testing.T) { t.Parallel(); ctx := shared.Tab(t); … }
type Shared struct {
	Width, Height int // the window of every tab

	once sync.Once
	ctx  context.Context
	stop func()
	err  error
}

// Tab opens a tab for t in a new browser context of the shared browser,
// closed when t ends. Without Chromium, and in -short mode, it skips t as
// ForTest does.
func (s *Shared) Tab(t testing.TB) context.Context {
	t.Helper()
	skipUnlessRunnable(t)
	s.once.Do(func() { s.ctx, s.stop, s.err = Start(s.Width, s.Height) })
	if s.err != nil {
		t.Fatalf("starting Chromium: %v", s.err)
	}
	ctx, cancel := chromedp.NewContext(s.ctx, chromedp.WithNewBrowserContext())
	t.Cleanup(cancel)
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("opening a tab: %v", err)
	}
	return ctx
}

// Stop ends the shared browser, if a test started it, and removes its
// profile.
func (s *Shared) Stop() {
	if s.stop != nil {
		s.stop()
	}
}

// Recompute edits the spot frequency of the first stage calculator of the
// page open in ctx, alternating between two nearby values with i so that
// every edit changes the result, and returns what the page measured of
// the recompute it caused: "zport-recompute" (from the edit's frame: the
// engine's call, inserting the panel and laying it out) and the
// "zport-engine-call" within it. The benchmarks use it.
func Recompute(ctx context.Context, i int) (total, call time.Duration, err error) {
	tctx, cancel := context.WithTimeout(ctx, 30*time.Second)
	defer cancel()
	v := []string{"1.1k", "900"}[i%2]
	n, err := chromedp.Run(tctx, chromedp.Evaluate[int](`(() => {
		const n = performance.getEntriesByName('zport-recompute').length;
		const input = document.querySelector('[data-calculator] input[name="frequency"]');
		input.value = '`+v+`';
		input.dispatchEvent(new Event('input', {bubbles: true}));
		return n;
	})()`))
	if err != nil {
		return 0, 0, err
	}
	ms, err := chromedp.Run(tctx, chromedp.Poll[[]float64](fmt.Sprintf(`(() => {
		const e = performance.getEntriesByName('zport-recompute');
		const c = performance.getEntriesByName('zport-engine-call');
		return e.length > %d ? [e[e.length - 1].duration, c[c.length - 1].duration] : null;
	})()`, n), chromedp.WithPollingInterval(2*time.Millisecond)))
	if err != nil {
		return 0, 0, err
	}
	d := func(ms float64) time.Duration { return time.Duration(ms * float64(time.Millisecond)) }
	return d(ms[0]), d(ms[1]), nil
}
