package data

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"baleassay/assess"
)

// Boundary rows for every validation rule: just inside, just outside,
// NaN and ±Inf. The limits come from the rules themselves (WGS 84 ranges,
// common practice) and the constants named in validate.go.
func TestValidateBoundaries(t *testing.T) {
	now := t0
	next := func(x float64) float64 { return math.Nextafter(x, math.Inf(1)) }
	prev := func(x float64) float64 { return math.Nextafter(x, math.Inf(-1)) }
	site := func(lat, lon float64) Event { return siteEv(ent(1), devA, now.UnixMilli(), "Yard", lat, lon) }
	bale := func(kg, l, w, h float64) Event {
		e := baleEv(ent(2), ent(1), devA, now.UnixMilli(), kg)
		e.Bale.LengthM, e.Bale.WidthM, e.Bale.HeightM = l, w, h
		return e
	}
	pull := func(kg map[string]float64, stated float64) Event {
		e := pullEv(ent(3), ent(2), devA, now.UnixMilli(), kg)
		e.Pull.StatedKg = stated
		return e
	}
	nan, inf := math.NaN(), math.Inf(1)
	// density = kg / 1 m³ with unit dimensions
	cases := []struct {
		name string
		e    Event
		err  error       // nil: valid
		warn WarningCode // 0: no warning
	}{
		// Latitude and longitude: WGS 84 ranges (common practice).
		{"lat 90", site(90, 10), nil, 0},
		{"lat just above 90", site(next(90), 10), ErrLatitude, 0},
		{"lat -90", site(-90, 10), nil, 0},
		{"lat just below -90", site(prev(-90), 10), ErrLatitude, 0},
		{"lat NaN", site(nan, 10), ErrNonFinite, 0},
		{"lat +Inf", site(inf, 10), ErrNonFinite, 0},
		{"lat -Inf", site(-inf, 10), ErrNonFinite, 0},
		{"lon 180", site(10, 180), nil, 0},
		{"lon just above 180", site(10, next(180)), ErrLongitude, 0},
		{"lon -180", site(10, -180), nil, 0},
		{"lon just below -180", site(10, prev(-180)), ErrLongitude, 0},
		{"lon NaN", site(10, nan), ErrNonFinite, 0},
		{"lon +Inf", site(10, inf), ErrNonFinite, 0},
		{"lon -Inf", site(10, -inf), ErrNonFinite, 0},
		// 0,0 is the classic missing-fix value (common practice).
		{"null island", site(0, 0), nil, WarnNullIsland},
		{"next to null island", site(0, next(0)), nil, 0},
		// Bale mass and density: 160 kg/m³ minimum (REFERENCE.md, scrap
		// specifications circular); 900 kg/m³ ceiling (validate.go, illustrative).
		{"bale 160 kg/m³", bale(160, 1, 1, 1), nil, 0},
		{"bale just under 160 kg/m³", bale(prev(160), 1, 1, 1), nil, WarnLightBale},
		{"bale 900 kg/m³", bale(900, 1, 1, 1), nil, 0},
		{"bale just over 900 kg/m³", bale(next(900), 1, 1, 1), nil, WarnDenseBale},
		{"bale smallest mass", bale(math.SmallestNonzeroFloat64, 0, 0, 0), nil, 0},
		{"bale zero mass", bale(0, 0, 0, 0), ErrNotPositive, 0},
		{"bale negative mass", bale(-1e-300, 0, 0, 0), ErrNotPositive, 0},
		{"bale NaN mass", bale(nan, 0, 0, 0), ErrNonFinite, 0},
		{"bale +Inf mass", bale(inf, 0, 0, 0), ErrNonFinite, 0},
		{"bale -Inf mass", bale(-inf, 0, 0, 0), ErrNonFinite, 0},
		{"bale negative length", bale(500, -1e-9, 1, 1), ErrNegative, 0},
		{"bale NaN width", bale(500, 1, nan, 1), ErrNonFinite, 0},
		{"bale Inf height", bale(500, 1, 1, inf), ErrNonFinite, 0},
		{"bale one dimension missing", bale(500, 1, 1, 0), ErrNotPositive, 0},
		// Pull masses: finite, ≥ 0, total above 0 (assess rules); parts may
		// exceed the stated mass by 2 % + 0.05 kg (validate.go, illustrative).
		{"pull zero part", pull(map[string]float64{"pet_clear": 10, "pvc": 0}, 0), nil, 0},
		{"pull negative part", pull(map[string]float64{"pet_clear": 10, "pvc": -1e-300}, 0), assess.ErrNegativeMass, 0},
		{"pull NaN part", pull(map[string]float64{"pet_clear": nan}, 0), assess.ErrNonFiniteMass, 0},
		{"pull +Inf part", pull(map[string]float64{"pet_clear": inf}, 0), assess.ErrNonFiniteMass, 0},
		{"pull -Inf part", pull(map[string]float64{"pet_clear": -inf}, 0), assess.ErrNonFiniteMass, 0},
		{"pull all zero", pull(map[string]float64{"pet_clear": 0}, 0), assess.ErrEmptyPull, 0},
		{"pull unknown key", pull(map[string]float64{"pet_klear": 1}, 0), assess.ErrUnknownCategory, 0},
		{"pull parts at tolerance", pull(map[string]float64{"pet_clear": 10*1.02 + 0.05}, 10), nil, 0},
		{"pull parts over tolerance", pull(map[string]float64{"pet_clear": next(10*1.02 + 0.05)}, 10), ErrPullParts, 0},
		{"pull stated NaN", pull(map[string]float64{"pet_clear": 1}, nan), ErrNonFinite, 0},
		{"pull stated Inf", pull(map[string]float64{"pet_clear": 1}, inf), ErrNonFinite, 0},
		{"pull stated negative", pull(map[string]float64{"pet_clear": 1}, -1), ErrNegative, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, err := ValidateEventAt(c.e, now)
			if c.err == nil && err != nil {
				t.Fatalf("unexpected error %v", err)
			}
			if c.err != nil {
				if !errors.Is(err, c.err) || !errors.Is(err, ErrInvalid) {
					t.Fatalf("err = %v, want %v and ErrInvalid", err, c.err)
				}
				var fe *FieldError
				if !errors.As(err, &fe) || fe.Field == "" {
					t.Fatalf("err %v does not name its field", err)
				}
				return
			}
			var got WarningCode
			if len(w) > 0 {
				got = w[0].Code
			}
			if got != c.warn || len(w) > 1 {
				t.Fatalf("warnings %v, want %v", w, c.warn)
			}
		})
	}
}

