package ui

import (
	"fmt"
	"strconv"
	"strings"
)

// MassUnit is the unit the grader types and reads masses in. The store
// always holds kilograms.
type MassUnit int

// The units.
const (
	Kilogram MassUnit = iota
	Pound
)

// poundKg is the international avoirdupois pound.
// Source: NIST SP 811 (2008), Appendix B.8: 1 lb = 0.45359237 kg (exact).
const poundKg = 0.45359237

func (u MassUnit) String() string {
	if u == Pound {
		return "lb"
	}
	return "kg"
}

// ToKg converts a mass in this unit to kilograms.
func (u MassUnit) ToKg(v float64) float64 {
	if u == Pound {
		return v * poundKg
	}
	return v
}

// FromKg converts kilograms to this unit.
func (u MassUnit) FromKg(kg float64) float64 {
	if u == Pound {
		return kg / poundKg
	}
	return kg
}

// Format writes a mass given in kg in this unit with its symbol.
func (u MassUnit) Format(kg float64, decimals int) string {
	return strconv.FormatFloat(u.FromKg(kg), 'f', decimals, 64) + " " + u.String()
}

// parseNumber reads a number as typed in a yard: a decimal comma is
// accepted, spaces are ignored. It does not judge the value.
func parseNumber(s string) (float64, error) {
	t := strings.ReplaceAll(strings.TrimSpace(s), " ", "")
	t = strings.ReplaceAll(t, ",", ".")
	if t == "" {
		return 0, errEmpty
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}
