package record_test

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"baleassay/assess"
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/yield"
)

// Boundary rows for every validation rule: just inside, just outside,
// NaN and ±Inf. The limits come from the rules themselves (WGS 84 ranges,
// common practice) and the constants named in validate.go.
func TestValidateBoundaries(t *testing.T) {
	now := testkit.T0
	next := func(x float64) float64 { return math.Nextafter(x, math.Inf(1)) }
	prev := func(x float64) float64 { return math.Nextafter(x, math.Inf(-1)) }
	site := func(lat, lon float64) record.Event {
		return testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), "Yard", lat, lon)
	}
	bale := func(kg, l, w, h float64) record.Event {
		e := testkit.BaleEv(testkit.Ent(2), testkit.Ent(1), testkit.DevA, now.UnixMilli(), kg)
		e.Bale.LengthM, e.Bale.WidthM, e.Bale.HeightM = l, w, h
		return e
	}
	pull := func(kg map[string]float64, stated float64) record.Event {
		e := testkit.PullEv(testkit.Ent(3), testkit.Ent(2), testkit.DevA, now.UnixMilli(), kg)
		e.Pull.StatedKg = stated
		return e
	}
	nan, inf := math.NaN(), math.Inf(1)
	// density = kg / 1 m³ with unit dimensions
	cases := []struct {
		name string
		e    record.Event
		err  error              // nil: valid
		warn record.WarningCode // 0: no warning
	}{
		// Latitude and longitude: WGS 84 ranges (common practice).
		{"lat 90", site(90, 10), nil, 0},
		{"lat just above 90", site(next(90), 10), record.ErrLatitude, 0},
		{"lat -90", site(-90, 10), nil, 0},
		{"lat just below -90", site(prev(-90), 10), record.ErrLatitude, 0},
		{"lat NaN", site(nan, 10), record.ErrNonFinite, 0},
		{"lat +Inf", site(inf, 10), record.ErrNonFinite, 0},
		{"lat -Inf", site(-inf, 10), record.ErrNonFinite, 0},
		{"lon 180", site(10, 180), nil, 0},
		{"lon just above 180", site(10, next(180)), record.ErrLongitude, 0},
		{"lon -180", site(10, -180), nil, 0},
		{"lon just below -180", site(10, prev(-180)), record.ErrLongitude, 0},
		{"lon NaN", site(10, nan), record.ErrNonFinite, 0},
		{"lon +Inf", site(10, inf), record.ErrNonFinite, 0},
		{"lon -Inf", site(10, -inf), record.ErrNonFinite, 0},
		// 0,0 is the classic missing-fix value (common practice).
		{"null island", site(0, 0), nil, record.WarnNullIsland},
		{"next to null island", site(0, next(0)), nil, 0},
		// Bale mass and density: 160 kg/m³ minimum (Source: ISRI, Scrap
		// Specifications Circular, plastic scrap section); 900 kg/m³ ceiling (validate.go, illustrative).
		{"bale 160 kg/m³", bale(160, 1, 1, 1), nil, 0},
		{"bale just under 160 kg/m³", bale(prev(160), 1, 1, 1), nil, record.WarnLightBale},
		{"bale 900 kg/m³", bale(900, 1, 1, 1), nil, 0},
		{"bale just over 900 kg/m³", bale(next(900), 1, 1, 1), nil, record.WarnDenseBale},
		{"bale smallest mass", bale(math.SmallestNonzeroFloat64, 0, 0, 0), nil, 0},
		{"bale zero mass", bale(0, 0, 0, 0), record.ErrNotPositive, 0},
		{"bale negative mass", bale(-1e-300, 0, 0, 0), record.ErrNotPositive, 0},
		{"bale NaN mass", bale(nan, 0, 0, 0), record.ErrNonFinite, 0},
		{"bale +Inf mass", bale(inf, 0, 0, 0), record.ErrNonFinite, 0},
		{"bale -Inf mass", bale(-inf, 0, 0, 0), record.ErrNonFinite, 0},
		{"bale negative length", bale(500, -1e-9, 1, 1), record.ErrNegative, 0},
		{"bale NaN width", bale(500, 1, nan, 1), record.ErrNonFinite, 0},
		{"bale Inf height", bale(500, 1, 1, inf), record.ErrNonFinite, 0},
		{"bale one dimension missing", bale(500, 1, 1, 0), record.ErrNotPositive, 0},
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
		{"pull parts over tolerance", pull(map[string]float64{"pet_clear": next(10*1.02 + 0.05)}, 10), record.ErrPullParts, 0},
		{"pull stated NaN", pull(map[string]float64{"pet_clear": 1}, nan), record.ErrNonFinite, 0},
		{"pull stated Inf", pull(map[string]float64{"pet_clear": 1}, inf), record.ErrNonFinite, 0},
		{"pull stated negative", pull(map[string]float64{"pet_clear": 1}, -1), record.ErrNegative, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, err := record.ValidateEventAt(c.e, now)
			if c.err == nil && err != nil {
				t.Fatalf("unexpected error %v", err)
			}
			if c.err != nil {
				if !errors.Is(err, c.err) || !errors.Is(err, record.ErrInvalid) {
					t.Fatalf("err = %v, want %v and ErrInvalid", err, c.err)
				}
				var fe *record.FieldError
				if !errors.As(err, &fe) || fe.Field == "" {
					t.Fatalf("err %v does not name its field", err)
				}
				return
			}
			var got record.WarningCode
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
	now := testkit.T0
	ok := testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), "Yard", 1, 1)
	mod := func(f func(e *record.Event)) record.Event {
		e := ok
		s := *ok.Site
		e.Site = &s
		f(&e)
		return e
	}
	cases := []struct {
		name string
		e    record.Event
		err  error
	}{
		{"no entity", mod(func(e *record.Event) { e.Entity = record.EntityID{} }), record.ErrMissingID},
		{"no device", mod(func(e *record.Event) { e.Device = record.DeviceID{} }), record.ErrMissingID},
		{"unknown kind", mod(func(e *record.Event) { e.Kind = 9 }), record.ErrKind},
		{"zero clock", mod(func(e *record.Event) { e.Clock = record.HLC{} }), record.ErrOutOfRange},
		{"payload of another kind", mod(func(e *record.Event) { e.Kind = record.KindBale }), record.ErrPayload},
		{"two payloads", mod(func(e *record.Event) { e.Bale = &record.BaleRecord{} }), record.ErrPayload},
		{"tombstone without supersedes", mod(func(e *record.Event) { e.Site, e.Deleted = nil, true }), record.ErrTombstone},
		{"tombstone with payload", mod(func(e *record.Event) { e.Deleted, e.Supersedes = true, []record.EventID{{1}} }), record.ErrTombstone},
		{"duplicate supersedes", mod(func(e *record.Event) { e.Supersedes = []record.EventID{{1}, {1}} }), record.ErrInvalid},
		{"empty name", mod(func(e *record.Event) { e.Site.Name = "  " }), record.ErrRequired},
		{"bad setting json", record.Event{Version: 1, Entity: testkit.Ent(5), Kind: record.KindSetting, Device: testkit.DevA, Clock: record.HLC{WallMs: now.UnixMilli()},
			Setting: &record.SettingRecord{Kind: record.SettingSpec, Name: "x", Body: []byte("{")}}, record.ErrBadSetting},
	}
	for _, c := range cases {
		if _, err := record.ValidateEventAt(c.e, now); !errors.Is(err, c.err) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.err)
		}
	}
	tomb := record.Event{Version: 1, Entity: testkit.Ent(1), Kind: record.KindSite, Device: testkit.DevA, Clock: record.HLC{WallMs: now.UnixMilli()}, Deleted: true, Supersedes: []record.EventID{{1}}}
	if _, err := record.ValidateEventAt(tomb, now); err != nil {
		t.Errorf("valid tombstone refused: %v", err)
	}
}

