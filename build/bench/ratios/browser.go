package ratios

import (
	"context"
	"errors"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/chromedp/cdproto/input"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"zport/site"
	zbrowser "zport/site/browser"
)

// runBrowser builds the site into a temporary folder and prints the
// browser's ratios, each over fresh rounds; only, when not empty, names
// the one to measure ("recompute", "paste" or "first").
func runBrowser(rounds int, only string) error {
	want := func(part string) bool { return only == "" || only == part }
	if err := zbrowser.Available(); err != nil {
		return fmt.Errorf("the browser part needs Chromium: %v (or run with -native)", err)
	}
	dist, err := buildSite()
	if err != nil {
		return err
	}
	defer os.RemoveAll(dist)
	page := func(name string) string {
		return (&url.URL{Scheme: "file", Path: filepath.ToSlash(filepath.Join(dist, name+".html"))}).String()
	}
	fmt.Printf("browser (Chromium from file://), %d rounds, medians (%s)\n", rounds, machine())

	if want("recompute") {
		if err := recomputes(page("inverting"), rounds); err != nil {
			return err
		}
	}
	if want("paste") {
		if err := pastes(page("custom"), rounds); err != nil {
			return err
		}
	}
	if want("first") {
		if err := firstEdits(page("inverting"), rounds); err != nil {
			return err
		}
	}
	eng, err := os.ReadFile(filepath.Join(dist, "zport-engine.js"))
	if err != nil {
		return err
	}
	loaded := len(eng)
	if exec, err := os.Stat(filepath.Join(dist, "wasm_exec.js")); err == nil {
		loaded += int(exec.Size()) // a separate file in builds before the worker
	}
	line("payload as loaded", fmt.Sprintf("%.3f MB", float64(loaded)/1e6), "target ≤ 1.4 MB: "+map[bool]string{true: "met", false: "missed"}[loaded <= 1.4e6])
	return nil
}

// recomputes prints a recompute against its engine call, edit after edit
// on page u.
func recomputes(u string, rounds int) error {
	ctx, stop, err := zbrowser.Start(1280, 800)
	if err != nil {
		return err
	}
	defer stop()
	if err := open(ctx, u, 0); err != nil {
		return err
	}
	var ratio, total, call []float64
	for i := 0; i < rounds+3; i++ {
		td, cd, err := zbrowser.Recompute(ctx, i)
		if err != nil {
			return fmt.Errorf("inverting: edit %d: %w", i, err)
		}
		if t, c := float64(td), float64(cd); i >= 3 { // the first edits warm the engine's code up
			ratio, total, call = append(ratio, t/c), append(total, t), append(call, c)
		}
	}
	line("inverting recompute vs its engine call", fmt.Sprintf("%.2f×", Median(ratio)), verdict(Median(ratio), 1.5),
		fmt.Sprintf("(%s vs %s)", ms(Median(total)), ms(Median(call))))
	return nil
}

// pastes prints the longest main-thread task while a 10,000-line circuit
// is pasted into the editor of page u.
func pastes(u string, rounds int) error {
	ctx, stop, err := zbrowser.Start(1280, 800)
	if err != nil {
		return err
	}
	defer stop()
	var longest, scripts, layout []float64
	for r := 0; r < rounds; r++ {
		d, err := paste(ctx, u)
		if err != nil {
			return fmt.Errorf("paste, round %d: %w", r+1, err)
		}
		longest, scripts, layout = append(longest, d.task), append(scripts, d.scripts), append(layout, d.layout)
	}
	line("longest main-thread task, 10,000-line paste", ms(Median(longest)), fmt.Sprintf("(worst of %d: %s)", rounds, ms(slicesMax(longest))),
		"target ≤ 50 ms: "+map[bool]string{true: "met", false: "missed"}[slicesMax(longest) <= 50e6])
	line("  of a long frame's time, scripts at most", ms(Median(scripts)), "and style and layout at most", ms(Median(layout)))

	return nil
}

