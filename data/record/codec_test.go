package record_test

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"bytes"
	"errors"
	"math"
	"testing"

	"github.com/fxamacker/cbor/v2"
	"pgregory.net/rapid"
)

func TestEncodeDecodeRoundTrip(t *testing.T) {
	e := testkit.SiteEv(testkit.Ent(1), testkit.DevA, testkit.T0.UnixMilli(), "Kestrel Lane yard", 52.25, -1.5)
	raw := testkit.MustEncode(t, e)
	got, err := record.DecodeEvent(raw)
	if err != nil {
		t.Fatal(err)
	}
	again := testkit.MustEncode(t, got)
	if !bytes.Equal(raw, again) {
		t.Fatalf("re-encoding differs:\n%x\n%x", raw, again)
	}
	if got.Site.Name != e.Site.Name || got.Site.Lat != 52.25 || got.Clock != e.Clock {
		t.Fatalf("decoded %+v, want %+v", got, e)
	}
}

// The first bytes of a deterministic encoding follow RFC 8949 §4.2.1:
// a map header with the pair count, then keys in bytewise order.
func TestEncodingIsCoreDeterministic(t *testing.T) {
	raw := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1, "A", 1, 2))
	// Source: RFC 8949 §3.1 — major type 5 (map) with 6 pairs is 0xa6;
	// key 0 (version) is 0x00 and value 1 is 0x01.
	if raw[0] != 0xa6 || raw[1] != 0x00 || raw[2] != 0x01 {
		t.Fatalf("prefix % x, want a6 00 01", raw[:3])
	}
	// Map keys equal regardless of Go map iteration: encode the same pull 20 times.
	p := testkit.PullEv(testkit.Ent(2), testkit.Ent(3), testkit.DevA, 1, map[string]float64{"pet_clear": 10, "pvc": 0.5, "labels": 0.25, "closures": 0.75})
	first := testkit.MustEncode(t, p)
	for i := 0; i < 20; i++ {
		if b := testkit.MustEncode(t, p); !bytes.Equal(b, first) {
			t.Fatal("encoding of a map is not deterministic")
		}
	}
}

func TestDecodeEventRefuses(t *testing.T) {
	good := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 2))
	if good[0] != 0xa6 {
		t.Fatalf("unexpected header %x", good[0])
	}
	with := func(head byte, tail ...byte) []byte {
		b := append([]byte{head}, good[1:]...)
		return append(b, tail...)
	}
	nan := testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 2)
	nan.Site.Lat = math.NaN()
	inf := testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 2)
	inf.Site.Lon = math.Inf(1)
	v2 := testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 2)
	v2.Version = 2
	deep := append(bytes.Repeat([]byte{0x81}, 10000), 0x00)
	// Source for the byte values below: RFC 8949 §3 (major types, additional info).
	cases := []struct {
		name string
		raw  []byte
		want error
	}{
		{"empty", nil, record.ErrDecode},
		{"truncated", good[:len(good)-3], record.ErrDecode},
		{"trailing byte", append(bytes.Clone(good), 0x00), record.ErrDecode},
		{"duplicate key", with(0xa7, 0x00, 0x01), record.ErrDecode}, // key 0 twice
		{"unknown field", with(0xa7, 0x14, 0x00), record.ErrDecode}, // key 20
		{"indefinite map", with(0xbf, 0xff), record.ErrDecode},      // 0xbf … 0xff
		{"tag", append([]byte{0xc1}, good...), record.ErrDecode},    // tag 1 around the event
		{"non-minimal integer", append([]byte{0xa6, 0x00, 0x18, 0x01}, good[3:]...), record.ErrNotCanonical},
		{"NaN", testkit.MustEncode(t, nan), record.ErrDecode},
		{"infinity", testkit.MustEncode(t, inf), record.ErrDecode},
		{"version 2", testkit.MustEncode(t, v2), record.ErrVersion},
		{"nesting 10000", deep, record.ErrDecode},
		{"huge array claim", []byte{0x9a, 0xff, 0xff, 0xff, 0xff}, record.ErrDecode},
		{"too large", make([]byte, record.MaxEventBytes+1), record.ErrTooLarge},
		{"not a map", []byte{0x01}, record.ErrDecode},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := record.DecodeEvent(c.raw)
			if !errors.Is(err, c.want) {
				t.Fatalf("err = %v, want %v", err, c.want)
			}
		})
	}
	// The library's own error types come through for callers who want them.
	_, err := record.DecodeEvent(with(0xa7, 0x00, 0x01))
	var dup *cbor.DupMapKeyError
	if !errors.As(err, &dup) {
		t.Fatalf("duplicate key: %v is not a *cbor.DupMapKeyError", err)
	}
}

