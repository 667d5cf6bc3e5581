//go:build !js

package e2e

import (
	"context"
	"testing"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/chromedp"
)

// contrastJS finds, for every text input, select and the editor's box,
// the contrast ratio of its border against the background behind it
// (WCAG 2.1 relative luminance, https://www.w3.org/TR/WCAG21/#dfn-contrast-ratio)
// and returns those below min, described.
const contrastJS = `(function (min) {
  function rgb(s) {
    var m = /rgba?\(([\d.]+),\s*([\d.]+),\s*([\d.]+)(?:,\s*([\d.]+))?/.exec(s);
    return m ? [Number(m[1]), Number(m[2]), Number(m[3]), m[4] === undefined ? 1 : Number(m[4])] : null;
  }
  function lum(c) {
    var l = c.slice(0, 3).map(function (v) { v /= 255; return v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4); });
    return 0.2126 * l[0] + 0.7152 * l[1] + 0.0722 * l[2];
  }
  function behind(el) {
    for (var e = el.parentElement; e; e = e.parentElement) {
      var c = rgb(getComputedStyle(e).backgroundColor);
      if (c && c[3] > 0) return c;
    }
    return rgb(getComputedStyle(document.documentElement).backgroundColor) || [255, 255, 255, 1];
  }
  var bad = [], n = 0;
  var els = document.querySelectorAll('input[type="text"], select, .editor');
  for (var i = 0; i < els.length; i++) {
    var el = els[i];
    if (!el.getClientRects().length) continue;
    var cs = getComputedStyle(el);
    if (parseFloat(cs.borderTopWidth) === 0) continue;
    var b = rgb(cs.borderTopColor), g = behind(el);
    var l1 = lum(b), l2 = lum(g);
    var ratio = (Math.max(l1, l2) + 0.05) / (Math.min(l1, l2) + 0.05);
    n++;
    if (ratio < min) bad.push((el.name || el.className || el.tagName) + ': ' + ratio.toFixed(2) + ':1 (' + cs.borderTopColor + ' on rgb(' + g.slice(0, 3).join(', ') + '))');
  }
  return {n: n, bad: bad};
})(3)`

// The borders of inputs, selects and the circuit editor reach 3:1 against
// what is behind them, in light and dark (WCAG 2.1 SC 1.4.11, non-text
// contrast), on a stage page and the custom page.
func TestInputBorderContrast(t *testing.T) {
	t.Parallel()
	for _, scheme := range []string{"light", "dark"} {
		for _, page := range []string{"inverting", "custom"} {
			t.Run(scheme+"/"+page, func(t *testing.T) {
				ctx := start(t)
				err := chromedp.Do(ctx, chromedp.Func(func(ctx context.Context, _ *chromedp.Target) error {
					_, err := chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{
						Features: []*emulation.MediaFeature{{Name: "prefers-color-scheme", Value: scheme}},
					})
					return err
				}))
				if err != nil {
					t.Fatal(err)
				}
				load(t, ctx, fileURL(page, ""))
				got := eval[struct {
					N   int      `json:"n"`
					Bad []string `json:"bad"`
				}](t, ctx, contrastJS)
				if got.N < 5 {
					t.Errorf("only %d bordered inputs found", got.N)
				}
				for _, b := range got.Bad {
					t.Errorf("%s, below 3:1", b)
				}
			})
		}
	}
}