// firstEdits prints the first edit after page u opens against a steady
// one: a fresh browser each round, so no compiled code is left from
// before; the first edit soon after the engine is ready, and once the page
// has been read a while.
func firstEdits(u string, rounds int) error {
	for _, after := range []time.Duration{300 * time.Millisecond, 1500 * time.Millisecond} {
		var first, steady, fs []float64
		for r := 0; r < rounds; r++ {
			f, s, err := firstEdit(u, after)
			if err != nil {
				return fmt.Errorf("first edit, round %d: %w", r+1, err)
			}
			first, steady, fs = append(first, f), append(steady, s), append(fs, f/s)
		}
		line(fmt.Sprintf("first edit (%.1f s after ready) vs a steady one", after.Seconds()), fmt.Sprintf("%.2f×", Median(fs)), verdict(Median(fs), 2),
			fmt.Sprintf("(%s vs %s, keystroke to result)", ms(Median(first)), ms(Median(steady))))
	}
	return nil
}

func slicesMax(xs []float64) float64 {
	m := 0.0
	for _, x := range xs {
		m = max(m, x)
	}
	return m
}

// buildSite compiles the engine and writes the site into a temporary
// folder, whose path it returns.
func buildSite() (string, error) {
	root, err := site.ModuleRoot()
	if err != nil {
		return "", err
	}
	wasm, exec, err := site.CompileEngine(root)
	if err != nil {
		return "", err
	}
	files, err := site.Build(site.Options{Engine: wasm, WasmExec: exec})
	if err != nil {
		return "", err
	}
	dir, err := os.MkdirTemp("", "zport-ratios-")
	if err != nil {
		return "", err
	}
	return dir, files.Write(dir)
}

// open navigates to u and waits until the page is live (data-engine is
// "ready": the engine runs and the page shows its results), then wait.
func open(ctx context.Context, u string, wait time.Duration) error {
	return navigate(ctx, u, `document.documentElement.dataset.engine === 'ready'`, wait)
}

// started navigates to u and waits until the engine has started (the mark
// "zport-engine-ready"; the page may still be busy with its first results).
func started(ctx context.Context, u string) error {
	return navigate(ctx, u, `performance.getEntriesByName('zport-engine-ready').length > 0`, 0)
}

// navigate opens u, waits until cond holds, then wait.
func navigate(ctx context.Context, u, cond string, wait time.Duration) error {
	tctx, cancel := context.WithTimeout(ctx, 60*time.Second)
	defer cancel()
	if err := chromedp.Do(tctx, chromedp.Navigate(u)); err != nil {
		return err
	}
	_, err := chromedp.Run(tctx, chromedp.Poll[bool](`(() => {
		if (document.documentElement.dataset.engine === 'failed') throw new Error(document.querySelector('[data-role="engine-status"]').textContent);
		return `+cond+`;
	})()`, chromedp.WithPollingInterval(5*time.Millisecond)))
	if err != nil {
		return err
	}
	time.Sleep(wait)
	return nil
}

// firstEdit opens u in a fresh browser, types a digit into the spot
// frequency when the engine has been ready for after, and returns the time
// from that keystroke to the result on the page, and the median of five
// later keystrokes'. Times run from the moment the key is pressed — as the
// page's clock has it, after ready — so a page busy at that moment (an
// engine on the main thread starting up) counts that too.
func firstEdit(u string, after time.Duration) (first, steady float64, err error) {
	ctx, stop, err := zbrowser.Start(1280, 800)
	if err != nil {
		return 0, 0, err
	}
	defer stop()
	if err := started(ctx, u); err != nil {
		return 0, 0, err
	}
	var later []float64
	for i := 0; i < 6; i++ {
		var at time.Duration
		if i == 0 {
			at = after
		}
		t, err := keystroke(ctx, byte('9'-i), at)
		if err != nil {
			return 0, 0, err
		}
		if i == 0 {
			first = t
		} else {
			later = append(later, t)
		}
	}
	return first, Median(later), nil
}

