package render

import (
	"testing"
	"unicode/utf8"

	"zport/engine/api"
)

// Every port chart title of the catalog fits on its chart's one line,
// keeping as much of the port's description as fits.
func TestPortChartTitle(t *testing.T) {
	for _, c := range []struct{ name, desc, want string }{
		{"o", "", "|Z| and phase at port o"},
		{"out", "output to gnd", "|Z| and phase at port out (output to gnd)"},
		{"in", "summing node, as the sensor sees it (the sensor's own Cd, Rsh included)",
			"|Z| and phase at port in (summing node, as the sensor sees it)"},
		{"out", "a description far too long for the chart's one line of title text, with no parenthesis",
			"|Z| and phase at port out"},
	} {
		if got := portChartTitle(c.name, c.desc); got != c.want {
			t.Errorf("portChartTitle(%q, %q) = %q, want %q", c.name, c.desc, got, c.want)
		}
	}
	for _, e := range api.Catalog() {
		for _, p := range e.Ports {
			if got := portChartTitle(p.Name, p.Title); utf8.RuneCountInString(got) > maxChartTitle {
				t.Errorf("%s port %s: title %q is longer than %d characters", e.ID, p.Name, got, maxChartTitle)
			}
		}
	}
}
