package record_test

// Source: invented test inputs; the range limits checked are the project's
// own (record/validate.go: 5000 kg and the others, illustrative), the
// skew strings our own format.

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"baleassay/assess"
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
)

// Boundary rows of the physical ranges (ranges.go: MaxBaleKg 5,000 kg,
// MaxBaleDimM 5 m, MaxPieces 10⁶, clock stamps 2000-01-01 to 2100-01-01
// UTC, typed dates from 1950-01-01;
// the bounds are this program's own, stated in ranges.go) and of the
// terminal-safe text rule. Every row outside a range was accepted
// before the ranges existed.
func TestValidateRanges(t *testing.T) {
	now := testkit.T0
	next := func(x float64) float64 { return math.Nextafter(x, math.Inf(1)) }
	y1950 := time.Date(1950, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
	y2000 := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
	y2100 := time.Date(2100, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
	bale := func(kg, dim float64) record.Event {
		e := testkit.BaleEv(testkit.Ent(2), testkit.Ent(1), testkit.DevA, now.UnixMilli(), kg)
		e.Bale.LengthM, e.Bale.WidthM, e.Bale.HeightM = dim, 1, 1
		return e
	}
	received := func(ms int64) record.Event {
		e := bale(500, 1)
		e.Bale.ReceivedMs = ms
		return e
	}
	pull := func(kg map[string]float64) record.Event {
		return testkit.PullEv(testkit.Ent(3), testkit.Ent(2), testkit.DevA, now.UnixMilli(), kg)
	}
	stated := func(x float64) record.Event {
		e := pull(map[string]float64{"pet_clear": 1})
		e.Pull.StatedKg = x
		return e
	}
	pieces := func(n int64) record.Event {
		e := pull(map[string]float64{"pet_clear": 10})
		e.Pull.Pieces = map[string]int64{"pet_clear": n}
		return e
	}
	total := func(n int64, counted map[string]int64) record.Event {
		e := pull(map[string]float64{"pet_clear": 10, "pvc": 0.1})
		e.Pull.Pieces, e.Pull.TotalPieces = counted, n
		return e
	}
	taken := func(ms int64) record.Event {
		e := pull(map[string]float64{"pet_clear": 10})
		e.Pull.TakenMs = ms
		return e
	}
	clock := func(ms int64) record.Event {
		e := testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), "Yard", 1, 1)
		e.Clock.WallMs = ms // as given: testkit moves small stamps after T0
		return e
	}
	name := func(s string) record.Event {
		return testkit.SiteEv(testkit.Ent(1), testkit.DevA, now.UnixMilli(), s, 1, 1)
	}
	notes := func(s string) record.Event {
		e := name("Yard")
		e.Site.Notes = s
		return e
	}
	tag := func(s string) record.Event {
		e := bale(500, 1)
		e.Bale.Tag = s
		return e
	}
	label := func(s string) record.Event {
		e := pull(map[string]float64{"pet_clear": 1})
		e.Pull.Label = s
		return e
	}
	cases := []struct {
		name string
		e    record.Event
		err  error // nil: valid
	}{
		{"bale 5000 kg", bale(5000, 1.7), nil},
		{"bale just over 5000 kg", bale(next(5000), 1.7), record.ErrOutOfRange},
		{"bale 1e308 kg", bale(1e308, 1), record.ErrOutOfRange},
		{"bale dimension 5 m", bale(1000, 5), nil},
		{"bale dimension just over 5 m", bale(1000, next(5)), record.ErrOutOfRange},
		{"bale dimension 122 (centimetres)", bale(500, 122), record.ErrOutOfRange},
		{"pull part 5000 kg", pull(map[string]float64{"pet_clear": 5000}), nil},
		{"pull part just over 5000 kg", pull(map[string]float64{"pet_clear": next(5000)}), record.ErrOutOfRange},
		// The case: two finite masses whose total is +Inf.
		{"pull parts 1e308 + 1e308", pull(map[string]float64{"pet_clear": 1e308, "pvc": 1e308}), record.ErrOutOfRange},
		{"pull parts 2500 + 2500", pull(map[string]float64{"pet_clear": 2500, "pvc": 2500}), nil},
		{"pull parts 2500 + 2500.001", pull(map[string]float64{"pet_clear": 2500, "pvc": 2500.001}), record.ErrOutOfRange},
		{"pull part -0", pull(map[string]float64{"pet_clear": 1, "pvc": math.Copysign(0, -1)}), nil},
		{"pull stated 5000 kg", stated(5000), nil},
		{"pull stated over 5000 kg", stated(5001), record.ErrOutOfRange},
		{"pull pieces 1e6", pieces(record.MaxPieces), nil},
		{"pull pieces 1e6 + 1", pieces(record.MaxPieces + 1), record.ErrOutOfRange},
		{"pull pieces 2^62", pieces(1 << 62), record.ErrOutOfRange},
		{"pull pieces negative", pieces(-1), assess.ErrNegativeCount},
		// Pieces examined (total_count): 0 (not counted) to MaxPieces, and
		// never fewer than the categories count.
		{"pull total not given", total(0, map[string]int64{"pvc": 3}), nil},
		{"pull total 1e6", total(record.MaxPieces, nil), nil},
		{"pull total 1e6 + 1", total(record.MaxPieces+1, nil), record.ErrOutOfRange},
		{"pull total 2^62", total(1<<62, nil), record.ErrOutOfRange},
		{"pull total negative", total(-1, nil), assess.ErrNegativeCount},
		{"pull total equal to the counted", total(403, map[string]int64{"pet_clear": 400, "pvc": 3}), nil},
		{"pull total below the counted", total(402, map[string]int64{"pet_clear": 400, "pvc": 3}), assess.ErrBadTotal},
		{"pull total with a negative count", total(5, map[string]int64{"pvc": -3}), assess.ErrNegativeCount},
		{"pull taken not given", taken(0), nil},
		{"pull taken 1949-12-31T23:59:59.999", taken(y1950 - 1), record.ErrOutOfRange},
		{"pull taken 1950-01-01", taken(y1950), nil},
		{"pull taken 1969 (negative)", taken(-5), nil},
		{"pull taken year 1653", taken(-1e13), record.ErrOutOfRange},
		{"received 1950-01-01", received(y1950), nil},
		{"received just before 1950", received(y1950 - 1), record.ErrOutOfRange},
		{"received 1985 (an old audit entered now)", received(time.Date(1985, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()), nil},
		{"received 2099-12-31T23:59:59.999", received(y2100 - 1), nil},
		{"received 2100-01-01", received(y2100), record.ErrOutOfRange},
		{"received min int64", received(math.MinInt64), record.ErrOutOfRange},
		{"clock 2000-01-01", clock(y2000), nil},
		{"clock 1970 (a reset clock)", clock(86_400_000), record.ErrOutOfRange},
		{"clock 2^62 ms", clock(1 << 62), record.ErrOutOfRange},
		{"clock max int64", clock(math.MaxInt64), record.ErrOutOfRange},
		{"clock negative", clock(math.MinInt64), record.ErrOutOfRange},
		// Terminal-safe text.
		{"name with accents", name("Müllerstraße Wertstoffhof Š"), nil},
		{"name with ESC sequence", name("Yard\x1b[2J"), record.ErrControlChar},
		{"name with BEL", name("Yard\a"), record.ErrControlChar},
		{"name with DEL", name("Yard\x7f"), record.ErrControlChar},
		{"name with C1 CSI", name("Yard\u009b31m"), record.ErrControlChar},
		{"name with right-to-left override", name("Yard \u202egnp.exe"), record.ErrControlChar},
		{"name with isolate", name("Yard \u2066x\u2069"), record.ErrControlChar},
		{"notes with newline", notes("gate code\n1234"), record.ErrControlChar},
		{"notes with carriage return", notes("overwrite\rme"), record.ErrControlChar},
		{"notes with line separator", notes("a\u2028b"), record.ErrControlChar},
		{"tag with tab", tag("KL\t0417"), record.ErrControlChar},
		{"tag with NUL", tag("KL\x000417"), record.ErrControlChar},
		{"label with ESC", label("P1\x1b]0;title\a"), record.ErrControlChar},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := record.ValidateEventAt(c.e, now)
			if c.err == nil {
				if err != nil {
					t.Fatalf("refused: %v", err)
				}
				return
			}
			if !errors.Is(err, c.err) || !errors.Is(err, record.ErrInvalid) {
				t.Fatalf("err = %v, want %v", err, c.err)
			}
			// The message quotes no control character itself.
			if _, _, ok := record.TerminalSafe(err.Error()); !ok {
				t.Fatalf("message is not terminal-safe: %q", err.Error())
			}
			if len(err.Error()) > 400 {
				t.Fatalf("message is %d bytes long", len(err.Error()))
			}
		})
	}
}

