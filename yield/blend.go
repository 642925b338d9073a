package yield

import (
	"baleassay/assess"
	"fmt"
	"math"
	"strings"
)

// Polyol is one polyol of a blend.
type Polyol struct {
	Name string
	// HydroxylValue in mg KOH/g, Kg the mass in the blend.
	HydroxylValue, Kg float64
	// PETShare is the mass share of the polyol that came from recycled
	// PET, 0–1 (0 for virgin polyols).
	PETShare float64
}

// CastorOHV is the illustrative hydroxyl value of castor oil, mg KOH/g:
// the middle of the USP range 160–168 (from memory), above the Ph. Eur.
// minimum of 160 for virgin castor oil and below the 180 of pure
// triricinolein (M 933.45 g/mol, f = 3: 3·56106/933.45, computed).
const CastorOHV = 164

// Castor returns kg of castor oil at CastorOHV.
func Castor(kg float64) Polyol { return Polyol{Name: "castor oil", HydroxylValue: CastorOHV, Kg: kg} }

// AsPolyol returns the glycolysate as a blend component. Its recycled-PET
// share is the PET that dissolved, less the EG stripped from it, over
// the glycolysate mass.
func (g Glycolysate) AsPolyol() Polyol {
	return Polyol{Name: "glycolysate", HydroxylValue: g.HydroxylValue, Kg: g.GlycolysateKg, PETShare: g.RecycledPETShare()}
}

// RecycledPETShare is the mass share of the glycolysate that came from
// the PET: (dissolved PET − stripped EG) / glycolysate.
func (g Glycolysate) RecycledPETShare() float64 {
	if g.GlycolysateKg <= 0 {
		return 0
	}
	return (g.ConvertedPETKg - g.StrippedEGKg) / g.GlycolysateKg
}

// ParsePolyol reads a polyol given on the command line as OHV:KG or
// OHV:KG:PET (PET the recycled-PET mass share, 0–1), or castor:KG.
func ParsePolyol(s string, n int) (Polyol, error) {
	where := fmt.Sprintf("polyol %d (%q)", n, s)
	parts := strings.Split(s, ":")
	if len(parts) < 2 || len(parts) > 3 {
		return Polyol{}, fieldErr(where, "polyol", ErrBadBlend, "write OHV:KG, OHV:KG:PET_SHARE or castor:KG, e.g. 350:40:0.5")
	}
	num := func(field, v string) (float64, error) {
		f, err := assess.ParseDecimal(strings.TrimSpace(v))
		if err != nil || !finite(f) {
			return 0, fieldErr(where, field, ErrBadNumber, "%q is not a number", v)
		}
		return f, nil
	}
	kg, err := num("kg", parts[1])
	if err != nil {
		return Polyol{}, err
	}
	var p Polyol
	if strings.EqualFold(strings.TrimSpace(parts[0]), "castor") {
		p = Castor(kg)
	} else {
		ohv, err := num("hydroxyl_value", parts[0])
		if err != nil {
			return Polyol{}, err
		}
		p = Polyol{Name: fmt.Sprintf("polyol %d", n), HydroxylValue: ohv, Kg: kg}
	}
	if len(parts) == 3 {
		if p.PETShare, err = num("pet_share", parts[2]); err != nil {
			return Polyol{}, err
		}
	}
	return p, p.validate(where)
}

func (p Polyol) validate(where string) error {
	if err := checkPositive(where, "hydroxyl_value", p.HydroxylValue); err != nil {
		return err
	}
	if p.HydroxylValue > 2000 {
		return fieldErr(where, "hydroxyl_value", ErrOutOfRange, "%s mg KOH/g is above any polyol (glycerol is about 1830); give the hydroxyl value in mg KOH/g", assess.Plain(p.HydroxylValue))
	}
	if err := checkNonNegative(where, "kg", p.Kg); err != nil {
		return err
	}
	return checkFraction(where, "pet_share", p.PETShare)
}

// Isocyanate is an isocyanate preset.
type Isocyanate struct {
	Key, Name string
	MolarMass float64 // g/mol; 0 for a mixture (polymeric MDI)
	NCOPct    float64 // NCO content, mass %
}

func isocyanate(key, name string, c, h, n, o float64) Isocyanate {
	m := c*atomC + h*atomH + n*atomN + o*atomO
	return Isocyanate{key, name, m, 100 * 2 * MolarMassNCO / m}
}

