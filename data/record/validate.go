package record

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"baleassay/assess"
	"baleassay/yield"
)

// Limits used by validation.
const (
	// MinBaleDensityKgM3 is the common minimum bale density of trade
	// specifications for plastic bales, 160 kg/m³ (10 lb/ft³) (ISRI,
	// Scrap Specifications Circular, plastic scrap section). Lighter bales
	// get a warning.
	MinBaleDensityKgM3 = 160.0
	// MaxPlausibleBaleDensityKgM3 is the density above which a bale is
	// not physically plausible as bottle feedstock: about twice the
	// densest typical PET bale (430 kg/m³) and two thirds of solid PET
	// (1,380 kg/m³), so a typing error in mass or dimensions is likely.
	// Illustrative threshold; it gives a warning, not an error.
	MaxPlausibleBaleDensityKgM3 = 900.0
	// PullPartsTolerance and PullPartsToleranceKg bound how far the sum
	// of a pull's sorted parts may exceed its weighed mass (scale
	// resolution and tare): parts ≤ stated·(1 + tol) + tolKg.
	// Illustrative values, common practice for platform scales.
	PullPartsTolerance   = 0.02
	PullPartsToleranceKg = 0.05

	maxNameRunes  = 200
	maxNotesRunes = 4000
	maxSettingLen = 64 << 10
)

// WarningCode names an implausible-but-possible value.
type WarningCode uint8

// The warnings.
const (
	WarnNullIsland  WarningCode = iota + 1 // coordinates exactly 0, 0
	WarnDenseBale                          // denser than physically plausible
	WarnLightBale                          // below the common minimum bale density
	WarnFutureClock                        // clock stamp ahead of this device's clock
)

var warnNames = [...]string{"", "null_island", "dense_bale", "light_bale", "future_clock"}

func (c WarningCode) String() string {
	if int(c) < len(warnNames) && c > 0 {
		return warnNames[c]
	}
	return fmt.Sprintf("warning(%d)", uint8(c))
}

// Warning is an implausible value the user may confirm.
type Warning struct {
	Code    WarningCode
	Field   string
	Message string
}

func (w Warning) String() string { return w.Field + ": " + w.Message }

// ValidateEvent checks one event against the record rules, with the
// present time for the clock check. It is the one validation used by the
// CLI, the store, the importer and the app: impossible values are errors
// (*FieldError wrapping ErrInvalid and a specific sentinel), implausible
// ones are warnings.
func ValidateEvent(e Event) ([]Warning, error) { return ValidateEventAt(e, time.Now()) }

// ValidateEventAt is ValidateEvent with an explicit present time.
func ValidateEventAt(e Event, now time.Time) ([]Warning, error) {
	var w []Warning
	if e.Version != FormatVersion {
		return nil, &FieldError{Field: "version", Value: strconv.Itoa(int(e.Version)), Err: ErrVersion}
	}
	if e.Entity.IsZero() {
		return nil, &FieldError{Field: "entity", Err: ErrMissingID}
	}
	if e.Device == (DeviceID{}) {
		return nil, &FieldError{Field: "device", Err: ErrMissingID}
	}
	if !e.Kind.Valid() {
		return nil, &FieldError{Field: "kind", Value: strconv.Itoa(int(e.Kind)), Err: ErrKind}
	}
	if err := checkTime("clock", e.Clock.WallMs); err != nil {
		return nil, err
	}
	if lim := now.Add(MaxClockAhead).UnixMilli(); e.Clock.WallMs > lim {
		w = append(w, Warning{WarnFutureClock, "clock", fmt.Sprintf("stamp %s is %s ahead of this device's clock; the author's clock may be wrong",
			e.Clock.Time().Format(time.RFC3339), FormatSkew(e.Clock.WallMs-now.UnixMilli()))})
	}
	seen := make(map[EventID]bool, len(e.Supersedes))
	for i, s := range e.Supersedes {
		if s == (EventID{}) {
			return nil, &FieldError{Field: fmt.Sprintf("supersedes[%d]", i), Err: ErrMissingID}
		}
		if seen[s] {
			return nil, &FieldError{Field: fmt.Sprintf("supersedes[%d]", i), Value: s.Short(), Err: fmt.Errorf("%w: listed twice", ErrInvalid)}
		}
		seen[s] = true
	}
	payloads := 0
	for _, set := range []bool{e.Site != nil, e.Bale != nil, e.Pull != nil, e.Setting != nil, e.Measured != nil} {
		if set {
			payloads++
		}
	}
	if e.Deleted {
		if payloads != 0 || len(e.Supersedes) == 0 {
			return nil, &FieldError{Field: "deleted", Err: ErrTombstone}
		}
		return w, nil
	}
	var ww []Warning
	var err error
	switch {
	case payloads != 1:
		err = &FieldError{Field: "payload", Value: fmt.Sprintf("%d payloads", payloads), Err: ErrPayload}
	case e.Kind == KindSite && e.Site != nil:
		ww, err = validateSite(*e.Site)
	case e.Kind == KindBale && e.Bale != nil:
		ww, err = validateBale(*e.Bale)
	case e.Kind == KindPull && e.Pull != nil:
		err = validatePull(*e.Pull)
	case e.Kind == KindSetting && e.Setting != nil:
		err = validateSetting(*e.Setting)
	case e.Kind == KindMeasured && e.Measured != nil:
		err = validateMeasured(*e.Measured)
	default:
		err = &FieldError{Field: "payload", Value: "kind " + e.Kind.String(), Err: ErrPayload}
	}
	if err != nil {
		return nil, err
	}
	return append(w, ww...), nil
}

