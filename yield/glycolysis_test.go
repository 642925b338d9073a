package yield

import (
	"errors"
	"math"
	"testing"

	"pgregory.net/rapid"
)

// Atomic weights for recomputing check values independently of chem.go.
// Source: IUPAC standard atomic weights (conventional values), as in
// testdata/ref/glycolysis_ref.py; KOH 56.106 g/mol from the same weights.
const (
	tC, tH, tN, tO, tZn = 12.011, 1.008, 14.007, 15.999, 65.38
	tKOH                = 56106.0 // mg/mol, K 39.098 + O + H
)

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

func noCatalyst(pet float64, glycol string, ratio float64) Recipe {
	r := DefaultRecipe(pet, glycol, ratio)
	r.CatalystPct = 0
	return r
}

func TestHydroxylValueOHConservation(t *testing.T) {
	mDEG := 4*tC + 10*tH + 3*tO
	// Computed by our own formula (OH conservation) in
	// yield/testdata/ref/glycolysis_ref.py: PET:DEG 1:0.5, 1:1, 1:2 w/w
	// give 352.47, 528.70, 704.93 mg KOH/g, printed to 0.01.
	for _, c := range []struct{ ratio, published float64 }{{0.5, 352.47}, {1, 528.70}, {2, 704.93}} {
		g, err := Glycolyse(noCatalyst(1, "DEG", c.ratio))
		if err != nil {
			t.Fatal(err)
		}
		recomputed := tKOH * 2 * (c.ratio * 1000 / mDEG) / (1000 * (1 + c.ratio))
		if math.Abs(recomputed-c.published) > 0.005 {
			t.Errorf("1:%g recomputed %.2f vs published %.1f", c.ratio, recomputed, c.published)
		}
		if e := relErr(g.HydroxylValue, recomputed); e > 1e-9 {
			t.Errorf("1:%g OHV %.4f, recomputed %.4f", c.ratio, g.HydroxylValue, recomputed)
		}
		if e := relErr(g.EquivalentWeight*g.HydroxylValue, tKOH); e > 1e-12 {
			t.Errorf("EW × OHV = %g, want 56106", g.EquivalentWeight*g.HydroxylValue)
		}
		// Linear diols: two OH per molecule, so Mn = 2·EW without catalyst.
		if e := relErr(g.Mn, 2*g.EquivalentWeight); e > 1e-12 {
			t.Errorf("Mn %g, 2·EW %g", g.Mn, 2*g.EquivalentWeight)
		}
	}
}

func TestFloryExample(t *testing.T) {
	g, err := Glycolyse(noCatalyst(1, "deg", 1))
	if err != nil {
		t.Fatal(err)
	}
	// Computed by our own formula (Flory's most-probable distribution) in
	// yield/testdata/ref/glycolysis_ref.py: PET:DEG 1:1 w/w, p = 0.3558,
	// number fractions 64.42 / 22.92 / 8.15 % for k = 0, 1, 2.
	if math.Abs(g.Dist.P-0.3558) > 0.00005 {
		t.Errorf("p = %.4f, want 0.3558", g.Dist.P)
	}
	for k, want := range []float64{0.6442, 0.2292, 0.0815} {
		if got := g.Dist.Number[k]; math.Abs(got-want) > 0.00005 {
			t.Errorf("n_%d = %.4f, want %.3f", k, got, want)
		}
	}
	// Source: testdata/ref/glycolysis_ref.py: free glycol 27.45 wt %,
	// monomer 33.58 wt %, Mn 212.242 g/mol.
	if math.Abs(g.Dist.FreeGlycolWt-0.2745) > 0.0001 || math.Abs(g.Dist.MonomerWt-0.3358) > 0.0001 {
		t.Errorf("free glycol %.4f, monomer %.4f wt", g.Dist.FreeGlycolWt, g.Dist.MonomerWt)
	}
	if math.Abs(g.Mn-212.242) > 0.001 {
		t.Errorf("Mn %.3f, want 212.242", g.Mn)
	}
}

// molarMassK is the mass of a molecule with k terephthalate units.
func molarMassK(k int, a, b float64) float64 { return float64(k)*a + float64(k+1)*b }