// Isocyanates are the presets: 2,4-TDI (C9H6N2O2) and monomeric
// 4,4'-MDI (C15H10N2O2), both with two NCO groups and NCO contents from
// their formulas (48.25 % and 33.6 %), and polymeric MDI, a mixture with
// no single formula, at a typical 31 % NCO (from memory: grades run about
// 30.5–32 %; give a grade's own figure with --isocyanate-nco).
var Isocyanates = []Isocyanate{
	isocyanate("TDI", "2,4-toluene diisocyanate", 9, 6, 2, 2),
	isocyanate("MDI", "4,4'-diphenylmethane diisocyanate (monomeric)", 15, 10, 2, 2),
	{Key: "PMDI", Name: "polymeric MDI (typical grade, 31 % NCO, from memory)", NCOPct: 31},
}

// LookupIsocyanate finds a preset by key, ignoring case.
func LookupIsocyanate(key string) (Isocyanate, error) {
	for _, i := range Isocyanates {
		if strings.EqualFold(i.Key, strings.TrimSpace(key)) {
			return i, nil
		}
	}
	return Isocyanate{}, fieldErr("", "isocyanate", ErrUnknownKey, "%q is not a preset; use TDI, MDI or PMDI, or give the NCO content in %%", key)
}

// Blend is a polyol blend and its isocyanate.
type Blend struct {
	Polyols []Polyol
	// NCOPct is the isocyanate's NCO content in mass %, Index the
	// isocyanate index, WaterKg the water added as blowing agent.
	NCOPct, Index, WaterKg float64
	// TargetPETShare, when above 0, scales the PET-free polyols together
	// (keeping their proportions) so that the blend's recycled-PET share
	// meets it; the PET-bearing polyols keep their mass.
	TargetPETShare float64
}

// BlendResult is the blend's arithmetic.
type BlendResult struct {
	Polyols []Polyol // after scaling to the target share
	// BlendKg, hydroxyl value (mg KOH/g) and equivalent weight (g/eq).
	BlendKg, HydroxylValue, EquivalentWeight float64
	// Equivalents in mol: OH of the polyols, water (2 per mole), NCO.
	OHEquivalents, WaterEquivalents, NCOEquivalents float64
	// NCOEquivalentWeight in g/eq, IsocyanateKg the isocyanate needed.
	NCOEquivalentWeight, IsocyanateKg float64
	// RecycledPETKg, its share of the blend and of the whole formulation
	// (polyols + water + isocyanate).
	RecycledPETKg, RecycledPETShare, FormulationKg, FormulationPETShare float64
	Warnings                                                            []string
}

// FoamPETShareCaution is the recycled-PET share of a polyol blend above
// which MixBlend warns: about 10–15 % still gives good foam (common
// practice); the upper end is used.
const FoamPETShareCaution = 0.15

