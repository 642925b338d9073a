package main

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "blend",
		usage: "--polyol OHV:KG[:PET_SHARE] ... (--isocyanate-nco PCT | --isocyanate TDI|MDI|PMDI) --index I " +
			"[--water-kg W] [--target-pet-share S] [--json]",
		summary: "hydroxyl value of a polyol blend and the isocyanate it needs at an index",
		run:     runBlend,
	})
}

// polyolFlags collects repeated --polyol values.
type polyolFlags []string

func (p *polyolFlags) String() string     { return strings.Join(*p, " ") }
func (p *polyolFlags) Set(v string) error { *p = append(*p, v); return nil }

// blendJSON is the stable JSON output of bale blend (see README).
type blendJSON struct {
	Polyols             []polyolJSON `json:"polyols"`
	BlendKg             float64      `json:"blend_kg"`
	BlendHydroxylValue  float64      `json:"blend_hydroxyl_value"`
	BlendEquivalentWt   float64      `json:"blend_equivalent_weight"`
	OHEquivalents       float64      `json:"oh_equivalents"`
	WaterKg             float64      `json:"water_kg"`
	WaterEquivalents    float64      `json:"water_equivalents"`
	Isocyanate          string       `json:"isocyanate"`
	NCOPct              float64      `json:"nco_pct"`
	NCOEquivalentWeight float64      `json:"nco_equivalent_weight"`
	Index               float64      `json:"index"`
	IsocyanateKg        float64      `json:"isocyanate_kg"`
	RecycledPETKg       float64      `json:"recycled_pet_kg"`
	RecycledPETShare    float64      `json:"recycled_pet_share"`
	FormulationKg       float64      `json:"formulation_kg"`
	FormulationPETShare float64      `json:"formulation_pet_share"`
	Warnings            []string     `json:"warnings"`
	Cautions            []string     `json:"cautions"`
}

type polyolJSON struct {
	Name          string  `json:"name"`
	HydroxylValue float64 `json:"hydroxyl_value"`
	Kg            float64 `json:"kg"`
	PETShare      float64 `json:"pet_share"`
}

func runBlend(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("blend")
	var polyols polyolFlags
	fs.Var(&polyols, "polyol", "a polyol as OHV:KG, OHV:KG:PET_SHARE or castor:KG (repeat for each)")
	nco := fs.Float64("isocyanate-nco", 0, "NCO content of the isocyanate, mass %")
	iso := fs.String("isocyanate", "", "isocyanate preset: TDI (2,4-TDI), MDI (monomeric 4,4'-MDI) or PMDI (polymeric MDI, 31 % NCO, typical)")
	index := fs.Float64("index", 0, "isocyanate index, 100 × NCO / (OH + water) equivalents (required)")
	water := fs.Float64("water-kg", 0, "water added as blowing agent, kg (2 equivalents per mole)")
	target := fs.Float64("target-pet-share", 0, "scale the PET-free polyols so the blend holds this share of recycled PET (0–1)")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	if len(polyols) == 0 {
		return usagef("give at least one --polyol OHV:KG")
	}
	if !flagSet(fs, "index") {
		return usagef("--index is required, e.g. --index 110")
	}
	name := fmt.Sprintf("%s %% NCO", assess.Plain(*nco))
	switch {
	case flagSet(fs, "isocyanate") && flagSet(fs, "isocyanate-nco"):
		return usagef("give --isocyanate or --isocyanate-nco, not both")
	case flagSet(fs, "isocyanate"):
		p, err := yield.LookupIsocyanate(*iso)
		if err != nil {
			return err
		}
		*nco, name = p.NCOPct, p.Key
	case !flagSet(fs, "isocyanate-nco"):
		return usagef("give the isocyanate as --isocyanate-nco PCT or --isocyanate TDI|MDI|PMDI")
	}
	b := yield.Blend{NCOPct: *nco, Index: *index, WaterKg: *water, TargetPETShare: *target}
	for i, s := range polyols {
		p, err := yield.ParsePolyol(s, i+1)
		if err != nil {
			return err
		}
		b.Polyols = append(b.Polyols, p)
	}
	r, err := yield.MixBlend(b)
	if err != nil {
		return err
	}
	o := blendJSON{
		BlendKg: r.BlendKg, BlendHydroxylValue: r.HydroxylValue, BlendEquivalentWt: r.EquivalentWeight,
		OHEquivalents: r.OHEquivalents, WaterKg: b.WaterKg, WaterEquivalents: r.WaterEquivalents,
		Isocyanate: name, NCOPct: b.NCOPct, NCOEquivalentWeight: r.NCOEquivalentWeight, Index: b.Index,
		IsocyanateKg: r.IsocyanateKg, RecycledPETKg: r.RecycledPETKg, RecycledPETShare: r.RecycledPETShare,
		FormulationKg: r.FormulationKg, FormulationPETShare: r.FormulationPETShare,
		Warnings: append([]string{}, r.Warnings...),
		Cautions: []string{yield.CautionIsocyanateFor(name)},
	}
	for _, p := range r.Polyols {
		o.Polyols = append(o.Polyols, polyolJSON{p.Name, p.HydroxylValue, p.Kg, p.PETShare})
	}
	if *asJSON {
		return writeJSON(stdout, o)
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "polyol\tOHV, mg KOH/g\tkg\trecycled PET\n")
	for _, p := range o.Polyols {
		fmt.Fprintf(tw, "%s\t%.1f\t%.3f\t%.1f %%\n", p.Name, p.HydroxylValue, p.Kg, 100*p.PETShare)
	}
	tw.Flush()
	fmt.Fprintf(stdout, "\nBlend %.3f kg: hydroxyl value %.1f mg KOH/g, equivalent weight %.1f g/eq, %.3f OH equivalents\n",
		o.BlendKg, o.BlendHydroxylValue, o.BlendEquivalentWt, o.OHEquivalents)
	if o.WaterKg > 0 {
		fmt.Fprintf(stdout, "Water %.3f kg: %.3f equivalents\n", o.WaterKg, o.WaterEquivalents)
	}
	fmt.Fprintf(stdout, "Isocyanate %s (%.2f %% NCO, %.1f g/eq) at index %s: %.3f kg\n", o.Isocyanate, o.NCOPct, o.NCOEquivalentWeight, assess.Plain(o.Index), o.IsocyanateKg)
	fmt.Fprintf(stdout, "Recycled PET: %.3f kg, %.1f %% of the blend, %.1f %% of the formulation (%.3f kg)\n",
		o.RecycledPETKg, 100*o.RecycledPETShare, 100*o.FormulationPETShare, o.FormulationKg)
	printNotes(stdout, o.Warnings, o.Cautions)
	return nil
}