// fnum writes a number for a message: plain decimals, never an
// exponent (assess.Plain).
func fnum(x float64) string { return assess.Plain(x) }

// checkFinite returns a FieldError for NaN or ±Inf.
func checkFinite(field string, x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return &FieldError{Field: field, Value: fnum(x), Err: ErrNonFinite}
	}
	return nil
}

// CheckName checks a required short text (a name or label): not blank,
// UTF-8, at most 200 characters.
func CheckName(field, s string) error { return checkText(field, s, maxNameRunes, true) }

func checkText(field, s string, max int, required bool) error {
	if required && strings.TrimSpace(s) == "" {
		return &FieldError{Field: field, Err: ErrRequired}
	}
	if !utf8.ValidString(s) {
		return &FieldError{Field: field, Err: fmt.Errorf("%w: not UTF-8", ErrInvalid)}
	}
	if r, at, ok := TerminalSafe(s); !ok {
		return &FieldError{Field: field, Value: fmt.Sprintf("U+%04X at character %d", r, utf8.RuneCountInString(s[:at])+1),
			Err: fmt.Errorf("%w: names, tags, labels and notes are one line of printable text", ErrControlChar)}
	}
	if n := utf8.RuneCountInString(s); n > max {
		return &FieldError{Field: field, Value: fmt.Sprintf("%d characters", n), Err: fmt.Errorf("%w (at most %d)", ErrTooLong, max)}
	}
	return nil
}

// ValidateLatLon checks WGS 84 coordinates: finite, |lat| ≤ 90, |lon| ≤ 180.
func ValidateLatLon(lat, lon float64) error {
	if err := checkFinite("lat", lat); err != nil {
		return err
	}
	if err := checkFinite("lon", lon); err != nil {
		return err
	}
	if lat < -90 || lat > 90 {
		return &FieldError{Field: "lat", Value: fnum(lat), Err: ErrLatitude}
	}
	if lon < -180 || lon > 180 {
		return &FieldError{Field: "lon", Value: fnum(lon), Err: ErrLongitude}
	}
	return nil
}

func validateSite(s SiteRecord) ([]Warning, error) {
	if err := checkText("site.name", s.Name, maxNameRunes, true); err != nil {
		return nil, err
	}
	if err := checkText("site.notes", s.Notes, maxNotesRunes, false); err != nil {
		return nil, err
	}
	if int(s.Kind) >= len(siteKindNames) {
		return nil, &FieldError{Field: "site.kind", Value: strconv.Itoa(int(s.Kind)), Err: ErrInvalid}
	}
	if err := ValidateLatLon(s.Lat, s.Lon); err != nil {
		fe := err.(*FieldError)
		fe.Field = "site." + fe.Field
		return nil, fe
	}
	if s.Lat == 0 && s.Lon == 0 {
		return []Warning{{WarnNullIsland, "site.lat", "coordinates are exactly 0, 0 (in the Gulf of Guinea): usually a GPS fix that never came"}}, nil
	}
	return nil, nil
}

