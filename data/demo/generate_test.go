package demo

// Source: the generated season is an invented scenario; checks compare
// the generator's outputs with each other and with the records' rules.

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
	"time"

	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/data/transfer"
)

// TestGeneratedSeason: a season of about the asked size, all in the past,
// with corrections, deletions and conflicts; the same seed gives the same
// bytes; the bundles its devices would send, imported in arrival order,
// give exactly the events written straight into a store.
func TestGeneratedSeason(t *testing.T) {
	o := GenOptions{Events: 12_000, Devices: 4, Seed: 3, PerBundle: 1500}
	dir := t.TempDir()
	s, err := store.OpenWith(filepath.Join(dir, "direct"), store.Options{Now: func() time.Time { return time.Date(2026, 1, 10, 0, 0, 0, 0, time.UTC) }})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	sum, err := GenerateStore(s, o)
	if err != nil {
		t.Fatal(err)
	}
	if sum.Events != o.Events || sum.Bales == 0 || sum.Pulls < 4*sum.Bales || sum.Edits == 0 || sum.Deletions == 0 || sum.Conflicts == 0 || sum.Sites < 12 {
		t.Fatalf("summary %+v", sum)
	}
	if !time.UnixMilli(sum.LastClockMs).Before(GenDefaultEnd.AddDate(0, 0, 1)) || sum.From.After(GenDefaultEnd) {
		t.Fatalf("season runs from %v to %v (clock to %v), not in the past", sum.From, sum.To, time.UnixMilli(sum.LastClockMs))
	}
	if cs, err := s.Conflicts(); err != nil || len(cs) == 0 || len(cs) > sum.Conflicts {
		t.Fatalf("%d conflicts stored (%v), %d made, %d resolved", len(cs), err, sum.Conflicts, sum.Resolved)
	}
	if isDemo, _ := s.IsDemo(); !isDemo {
		t.Fatal("a generated store is not marked as a demo store")
	}
	direct, _ := s.EventSetHash()

	b1, b2 := filepath.Join(dir, "b1"), filepath.Join(dir, "b2")
	sum1, err := GenerateBundles(b1, o)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := GenerateBundles(b2, o); err != nil {
		t.Fatal(err)
	}
	files1, _ := filepath.Glob(filepath.Join(b1, "*"+transfer.BundleExt))
	files2, _ := filepath.Glob(filepath.Join(b2, "*"+transfer.BundleExt))
	if len(files1) != sum1.Bundles || len(files1) < o.Events/o.PerBundle || len(files1) != len(files2) {
		t.Fatalf("%d and %d bundles, summary says %d", len(files1), len(files2), sum1.Bundles)
	}
	for i := range files1 {
		a, _ := os.ReadFile(files1[i])
		b, _ := os.ReadFile(files2[i])
		if filepath.Base(files1[i]) != filepath.Base(files2[i]) || !bytes.Equal(a, b) {
			t.Fatalf("the same seed gave different bundles: %s", files1[i])
		}
	}
	if _, err := GenerateBundles(b1, o); err == nil {
		t.Fatal("a second season written over the first")
	}
	trusted := map[transfer.Fingerprint]string{}
	keys, _ := filepath.Glob(filepath.Join(b1, KeysDir, "*.pem"))
	for _, k := range keys {
		pem, _ := os.ReadFile(k)
		pub, err := transfer.ParsePublicKeyPEM(pem)
		if err != nil {
			t.Fatal(err)
		}
		trusted[transfer.FingerprintOf(pub)] = filepath.Base(k)
	}
	if len(keys) != o.Devices {
		t.Fatalf("%d public keys for %d devices", len(keys), o.Devices)
	}
	lab, err := store.OpenWith(filepath.Join(dir, "lab"), store.Options{Now: func() time.Time { return time.Date(2026, 1, 10, 0, 0, 0, 0, time.UTC) }})
	if err != nil {
		t.Fatal(err)
	}
	defer lab.Close()
	im := &transfer.Importer{Store: lab, AllowDemo: true, Trust: func(f transfer.Fingerprint) (string, bool) { n, ok := trusted[f]; return n, ok }}
	rep := im.ImportFiles(files1)
	news := 0
	for _, f := range rep.Files {
		if f.Err != nil {
			t.Fatalf("%s: %v", f.Path, f.Err)
		}
		news += f.New
	}
	if news != o.Events || len(rep.Gaps) != 0 {
		t.Fatalf("imported %d new events of %d; gaps %v", news, o.Events, rep.Gaps)
	}
	if merged, _ := lab.EventSetHash(); merged != direct {
		t.Fatal("the imported bundles and the store written directly hold different events")
	}
	var devs = map[record.DeviceID]bool{}
	_ = lab.ForEachRawSince(0, func(_ uint64, _ record.EventID, raw []byte) error {
		e, err := record.DecodeEvent(raw)
		if err != nil || !e.Demo {
			t.Fatalf("event not a demo record: %v", err)
		}
		devs[e.Device] = true
		return nil
	})
	if len(devs) != o.Devices {
		t.Fatalf("events from %d devices, want %d", len(devs), o.Devices)
	}
}
