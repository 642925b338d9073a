package store

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"strconv"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

func TestOpenKeepsDeviceAndRefusesSecondOpener(t *testing.T) {
	dir := t.TempDir()
	s, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	dev := s.DeviceID()
	if dev == (record.DeviceID{}) {
		t.Fatal("new store has no device id")
	}
	start := time.Now()
	_, err = Open(dir)
	if !errors.Is(err, ErrStoreInUse) {
		t.Fatalf("second open: %v, want ErrStoreInUse", err)
	}
	// common practice: a refusal, not a hang — well under a few seconds.
	if d := time.Since(start); d > 3*time.Second {
		t.Fatalf("second open took %v", d)
	}
	s.Close()
	s, err = Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if s.DeviceID() != dev {
		t.Fatal("device id changed on reopen")
	}
}

func TestApplyRawCountsAndOrder(t *testing.T) {
	s := openTemp(t)
	a := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(1), testkit.DevA, testkit.T0.UnixMilli(), "A", 1, 1))
	b := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(2), testkit.DevB, testkit.T0.UnixMilli(), "B", 2, 2))
	buf := append(append([]byte(nil), a...), b...)
	res, err := s.ApplyRaw([][]byte{buf[:len(a)], buf[len(a):]}, map[string][]byte{"xfer/x": []byte("1")})
	if err != nil || res.New != 2 || res.Present != 0 {
		t.Fatalf("first apply: %+v, %v", res, err)
	}
	for i := range buf {
		buf[i] = 0 // the store must have copied
	}
	c := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(3), testkit.DevA, testkit.T0.UnixMilli(), "C", 3, 3))
	res, err = s.ApplyRaw([][]byte{a, c, c}, nil)
	if err != nil || res.New != 1 || res.Present != 2 {
		t.Fatalf("second apply: %+v, %v; want 1 new, 2 present", res, err)
	}
	var seqs []uint64
	var raws [][]byte
	err = s.ForEachRawSince(0, func(seq uint64, id record.EventID, raw []byte) error {
		if record.IDOf(raw) != id {
			t.Errorf("seq %d: id does not match bytes", seq)
		}
		seqs, raws = append(seqs, seq), append(raws, bytes.Clone(raw))
		return nil
	})
	if err != nil || !reflect.DeepEqual(seqs, []uint64{1, 2, 3}) {
		t.Fatalf("seqs %v, %v", seqs, err)
	}
	if !bytes.Equal(raws[0], a) || !bytes.Equal(raws[1], b) || !bytes.Equal(raws[2], c) {
		t.Fatal("stored bytes differ from the applied ones")
	}
	var since []uint64
	s.ForEachRawSince(2, func(seq uint64, _ record.EventID, _ []byte) error { since = append(since, seq); return nil })
	if !reflect.DeepEqual(since, []uint64{3}) {
		t.Fatalf("since 2: %v", since)
	}
	if n, _ := s.LastSeq(); n != 3 {
		t.Fatalf("LastSeq %d", n)
	}
	if v, _ := s.Meta("xfer/x"); string(v) != "1" {
		t.Fatalf("meta %q", v)
	}
	if v, err := s.Meta("xfer/none"); v != nil || err != nil {
		t.Fatalf("absent meta: %q, %v", v, err)
	}
	if ok, _ := s.Has(record.IDOf(c)); !ok {
		t.Fatal("Has is false for a stored event")
	}
	if _, err := s.Raw(record.EventID{9}); !errors.Is(err, ErrNotFound) {
		t.Fatalf("Raw of absent: %v", err)
	}
}

