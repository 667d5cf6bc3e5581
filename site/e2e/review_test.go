//go:build !js

package e2e

import (
	"bytes"
	"context"
	"encoding/xml"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"zport/engine/circuit"
	zbrowser "zport/site/browser"
	"zport/site/examples"
)

// What leaves a design meeting: chart images, the printed report, and
// the charts on a phone.

// reviewPages are a stage page and the custom page, with the selector of
// their calculator.
var reviewPages = []struct{ page, root string }{{"inverting", calcSel("inverting")}, {"custom", "[data-circuit-editor]"}}

// reviewOpen opens one of reviewPages from file:// and waits until its
// results are live.
func reviewOpen(t *testing.T, ctx context.Context, page string) {
	t.Helper()
	if page == "custom" {
		edLoad(t, ctx, fileURL("custom", ""))
		return
	}
	load(t, ctx, fileURL(page, ""))
	checkLive(t, ctx, page)
}

// Every chart's "Save as SVG" and "Save as PNG" give files: an SVG that is
// well-formed XML of the chart's size with its title, axis titles and
// legend as text, and a PNG of twice the chart's size that is not blank.
// On a stage page and on the custom page, from file://.
func TestChartImages(t *testing.T) {
	t.Parallel()
	for _, pg := range reviewPages {
		t.Run(pg.page, func(t *testing.T) {
			ctx := start(t)
			out := t.TempDir()
			if _, err := chromedp.Call(ctx, browser.SetDownloadBehavior, browser.SetDownloadBehaviorParams{
				Behavior: browser.SetDownloadBehaviorBehaviorAllow, DownloadPath: out,
				BrowserContextID: chromedp.FromContext(ctx).BrowserContextID}); err != nil {
				t.Fatal(err)
			}
			reviewOpen(t, ctx, pg.page)
			// The loop chart (its title names T), and its size.
			info := eval[[]string](t, ctx, `(function () {
  var s = Array.from(document.querySelectorAll(`+jsString(pg.root+` svg.zplot[data-freq]`)+`)).filter(function (s) { return /Return ratio/.test(s.querySelector('title').textContent); })[0];
  s.closest('figure').scrollIntoView();
  s.closest('figure').setAttribute('data-e2e-chart', '');
  var vb = s.getAttribute('viewBox').split(' ');
  return [vb[2], vb[3], s.querySelector('title').textContent];
})()`)
			w, _ := strconv.Atoi(info[0])
			h, _ := strconv.Atoi(info[1])
			name := "zport-" + strings.Trim(strings.Map(func(r rune) rune {
				if r >= 'a' && r <= 'z' || r >= '0' && r <= '9' {
					return r
				}
				return '-'
			}, strings.ToLower(info[2])), "-")
			for strings.Contains(name, "--") {
				name = strings.ReplaceAll(name, "--", "-")
			}
			pinClick(t, ctx, `[data-e2e-chart]`, "save-svg")
			svg := waitFile(t, filepath.Join(out, name+".svg"), svgWhole)
			checkChartSVG(t, svg, w, h, info[2])
			pinClick(t, ctx, `[data-e2e-chart]`, "save-png")
			pic := waitFile(t, filepath.Join(out, name+".png"), pngWhole)
			img, err := png.Decode(bytes.NewReader(pic))
			if err != nil {
				t.Fatalf("the PNG does not decode: %v", err)
			}
			if b := img.Bounds(); b.Dx() != 2*w || b.Dy() != 2*h {
				t.Errorf("PNG is %d×%d, want twice the chart's %d×%d", b.Dx(), b.Dy(), w, h)
			}
			checkNotBlank(t, name+".png", pic, 2*w, 2*h)
			poll(t, ctx, `/saved as/.test(document.querySelector('[data-e2e-chart] [data-role="chart-msg"]').textContent)`)
			checkHealthy(t, ctx)
		})
	}
}

// checkChartSVG reads a saved chart: well-formed XML, an svg root of the
// chart's size, its title, axis titles and legend entries as text, and no
// class or style left for a page's style sheet to fill in.
func checkChartSVG(t *testing.T, b []byte, w, h int, title string) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	var texts []string
	root := true
	for {
		tok, err := d.Token()
		if err != nil {
			if err.Error() != "EOF" {
				t.Fatalf("the SVG is not well-formed XML: %v", err)
			}
			break
		}
		switch e := tok.(type) {
		case xml.StartElement:
			attr := map[string]string{}
			for _, a := range e.Attr {
				attr[a.Name.Local] = a.Value
			}
			if root {
				root = false
				if e.Name.Local != "svg" || attr["width"] != strconv.Itoa(w) || attr["height"] != strconv.Itoa(h) {
					t.Errorf("SVG root %s is %s×%s, want svg %d×%d", e.Name.Local, attr["width"], attr["height"], w, h)
				}
			}
			if _, ok := attr["class"]; ok {
				t.Errorf("the saved SVG keeps a class on <%s>: its look depends on the page", e.Name.Local)
			}
		case xml.CharData:
			if s := strings.TrimSpace(string(e)); s != "" {
				texts = append(texts, s)
			}
		}
	}
	all := strings.Join(texts, "|")
	for _, want := range []string{title, "Frequency", "Magnitude (dB)", "Phase (°)", "|T| = 1"} {
		if !strings.Contains(all, want) {
			t.Errorf("the saved SVG lacks the text %q", want)
		}
	}
}