// keystroke types digit over the spot frequency of the page's calculator,
// after the engine has been ready for at (at once when 0), and returns the
// time from the key to the recompute's end, in nanoseconds.
func keystroke(ctx context.Context, digit byte, at time.Duration) (float64, error) {
	tctx, cancel := context.WithTimeout(ctx, 60*time.Second)
	defer cancel()
	var press float64 // page time of the key press
	if at > 0 {
		t, err := chromedp.Run(tctx, chromedp.Evaluate[[]float64](`[performance.getEntriesByName('zport-engine-ready')[0].startTime, performance.now()]`))
		if err != nil {
			return 0, err
		}
		press = t[0] + float64(at)/1e6
		if wait := press - t[1]; wait > 0 {
			time.Sleep(time.Duration(wait * 1e6))
		}
	}
	n, err := chromedp.Run(tctx, chromedp.Evaluate[int](`(() => {
		const input = document.querySelector('[data-calculator] input[name="frequency"]');
		input.focus();
		input.select();
		if (!window.zportKeys) {
			window.zportKeys = [];
			document.addEventListener('keydown', e => window.zportKeys.push(e.timeStamp), true);
		}
		return performance.getEntriesByName('zport-recompute').length;
	})()`))
	if err != nil {
		return 0, err
	}
	err = chromedp.Do(tctx, chromedp.Func(func(ctx context.Context, _ *chromedp.Target) error {
		key := input.DispatchKeyEventParams{Type: input.DispatchKeyEventTypeKeyDown, Key: string(digit), Code: "Digit" + string(digit),
			Text: string(digit), WindowsVirtualKeyCode: int64(digit)}
		if _, err := chromedp.Call(ctx, input.DispatchKeyEvent, key); err != nil {
			return err
		}
		key.Type, key.Text = input.DispatchKeyEventTypeKeyUp, ""
		_, err := chromedp.Call(ctx, input.DispatchKeyEvent, key)
		return err
	}))
	if err != nil {
		return 0, err
	}
	// The key's recompute: the first to start after the key (the page's
	// own first one may still be on its way).
	end, err := chromedp.Run(tctx, chromedp.Poll[[]float64](fmt.Sprintf(`(() => {
		const key = window.zportKeys[window.zportKeys.length - 1];
		const e = performance.getEntriesByName('zport-recompute').slice(%d).filter(m => m.startTime >= key);
		if (!e.length) return null;
		const r = e[0];
		const c = performance.getEntriesByName('zport-engine-call').filter(m => m.startTime >= key);
		return [r.startTime + r.duration, key, c.length ? c[0].duration : 0, r.duration];
	})()`, n), chromedp.WithPollingInterval(2*time.Millisecond)))
	if err != nil {
		return 0, err
	}
	if at == 0 {
		press = end[1] // the key event's own time
	}
	if os.Getenv("ZPORT_RATIOS_DEBUG") != "" {
		fmt.Printf("    key after %v: %.1f ms to the result, recompute %.1f ms, engine call %.1f ms\n", at, end[0]-press, end[3], end[2])
	}
	return (end[0] - press) * 1e6, nil
}

// pasteText is a circuit of 10,000 lines (under the editor's 256 KB):
// 150 nodes joined by resistors to their next three, a source, an opamp
// and two ports (an invented stress case).
func pasteText() string {
	var b strings.Builder
	node := func(i int) string { return string(rune('a'+i/26)) + string(rune('a'+i%26)) }
	b.WriteString("# paste benchmark circuit (invented): 10,000 lines\nvsource Vin src gnd 1\nresistor Rs src aa 50\n")
	b.WriteString("opamp U1 gnd aa " + node(149) + " a0=100k gbw=1M ro=50\nport in src gnd\nport out " + node(149) + " gnd\n")
	lines := 6
	for k := 0; lines < 10000; k++ {
		i := k % 149
		j := min(149, i+1+k/149%3)
		fmt.Fprintf(&b, "resistor R%d %s %s %dk\n", k, node(i), node(j), 1+k%9)
		lines++
	}
	return b.String()
}

