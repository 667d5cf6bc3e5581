package site

import (
	"html"
	"regexp"
	"strings"
	"testing"

	"zport/engine/topology"
)

var (
	fieldRE   = regexp.MustCompile(`<div class="field" data-field="([^"]+)">\s*<label for="[^"]+"><span class="sym">(.*?)</span> <span class="meaning">(.*?)</span></label>`)
	calcRE    = regexp.MustCompile(`data-calculator data-topology="([^"]+)"`)
	anyTagRE  = regexp.MustCompile(`<[^>]*>`)
	scriptsRE = regexp.MustCompile(`(?s)<script.*?</script>|<style.*?</style>`)
)

// Every page labels a stage's parameters exactly as the glossary does —
// the symbol, the label and the stage's note — and no page, in the
// multi-file site or the single file, uses a spelling the glossary rules
// out ("p₂" for f_p2, "open-loop DC gain" for a₀'s label, …).
func TestPagesFollowTheGlossary(t *testing.T) {
	pages := map[string]string{"zport-single.html": string(single(t))}
	for name, b := range build(t) {
		if strings.HasSuffix(name, ".html") {
			pages[name] = string(b)
		}
	}
	checked := 0
	for name, page := range pages {
		// Each calculator's fields, in order: the fields after a
		// calculator's opening tag are that calculator's.
		cuts := calcRE.FindAllStringSubmatchIndex(page, -1)
		for i, c := range cuts {
			end := len(page)
			if i+1 < len(cuts) {
				end = cuts[i+1][0]
			}
			id := page[c[2]:c[3]]
			tp, ok := topology.Lookup(id)
			if !ok {
				t.Fatalf("%s: calculator of unknown stage %q", name, id)
			}
			for _, m := range fieldRE.FindAllStringSubmatch(page[c[1]:end], -1) {
				var p *topology.Param
				for j := range tp.Params {
					if tp.Params[j].Name == m[1] {
						p = &tp.Params[j]
					}
				}
				if p == nil {
					continue // the spot frequency, the sweep, an analysis's setting
				}
				term, ok := topology.TermOf(*p)
				if !ok {
					t.Errorf("%s: %s's %s has no glossary term", name, id, p.Name)
					continue
				}
				if want := string(symbolHTML(term.Symbol)); m[2] != want {
					t.Errorf("%s: %s's %s is labelled %q, the glossary writes %q", name, id, p.Name, m[2], want)
				}
				if got := html.UnescapeString(m[3]); got != p.Meaning || !strings.HasPrefix(got, term.Label) {
					t.Errorf("%s: %s's %s means %q, want %q after the glossary's %q", name, id, p.Name, got, p.Meaning, term.Label)
				}
				checked++
			}
		}
		text := html.UnescapeString(anyTagRE.ReplaceAllString(scriptsRE.ReplaceAllString(page, " "), " "))
		for _, term := range topology.Glossary() {
			for _, not := range term.Not {
				if i := strings.Index(text, not); i >= 0 {
					t.Errorf("%s spells %s as %q: …%s…", name, term.ID, not, text[max(0, i-60):min(len(text), i+len(not)+60)])
				}
			}
		}
	}
	if checked < 100 {
		t.Errorf("only %d labelled fields found on the pages", checked)
	}
}
