package store

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"encoding/binary"
	"math/rand/v2"
	"path/filepath"
	"reflect"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

// TestUpgradeFromFirstLayout: a store written in the first layout
// (events by id, insertion numbers beside) opens as this layout with the
// same events in the same order, the same device, meta values and
// drafts, and the same shared state as a store that took the same events
// directly; a read-only open upgrades it too, and the upgraded store
// checks clean.
func TestUpgradeFromFirstLayout(t *testing.T) {
	for _, readOnly := range []bool{false, true} {
		dir := t.TempDir()
		rng := rand.New(rand.NewPCG(9, 9))
		raws := xHistory(t, rng, 120)
		dev := record.DeviceID{0xde, 0x01}
		draft := testkit.MustEncode(t, testkit.PullEv(testkit.Ent(3), testkit.Ent(4), testkit.DevA, 5, map[string]float64{"pet_clear": 2}))
		pull, _ := record.DecodeEvent(draft)
		draftRaw, err := record.EncodePull(*pull.Pull)
		if err != nil {
			t.Fatal(err)
		}
		db, err := bolt.Open(filepath.Join(dir, DBFile), 0o600, nil)
		if err != nil {
			t.Fatal(err)
		}
		var order []record.EventID
		err = db.Update(func(tx *bolt.Tx) error {
			b := map[string]*bolt.Bucket{}
			for _, n := range []string{"events", "seq", "entity", "byentity", "heads", "supby", "sites", "meta", "drafts"} {
				b[n], _ = tx.CreateBucket([]byte(n))
			}
			seen := map[record.EventID]bool{}
			for _, r := range raws {
				id := record.IDOf(r)
				if seen[id] {
					continue
				}
				seen[id] = true
				order = append(order, id)
				b["events"].Put(id[:], r)
				b["seq"].Put(binary.BigEndian.AppendUint64(nil, uint64(len(order))), id[:])
			}
			b["meta"].Put([]byte(metaDevice), dev[:])
			b["meta"].Put([]byte("sitecache"), []byte{1})
			b["meta"].Put([]byte(MetaTransferPrefix+"seen/ab"), []byte{7})
			return b["drafts"].Put([]byte("typing"), draftRaw)
		})
		if err != nil {
			t.Fatal(err)
		}
		db.Close()
		s, err := OpenWith(dir, Options{Now: func() time.Time { return testkit.XferNow }, ReadOnly: readOnly})
		if err != nil {
			t.Fatal(err)
		}
		direct := xferStore(t, t.TempDir(), testkit.XferNow)
		for _, id := range order {
			for _, r := range raws {
				if record.IDOf(r) == id {
					if _, err := direct.ApplyRaw([][]byte{r}, nil); err != nil {
						t.Fatal(err)
					}
					break
				}
			}
		}
		if _, err := direct.ApplyRaw(nil, map[string][]byte{MetaTransferPrefix + "seen/ab": {7}}); err != nil {
			t.Fatal(err)
		}
		if err := direct.PutDraft("typing", *pull.Pull); err != nil {
			t.Fatal(err)
		}
		if s.DeviceID() != dev || !reflect.DeepEqual(xSeqOrder(t, s), order) || sharedHash(t, s) != sharedHash(t, direct) {
			t.Fatalf("read-only %v: the upgraded store differs from one written directly", readOnly)
		}
		if v, _ := s.Meta("sitecache"); v != nil {
			t.Fatal("the old site cache flag was carried over")
		}
		s.Close()
		if r, err := Check(dir); err != nil || !r.OK() {
			t.Fatalf("check after upgrade: %v %q", err, r.Problems)
		}
	}
}
