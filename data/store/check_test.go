package store

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values.

import (
	"baleassay/data/internal/testkit"
	"math/rand/v2"
	"reflect"
	"testing"
	"time"
)

// TestCheckCleanStore: a store built from random histories (edits,
// conflicts, tombstones, repeats), with drafts and meta, checks clean.
func TestCheckCleanStore(t *testing.T) {
	dir := t.TempDir()
	s := xferStore(t, dir, testkit.XferNow)
	rng := rand.New(rand.NewPCG(7, 7))
	for range 5 {
		if _, err := s.ApplyRaw(xHistory(t, rng, 60), map[string][]byte{MetaTransferPrefix + "x": {1}}); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.PutDraft("typing", *testkit.PullEv(testkit.Ent(1), testkit.Ent(2), testkit.DevA, 1, map[string]float64{"pet_clear": 1}).Pull); err != nil {
		t.Fatal(err)
	}
	s.Close()
	r, err := Check(dir)
	if err != nil {
		t.Fatal(err)
	}
	if !r.OK() {
		t.Fatalf("problems in a sound store: %q", r.Problems)
	}
	if r.Events == 0 || r.Drafts != 1 || r.Conflicts == 0 || r.Pages["leaf"] == 0 {
		t.Fatalf("report %+v", r)
	}
}

// TestRescueCleanStoreKeepsEverything: rescuing a sound store gives a
// store with the same events, in the same order, the same shared state
// (indexes, conflicts, site cache, transfer records) and the same device.
func TestRescueCleanStoreKeepsEverything(t *testing.T) {
	dir := t.TempDir()
	src := xferStore(t, dir+"/src", testkit.XferNow)
	rng := rand.New(rand.NewPCG(8, 8))
	for range 4 {
		if _, err := src.ApplyRaw(xHistory(t, rng, 80), map[string][]byte{MetaTransferPrefix + "seen/x": {2}}); err != nil {
			t.Fatal(err)
		}
	}
	want, order, dev := sharedHash(t, src), xSeqOrder(t, src), src.DeviceID()
	src.Close()
	rep, err := Rescue(dir+"/src", dir+"/dst", func() time.Time { return testkit.XferNow })
	if err != nil {
		t.Fatal(err)
	}
	if rep.Lost() != 0 || len(rep.Refused) != 0 || rep.NewDevice || rep.Events != len(order) {
		t.Fatalf("rescue of a sound store: %+v", rep)
	}
	dst := xferStore(t, dir+"/dst", testkit.XferNow)
	if sharedHash(t, dst) != want || !reflect.DeepEqual(xSeqOrder(t, dst), order) || dst.DeviceID() != dev {
		t.Fatal("the rescued store differs from the sound one")
	}
	if _, err := Rescue(dir+"/src", dir+"/dst", nil); err == nil {
		t.Fatal("rescue into a folder that holds a store")
	}
}