// MixBlend computes a polyol blend and its isocyanate demand:
//
//	OHV_blend = Σ m_i·OHV_i / Σ m_i,          EW = 56106 / OHV
//	OH eq = Σ m_i·OHV_i / 56106,  water eq = 2·m_w / 18.015
//	EW(NCO) = 100·M(NCO) / %NCO   (= 4202 / %NCO)
//	m_iso = index/100 · (OH eq + water eq) · EW(NCO)
//
// Textbook polyurethane arithmetic (common practice), with KOH 56.106
// g/mol and 100·M(NCO) = 4201.7 from IUPAC atomic weights. Acid groups
// and amines are not counted.
func MixBlend(b Blend) (BlendResult, error) {
	const where = "blend"
	if len(b.Polyols) == 0 {
		return BlendResult{}, fieldErr(where, "polyol", ErrBadBlend, "give at least one polyol as OHV:KG")
	}
	for i, p := range b.Polyols {
		if err := p.validate(fmt.Sprintf("polyol %d", i+1)); err != nil {
			return BlendResult{}, err
		}
	}
	if err := checkPositive(where, "isocyanate_nco", b.NCOPct); err != nil {
		return BlendResult{}, err
	}
	if b.NCOPct >= 60 {
		return BlendResult{}, fieldErr(where, "isocyanate_nco", ErrOutOfRange, "%s %% NCO is above any isocyanate (TDI 48.3 %%); give the NCO content in mass %%", assess.Plain(b.NCOPct))
	}
	if err := checkPositive(where, "index", b.Index); err != nil {
		return BlendResult{}, err
	}
	if b.Index < MinIndex || b.Index > MaxIndex {
		msg := fmt.Sprintf("is %s, outside %s–%s; the index is 100 × NCO / (OH + water) equivalents, usually 90–350", assess.Plain(b.Index), assess.Plain(float64(MinIndex)), assess.Plain(float64(MaxIndex)))
		if s := suggestIndex(b.Index); s > 0 {
			msg += fmt.Sprintf(": did you mean %s?", assess.Plain(s))
		}
		return BlendResult{}, fieldErr(where, "index", ErrOutOfRange, "%s", msg)
	}
	if err := checkNonNegative(where, "water_kg", b.WaterKg); err != nil {
		return BlendResult{}, err
	}
	if err := checkFraction(where, "target_pet_share", b.TargetPETShare); err != nil {
		return BlendResult{}, err
	}
	polyols := append([]Polyol(nil), b.Polyols...)
	if b.TargetPETShare > 0 {
		if err := scaleToShare(polyols, b.TargetPETShare); err != nil {
			return BlendResult{}, err
		}
	}
	r := BlendResult{Polyols: polyols}
	for _, p := range polyols {
		r.BlendKg += p.Kg
		r.OHEquivalents += p.Kg * 1000 * p.HydroxylValue / mgKOH
		r.RecycledPETKg += p.Kg * p.PETShare
	}
	if r.BlendKg <= 0 {
		return BlendResult{}, fieldErr(where, "kg", ErrBadBlend, "the polyols weigh nothing; give their masses in kg")
	}
	r.HydroxylValue = mgKOH * r.OHEquivalents / (r.BlendKg * 1000)
	r.EquivalentWeight = mgKOH / r.HydroxylValue
	r.WaterEquivalents = 2 * b.WaterKg * 1000 / MolarMassWater
	r.NCOEquivalentWeight = 100 * MolarMassNCO / b.NCOPct
	r.NCOEquivalents = b.Index / 100 * (r.OHEquivalents + r.WaterEquivalents)
	r.IsocyanateKg = r.NCOEquivalents * r.NCOEquivalentWeight / 1000
	r.RecycledPETShare = r.RecycledPETKg / r.BlendKg
	r.FormulationKg = r.BlendKg + b.WaterKg + r.IsocyanateKg
	r.FormulationPETShare = r.RecycledPETKg / r.FormulationKg
	if r.RecycledPETShare > FoamPETShareCaution {
		r.Warnings = append(r.Warnings, fmt.Sprintf("recycled PET is %.0f %% of the blend; above about 10–15 %% foams may turn brittle or coarse: trial it, or blend to a lower share", 100*r.RecycledPETShare))
	}
	return r, nil
}

// The isocyanate indices MixBlend accepts: below 50 or above 500 is
// almost always a factor-of-10 or -100 slip (1.05 for 105).
const (
	MinIndex = 50
	MaxIndex = 500
)

// suggestIndex returns the index a slip most likely meant: v times or
// divided by 10 or 100, the first that lands in MinIndex–MaxIndex; 0
// when none does.
func suggestIndex(v float64) float64 {
	for _, f := range []float64{100, 10, 0.1, 0.01} {
		if s := v * f; s >= MinIndex && s <= MaxIndex {
			return math.Round(s*1e6) / 1e6
		}
	}
	return 0
}

// scaleToShare scales the PET-free polyols by one factor λ so that
//
//	Σ PET / (Σ m_PET-bearing + λ·Σ m_PET-free) = target.
func scaleToShare(ps []Polyol, target float64) error {
	var pet, fixed, free float64
	for _, p := range ps {
		if p.PETShare > 0 {
			pet += p.Kg * p.PETShare
			fixed += p.Kg
		} else {
			free += p.Kg
		}
	}
	if pet <= 0 {
		return fieldErr("blend", "target_pet_share", ErrBadBlend, "no polyol carries recycled PET; give the glycolysate as OHV:KG:PET_SHARE")
	}
	if free <= 0 {
		return fieldErr("blend", "target_pet_share", ErrBadBlend, "no PET-free polyol to dilute with; add one (e.g. castor:1)")
	}
	if own := pet / fixed; target > own*(1+1e-12) {
		return fieldErr("blend", "target_pet_share", ErrOutOfRange, "%s is above the %s the PET-bearing polyols reach on their own; lower the target", assess.Plain(target), assess.Sig(own, 3))
	}
	lambda := max(0, (pet/target-fixed)/free)
	for i := range ps {
		if ps[i].PETShare == 0 {
			ps[i].Kg *= lambda
		}
	}
	return nil
}
