package record_test

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"bytes"
	"fmt"
	"math/rand/v2"
	"reflect"
	"testing"

	"pgregory.net/rapid"
)

// genHistory makes a random offline history: a few entities, each event
// superseding a random subset of earlier events of its entity, from two or
// three devices with random clocks, some deletions.
func genHistory(t *rapid.T) []record.Stamped {
	nEnt := rapid.IntRange(1, 4).Draw(t, "entities")
	var all []record.Stamped
	for en := 0; en < nEnt; en++ {
		var mine []record.Stamped
		for i, n := 0, rapid.IntRange(1, 8).Draw(t, "events"); i < n; i++ {
			var sup []record.EventID
			for _, p := range mine {
				if rapid.Bool().Draw(t, "sup") {
					sup = append(sup, p.ID)
				}
			}
			dev := []record.DeviceID{testkit.DevA, testkit.DevB, {0xc3}}[rapid.IntRange(0, 2).Draw(t, "dev")]
			e := testkit.SiteEv(testkit.Ent(byte(en+1)), dev, rapid.Int64Range(1, 50).Draw(t, "ms"), fmt.Sprint("s", i), float64(i), 0, sup...)
			if len(sup) > 0 && rapid.IntRange(0, 4).Draw(t, "del") == 0 {
				e.Site, e.Deleted = nil, true
			}
			s := record.Stamped{ID: record.IDOf(mustEncodeRapid(t, e)), Event: e}
			mine = append(mine, s)
		}
		all = append(all, mine...)
	}
	return all
}

func mustEncodeRapid(t *rapid.T, e record.Event) []byte {
	b, err := record.EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func foldHeads(m map[record.EntityID]*record.EntityState) map[record.EntityID][][]byte {
	out := make(map[record.EntityID][][]byte, len(m))
	for k, st := range m {
		out[k] = testkit.HeadIDs(st)
	}
	return out
}

// Property: the fold depends only on the set of events — any permutation,
// with duplicates, gives the same heads in the same view order.
func TestFoldOrderIndependent(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		h := genHistory(t)
		want := foldHeads(record.Fold(h))
		r := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 1))
		for i := 0; i < 5; i++ {
			p := testkit.Shuffled(r, h)
			p = append(p, p[:r.IntN(len(p))]...) // duplicates
			if got := foldHeads(record.Fold(p)); !reflect.DeepEqual(got, want) {
				t.Fatalf("permutation %d changed the fold", i)
			}
		}
		// Heads are exactly the events nobody of the same entity supersedes.
		sup := map[record.EventID]bool{}
		for _, e := range h {
			for _, s := range e.Supersedes {
				sup[s] = true
			}
		}
		for _, e := range h {
			isHead := false
			for _, id := range want[e.Entity] {
				isHead = isHead || bytes.Equal(id, e.ID[:])
			}
			if isHead == sup[e.ID] {
				t.Fatalf("event %s: head=%v but superseded=%v", e.ID.Short(), isHead, sup[e.ID])
			}
		}
	})
}

func TestConflictAppearsAndResolves(t *testing.T) {
	e := testkit.Ent(7)
	base := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevA, 100, "Heron Quay", 51, 0))
	a := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevA, 200, "Heron Quay yard", 51, 0, base.ID))
	b := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevB, 150, "Heron Quay depot", 51, 0, base.ID))
	st := record.Fold([]record.Stamped{base, a, b})[e]
	if !st.Conflicted() || len(st.Heads) != 2 {
		t.Fatalf("two devices superseding the same event: heads %d, want 2", len(st.Heads))
	}
	// View order is (clock, device, id): b (150) before a (200).
	if st.Heads[0].ID != b.ID || st.Heads[1].ID != a.ID {
		t.Fatal("heads not in view order")
	}
	if cur, _ := st.Current(); cur.ID != a.ID {
		t.Fatal("current is not the latest head")
	}
	fix := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevB, 300, "Heron Quay yard", 51, 0, a.ID, b.ID))
	st = record.Fold([]record.Stamped{base, a, b, fix})[e]
	if st.Conflicted() || st.Heads[0].ID != fix.ID || st.Events != 4 {
		t.Fatalf("after resolving: heads %d, events %d", len(st.Heads), st.Events)
	}
	// Superseding only one side leaves the conflict visible.
	half := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevB, 300, "Heron Quay yard", 51, 0, a.ID))
	if st := record.Fold([]record.Stamped{base, a, b, half})[e]; !st.Conflicted() {
		t.Fatal("an event superseding one side hid the conflict")
	}
}

func TestTombstoneHidesButKeeps(t *testing.T) {
	e := testkit.Ent(8)
	base := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevA, 100, "Old Mill", 50, 1))
	del := testkit.StampedOf(t, record.Event{Version: 1, Entity: e, Kind: record.KindSite, Device: testkit.DevA, Clock: record.HLC{WallMs: 200}, Deleted: true, Supersedes: []record.EventID{base.ID}})
	st := record.Fold([]record.Stamped{base, del})[e]
	if !st.Deleted() || st.Events != 2 {
		t.Fatalf("deleted=%v events=%d, want true, 2", st.Deleted(), st.Events)
	}
	if _, ok := st.Current(); ok {
		t.Fatal("a deleted entity has a current value")
	}
	// Delete against a concurrent edit: a visible conflict, the edit shown.
	edit := testkit.StampedOf(t, testkit.SiteEv(e, testkit.DevB, 150, "Old Mill yard", 50, 1, base.ID))
	st = record.Fold([]record.Stamped{base, del, edit})[e]
	if st.Deleted() || !st.Conflicted() {
		t.Fatal("delete against edit must be a visible conflict")
	}
	if cur, ok := st.Current(); !ok || cur.ID != edit.ID {
		t.Fatal("the edit is not shown")
	}
}
