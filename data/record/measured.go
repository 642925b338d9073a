package record

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"time"

	"baleassay/assess"
	"baleassay/yield"
)

// KindMeasured is the kind of a measured batch (see MeasuredRecord).
const KindMeasured Kind = 5

// Method is the standard a laboratory figure was measured by.
type Method uint8

// The methods. Values are part of the encoding: never renumber.
const (
	// MethodD4274 is ASTM D4274, Standard Test Methods for Testing
	// Polyurethane Raw Materials: Determination of Hydroxyl Numbers of
	// Polyols.
	MethodD4274 Method = 1
	// MethodISO14900 is ISO 14900, Plastics — Polyols for use in the
	// production of polyurethane — Determination of hydroxyl number.
	MethodISO14900 Method = 2
	// MethodD4662 is ASTM D4662, Standard Test Methods for Polyurethane
	// Raw Materials: Determination of Acid and Alkalinity Numbers of
	// Polyols.
	MethodD4662 Method = 3
	// MethodISO2114 is ISO 2114, Plastics (polyester resins) and paints
	// and varnishes (binders) — Determination of partial acid value and
	// total acid value.
	MethodISO2114 Method = 4
)

var methodNames = map[Method]string{MethodD4274: "ASTM D4274", MethodISO14900: "ISO 14900", MethodD4662: "ASTM D4662", MethodISO2114: "ISO 2114"}

func (m Method) String() string {
	if n, ok := methodNames[m]; ok {
		return n
	}
	return fmt.Sprintf("method(%d)", uint8(m))
}

// HydroxylMethod reports whether m measures a hydroxyl value.
func (m Method) HydroxylMethod() bool { return m == MethodD4274 || m == MethodISO14900 }

// AcidMethod reports whether m measures an acid value.
func (m Method) AcidMethod() bool { return m == MethodD4662 || m == MethodISO2114 }

// ParseMethod reads a method as written: "D4274", "ASTM D4274",
// "ISO 14900", "14900", "D4662", "ISO 2114" (case and spaces ignored).
func ParseMethod(s string) (Method, error) {
	key := normMethod(s)
	for m, n := range methodNames {
		if key == normMethod(n) || "ASTM"+key == normMethod(n) || "ISO"+key == normMethod(n) {
			return m, nil
		}
	}
	return 0, fmt.Errorf("method %q is %w: give ASTM D4274 or ISO 14900 for a hydroxyl value, ASTM D4662 or ISO 2114 for an acid value", s, ErrInvalid)
}

func normMethod(s string) string {
	var b []byte
	for i := range len(s) {
		c := s[i]
		switch {
		case c >= 'a' && c <= 'z':
			b = append(b, c-'a'+'A')
		case c == ' ' || c == '-' || c == '_':
		default:
			b = append(b, c)
		}
	}
	return string(b)
}

// MeasuredRecord is what a plant measured of a batch of bales run
// together through a wash line: the flake weighed off the line, its
// moisture, any reject streams weighed, and optionally the glycolysate
// made from that flake with its hydroxyl and acid values as a laboratory
// measured them. Masses in kg.
type MeasuredRecord struct {
	Line        string             `cbor:"1,keyasint"`           // the line profile's name
	Bales       []EntityID         `cbor:"2,keyasint"`           // the bales of the batch
	RanMs       int64              `cbor:"3,keyasint"`           // when the batch ran, Unix ms
	FlakeKg     float64            `cbor:"4,keyasint"`           // flake as weighed off the line, moisture included
	MoisturePct *float64           `cbor:"5,keyasint,omitempty"` // flake moisture, % of the wet flake
	StreamsKg   map[string]float64 `cbor:"6,keyasint,omitempty"` // reject streams weighed, by the line's stream names
	Reactor     *ReactorRecord     `cbor:"7,keyasint,omitempty"`
	Notes       string             `cbor:"8,keyasint,omitempty"`
}

// ReactorRecord is a glycolysis charge made from a batch's flake and
// what came out.
type ReactorRecord struct {
	FlakeKg   float64 `cbor:"1,keyasint"`           // flake charged (taken as dry)
	Glycol    string  `cbor:"2,keyasint"`           // glycol key (EG, DEG, PG, DPG, glycerol)
	GlycolKg  float64 `cbor:"3,keyasint"`           // glycol charged
	StripEG   float64 `cbor:"4,keyasint,omitempty"` // share of the liberated EG stripped, 0–1
	ProductKg float64 `cbor:"5,keyasint,omitempty"` // glycolysate weighed; 0 = not weighed
	// HydroxylValue in mg KOH/g (0 = not measured), by HydroxylMethod.
	HydroxylValue  float64 `cbor:"6,keyasint,omitempty"`
	HydroxylMethod Method  `cbor:"7,keyasint,omitempty"`
	// AcidValue in mg KOH/g (nil = not measured; 0 is a result), by
	// AcidMethod.
	AcidValue  *float64 `cbor:"8,keyasint,omitempty"`
	AcidMethod Method   `cbor:"9,keyasint,omitempty"`
}