func validateBale(b BaleRecord) ([]Warning, error) {
	if b.Site.IsZero() {
		return nil, &FieldError{Field: "bale.site", Err: ErrMissingID}
	}
	if err := checkDate("bale.received", b.ReceivedMs); err != nil {
		return nil, err
	}
	if err := checkKg("bale.gross_kg", b.GrossKg, true, ErrNonFinite, ErrNotPositive); err != nil {
		return nil, err
	}
	dims := []struct {
		name string
		v    float64
	}{{"bale.length_m", b.LengthM}, {"bale.width_m", b.WidthM}, {"bale.height_m", b.HeightM}}
	zero := 0
	for _, d := range dims {
		if err := checkFinite(d.name, d.v); err != nil {
			return nil, err
		}
		if d.v < 0 {
			return nil, &FieldError{Field: d.name, Value: fnum(d.v), Err: ErrNegative}
		}
		if d.v > MaxBaleDimM {
			return nil, &FieldError{Field: d.name, Value: fnum(d.v), Err: fmt.Errorf("%w: above %s m; give metres, not centimetres", ErrOutOfRange, assess.Plain(MaxBaleDimM))}
		}
		if d.v == 0 {
			zero++
		}
	}
	if zero != 0 && zero != 3 {
		for _, d := range dims {
			if d.v == 0 {
				return nil, &FieldError{Field: d.name, Value: "0", Err: fmt.Errorf("%w: give all three dimensions or none", ErrNotPositive)}
			}
		}
	}
	for _, t := range []struct{ f, s string }{{"bale.tag", b.Tag}, {"bale.grader", b.Grader}, {"bale.spec", b.Spec}} {
		if err := checkText(t.f, t.s, maxNameRunes, false); err != nil {
			return nil, err
		}
	}
	if err := checkText("bale.notes", b.Notes, maxNotesRunes, false); err != nil {
		return nil, err
	}
	if zero == 3 {
		return nil, nil
	}
	d := b.DensityKgM3()
	if d > MaxPlausibleBaleDensityKgM3 {
		return []Warning{{WarnDenseBale, "bale.gross_kg", fmt.Sprintf("density %.0f kg/m³ is above %.0f kg/m³, not plausible for a bottle bale: check mass and dimensions", d, MaxPlausibleBaleDensityKgM3)}}, nil
	}
	if d < MinBaleDensityKgM3 {
		return []Warning{{WarnLightBale, "bale.gross_kg", fmt.Sprintf("density %.0f kg/m³ is below the common minimum of %.0f kg/m³: a loose bale, or check mass and dimensions", d, MinBaleDensityKgM3)}}, nil
	}
	return nil, nil
}

// AssessPull converts a pull record to the audit model of package assess
// (slices by catalogue index). Unknown keys are an error.
func AssessPull(p PullRecord) (assess.Pull, error) { return assessPull(p, SortedKeys(p.Kg)) }

// assessPull is AssessPull with the keys of p.Kg already sorted.
func assessPull(p PullRecord, kgKeys []string) (assess.Pull, error) {
	ap := assess.NewPull(p.Label)
	for _, k := range kgKeys {
		if err := ap.Set(k, p.Kg[k]); err != nil {
			return ap, &FieldError{Field: "pull.kg." + k, Err: err}
		}
	}
	for _, k := range SortedKeys(p.Pieces) {
		n := p.Pieces[k]
		if n < 0 {
			return ap, &FieldError{Field: "pull.pieces." + k, Value: strconv.FormatInt(n, 10), Err: assess.ErrNegativeCount}
		}
		if n > MaxPieces {
			return ap, &FieldError{Field: "pull.pieces." + k, Value: strconv.FormatInt(n, 10), Err: fmt.Errorf("%w: above %d pieces", ErrOutOfRange, MaxPieces)}
		}
		if err := ap.SetPieces(k, int(n)); err != nil {
			return ap, &FieldError{Field: "pull.pieces." + k, Err: err}
		}
	}
	if n := p.TotalPieces; n != 0 {
		v := strconv.FormatInt(n, 10)
		switch counted := p.CountedPieces(); {
		case n < 0:
			return ap, &FieldError{Field: "pull.total_count", Value: v, Err: assess.ErrNegativeCount}
		case n > MaxPieces:
			return ap, &FieldError{Field: "pull.total_count", Value: v, Err: fmt.Errorf("%w: above %d pieces", ErrOutOfRange, MaxPieces)}
		case n < counted:
			return ap, &FieldError{Field: "pull.total_count", Value: v,
				Err: fmt.Errorf("%w: the categories count %d; the total counts every piece of the pull", assess.ErrBadTotal, counted)}
		}
		ap.TotalPieces = int(n)
	}
	return ap, nil
}

func validatePull(p PullRecord) error {
	if p.Bale.IsZero() {
		return &FieldError{Field: "pull.bale", Err: ErrMissingID}
	}
	return ValidatePullValues(p)
}

