package assess

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// Plain decimals only. Source: strconv.ParseFloat's documented syntax
// (hexadecimal mantissa with p exponent, underscores with a base prefix,
// Inf and NaN), which the old readers accepted.
func TestParseDecimal(t *testing.T) {
	for _, ok := range []struct {
		s string
		x float64
	}{{"1.25", 1.25}, {"-0.5", -0.5}, {"+3", 3}, {".5", 0.5}, {"5.", 5}, {"2e-3", 0.002}, {"1E3", 1000}, {"0", 0}, {"007", 7}} {
		if x, err := ParseDecimal(ok.s); err != nil || x != ok.x {
			t.Errorf("ParseDecimal(%q) = %g, %v; want %g", ok.s, x, err, ok.x)
		}
	}
	for _, bad := range []string{"0x1p4", "0X10", "1_0", "0b101", "0o17", "Inf", "+inf", "NaN", "infinity", "1e400", "", " 1", "1 ", "1,5",
		"1.2.3", "e5", "--1", "١٢", "1e", strings.Repeat("9", 100)} {
		if _, err := ParseDecimal(bad); !errors.Is(err, ErrBadNumber) {
			t.Errorf("ParseDecimal(%q) accepted", bad)
		}
	}
	if n, err := ParseWhole("-12"); err != nil || n != -12 {
		t.Errorf("ParseWhole(-12) = %d, %v", n, err)
	}
	for _, bad := range []string{"1_000", "0x10", "1.0", "1e3", "99999999999999999999", ""} {
		if _, err := ParseWhole(bad); !errors.Is(err, ErrBadNumber) {
			t.Errorf("ParseWhole(%q) accepted", bad)
		}
	}
}

// The pulls reader refuses hexadecimal floats and digit separators and
// quotes at most 40 characters of a bad cell.
func TestReadPullsPlainNumbers(t *testing.T) {
	for _, cell := range []string{"0x1p4", "1_0", "0x10"} {
		_, err := ReadPulls(strings.NewReader("pull,pet_clear,pvc\nP1,"+cell+",0\n"), "hex.csv")
		if !errors.Is(err, ErrBadNumber) {
			t.Errorf("mass %q: %v, want ErrBadNumber", cell, err)
		}
	}
	_, err := ReadPulls(strings.NewReader("pull,pet_clear,pvc_count\nP1,2,1_0\n"), "sep.csv")
	if !errors.Is(err, ErrBadNumber) {
		t.Errorf("count 1_0: %v", err)
	}
	long := strings.Repeat("\x1b[31mX", 20000)
	_, err = ReadPulls(strings.NewReader("pull,pet_clear\nP1,"+long+"\n"), "long.csv")
	if err == nil || len(err.Error()) > 300 || strings.ContainsRune(err.Error(), 0x1b) {
		t.Fatalf("message of %d bytes for a 120,000-byte cell (escape echoed: %v): %.200q", len(err.Error()), strings.ContainsRune(err.Error(), 0x1b), err)
	}
}

// Duplicate keys and control characters in JSON documents are refused;
// encoding/json keeps the last of two keys silently.
func TestCheckJSON(t *testing.T) {
	for _, ok := range []string{`{"a":1,"b":{"a":2}}`, `[{"a":1},{"a":2}]`, `{"name":"Café ⟨x⟩","l":[1,2,{"k":"v"}]}`, `"x"`, `{}`} {
		if err := CheckJSON([]byte(ok)); err != nil {
			t.Errorf("%s: %v", ok, err)
		}
	}
	for _, c := range []struct {
		doc  string
		want error
	}{
		{`{"a":1,"a":2}`, ErrDuplicateKey},
		{`{"x":{"limits":[],"limits":[1]}}`, ErrDuplicateKey},
		{`[{"a":1,"b":2,"a":3}]`, ErrDuplicateKey},
		{`{"name":"evil\u001b[2J"}`, ErrControlText},
		{`{"name":"two\nlines"}`, ErrControlText},
		{`{"name":"rtl \u202e"}`, ErrControlText},
		{`{"a\u0007":1}`, ErrControlText},
	} {
		if err := CheckJSON([]byte(c.doc)); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.doc, err, c.want)
		}
	}
	_, err := ParseSpec([]byte(`{"name":"x","limits":[{"item":"pet","min":0.9}],"limits":[]}`))
	if !errors.Is(err, ErrBadSpec) || !strings.Contains(err.Error(), "twice") {
		t.Fatalf("spec with a repeated key: %v", err)
	}
}

// FuzzParseDecimal: whatever ParseDecimal accepts is a plain decimal
// (digits, at most one point, an optional exponent) that strconv reads
// to the same finite value; it never accepts hexadecimal, digit
// separators, Inf or NaN.
func FuzzParseDecimal(f *testing.F) {
	for _, s := range []string{"1.25", "0x1p4", "1_0", "Inf", "-0", ".5e-3", "9e999"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		x, err := ParseDecimal(s)
		if err != nil {
			return
		}
		if strings.ContainsAny(s, "xXpP_iInN") || strings.Count(s, ".") > 1 {
			t.Fatalf("accepted %q", s)
		}
		y, perr := strconv.ParseFloat(s, 64)
		if perr != nil || y != x || math.IsInf(x, 0) || math.IsNaN(x) {
			t.Fatalf("%q: %g, strconv says %g, %v", s, x, y, perr)
		}
	})
}
