package value

import (
	"errors"
	"math"
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
	for _, s := range []string{"4k7", "2.2e-9", "R47", "1µ0", "10kΩ", "1..2", "NaN"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := Parse(s, "Ω")
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("Parse(%q) = %v without error", s, v)
		}
		var se *SyntaxError
		if err != nil && errors.As(err, &se) && (se.Offset < 0 || se.Offset > len(s)) {
			t.Fatalf("Parse(%q): offset %d outside text", s, se.Offset)
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
