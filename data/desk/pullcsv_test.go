package desk

// Source: the pulls below are invented; the pound is 0.45359237 kg exactly
// (NIST Handbook 44, Appendix C).

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestReadPullsRefusesWithTheFix(t *testing.T) {
	cases := []struct {
		name, in, want string
	}{
		{"utf16", "\xff\xfep\x00u\x00l\x00l\x00", "UTF-16"},
		{"semicolons", "pull;pet_clear;pvc\nP1;20;0.1\n", "semicolons"},
		{"decimal comma", "pull,pet_clear,pvc\nP1,\"20,5\",0.1\n", "write 20.5"},
		{"did you mean", "pull,pet_clear,aluminum\nP1,20,0.1\n", `did you mean "aluminium"`},
		{"typo", "pull,pet_claer\nP1,20\n", `did you mean "pet_clear"`},
		{"hash label", "pull,pet_clear,pvc\n#P1,20,0.1\nP2,21,0\n", "labels may not start with #"},
	}
	for _, c := range cases {
		_, err := ReadPulls(strings.NewReader(c.in), "f.csv", 0)
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrBadPulls) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
}

func TestReadPullsUnitsAndColumns(t *testing.T) {
	in := "\xef\xbb\xbf# unit: lb\n# a comment\npull,pet_clear,pvc,weighed,taken\nP1,20,1,21.5,2026-03-02 14:30\n"
	ps, err := ReadPulls(strings.NewReader(in), "f.csv", 0)
	if err != nil {
		t.Fatal(err)
	}
	p := ps[0]
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-12 }
	if p.Label != "P1" || !near(p.Kg["pet_clear"], 20*KgPerLb) || !near(p.StatedKg, 21.5*KgPerLb) || p.TakenMs == 0 {
		t.Fatalf("%+v", p)
	}
	if _, err := ReadPulls(strings.NewReader(in), "f.csv", UnitKg); err == nil {
		t.Fatal("a file in lb read as kg")
	}
	// Sorted parts above the weighed mass are refused by the records' rules
	// when saved; the reader keeps both.
	ps, err = ReadPulls(strings.NewReader("pull,pet_clear,weighed\nP1,30,20\n"), "g.csv", UnitKg)
	if err != nil || ps[0].StatedKg != 20 {
		t.Fatalf("%v %+v", err, ps)
	}
}
