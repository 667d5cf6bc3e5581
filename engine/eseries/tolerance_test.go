package eseries_test

import (
	"strings"
	"testing"

	"zport/engine/eseries"
)

func TestToleranceCode(t *testing.T) {
	for _, tc := range []struct {
		letter string
		want   float64
		ok     bool
		source string
	}{
		{"F", 0.01, true, "IEC 60062:2016, REFERENCES.md §6 [found]"},
		{"K", 0.10, true, "IEC 60062:2016, REFERENCES.md §6 [found]"},
		{"B", 0.001, true, "IEC 60062, REFERENCES.md §6 [memory]"},
		{"C", 0.0025, true, "IEC 60062, REFERENCES.md §6 [memory]"},
		{"D", 0.005, true, "IEC 60062, REFERENCES.md §6 [memory]"},
		{"G", 0.02, true, "IEC 60062, REFERENCES.md §6 [memory]"},
		{"J", 0.05, true, "IEC 60062, REFERENCES.md §6 [memory]"},
		{"M", 0.20, true, "IEC 60062, REFERENCES.md §6 [memory]"},
		{"f", 0.01, true, "lower case accepted: common practice"},
		{"k", 0.10, true, "lower case accepted: common practice"},
		{"A", 0, false, "not a letter this package knows"},
		{"Z", 0, false, "asymmetric in the standard, not covered"},
		{"", 0, false, "empty"},
		{"FF", 0, false, "two letters"},
		{" F", 0, false, "ToleranceCode takes the bare letter"},
	} {
		got, ok := eseries.ToleranceCode(tc.letter)
		if got != tc.want || ok != tc.ok {
			t.Errorf("ToleranceCode(%q) = %g, %t; want %g, %t (%s)", tc.letter, got, ok, tc.want, tc.ok, tc.source)
		}
	}
}

func TestParseTolerance(t *testing.T) {
	letter := func(l string) float64 {
		f, ok := eseries.ToleranceCode(l)
		if !ok {
			t.Fatalf("ToleranceCode(%q) not found", l)
		}
		return f
	}
	for _, tc := range []struct {
		in   string
		want float64
	}{
		{"F", 0.01},
		{" f ", 0.01},
		{"J", 0.05},
		{"1%", 0.01},
		{"0.5 %", 0.005},
		{"1", 0.01},
		{"±2%", 0.02},
		{"± 2 %", 0.02},
		{"+/-5%", 0.05},
		{".5%", 0.005},
		{"5.", 0.05},
		{"20 %", 0.20},
		{"99.9%", 0.999},
		// A percentage and its letter give the identical float64.
		{"0.1%", letter("B")},
		{"0.25%", letter("C")},
		{"10%", letter("K")},
	} {
		got, err := eseries.ParseTolerance(tc.in)
		if err != nil || got != tc.want {
			t.Errorf("ParseTolerance(%q) = %g, %v; want %g", tc.in, got, err, tc.want)
		}
	}
}

func TestParseToleranceErrors(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want string
	}{
		{"", `tolerance "" is empty`},
		{"  ", `tolerance "  " is empty`},
		{"±", `tolerance "±" is empty`},
		{"X", `"X" is not an IEC 60062 tolerance letter`},
		{"FK", `"FK" is not an IEC 60062 tolerance letter`},
		{"1.2.3%", `"1.2.3" is not a number`},
		{"1%%", `"1%" is not a number`},
		{"5 percent", `"5 percent" is not a number`},
		{"1e2", `"1e2" is not a number`},
		{"0,5%", `"0,5" is not a number`},
		{"%", `"" is not a number`},
		{"-1%", `tolerance "-1%" is negative`},
		{"0%", `tolerance "0%" is zero`},
		{"100%", `tolerance "100%" is 100 % or more`},
		{"250", `tolerance "250" is 100 % or more`},
	} {
		t.Run(tc.in, func(t *testing.T) {
			got, err := eseries.ParseTolerance(tc.in)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("ParseTolerance(%q) = %g, %v; want an error containing %q", tc.in, got, err, tc.want)
			}
		})
	}
}

func FuzzParseTolerance(f *testing.F) {
	for _, s := range []string{"F", "1%", "0.5 %", "±2", "+/- 0.1 %", "", "-3", "1e9", "M"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got, err := eseries.ParseTolerance(s)
		if err == nil && !(got > 0 && got < 1) {
			t.Errorf("ParseTolerance(%q) = %g with no error; want a fraction in (0, 1)", s, got)
		}
		if err != nil && got != 0 {
			t.Errorf("ParseTolerance(%q) = %g with error %v; want 0", s, got, err)
		}
	})
}
