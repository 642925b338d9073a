package yield

import (
	"baleassay/assess"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"sort"
	"strings"
)

// ErrBadPrices marks an invalid price sheet.
var ErrBadPrices = errors.New("invalid price sheet")

// Route is what the plant sells from a bale.
type Route uint8

// The routes.
const (
	// RouteFlake: the clean flake is sold as it leaves the wash line.
	RouteFlake Route = iota + 1
	// RouteGlycolysate: the flake is glycolysed in house and the
	// glycolysate (recycled polyol) is sold.
	RouteGlycolysate
)

var routeKeys = [...]string{"", "flake", "glycolysate"}

func (r Route) String() string {
	if r >= RouteFlake && r <= RouteGlycolysate {
		return routeKeys[r]
	}
	return fmt.Sprintf("Route(%d)", uint8(r))
}

// ParseRoute reads "flake" or "glycolysate".
func ParseRoute(s string) (Route, error) {
	for r := RouteFlake; r <= RouteGlycolysate; r++ {
		if routeKeys[r] == s {
			return r, nil
		}
	}
	return 0, fmt.Errorf("%w: route %q: give flake or glycolysate", ErrUnknownKey, s)
}

// MarshalText writes the route key.
func (r Route) MarshalText() ([]byte, error) { return []byte(r.String()), nil }

// UnmarshalText reads the route key.
func (r *Route) UnmarshalText(b []byte) error {
	v, err := ParseRoute(string(b))
	if err != nil {
		return err
	}
	*r = v
	return nil
}

// HydroxylWindow is a buyer's hydroxyl-value range for the glycolysate
// (mg KOH/g) and the deduction per tonne of glycolysate outside it.
type HydroxylWindow struct {
	Min           float64 `json:"min"`
	Max           float64 `json:"max"`
	DeductionPerT float64 `json:"deduction_per_t"`
}

// PriceSheet turns what a bale makes into money. Every figure is in
// Currency per metric tonne (1,000 kg); prices may be negative (a
// product that costs money to place), costs and deductions may not.
type PriceSheet struct {
	Name         string `json:"name"`
	Note         string `json:"note,omitempty"`
	Currency     string `json:"currency"` // ISO 4217 code, e.g. EUR
	Illustrative bool   `json:"illustrative,omitempty"`
	// Route is the headline: what the plant does with the flake.
	Route Route `json:"route"`
	// FlakePerT is the price of clean flake, per tonne as delivered
	// (moisture included).
	FlakePerT float64 `json:"flake_per_t"`
	// GlycolysatePerT is the price of the glycolysate, per tonne.
	GlycolysatePerT float64 `json:"glycolysate_per_t"`
	// GlycolPerT is what the glycol charged costs, per tonne.
	GlycolPerT float64 `json:"glycol_per_t"`
	// WashCostPerT is the wash line's cost per tonne of bale fed
	// (energy, water, caustic, labour, maintenance).
	WashCostPerT float64 `json:"wash_cost_per_t"`
	// GlycolysisCostPerT is the reactor's cost per tonne of charge (dry
	// flake plus glycol), catalyst included.
	GlycolysisCostPerT float64 `json:"glycolysis_cost_per_t"`
	// DisposalPerT is the cost of disposing of a tonne of solid rejects.
	DisposalPerT float64 `json:"disposal_per_t"`
	// FlakeDeductions are taken off the flake price, per tonne of flake,
	// for each flake-spec limit (keyed as in flake spec files:
	// pvc_ppm, polyolefins_ppm, ...) the flake breaks. They apply on the
	// flake route.
	FlakeDeductions map[string]float64 `json:"flake_deductions,omitempty"`
	// Hydroxyl, when set, deducts from the glycolysate price when its
	// hydroxyl value falls outside the buyer's window.
	Hydroxyl *HydroxylWindow `json:"hydroxyl_value,omitempty"`

	deduct [numFlakeItems]float64 // FlakeDeductions by item, set by Validate
}

var currencyCode = regexp.MustCompile(`^[A-Z]{3}$`)

// maxPricePerT bounds every figure: a price or cost beyond a million per
// tonne is a typing slip (a missing decimal point), not a market.
const maxPricePerT = 1e6

