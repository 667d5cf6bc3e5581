package main

import (
	"bytes"
	"compress/flate"
	"context"
	"encoding/base64"
	"fmt"
	"net/url"
	"time"

	"github.com/chromedp/chromedp"

	"zport/build/bench/ratios"
	"zport/engine/circuit"
	"zport/site/examples"
)

// The custom-circuit page's part of the browser benchmark: one recompute
// after an edit of the circuit text (site/assets/circuit.js's measures
// "zport-recompute": the engine call, inserting the panel and laying it
// out; and "zport-engine-call": parsing, analysis and rendering in
// WebAssembly, JSON both ways), for each example and for RC ladders of 50
// and 200 nodes with a 400-point sweep. Target: under 50 ms for 50 nodes.

// benchCircuit is one circuit of the benchmark with the page's settings
// for it, as the URL fragment keys of calc.Form.CircuitState.
type benchCircuit struct {
	name, text, settings string
}

// circuitFragment is the page's c= encoding (raw DEFLATE, base64url)
// followed by the settings.
func circuitFragment(text, settings string) string {
	var buf bytes.Buffer
	w, _ := flate.NewWriter(&buf, flate.BestCompression)
	w.Write([]byte(text))
	w.Close()
	return "c=" + base64.RawURLEncoding.EncodeToString(buf.Bytes()) + "&" + settings
}

func benchCircuits() []benchCircuit {
	var list []benchCircuit
	for _, e := range examples.All() {
		s := "ref=" + url.QueryEscape(e.Reference)
		for _, p := range e.Ports {
			s += "&port=" + url.QueryEscape(p)
		}
		if e.Gain != nil {
			s += "&src=" + url.QueryEscape(e.Gain.Source) + "&out=" + url.QueryEscape(e.Gain.Output)
		}
		s += "&f=" + e.Frequency + "&from=" + e.From + "&to=" + e.To + "&points=" + e.Points
		list = append(list, benchCircuit{"example " + e.ID, e.Text, s})
	}
	sweep := "&f=1k&from=10&to=100M&points=400"
	return append(list,
		benchCircuit{"50-node ladder, 1 port", circuit.Ladder(50), "ref=U1&port=out" + sweep},
		benchCircuit{"50-node ladder, 2 ports, gain", circuit.Ladder(50), "ref=U1&port=in&port=out&src=Vin&out=out" + sweep},
		benchCircuit{"200-node ladder, 1 port", circuit.Ladder(200), "ref=U1&port=out" + sweep},
	)
}

// customRecompute appends a comment line to the editor's text (the circuit
// is unchanged, the work is all redone) and returns the recompute's
// durations and the sweep points the panel shows.
func customRecompute(ctx context.Context, i int) (total, call time.Duration, points string, err error) {
	tctx, cancel := context.WithTimeout(ctx, 20*time.Second)
	defer cancel()
	n, err := chromedp.Run(tctx, chromedp.Evaluate[int](fmt.Sprintf(`(() => {
		const e = document.querySelector('[data-circuit-editor]');
		const n = performance.getEntriesByName('zport-recompute').length;
		const ta = e.querySelector('[data-role="text"]');
		ta.value = ta.value.replace(/# edit \d+\n$/, '') + '# edit %d\n';
		ta.dispatchEvent(new Event('input', {bubbles: true}));
		return n;
	})()`, i)))
	if err != nil {
		return 0, 0, "", err
	}
	v, err := chromedp.Run(tctx, chromedp.Poll[[]any](fmt.Sprintf(`(() => {
		const e = performance.getEntriesByName('zport-recompute');
		const c = performance.getEntriesByName('zport-engine-call');
		return e.length > %d ? [e[e.length - 1].duration, c[c.length - 1].duration,
			document.querySelector('[data-circuit-editor]').dataset.sweepPoints || ''] : null;
	})()`, n), chromedp.WithPollingInterval(2*time.Millisecond)))
	if err != nil {
		return 0, 0, "", err
	}
	return dur(v[0].(float64)), dur(v[1].(float64)), v[2].(string), nil
}

// runBenchCustom prints the custom page's medians.
func runBenchCustom(ctx context.Context, pageURL func(string) string, runs int) error {
	fmt.Printf("custom circuit page: recompute and redraw after an edit of the text (medians; target < 50 ms for 50 nodes, 400 points)\n")
	for _, c := range benchCircuits() {
		u := pageURL("custom") + "#" + circuitFragment(c.text, c.settings)
		tctx, cancel := context.WithTimeout(ctx, 30*time.Second)
		err := chromedp.Do(tctx, chromedp.Navigate(u))
		if err == nil {
			_, err = chromedp.Run(tctx, chromedp.Poll[bool](`(() => {
				if (document.documentElement.dataset.engine === 'failed') throw new Error('the engine failed');
				const e = document.querySelector('[data-circuit-editor]');
				return !!e && e.dataset.live === 'true';
			})()`, chromedp.WithPollingInterval(5*time.Millisecond)))
		}
		cancel()
		if err != nil {
			return fmt.Errorf("custom page, %s: %w", c.name, err)
		}
		var d, e []time.Duration
		points := ""
		for i := 0; i < runs+2; i++ {
			t, call, p, err := customRecompute(ctx, i)
			if err != nil {
				return fmt.Errorf("custom page, %s: %w", c.name, err)
			}
			if i >= 2 { // the first edits warm the engine's code paths up
				d, e, points = append(d, t), append(e, call), p
			}
		}
		fmt.Printf("  %-30s %4s points  total %s, of which the engine call %s\n", c.name, points, ms(ratios.Median(d)), ms(ratios.Median(e)))
	}
	return nil
}
