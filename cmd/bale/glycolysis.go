package main

import (
	"flag"
	"fmt"
	"io"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "glycolysis",
		usage: "--pet-kg M --glycol KEY (--glycol-kg G | --glycol-ratio R [--molar]) [--strip-eg F] [--conversion X] " +
			"[--catalyst-pct P] [--catalyst K] [--pet-mn MN] [--pvc-kg K] [--json]",
		summary: "hydroxyl value, molar mass and chain-length distribution of a PET glycolysate",
		run:     runGlycolysis,
	})
}

// recipeFlags are the glycolysis flags shared by bale yield and bale
// glycolysis.
type recipeFlags struct {
	glycol, catalyst *string
	ratio, glycolKg  *float64
	molar            *bool
	strip, conv      *shareFlag
	cat              *float64
	petMn            *float64
}

func addRecipeFlags(fs *flag.FlagSet, forBale bool) *recipeFlags {
	rf := &recipeFlags{}
	def := ""
	if forBale {
		def = yield.DefaultGlycol
	}
	rf.glycol = fs.String("glycol", def, "glycol: EG, DEG, PG, DPG or glycerol (case-insensitive)")
	ratioHelp := "glycol to PET by mass (or by mole per PET repeat unit with --molar)"
	if forBale {
		ratioHelp = "glycol to dry flake by mass (or by mole per 192.17 g of flake with --molar)"
		rf.ratio = fs.Float64("glycol-ratio", yield.DefaultGlycolRatio, ratioHelp)
	} else {
		rf.ratio = fs.Float64("glycol-ratio", 0, ratioHelp)
		rf.glycolKg = fs.Float64("glycol-kg", 0, "glycol charged, kg")
	}
	rf.molar = fs.Bool("molar", false, "read --glycol-ratio as a mole ratio")
	rangeHelp := ""
	if forBale {
		rangeHelp = ", or a range LOW:HIGH the Monte Carlo draws from"
	}
	rf.strip = newShareFlag(fs, "strip-eg", 0, "share (0–1) of the liberated ethylene glycol stripped by distillation"+rangeHelp)
	rf.conv = newShareFlag(fs, "conversion", 1, "share (0–1] of the PET that dissolves; the rest leaves as a solid"+rangeHelp)
	rf.cat = fs.Float64("catalyst-pct", yield.DefaultCatalystPct, "catalyst loading, wt % of the PET")
	rf.catalyst = fs.String("catalyst", yield.DefaultCatalyst, "catalyst: zinc_acetate or zinc_acetate_dihydrate")
	rf.petMn = fs.Float64("pet-mn", 0, "number-average molar mass of the PET in g/mol, to count its chain ends (0: neglected)")
	return rf
}

// recipe builds the recipe the flags describe, for petKg of PET (0 for
// a bale, whose flake sets it). The model validates it.
func (rf *recipeFlags) recipe(fs *flag.FlagSet, petKg float64) (yield.Recipe, error) {
	if *rf.molar && !flagSet(fs, "glycol-ratio") {
		return yield.Recipe{}, usagef("--molar needs --glycol-ratio")
	}
	if petKg > 0 && (rf.conv.p.Varies() || rf.strip.p.Varies()) {
		return yield.Recipe{}, usagef("one charge takes one value for --conversion and --strip-eg; ranges are for bale yield")
	}
	r := yield.Recipe{PETKg: petKg, Glycol: *rf.glycol, Ratio: *rf.ratio, Molar: *rf.molar,
		Conversion: rf.conv.p.Mid(), StripEG: rf.strip.p.Mid(), Catalyst: *rf.catalyst, CatalystPct: *rf.cat, PETMn: *rf.petMn}
	if rf.glycolKg != nil && flagSet(fs, "glycol-kg") {
		if !(*rf.glycolKg > 0) {
			return r, &yield.FieldError{Where: "glycolysis", Field: "glycol_kg", Msg: fmt.Sprintf("must be above 0 (got %s in --glycol-kg)", assess.Plain(*rf.glycolKg)), Err: yield.ErrOutOfRange}
		}
		r.GlycolKg = *rf.glycolKg
	}
	return r, nil
}