func TestDistributionInvariants(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		glycol := rapid.SampledFrom([]string{"EG", "DEG", "PG", "DPG"}).Draw(t, "glycol")
		ratio := rapid.Float64Range(0.05, 20).Draw(t, "ratio")
		strip := rapid.Float64Range(0, 1).Draw(t, "strip")
		r := noCatalyst(rapid.Float64Range(0.1, 5000).Draw(t, "pet"), glycol, ratio)
		r.StripEG = strip
		g, err := Glycolyse(r)
		if errors.Is(err, ErrRebuildsPET) {
			t.Skip("stripping rebuilds PET")
		}
		if err != nil {
			t.Fatal(err)
		}
		// Source: common practice (probability distributions sum to 1).
		var sn, sw float64
		for k := range g.Dist.Number {
			sn += g.Dist.Number[k]
			sw += g.Dist.Weight[k]
		}
		if math.Abs(sn-1) > 1e-12 || math.Abs(sw-1) > 1e-12 {
			t.Fatalf("Σn = %.15f, Σw = %.15f", sn, sw)
		}
		// Mn equals total mass over molecules, and also Σ n_k·M_k
		// summed far into the tail. Source: definition of Mn (common practice).
		organic := (g.ConvertedPETKg + g.GlycolKg - g.StrippedEGKg) * 1000
		if e := relErr(g.Mn, organic/g.Molecules); e > 1e-12 {
			t.Fatalf("Mn %g, mass/molecules %g", g.Mn, organic/g.Molecules)
		}
		p := g.Dist.P
		nT := g.Molecules * p / (1 - p)
		b := (organic - nT*MolarMassTerephthaloyl) / (g.Molecules + nT)
		// Sum until p^k is below 1e-17 so the truncated tail cannot
		// show as an error (p near 1 needs tens of thousands of terms).
		terms := max(5000, int(math.Ceil(-40/math.Log(p))))
		sum := 0.0
		for k := range terms {
			sum += (1 - p) * math.Pow(p, float64(k)) * molarMassK(k, MolarMassTerephthaloyl, b)
		}
		if e := relErr(sum, g.Mn); e > 1e-9 {
			t.Fatalf("Σ n_k M_k = %g, Mn = %g (p = %g)", sum, g.Mn, p)
		}
	})
}

func TestMonomerShareBoundsIsolatedBHETYield(t *testing.T) {
	g, err := Glycolyse(noCatalyst(1, "EG", 3))
	if err != nil {
		t.Fatal(err)
	}
	// Source: Mendiburu-Valor et al., Polymers 13 (2021) 1461: PET:EG 1:3
	// w/w, Zn(OAc)2, 180–220 °C, isolated BHET yield 55–71 %. An isolated
	// yield cannot exceed the equilibrium monomer content.
	if g.Dist.MonomerYield < 0.71 {
		t.Errorf("equilibrium monomer share %.3f is below the isolated BHET yield 0.71", g.Dist.MonomerYield)
	}
	if got := g.Dist.TerephthalateShare(1); math.Abs(got-g.Dist.MonomerYield) > 1e-15 {
		t.Errorf("TerephthalateShare(1) %g ≠ MonomerYield %g", got, g.Dist.MonomerYield)
	}
	// Source: testdata/ref/glycolysis_ref.py: 0.8151.
	if math.Abs(g.Dist.MonomerYield-0.8151) > 0.0001 {
		t.Errorf("monomer share %.4f, want 0.8151", g.Dist.MonomerYield)
	}
}

func TestLargeEGExcessGivesMonomerAndDimer(t *testing.T) {
	g, err := Glycolyse(noCatalyst(1, "EG", 10))
	if err != nil {
		t.Fatal(err)
	}
	// Source: Baliga & Wong, J. Polym. Sci. A 27 (1989) 2071: with a large
	// EG excess the equilibrium product is essentially BHET plus dimer.
	inMonoDi := g.Dist.TerephthalateShare(1) + g.Dist.TerephthalateShare(2)
	if inMonoDi < 0.99 {
		t.Errorf("terephthalate in monomer + dimer %.4f, want ≥ 0.99", inMonoDi)
	}
	oligomers := 1 - g.Dist.FreeGlycolWt
	if (g.Dist.Weight[1]+g.Dist.Weight[2])/oligomers < 0.99 {
		t.Errorf("monomer + dimer are %.4f of the non-glycol weight", (g.Dist.Weight[1]+g.Dist.Weight[2])/oligomers)
	}
}

