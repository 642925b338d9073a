package desk

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// What the app's fields read. A field keeps what the user typed; these
// functions turn it into a value or into a sentence that says what to
// fix (wrapping ErrBadInput).

// ErrBadInput is a typed value the app cannot take.
var ErrBadInput = errors.New("bad input")

// Kg converts a mass in this unit to kilograms.
func (u Unit) Kg(v float64) float64 {
	if u == UnitLb {
		return v * KgPerLb
	}
	return v
}

// FromKg converts kilograms to this unit.
func (u Unit) FromKg(kg float64) float64 {
	if u == UnitLb {
		return kg / KgPerLb
	}
	return kg
}

// Mass is a mass as typed: one figure, or pieces weighed one by one and
// written "0.42+0.38+0.51".
type Mass struct {
	Kg     float64
	Pieces int // the number of figures added (1 for a single figure)
}

// ParseMass reads a mass typed in unit u: a decimal point or comma,
// spaces ignored, pieces joined by '+'. Each figure must be above 0.
func ParseMass(text string, u Unit) (Mass, error) {
	t := strings.TrimSpace(text)
	if t == "" {
		return Mass{}, fmt.Errorf("%w: type the mass in %s, as read on the scale", ErrBadInput, u)
	}
	var m Mass
	for _, part := range strings.Split(t, "+") {
		v, err := number(part)
		if err != nil {
			return Mass{}, fmt.Errorf("%w: %q is not a mass: type a number in %s, e.g. 12.5 (pieces as 0.4+0.3)", ErrBadInput, strings.TrimSpace(part), u)
		}
		if v <= 0 {
			return Mass{}, fmt.Errorf("%w: a mass must be above 0 %s; %s is not", ErrBadInput, u, strings.TrimSpace(part))
		}
		m.Kg += u.Kg(v)
		m.Pieces++
	}
	if m.Kg > 2000 {
		return Mass{}, fmt.Errorf("%w: %s %s is more than any bale weighs: check the figure and the unit", ErrBadInput, Num(u.FromKg(m.Kg), 3), u)
	}
	return m, nil
}

// ParseLength reads a bale side in metres; empty is 0 (not measured).
func ParseLength(text string) (float64, error) {
	t := strings.TrimSpace(text)
	if t == "" {
		return 0, nil
	}
	v, err := number(t)
	if err != nil || v <= 0 {
		return 0, fmt.Errorf("%w: type the side in metres, above 0, e.g. 1.22", ErrBadInput)
	}
	if v > MaxSideM {
		return 0, fmt.Errorf("%w: %s m is longer than any bale: give metres (1.22, not 122)", ErrBadInput, Num(v, 3))
	}
	return v, nil
}

// ParseCoords reads a point typed or pasted as "lat, lon" or "lat lon"
// in decimal degrees (WGS 84); a trailing N, S, E or W sets the sign.
func ParseCoords(text string) (lat, lon float64, err error) {
	bad := fmt.Errorf("%w: type latitude and longitude in decimal degrees, e.g. 45.07, 4.71 (or 45.07 N 4.71 E)", ErrBadInput)
	f := strings.FieldsFunc(strings.ToUpper(text), func(r rune) bool { return r == ',' || r == ';' || r == ' ' || r == '\t' || r == '°' })
	var vals []float64
	for i := 0; i < len(f); i++ {
		s := f[i]
		sign := 1.0
		if n := len(s); n > 0 && strings.ContainsRune("NSEW", rune(s[n-1])) {
			if s[n-1] == 'S' || s[n-1] == 'W' {
				sign = -1
			}
			s = s[:n-1]
		}
		if s == "" { // a lone hemisphere letter after the number
			if len(vals) == 0 {
				return 0, 0, bad
			}
			if f[i] == "S" || f[i] == "W" {
				vals[len(vals)-1] = -math.Abs(vals[len(vals)-1])
			}
			continue
		}
		v, e := strconv.ParseFloat(s, 64)
		if e != nil {
			return 0, 0, bad
		}
		vals = append(vals, sign*v)
	}
	if len(vals) != 2 {
		return 0, 0, bad
	}
	lat, lon = vals[0], vals[1]
	if math.IsNaN(lat) || math.Abs(lat) > 90 {
		return 0, 0, fmt.Errorf("%w: latitude %s is outside -90 to 90: is it the longitude? Latitude comes first", ErrBadInput, Num(lat, 6))
	}
	if math.IsNaN(lon) || math.Abs(lon) > 180 {
		return 0, 0, fmt.Errorf("%w: longitude %s is outside -180 to 180", ErrBadInput, Num(lon, 6))
	}
	return lat, lon, nil
}

// number reads a decimal with a point or a comma, spaces ignored.
func number(s string) (float64, error) {
	t := strings.ReplaceAll(strings.TrimSpace(s), " ", "")
	t = strings.ReplaceAll(t, ",", ".")
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, errors.New("not a number")
	}
	return v, nil
}