// ranges puts --conversion and --strip-eg ranges into a plan, for the
// Monte Carlo to draw from.
func (rf *recipeFlags) ranges(plan *yield.Plan) {
	if rf.conv.p.Varies() {
		plan.Conversion = rf.conv.p
	}
	if rf.strip.p.Varies() {
		plan.StripEG = rf.strip.p
	}
}

// flagSet reports whether the flag was given on the command line.
func flagSet(fs *flag.FlagSet, name string) bool {
	set := false
	fs.Visit(func(f *flag.Flag) {
		if f.Name == name {
			set = true
		}
	})
	return set
}

// glycolysisJSON is the stable JSON output of bale glycolysis and the
// "glycolysis" object of bale yield (see README).
type glycolysisJSON struct {
	Glycol           string    `json:"glycol"`
	Branched         bool      `json:"branched"`
	PETKg            float64   `json:"pet_kg"`
	ConvertedPETKg   float64   `json:"converted_pet_kg"`
	UndissolvedPETKg float64   `json:"undissolved_pet_kg"`
	GlycolKg         float64   `json:"glycol_kg"`
	StrippedEGKg     float64   `json:"stripped_eg_kg"`
	Catalyst         string    `json:"catalyst"`
	CatalystKg       float64   `json:"catalyst_kg"`
	InertSolidsKg    float64   `json:"inert_solids_kg"`
	GlycolysateKg    float64   `json:"glycolysate_kg"`
	HydroxylValue    float64   `json:"hydroxyl_value"`
	EquivalentWeight float64   `json:"equivalent_weight"`
	Mn               float64   `json:"mn"`
	P                *float64  `json:"p"`
	NumberFractions  []float64 `json:"number_fractions"`
	WeightFractions  []float64 `json:"weight_fractions"`
	FreeGlycolWt     *float64  `json:"free_glycol_wt"`
	MonomerWt        *float64  `json:"monomer_wt"`
	LongOligomerWt   *float64  `json:"long_oligomer_wt"`
	LongOligomerK    int       `json:"long_oligomer_units"`
	MonomerYield     *float64  `json:"monomer_yield"`
	MetalPPM         float64   `json:"metal_ppm"`
	HClKg            float64   `json:"hcl_kg"`
	AcidValuePVC     float64   `json:"acid_value_pvc"`
	RecycledPETShare float64   `json:"recycled_pet_share"`
	Warnings         []string  `json:"warnings"`
	Cautions         []string  `json:"cautions,omitempty"`
}

func glycolysisOut(g yield.Glycolysate) glycolysisJSON {
	o := glycolysisJSON{
		Glycol: g.Glycol.Key, Branched: g.Glycol.Branched(), PETKg: g.PETKg, ConvertedPETKg: g.ConvertedPETKg,
		UndissolvedPETKg: g.UndissolvedPETKg, GlycolKg: g.GlycolKg, StrippedEGKg: g.StrippedEGKg,
		Catalyst: g.Catalyst.Key, CatalystKg: g.CatalystKg, InertSolidsKg: g.InertSolidsKg,
		GlycolysateKg: g.GlycolysateKg, HydroxylValue: g.HydroxylValue, EquivalentWeight: g.EquivalentWeight, Mn: g.Mn,
		NumberFractions: []float64{}, WeightFractions: []float64{}, LongOligomerK: yield.LongOligomerUnits,
		MetalPPM: g.MetalPPM, HClKg: g.HClKg, AcidValuePVC: g.AcidValuePVC, RecycledPETShare: g.RecycledPETShare(),
		Warnings: append([]string{}, g.Warnings...),
	}
	if d := g.Dist; len(d.Number) > 0 {
		o.P, o.FreeGlycolWt, o.MonomerWt, o.LongOligomerWt, o.MonomerYield = jnum(d.P), jnum(d.FreeGlycolWt), jnum(d.MonomerWt), jnum(d.LongOligomerWt), jnum(d.MonomerYield)
		o.NumberFractions, o.WeightFractions = d.Number, d.Weight
	}
	return o
}