// FormatSkew never overflows: the old warning multiplied a millisecond
// difference into a time.Duration, so an event stamped 2⁶² ms was shown
// as "-498938h" ahead.
func TestFormatSkew(t *testing.T) {
	day := int64(24 * 3600 * 1000)
	cases := []struct {
		ms   int64
		want string
	}{
		{0, "0s"},
		{3 * 60 * 1000, "3m0s"},
		{-90 * 1000, "-1m30s"},
		{47 * 3600 * 1000, "47h0m0s"},
		{2 * day, "2 days"},
		{365 * day, "365 days"},
		{-40 * day, "-40 days"},
		{2 * 365 * day, "2 years"},
		{1 << 62, "146235604 years"}, // 2^62 / (365 · 86,400,000), computed here
		{math.MaxInt64, "292471208 years"},
		{math.MinInt64, "-292471208 years"},
	}
	for _, c := range cases {
		if got := record.FormatSkew(c.ms); got != c.want {
			t.Errorf("FormatSkew(%d) = %q, want %q", c.ms, got, c.want)
		}
	}
	// The future-clock warning uses it: the furthest stamp the range
	// allows still reads as years ahead, not as a negative duration.
	now := testkit.T0
	w, err := record.ValidateEventAt(testkit.SiteEv(testkit.Ent(1), testkit.DevA, record.MaxTimeMs-1, "Yard", 1, 1), now)
	if err != nil || len(w) != 1 || !strings.Contains(w[0].Message, "73 years ahead") {
		t.Fatalf("warning %v, err %v", w, err)
	}
}