// A stamp may run MaxClockAhead ahead of the checking device's clock (hlc.go).
// Text limits and enumerations: the limits are validate.go's own
// (maxNameRunes 200, maxNotesRunes 4000, maxSettingLen 64 KiB).
func TestValidateTextAndSettingBoundaries(t *testing.T) {
	now := testkit.T0
	name := func(n int) record.Event {
		return testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), strings.Repeat("é", n), 1, 1)
	}
	notes := func(n int) record.Event {
		e := testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), "Y", 1, 1)
		e.Site.Notes = strings.Repeat("x", n)
		return e
	}
	kind := func(k record.SiteKind) record.Event {
		e := testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), "Y", 1, 1)
		e.Site.Kind = k
		return e
	}
	setting := func(kind string, body []byte) record.Event {
		return record.Event{Version: 1, Entity: testkit.Ent(5), Kind: record.KindSetting, Device: testkit.DevA, Clock: record.HLC{WallMs: now.UnixMilli()},
			Setting: &record.SettingRecord{Kind: kind, Name: "glycol feed", Body: body}}
	}
	// A spec document of exactly n bytes, its description padded.
	big := func(n int) []byte {
		head, tail := `{"name":"glycol feed","description":"`, `"}`
		return []byte(head + strings.Repeat("a", n-len(head)-len(tail)) + tail)
	}
	line := yield.BuiltinLine()
	line.Name = "glycol feed"
	lineJSON, err := json.Marshal(line)
	if err != nil {
		t.Fatal(err)
	}
	melt := bytes.Replace(lineJSON, []byte(`"kind":"sort"`), []byte(`"kind":"melt"`), 1)
	if bytes.Equal(melt, lineJSON) {
		t.Fatal("the built-in line has no sort stage to change")
	}
	cases := []struct {
		name string
		e    record.Event
		err  error
	}{
		{"name 200 characters", name(200), nil},
		{"name 201 characters", name(201), record.ErrTooLong},
		{"name empty", name(0), record.ErrRequired},
		{"notes 4000", notes(4000), nil},
		{"notes 4001", notes(4001), record.ErrTooLong},
		{"last site kind", kind(record.SiteSupplier), nil},
		{"unknown site kind", kind(record.SiteSupplier + 1), record.ErrInvalid},
		{"spec setting", setting(record.SettingSpec, []byte(`{"name":"glycol feed","limits":[{"item":"pet","min":0.8}]}`)), nil},
		{"spec with a bound above 1", setting(record.SettingSpec, []byte(`{"name":"glycol feed","limits":[{"item":"pet","min":80}]}`)), record.ErrBadSetting},
		{"spec named otherwise inside", setting(record.SettingSpec, []byte(`{"name":"x"}`)), record.ErrSettingName},
		{"line profile setting", setting(record.SettingLineProfile, lineJSON), nil},
		{"line with an unknown stage kind", setting(record.SettingLineProfile, melt), record.ErrBadSetting},
		{"line that is not a profile", setting(record.SettingLineProfile, []byte(`[]`)), record.ErrBadSetting},
		{"unknown setting kind", setting("recipe", []byte(`{}`)), record.ErrUnknownSetting},
		{"body at 64 KiB", setting(record.SettingSpec, big(64<<10)), nil},
		{"body over 64 KiB", setting(record.SettingSpec, big(64<<10+1)), record.ErrTooLong},
	}
	for _, c := range cases {
		_, err := record.ValidateEventAt(c.e, now)
		if (c.err == nil) != (err == nil) || (c.err != nil && !errors.Is(err, c.err)) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.err)
		}
	}
}

func TestValidateFutureClock(t *testing.T) {
	now := testkit.T0
	at := func(ms int64) []record.Warning {
		w, err := record.ValidateEventAt(testkit.SiteEv(testkit.Ent(1), testkit.DevA, ms, "Y", 1, 1), now)
		if err != nil {
			t.Fatal(err)
		}
		return w
	}
	lim := now.Add(record.MaxClockAhead).UnixMilli()
	if w := at(lim); len(w) != 0 {
		t.Errorf("stamp at the bound warned: %v", w)
	}
	if w := at(lim + 1); len(w) != 1 || w[0].Code != record.WarnFutureClock {
		t.Errorf("stamp 1 ms past the bound: warnings %v, want future_clock", w)
	}
	if w := at(now.Add(365 * 24 * time.Hour).UnixMilli()); len(w) != 1 {
		t.Errorf("stamp a year ahead: warnings %v", w)
	}
}