// Validate checks the sheet and resolves its deduction keys. It must be
// called before the sheet is used (ReadPriceSheet and BuiltinPriceSheet
// do).
func (p *PriceSheet) Validate() error {
	where := "price sheet " + p.Name
	if strings.TrimSpace(p.Name) == "" {
		return fieldErr("price sheet", "name", ErrBadPrices, "the sheet needs a name")
	}
	if !currencyCode.MatchString(p.Currency) {
		return fieldErr(where, "currency", ErrBadPrices, "%q: give the ISO 4217 code in capitals (EUR, USD, GBP)", p.Currency)
	}
	if p.Route == 0 {
		return fieldErr(where, "route", ErrBadPrices, "say what is sold: \"flake\" or \"glycolysate\"")
	}
	prices := []struct {
		field string
		v     float64
		cost  bool
	}{
		{"flake_per_t", p.FlakePerT, false}, {"glycolysate_per_t", p.GlycolysatePerT, false},
		{"glycol_per_t", p.GlycolPerT, true}, {"wash_cost_per_t", p.WashCostPerT, true},
		{"glycolysis_cost_per_t", p.GlycolysisCostPerT, true}, {"disposal_per_t", p.DisposalPerT, true},
	}
	for _, f := range prices {
		if err := checkMoney(where, f.field, f.v, f.cost); err != nil {
			return err
		}
	}
	p.deduct = [numFlakeItems]float64{}
	for _, k := range sortedKeys(p.FlakeDeductions) {
		it, ok := flakeItemOf(k)
		if !ok {
			return fieldErr(where, "flake_deductions."+k, ErrUnknownKey, "not a flake-spec item; use one of %s", strings.Join(flakeItemKeys[:], ", "))
		}
		if err := checkMoney(where, "flake_deductions."+k, p.FlakeDeductions[k], true); err != nil {
			return err
		}
		p.deduct[it] = p.FlakeDeductions[k]
	}
	if h := p.Hydroxyl; h != nil {
		for _, f := range []struct {
			field string
			v     float64
		}{{"min", h.Min}, {"max", h.Max}} {
			if err := checkNonNegative(where, "hydroxyl_value."+f.field, f.v); err != nil {
				return err
			}
		}
		if h.Max <= h.Min {
			return fieldErr(where, "hydroxyl_value", ErrBadPrices, "max %s is not above min %s (mg KOH/g)", assess.Plain(h.Max), assess.Plain(h.Min))
		}
		if err := checkMoney(where, "hydroxyl_value.deduction_per_t", h.DeductionPerT, true); err != nil {
			return err
		}
	}
	return nil
}

func checkMoney(where, field string, v float64, cost bool) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "%v is not a number", v)
	}
	if cost && v < 0 {
		return fieldErr(where, field, ErrOutOfRange, "%s: a cost or deduction is not negative; give it as a positive amount per tonne", assess.Plain(v))
	}
	if v > maxPricePerT || v < -maxPricePerT {
		return fieldErr(where, field, ErrOutOfRange, "%s per tonne is beyond any market; check the decimal point", assess.Plain(v))
	}
	return nil
}

func flakeItemOf(key string) (FlakeItem, bool) {
	for it, k := range flakeItemKeys {
		if k == key {
			return FlakeItem(it), true
		}
	}
	return 0, false
}

func sortedKeys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// ReadPriceSheet reads a price sheet in JSON (unknown fields, repeated
// keys and control characters are errors, as in every document this
// package reads) and validates it.
func ReadPriceSheet(r io.Reader, name string) (PriceSheet, error) {
	return readJSON(r, name, "price sheet", "sheet", ErrBadPrices, (*PriceSheet).Validate)
}

// ReadPriceSheetFile reads a price sheet from a JSON file.
func ReadPriceSheetFile(path string) (PriceSheet, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return PriceSheet{}, fieldErr(path, "", ErrBadPrices, "cannot read the price sheet (%v); check the path", err)
	}
	return ReadPriceSheet(bytes.NewReader(b), path)
}

// BuiltinPriceSheetName names the illustrative built-in sheet.
const BuiltinPriceSheetName = "illustrative prices"

// BuiltinPriceSheet returns an illustrative sheet. Its figures are not
// quotations of any market: they are round numbers of a plausible
// order (from memory), chosen so that the arithmetic can be followed.
// Replace them with your own contract prices and plant costs.
func BuiltinPriceSheet() PriceSheet {
	p := PriceSheet{
		Name:         BuiltinPriceSheetName,
		Note:         "illustrative figures, not market prices: replace with your own contracts and plant costs",
		Currency:     "EUR",
		Illustrative: true,
		Route:        RouteGlycolysate,
		// Clean clear flake and aromatic polyester polyol: orders of
		// magnitude from memory.
		FlakePerT:          900,
		GlycolysatePerT:    1400,
		GlycolPerT:         1000, // diethylene glycol, from memory
		WashCostPerT:       200,  // per tonne of bale fed, from memory
		GlycolysisCostPerT: 150,  // per tonne of charge, from memory
		DisposalPerT:       120,  // landfill or incineration gate fee, from memory
		FlakeDeductions: map[string]float64{
			"pvc_ppm": 150, "polyolefins_ppm": 60, "glue_ppm": 40, "paper_ppm": 40,
			"metal_ppm": 100, "moisture_pct": 30, "fines_pct": 30,
		},
		// Aromatic polyester polyols for rigid foam run about 230–400 mg
		// KOH/g (from memory); the window is wider, for blending.
		Hydroxyl: &HydroxylWindow{Min: 200, Max: 550, DeductionPerT: 300},
	}
	if err := p.Validate(); err != nil {
		panic("built-in price sheet: " + err.Error())
	}
	return p
}

// MarshalIndent writes the sheet as the JSON a file holds.
func (p PriceSheet) MarshalIndent() ([]byte, error) {
	b, err := json.MarshalIndent(p, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}
