// Command bench is zport's browser benchmark: it builds the site into a
// temporary folder and measures it in Debian's Chromium from file://,
// printing medians.
//
//	go run ./build/bench [-runs 9] [-page inverting] [-only custom]
//	go run ./build/bench ratios [-native] [-rounds 9]
//
// It measures navigation to the first live result, cold (a fresh browser
// and profile each run) and warm (the same browser navigating again); one
// recompute and redraw per topology at its default sweep; each topology's
// design aids (aids.go); the custom-circuit page (custom.go; -only custom
// runs that part alone); and the engine's size as the page loads it.
// "ratios" measures the speed targets instead, as interleaved ratios
// (package zport/build/bench/ratios).
//
// It is a command of its own, apart from ./build, so that the site's
// builder does not carry the browser driver (chromedp) it needs.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"time"

	"github.com/chromedp/chromedp"

	"zport/build/bench/ratios"
	"zport/engine/api"
	"zport/site"
	zbrowser "zport/site/browser"
)

// browser starts a Chromium with a fresh profile; stop ends it and removes
// the profile.
func browser() (ctx context.Context, stop func(), err error) {
	return zbrowser.Start(1280, 800)
}

// load is what one navigation to a calculator page measured, from the
// navigation's start: the engine running ("zport-engine-ready") and the
// first result it computed on the page ("zport-first-live"); performance
// marks of zport.js.
type load struct{ ready, live time.Duration }

// firstLive navigates to u and waits for the first live result.
func firstLive(ctx context.Context, u string) (load, error) {
	tctx, cancel := context.WithTimeout(ctx, 30*time.Second)
	defer cancel()
	if err := chromedp.Do(tctx, chromedp.Navigate(u)); err != nil {
		return load{}, err
	}
	ms, err := chromedp.Run(tctx, chromedp.Poll[[]float64](`(() => {
		if (document.documentElement.dataset.engine === 'failed') throw new Error(document.querySelector('[data-role="engine-status"]').textContent);
		const m = performance.getEntriesByName('zport-first-live')[0];
		const r = performance.getEntriesByName('zport-engine-ready')[0];
		return m && r ? [r.startTime, m.startTime] : null;
	})()`, chromedp.WithPollingInterval(5*time.Millisecond)))
	if err != nil {
		return load{}, err
	}
	return load{dur(ms[0]), dur(ms[1])}, nil
}

func dur(ms float64) time.Duration { return time.Duration(ms * float64(time.Millisecond)) }

func ms(d time.Duration) string { return fmt.Sprintf("%.1f ms", float64(d)/float64(time.Millisecond)) }

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "bench:", err)
		os.Exit(1)
	}
}

func run(args []string) error {
	if len(args) > 0 && args[0] == "ratios" {
		return ratios.Run(args[1:])
	}
	fs := flag.NewFlagSet("bench", flag.ContinueOnError)
	runs := fs.Int("runs", 9, "runs per measurement (the median is printed)")
	page := fs.String("page", "inverting", "page for the first-live measurements")
	only := fs.String("only", "", `run one part only: "custom" (the custom-circuit page)`)
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *runs < 1 {
		return errors.New("-runs must be at least 1")
	}
	if err := zbrowser.Available(); err != nil {
		return fmt.Errorf("bench needs Chromium: %v", err)
	}
	dist, err := os.MkdirTemp("", "zport-bench-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dist)
	if err := buildSite(dist); err != nil {
		return err
	}
	pageURL := func(name string) string {
		return (&url.URL{Scheme: "file", Path: filepath.ToSlash(filepath.Join(dist, name+".html"))}).String()
	}
	if *only == "custom" {
		ctx, stop, err := browser()
		if err != nil {
			return err
		}
		defer stop()
		return runBenchCustom(ctx, pageURL, *runs)
	} else if *only != "" {
		return fmt.Errorf("-only %q: the only part is \"custom\"", *only)
	}

	var cold, coldReady []time.Duration
	for i := 0; i < *runs; i++ {
		ctx, stop, err := browser()
		if err != nil {
			return err
		}
		d, err := firstLive(ctx, pageURL(*page))
		stop()
		if err != nil {
			return fmt.Errorf("cold run %d: %w", i+1, err)
		}
		cold, coldReady = append(cold, d.live), append(coldReady, d.ready)
	}

	ctx, stop, err := browser()
	if err != nil {
		return err
	}
	defer stop()
	if _, err := firstLive(ctx, pageURL(*page)); err != nil { // fill the caches
		return err
	}
	var warm, warmReady []time.Duration
	for i := 0; i < *runs; i++ {
		d, err := firstLive(ctx, pageURL(*page))
		if err != nil {
			return fmt.Errorf("warm run %d: %w", i+1, err)
		}
		warm, warmReady = append(warm, d.live), append(warmReady, d.ready)
	}

	fmt.Printf("first live result, %s.html from file:// (medians of %d runs; target ≤ 200 ms)\n", *page, *runs)
	fmt.Printf("  cold (fresh browser and profile)      engine ready %s, first live result %s\n", ms(ratios.Median(coldReady)), ms(ratios.Median(cold)))
	fmt.Printf("  warm (same browser, navigated again)  engine ready %s, first live result %s\n", ms(ratios.Median(warmReady)), ms(ratios.Median(warm)))

	fmt.Printf("recompute and redraw after one edit of the spot frequency (medians; target ≤ 16 ms)\n")
	for _, e := range api.Catalog() {
		if _, err := firstLive(ctx, pageURL(e.ID)); err != nil {
			return fmt.Errorf("%s: %w", e.ID, err)
		}
		var d, c []time.Duration
		for i := 0; i < *runs+2; i++ {
			t, call, err := zbrowser.Recompute(ctx, i)
			if err != nil {
				return fmt.Errorf("%s: recompute: %w", e.ID, err)
			}
			if i >= 2 { // the first edits warm the engine's code paths up
				d, c = append(d, t), append(c, call)
			}
		}
		fmt.Printf("  %-16s %4d points  total %s, of which the engine call %s\n", e.ID, e.Sweep.Points, ms(ratios.Median(d)), ms(ratios.Median(c)))
	}

	if err := runBenchAids(ctx, pageURL, *runs); err != nil {
		return err
	}
	if err := runBenchCustom(ctx, pageURL, *runs); err != nil {
		return err
	}

	eng, err := os.Stat(filepath.Join(dist, "zport-engine.js"))
	if err != nil {
		return err
	}
	fmt.Printf("payload as loaded: zport-engine.js (Go's wasm_exec.js inside) %s (target ≤ 1.4 MB)\n", mb(eng.Size()))
	return nil
}

func mb(n int64) string { return fmt.Sprintf("%.3f MB", float64(n)/1e6) }

// buildSite builds the site into dist, as go run ./build does into the
// module's dist/.
func buildSite(dist string) error {
	opt, err := site.ModuleOptions()
	if err != nil {
		return err
	}
	files, err := site.Build(opt)
	if err != nil {
		return err
	}
	return files.Write(dist)
}
