package yield

import (
	"baleassay/assess"
	"bytes"
	"encoding/json"
	"fmt"
)

// Param is a stage efficiency or share: one value, or a range [Lo, Hi]
// from which the Monte Carlo run draws uniformly. In JSON it is a number
// (0.95) or a two-element array ([0.93, 0.97]). The deterministic model
// uses the midpoint.
type Param struct {
	Lo, Hi float64
	set    bool
}

// Fixed returns a Param of one value.
func Fixed(v float64) Param { return Param{Lo: v, Hi: v, set: true} }

// Range returns a Param drawn from [lo, hi].
func Range(lo, hi float64) Param { return Param{Lo: lo, Hi: hi, set: true} }

// IsSet reports whether the Param was given.
func (p Param) IsSet() bool { return p.set }

// Mid is the value the deterministic model uses.
func (p Param) Mid() float64 { return (p.Lo + p.Hi) / 2 }

// Varies reports whether the Param is a range of non-zero width.
func (p Param) Varies() bool { return p.Hi > p.Lo }

// UnmarshalJSON reads a number or a [lo, hi] pair.
func (p *Param) UnmarshalJSON(b []byte) error {
	b = bytes.TrimSpace(b)
	if string(b) == "null" {
		return fmt.Errorf("want a number or [low, high], not null; leave the field out instead")
	}
	if len(b) > 0 && b[0] == '[' {
		var r []float64
		if err := json.Unmarshal(b, &r); err != nil {
			return fmt.Errorf("want a number or [low, high]: %w", err)
		}
		if len(r) != 2 {
			return fmt.Errorf("want a number or [low, high], got %d numbers", len(r))
		}
		*p = Range(r[0], r[1])
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return fmt.Errorf("want a number or [low, high]: %w", err)
	}
	*p = Fixed(v)
	return nil
}

// MarshalJSON writes a number, or [lo, hi] for a range.
func (p Param) MarshalJSON() ([]byte, error) {
	if p.Varies() {
		return json.Marshal([2]float64{p.Lo, p.Hi})
	}
	return json.Marshal(p.Lo)
}

// checkParam checks that a Param is a fraction range 0 ≤ Lo ≤ Hi ≤ 1.
func checkParam(where, field string, p Param) error {
	if err := checkFraction(where, field, p.Lo); err != nil {
		return err
	}
	if err := checkFraction(where, field, p.Hi); err != nil {
		return err
	}
	if p.Lo > p.Hi {
		return fieldErr(where, field, ErrOutOfRange, "range [%s, %s] runs backwards; give [low, high]", assess.Plain(p.Lo), assess.Plain(p.Hi))
	}
	return nil
}
