package yield

import (
	"baleassay/assess"
	"fmt"
)

// Recipe is one glycolysis charge: PET flake, a glycol, a catalyst and
// how far the reaction and the stripping go. Start from DefaultRecipe so
// the defaults are set; the zero value is not a valid recipe.
type Recipe struct {
	// PETKg is the PET charged, kg (the PET categories of the flake).
	PETKg float64
	// Glycol is a key of the glycol catalogue (case-insensitive).
	Glycol string
	// Give either GlycolKg, or Ratio: glycol to PET by mass, or with
	// Molar set, moles of glycol per mole of PET repeat units.
	GlycolKg float64
	Ratio    float64
	Molar    bool
	// Conversion is the share of the PET that dissolves, in (0, 1]; the
	// rest leaves as a solid. DefaultRecipe sets 1 (complete).
	Conversion float64
	// StripEG is the share, 0–1, of the ethylene glycol liberated from
	// the PET that a still removes.
	StripEG float64
	// Catalyst is a catalyst key ("" for DefaultCatalyst) and
	// CatalystPct its loading in wt % of the PET charged.
	Catalyst    string
	CatalystPct float64
	// PETMn is the PET's number-average molar mass in g/mol, to count its
	// hydroxyl chain ends; 0 neglects them.
	PETMn float64
	// PVCKg is residual PVC carried in with the flake, InertKg the other
	// non-PET solids (polyolefins, paper, metal), filtered off the
	// product.
	PVCKg   float64
	InertKg float64
}

// DefaultRecipe returns a recipe for petKg of PET with glycol at ratio
// (by mass), complete conversion, no stripping and 0.5 wt % zinc acetate.
func DefaultRecipe(petKg float64, glycol string, ratio float64) Recipe {
	return Recipe{PETKg: petKg, Glycol: glycol, Ratio: ratio, Conversion: 1,
		Catalyst: DefaultCatalyst, CatalystPct: DefaultCatalystPct}
}

// charge is the mole and mass bookkeeping of one recipe, in grams and
// moles, with no slices so that it can be evaluated without allocating.
type charge struct {
	glycol    Glycol
	cat       Catalyst
	petG      float64 // PET charged
	convG     float64 // PET dissolved
	glycolG   float64
	strippedG float64 // EG taken off by the still
	catalystG float64
	nT        float64 // terephthalate units, mol
	nChains   float64 // PET chains (extra glycol ends), mol
	nGlycol   float64 // glycol charged, mol
	nStripped float64 // EG stripped, mol
	units     float64 // glycol units in the product, mol (N_G)
	oh        float64 // hydroxyl equivalents, mol
	molecules float64 // N_G − N_T, mol
	organicG  float64 // oligomer mixture without catalyst
	productG  float64 // glycolysate including catalyst
}

// validate checks the recipe and resolves its keys.
func (r Recipe) validate() (Glycol, Catalyst, error) {
	const where = "glycolysis"
	g, err := LookupGlycol(r.Glycol)
	if err != nil {
		return g, Catalyst{}, err
	}
	if err := checkPositive(where, "pet_kg", r.PETKg); err != nil {
		return g, Catalyst{}, err
	}
	switch {
	case r.GlycolKg != 0 && r.Ratio != 0:
		return g, Catalyst{}, fieldErr(where, "glycol_kg", ErrBadCharge, "give the glycol as a mass or as a ratio, not both")
	case r.GlycolKg != 0:
		if err := checkPositive(where, "glycol_kg", r.GlycolKg); err != nil {
			return g, Catalyst{}, err
		}
	default:
		if err := checkPositive(where, "glycol_ratio", r.Ratio); err != nil {
			return g, Catalyst{}, err
		}
	}
	if err := checkFraction(where, "conversion", r.Conversion); err != nil {
		return g, Catalyst{}, err
	}
	if r.Conversion == 0 {
		return g, Catalyst{}, fieldErr(where, "conversion", ErrOutOfRange, "0 dissolves no PET; give the dissolved share in (0, 1], 1 for complete")
	}
	if err := checkFraction(where, "strip_eg", r.StripEG); err != nil {
		return g, Catalyst{}, err
	}
	if err := checkNonNegative(where, "catalyst_pct", r.CatalystPct); err != nil {
		return g, Catalyst{}, err
	}
	if r.CatalystPct > 10 {
		return g, Catalyst{}, fieldErr(where, "catalyst_pct", ErrOutOfRange, "%s wt %% of PET is far above practice (0.5–1); give a percentage of the PET mass", assess.Plain(r.CatalystPct))
	}
	ck := r.Catalyst
	if ck == "" {
		ck = DefaultCatalyst
	}
	cat, err := LookupCatalyst(ck)
	if err != nil {
		return g, cat, err
	}
	if err := checkNonNegative(where, "pet_mn", r.PETMn); err != nil {
		return g, cat, err
	}
	if r.PETMn > 0 && r.PETMn < MolarMassPETUnit+MolarMassEG {
		return g, cat, fieldErr(where, "pet_mn", ErrOutOfRange, "%s g/mol is below one repeat unit with its end group; bottle PET is about 20,000–30,000", assess.Plain(r.PETMn))
	}
	if err := checkNonNegative(where, "pvc_kg", r.PVCKg); err != nil {
		return g, cat, err
	}
	if err := checkNonNegative(where, "inert_kg", r.InertKg); err != nil {
		return g, cat, err
	}
	return g, cat, nil
}

