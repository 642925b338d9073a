package yield

import "baleassay/assess"

// SinkShare is the share of a category that sinks in a bath of density
// bath (g/cm³), from the category's nominal density range [a, b]:
//
//	b < bath            0 (floats)
//	a > bath            1 (sinks)
//	a < bath < b        (b − bath) / (b − a)   (overlap share)
//	a = b = bath        ½ (neutrally buoyant)
//
// The density is taken as spread evenly over its range. ok is false when
// the category has no meaningful density (hazards); the line model then
// leaves it with the product. Densities: the catalogue's, each with its
// source (assess.Category.DensitySource).
func SinkShare(r assess.DensityRange, bath float64) (share float64, ok bool) {
	if !r.Known() {
		return 0, false
	}
	switch {
	case r.Max < bath:
		return 0, true
	case r.Min > bath:
		return 1, true
	case r.Max == r.Min:
		return 0.5, true
	}
	lo := r.Min
	if bath > lo {
		lo = bath
	}
	return (r.Max - lo) / (r.Max - r.Min), true
}