// ValidatePullValues holds a pull's own values to the rules of a save:
// its label and date, known categories, every mass finite, at least 0,
// each part and their sum at most MaxBaleKg, a total above 0, the piece
// counts and the pieces examined, the parts against the weighed mass.
// Everything but the bale it belongs to, so that pulls read from a file
// for an audit without a store meet the same bounds as stored ones.
func ValidatePullValues(p PullRecord) error {
	if err := checkText("pull.label", p.Label, maxNameRunes, true); err != nil {
		return err
	}
	if p.TakenMs != 0 {
		if err := checkDate("pull.taken", p.TakenMs); err != nil {
			return err
		}
	}
	kgKeys := SortedKeys(p.Kg) // sorted once: errors name the first bad key in key order
	for _, k := range kgKeys {
		if _, ok := assess.CategoryIndex(k); !ok {
			return &FieldError{Field: "pull.kg." + k, Err: fmt.Errorf("%w (valid keys: %s)", assess.ErrUnknownCategory, strings.Join(assess.CategoryKeys(), ", "))}
		}
		// The field name is built only for a bad value: this loop runs for
		// every category of every pull an import checks.
		if x := p.Kg[k]; !(x >= 0 && x <= MaxBaleKg) {
			return checkKg("pull.kg."+k, x, false, assess.ErrNonFiniteMass, assess.ErrNegativeMass)
		}
	}
	// Each part is at most MaxBaleKg, so the sum of at most 24 parts is
	// finite; the sum itself is held to the same bound.
	if parts := partsKg(p, kgKeys); parts > MaxBaleKg {
		return &FieldError{Field: "pull.kg", Value: fmt.Sprintf("parts total %s kg", fnum(parts)),
			Err: fmt.Errorf("%w: a pull weighs at most %s kg, the most a bale weighs", ErrOutOfRange, assess.Plain(MaxBaleKg))}
	}
	if err := checkKg("pull.stated_kg", p.StatedKg, false, ErrNonFinite, ErrNegative); err != nil {
		return err
	}
	ap, err := assessPull(p, kgKeys)
	if err != nil {
		return err
	}
	// The audit model's own rules (finite, non-negative, above zero).
	if err := ap.Validate(); err != nil {
		return &FieldError{Field: "pull.kg", Err: err}
	}
	if p.StatedKg > 0 {
		parts := partsKg(p, kgKeys)
		if parts > p.StatedKg*(1+PullPartsTolerance)+PullPartsToleranceKg {
			return &FieldError{Field: "pull.kg", Value: fmt.Sprintf("parts %s kg > stated %s kg", fnum(parts), fnum(p.StatedKg)),
				Err: fmt.Errorf("%w by more than %.0f %% + %.2f kg: reweigh or correct a part", ErrPullParts, 100*PullPartsTolerance, PullPartsToleranceKg)}
		}
	}
	return nil
}

func validateSetting(s SettingRecord) error {
	if s.Kind != SettingSpec && s.Kind != SettingLineProfile {
		return &FieldError{Field: "setting.kind", Value: s.Kind, Err: ErrUnknownSetting}
	}
	if err := checkText("setting.name", s.Name, maxNameRunes, true); err != nil {
		return err
	}
	if len(s.Body) > maxSettingLen {
		return &FieldError{Field: "setting.body", Value: fmt.Sprintf("%d bytes", len(s.Body)), Err: ErrTooLong}
	}
	if !json.Valid(s.Body) {
		return &FieldError{Field: "setting.body", Err: ErrBadSetting}
	}
	// A repeated key reads differently in different readers; a control
	// character in a name or description reaches a terminal later.
	if err := assess.CheckJSON(s.Body); err != nil {
		return &FieldError{Field: "setting.body", Err: fmt.Errorf("%w: %w", ErrBadSetting, err)}
	}
	// The same readers the audit and the yield use, so that a setting
	// that would not load is refused on save and on import alike.
	var name string
	switch s.Kind {
	case SettingSpec:
		sp, err := assess.ParseSpec(s.Body)
		if err != nil {
			return &FieldError{Field: "setting.body", Err: fmt.Errorf("%w: %w", ErrBadSetting, err)}
		}
		name = sp.Name
	default:
		l, err := yield.ReadLine(bytes.NewReader(s.Body), s.Name)
		if err != nil {
			return &FieldError{Field: "setting.body", Err: fmt.Errorf("%w: %w", ErrBadSetting, err)}
		}
		if _, err := yield.Compile(l); err != nil {
			return &FieldError{Field: "setting.body", Err: fmt.Errorf("%w: %w", ErrBadSetting, err)}
		}
		name = l.Name
	}
	if name != s.Name {
		return &FieldError{Field: "setting.name", Value: s.Name, Err: fmt.Errorf("%w: the document calls itself %q", ErrSettingName, name)}
	}
	return nil
}