// Ranges of a measured batch. They bound what can be physically true,
// not what is usual.
const (
	// MaxBatchBales bounds the bales of one batch (the strict decoder
	// allows 1,024 array elements).
	MaxBatchBales = 1000
	// maxMeasuredBaleKg is the most one bale of a batch can weigh, so
	// the most a batch's flake, streams or reactor charge can weigh is
	// that times its bales. It matches the heaviest bale the records
	// accept (common practice: no baler makes a bale of five tonnes).
	maxMeasuredBaleKg = 5000.0
	// MaxFlakeMoisturePct: flake holding more water than this is a
	// slurry, not flake (dewatered flake holds about 1 %, from memory).
	MaxFlakeMoisturePct = 50.0
	// MaxGlycolRatio bounds glycol to flake by mass: charges run 0.5–3
	// (common practice); above 20 the product is glycol with a trace.
	MaxGlycolRatio = 20.0
	// maxCatalystShare is the most catalyst a charge may add to its
	// product (10 wt % of the PET, the recipe's limit).
	maxCatalystShare = 0.10
	maxStreams       = 32
)

// MaxAcidValue is the acid value of pure terephthalic acid, C8H6O4,
// 166.13 g/mol with two acid groups: 2·56106/166.13 = 675.4 mg KOH/g
// (computed). Nothing made of PET and glycols can be more acidic.
var MaxAcidValue = 2 * yield.KOH * 1000 / 166.13

// measured-record time range, as for clock stamps: 2000-01-01 to
// 2100-01-01 UTC (exclusive).
var (
	measuredMinMs = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
	measuredMaxMs = time.Date(2100, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
)

// ErrMeasured marks a measured value outside its physical range.
var ErrMeasured = errors.New("measured value outside its physical range")

func measuredErr(field string, x float64, format string, args ...any) error {
	return &FieldError{Field: field, Value: fnum(x), Err: fmt.Errorf("%w: "+format, append([]any{ErrMeasured}, args...)...)}
}

// checkMass refuses a mass that is not finite, negative (or zero when
// positive) or above max.
func checkMass(field string, x float64, positive bool, max float64) error {
	return checkMassOr(field, x, positive, max, "above %s kg, more than the batch's bales can weigh; check the unit (kg)", fnum(max))
}

// checkMassOr is checkMass with its own message for a mass above max.
func checkMassOr(field string, x float64, positive bool, max float64, tooMuch string, args ...any) error {
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0):
		return &FieldError{Field: field, Value: fnum(x), Err: ErrNonFinite}
	case x < 0:
		return &FieldError{Field: field, Value: fnum(x), Err: ErrNegative}
	case positive && x == 0:
		return &FieldError{Field: field, Value: fnum(x), Err: ErrNotPositive}
	case x > max:
		return measuredErr(field, x, tooMuch, args...)
	}
	return nil
}

func validateMeasured(m MeasuredRecord) error {
	if err := checkText("measured.line", m.Line, maxNameRunes, true); err != nil {
		return err
	}
	n := len(m.Bales)
	if n == 0 {
		return &FieldError{Field: "measured.bales", Err: ErrRequired}
	}
	if n > MaxBatchBales {
		return &FieldError{Field: "measured.bales", Value: strconv.Itoa(n), Err: fmt.Errorf("%w: at most %d bales in one batch", ErrMeasured, MaxBatchBales)}
	}
	seen := make(map[EntityID]bool, n)
	for i, b := range m.Bales {
		if b.IsZero() {
			return &FieldError{Field: fmt.Sprintf("measured.bales[%d]", i), Err: ErrMissingID}
		}
		if seen[b] {
			return &FieldError{Field: fmt.Sprintf("measured.bales[%d]", i), Value: b.String(), Err: fmt.Errorf("%w: listed twice", ErrInvalid)}
		}
		seen[b] = true
	}
	if m.RanMs < measuredMinMs || m.RanMs >= measuredMaxMs {
		return &FieldError{Field: "measured.ran", Value: strconv.FormatInt(m.RanMs, 10), Err: fmt.Errorf("%w: a date from 2000-01-01 to 2099-12-31", ErrMeasured)}
	}
	maxKg := float64(n) * maxMeasuredBaleKg
	if err := checkMass("measured.flake_kg", m.FlakeKg, true, maxKg); err != nil {
		return err
	}
	if p := m.MoisturePct; p != nil {
		if math.IsNaN(*p) || math.IsInf(*p, 0) {
			return &FieldError{Field: "measured.moisture_pct", Value: fnum(*p), Err: ErrNonFinite}
		}
		if *p < 0 || *p > MaxFlakeMoisturePct {
			return measuredErr("measured.moisture_pct", *p, "give the flake's moisture in %% of the wet flake, 0 to %s", assess.Plain(MaxFlakeMoisturePct))
		}
	}
	if len(m.StreamsKg) > maxStreams {
		return &FieldError{Field: "measured.streams", Value: strconv.Itoa(len(m.StreamsKg)), Err: fmt.Errorf("%w: at most %d streams", ErrMeasured, maxStreams)}
	}
	for _, k := range SortedKeys(m.StreamsKg) {
		if !yield.IsStreamName(k) {
			return &FieldError{Field: "measured.streams." + k, Err: fmt.Errorf("%w: a stream name is lower-case letters, digits and _", ErrInvalid)}
		}
		if err := checkMass("measured.streams."+k, m.StreamsKg[k], false, maxKg); err != nil {
			return err
		}
	}
	if r := m.Reactor; r != nil {
		if err := validateReactor(*r, m.FlakeKg); err != nil {
			return err
		}
	}
	return checkText("measured.notes", m.Notes, maxNotesRunes, false)
}