func TestValidateStructure(t *testing.T) {
	now := t0
	ok := siteEv(ent(1), devA, now.UnixMilli(), "Yard", 1, 1)
	mod := func(f func(e *Event)) Event {
		e := ok
		s := *ok.Site
		e.Site = &s
		f(&e)
		return e
	}
	cases := []struct {
		name string
		e    Event
		err  error
	}{
		{"no entity", mod(func(e *Event) { e.Entity = EntityID{} }), ErrMissingID},
		{"no device", mod(func(e *Event) { e.Device = DeviceID{} }), ErrMissingID},
		{"unknown kind", mod(func(e *Event) { e.Kind = 9 }), ErrKind},
		{"zero clock", mod(func(e *Event) { e.Clock = HLC{} }), ErrNotPositive},
		{"payload of another kind", mod(func(e *Event) { e.Kind = KindBale }), ErrPayload},
		{"two payloads", mod(func(e *Event) { e.Bale = &BaleRecord{} }), ErrPayload},
		{"tombstone without supersedes", mod(func(e *Event) { e.Site, e.Deleted = nil, true }), ErrTombstone},
		{"tombstone with payload", mod(func(e *Event) { e.Deleted, e.Supersedes = true, []EventID{{1}} }), ErrTombstone},
		{"duplicate supersedes", mod(func(e *Event) { e.Supersedes = []EventID{{1}, {1}} }), ErrInvalid},
		{"empty name", mod(func(e *Event) { e.Site.Name = "  " }), ErrRequired},
		{"bad setting json", Event{Version: 1, Entity: ent(5), Kind: KindSetting, Device: devA, Clock: HLC{WallMs: 1},
			Setting: &SettingRecord{Kind: SettingSpec, Name: "x", Body: []byte("{")}}, ErrBadSetting},
	}
	for _, c := range cases {
		if _, err := ValidateEventAt(c.e, now); !errors.Is(err, c.err) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.err)
		}
	}
	tomb := Event{Version: 1, Entity: ent(1), Kind: KindSite, Device: devA, Clock: HLC{WallMs: 1}, Deleted: true, Supersedes: []EventID{{1}}}
	if _, err := ValidateEventAt(tomb, now); err != nil {
		t.Errorf("valid tombstone refused: %v", err)
	}
}

