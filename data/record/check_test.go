package record_test

import (
	"errors"
	"fmt"
	"reflect"
	"testing"

	"baleassay/assess"
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
)

// xNonMinimal re-encodes the version field of an event (key 0, the first
// pair of its map) with a one-byte argument it does not need: still
// well-formed CBOR with the same value, but not the core deterministic
// form (RFC 8949 §4.2.1: integers in their shortest form).
func xNonMinimal(t *testing.T, raw []byte) []byte {
	t.Helper()
	if raw[1] != 0x00 || raw[2] != record.FormatVersion {
		t.Fatalf("unexpected event layout % x", raw[:3])
	}
	return append([]byte{raw[0], 0x00, 0x18, record.FormatVersion}, raw[3:]...)
}

// TestCheckEventsParallelSameAsSerial: the workers give exactly what one
// loop gives: the same events in order, the same warnings in order, and
// on failure the same first error (lowest index), whatever the failures
// behind it and however the batch is cut.
func TestCheckEventsParallelSameAsSerial(t *testing.T) {
	raws, _ := testkit.BenchRaws(t, 5000, 7)
	m := testkit.NewMaker(0x43, 9)
	// Coordinates 0,0 give a warning (records issue: "implausible ...
	// coordinates 0,0"); spread a few over the batch.
	for _, i := range []int{3, 1400, 2501, 4999} {
		raws[i] = testkit.Enc(t, m.Site(m.Entity(), fmt.Sprintf("Unfixed yard %d", i), 0, 0))
	}
	neg := m.Pull(m.Entity(), m.Entity(), "P1", 9.5)
	neg.Pull.Kg["hdpe"] = -0.1 // negative mass: a validation error (records issue)
	bad := map[string][]byte{"non-canonical": xNonMinimal(t, raws[10]), "invalid": testkit.Enc(t, neg), "garbage": {0xff}}

	serial, sw, err := record.CheckEvents(raws, nil, testkit.XferNow, 1)
	if err != nil {
		t.Fatal(err)
	}
	if len(sw) != 4 {
		t.Fatalf("%d warnings, want the 4 planted", len(sw))
	}
	for i, c := range serial {
		if c.ID != record.IDOf(raws[i]) || &c.Raw[0] != &raws[i][0] {
			t.Fatalf("event %d: id or bytes not those of the input", i)
		}
	}
	ids := make([]record.EventID, len(raws))
	for i, r := range raws {
		ids[i] = record.IDOf(r)
	}
	if got, gw, err := record.CheckEvents(raws, ids, testkit.XferNow, 2); err != nil || !reflect.DeepEqual(got, serial) || !reflect.DeepEqual(gw, sw) {
		t.Fatalf("with the ids given: %v, or events or warnings differ", err)
	}
	for _, w := range []int{2, 3, 7, 64} {
		got, gw, err := record.CheckEvents(raws, nil, testkit.XferNow, w)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, serial) || !reflect.DeepEqual(gw, sw) {
			t.Fatalf("%d workers: events or warnings differ from the serial check", w)
		}
	}
	// Failures: one, or several with the lowest in an early, middle or
	// last run; the reported one is always the serial loop's.
	cases := [][]struct {
		at  int
		bad string
	}{
		{{2600, "non-canonical"}},
		{{4999, "invalid"}},
		{{0, "garbage"}},
		{{3000, "invalid"}, {700, "non-canonical"}, {4000, "garbage"}},
		{{1250, "garbage"}, {1249, "invalid"}},
		{{2499, "non-canonical"}, {2500, "invalid"}},
	}
	for ci, c := range cases {
		in := append([][]byte(nil), raws...)
		for _, f := range c {
			in[f.at] = bad[f.bad]
		}
		_, _, want := record.CheckEvents(in, nil, testkit.XferNow, 1)
		var wantEE *record.EventError
		if !errors.As(want, &wantEE) {
			t.Fatalf("case %d: serial error %v is not an *EventError", ci, want)
		}
		lowest := c[0].at
		for _, f := range c {
			lowest = min(lowest, f.at)
		}
		if wantEE.Index != lowest {
			t.Fatalf("case %d: serial check failed at %d, want %d", ci, wantEE.Index, lowest)
		}
		for _, w := range []int{2, 3, 4, 16} {
			got, gw, err := record.CheckEvents(in, nil, testkit.XferNow, w)
			if got != nil || gw != nil || !reflect.DeepEqual(err, want) {
				t.Fatalf("case %d, %d workers: got %v, want %v", ci, w, err, want)
			}
		}
	}
	if _, _, err := record.CheckEvents(append([][]byte{bad["non-canonical"]}, raws...), nil, testkit.XferNow, 2); !errors.Is(err, record.ErrNotCanonical) {
		t.Fatalf("non-canonical event: %v, want ErrNotCanonical", err)
	}
	if _, _, err := record.CheckEvents(append(raws[:100:100], bad["invalid"]), nil, testkit.XferNow, 2); !errors.Is(err, assess.ErrNegativeMass) {
		t.Fatalf("negative mass: %v, want the audit model's negative-mass error", err)
	}
}