func validateReactor(r ReactorRecord, batchFlakeKg float64) error {
	if err := checkMassOr("measured.reactor.flake_kg", r.FlakeKg, true, batchFlakeKg,
		"more flake than the batch gave (%s kg); a charge comes from the batch's flake", fnum(batchFlakeKg)); err != nil {
		return err
	}
	g, err := yield.LookupGlycol(r.Glycol)
	if err != nil {
		return &FieldError{Field: "measured.reactor.glycol", Value: r.Glycol, Err: fmt.Errorf("%w: %w", ErrInvalid, err)}
	}
	if err := checkMassOr("measured.reactor.glycol_kg", r.GlycolKg, true, MaxGlycolRatio*r.FlakeKg,
		"more than %s times the flake charged; check the unit (kg)", assess.Plain(MaxGlycolRatio)); err != nil {
		return err
	}
	if math.IsNaN(r.StripEG) || r.StripEG < 0 || r.StripEG > 1 {
		return measuredErr("measured.reactor.strip_eg", r.StripEG, "give the stripped share of the liberated EG from 0 to 1")
	}
	if err := checkMassOr("measured.reactor.product_kg", r.ProductKg, false, r.FlakeKg*(1+maxCatalystShare)+r.GlycolKg,
		"more glycolysate than flake, glycol and catalyst charged; nothing else goes in"); err != nil {
		return err
	}
	// Pure glycol has the highest hydroxyl value a glycolysate of it can
	// have: PET adds mass and no hydroxyl groups (OH conservation).
	maxOHV := yield.KOH * 1000 * float64(g.Functionality) / g.MolarMass
	switch ohv := r.HydroxylValue; {
	case math.IsNaN(ohv) || math.IsInf(ohv, 0):
		return &FieldError{Field: "measured.reactor.hydroxyl_value", Value: fnum(ohv), Err: ErrNonFinite}
	case ohv < 0 || ohv > maxOHV:
		return measuredErr("measured.reactor.hydroxyl_value", ohv, "a glycolysate of %s lies from 0 to %.0f mg KOH/g (pure %s)", g.Key, maxOHV, g.Key)
	case ohv > 0 && !r.HydroxylMethod.HydroxylMethod():
		return &FieldError{Field: "measured.reactor.hydroxyl_method", Value: r.HydroxylMethod.String(), Err: fmt.Errorf("%w: a hydroxyl value needs its method, ASTM D4274 or ISO 14900", ErrInvalid)}
	case ohv == 0 && r.HydroxylMethod != 0:
		return &FieldError{Field: "measured.reactor.hydroxyl_method", Value: r.HydroxylMethod.String(), Err: fmt.Errorf("%w: a method without a hydroxyl value", ErrInvalid)}
	}
	if av := r.AcidValue; av != nil {
		if math.IsNaN(*av) || math.IsInf(*av, 0) {
			return &FieldError{Field: "measured.reactor.acid_value", Value: fnum(*av), Err: ErrNonFinite}
		}
		if *av < 0 || *av > MaxAcidValue {
			return measuredErr("measured.reactor.acid_value", *av, "an acid value lies from 0 to %.1f mg KOH/g (pure terephthalic acid)", MaxAcidValue)
		}
		if !r.AcidMethod.AcidMethod() {
			return &FieldError{Field: "measured.reactor.acid_method", Value: r.AcidMethod.String(), Err: fmt.Errorf("%w: an acid value needs its method, ASTM D4662 or ISO 2114", ErrInvalid)}
		}
	} else if r.AcidMethod != 0 {
		return &FieldError{Field: "measured.reactor.acid_method", Value: r.AcidMethod.String(), Err: fmt.Errorf("%w: a method without an acid value", ErrInvalid)}
	}
	return nil
}

// PayloadOf returns an event holding only e's payload and deletion
// flag: what a resolving edit copies from the head it keeps.
func PayloadOf(e Event) Event {
	return Event{Deleted: e.Deleted, Site: e.Site, Bale: e.Bale, Pull: e.Pull, Setting: e.Setting, Measured: e.Measured}
}
