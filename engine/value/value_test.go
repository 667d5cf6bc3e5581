package value

import (
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

func TestParse(t *testing.T) {
	cases := []struct {
		in, unit string
		want     float64
		source   string
	}{
		{"2200", "Ω", 2200, "plain decimal"},
		{"2.2e-9", "F", 2.2e-9, "decimal exponent"},
		{"-1.5", "", -1.5, "signed gain"},
		{"10k", "Ω", 10e3, "SI prefix k (BIPM SI Brochure, 9th ed., 2019)"},
		{"1m", "Ω", 1e-3, "m is milli (SI Brochure: case-sensitive)"},
		{"1M", "Ω", 1e6, "M is mega (SI Brochure)"},
		{"1G", "", 1e9, "SI prefix G"},
		{"1T", "Ω", 1e12, "SI prefix T"},
		{"3.3p", "F", 3.3e-12, "SI prefix p"},
		{"100f", "F", 100e-15, "SI prefix f"},
		{"4.7u", "F", 4.7e-6, "u for micro (common practice)"},
		{"4.7µF", "F", 4.7e-6, "µ micro sign with unit"},
		{"4.7μ", "F", 4.7e-6, "Greek mu"},
		{"10kΩ", "Ω", 10e3, "prefix and unit symbol"},
		{"10kohm", "Ω", 10e3, "ohm spelled"},
		{"1kHz", "Hz", 1e3, "frequency unit"},
		{"1mA", "A", 1e-3, "milliampere"},
		{"2mS", "S", 2e-3, "millisiemens"},
		{"10uH", "H", 10e-6, "microhenry"},
		{"4nV/√Hz", "V/√Hz", 4e-9, "noise voltage density"},
		{"1.5pA/rtHz", "A/√Hz", 1.5e-12, "noise current density, ASCII spelling (common practice)"},
		{"4k7", "Ω", 4700, "RKM 4K7 = 4.7 kΩ (IEC 60062:2016)"},
		{"4K7", "Ω", 4700, "RKM capital K as the standard writes it (IEC 60062:2016)"},
		{"47K3", "Ω", 47300, "RKM 47K3 = 47.3 kΩ (IEC 60062:2016)"},
		{"2R2", "Ω", 2.2, "RKM 2R2 (IEC 60062:2016)"},
		{"4R7", "Ω", 4.7, "RKM 4R7 = 4.7 Ω (IEC 60062:2016)"},
		{"R47", "Ω", 0.47, "RKM R47 = 0.47 Ω (IEC 60062:2016)"},
		{"4M7", "Ω", 4.7e6, "RKM 4M7 = 4.7 MΩ (IEC 60062:2016)"},
		{"4n7", "F", 4.7e-9, "RKM 4n7 = 4.7 nF (IEC 60062:2016)"},
		{"1µ0", "F", 1e-6, "RKM 1µ0 = 1 µF (IEC 60062:2016)"},
		{"10R", "Ω", 10, "RKM trailing R"},
		{"4k7Ω", "Ω", 4700, "RKM with unit"},
		{".5", "", 0.5, "leading point"},
		{"1F", "F", 1, "bare unit"},
	}
	for _, c := range cases {
		got, err := Parse(c.in, c.unit)
		if err != nil {
			t.Errorf("%s: Parse(%q) error %v", c.source, c.in, err)
			continue
		}
		if math.Abs(got-c.want) > 1e-15*math.Abs(c.want) {
			t.Errorf("%s: Parse(%q) = %g, want %g", c.source, c.in, got, c.want)
		}
	}
}

func TestParseErrors(t *testing.T) {
	cases := []struct {
		in, unit string
		offset   int
	}{
		{"4k7k", "Ω", 3},
		{"1..2", "", 2},
		{"NaN", "", 0},
		{"1e999", "", 0},
		{"Inf", "", 0},
		{"", "", 0},
		{"k", "", 0},
		{"k7", "Ω", 0},
		{"10K", "", 0}, // RKM 10K is valid; see below
		{"1e3k", "", 3},
		{"1e", "", 1},
		{"10x", "Ω", 2},
		{"10kF", "Ω", 3},
		{"1.5K", "Ω", 3},
		{"-", "", 1},
	}
	for _, c := range cases {
		_, err := Parse(c.in, c.unit)
		if c.in == "10K" {
			if err != nil {
				t.Errorf("Parse(%q): RKM 10K should be accepted, got %v", c.in, err)
			}
			continue
		}
		var se *SyntaxError
		if !errors.As(err, &se) {
			t.Errorf("Parse(%q) = nil error, want a SyntaxError", c.in)
			continue
		}
		if se.Offset != c.offset {
			t.Errorf("Parse(%q): offset %d, want %d (%v)", c.in, se.Offset, c.offset, err)
		}
	}
}

func TestFormat(t *testing.T) {
	cases := []struct {
		v    float64
		unit string
		sig  int
		want string
	}{
		{4700, "Ω", 3, "4.70 kΩ"},
		{1.59e-4, "H", 3, "159 µH"},
		{0.37, "Ω", 2, "370 mΩ"},
		{999.96, "Hz", 4, "1.000 kHz"},
		{-2.5e-12, "F", 3, "−2.50 pF"},
		{0, "Ω", 3, "0 Ω"},
		{1e20, "Ω", 3, "1.00×10^+20 Ω"},
		{math.NaN(), "Ω", 3, "—"},
		{math.Inf(1), "", 3, "—"},
		{12345, "", 3, "12.3k"},
		{1, "", 3, "1.00"},
	}
	for _, c := range cases {
		if got := Format(c.v, c.unit, c.sig); got != c.want {
			t.Errorf("Format(%g, %q, %d) = %q, want %q", c.v, c.unit, c.sig, got, c.want)
		}
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"4k7", "2.2e-9", "R47", "1µ0", "10kΩ", "1..2", "NaN", "1meg", "50MEGohm", "100dB", "-6.02dB", "1e9dB", "kdB"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for name, parse := range map[string]func(string) (float64, error){
			"Parse":     func(s string) (float64, error) { return Parse(s, "Ω") },
			"ParseGain": ParseGain,
		} {
			v, err := parse(s)
			if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
				t.Fatalf("%s(%q) = %v without error", name, s, v)
			}
			var se *SyntaxError
			if err != nil && errors.As(err, &se) && (se.Offset < 0 || se.Offset > len(s)) {
				t.Fatalf("%s(%q): offset %d outside text", name, s, se.Offset)
			}
		}
	})
}