// A refused write leaves the store byte-for-byte unchanged (content hash),
// and the error says which event and field.
func TestRefusedApplyChangesNothing(t *testing.T) {
	s := openTemp(t)
	if _, err := s.ApplyRaw([][]byte{testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 1))}, nil); err != nil {
		t.Fatal(err)
	}
	before := mustHash(t, s)
	good := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(2), testkit.DevA, 1000, "B", 1, 1))
	bad := testkit.MustEncode(t, testkit.SiteEv(testkit.Ent(3), testkit.DevA, 1000, "C", 91, 1))
	kindClash := testkit.MustEncode(t, testkit.BaleEv(testkit.Ent(1), testkit.Ent(9), testkit.DevB, 2000, 500))
	cases := []struct {
		name  string
		raws  [][]byte
		meta  map[string][]byte
		index int
		want  error
	}{
		{"invalid latitude", [][]byte{good, good, bad}, nil, 2, record.ErrLatitude},
		{"malformed bytes", [][]byte{good, good[:5]}, nil, 1, record.ErrDecode},
		{"kind differs from the entity's", [][]byte{good, kindClash}, nil, 1, record.ErrKindMismatch},
		{"meta key outside prefix", [][]byte{good}, map[string][]byte{"device": {1}}, -1, ErrMetaKey},
	}
	for _, c := range cases {
		_, err := s.ApplyRaw(c.raws, c.meta)
		if !errors.Is(err, c.want) {
			t.Fatalf("%s: err %v, want %v", c.name, err, c.want)
		}
		var ee *record.EventError
		if c.index >= 0 && (!errors.As(err, &ee) || ee.Index != c.index) {
			t.Fatalf("%s: error %v does not name event %d", c.name, err, c.index)
		}
		if h := mustHash(t, s); h != before {
			t.Fatalf("%s: refused write changed the store", c.name)
		}
	}
	// The store still takes writes after refusing bad data.
	if _, err := s.ApplyRaw([][]byte{good}, nil); err != nil {
		t.Fatal(err)
	}
	if mustHash(t, s) == before {
		t.Fatal("content hash did not change after a write")
	}
}

func TestWriteFailureStopsWrites(t *testing.T) {
	fail := false
	s, err := OpenWith(t.TempDir(), Options{beforeCommit: func() error {
		if fail {
			return errors.New("injected: no space left on device")
		}
		return nil
	}})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if _, err := s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "A", Lat: 1, Lon: 1}}}, SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	before := mustHash(t, s)
	fail = true
	_, err = s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "B", Lat: 1, Lon: 1}}}, SaveOptions{})
	if !errors.Is(err, ErrStoreFailed) {
		t.Fatalf("failed write: %v", err)
	}
	fail = false
	if _, err := s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "C", Lat: 1, Lon: 1}}}, SaveOptions{}); !errors.Is(err, ErrStoreFailed) {
		t.Fatalf("write after a failure: %v, want ErrStoreFailed", err)
	}
	if err := s.PutDraft("d", record.PullRecord{}); !errors.Is(err, ErrStoreFailed) {
		t.Fatalf("draft after a failure: %v", err)
	}
	if mustHash(t, s) != before {
		t.Fatal("failed write left data behind")
	}
	if n := s.SiteIndex().Len(); n != 1 {
		t.Fatalf("index holds %d sites, want 1", n)
	}
}

func TestSaveNeedsConfirmForWarnings(t *testing.T) {
	s := openTemp(t)
	ev := record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: "No fix", Lat: 0, Lon: 0}}
	_, err := s.Save([]record.Event{ev}, SaveOptions{})
	var we *WarningsError
	if !errors.As(err, &we) || !errors.Is(err, ErrNeedsConfirm) || we.Warnings[0].Code != record.WarnNullIsland {
		t.Fatalf("err %v, want a null-island WarningsError", err)
	}
	if n, _ := s.LastSeq(); n != 0 {
		t.Fatal("unconfirmed save was written")
	}
	ids, err := s.Save([]record.Event{ev}, SaveOptions{Confirm: true})
	if err != nil || len(ids) != 1 {
		t.Fatal(err)
	}
	e, err := s.Event(ids[0])
	if err != nil || e.Device != s.DeviceID() || e.Entity.IsZero() || e.Clock.WallMs != testkit.T0.Add(24*time.Hour).UnixMilli() {
		t.Fatalf("saved event %+v, %v", e, err)
	}
}

