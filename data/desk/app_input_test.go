package desk

import (
	"errors"
	"math"
	"testing"
)

func TestParseMass(t *testing.T) {
	for _, c := range []struct {
		in     string
		u      Unit
		kg     float64
		pieces int
	}{
		{"12.5", UnitKg, 12.5, 1},
		{" 12,5 ", UnitKg, 12.5, 1},
		{"0.4+0.3+0.2", UnitKg, 0.9, 3},
		// Source: NIST Handbook 44, Appendix C: 1 lb = 0.45359237 kg exactly.
		{"10", UnitLb, 4.5359237, 1},
		{"1 000", UnitKg, 1000, 1},
	} {
		m, err := ParseMass(c.in, c.u)
		if err != nil || math.Abs(m.Kg-c.kg) > 1e-12 || m.Pieces != c.pieces {
			t.Errorf("ParseMass(%q, %s) = %+v, %v; want %g kg in %d pieces", c.in, c.u, m, err, c.kg, c.pieces)
		}
	}
	for _, in := range []string{"", "abc", "-3", "0", "1++2", "NaN", "Inf", "3000"} {
		if _, err := ParseMass(in, UnitKg); !errors.Is(err, ErrBadInput) {
			t.Errorf("ParseMass(%q) = %v, want ErrBadInput", in, err)
		}
	}
}

func TestParseCoords(t *testing.T) {
	for _, c := range []struct {
		in       string
		lat, lon float64
	}{
		{"45.07, 4.71", 45.07, 4.71},
		{"45.07 4.71", 45.07, 4.71},
		{"-33.92,18.42", -33.92, 18.42},
		{"33.92 S 18.42 E", -33.92, 18.42},
		{"33.92S, 70.6W", -33.92, -70.6},
	} {
		lat, lon, err := ParseCoords(c.in)
		if err != nil || lat != c.lat || lon != c.lon {
			t.Errorf("ParseCoords(%q) = %v, %v, %v; want %v, %v", c.in, lat, lon, err, c.lat, c.lon)
		}
	}
	for _, in := range []string{"", "45.07", "north", "95, 4", "45, 200", "1, 2, 3"} {
		if _, _, err := ParseCoords(in); !errors.Is(err, ErrBadInput) {
			t.Errorf("ParseCoords(%q) = %v, want ErrBadInput", in, err)
		}
	}
}

func TestParseLength(t *testing.T) {
	if v, err := ParseLength("1,22"); err != nil || v != 1.22 {
		t.Errorf("ParseLength(1,22) = %v, %v", v, err)
	}
	if v, err := ParseLength(""); err != nil || v != 0 {
		t.Errorf("empty side = %v, %v; want 0 (not measured)", v, err)
	}
	for _, in := range []string{"122", "-1", "x"} {
		if _, err := ParseLength(in); !errors.Is(err, ErrBadInput) {
			t.Errorf("ParseLength(%q) = %v, want ErrBadInput", in, err)
		}
	}
}