func TestExact(t *testing.T) {
	cases := []struct {
		x    float64
		want string
	}{
		{4.7e-10, "470p"}, {10e3, "10k"}, {4700, "4.7k"}, {1e-15, "1f"}, {0.5, "500m"},
		{1.5e6, "1.5M"}, {2, "2"}, {0, "0"}, {123456789.123, "123.456789123M"},
	}
	for _, c := range cases {
		if got := Exact(c.x); got != c.want {
			t.Errorf("Exact(%g) = %q, want %q", c.x, got, c.want)
		}
	}
	rng := []float64{1e-14, 3.3e-12, 470e-12, 0.1 + 0.2, 1 / 3.0, 2.2e-9 * 3, 98.7654321e3, 1e20, 5e-324}
	for _, x := range rng {
		back, err := Parse(Exact(x), "")
		if err != nil || back != x {
			t.Errorf("Exact(%v) = %q reads back as %v, %v", x, Exact(x), back, err)
		}
	}
}

// Decibels for dimensionless gains: 20·log10 of an amplitude ratio (the
// definition of the decibel for field quantities, IEC 60027-3 [memory]).
func TestParseGain(t *testing.T) {
	cases := []struct {
		in   string
		want float64
		tol  float64
	}{
		{"100dB", 1e5, 0}, // exactly: a whole multiple of 20 dB
		{"120dB", 1e6, 0},
		{"0dB", 1, 0},
		{"-20dB", 0.1, 0},
		{"-40dB", 0.01, 0},
		{"6dB", math.Pow(10, 0.3), 1e-15},
		{"-6dB", math.Pow(10, -0.3), 1e-15},
		{"106.02dB", math.Pow(10, 106.02/20), 1e-15},
		{"2.5e1dB", math.Pow(10, 1.25), 1e-15},
		{"+3dB", math.Pow(10, 0.15), 1e-15},
		{"200k", 200e3, 0}, // plain values as Parse reads them
		{"-2", -2, 0},
		{"4k7", 4700, 0},
	}
	for _, c := range cases {
		got, err := ParseGain(c.in)
		if err != nil {
			t.Errorf("ParseGain(%q): %v", c.in, err)
			continue
		}
		if c.tol == 0 && got != c.want || math.Abs(got-c.want) > c.tol*c.want {
			t.Errorf("ParseGain(%q) = %.17g, want %.17g", c.in, got, c.want)
		}
	}
	if g, _ := ParseGain("100dB"); g != 100000 {
		t.Errorf("100dB = %.17g, want 1e5 exactly", g)
	}
	bad := []struct {
		in     string
		offset int
	}{
		{"dB", 0}, {"10kdB", 2}, {"1k5dB", 1}, {"1..2dB", 2}, {"7000dB", 0}, {"-7000dB", 0}, {"100db", 3},
	}
	for _, c := range bad {
		_, err := ParseGain(c.in)
		var se *SyntaxError
		if !errors.As(err, &se) {
			t.Errorf("ParseGain(%q) = nil error, want a SyntaxError", c.in)
			continue
		}
		if se.Offset != c.offset {
			t.Errorf("ParseGain(%q): offset %d, want %d (%v)", c.in, se.Offset, c.offset, err)
		}
	}
}

