package store

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"errors"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"reflect"
	"testing"
)

// xHistory makes a shuffled batch of events over a few entities of each
// kind: edits that supersede earlier events (sometimes two heads at
// once), concurrent edits of one event (conflicts), tombstones, and
// repeats of some events.
func xHistory(t *testing.T, rng *rand.Rand, n int) [][]byte {
	m := testkit.NewMaker(0x44, rng.Uint64())
	site := m.Entity()
	bale := m.Entity()
	var raws [][]byte
	var byEnt = map[record.EntityID][]record.EventID{}
	add := func(e record.Event) {
		r := testkit.Enc(t, e)
		raws = append(raws, r)
		byEnt[e.Entity] = append(byEnt[e.Entity], record.IDOf(r))
	}
	add(m.Site(site, "Invented yard", 52.1, 4.3))
	add(m.Bale(bale, site, 500))
	pulls := []record.EntityID{m.Entity(), m.Entity(), m.Entity()}
	for _, p := range pulls {
		add(m.Pull(p, bale, "P1", 9.5))
	}
	for len(raws) < n {
		ents := append([]record.EntityID{site, bale}, pulls...)
		e := ents[rng.IntN(len(ents))]
		prev := byEnt[e]
		sup := []record.EventID{prev[rng.IntN(len(prev))]}
		if o := prev[rng.IntN(len(prev))]; o != sup[0] && rng.IntN(2) == 0 {
			sup = append(sup, o) // an edit that resolves two heads at once
		}
		switch {
		case rng.IntN(10) == 0 && e != site && e != bale:
			add(m.Tombstone(e, record.KindPull, sup...))
		case e == site:
			add(m.Site(e, fmt.Sprintf("Invented yard %d", len(raws)), 52+rng.Float64(), 4+rng.Float64(), sup...))
		case e == bale:
			add(m.Bale(e, site, 450+float64(rng.IntN(100)), sup...))
		default:
			add(m.Pull(e, bale, "P1", 5+rng.Float64(), sup...))
		}
		if rng.IntN(8) == 0 {
			raws = append(raws, raws[rng.IntN(len(raws))]) // a repeat in the batch
		}
	}
	rng.Shuffle(len(raws), func(i, j int) { raws[i], raws[j] = raws[j], raws[i] })
	return raws
}

// xSeqOrder lists the store's event ids in local insertion order.
func xSeqOrder(t *testing.T, s *Store) []record.EventID {
	var ids []record.EventID
	if err := s.ForEachRawSince(0, func(_ uint64, id record.EventID, _ []byte) error { ids = append(ids, id); return nil }); err != nil {
		t.Fatal(err)
	}
	return ids
}

// TestCommitBatchSameAsOneByOne: a batch written bucket by bucket in key
// order leaves the store exactly as inserting its events one after
// another in batch order does (every bucket, local insertion order
// included), counts new and present events the same, and counts as
// conflicts exactly the entities that went from at most one head to more.
func TestCommitBatchSameAsOneByOne(t *testing.T) {
	for round := range 12 {
		rng := rand.New(rand.NewPCG(uint64(round), 5))
		raws := xHistory(t, rng, 20+rng.IntN(120))
		pre := raws[:rng.IntN(len(raws)/2)] // already in both stores
		dir := t.TempDir()
		batch := xferStore(t, filepath.Join(dir, "batch"), testkit.XferNow)
		single := xferStore(t, filepath.Join(dir, "single"), testkit.XferNow)
		for _, s := range []*Store{batch, single} {
			for _, r := range pre {
				if _, err := s.ApplyRaw([][]byte{r}, nil); err != nil {
					t.Fatal(err)
				}
			}
		}
		heads := func() map[record.EntityID]int {
			out := map[record.EntityID]int{}
			sts, err := batch.Entities(0)
			if err != nil {
				t.Fatal(err)
			}
			for _, st := range sts {
				out[st.ID] = len(st.Heads)
			}
			return out
		}
		before := heads()
		res, err := batch.ApplyRaw(raws, nil)
		if err != nil {
			t.Fatal(err)
		}
		after := heads()
		wantConf := 0
		for e, n := range after {
			if n > 1 && before[e] <= 1 {
				wantConf++
			}
		}
		var news, present int
		for _, r := range raws {
			one, err := single.ApplyRaw([][]byte{r}, nil)
			if err != nil {
				t.Fatal(err)
			}
			news, present = news+one.New, present+one.Present
		}
		if res.New != news || res.Present != present || res.Conflicts != wantConf {
			t.Fatalf("round %d: batch %+v, want %d new, %d present, %d conflicts", round, res, news, present, wantConf)
		}
		if sharedHash(t, batch) != sharedHash(t, single) {
			t.Fatalf("round %d: batch and one-by-one stores differ", round)
		}
		if !reflect.DeepEqual(xSeqOrder(t, batch), xSeqOrder(t, single)) {
			t.Fatalf("round %d: local insertion order differs", round)
		}
		if round == 0 && wantConf == 0 {
			t.Fatal("the history made no conflict: the test would not cover them")
		}
	}
}

// TestCommitKindMismatchFirstIndex: an event whose entity is already of
// another kind (stored, or made earlier in the same batch) is refused
// with its own index, and nothing of the batch is written.
func TestCommitKindMismatchFirstIndex(t *testing.T) {
	m := testkit.NewMaker(0x45, 1)
	s := xferStore(t, t.TempDir(), testkit.XferNow)
	stored := m.Entity()
	if _, err := s.ApplyRaw([][]byte{testkit.Enc(t, m.Site(stored, "Invented yard", 52, 4))}, nil); err != nil {
		t.Fatal(err)
	}
	h0 := mustHash(t, s)
	inBatch := m.Entity()
	batch := [][]byte{
		testkit.Enc(t, m.Site(m.Entity(), "Another yard", 51, 4)),
		testkit.Enc(t, m.Bale(inBatch, stored, 500)),
		testkit.Enc(t, m.Pull(inBatch, inBatch, "P1", 9.5)), // 2: entity made a bale at 1
		testkit.Enc(t, m.Bale(stored, stored, 500)),         // 3: entity stored as a site
	}
	_, err := s.ApplyRaw(batch, nil)
	var ee *record.EventError
	if !errors.As(err, &ee) || ee.Index != 2 || ee.ID != record.IDOf(batch[2]) || !errors.Is(err, record.ErrKindMismatch) {
		t.Fatalf("got %v, want the kind mismatch of event 2", err)
	}
	if mustHash(t, s) != h0 {
		t.Fatal("a refused batch changed the store")
	}
}
