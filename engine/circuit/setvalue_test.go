package circuit

import (
	"strings"
	"testing"
)

func TestSetNumber(t *testing.T) {
	const text = "# a stage, values our own\n" +
		"vsource  Vin in gnd 1\n" +
		"opamp    U1  in  fb  out  a0=100k gbw=1M   # the op amp\n" +
		"resistor R1  fb  gnd 2k\n" +
		"capacitor Cf out fb  4.7nF  # feedback\n" +
		"vccs     G1  out gnd sense=in,gnd gm=1m\n" +
		"bjt      Q1  out in  gnd ic=1m\n" +
		"mos      M1  out in  gnd gm=2m\n"
	for _, c := range []struct {
		name, x string
		line    int    // 1-based line that changes
		want    string // the new line
	}{
		{"R1", "2.2k", 4, "resistor R1  fb  gnd 2.2k"},
		{"Cf", "1.383p", 5, "capacitor Cf out fb  1.383pF  # feedback"},
		{"U1.gbw", "5M", 3, "opamp    U1  in  fb  out  a0=100k gbw=5M   # the op amp"},
		{"U1.p2", "30M", 3, "opamp    U1  in  fb  out  a0=100k gbw=1M p2=30M   # the op amp"},
		{"G1", "-3m", 6, "vccs     G1  out gnd sense=in,gnd gm=-3m"},
		{"M1.gm", "4m", 8, "mos      M1  out in  gnd gm=4m"},
	} {
		got, err := SetNumber(text, c.name, c.x)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		want := strings.Split(text, "\n")
		want[c.line-1] = c.want
		if got != strings.Join(want, "\n") {
			t.Errorf("%s = %s:\n%s\nwant line %d %q", c.name, c.x, got, c.line, c.want)
		}
	}
	for _, c := range []struct{ name, x, has string }{
		{"R9", "1k", "no part called R9"},
		{"Q1.gm", "1m", "given by its bias"},
		{"U1.zz", "1", "no number called zz"},
		{"Vin", "2", "no number called Vin"},
		{"R1", "-1k", "does not read back"},
	} {
		got, err := SetNumber(text, c.name, c.x)
		if err == nil || !strings.Contains(err.Error(), c.has) || got != text {
			t.Errorf("%s = %s: %v, text changed %v; want an error saying %q", c.name, c.x, err, got != text, c.has)
		}
	}
	if _, err := SetNumber("resistor R1 a\n", "R1", "1k"); err == nil {
		t.Error("text with problems: no error")
	}
}
