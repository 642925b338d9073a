package desk

import (
	"fmt"

	"baleassay/data/record"
)

// BalePreview is what a bale form shows while the grader types: the
// density and the checks a save would ask to confirm.
type BalePreview struct {
	VolumeM3, DensityKgM3 float64 // zero when the dimensions are not all given
	Checks                []Check
}

// PreviewBale gives the density of a bale being typed and the density
// checks of a save (below the common minimum, above the plausible
// maximum: record.MinBaleDensityKgM3, record.MaxPlausibleBaleDensityKgM3).
// It reads nothing from the store.
func PreviewBale(b record.BaleRecord) BalePreview {
	p := BalePreview{VolumeM3: b.VolumeM3(), DensityKgM3: b.DensityKgM3()}
	if p.DensityKgM3 <= 0 || b.GrossKg <= 0 {
		return p
	}
	switch {
	case p.DensityKgM3 < record.MinBaleDensityKgM3:
		p.Checks = append(p.Checks, Check{ConcernLightBale, fmt.Sprintf(
			"%s kg/m³ is below the common minimum of %s kg/m³ for a plastic bale: check the mass and the sides, or note a loose bale",
			Num(p.DensityKgM3, 0), Num(record.MinBaleDensityKgM3, 0))})
	case p.DensityKgM3 > record.MaxPlausibleBaleDensityKgM3:
		p.Checks = append(p.Checks, Check{ConcernDenseBale, fmt.Sprintf(
			"%s kg/m³ is above %s kg/m³, not plausible for a bottle bale: check the mass and the sides",
			Num(p.DensityKgM3, 0), Num(record.MaxPlausibleBaleDensityKgM3, 0))})
	}
	return p
}
