package record_test

import (
	"errors"
	"math"
	"reflect"
	"testing"

	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/yield"
)

// measuredEv is an invented measured batch of two bales (the inputs are
// invented; the limits checked come from measured.go).
func measuredEv(mut func(m *record.MeasuredRecord)) record.Event {
	moist := 0.9
	av := 1.2
	m := &record.MeasuredRecord{Line: "illustrative hot-wash line", Bales: []record.EntityID{testkit.Ent(2), testkit.Ent(4)},
		RanMs: testkit.T0.UnixMilli(), FlakeKg: 780, MoisturePct: &moist, StreamsKg: map[string]float64{"floats": 31.5, "sorted_out": 60},
		Reactor: &record.ReactorRecord{FlakeKg: 500, Glycol: "DEG", GlycolKg: 500, ProductKg: 998, HydroxylValue: 521,
			HydroxylMethod: record.MethodD4274, AcidValue: &av, AcidMethod: record.MethodD4662},
		Notes: "night shift"}
	if mut != nil {
		mut(m)
	}
	return record.Event{Version: record.FormatVersion, Entity: testkit.Ent(9), Kind: record.KindMeasured, Device: testkit.DevA,
		Clock: record.HLC{WallMs: testkit.T0.UnixMilli()}, Measured: m}
}

// TestMeasuredRoundTrip: a measured batch encodes deterministically,
// decodes strictly to the same value and validates.
func TestMeasuredRoundTrip(t *testing.T) {
	e := measuredEv(nil)
	if _, err := record.ValidateEventAt(e, testkit.T0); err != nil {
		t.Fatal(err)
	}
	raw := testkit.MustEncode(t, e)
	got, err := record.DecodeEvent(raw)
	if err != nil {
		t.Fatal(err)
	}
	// Source: common practice (a round trip returns what went in).
	if !reflect.DeepEqual(got, e) {
		t.Errorf("round trip changed the event:\n got %+v\nwant %+v", got.Measured, e.Measured)
	}
	if k, err := record.ParseKind("measured"); err != nil || k != record.KindMeasured || record.KindMeasured.String() != "measured" {
		t.Errorf("kind name: %v %v", k, err)
	}
	// A measured payload on another kind, or another payload on this
	// kind, is refused.
	wrong := e
	wrong.Kind = record.KindBale
	if _, err := record.ValidateEventAt(wrong, testkit.T0); !errors.Is(err, record.ErrPayload) {
		t.Errorf("measured payload on a bale event: %v", err)
	}
	two := e
	two.Site = &record.SiteRecord{Name: "x", Lat: 1, Lon: 1}
	if _, err := record.ValidateEventAt(two, testkit.T0); !errors.Is(err, record.ErrPayload) {
		t.Errorf("two payloads: %v", err)
	}
	// Resolving keeps the payload.
	if p := record.PayloadOf(e); p.Measured != e.Measured {
		t.Errorf("PayloadOf dropped the measured payload")
	}
}