// newCharge does the bookkeeping of a validated recipe. Transesterification
// conserves hydroxyl groups; with N_T terephthalate units, N_c PET chains
// of number-average molar mass Mn (N_c = 0 when Mn is not given), n_G
// moles of a glycol of functionality f and n_s moles of EG stripped:
//
//	N_T = (m_PET − N_c·M_EG) / M_unit,     N_c = m_PET / Mn
//	N_G = N_T + N_c + n_G − n_s            glycol units
//	OH  = f·n_G + 2·N_c − 2·n_s            equivalents
//	molecules = N_G − N_T                  (no rings)
//
// Source: OH conservation through transesterification (computed);
// molecules = units − bonds holds for any ring-free product.
func newCharge(r Recipe, g Glycol, cat Catalyst) charge {
	c := charge{glycol: g, cat: cat}
	c.petG = r.PETKg * 1000
	c.convG = c.petG * r.Conversion
	if r.PETMn > 0 {
		c.nChains = c.convG / r.PETMn
	}
	c.nT = (c.convG - c.nChains*MolarMassEG) / MolarMassPETUnit
	switch {
	case r.GlycolKg != 0:
		c.glycolG = r.GlycolKg * 1000
	case r.Molar:
		c.glycolG = r.Ratio * (c.petG / MolarMassPETUnit) * g.MolarMass
	default:
		c.glycolG = r.Ratio * c.petG
	}
	c.nGlycol = c.glycolG / g.MolarMass
	c.nStripped = r.StripEG * (c.nT + c.nChains)
	c.strippedG = c.nStripped * MolarMassEG
	c.catalystG = r.CatalystPct / 100 * c.petG
	c.units = c.nT + c.nChains + c.nGlycol - c.nStripped
	c.oh = float64(g.Functionality)*c.nGlycol + 2*c.nChains - 2*c.nStripped
	c.molecules = c.units - c.nT
	c.organicG = c.convG + c.glycolG - c.strippedG
	c.productG = c.organicG + c.catalystG
	return c
}

func (c charge) ok() error {
	if !(c.molecules > 0) || !(c.oh > 0) {
		return fieldErr("glycolysis", "strip_eg", ErrRebuildsPET,
			"stripping %s mol EG against %s mol glycol charged leaves no free chain ends (PET would re-form); strip less or charge more glycol", assess.Sig(c.nStripped, 3), assess.Sig(c.nGlycol, 3))
	}
	return nil
}

// hydroxylValue in mg KOH/g of the glycolysate (catalyst included):
//
//	OHV = 56106 · OH / m_product
func (c charge) hydroxylValue() float64 { return mgKOH * c.oh / c.productG }

