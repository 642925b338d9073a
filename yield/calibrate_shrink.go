package yield

import (
	"math"

	"baleassay/assess"
)

// MinShrinkBatches is the fewest batches whose compositions' spread is
// estimated for regression calibration.
const MinShrinkBatches = 8

// shrinkCompositions applies regression calibration to the batches'
// compositions in place (see Calibrate) and reports whether it did.
func shrinkCompositions(ms []Measurement) bool {
	if len(ms) < MinShrinkBatches {
		return false
	}
	nc := assess.NumCategories()
	for _, m := range ms {
		if len(m.ShareVar) != nc {
			return false
		}
	}
	mass := make([]float64, len(ms))
	shares := make([][]float64, len(ms))
	for i, m := range ms {
		for _, v := range m.Composition {
			mass[i] += v
		}
		if !(mass[i] > 0) {
			return false
		}
		shares[i] = make([]float64, nc)
		for c, v := range m.Composition {
			shares[i][c] = v / mass[i]
		}
	}
	n := float64(len(ms))
	for c := range nc {
		if isPETComp[c] {
			continue
		}
		col := make([]float64, len(ms))
		errVar := 0.0
		for i := range ms {
			col[i] = shares[i][c]
			errVar += ms[i].ShareVar[c] / n
		}
		mean, sd := meanSD(col)
		spread := math.Max(0, sd*sd-errVar)
		for i := range ms {
			lambda := 0.0
			if spread > 0 {
				lambda = spread / (spread + ms[i].ShareVar[c])
			}
			shares[i][c] = mean + lambda*(col[i]-mean)
		}
	}
	for i := range ms {
		other, pet := 0.0, 0.0
		for c, v := range shares[i] {
			if isPETComp[c] {
				pet += v
			} else {
				other += v
			}
		}
		k := 1.0
		if pet > 0 {
			k = math.Max(0, 1-other) / pet
		}
		comp := make([]float64, nc)
		for c, v := range shares[i] {
			if isPETComp[c] {
				v *= k
			}
			comp[c] = v * mass[i]
		}
		ms[i].Composition = comp
	}
	return true
}
