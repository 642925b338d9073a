package assess

import (
	"math"
	"strings"
)

// NotCounted marks a category whose pieces were not counted in a pull.
const NotCounted = -1

// Pull is one grab sample from a bale, sorted and weighed by category.
// Kg and Pieces are indexed by catalogue index (see CategoryIndex).
type Pull struct {
	Label string
	// Kg holds the mass of each category in kilograms.
	Kg []float64
	// Pieces holds piece counts, NotCounted where none was taken. A nil
	// slice means no category was counted.
	Pieces []int
	// TotalPieces is the number of pieces examined in the pull, all
	// categories together; 0 when not counted. It is the denominator of
	// piece shares.
	TotalPieces int
}

// NewPull returns an empty pull with slices sized to the catalogue.
func NewPull(label string) Pull {
	return Pull{Label: label, Kg: make([]float64, len(catalogue))}
}

// Set sets the mass of a category by key.
func (p *Pull) Set(key string, kg float64) error {
	i, ok := CategoryIndex(key)
	if !ok {
		return errorf(ErrUnknownCategory, "unknown category %q; valid keys are: %s", key, strings.Join(CategoryKeys(), ", "))
	}
	p.Kg[i] = kg
	return nil
}

// SetPieces sets the piece count of a category by key.
func (p *Pull) SetPieces(key string, n int) error {
	i, ok := CategoryIndex(key)
	if !ok {
		return errorf(ErrUnknownCategory, "unknown category %q; valid keys are: %s", key, strings.Join(CategoryKeys(), ", "))
	}
	if p.Pieces == nil {
		p.Pieces = make([]int, len(catalogue))
		for j := range p.Pieces {
			p.Pieces[j] = NotCounted
		}
	}
	p.Pieces[i] = n
	return nil
}

// countedPieces adds the pieces counted in the pull's categories.
func (p Pull) countedPieces() int {
	t := 0
	for _, n := range p.Pieces {
		if n > 0 {
			t += n
		}
	}
	return t
}

// TotalKg is the pull's mass, the sum over categories.
func (p Pull) TotalKg() float64 {
	var t float64
	for _, m := range p.Kg {
		t += m
	}
	return t
}

// Validate checks one pull: finite, non-negative masses, counts not
// negative, and a mass above zero.
func (p Pull) Validate() error {
	if len(p.Kg) != len(catalogue) || (p.Pieces != nil && len(p.Pieces) != len(catalogue)) {
		return errorf(ErrCategoryMismatch, "pull %q has %d masses for %d categories; build pulls with NewPull", p.Label, len(p.Kg), len(catalogue))
	}
	for i, m := range p.Kg {
		if math.IsNaN(m) || math.IsInf(m, 0) {
			return errorf(ErrNonFiniteMass, "pull %q: the %s mass %v is not a number; write kilograms, e.g. 1.25", p.Label, catalogue[i].Key, m)
		}
		if m < 0 {
			return errorf(ErrNegativeMass, "pull %q: the %s mass %s kg is negative; masses are 0 or more", p.Label, catalogue[i].Key, Plain(m))
		}
	}
	for i, n := range p.Pieces {
		if n < NotCounted {
			return errorf(ErrNegativeCount, "pull %q: %d %s pieces is negative; counts are 0 or more", p.Label, n, catalogue[i].Key)
		}
	}
	if p.TotalPieces < 0 {
		return errorf(ErrNegativeCount, "pull %q: %d pieces examined is negative; counts are 0 or more", p.Label, p.TotalPieces)
	}
	if counted := p.countedPieces(); p.TotalPieces > 0 && counted > p.TotalPieces {
		return errorf(ErrBadTotal, "pull %q: %d %s examined, but the categories count %d; the total counts every piece of the pull", p.Label, p.TotalPieces, plural(p.TotalPieces, "piece", "pieces"), counted)
	}
	if p.TotalKg() <= 0 {
		return errorf(ErrEmptyPull, "pull %q weighs 0 kg; enter its masses or leave it out", p.Label)
	}
	return nil
}

// Audit is the set of pulls taken from one bale.
type Audit struct {
	Pulls []Pull
	// BaleKg is the bale's gross mass. Zero means unknown: the
	// finite-population correction is then left out (treated as 0).
	BaleKg float64
}

// SampledKg is the total mass of all pulls.
func (a Audit) SampledKg() float64 {
	var t float64
	for _, p := range a.Pulls {
		t += p.TotalKg()
	}
	return t
}

// SampledShare is the sampling fraction f = sampled kg / bale kg used by
// the finite-population correction, 0 when the bale mass is unknown.
func (a Audit) SampledShare() float64 {
	if a.BaleKg <= 0 {
		return 0
	}
	return math.Min(1, a.SampledKg()/a.BaleKg)
}

// Validate checks every pull, unique labels and that the bale is not
// lighter than what was sampled from it.
func (a Audit) Validate() error {
	if len(a.Pulls) == 0 {
		return errorf(ErrNoPulls, "the audit has no pulls; add at least one")
	}
	seen := make(map[string]bool, len(a.Pulls))
	for _, p := range a.Pulls {
		if err := p.Validate(); err != nil {
			return err
		}
		if seen[p.Label] {
			return errorf(ErrDuplicatePull, "pull label %q is used twice; give every pull its own label", p.Label)
		}
		seen[p.Label] = true
	}
	if math.IsNaN(a.BaleKg) || math.IsInf(a.BaleKg, 0) || a.BaleKg < 0 {
		return errorf(ErrNonFiniteMass, "the bale mass %s kg is not a mass; give the gross mass in kg, or 0 when unknown", Plain(a.BaleKg))
	}
	// A relative slack of 1e-9 keeps a whole-bale sort (f = 1) from
	// failing on rounding.
	if s := a.SampledKg(); a.BaleKg > 0 && a.BaleKg < s*(1-1e-9) {
		return errorf(ErrBaleLighter, "the bale (%s kg) weighs less than its pulls (%s kg); check the bale mass or the pull masses", Plain(a.BaleKg), Plain(s))
	}
	return nil
}
