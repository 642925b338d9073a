package yield

import (
	"baleassay/assess"
	"bytes"
	"fmt"
	"io"
	"math"
	"strings"
)

// FlakeItem is one quantity a flake spec limits.
type FlakeItem int

// The flake items, in report order.
const (
	ItemPVC FlakeItem = iota
	ItemPolyolefins
	ItemGlue
	ItemPaper
	ItemMetal
	ItemMoisture
	ItemFines
	numFlakeItems
)

var flakeItemKeys = [numFlakeItems]string{"pvc_ppm", "polyolefins_ppm", "glue_ppm", "paper_ppm", "metal_ppm", "moisture_pct", "fines_pct"}

// String is the item's key in spec files and JSON output.
func (it FlakeItem) String() string {
	if it < 0 || it >= numFlakeItems {
		return "FlakeItem(?)"
	}
	return flakeItemKeys[it]
}

// flakeItemMembers lists the components each ppm item adds up.
var flakeItemMembers = [numFlakeItems][]string{
	ItemPVC:         {"pvc"},
	ItemPolyolefins: {"hdpe", "ldpe", "pp", "closures", "film"},
	ItemGlue:        {KeyGlue},
	ItemPaper:       {"paper"},
	ItemMetal:       {"aluminium", "steel"},
	ItemFines:       {KeyDust, "fines"},
}

var flakeItemIdx = func() (out [numFlakeItems][]int) {
	for it, keys := range flakeItemMembers {
		for _, k := range keys {
			i, ok := ComponentIndex(k)
			if !ok {
				panic("flake item member " + k + " not in the catalogue")
			}
			out[it] = append(out[it], i)
		}
	}
	return out
}()

// flakeValues fills v with the spec quantities of a flake: ppm of dry
// flake for the contaminants, % of wet flake for moisture, % of dry
// flake for fines (dust and dirt). It allocates nothing.
func flakeValues(flake []float64, dryKg, moistureKg float64, v *[numFlakeItems]float64) {
	for it := range numFlakeItems {
		s := 0.0
		for _, i := range flakeItemIdx[it] {
			s += flake[i]
		}
		v[it] = ppm(s, dryKg)
	}
	v[ItemFines] /= 1e4
	v[ItemMoisture] = 0
	if wet := dryKg + moistureKg; wet > 0 {
		v[ItemMoisture] = 100 * moistureKg / wet
	}
}

// FlakeSpec is a buyer's or a reactor's limits for clean flake. A nil
// limit is not checked.
type FlakeSpec struct {
	Name           string   `json:"name"`
	Note           string   `json:"note,omitempty"`
	PVCPPM         *float64 `json:"pvc_ppm,omitempty"`
	PolyolefinsPPM *float64 `json:"polyolefins_ppm,omitempty"`
	GluePPM        *float64 `json:"glue_ppm,omitempty"`
	PaperPPM       *float64 `json:"paper_ppm,omitempty"`
	MetalPPM       *float64 `json:"metal_ppm,omitempty"`
	MoisturePct    *float64 `json:"moisture_pct,omitempty"`
	FinesPct       *float64 `json:"fines_pct,omitempty"`
}

func (s FlakeSpec) limits() [numFlakeItems]*float64 {
	return [numFlakeItems]*float64{s.PVCPPM, s.PolyolefinsPPM, s.GluePPM, s.PaperPPM, s.MetalPPM, s.MoisturePct, s.FinesPct}
}

// Validate checks that the spec has a name, at least one limit, and
// every limit finite and not negative (percentages at most 100).
func (s FlakeSpec) Validate() error {
	if strings.TrimSpace(s.Name) == "" {
		return fieldErr("flake spec", "name", ErrBadSpec, "the spec needs a name")
	}
	any := false
	for it, l := range s.limits() {
		if l == nil {
			continue
		}
		any = true
		if err := checkNonNegative("flake spec "+s.Name, FlakeItem(it).String(), *l); err != nil {
			return err
		}
		if (FlakeItem(it) == ItemMoisture || FlakeItem(it) == ItemFines) && *l > 100 {
			return fieldErr("flake spec "+s.Name, FlakeItem(it).String(), ErrOutOfRange, "%s is above 100 %%; give a percentage", assess.Plain(*l))
		}
	}
	if !any {
		return fieldErr("flake spec "+s.Name, "", ErrBadSpec, "no limits given; set at least one of %s", strings.Join(flakeItemKeys[:], ", "))
	}
	return nil
}

// ReadFlakeSpecFile reads a flake spec from a JSON file.
func ReadFlakeSpecFile(path string) (FlakeSpec, error) {
	b, err := assess.ReadFileLimited(path, assess.MaxDocumentFileBytes)
	if err != nil {
		return FlakeSpec{}, fieldErr(path, "", fmt.Errorf("%w: %w", ErrBadSpec, err), "cannot read the flake spec (%v); check the path", err)
	}
	return ReadFlakeSpec(bytes.NewReader(b), path)
}

// ReadFlakeSpec reads a flake spec in JSON (unknown fields are errors).
func ReadFlakeSpec(r io.Reader, name string) (FlakeSpec, error) {
	return readJSON(r, name, "flake spec", "spec", ErrBadSpec, (*FlakeSpec).Validate)
}

// BuiltinFlakeSpecName names the illustrative built-in flake spec.
const BuiltinFlakeSpecName = "illustrative clean clear flake"

// BuiltinFlakeSpec returns an illustrative clean-flake spec. Each limit
// sits inside the ranges seen in trade listings for clean clear flake
// (trade listings of clean flake): polyolefins 10–30 ppm, PVC 20–100,
// glue 50, paper 50, metal 10, moisture 0.7–1 %, dust 0.5–1 %.
func BuiltinFlakeSpec() FlakeSpec {
	f := func(v float64) *float64 { return &v }
	return FlakeSpec{
		Name:           BuiltinFlakeSpecName,
		Note:           "limits within trade-listing ranges; illustrative",
		PVCPPM:         f(50),
		PolyolefinsPPM: f(20),
		GluePPM:        f(50),
		PaperPPM:       f(50),
		MetalPPM:       f(10),
		MoisturePct:    f(1.0),
		FinesPct:       f(1.0),
	}
}

// FlakeCheck is the verdict on one limit.
type FlakeCheck struct {
	Item  FlakeItem
	Limit float64
	Value float64
	Pass  bool
	// PassShare is the share of Monte Carlo draws that met the limit;
	// NaN when the check is deterministic.
	PassShare float64
}

// Check compares a balance with the spec.
func (s FlakeSpec) Check(b Balance) []FlakeCheck {
	var v [numFlakeItems]float64
	flakeValues(b.Flake, b.FlakeDryKg, b.MoistureKg, &v)
	var out []FlakeCheck
	for it, l := range s.limits() {
		if l == nil {
			continue
		}
		out = append(out, FlakeCheck{Item: FlakeItem(it), Limit: *l, Value: v[it], Pass: v[it] <= *l, PassShare: math.NaN()})
	}
	return out
}