func genEvent(t *rapid.T) record.Event {
	e := record.Event{Version: record.FormatVersion, Device: record.DeviceID{byte(rapid.IntRange(1, 255).Draw(t, "dev"))},
		Clock: record.HLC{WallMs: rapid.Int64Range(1, 1<<45).Draw(t, "ms"), Logical: rapid.Uint32().Draw(t, "logical")}}
	copy(e.Entity[:], rapid.SliceOfN(rapid.Byte(), 16, 16).Draw(t, "entity"))
	for i, n := 0, rapid.IntRange(0, 3).Draw(t, "nsup"); i < n; i++ {
		var id record.EventID
		copy(id[:], rapid.SliceOfN(rapid.Byte(), 32, 32).Draw(t, "sup"))
		e.Supersedes = append(e.Supersedes, id)
	}
	f := rapid.Float64Range(-1e6, 1e6)
	switch rapid.IntRange(0, 3).Draw(t, "kind") {
	case 0:
		e.Kind, e.Site = record.KindSite, &record.SiteRecord{Name: rapid.String().Draw(t, "name"), Lat: f.Draw(t, "lat"), Lon: f.Draw(t, "lon")}
	case 1:
		e.Kind, e.Bale = record.KindBale, &record.BaleRecord{ReceivedMs: rapid.Int64().Draw(t, "rx"), GrossKg: f.Draw(t, "kg"), Tag: rapid.String().Draw(t, "tag")}
	case 2:
		kg := rapid.MapOf(rapid.StringN(1, 12, -1), f).Draw(t, "kgmap")
		e.Kind, e.Pull = record.KindPull, &record.PullRecord{Label: rapid.String().Draw(t, "label"), Kg: kg}
	default:
		e.Kind, e.Deleted = record.KindSetting, true
	}
	return e
}

// Property: decode(encode(e)) re-encodes to the same bytes, for any event.
func TestRoundTripProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		e := genEvent(t)
		raw, err := record.EncodeEvent(e)
		if err != nil {
			t.Fatal(err)
		}
		got, err := record.DecodeEvent(raw)
		if err != nil {
			t.Fatalf("decode: %v", err)
		}
		again, _ := record.EncodeEvent(got)
		if !bytes.Equal(raw, again) {
			t.Fatalf("round trip changed bytes")
		}
	})
}

func FuzzDecodeEvent(f *testing.F) {
	f.Add(testkit.MustEncode(f, testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 2)))
	f.Add(testkit.MustEncode(f, testkit.PullEv(testkit.Ent(2), testkit.Ent(3), testkit.DevB, 5, map[string]float64{"pet_clear": 1})))
	f.Add([]byte{0xa0})
	f.Fuzz(func(t *testing.T, raw []byte) {
		e, err := record.DecodeEvent(raw)
		if err != nil {
			return
		}
		// Whatever decodes re-encodes to itself and validates without panicking.
		again, err := record.EncodeEvent(e)
		if err != nil || !bytes.Equal(again, raw) {
			t.Fatalf("accepted bytes do not re-encode to themselves")
		}
		_, _ = record.ValidateEvent(e)
	})
}

// The pieces examined travel as key 7 of the pull (bundle.cddl) and come
// back as the audit's denominator.
func TestPullTotalPiecesRoundTrip(t *testing.T) {
	e := testkit.PullEv(testkit.Ent(3), testkit.Ent(2), testkit.DevA, testkit.T0.UnixMilli(), map[string]float64{"pet_clear": 12, "pvc": 0.2})
	e.Pull.Pieces = map[string]int64{"pvc": 4}
	e.Pull.TotalPieces = 380
	raw := testkit.MustEncode(t, e)
	got, err := record.DecodeEvent(raw)
	if err != nil {
		t.Fatal(err)
	}
	if got.Pull.TotalPieces != 380 {
		t.Fatalf("TotalPieces %d after the round trip, want 380", got.Pull.TotalPieces)
	}
	var generic map[int]cbor.RawMessage
	if err := cbor.Unmarshal(raw, &generic); err != nil {
		t.Fatal(err)
	}
	var pull map[int]cbor.RawMessage
	if err := cbor.Unmarshal(generic[9], &pull); err != nil {
		t.Fatal(err)
	}
	// Source: RFC 8949 §3.1 — unsigned 380 is 0x19 0x01 0x7c.
	if !bytes.Equal(pull[7], []byte{0x19, 0x01, 0x7c}) {
		t.Fatalf("pull key 7 holds % x, want 19 01 7c", []byte(pull[7]))
	}
	ap, err := record.AssessPull(*got.Pull)
	if err != nil {
		t.Fatal(err)
	}
	if ap.TotalPieces != 380 {
		t.Fatalf("the audit's pull has %d pieces examined, want 380", ap.TotalPieces)
	}
	// Not counted: the key is left out, so pulls saved before it existed
	// keep their bytes and their ids.
	e.Pull.TotalPieces = 0
	generic, pull = nil, nil
	if err := cbor.Unmarshal(testkit.MustEncode(t, e), &generic); err != nil {
		t.Fatal(err)
	}
	if err := cbor.Unmarshal(generic[9], &pull); err != nil {
		t.Fatal(err)
	}
	if _, ok := pull[7]; ok {
		t.Fatal("a pull without a total writes key 7")
	}
}