// Mega written as "meg", in any case, gets the SI hint at the m.
func TestMegHint(t *testing.T) {
	for _, c := range []struct {
		in, unit, want string
		offset         int
	}{
		{"1meg", "Ω", "did you mean 1M?", 1},
		{"50MEG", "Ω", "did you mean 50M?", 2},
		{"2.2Meg", "", "did you mean 2.2M?", 3},
		{"10megohm", "Ω", "did you mean 10M?", 2},
		{"1mEgHz", "Hz", "did you mean 1M?", 1},
	} {
		_, err := Parse(c.in, c.unit)
		var se *SyntaxError
		if !errors.As(err, &se) || se.Offset != c.offset || !strings.Contains(se.Msg, "M is mega and m is milli (SI)") || !strings.Contains(se.Msg, c.want) {
			t.Errorf("Parse(%q) = %v (offset %v), want the mega hint %q at %d", c.in, err, se, c.want, c.offset)
		}
	}
	if _, err := Parse("1m", "Ω"); err != nil {
		t.Errorf("1m: %v", err)
	}
}

// A prefixed value is the written decimal rounded once, as strconv reads
// the same number in exponent form (the round-to-nearest of IEEE 754):
// 4n7 is the float64 nearest 4.7e-9, the value IEC 60063's E12 table
// gives, not 4.7 times a rounded 10⁻⁹.
func TestParseRoundsOnce(t *testing.T) {
	rng := rand.New(rand.NewPCG(60063, 1))
	for p, e := range prefixes {
		for k := 0; k < 200; k++ {
			mant := strconv.Itoa(1+rng.IntN(999)) + "." + strconv.Itoa(rng.IntN(1000))
			want, _ := strconv.ParseFloat(mant+"e"+strconv.Itoa(e), 64)
			if got, err := Parse(mant+p, ""); err != nil || got != want {
				t.Fatalf("Parse(%q) = %v, %v; want %v", mant+p, got, err, want)
			}
			rkm := strings.Replace(mant, ".", p, 1)
			if got, err := Parse(rkm, ""); err != nil || got != want {
				t.Fatalf("Parse(%q) = %v, %v; want %v", rkm, got, err, want)
			}
		}
	}
	if v, _ := Parse("4n7", "F"); v != 4.7e-9 {
		t.Errorf("4n7 = %v, want 4.7e-9", v)
	}
}

// A long value is cut in the message that quotes it, so that a token
// pasted into a field cannot fill the page with its echo; the offset still
// points into the whole text.
func TestQuoteCutsLongTokens(t *testing.T) {
	if got := Quote("4k7k"); got != `"4k7k"` {
		t.Errorf("Quote(4k7k) = %s", got)
	}
	if got := Quote(strings.Repeat("µ", 40)); got != `"`+strings.Repeat("µ", 31)+`"…` {
		t.Errorf("Quote of 40 µ = %s", got)
	}
	long := "1" + strings.Repeat("x", 10000)
	_, err := Parse(long, "Ω")
	var se *SyntaxError
	if !errors.As(err, &se) || se.Offset != 1 || len(se.Msg) > 120 || !strings.Contains(se.Msg, "…") {
		t.Errorf("Parse of a 10,001-character value: %v", err)
	}
}