// Property: applying the same events in any order and batching gives the
// same folded state as Fold, the same event-set hash and the same
// conflict list.
func TestStoreMatchesFoldInAnyOrder(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	var evs []record.Stamped
	var raws [][]byte
	for en := 1; en <= 5; en++ {
		var mine []record.EventID
		for i := 0; i < 6; i++ {
			var sup []record.EventID
			for _, p := range mine {
				if r.IntN(2) == 0 {
					sup = append(sup, p)
				}
			}
			dev := []record.DeviceID{testkit.DevA, testkit.DevB}[r.IntN(2)]
			e := testkit.SiteEv(testkit.Ent(byte(en)), dev, 1000+int64(r.IntN(100)), "s", float64(en), float64(i), sup...)
			raw := testkit.MustEncode(t, e)
			st := record.Stamped{ID: record.IDOf(raw), Event: e}
			evs, raws, mine = append(evs, st), append(raws, raw), append(mine, st.ID)
		}
	}
	want := record.Fold(evs)
	var firstHash [32]byte
	for trial := 0; trial < 4; trial++ {
		s := openTemp(t)
		p := testkit.Shuffled(r, raws)
		for len(p) > 0 {
			n := 1 + r.IntN(len(p))
			if _, err := s.ApplyRaw(p[:n], nil); err != nil {
				t.Fatal(err)
			}
			p = p[n:]
		}
		states, err := s.Entities(0)
		if err != nil {
			t.Fatal(err)
		}
		conflicts := 0
		for _, st := range states {
			if !reflect.DeepEqual(testkit.HeadIDs(&st), testkit.HeadIDs(want[st.ID])) || st.Events != want[st.ID].Events {
				t.Fatalf("trial %d: entity %s differs from Fold", trial, st.ID)
			}
			if st.Conflicted() {
				conflicts++
			}
		}
		cs, _ := s.Conflicts()
		if len(cs) != conflicts {
			t.Fatalf("Conflicts() lists %d, fold has %d", len(cs), conflicts)
		}
		h, _ := s.EventSetHash()
		if trial == 0 {
			firstHash = h
		} else if h != firstHash {
			t.Fatalf("trial %d: event-set hash differs", trial)
		}
	}
}

func TestConflictCountedAndResolved(t *testing.T) {
	s := openTemp(t)
	e := testkit.Ent(4)
	base := testkit.SiteEv(e, testkit.DevA, 1000, "Marsh Road", 52, 1)
	baseID := record.IDOf(testkit.MustEncode(t, base))
	a := testkit.SiteEv(e, testkit.DevA, 2000, "Marsh Road yard", 52, 1, baseID)
	b := testkit.SiteEv(e, testkit.DevB, 2100, "Marsh Rd depot", 52.001, 1, baseID)
	if res, err := s.ApplyRaw([][]byte{testkit.MustEncode(t, base), testkit.MustEncode(t, a)}, nil); err != nil || res.Conflicts != 0 {
		t.Fatalf("%+v %v", res, err)
	}
	res, err := s.ApplyRaw([][]byte{testkit.MustEncode(t, b)}, nil)
	if err != nil || res.Conflicts != 1 {
		t.Fatalf("concurrent edit: %+v, %v; want 1 conflict", res, err)
	}
	cs, _ := s.Conflicts()
	if len(cs) != 1 || cs[0].ID != e {
		t.Fatalf("conflicts %v", cs)
	}
	keep := record.IDOf(testkit.MustEncode(t, b))
	if _, err := s.Resolve(e, keep); err != nil {
		t.Fatal(err)
	}
	st, _ := s.Entity(e)
	if st.Conflicted() || st.Heads[0].Site.Name != "Marsh Rd depot" || st.Events != 4 {
		t.Fatalf("after resolve: %+v", st)
	}
	if cs, _ := s.Conflicts(); len(cs) != 0 {
		t.Fatal("conflict still listed after resolve")
	}
	if got, ok := s.SiteIndex().Get(e); !ok || got.Lat != 52.001 {
		t.Fatalf("index has %+v", got)
	}
}

