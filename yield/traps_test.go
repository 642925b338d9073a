package yield

import (
	"errors"
	"strings"
	"testing"
)

func TestIndexFactorOfTenTraps(t *testing.T) {
	// An index below 50 or above 500 is refused with the likely meaning
	// (common practice: indices run about 90–350).
	cases := map[float64]string{1.05: "did you mean 105?", 10.5: "did you mean 105?", 1050: "did you mean 105?", 10500: "did you mean 105?", 3: "did you mean 300?"}
	for index, want := range cases {
		_, err := MixBlend(Blend{Polyols: []Polyol{Castor(10)}, NCOPct: 31, Index: index})
		if !errors.Is(err, ErrOutOfRange) || !strings.Contains(err.Error(), want) {
			t.Errorf("index %g: %v, want %q", index, err, want)
		}
	}
	for _, index := range []float64{50, 105, 500} {
		if _, err := MixBlend(Blend{Polyols: []Polyol{Castor(10)}, NCOPct: 31, Index: index}); err != nil {
			t.Errorf("index %g refused: %v", index, err)
		}
	}
}

func TestMessagesCarryNoPackagePrefix(t *testing.T) {
	r := DefaultRecipe(1, "DEG", 0)
	_, err := Glycolyse(r)
	if !errors.Is(err, ErrOutOfRange) || err.Error() != "glycol ratio must be above 0 (got 0)" {
		t.Errorf("got %q", err)
	}
	r = DefaultRecipe(1, "DEG", 1)
	r.Conversion = 95
	if _, err := Glycolyse(r); err == nil || err.Error() != "conversion is 95, outside 0–1; give a fraction (0.95, not 95)" {
		t.Errorf("got %v", err)
	}
	if _, err := LookupGlycol("XEG"); err == nil || strings.HasPrefix(err.Error(), "yield") {
		t.Errorf("got %v", err)
	}
}

func TestPresetsAndCautions(t *testing.T) {
	p, err := LookupIsocyanate("pmdi")
	if err != nil || p.NCOPct != 31 {
		t.Fatalf("PMDI preset: %+v %v", p, err)
	}
	// Monomeric MDI from its formula C15H10N2O2: 2 × 42.017 / 250.26 =
	// 33.58 % NCO (computed from IUPAC atomic weights).
	m, _ := LookupIsocyanate("MDI")
	if m.NCOPct < 33.5 || m.NCOPct > 33.65 {
		t.Errorf("MDI %g %% NCO", m.NCOPct)
	}
	if c := CautionIsocyanateFor("PMDI"); !strings.Contains(c, "MDI: OSHA") || strings.Contains(c, "TDI") {
		t.Errorf("MDI run shows %q", c)
	}
	if c := CautionIsocyanateFor("TDI"); !strings.Contains(c, "2,4-TDI") {
		t.Errorf("TDI run shows %q", c)
	}
	pg, _ := LookupGlycol("PG")
	c := CautionHotGlycolFor(pg)
	if !strings.Contains(c, "flash point of 1,2-propylene glycol (about 99 °C)") || strings.Contains(c, "DEG") || !strings.Contains(c, ReactorTempRange) {
		t.Errorf("PG caution %q", c)
	}
	deg, _ := LookupGlycol("DEG")
	if c := CautionHotGlycolFor(deg); !strings.Contains(c, "auto-ignition") || !strings.Contains(c, "sodium hydroxide") {
		t.Errorf("DEG caution %q", c)
	}
}