// A stamp may run MaxClockAhead ahead of the checking device's clock (hlc.go).
// Text limits and enumerations: the limits are validate.go's own
// (maxNameRunes 200, maxNotesRunes 4000, maxSettingLen 64 KiB).
func TestValidateTextAndSettingBoundaries(t *testing.T) {
	now := t0
	name := func(n int) Event { return siteEv(ent(1), devA, now.UnixMilli(), strings.Repeat("é", n), 1, 1) }
	notes := func(n int) Event {
		e := siteEv(ent(1), devA, now.UnixMilli(), "Y", 1, 1)
		e.Site.Notes = strings.Repeat("x", n)
		return e
	}
	kind := func(k SiteKind) Event {
		e := siteEv(ent(1), devA, now.UnixMilli(), "Y", 1, 1)
		e.Site.Kind = k
		return e
	}
	setting := func(kind string, body []byte) Event {
		return Event{Version: 1, Entity: ent(5), Kind: KindSetting, Device: devA, Clock: HLC{WallMs: 1},
			Setting: &SettingRecord{Kind: kind, Name: "glycol feed", Body: body}}
	}
	big := func(n int) []byte { return []byte(`"` + strings.Repeat("a", n-2) + `"`) }
	cases := []struct {
		name string
		e    Event
		err  error
	}{
		{"name 200 characters", name(200), nil},
		{"name 201 characters", name(201), ErrTooLong},
		{"name empty", name(0), ErrRequired},
		{"notes 4000", notes(4000), nil},
		{"notes 4001", notes(4001), ErrTooLong},
		{"last site kind", kind(SiteSupplier), nil},
		{"unknown site kind", kind(SiteSupplier + 1), ErrInvalid},
		{"spec setting", setting(SettingSpec, []byte(`{"name":"x"}`)), nil},
		{"line profile setting", setting(SettingLineProfile, []byte(`[]`)), nil},
		{"unknown setting kind", setting("recipe", []byte(`{}`)), ErrUnknownSetting},
		{"body at 64 KiB", setting(SettingSpec, big(64<<10)), nil},
		{"body over 64 KiB", setting(SettingSpec, big(64<<10+1)), ErrTooLong},
	}
	for _, c := range cases {
		_, err := ValidateEventAt(c.e, now)
		if (c.err == nil) != (err == nil) || (c.err != nil && !errors.Is(err, c.err)) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.err)
		}
	}
}

func TestValidateFutureClock(t *testing.T) {
	now := t0
	at := func(ms int64) []Warning {
		w, err := ValidateEventAt(siteEv(ent(1), devA, ms, "Y", 1, 1), now)
		if err != nil {
			t.Fatal(err)
		}
		return w
	}
	lim := now.Add(MaxClockAhead).UnixMilli()
	if w := at(lim); len(w) != 0 {
		t.Errorf("stamp at the bound warned: %v", w)
	}
	if w := at(lim + 1); len(w) != 1 || w[0].Code != WarnFutureClock {
		t.Errorf("stamp 1 ms past the bound: warnings %v, want future_clock", w)
	}
	if w := at(now.Add(365 * 24 * time.Hour).UnixMilli()); len(w) != 1 {
		t.Errorf("stamp a year ahead: warnings %v", w)
	}
}
