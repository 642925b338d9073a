package assess

import "sort"

func frac(v float64) *float64 { return &v }

// builtinSpecs are illustrative specs of our own. Each figure says what it
// echoes; none is a buyer's contract. Buyers' own specs load from JSON.
var builtinSpecs = map[string]Spec{
	"glycol-feed": {
		Name:        "glycol-feed",
		Description: "Illustrative feed spec for glycolysis to polyols: colour and opacity are tolerated, PVC and hazards are not.",
		Limits: []Limit{
			// Echoes the failing end of the published trade-association PET
			// bale grades (≤ 72 % PET containers, 2015).
			{Item: "pet", Min: frac(0.72), Note: "target PET at least 72 % (trade-association failing grade bound)"},
			// Echoes the thermoform bale spec of the scrap specifications
			// circular: PVC ≤ 1 %. PVC releases HCl in a glycol reactor.
			{Item: "pvc", Max: frac(0.01), Note: "PVC at most 1 % (scrap specifications circular, thermoform bales)"},
			// Echoes "each contaminant ≤ 2 %" of the same circular.
			{Item: "pla", Max: frac(0.02), Note: "PLA at most 2 % (each contaminant ≤ 2 %, scrap specifications circular)"},
			// Free liquid commonly capped at 2 % of bale weight.
			{Item: "liquid", Max: frac(0.02), Note: "free liquid at most 2 % (HDPE and thermoform bale specs)"},
			// Echoes total contaminants ≤ 6 % of thermoform bales; applied
			// here to non-plastics only: illustrative.
			{Item: "non_plastics", Max: frac(0.06), Note: "non-plastics at most 6 % (illustrative, after the 6 % total-contaminant figure)"},
		},
		ZeroTolerance: []string{"hazard"},
		// Top (≥ 94 %) and failing (≤ 72 %) ends echo the trade-association
		// grades; the inner bound 0.83 is illustrative.
		Grades: []Grade{{"first", 0.94}, {"second", 0.83}, {"third", 0.72}, {"off-grade", 0}},
	},
	"bottle-clear": {
		Name:        "bottle-clear",
		Description: "Illustrative feed spec for bottle-grade mechanical recycling of clear and tinted PET: colour, opaque PET and foreign resins are tightly limited.",
		Limits: []Limit{
			// Echoes the top trade-association grade (≥ 94 % PET containers).
			{Item: "pet", Min: frac(0.94), Note: "target PET at least 94 % (trade-association top grade)"},
			// Illustrative: clear-flake buyers keep PVC in flake at 20–100 ppm,
			// which a bale at 0.1 % can still reach after sorting.
			{Item: "pvc", Max: frac(0.001), Note: "PVC at most 0.1 % (illustrative, for flake PVC ≤ 20–100 ppm after sorting)"},
			{Item: "pla", Max: frac(0.001), Note: "PLA at most 0.1 % (illustrative)"},
			{Item: "pet_opaque", Max: frac(0.02), Note: "opaque PET at most 2 % (illustrative)"},
			{Item: "pet_green", Max: frac(0.05), Note: "green PET at most 5 % (illustrative)"},
			{Item: "liquid", Max: frac(0.02), Note: "free liquid at most 2 % (HDPE and thermoform bale specs)"},
		},
		ZeroTolerance: []string{"hazard"},
		Grades:        []Grade{{"first", 0.94}, {"off-grade", 0}},
	},
}

// BuiltinSpec returns a built-in spec by name.
func BuiltinSpec(name string) (Spec, bool) {
	s, ok := builtinSpecs[name]
	return s, ok
}

// BuiltinSpecNames lists the built-in specs.
func BuiltinSpecNames() []string {
	var n []string
	for k := range builtinSpecs {
		n = append(n, k)
	}
	sort.Strings(n)
	return n
}
