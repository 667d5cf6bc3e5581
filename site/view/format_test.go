package view

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

func TestSeriesElement(t *testing.T) {
	w := 2 * math.Pi * 1e3
	for _, tc := range []struct {
		z    complex128
		f    float64
		want string
	}{
		{complex(0.37, w*159e-6), 1e3, "370 mΩ + 159 µH"},
		{complex(12e3, -1/(w*3.3e-9)), 1e3, "12.0 kΩ + 3.30 nF"},
		{complex(1.5, w*2e-3), 1e3, "1.50 Ω + 2.00 mH"},
		{complex(-375e3, w*10e-3), 1e3, "−375 kΩ + 10.0 mH"}, // a negative resistance stays negative
		{complex(0, -1/(w*1e-6)), 1e3, "1.00 µF"},            // a pure reactance
		{complex(4.7e3, 0), 1e3, "4.70 kΩ"},
		{complex(4.7e3, 1), 0, "4.70 kΩ"},                  // no reactance at DC
		{complex(74.3, -3.473e-3), 1e3, "74.3 Ω"},          // ∠ −0.0027°: a resistor
		{complex(74.3, -74.3e-3), 1e3, "74.3 Ω + 2.14 mF"}, // ∠ −0.057°: shown
		{cmplx.NaN(), 1e3, "—"},
		{cmplx.Inf(), 1e3, "—"},
	} {
		if got := SeriesElement(tc.z, tc.f); got != tc.want {
			t.Errorf("SeriesElement(%v, %g) = %q, want %q", tc.z, tc.f, got, tc.want)
		}
	}
}

func TestFormatting(t *testing.T) {
	for _, tc := range []struct{ got, want string }{
		{Polar(complex(54935.77, -0.3), "Ω"), "54.94 kΩ ∠ 0.00°"}, // no "−0.00°"
		{Polar(complex(54935.77, -30), "Ω"), "54.94 kΩ ∠ −0.03°"},
		{Polar(complex(math.Copysign(0, -1), 0), ""), "0"},
		{Polar(complex(-4.273, 0.02293), "V/V"), "4.273 V/V ∠ 179.69°"},
		{Rect(complex(-4.273, 9.8e-21), "V/V"), "−4.273 + j0 V/V"},
		{Rect(complex(11e3, 47.64), "Ω"), "11.00 kΩ + j47.64 Ω"},
		{Rect(complex(0.8997, -186.3), ""), "0.8997 − j186.3"},
		{Plain(26077.6), "26078"},
		{Plain(143259.6), "1.433 × 10⁵"},
		{Plain(9.9996), "10.00"},
		{Plain(-0.00123), "−0.001230"},
		{Plain(2.3e-21), "2.300 × 10⁻²¹"},
		{Decibels(complex(186.3, 0)), "45.40 dB"},
		{Degrees(-89.724), "−89.72°"},
		{Magnitude(1e16, "Ω"), "1.000 × 10¹⁶ Ω"},
		{Magnitude(4700, "Ω"), "4.700 kΩ"},
		{Magnitude(65.834, "°"), "65.83°"},
	} {
		if tc.got != tc.want {
			t.Errorf("got %q, want %q", tc.got, tc.want)
		}
	}
}

// Numbers whose percentiles lie close together get the digits that keep
// them apart.
func TestSpreadFormat(t *testing.T) {
	f := spreadFormat("°", 90, 3e-5)
	if a, b := f(90.00136742), f(90.00139860); a == b || !strings.HasSuffix(a, "°") {
		t.Errorf("phase margins %s and %s", a, b)
	}
	g := spreadFormat("Ω", 1000, 6)
	if a, b := g(996.745), g(1002.56); a == b || !strings.Contains(b, "kΩ") {
		t.Errorf("impedances %s and %s", a, b)
	}
	if s := spreadFormat("", 1, 0)(0.5); s != Plain(0.5) {
		t.Errorf("no spread: %s", s)
	}
	if s := percent(-0.0851); s != "−8.51 %" {
		t.Errorf("percent: %s", s)
	}
	if s := fixedDegrees(-0.0000001, 3); s != "0.000°" {
		t.Errorf("−0 degrees: %s", s)
	}
}

func TestEng(t *testing.T) {
	for _, c := range []struct {
		v    float64
		unit string
		want string
	}{
		{100e3, "", "100 k"},
		{4700, "Ω", "4.7 kΩ"},
		{1e-12, "F", "1 pF"},
		{50, "Ω", "50 Ω"},
		{8.87e3, "Ω", "8.87 kΩ"},
		{1e6, "Hz", "1 MHz"},
		{100.5e3, "Ω", "100.5 kΩ"},
		{-2.2e-6, "H", "−2.2 µH"},
		{3, "", "3"},
		{1e16, "Ω", "1e+16 Ω"},
	} {
		if got := Eng(c.v, c.unit); got != c.want {
			t.Errorf("Eng(%g, %q) = %q, want %q", c.v, c.unit, got, c.want)
		}
	}
}
