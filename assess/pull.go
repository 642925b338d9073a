package assess

import (
	"errors"
	"fmt"
	"math"
)

// Sentinel errors of the audit model. Errors returned by this package wrap
// one of them; test with errors.Is.
var (
	ErrNoPulls          = errors.New("assess: audit has no pulls")
	ErrNegativeMass     = errors.New("assess: mass is negative")
	ErrNonFiniteMass    = errors.New("assess: mass is not a finite number")
	ErrEmptyPull        = errors.New("assess: pull has zero mass")
	ErrDuplicatePull    = errors.New("assess: duplicate pull label")
	ErrBaleLighter      = errors.New("assess: bale mass is below the sampled mass")
	ErrUnknownCategory  = errors.New("assess: unknown category")
	ErrBadConfidence    = errors.New("assess: confidence level outside (0, 1)")
	ErrNegativeCount    = errors.New("assess: piece count is negative")
	ErrBadSpec          = errors.New("assess: invalid spec")
	ErrBadPrecision     = errors.New("assess: relative precision must be above 0")
	ErrCategoryMismatch = errors.New("assess: pull does not match the catalogue")
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
}

// NewPull returns an empty pull with slices sized to the catalogue.
func NewPull(label string) Pull {
	return Pull{Label: label, Kg: make([]float64, len(catalogue))}
}

// Set sets the mass of a category by key.
func (p *Pull) Set(key string, kg float64) error {
	i, ok := CategoryIndex(key)
	if !ok {
		return fmt.Errorf("%w %q", ErrUnknownCategory, key)
	}
	p.Kg[i] = kg
	return nil
}

// SetPieces sets the piece count of a category by key.
func (p *Pull) SetPieces(key string, n int) error {
	i, ok := CategoryIndex(key)
	if !ok {
		return fmt.Errorf("%w %q", ErrUnknownCategory, key)
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
		return fmt.Errorf("pull %q: %w", p.Label, ErrCategoryMismatch)
	}
	for i, m := range p.Kg {
		if math.IsNaN(m) || math.IsInf(m, 0) {
			return fmt.Errorf("pull %q, %s: %w", p.Label, catalogue[i].Key, ErrNonFiniteMass)
		}
		if m < 0 {
			return fmt.Errorf("pull %q, %s = %g kg: %w", p.Label, catalogue[i].Key, m, ErrNegativeMass)
		}
	}
	for i, n := range p.Pieces {
		if n < NotCounted {
			return fmt.Errorf("pull %q, %s = %d pieces: %w", p.Label, catalogue[i].Key, n, ErrNegativeCount)
		}
	}
	if p.TotalKg() <= 0 {
		return fmt.Errorf("pull %q: %w", p.Label, ErrEmptyPull)
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
		return ErrNoPulls
	}
	seen := make(map[string]bool, len(a.Pulls))
	for _, p := range a.Pulls {
		if err := p.Validate(); err != nil {
			return err
		}
		if seen[p.Label] {
			return fmt.Errorf("pull %q: %w", p.Label, ErrDuplicatePull)
		}
		seen[p.Label] = true
	}
	if math.IsNaN(a.BaleKg) || math.IsInf(a.BaleKg, 0) || a.BaleKg < 0 {
		return fmt.Errorf("bale mass %g kg: %w", a.BaleKg, ErrNonFiniteMass)
	}
	// A relative slack of 1e-9 keeps a whole-bale sort (f = 1) from
	// failing on rounding.
	if s := a.SampledKg(); a.BaleKg > 0 && a.BaleKg < s*(1-1e-9) {
		return fmt.Errorf("bale %g kg, pulls %g kg: %w", a.BaleKg, s, ErrBaleLighter)
	}
	return nil
}
