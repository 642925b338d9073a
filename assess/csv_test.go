package assess

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestReadPullsDemo(t *testing.T) {
	pulls, err := ReadPullsFile("../testdata/demo-bale-0417.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(pulls) != 6 {
		t.Fatalf("%d pulls, want 6", len(pulls))
	}
	// First row of the file, typed in by hand: pet_clear 23.945, pvc 0.
	// Source: testdata/demo-bale-0417.csv line 5 (our demo scenario).
	i, _ := CategoryIndex("pet_clear")
	if pulls[0].Label != "P1" || pulls[0].Kg[i] != 23.945 {
		t.Errorf("first pull: %q %g", pulls[0].Label, pulls[0].Kg[i])
	}
	pv, _ := CategoryIndex("pvc")
	if pulls[1].Pieces == nil || pulls[1].Pieces[pv] != 5 {
		t.Errorf("pvc count of P2 = %v", pulls[1].Pieces)
	}
	if l, _ := CategoryIndex("ldpe"); pulls[1].Pieces[l] != NotCounted {
		t.Errorf("ldpe was not counted but reads %d", pulls[1].Pieces[l])
	}
}

func TestReadPullsBadFiles(t *testing.T) {
	cases := []struct {
		file      string
		want      error
		line, col int
		mention   string
	}{
		{"unknown-category.csv", ErrUnknownCategory, 1, 16, "did you mean pvc"},
		{"negative-mass.csv", ErrNegativeMass, 2, 6, "negative"},
		{"nan-mass.csv", ErrNonFiniteMass, 2, 6, "finite"},
		{"non-numeric-mass.csv", ErrBadNumber, 2, 6, "not a number"},
		{"zero-mass-pull.csv", ErrEmptyPull, 2, 0, "0 kg"},
		{"duplicate-label.csv", ErrDuplicatePull, 4, 1, "first on line 2"},
		{"short-row.csv", ErrBadCSV, 3, 0, "2 cells"},
		{"no-pull-column.csv", ErrBadHeader, 1, 1, "'pull'"},
		{"empty.csv", ErrBadHeader, 0, 0, "empty"},
		{"header-only.csv", ErrNoPulls, 0, 0, "no pulls"},
		{"fractional-count.csv", ErrBadNumber, 2, 6, "whole number"},
		{"empty-label.csv", ErrNoLabel, 2, 1, "label"},
		{"duplicate-column.csv", ErrBadHeader, 1, 16, "twice"},
		{"open-quote.csv", ErrBadCSV, 2, 0, "quote"},
		{"does-not-exist.csv", nil, 0, 0, "cannot read"},
	}
	for _, c := range cases {
		path := "../testdata/bad/" + c.file
		pulls, err := ReadPullsFile(path)
		if err == nil || pulls != nil {
			t.Errorf("%s: accepted (%d pulls)", c.file, len(pulls))
			continue
		}
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Errorf("%s: %T is not an *InputError", c.file, err)
			continue
		}
		if c.want != nil && !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.file, err, c.want)
		}
		if c.line > 0 && ie.Line != c.line || c.col > 0 && ie.Column != c.col {
			t.Errorf("%s: at %d:%d, want %d:%d (%v)", c.file, ie.Line, ie.Column, c.line, c.col, err)
		}
		if !strings.Contains(err.Error(), c.mention) || !strings.Contains(err.Error(), c.file) {
			t.Errorf("%s: message %q should name the file and say %q", c.file, err, c.mention)
		}
	}
}

func TestReadPullsInline(t *testing.T) {
	in := "# comment\npull, pet_clear ,PVC,pvc_count\n A , 10.5,0.25,\nB,9,,3\n"
	pulls, err := ReadPulls(strings.NewReader(in), "inline.csv")
	if err != nil {
		t.Fatal(err)
	}
	pv, _ := CategoryIndex("pvc")
	if pulls[0].Label != "A" || pulls[0].Kg[pv] != 0.25 || pulls[0].Pieces != nil {
		t.Errorf("A: %+v", pulls[0])
	}
	if pulls[1].Kg[pv] != 0 || pulls[1].Pieces[pv] != 3 {
		t.Errorf("B: %+v", pulls[1])
	}
	if got := pulls[0].TotalKg(); math.Abs(got-10.75) > 1e-12 {
		t.Errorf("A total %g", got)
	}
}

func FuzzReadPulls(f *testing.F) {
	f.Add("pull,pet_clear,pvc\nA,10,0.1\n")
	f.Add("pull,pet_clear,pvc_count\nA,1e308,3\nB,1e-300,0\n")
	f.Add("pull,hazard\n\"A\nB\",1\n")
	f.Fuzz(func(t *testing.T, s string) {
		pulls, err := ReadPulls(strings.NewReader(s), "fuzz.csv")
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %v is not an *InputError", err)
			}
			return
		}
		a := Audit{Pulls: pulls}
		if err := a.Validate(); err != nil {
			t.Fatalf("reader accepted pulls the audit refuses: %v", err)
		}
	})
}