func TestSiteIndexFollowsEdits(t *testing.T) {
	dir := t.TempDir()
	s, _ := Open(dir)
	ids, err := s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Gull Point", Lat: 10, Lon: 20}}}, SaveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ev, _ := s.Event(ids[0])
	near := func() string {
		h, err := s.SiteIndex().Nearest(10, 20, 1)
		if err != nil || len(h) == 0 {
			return ""
		}
		return h[0].Name + "@" + strconv.FormatFloat(math.Round(h[0].Km), 'g', -1, 64)
	}
	if got := near(); got != "Gull Point@0" {
		t.Fatalf("after add: %q", got)
	}
	if _, err := s.Supersede(ev.Entity, record.Event{Site: &record.SiteRecord{Name: "Gull Point", Lat: 11, Lon: 20}}, SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	// 1° of latitude on the IUGG mean sphere is 111.2 km (2πR/360, computed).
	if got := near(); got != "Gull Point@111" {
		t.Fatalf("after move: %q", got)
	}
	s.Close()
	s, _ = Open(dir) // bulk load on open sees the move
	if got := near(); got != "Gull Point@111" {
		t.Fatalf("after reopen: %q", got)
	}
	if _, err := s.Delete(ev.Entity); err != nil {
		t.Fatal(err)
	}
	if got := near(); got != "" {
		t.Fatalf("after delete: %q", got)
	}
	h, err := s.History(ev.Entity)
	if err != nil || len(h) != 3 || !h[2].Deleted {
		t.Fatalf("history keeps %d events, %v", len(h), err)
	}
	s.Close()
}

func TestDraftSurvivesReopenAndSavesAtomically(t *testing.T) {
	dir := t.TempDir()
	s, _ := Open(dir)
	p := record.PullRecord{Bale: testkit.Ent(2), Label: "P3", Kg: map[string]float64{"pet_clear": 18.5}}
	if err := s.PutDraft("bale2/P3", p); err != nil {
		t.Fatal(err)
	}
	s.Close()
	s, _ = Open(dir)
	defer s.Close()
	got, ok, err := s.Draft("bale2/P3")
	if err != nil || !ok || !reflect.DeepEqual(got, p) {
		t.Fatalf("draft after reopen: %+v %v %v", got, ok, err)
	}
	bad := p
	bad.Kg = map[string]float64{"pet_clear": -1}
	s.PutDraft("bad", bad)
	before := mustHash(t, s)
	if _, _, err := s.SaveDraft("bad", SaveOptions{}); !errors.Is(err, record.ErrInvalid) {
		t.Fatalf("invalid draft saved: %v", err)
	}
	if mustHash(t, s) != before {
		t.Fatal("refused draft save changed the store")
	}
	pe, _, err := s.SaveDraft("bale2/P3", SaveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if _, ok, _ := s.Draft("bale2/P3"); ok {
		t.Fatal("draft kept after save")
	}
	if st, err := s.Entity(pe); err != nil || st.Heads[0].Pull.Label != "P3" {
		t.Fatalf("saved pull %+v %v", st, err)
	}
}

// A store whose site cache is missing (made before it existed) rebuilds it
// from the events on open.
func TestSiteCacheRebuiltOnOpen(t *testing.T) {
	dir := t.TempDir()
	s, _ := Open(dir)
	if _, err := s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Rook Hill", Lat: -12.5, Lon: 130.8}}}, SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	err := s.db.Update(func(tx *bolt.Tx) error {
		if err := tx.DeleteBucket(bSites); err != nil {
			return err
		}
		if _, err := tx.CreateBucket(bSites); err != nil {
			return err
		}
		return tx.Bucket(bMeta).Delete([]byte(metaSites))
	})
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	s, _ = Open(dir)
	defer s.Close()
	if h, _ := s.SiteIndex().Nearest(-12.5, 130.8, 1); len(h) != 1 || h[0].Name != "Rook Hill" {
		t.Fatalf("after rebuild: %+v", h)
	}
}