// paste opens the custom page, pastes pasteText over its text and returns
// the longest main-thread task from the paste until the page shows the
// result (PerformanceObserver, long tasks: those over 50 ms; 0 if none),
// and how the long animation frames split between scripts and layout.
func paste(ctx context.Context, u string) (pasteTimes, error) {
	if err := open(ctx, u, 500*time.Millisecond); err != nil {
		return pasteTimes{}, err
	}
	tctx, cancel := context.WithTimeout(ctx, 60*time.Second)
	defer cancel()
	// The text goes to the clipboard (copied from a scratch textarea, as a
	// user's gesture), then Ctrl+V pastes it over the editor's selected
	// text: the browser's own paste, as a user makes it. (Input.insertText
	// takes a much slower path through the editing code.)
	text := pasteText()
	ok, err := chromedp.Run(tctx, chromedp.Evaluate[bool](`(() => {
		const t = document.createElement('textarea');
		t.value = `+strconv.Quote(text)+`;
		document.body.appendChild(t);
		t.select();
		const ok = document.execCommand('copy');
		t.remove();
		window.zportLong = [];
		new PerformanceObserver(l => { for (const e of l.getEntries()) window.zportLong.push([e.startTime, e.duration]); })
			.observe({type: 'longtask'});
		window.zportFrames = [];
		if (PerformanceObserver.supportedEntryTypes.includes('long-animation-frame')) {
			new PerformanceObserver(l => { for (const e of l.getEntries()) window.zportFrames.push([e.startTime, e.duration,
				e.scripts.reduce((s, x) => s + x.duration, 0),
				e.styleAndLayoutStart ? e.startTime + e.duration - e.styleAndLayoutStart : 0]); })
				.observe({type: 'long-animation-frame'});
		}
		const ta = document.querySelector('[data-circuit-editor] [data-role="text"]');
		ta.focus();
		ta.select();
		window.zportPaste = {t: performance.now(), n: performance.getEntriesByName('zport-recompute').length};
		return ok;
	})()`, func(p *runtime.EvaluateParams) { g := true; p.UserGesture = &g }))
	if err != nil {
		return pasteTimes{}, err
	}
	if !ok {
		return pasteTimes{}, errors.New("the text could not be put on the clipboard")
	}
	err = chromedp.Do(tctx, chromedp.Func(func(ctx context.Context, _ *chromedp.Target) error {
		key := input.DispatchKeyEventParams{Type: input.DispatchKeyEventTypeRawKeyDown, Modifiers: 2, Key: "v", Code: "KeyV",
			WindowsVirtualKeyCode: 86, Commands: []string{"paste"}}
		if _, err := chromedp.Call(ctx, input.DispatchKeyEvent, key); err != nil {
			return err
		}
		key.Type, key.Commands = input.DispatchKeyEventTypeKeyUp, nil
		_, err := chromedp.Call(ctx, input.DispatchKeyEvent, key)
		return err
	}))
	if err != nil {
		return pasteTimes{}, err
	}
	_, err = chromedp.Run(tctx, chromedp.Poll[bool](`performance.getEntriesByName('zport-recompute').length > window.zportPaste.n`,
		chromedp.WithPollingInterval(10*time.Millisecond)))
	if err != nil {
		return pasteTimes{}, err
	}
	time.Sleep(500 * time.Millisecond) // what follows the result: links, the address
	d, err := chromedp.Run(tctx, chromedp.Evaluate[[]float64](`(() => {
		const since = e => e[0] + e[1] >= window.zportPaste.t;
		const long = window.zportLong.filter(since).map(e => e[1]);
		const frames = window.zportFrames.filter(since);
		return [Math.max(0, ...long), Math.max(0, ...frames.map(e => e[2])), Math.max(0, ...frames.map(e => e[3]))];
	})()`))
	if err != nil {
		return pasteTimes{}, err
	}
	return pasteTimes{d[0] * 1e6, d[1] * 1e6, d[2] * 1e6}, nil
}

// pasteTimes are a paste's longest main-thread task, and of the long
// animation frames since the paste the most time in scripts and the most
// in style and layout.
type pasteTimes struct{ task, scripts, layout float64 }
