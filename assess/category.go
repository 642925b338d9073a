package assess

import (
	"fmt"
	"sort"
	"strings"
)

// Group gathers categories for specs and reports.
type Group int

// The groups, in report order.
const (
	GroupPET Group = iota + 1
	GroupOtherPlastics
	GroupNonPlastics
	GroupMoistureFines
	GroupHazards
)

var groupKeys = [...]string{"", "pet", "other_plastics", "non_plastics", "moisture_fines", "hazards"}
var groupNames = [...]string{"", "Target PET", "Other plastics", "Non-plastics", "Moisture and fines", "Hazards"}

// Groups lists every group in report order.
func Groups() []Group {
	return []Group{GroupPET, GroupOtherPlastics, GroupNonPlastics, GroupMoistureFines, GroupHazards}
}

// Key is the group's stable key, used in files and JSON.
func (g Group) Key() string {
	if g < GroupPET || g > GroupHazards {
		return fmt.Sprintf("group(%d)", int(g))
	}
	return groupKeys[g]
}

// String is the group's display name.
func (g Group) String() string {
	if g < GroupPET || g > GroupHazards {
		return fmt.Sprintf("Group(%d)", int(g))
	}
	return groupNames[g]
}

// LookupGroup finds a group by its key.
func LookupGroup(key string) (Group, bool) {
	for _, g := range Groups() {
		if g.Key() == key {
			return g, true
		}
	}
	return 0, false
}

// DensityRange is a nominal density range in g/cm³. A zero range means
// the density is not meaningful for sink–float (hazards).
type DensityRange struct {
	Min, Max float64
}

// Known reports whether the range holds a density.
func (d DensityRange) Known() bool { return d.Max > 0 }

// Category is one sorting category of a pull.
type Category struct {
	Key   string // stable key, used in CSV headers, files and JSON
	Name  string // display name
	Code  int    // resin identification code (ASTM D7611), 0 when none
	Group Group
	// Density is the nominal range used by the wash-line sink–float model.
	Density DensityRange
	// DensitySource says where Density comes from.
	DensitySource string
}

// Density sources: a published source where one was found, otherwise
// marked from memory.
const (
	srcPETAmorph = "PET amorphous 1.333–1.335 (Daubeny, Bunn & Brown, Proc. R. Soc. A 226 (1954) 531); bottle wall 1.36–1.38 from memory; upper end toward crystalline 1.455 (same source)"
	srcMemory    = "from memory"
)