func TestFindEntity(t *testing.T) {
	s := openTemp(t)
	a, b := record.EntityID{0xaa, 0xbb, 0xcc, 1, 0, 0, 0x70, 0, 0x80, 0, 0, 0, 0x12, 0x34, 0x56, 0x78}, record.EntityID{0xaa, 0xbb, 0xcc, 2, 0, 0, 0x70, 0, 0x80, 0, 0, 0, 0x9a, 0xbc, 0xde, 0xf0}
	for _, id := range []record.EntityID{a, b} {
		if _, err := s.Save([]record.Event{{Entity: id, Kind: record.KindSite, Site: &record.SiteRecord{Name: "x", Lat: 1, Lon: 1}}}, SaveOptions{}); err != nil {
			t.Fatal(err)
		}
	}
	cases := []struct {
		in   string
		want record.EntityID
		err  error
	}{
		{a.String(), a, nil},
		{"aabbcc01", a, nil},
		{"AABB-CC02", b, nil},
		{"aabbcc", record.EntityID{}, ErrAmbiguousID},
		{"12345678", a, nil}, // suffix
		{"bcdef0", b, nil},
		{"ffff", record.EntityID{}, ErrNotFound},
		{"xyz1", record.EntityID{}, ErrNotFound},
	}
	for _, c := range cases {
		got, err := s.FindEntity(c.in)
		if c.err != nil {
			if !errors.Is(err, c.err) {
				t.Errorf("%q: err %v, want %v", c.in, err, c.err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("%q: %s, %v", c.in, got, err)
		}
	}
}

// Property: after random site histories (adds, moves, concurrent moves on
// two devices, deletions, a delete against a move) applied in random
// batches, the live index holds exactly the visible sites at their shown
// positions, and so does the index bulk-loaded on reopening.
func TestIndexMatchesViewsAfterRandomHistories(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 12))
	for trial := 0; trial < 5; trial++ {
		dir := t.TempDir()
		s, err := Open(dir)
		if err != nil {
			t.Fatal(err)
		}
		var raws [][]byte
		for en := 0; en < 30; en++ {
			var heads []record.EventID
			id := testkit.Ent(byte(en + 1))
			for i, n := 0, 1+r.IntN(5); i < n; i++ {
				dev := []record.DeviceID{testkit.DevA, testkit.DevB}[r.IntN(2)]
				var sup []record.EventID
				if len(heads) > 0 {
					sup = heads[:1+r.IntN(len(heads))] // sometimes leaves a conflict
				}
				e := testkit.SiteEv(id, dev, 1000+int64(r.IntN(1000)), "s", testkit.RandLat(r), r.Float64()*360-180, sup...)
				if len(sup) > 0 && r.IntN(5) == 0 {
					e.Site, e.Deleted = nil, true
				}
				raw := testkit.MustEncode(t, e)
				raws = append(raws, raw)
				heads = append(heads[len(sup):], record.IDOf(raw))
			}
		}
		p := testkit.Shuffled(r, raws)
		for len(p) > 0 {
			n := 1 + r.IntN(len(p))
			if _, err := s.ApplyRaw(p[:n], nil); err != nil {
				t.Fatal(err)
			}
			p = p[n:]
		}
		check := func(s *Store, when string) {
			views, err := s.Sites()
			if err != nil {
				t.Fatal(err)
			}
			if s.SiteIndex().Len() != len(views) {
				t.Fatalf("trial %d %s: index %d sites, views %d", trial, when, s.SiteIndex().Len(), len(views))
			}
			for _, v := range views {
				got, ok := s.SiteIndex().Get(v.ID)
				if !ok || got.Lat != v.Site.Lat || got.Lon != v.Site.Lon {
					t.Fatalf("trial %d %s: index %+v, view %+v", trial, when, got, v.Site)
				}
			}
		}
		check(s, "live")
		s.Close()
		s, _ = Open(dir)
		check(s, "reopened")
		s.Close()
	}
}