func TestMoreGlycolRaisesOHVLowersMn(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		glycol := rapid.SampledFrom([]string{"EG", "DEG", "PG", "DPG", "glycerol"}).Draw(t, "glycol")
		r1 := rapid.Float64Range(0.05, 10).Draw(t, "r1")
		r2 := r1 * rapid.Float64Range(1.01, 3).Draw(t, "factor")
		a, err := Glycolyse(DefaultRecipe(1, glycol, r1))
		if err != nil {
			t.Fatal(err)
		}
		b, err := Glycolyse(DefaultRecipe(1, glycol, r2))
		if err != nil {
			t.Fatal(err)
		}
		// Source: common practice (more glycol, more chain ends).
		if !(b.HydroxylValue > a.HydroxylValue) || !(b.Mn < a.Mn) {
			t.Fatalf("ratio %g → %g: OHV %g → %g, Mn %g → %g", r1, r2, a.HydroxylValue, b.HydroxylValue, a.Mn, b.Mn)
		}
	})
}

func TestStrippingLowersOHV(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		glycol := rapid.SampledFrom([]string{"DEG", "DPG", "PG", "glycerol"}).Draw(t, "glycol")
		ratio := rapid.Float64Range(0.5, 5).Draw(t, "ratio")
		s := rapid.Float64Range(0.01, 1).Draw(t, "strip")
		r := DefaultRecipe(1, glycol, ratio)
		a, err := Glycolyse(r)
		if err != nil {
			t.Fatal(err)
		}
		r.StripEG = s
		b, err := Glycolyse(r)
		if errors.Is(err, ErrRebuildsPET) {
			t.Skip()
		}
		if err != nil {
			t.Fatal(err)
		}
		// Computed: stripping removes 2 equivalents per 62.07 g of EG, more
		// OH than mass in any product whose equivalent weight exceeds
		// 31 g/eq.
		if !(b.HydroxylValue < a.HydroxylValue) || !(b.Mn > a.Mn) {
			t.Fatalf("strip %g: OHV %g → %g, Mn %g → %g", s, a.HydroxylValue, b.HydroxylValue, a.Mn, b.Mn)
		}
	})
}

func TestMolarRatioMatchesMassRatio(t *testing.T) {
	mPET := 10*tC + 8*tH + 4*tO
	mPG := 3*tC + 8*tH + 2*tO
	a, err := Glycolyse(DefaultRecipe(2, "PG", 1.5))
	if err != nil {
		t.Fatal(err)
	}
	r := DefaultRecipe(2, "pg", 1.5*mPET/mPG)
	r.Molar = true
	b, err := Glycolyse(r)
	if err != nil {
		t.Fatal(err)
	}
	// Source: common practice (mole ratio = mass ratio × M_PET / M_glycol).
	if relErr(a.HydroxylValue, b.HydroxylValue) > 1e-12 || relErr(a.GlycolKg, b.GlycolKg) > 1e-12 {
		t.Errorf("mass ratio OHV %g, molar ratio OHV %g", a.HydroxylValue, b.HydroxylValue)
	}
}

func TestCatalystMetalAndPVCAcid(t *testing.T) {
	r := DefaultRecipe(1, "DEG", 1)
	r.PVCKg = 0.01
	g, err := Glycolyse(r)
	if err != nil {
		t.Fatal(err)
	}
	// Source: testdata/ref/glycolysis_ref.py: 0.5 wt % anhydrous zinc
	// acetate on 1 kg PET, DEG 1:1 → 888.7 ppm Zn.
	zn := 5 * tZn / (tZn + 2*(2*tC+3*tH+2*tO)) / 2005 * 1e6
	if math.Abs(g.MetalPPM-zn) > 1e-9 || math.Abs(zn-888.7) > 0.1 {
		t.Errorf("Zn %.2f ppm, recomputed %.2f", g.MetalPPM, zn)
	}
	// Computed from IUPAC atomic weights in
	// yield/testdata/ref/glycolysis_ref.py: 1 g PVC (C2H3Cl) can release
	// 0.5834 g HCl.
	if math.Abs(g.HClKg/r.PVCKg-0.5834) > 0.00005 {
		t.Errorf("HCl per PVC %.4f, want 0.5834", g.HClKg/r.PVCKg)
	}
	wantAV := tKOH * (10 / (2*tC + 3*tH + 35.45)) / 2005
	if relErr(g.AcidValuePVC, wantAV) > 1e-9 || len(g.Warnings) == 0 {
		t.Errorf("acid value %g, want %g; warnings %q", g.AcidValuePVC, wantAV, g.Warnings)
	}
	// The catalyst counts in the product mass: OHV falls by 2000/2005.
	// Source: common practice (mass balance).
	if relErr(g.HydroxylValue, 528.6984*2000/2005) > 1e-6 {
		t.Errorf("OHV with catalyst %g", g.HydroxylValue)
	}
}

