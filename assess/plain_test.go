package assess

// Source: the expected strings are Go's strconv shortest round-trip digits
// (%g) written out by hand without the exponent: formatting rules of our
// own, no outside value.

import (
	"math"
	"testing"
)

// Expected strings: %g's digits (Go's strconv, shortest round-trip) written
// out without the exponent, by hand.
func TestPlainAndSig(t *testing.T) {
	for _, c := range []struct {
		x    float64
		want string
	}{
		{0, "0"}, {1e6, "1000000"}, {1e-5, "0.00001"}, {0.1, "0.1"}, {548.25, "548.25"},
		{-2.5, "-2.5"}, {1e21, "1000000000000000000000"}, {1e308, "1 × 10³⁰⁸"}, {-2.5e-300, "-2.5 × 10⁻³⁰⁰"},
		{math.Inf(1), "+Inf"},
	} {
		if got := Plain(c.x); got != c.want {
			t.Errorf("Plain(%v) = %q, want %q", c.x, got, c.want)
		}
	}
	for _, c := range []struct {
		x    float64
		n    int
		want string
	}{
		{1.234e-5, 3, "0.0000123"}, {0.5, 3, "0.5"}, {2.0 / 3, 4, "0.6667"}, {123456, 3, "123456"},
		{99.96, 3, "100"}, {-0.001234, 2, "-0.0012"}, {0, 3, "0"}, {1e-300, 3, "1 × 10⁻³⁰⁰"},
	} {
		if got := Sig(c.x, c.n); got != c.want {
			t.Errorf("Sig(%v, %d) = %q, want %q", c.x, c.n, got, c.want)
		}
	}
}