// catalogue is the ordered list of categories. Keys are stable: add new
// ones, never rename. Index order is the order of reports and of the
// slices in Pull.
var catalogue = []Category{
	{"pet_clear", "PET bottles, clear", 1, GroupPET, DensityRange{1.33, 1.40}, srcPETAmorph},
	{"pet_tinted", "PET bottles, light blue / tinted", 1, GroupPET, DensityRange{1.33, 1.40}, srcPETAmorph},
	{"pet_green", "PET bottles, green", 1, GroupPET, DensityRange{1.33, 1.40}, srcPETAmorph},
	{"pet_amber", "PET bottles, amber", 1, GroupPET, DensityRange{1.33, 1.40}, srcPETAmorph},
	{"pet_colour_other", "PET bottles, other colours", 1, GroupPET, DensityRange{1.33, 1.40}, srcPETAmorph},
	{"pet_opaque", "PET bottles, opaque / white", 1, GroupPET, DensityRange{1.33, 1.42}, srcPETAmorph + "; pigment raises density, from memory"},
	{"pet_thermoform", "PET thermoforms (trays, clamshells, cups)", 1, GroupPET, DensityRange{1.33, 1.36}, srcPETAmorph + "; thermoforms are mostly amorphous"},
	{"hdpe", "HDPE", 2, GroupOtherPlastics, DensityRange{0.941, 0.965}, srcMemory},
	{"pvc", "PVC", 3, GroupOtherPlastics, DensityRange{1.35, 1.45}, "rigid PVC, " + srcMemory},
	{"ldpe", "LDPE", 4, GroupOtherPlastics, DensityRange{0.910, 0.935}, srcMemory},
	{"pp", "PP", 5, GroupOtherPlastics, DensityRange{0.90, 0.91}, srcMemory},
	{"ps", "PS", 6, GroupOtherPlastics, DensityRange{1.04, 1.06}, "solid PS, " + srcMemory},
	{"pla", "PLA", 7, GroupOtherPlastics, DensityRange{1.24, 1.25}, srcMemory},
	{"other_resin", "Other code-7 resins (PC, PETG, multilayer)", 7, GroupOtherPlastics, DensityRange{1.20, 1.30}, "PETG ≈1.27, PC ≈1.20, " + srcMemory},
	{"closures", "Closures and rings", 0, GroupOtherPlastics, DensityRange{0.90, 0.965}, "PP and HDPE closures, " + srcMemory},
	{"labels", "Labels and sleeves", 0, GroupOtherPlastics, DensityRange{0.90, 1.40}, "OPP labels 0.90 to PETG/PVC sleeves 1.27–1.40, " + srcMemory},
	{"film", "Film and bags", 0, GroupOtherPlastics, DensityRange{0.910, 0.935}, "LDPE film, " + srcMemory},
	{"paper", "Paper and board", 0, GroupNonPlastics, DensityRange{1.20, 1.50}, "wet fibre, " + srcMemory},
	{"aluminium", "Aluminium", 0, GroupNonPlastics, DensityRange{2.70, 2.70}, srcMemory},
	{"steel", "Steel", 0, GroupNonPlastics, DensityRange{7.85, 7.85}, srcMemory},
	{"glass", "Glass", 0, GroupNonPlastics, DensityRange{2.40, 2.60}, srcMemory},
	{"liquid", "Free liquid and moisture", 0, GroupMoistureFines, DensityRange{1.00, 1.00}, "water, common practice"},
	{"fines", "Fines and dirt", 0, GroupMoistureFines, DensityRange{2.50, 2.70}, "mineral dirt, " + srcMemory},
	{"hazard", "Hazards (oil or chemical containers, batteries, sharps, medical waste)", 0, GroupHazards, DensityRange{}, "not applicable: zero-tolerance items are removed by hand"},
}

var catalogueIndex = func() map[string]int {
	m := make(map[string]int, len(catalogue))
	for i, c := range catalogue {
		m[c.Key] = i
	}
	return m
}()

// Categories returns the catalogue in report order. The slice is a copy.
func Categories() []Category {
	return append([]Category(nil), catalogue...)
}

// NumCategories is the length of the catalogue and of every Pull slice.
func NumCategories() int { return len(catalogue) }

// CategoryAt returns the category at catalogue index i.
func CategoryAt(i int) Category { return catalogue[i] }

// CategoryIndex returns the catalogue index of key.
func CategoryIndex(key string) (int, bool) {
	i, ok := catalogueIndex[key]
	return i, ok
}

// LookupCategory finds a category by key.
func LookupCategory(key string) (Category, bool) {
	i, ok := catalogueIndex[key]
	if !ok {
		return Category{}, false
	}
	return catalogue[i], true
}

// IsTargetPET reports whether the category counts as target PET.
func (c Category) IsTargetPET() bool { return c.Group == GroupPET }

// CategoryKeys lists every key in catalogue order, for messages.
func CategoryKeys() []string {
	keys := make([]string, len(catalogue))
	for i, c := range catalogue {
		keys[i] = c.Key
	}
	return keys
}

// suggestKey returns the catalogue keys closest to an unknown key, for
// "did you mean" messages: keys sharing a prefix or contained in it.
func suggestKey(key string) []string {
	key = strings.ToLower(strings.TrimSpace(key))
	var out []string
	for _, c := range catalogue {
		if key != "" && (strings.HasPrefix(c.Key, key) || strings.HasPrefix(key, c.Key) || strings.Contains(c.Key, key)) {
			out = append(out, c.Key)
		}
	}
	sort.Strings(out)
	return out
}
