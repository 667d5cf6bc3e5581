package main

import (
	"context"
	"fmt"
	"time"

	"github.com/chromedp/chromedp"

	"zport/build/bench/ratios"
	"zport/engine/api"
)

// The design aids' part of the browser benchmark: per stage, the default
// tolerance study (2,000 trials, every network part at ±1 %, all corners)
// from Run to its results on the page, and the standard values plus
// sensitivities that follow an edit (site/assets/aids.js's measures
// "zport-tolerance", "zport-tolerance-engine" and "zport-aids-panels").

// aidsMeasure returns the duration of the latest measure name after more
// than n of them exist.
func aidsMeasure(ctx context.Context, name string, n int) (time.Duration, error) {
	tctx, cancel := context.WithTimeout(ctx, 60*time.Second)
	defer cancel()
	v, err := chromedp.Run(tctx, chromedp.Poll[float64](fmt.Sprintf(`(() => {
		const e = performance.getEntriesByName(%q);
		return e.length > %d ? e[e.length - 1].duration : null;
	})()`, name, n), chromedp.WithPollingInterval(5*time.Millisecond)))
	return dur(v), err
}

func aidsCount(ctx context.Context, name string) (int, error) {
	return chromedp.Run(ctx, chromedp.Evaluate[int](fmt.Sprintf(`performance.getEntriesByName(%q).length`, name)))
}

// benchAids opens the design aids of the page's calculator (already
// loaded) and measures runs tolerance studies and panel updates.
func benchAids(ctx context.Context, id string, runs int) (study, engine, panels []time.Duration, err error) {
	calc := "#calc-" + id
	open := fmt.Sprintf(`(() => { const d = document.querySelector(%q); if (!d || d.hidden) return false; d.open = true; return true; })()`, calc+" details.aids")
	if _, err := chromedp.Run(ctx, chromedp.Poll[bool](open, chromedp.WithPollingInterval(5*time.Millisecond))); err != nil {
		return nil, nil, nil, err
	}
	if _, err := aidsMeasure(ctx, "zport-aids-panels", 0); err != nil { // the first, on opening
		return nil, nil, nil, fmt.Errorf("standard values and sensitivity: %w", err)
	}
	for i := 0; i < runs+1; i++ {
		n, err := aidsCount(ctx, "zport-tolerance")
		if err != nil {
			return nil, nil, nil, err
		}
		if _, err := chromedp.Run(ctx, chromedp.Evaluate[bool](fmt.Sprintf(`(document.querySelector(%q).requestSubmit(), true)`, calc+` [data-role="tolerance-form"]`))); err != nil {
			return nil, nil, nil, err
		}
		d, err := aidsMeasure(ctx, "zport-tolerance", n)
		if err != nil {
			return nil, nil, nil, fmt.Errorf("tolerance run %d: %w", i+1, err)
		}
		e, err := aidsMeasure(ctx, "zport-tolerance-engine", n)
		if err != nil {
			return nil, nil, nil, err
		}
		if i > 0 { // the first run warms the engine's code paths up
			study, engine = append(study, d), append(engine, e)
		}
	}
	// Standard values and sensitivity after a change of the series, which
	// recomputes both as an edit of the circuit does.
	for i := 0; i < runs; i++ {
		n, err := aidsCount(ctx, "zport-aids-panels")
		if err != nil {
			return nil, nil, nil, err
		}
		series := []string{"E96", "E24"}[i%2]
		if _, err := chromedp.Run(ctx, chromedp.Evaluate[bool](fmt.Sprintf(`(() => { const s = document.querySelector(%q);
			s.value = %q; s.dispatchEvent(new Event('change', {bubbles: true})); return true; })()`, calc+` [data-study="series"]`, series))); err != nil {
			return nil, nil, nil, err
		}
		d, err := aidsMeasure(ctx, "zport-aids-panels", n)
		if err != nil {
			return nil, nil, nil, err
		}
		panels = append(panels, d)
	}
	return study, engine, panels, nil
}

// runBenchAids measures every stage's design aids, navigating ctx's tab.
func runBenchAids(ctx context.Context, pageURL func(string) string, runs int) error {
	fmt.Printf("design aids: default tolerance study, 2000 trials + corners, Run to results on the page (medians; target < 1 s)\n")
	for _, e := range api.Catalog() {
		if _, err := firstLive(ctx, pageURL(e.ID)); err != nil {
			return fmt.Errorf("%s: %w", e.ID, err)
		}
		study, engine, panels, err := benchAids(ctx, e.ID, runs)
		if err != nil {
			return fmt.Errorf("%s: design aids: %w", e.ID, err)
		}
		fmt.Printf("  %-16s study %s (engine %s); standard values + sensitivity %s\n", e.ID, ms(ratios.Median(study)), ms(ratios.Median(engine)), ms(ratios.Median(panels)))
	}
	return nil
}