// Settings refuse JSON that reads differently in different readers (a
// repeated key) or carries a terminal escape, on save and import alike.
func TestValidateSettingJSON(t *testing.T) {
	now := testkit.T0
	setting := func(body string) record.Event {
		return record.Event{Version: 1, Entity: testkit.Ent(5), Kind: record.KindSetting, Device: testkit.DevA, Clock: record.HLC{WallMs: now.UnixMilli()},
			Setting: &record.SettingRecord{Kind: record.SettingSpec, Name: "glycol feed", Body: []byte(body)}}
	}
	ok := `{"name":"glycol feed","limits":[{"item":"pet","min":0.8}]}`
	if _, err := record.ValidateEventAt(setting(ok), now); err != nil {
		t.Fatalf("valid spec refused: %v", err)
	}
	for _, c := range []struct {
		body string
		want error
	}{
		{`{"name":"glycol feed","limits":[{"item":"pet","min":0.8}],"limits":[]}`, assess.ErrDuplicateKey},
		{`{"name":"glycol feed","limits":[{"item":"pet\u001b[2J","min":0.8}]}`, assess.ErrControlText},
	} {
		if _, err := record.ValidateEventAt(setting(c.body), now); !errors.Is(err, record.ErrBadSetting) || !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want ErrBadSetting and %v", c.body, err, c.want)
		}
	}
}

// Numbers in messages carry no exponent: a grader reads "1e+06 kg" as a
// typing slip of the program, not of the value.
func TestMessagesWriteNumbersPlainly(t *testing.T) {
	now := testkit.T0
	for _, c := range []struct {
		kg   float64
		want string
	}{
		{1e6, "bale.gross_kg = 1000000:"},
		{5000.5, "bale.gross_kg = 5000.5:"},
		{1e308, "bale.gross_kg = 1 × 10³⁰⁸:"},
		{-2.5e-300, "bale.gross_kg = -2.5 × 10⁻³⁰⁰:"},
	} {
		_, err := record.ValidateEventAt(testkit.BaleEv(testkit.Ent(2), testkit.Ent(1), testkit.DevA, now.UnixMilli(), c.kg), now)
		if err == nil || !strings.HasPrefix(err.Error(), c.want) || strings.Contains(err.Error(), "e+") {
			t.Errorf("%g kg: %v, want it to start %q", c.kg, err, c.want)
		}
	}
	if err := record.ValidateGrossKg(5001); !errors.Is(err, record.ErrOutOfRange) {
		t.Errorf("ValidateGrossKg(5001) = %v", err)
	}
	if err := record.ValidateGrossKg(548); err != nil {
		t.Errorf("ValidateGrossKg(548) = %v", err)
	}
}