// pdfText extracts the text of a PDF with pdftotext (poppler-utils), and
// writes each page as a PNG to dir when dir is set, for a person to look at.
func pdfText(t *testing.T, pdf []byte, dir, name string) (text string, pages int) {
	t.Helper()
	if _, err := exec.LookPath("pdftotext"); err != nil {
		if zbrowser.Required() {
			t.Fatalf("pdftotext is needed to read the printed PDF (apt-get install -y poppler-utils)")
		}
		t.Skip("SKIPPING: no pdftotext (apt-get install -y poppler-utils)")
	}
	tmp := t.TempDir()
	in := filepath.Join(tmp, name+".pdf")
	if err := os.WriteFile(in, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	b, err := exec.Command("pdftotext", "-raw", in, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	info, _ := exec.Command("pdfinfo", in).Output()
	for _, l := range strings.Split(string(info), "\n") {
		if v, ok := strings.CutPrefix(l, "Pages:"); ok {
			pages, _ = strconv.Atoi(strings.TrimSpace(v))
		}
	}
	if dir != "" {
		_ = os.WriteFile(filepath.Join(dir, name+".pdf"), pdf, 0o644)
		if err := exec.Command("pdftoppm", "-png", "-r", "60", in, filepath.Join(dir, name)).Run(); err != nil {
			t.Logf("pdftoppm: %v", err)
		}
	}
	return string(b), pages
}

// printPDF prints the page of ctx on A4 as the browser's print does.
func printPDF(t *testing.T, ctx context.Context) []byte {
	t.Helper()
	yes := true
	res, err := chromedp.Call(ctx, page.PrintToPDF, page.PrintToPDFParams{PaperWidth: 8.27, PaperHeight: 11.69, PreferCSSPageSize: &yes})
	if err != nil {
		t.Fatalf("printing to PDF: %v", err)
	}
	return res.Data
}

// Printing a stage page gives a design-review document: the title, the
// schematic's labels, every parameter, the results with every section
// open (the closed ones too: hand formulas and their sources, the
// generated circuit text, the stage's background), the margins, every
// chart, the notes and cautions — and no control. Also with pins, whose
// comparison prints. The pages go to ZPORT_SHOTS as PNGs when it is set.
func TestPrintReport(t *testing.T) {
	ctx := start(t)
	dir := os.Getenv("ZPORT_SHOTS")
	const id = "inverting"
	root := calcSel(id)
	load(t, ctx, fileURL(id, ""))
	checkLive(t, ctx, id)
	text, pages := pdfText(t, printPDF(t, ctx), dir, "print-"+id)
	t.Logf("%s prints on %d pages", id, pages)
	flat := strings.Join(strings.Fields(text), " ")
	for _, want := range []string{
		"Inverting amplifier",
		"What the stage is for", "Invented scenario",
		"R₁", "input resistor", "op-amp DC open-loop gain", "spot frequency",
		"Port impedances", "Blackman", "hand formula",
		"Hand formulas and their sources", "Franco",
		"Gain", "Loop", "Phase margin", "Gain margin", "Verdict",
		"Generated circuit text", "opamp U1", "resistor R2",
		"|Z| and phase at port out", "Return ratio T of U1", "Closed-loop gain",
		"Cautions",
	} {
		if !strings.Contains(flat, want) {
			t.Errorf("the printed page lacks %q", want)
		}
	}
	for _, control := range []string{"Pin this design", "Copy results", "Download CSV", "Print report", "Reset to the defaults",
		"Link to these settings", "Save as SVG", "Save as PNG", "Open as an editable circuit", "Skip to the content", "Remove all pins"} {
		if strings.Contains(flat, control) {
			t.Errorf("the printed page shows the control %q", control)
		}
	}
	// Every chart printed whole: its frequency axis's last label is there.
	if n := strings.Count(flat, "Frequency"); n < 5 {
		t.Errorf("%d charts' axis titles printed, want at least 5", n)
	}
	// 14 pages at the defaults since the noise section (a table and
	// three charts) joined the closed-loop response.
	if pages > 16 {
		t.Errorf("the stage prints on %d pages", pages)
	}

	// With two pins: the comparison and the pins' legend print.
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 1)
	typeInto(t, ctx, id, "R2", "100k")
	poll(t, ctx, `location.hash.indexOf('R2=100k') > 0`)
	pinClick(t, ctx, root, "pin")
	pinCount(t, ctx, root, 2)
	typeInto(t, ctx, id, "R2", "22k")
	poll(t, ctx, `location.hash.indexOf('R2=22k') > 0 && location.hash.indexOf('pin2.R2=100k') > 0`)
	pinCount(t, ctx, root, 2)
	text, _ = pdfText(t, printPDF(t, ctx), dir, "print-"+id+"-pins")
	flat = strings.Join(strings.Fields(text), " ")
	for _, want := range []string{"Pinned designs", "Pin 1: R2 47 kΩ (here 22 kΩ)", "compared with the pinned designs", "Z · Pin 2"} {
		if !strings.Contains(flat, want) {
			t.Errorf("the printed page with pins lacks %q", want)
		}
	}
	if strings.Contains(flat, "Remove") {
		t.Error("the printed page shows the pins' controls")
	}
	checkHealthy(t, ctx)

	// The custom page prints its whole circuit text, not the lines its
	// text box shows.
	edLoad(t, ctx, fileURL("custom", ""))
	edSetText(t, ctx, circuit.Ladder(40))
	text, _ = pdfText(t, printPDF(t, ctx), dir, "print-custom")
	flat = strings.Join(strings.Fields(text), " ")
	for _, want := range []string{"resistor R1 l1 l2 100", "capacitor C36 l37 gnd 1p", "resistor Rf l37 l0 1", "port out out gnd", "Port impedances"} {
		if !strings.Contains(flat, want) {
			t.Errorf("the printed custom page lacks %q", want)
		}
	}
	if strings.Contains(flat, examples.All()[0].Title) {
		t.Error("the printed custom page still describes the example the text replaced")
	}
	for _, control := range []string{"Pin this design", "Open .txt file…", "Save as SVG", "Print report"} {
		if strings.Contains(flat, control) {
			t.Errorf("the printed custom page shows the control %q", control)
		}
	}
	checkHealthy(t, ctx)
}

// At a phone's width (390 CSS px) the charts are drawn at the column's
// width: no chart text is under 11 CSS px once the drawing's scale is
// counted, no chart is wider than its figure, the schematic fits the
// width, and the page does not scroll sideways. On a stage page and the
// custom page, and with pins (their legend entries too).
func TestPhoneCharts(t *testing.T) {
	t.Parallel()
	opts := []chromedp.EmulateViewportOption{chromedp.EmulateScale(1), chromedp.EmulateMobile}
	for _, pg := range reviewPages {
		t.Run(pg.page, func(t *testing.T) {
			ctx := start(t)
			if err := chromedp.Do(ctx, chromedp.EmulateViewport(390, 844, opts...)); err != nil {
				t.Fatal(err)
			}
			reviewOpen(t, ctx, pg.page)
			if pg.page != "custom" {
				pinClick(t, ctx, pg.root, "pin")
				pinCount(t, ctx, pg.root, 1)
			}
			// The live panel is drawn for the column.
			poll(t, ctx, `(function () {
  var s = document.querySelector(`+jsString(pg.root+` [data-role="results"] svg.zplot[data-freq]`)+`);
  return !!s && Number(s.getAttribute('viewBox').split(' ')[2]) < 400;
})()`)
			if pg.page == "inverting" {
				// The design aids' charts: the sensitivities' bars, the
				// tolerance study's histograms.
				aidOpen(t, ctx)
				poll(t, ctx, `document.querySelectorAll(`+jsString(aidCalc+` figure.bars svg.zplot`)+`).length > 0`)
				aidSet(t, ctx, `[data-param="tolerance.trials"]`, "200")
				aidClick(t, ctx, "run")
				aidWaitState(t, ctx, "done")
			}
			bad := eval[[]string](t, ctx, `(function () {
  var out = [];
  document.querySelectorAll(`+jsString(pg.root+` figure svg.zplot`)+`).forEach(function (s) {
    s.closest('figure').scrollIntoView();
    var vb = s.getAttribute('viewBox').split(' ').map(Number);
    var r = s.getBoundingClientRect();
    var scale = r.width / vb[2];
    var fig = s.closest('figure').getBoundingClientRect();
    if (r.width > fig.width + 0.5) out.push(s.id + ': ' + r.width + ' px wide in a figure of ' + fig.width);
    s.querySelectorAll('text').forEach(function (x) {
      if (!x.textContent.trim()) return;
      var px = parseFloat(getComputedStyle(x).fontSize) * scale;
      if (px < 11) out.push(s.id + ': "' + x.textContent + '" at ' + px.toFixed(2) + ' px');
    });
  });
  return out;
})()`)
			for _, b := range bad {
				t.Error(b)
			}
			if w := eval[int](t, ctx, `document.documentElement.scrollWidth`); w > 390 {
				t.Errorf("the page is %d px wide at 390", w)
			}
			if pg.page != "custom" {
				if over := eval[float64](t, ctx, `(function () {
  var f = document.querySelector(`+jsString(pg.root+` .schematic`)+`), s = f.querySelector('svg');
  return s.getBoundingClientRect().width - f.clientWidth;
})()`); over > 0.5 {
					t.Errorf("the schematic is %.1f px wider than its box", over)
				}
			}
			if dir := os.Getenv("ZPORT_SHOTS"); dir != "" {
				screenshot(t, ctx, dir, fmt.Sprintf("phone-%s", pg.page), opts...)
			}
			checkHealthy(t, ctx)
		})
	}
}