// Boundary rows of every measured-batch rule: just inside, just outside,
// NaN and ±Inf. Limits: measured.go (MaxBatchBales, 5,000 kg per bale,
// MaxFlakeMoisturePct, MaxGlycolRatio, the pure glycol's hydroxyl value,
// pure terephthalic acid's acid value).
func TestMeasuredBoundaries(t *testing.T) {
	next := func(x float64) float64 { return math.Nextafter(x, math.Inf(1)) }
	nan, inf := math.NaN(), math.Inf(1)
	pf := func(v float64) *float64 { return &v }
	deg, _ := yield.LookupGlycol("DEG")
	// Computed: 56106·2/106.12 for diethylene glycol.
	degOHV := yield.KOH * 1000 * 2 / deg.MolarMass
	if math.Abs(degOHV-1057.4) > 0.1 {
		t.Fatalf("DEG hydroxyl value %g, want about 1057.4 (computed from 106.12 g/mol)", degOHV)
	}
	// Computed: 2·56106/166.13 for terephthalic acid.
	if math.Abs(record.MaxAcidValue-675.4) > 0.1 {
		t.Fatalf("MaxAcidValue %g, want 675.4", record.MaxAcidValue)
	}
	many := make([]record.EntityID, record.MaxBatchBales+1)
	for i := range many {
		many[i] = record.EntityID{0x01, byte(i >> 8), byte(i), 0, 0, 0, 0x70, 0, 0x80, 1}
	}
	cases := []struct {
		name string
		mut  func(m *record.MeasuredRecord)
		err  error
	}{
		{"valid", nil, nil},
		{"no line", func(m *record.MeasuredRecord) { m.Line = " " }, record.ErrRequired},
		{"no bales", func(m *record.MeasuredRecord) { m.Bales = nil }, record.ErrRequired},
		{"1000 bales", func(m *record.MeasuredRecord) { m.Bales = many[:record.MaxBatchBales] }, nil},
		{"1001 bales", func(m *record.MeasuredRecord) { m.Bales = many }, record.ErrMeasured},
		{"bale twice", func(m *record.MeasuredRecord) { m.Bales = append(m.Bales, m.Bales[0]) }, record.ErrInvalid},
		{"zero bale id", func(m *record.MeasuredRecord) { m.Bales[1] = record.EntityID{} }, record.ErrMissingID},
		{"ran 1999", func(m *record.MeasuredRecord) { m.RanMs = 946684799999 }, record.ErrMeasured},
		{"ran 2000-01-01", func(m *record.MeasuredRecord) { m.RanMs = 946684800000 }, nil},
		{"flake zero", func(m *record.MeasuredRecord) { m.FlakeKg = 0; m.Reactor = nil }, record.ErrNotPositive},
		{"flake negative", func(m *record.MeasuredRecord) { m.FlakeKg = -1; m.Reactor = nil }, record.ErrNegative},
		{"flake NaN", func(m *record.MeasuredRecord) { m.FlakeKg = nan }, record.ErrNonFinite},
		{"flake +Inf", func(m *record.MeasuredRecord) { m.FlakeKg = inf }, record.ErrNonFinite},
		{"flake 10,000 kg of two bales", func(m *record.MeasuredRecord) { m.FlakeKg = 10000 }, nil},
		{"flake just above 10,000 kg of two bales", func(m *record.MeasuredRecord) { m.FlakeKg = next(10000) }, record.ErrMeasured},
		{"moisture 0", func(m *record.MeasuredRecord) { m.MoisturePct = pf(0) }, nil},
		{"moisture 50", func(m *record.MeasuredRecord) { m.MoisturePct = pf(50) }, nil},
		{"moisture above 50", func(m *record.MeasuredRecord) { m.MoisturePct = pf(next(50)) }, record.ErrMeasured},
		{"moisture negative", func(m *record.MeasuredRecord) { m.MoisturePct = pf(-0.1) }, record.ErrMeasured},
		{"moisture NaN", func(m *record.MeasuredRecord) { m.MoisturePct = pf(nan) }, record.ErrNonFinite},
		{"stream name with capitals", func(m *record.MeasuredRecord) { m.StreamsKg["Floats"] = 1 }, record.ErrInvalid},
		{"stream negative", func(m *record.MeasuredRecord) { m.StreamsKg["floats"] = -1 }, record.ErrNegative},
		{"stream Inf", func(m *record.MeasuredRecord) { m.StreamsKg["floats"] = inf }, record.ErrNonFinite},
		{"stream zero", func(m *record.MeasuredRecord) { m.StreamsKg["floats"] = 0 }, nil},
		{"reactor flake = batch flake", func(m *record.MeasuredRecord) { m.Reactor.FlakeKg = 780 }, nil},
		{"reactor flake above the batch's", func(m *record.MeasuredRecord) { m.Reactor.FlakeKg = next(780) }, record.ErrMeasured},
		{"reactor flake zero", func(m *record.MeasuredRecord) { m.Reactor.FlakeKg = 0 }, record.ErrNotPositive},
		{"unknown glycol", func(m *record.MeasuredRecord) { m.Reactor.Glycol = "butanediol" }, record.ErrInvalid},
		{"glycol 20:1", func(m *record.MeasuredRecord) { m.Reactor.GlycolKg = 10000; m.Reactor.ProductKg = 0 }, nil},
		{"glycol above 20:1", func(m *record.MeasuredRecord) { m.Reactor.GlycolKg = next(10000) }, record.ErrMeasured},
		{"strip above 1", func(m *record.MeasuredRecord) { m.Reactor.StripEG = next(1) }, record.ErrMeasured},
		{"strip NaN", func(m *record.MeasuredRecord) { m.Reactor.StripEG = nan }, record.ErrMeasured},
		{"product = flake·1.1 + glycol", func(m *record.MeasuredRecord) { m.Reactor.ProductKg = 500*1.1 + 500 }, nil},
		{"product above the charge", func(m *record.MeasuredRecord) { m.Reactor.ProductKg = next(500*1.1 + 500) }, record.ErrMeasured},
		{"OHV of pure DEG", func(m *record.MeasuredRecord) { m.Reactor.HydroxylValue = degOHV }, nil},
		{"OHV above pure DEG", func(m *record.MeasuredRecord) { m.Reactor.HydroxylValue = next(degOHV) }, record.ErrMeasured},
		{"OHV negative", func(m *record.MeasuredRecord) { m.Reactor.HydroxylValue = -1 }, record.ErrMeasured},
		{"OHV NaN", func(m *record.MeasuredRecord) { m.Reactor.HydroxylValue = nan }, record.ErrNonFinite},
		{"OHV without method", func(m *record.MeasuredRecord) { m.Reactor.HydroxylMethod = 0 }, record.ErrInvalid},
		{"OHV by an acid method", func(m *record.MeasuredRecord) { m.Reactor.HydroxylMethod = record.MethodD4662 }, record.ErrInvalid},
		{"OHV method without value", func(m *record.MeasuredRecord) { m.Reactor.HydroxylValue = 0 }, record.ErrInvalid},
		{"OHV by ISO 14900", func(m *record.MeasuredRecord) { m.Reactor.HydroxylMethod = record.MethodISO14900 }, nil},
		{"AV 0", func(m *record.MeasuredRecord) { m.Reactor.AcidValue = pf(0) }, nil},
		{"AV of pure TPA", func(m *record.MeasuredRecord) { m.Reactor.AcidValue = pf(record.MaxAcidValue) }, nil},
		{"AV above pure TPA", func(m *record.MeasuredRecord) { m.Reactor.AcidValue = pf(next(record.MaxAcidValue)) }, record.ErrMeasured},
		{"AV by a hydroxyl method", func(m *record.MeasuredRecord) { m.Reactor.AcidMethod = record.MethodD4274 }, record.ErrInvalid},
		{"AV method without value", func(m *record.MeasuredRecord) { m.Reactor.AcidValue = nil }, record.ErrInvalid},
		{"no reactor", func(m *record.MeasuredRecord) { m.Reactor = nil }, nil},
	}
	for _, c := range cases {
		_, err := record.ValidateEventAt(measuredEv(c.mut), testkit.T0)
		switch {
		case c.err == nil && err != nil:
			t.Errorf("%s: refused: %v", c.name, err)
		case c.err != nil && !errors.Is(err, c.err):
			t.Errorf("%s: got %v, want %v", c.name, err, c.err)
		case c.err != nil:
			var fe *record.FieldError
			if !errors.As(err, &fe) || !errors.Is(err, record.ErrInvalid) {
				t.Errorf("%s: %v is not a FieldError wrapping ErrInvalid", c.name, err)
			}
		}
	}
}

func TestParseMethod(t *testing.T) {
	for in, want := range map[string]record.Method{
		"D4274": record.MethodD4274, "astm d4274": record.MethodD4274, "ASTM-D4274": record.MethodD4274,
		"ISO 14900": record.MethodISO14900, "14900": record.MethodISO14900, "d4662": record.MethodD4662, "iso2114": record.MethodISO2114,
	} {
		if got, err := record.ParseMethod(in); err != nil || got != want {
			t.Errorf("%q: %v %v, want %v", in, got, err, want)
		}
	}
	if _, err := record.ParseMethod("titration"); !errors.Is(err, record.ErrInvalid) {
		t.Errorf("unknown method: %v", err)
	}
}