func TestChainEndsAddHydroxyl(t *testing.T) {
	r := noCatalyst(1, "DEG", 1)
	a, _ := Glycolyse(r)
	r.PETMn = 20000
	b, err := Glycolyse(r)
	if err != nil {
		t.Fatal(err)
	}
	// Each chain adds two OH: OH eq rises by 2·1000/20000 = 0.1 mol.
	// Source: from memory (HO-terminated PET chains), computed here.
	if math.Abs(b.OHEquivalents-a.OHEquivalents-0.1) > 1e-12 {
		t.Errorf("OH eq %g → %g, want +0.1", a.OHEquivalents, b.OHEquivalents)
	}
}

func TestGlycerolIsBranched(t *testing.T) {
	g, err := Glycolyse(noCatalyst(1, "Glycerol", 0.5))
	if err != nil {
		t.Fatal(err)
	}
	mGly := 3*tC + 8*tH + 3*tO
	// Common practice (textbook polyurethane arithmetic, OHV =
	// 56.1·1000·f/M), f = 3; recomputed here.
	want := tKOH * 3 * (500 / mGly) / 1500
	if relErr(g.HydroxylValue, want) > 1e-9 {
		t.Errorf("OHV %g, want %g", g.HydroxylValue, want)
	}
	if len(g.Dist.Number) != 0 || len(g.Warnings) == 0 {
		t.Errorf("branched product got a linear distribution or no warning")
	}
}

func TestRecipeErrors(t *testing.T) {
	base := func() Recipe { return DefaultRecipe(1, "DEG", 1) }
	cases := []struct {
		name  string
		edit  func(*Recipe)
		err   error
		field string
	}{
		{"zero ratio", func(r *Recipe) { r.Ratio = 0 }, ErrOutOfRange, "glycol_ratio"},
		{"negative ratio", func(r *Recipe) { r.Ratio = -1 }, ErrOutOfRange, "glycol_ratio"},
		{"NaN ratio", func(r *Recipe) { r.Ratio = math.NaN() }, ErrBadNumber, "glycol_ratio"},
		{"conversion above 1", func(r *Recipe) { r.Conversion = 1.2 }, ErrOutOfRange, "conversion"},
		{"conversion 0", func(r *Recipe) { r.Conversion = 0 }, ErrOutOfRange, "conversion"},
		{"unknown glycol", func(r *Recipe) { r.Glycol = "butanediol" }, ErrUnknownGlycol, "glycol"},
		{"strip above 1", func(r *Recipe) { r.StripEG = 2 }, ErrOutOfRange, "strip_eg"},
		{"mass and ratio", func(r *Recipe) { r.GlycolKg = 1 }, ErrBadCharge, "glycol_kg"},
		{"PET NaN", func(r *Recipe) { r.PETKg = math.NaN() }, ErrBadNumber, "pet_kg"},
		{"strip rebuilds PET", func(r *Recipe) { r.Glycol, r.Ratio, r.StripEG = "DEG", 0.1, 1 }, ErrRebuildsPET, "strip_eg"},
		{"catalyst unknown", func(r *Recipe) { r.Catalyst = "tin" }, ErrUnknownKey, "catalyst"},
	}
	for _, c := range cases {
		r := base()
		c.edit(&r)
		_, err := Glycolyse(r)
		var fe *FieldError
		if !errors.Is(err, c.err) || !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%s: got %v, want %v on field %s", c.name, err, c.err, c.field)
		}
	}
}

func TestUndissolvedPETLeavesAsSolid(t *testing.T) {
	r := noCatalyst(1, "DEG", 1)
	r.Conversion = 0.8
	g, err := Glycolyse(r)
	if err != nil {
		t.Fatal(err)
	}
	// Source: common practice (mass balance of the reactor).
	if math.Abs(g.UndissolvedPETKg-0.2) > 1e-12 || math.Abs(g.GlycolysateKg-1.8) > 1e-12 {
		t.Errorf("undissolved %g, glycolysate %g", g.UndissolvedPETKg, g.GlycolysateKg)
	}
}
