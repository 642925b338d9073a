package yield

import (
	"sort"
	"strings"
)

// Glycol is a polyol that can glycolyse PET.
type Glycol struct {
	Key  string // stable key: EG, DEG, PG, DPG, glycerol
	Name string
	// MolarMass in g/mol, from the molecular formula and standard atomic
	// weights.
	MolarMass float64
	// Functionality is the number of OH groups per molecule.
	Functionality int
	// BoilingC is the normal boiling point in °C (from memory).
	BoilingC float64
	// FlashC is the closed-cup flash point in °C (from memory); 0 when
	// not recorded.
	FlashC float64
}

// Branched reports whether the glycol has more than two OH groups. The
// linear most-probable distribution does not apply to branched products.
func (g Glycol) Branched() bool { return g.Functionality > 2 }

func formula(c, h, o float64) float64 { return c*atomC + h*atomH + o*atomO }

// glycols is the glycol catalogue. Boiling and flash points are from
// memory and only drive warnings.
var glycols = []Glycol{
	{"EG", "ethylene glycol", formula(2, 6, 2), 2, 197, 111},
	{"DEG", "diethylene glycol", formula(4, 10, 3), 2, 245, 124},
	{"PG", "1,2-propylene glycol", formula(3, 8, 2), 2, 188, 99},
	{"DPG", "dipropylene glycol", formula(6, 14, 3), 2, 231, 124},
	{"glycerol", "glycerol", formula(3, 8, 3), 3, 290, 160},
}

// Glycols lists the glycol catalogue.
func Glycols() []Glycol { return append([]Glycol(nil), glycols...) }

// GlycolKeys lists the glycol keys, for messages.
func GlycolKeys() []string {
	k := make([]string, len(glycols))
	for i, g := range glycols {
		k[i] = g.Key
	}
	sort.Strings(k)
	return k
}

// LookupGlycol finds a glycol by key, ignoring case.
func LookupGlycol(key string) (Glycol, error) {
	for _, g := range glycols {
		if strings.EqualFold(g.Key, strings.TrimSpace(key)) {
			return g, nil
		}
	}
	return Glycol{}, fieldErr("", "glycol", ErrUnknownGlycol, "%q is not a known glycol; use one of %s", key, strings.Join(GlycolKeys(), ", "))
}

// Catalyst is a transesterification catalyst that stays in the product.
type Catalyst struct {
	Key       string
	Name      string
	MolarMass float64 // g/mol
	// MetalMass is the mass of metal per mole of catalyst, g/mol.
	MetalMass float64
	Metal     string
}

var catalysts = []Catalyst{
	{"zinc_acetate", "zinc acetate (anhydrous)", MolarMassZincAcetate, atomZn, "Zn"},
	{"zinc_acetate_dihydrate", "zinc acetate dihydrate", MolarMassZincAcetateDihydrate, atomZn, "Zn"},
}

// DefaultCatalyst is zinc acetate, the most active of the metal acetates
// for PET glycolysis (Baliga & Wong, J. Polym. Sci. A 27 (1989) 2071).
const DefaultCatalyst = "zinc_acetate"

// DefaultCatalystPct is the catalyst loading in wt % of PET used unless
// another is given (common practice: 0.5–1 wt %).
const DefaultCatalystPct = 0.5

// LookupCatalyst finds a catalyst by key, ignoring case.
func LookupCatalyst(key string) (Catalyst, error) {
	var keys []string
	for _, c := range catalysts {
		if strings.EqualFold(c.Key, strings.TrimSpace(key)) {
			return c, nil
		}
		keys = append(keys, c.Key)
	}
	return Catalyst{}, fieldErr("", "catalyst", ErrUnknownKey, "%q is not a known catalyst; use one of %s", key, strings.Join(keys, ", "))
}