// Glycolysate is the product of one recipe.
type Glycolysate struct {
	Recipe   Recipe
	Glycol   Glycol
	Catalyst Catalyst
	// Masses in kg.
	PETKg, ConvertedPETKg, UndissolvedPETKg float64
	GlycolKg, StrippedEGKg, CatalystKg      float64
	InertSolidsKg                           float64 // non-PET solids filtered off
	GlycolysateKg                           float64 // oligomers + catalyst
	// HydroxylValue in mg KOH/g; EquivalentWeight in g per OH equivalent
	// (56106 / OHV); Mn number-average molar mass of the oligomer mixture
	// in g/mol (catalyst excluded).
	HydroxylValue, EquivalentWeight, Mn float64
	// OHEquivalents and Molecules in mol.
	OHEquivalents, Molecules float64
	// Dist is the chain-length distribution; empty for a branched glycol.
	Dist Distribution
	// MetalPPM is catalyst metal in the glycolysate, mg/kg.
	MetalPPM float64
	// HClKg and AcidValuePVC: hydrogen chloride residual PVC can release
	// and the acid value it adds, mg KOH/g.
	HClKg, AcidValuePVC float64
	Warnings            []string
}

// Glycolyse computes the glycolysate of a recipe: masses, hydroxyl value
// by OH conservation, equivalent weight, Mn, and for linear glycols the
// most-probable chain-length distribution. Residual PVC is counted as
// fully dehydrochlorinated (1 HCl per C2H3Cl unit), the worst case.
func Glycolyse(r Recipe) (Glycolysate, error) {
	g, cat, err := r.validate()
	if err != nil {
		return Glycolysate{}, err
	}
	c := newCharge(r, g, cat)
	if err := c.ok(); err != nil {
		return Glycolysate{}, err
	}
	out := Glycolysate{
		Recipe: r, Glycol: g, Catalyst: cat,
		PETKg: r.PETKg, ConvertedPETKg: c.convG / 1000, UndissolvedPETKg: (c.petG - c.convG) / 1000,
		GlycolKg: c.glycolG / 1000, StrippedEGKg: c.strippedG / 1000, CatalystKg: c.catalystG / 1000,
		InertSolidsKg: r.InertKg, GlycolysateKg: c.productG / 1000,
		HydroxylValue: c.hydroxylValue(), OHEquivalents: c.oh, Molecules: c.molecules,
		Mn: c.organicG / c.molecules,
	}
	out.EquivalentWeight = mgKOH / out.HydroxylValue
	out.MetalPPM = c.catalystG * cat.MetalMass / cat.MolarMass / c.productG * 1e6
	nHCl := r.PVCKg * 1000 / MolarMassPVCUnit
	out.HClKg = nHCl * MolarMassHCl / 1000
	out.AcidValuePVC = mgKOH * nHCl / c.productG
	if g.Branched() {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%s has %d OH groups: the product is branched, so the linear chain-length distribution is not given; hydroxyl value and Mn still hold (no rings assumed)", g.Name, g.Functionality))
	} else {
		mg := (c.organicG - c.nT*MolarMassTerephthaloyl) / c.units
		out.Dist = flory(c.nT/c.units, MolarMassTerephthaloyl, mg)
	}
	if r.PVCKg > 0 {
		out.Warnings = append(out.Warnings, fmt.Sprintf("residual PVC %s kg can release %s kg HCl (acid value +%.2f mg KOH/g): HCl corrodes the reactor and breaks PET chains; remove PVC before the reactor", assess.Sig(r.PVCKg, 3), assess.Sig(out.HClKg, 3), out.AcidValuePVC))
	}
	if r.StripEG > 0 && g.Key != "EG" && g.BoilingC < glycols[0].BoilingC {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%s boils below EG (%.0f vs %.0f °C): a still takes it first, while the model assumes only EG leaves", g.Key, g.BoilingC, glycols[0].BoilingC))
	}
	if r.StripEG > 0 && g.Key == "EG" {
		out.Warnings = append(out.Warnings, "the charged glycol is EG: stripping is counted against the EG liberated from the PET only")
	}
	if out.Dist.LongOligomerWt > LongOligomerCaution {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%.0f wt %% of the product has %d or more terephthalate units: it may turn cloudy and crystallise on cooling; more glycol or more time is needed", 100*out.Dist.LongOligomerWt, LongOligomerUnits))
	}
	return out, nil
}