func runGlycolysis(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("glycolysis")
	petKg := fs.Float64("pet-kg", 0, "PET charged, kg (required)")
	rf := addRecipeFlags(fs, false)
	pvcKg := fs.Float64("pvc-kg", 0, "residual PVC in the charge, kg")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	if !flagSet(fs, "pet-kg") || !flagSet(fs, "glycol") {
		return usagef("--pet-kg and --glycol are required")
	}
	if flagSet(fs, "glycol-kg") == flagSet(fs, "glycol-ratio") {
		return usagef("give the glycol as --glycol-kg or as --glycol-ratio, one of them")
	}
	r, err := rf.recipe(fs, *petKg)
	if err != nil {
		return err
	}
	r.PVCKg = *pvcKg
	g, err := yield.Glycolyse(r)
	if err != nil {
		return err
	}
	o := glycolysisOut(g)
	o.Cautions = []string{yield.CautionHotGlycolFor(g.Glycol)}
	if g.HClKg > 0 {
		o.Cautions = append(o.Cautions, yield.CautionPVC)
	}
	if *asJSON {
		return writeJSON(stdout, o)
	}
	fmt.Fprintf(stdout, "Glycolysis of %s kg PET with %s kg %s (%s %% %s, conversion %s, EG stripped %s)\n",
		assess.Plain(g.PETKg), assess.Sig(g.GlycolKg, 4), g.Glycol.Name, assess.Plain(g.Recipe.CatalystPct), g.Catalyst.Name, assess.Plain(g.Recipe.Conversion), assess.Plain(g.Recipe.StripEG))
	printGlycolysate(stdout, g)
	printNotes(stdout, o.Warnings, o.Cautions)
	return nil
}

func printGlycolysate(w io.Writer, g yield.Glycolysate) {
	fmt.Fprintf(w, "  glycolysate %.3f kg: hydroxyl value %.1f mg KOH/g, equivalent weight %.1f g/eq, Mn %.1f g/mol\n",
		g.GlycolysateKg, g.HydroxylValue, g.EquivalentWeight, g.Mn)
	if g.UndissolvedPETKg > 0 || g.InertSolidsKg > 0 {
		fmt.Fprintf(w, "  solids filtered off: %.3f kg undissolved PET, %.3f kg other solids\n", g.UndissolvedPETKg, g.InertSolidsKg)
	}
	if g.StrippedEGKg > 0 {
		fmt.Fprintf(w, "  EG stripped: %.3f kg\n", g.StrippedEGKg)
	}
	fmt.Fprintf(w, "  %s %.0f ppm; recycled-PET share %.1f %%", g.Catalyst.Metal, g.MetalPPM, 100*g.RecycledPETShare())
	if g.AcidValuePVC > 0 {
		fmt.Fprintf(w, "; acid from PVC up to %.2f mg KOH/g", g.AcidValuePVC)
	}
	fmt.Fprintln(w)
	d := g.Dist
	if len(d.Number) == 0 {
		return
	}
	fmt.Fprintf(w, "  Flory distribution, p = %.4f: free glycol %.1f wt %%, monomer %.1f wt %%, %d+ units %.1f wt %%; monomer holds %.1f %% of the terephthalate\n",
		d.P, 100*d.FreeGlycolWt, 100*d.MonomerWt, yield.LongOligomerUnits, 100*d.LongOligomerWt, 100*d.MonomerYield)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "  units k\t")
	for k := range d.Number {
		if k == len(d.Number)-1 {
			fmt.Fprintf(tw, ">%d\t", k-1)
		} else {
			fmt.Fprintf(tw, "%d\t", k)
		}
	}
	fmt.Fprintf(tw, "\n  number %%\t")
	for _, v := range d.Number {
		fmt.Fprintf(tw, "%.1f\t", 100*v)
	}
	fmt.Fprintf(tw, "\n  weight %%\t")
	for _, v := range d.Weight {
		fmt.Fprintf(tw, "%.1f\t", 100*v)
	}
	fmt.Fprintln(tw)
	tw.Flush()
}
