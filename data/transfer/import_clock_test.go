package transfer

// Source: stamps here are invented; the bounds are SkewAhead (10 min)
// and SkewBehind (30 days) of import.go and MaxClockAhead of record.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"strings"
	"testing"
	"time"
)

// Clock edges of an import: a bundle or event far ahead reads as years,
// never as a negative duration (an event stamped far ahead once showed
// as "-498938h ahead"); the exporter's own events stamped far behind the
// bundle's clock are flagged; relayed ones are not.
func TestImportClockFlags(t *testing.T) {
	key, south := xKey(t, 0x61), xKey(t, 0x62)
	now := testkit.XferNow
	m := testkit.NewMaker(1, 1)
	m.Dev = key.DeviceID()
	at := func(e record.Event, ts time.Time) []byte {
		e.Clock = record.HLC{WallMs: ts.UnixMilli()}
		return testkit.Enc(t, e)
	}
	old1 := at(m.Site(m.Entity(), "Old yard", 51, 1), now.AddDate(0, 0, -40))
	old2 := at(m.Site(m.Entity(), "Older yard", 51, 1), now.AddDate(0, 0, -95))
	fresh := at(m.Site(m.Entity(), "New yard", 51, 1), now.Add(-time.Hour))
	future := at(m.Site(m.Entity(), "Future yard", 51, 1), time.Date(2099, 6, 1, 0, 0, 0, 0, time.UTC))
	sm := testkit.NewMaker(2, 2)
	sm.Dev = south.DeviceID()
	relayedOld := at(sm.Site(sm.Entity(), "South yard", 50, 1), now.AddDate(-1, 0, 0))
	southProof, err := NewAuthorProof(south, []record.EventID{record.IDOf(relayedOld)})
	if err != nil {
		t.Fatal(err)
	}
	b, err := SealBundle(key, BundleHeader{Seq: 1, WallMs: now.UnixMilli(), Part: 1, Parts: 1},
		[][]byte{old1, old2, fresh, relayedOld, future}, [][]byte{southProof})
	if err != nil {
		t.Fatal(err)
	}
	s := xferStore(t, t.TempDir(), now)
	fr := (&Importer{Store: s, Trust: xTrustOnly(key), Now: func() time.Time { return now }}).ImportBytes(b)
	if fr.Err != nil {
		t.Fatal(fr.Err)
	}
	flags := strings.Join(fr.Flags, "\n")
	if !strings.Contains(flags, "2 event(s) of device "+key.DeviceID().String()+" stamped more than 30 days before the bundle's own clock, up to 95 days (events[1])") {
		t.Errorf("behind flag missing or wrong:\n%s", flags)
	}
	if !strings.Contains(flags, "73 years ahead") || strings.Contains(flags, "-") && strings.Contains(flags, "h ahead") {
		t.Errorf("future stamp flag:\n%s", flags)
	}
	// A bundle stamped in 2099 by its device: flagged in years.
	b2, err := SealBundle(key, BundleHeader{Seq: 2, WallMs: time.Date(2099, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli(), Part: 1, Parts: 1}, [][]byte{fresh}, nil)
	if err != nil {
		t.Fatal(err)
	}
	fr = (&Importer{Store: s, Trust: xTrustOnly(key), Now: func() time.Time { return now }}).ImportBytes(b2)
	if fr.Err != nil || !strings.Contains(strings.Join(fr.Flags, "\n"), "stamped this bundle 72 years ahead") {
		t.Fatalf("bundle from 2099: %v %q", fr.Err, fr.Flags)
	}
}
