package yield

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"baleassay/assess"
)

// CalibrateOptions give the measurement error of the plant's figures.
type CalibrateOptions struct {
	// ScaleRelSD is the relative standard deviation of a weighing; 0
	// means DefaultScaleRelSD.
	ScaleRelSD float64
	// ScaleAbsKg is its absolute floor in kg; 0 means DefaultScaleAbsKg.
	ScaleAbsKg float64
	// MoistureSD is the standard deviation of a moisture reading in
	// percentage points; 0 means DefaultMoistureSD.
	MoistureSD float64
	// HydroxylSD and AcidSD are the standard deviations of the
	// laboratory's hydroxyl and acid values, mg KOH/g (0: not stated).
	// They do not calibrate the line; they widen the coverage check of
	// those quantities (Agreement.InsideWithError).
	HydroxylSD, AcidSD float64
}

// MeasureSD is the standard deviation of a measured value y of a
// quantity: a weighing's √((ScaleRelSD·y)² + ScaleAbsKg²), a moisture
// reading's MoistureSD, the laboratory's stated SDs (defaults applied).
func (o CalibrateOptions) MeasureSD(q Observable, y float64) float64 {
	o = o.WithDefaults()
	switch q.Kind {
	case ObsMoisturePct:
		return o.MoistureSD
	case ObsHydroxylValue:
		return o.HydroxylSD
	case ObsAcidValue:
		return o.AcidSD
	}
	return math.Hypot(o.ScaleRelSD*y, o.ScaleAbsKg)
}

// Default measurement errors: a weighing good to half a per cent with a
// 1 kg floor, a moisture reading good to 0.1 percentage point. Both from
// memory for industrial platform scales and oven-dry moisture; give your
// own scales' figures.
const (
	DefaultScaleRelSD = 0.005
	DefaultScaleAbsKg = 1.0
	DefaultMoistureSD = 0.1
)

// WithDefaults fills the zero measurement errors with the defaults.
func (o CalibrateOptions) WithDefaults() CalibrateOptions {
	if o.ScaleRelSD == 0 {
		o.ScaleRelSD = DefaultScaleRelSD
	}
	if o.ScaleAbsKg == 0 {
		o.ScaleAbsKg = DefaultScaleAbsKg
	}
	if o.MoistureSD == 0 {
		o.MoistureSD = DefaultMoistureSD
	}
	return o
}

func (o CalibrateOptions) check() error {
	for _, c := range []struct {
		field string
		v     float64
	}{{"scale_rel_sd", o.ScaleRelSD}, {"scale_abs_kg", o.ScaleAbsKg}, {"moisture_sd", o.MoistureSD}} {
		if err := checkPositive("calibration", c.field, c.v); err != nil {
			return err
		}
	}
	for _, c := range []struct {
		field string
		v     float64
	}{{"hydroxyl_sd", o.HydroxylSD}, {"acid_sd", o.AcidSD}} {
		if err := checkNonNegative("calibration", c.field, c.v); err != nil {
			return err
		}
	}
	if o.ScaleRelSD > 0.5 {
		return fieldErr("calibration", "scale_rel_sd", ErrOutOfRange, "%s: give the relative error as a fraction (0.005 for half a per cent)", assess.Plain(o.ScaleRelSD))
	}
	return nil
}

// noise checks one measurement and factorises its error covariance.
func (m Measurement) noise(i int, opt CalibrateOptions) (*mat.Cholesky, error) {
	where := fmt.Sprintf("batch %d", i+1)
	k := len(m.Observe)
	if len(m.Composition) != assess.NumCategories() {
		return nil, fieldErr(where, "composition", ErrCalibration, "%d shares for %d categories", len(m.Composition), assess.NumCategories())
	}
	if k == 0 || len(m.Values) != k || len(m.AuditCov) != k {
		return nil, fieldErr(where, "values", ErrCalibration, "%d quantities, %d values, %d covariance rows", k, len(m.Values), len(m.AuditCov))
	}
	c := mat.NewSymDense(k, nil)
	for a, o := range m.Observe {
		switch o.Kind {
		case ObsFlakeKg, ObsFlakeDryKg, ObsMoisturePct, ObsStreamKg:
		default:
			return nil, fieldErr(where, o.String(), ErrCalibration, "only line quantities (flake, moisture, streams) calibrate a line")
		}
		y := m.Values[a]
		if !finite(y) || y < 0 {
			return nil, fieldErr(where, o.String(), ErrBadNumber, "%v: give a measured value, 0 or above", y)
		}
		if len(m.AuditCov[a]) != k {
			return nil, fieldErr(where, "audit_cov", ErrCalibration, "row %d has %d entries, want %d", a, len(m.AuditCov[a]), k)
		}
		for b := a; b < k; b++ {
			v := m.AuditCov[a][b]
			if !finite(v) {
				return nil, fieldErr(where, "audit_cov", ErrBadNumber, "not a number")
			}
			c.SetSym(a, b, v)
		}
		sd := opt.MeasureSD(o, y)
		c.SetSym(a, a, math.Max(0, c.At(a, a))+sd*sd)
	}
	var ch mat.Cholesky
	if !ch.Factorize(c) {
		return nil, fieldErr(where, "audit_cov", ErrCalibration, "the error covariance is not positive definite")
	}
	return &ch, nil
}
