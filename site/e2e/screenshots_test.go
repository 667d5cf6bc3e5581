//go:build !js

package e2e

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/draw"
	"image/png"
	"math"
	"os"
	"testing"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/chromedp"
)

// Screenshots of every page of the built site at a desktop size and at a
// phone width, light and (for the desktop) dark, written to a folder:
// ZPORT_SHOTS when set (kept), else a temporary one. Each must be a PNG of
// the page's width that is not blank, and no page may scroll sideways as a
// whole on the phone (wide tables and schematics scroll inside their own
// boxes). Each page is loaded once, in a tab of its own, and shown in the
// three views in turn (the emulated screen and colour scheme change under
// the page, which lays itself out again as a resized window would, and at
// the phone's width draws its charts again for the narrow column).
func TestScreenshotsOfEveryPage(t *testing.T) {
	t.Parallel()
	names := pages(t)
	dir := os.Getenv("ZPORT_SHOTS")
	if dir == "" {
		dir = t.TempDir()
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshots in %s", dir)
	views := []struct {
		name          string
		width, height int64
		mobile, dark  bool
	}{
		{"1280x800", 1280, 800, false, false},
		{"1280x800-dark", 1280, 800, false, true},
		{"390x844", 390, 844, true, false},
	}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			ctx := start(t)
			load(t, ctx, fileURL(name, ""))
			if eval[bool](t, ctx, `!!document.querySelector('[data-calculator]')`) {
				poll(t, ctx, `performance.getEntriesByName('zport-first-live').length === 1`)
			}
			live := eval[bool](t, ctx, `!!document.querySelector('[data-calculator], [data-circuit-editor]')`)
			for _, v := range views {
				recomputes := eval[int](t, ctx, `performance.getEntriesByName('zport-recompute').length`)
				opts := []chromedp.EmulateViewportOption{chromedp.EmulateScale(1)}
				if v.mobile {
					opts = append(opts, chromedp.EmulateMobile)
				}
				scheme := "light"
				if v.dark {
					scheme = "dark"
				}
				err := chromedp.Do(ctx, chromedp.EmulateViewport(v.width, v.height, opts...), chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
					_, err := chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{
						Features: []*emulation.MediaFeature{{Name: "prefers-color-scheme", Value: scheme}},
					})
					return err
				}))
				if err != nil {
					t.Fatal(err)
				}
				if got := eval[bool](t, ctx, `matchMedia('(prefers-color-scheme: dark)').matches`); got != v.dark {
					t.Fatalf("%s: the page sees prefers-color-scheme dark = %v", v.name, got)
				}
				if v.mobile && live {
					// At a phone's width the calculator draws its charts
					// again for the narrow column: the picture is of that.
					poll(t, ctx, fmt.Sprintf(`performance.getEntriesByName('zport-recompute').length > %d`, recomputes))
					nextFrames(t, ctx, 2)
				}
				if w := eval[int](t, ctx, `document.documentElement.scrollWidth`); w > int(v.width) {
					t.Errorf("%s at %s: the page is %d px wide, wider than the %d px window", name, v.name, w, v.width)
				}
				buf := screenshot(t, ctx, dir, name+"-"+v.name, opts...)
				checkNotBlank(t, name+"-"+v.name, buf, int(v.width), int(v.height))
			}
			checkHealthy(t, ctx)
		})
	}
}

// checkNotBlank decodes a PNG and fails t unless it has the window's width,
// at least its height, enough distinct colours and enough contrast to be a
// page with text and charts on it rather than an empty or one-colour frame.
func checkNotBlank(t *testing.T, name string, buf []byte, width, height int) {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(buf))
	if err != nil {
		t.Errorf("%s: not a PNG: %v", name, err)
		return
	}
	b := img.Bounds()
	if b.Dx() != width || b.Dy() < height {
		t.Errorf("%s: %d×%d pixels, want %d wide and at least %d high", name, b.Dx(), b.Dy(), width, height)
	}
	colours, mean, sd := imageStats(img)
	t.Logf("%s: %d×%d, %d colours, luminance %.0f ± %.1f", name, b.Dx(), b.Dy(), colours, mean, sd)
	if colours < 64 || sd < 8 {
		t.Errorf("%s looks blank: %d distinct colours, luminance standard deviation %.1f", name, colours, sd)
	}
}

// imageStats counts distinct colours and gives the mean and standard
// deviation of the luminance (0–255) over every pixel. Screenshots are
// several megapixels: the pixels are read from the image's own bytes, and
// the colours seen are bits in a set of all 2²⁴.
func imageStats(img image.Image) (colours int, mean, sd float64) {
	b := img.Bounds()
	var pix []uint8
	stride := 0
	switch m := img.(type) {
	case *image.NRGBA:
		pix, stride = m.Pix, m.Stride
	case *image.RGBA:
		pix, stride = m.Pix, m.Stride
	default: // not what Chromium writes; convert
		c := image.NewNRGBA(b)
		draw.Draw(c, b, img, b.Min, draw.Src)
		pix, stride = c.Pix, c.Stride
	}
	seen := make([]uint64, 1<<24/64)
	var sum, sum2 float64
	for y := 0; y < b.Dy(); y++ {
		row := pix[y*stride : y*stride+4*b.Dx()]
		for x := 0; x < len(row); x += 4 {
			r, g, bl := row[x], row[x+1], row[x+2]
			c := uint32(r)<<16 | uint32(g)<<8 | uint32(bl)
			if seen[c/64]&(1<<(c%64)) == 0 {
				seen[c/64] |= 1 << (c % 64)
				colours++
			}
			l := 0.2126*float64(r) + 0.7152*float64(g) + 0.0722*float64(bl)
			sum += l
			sum2 += l * l
		}
	}
	n := float64(b.Dx() * b.Dy())
	mean = sum / n
	return colours, mean, math.Sqrt(math.Max(0, sum2/n-mean*mean))
}
