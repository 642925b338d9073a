package transfer

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// the records' own rules and what was saved.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/data/store"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// xDevice is a store with its key, opened the way the program opens one.
type xDevice struct {
	name  string
	dir   string
	store *store.Store
	key   *DeviceKey
}

func xDeviceNamed(t *testing.T, name string) *xDevice {
	t.Helper()
	dir := t.TempDir()
	s, k, err := OpenStore(dir, store.Options{Now: func() time.Time { return testkit.XferNow }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return &xDevice{name, dir, s, k}
}

func (d *xDevice) saveSite(t *testing.T, name string, sup ...record.EventID) record.EventID {
	t.Helper()
	e := record.Event{Kind: record.KindSite, Supersedes: sup, Site: &record.SiteRecord{Name: name, Kind: record.SiteYard, Lat: 52.4, Lon: -1.5}}
	if len(sup) > 0 {
		ev, err := d.store.Event(sup[0])
		if err != nil {
			t.Fatal(err)
		}
		e.Entity = ev.Entity
	}
	ids, err := d.store.Save([]record.Event{e}, store.SaveOptions{Confirm: true})
	if err != nil {
		t.Fatal(err)
	}
	return ids[0]
}

func (d *xDevice) export(t *testing.T, dest string) string {
	t.Helper()
	res, err := Export(d.store, d.key, t.TempDir()+string(os.PathSeparator), ExportOptions{SinceLast: dest})
	if err != nil || len(res.Files) != 1 {
		t.Fatalf("%s export: %+v, %v", d.name, res, err)
	}
	return res.Files[0]
}

func (d *xDevice) importFrom(t *testing.T, file string, trusted ...*xDevice) FileReport {
	t.Helper()
	tl := &TrustList{}
	for _, o := range trusted {
		if err := tl.Add(o.name, o.key.Fingerprint()); err != nil {
			t.Fatal(err)
		}
	}
	im := &Importer{Store: d.store, Trust: tl.Func(d.key.Fingerprint()), Now: func() time.Time { return testkit.XferNow }}
	return im.ImportFiles([]string{file}).Files[0]
}

// The attack of the issue: a grader tablet the lab trusts writes an event
// that names the lab as its author and supersedes the lab's own record
// (shown as "by device <lab>"). Before authorship proofs the lab imported
// it; now the bundle is refused with the reason, and the lab's record
// stands.
func TestImpersonatedEventRefused(t *testing.T) {
	lab, tablet := xDeviceNamed(t, "lab"), xDeviceNamed(t, "tablet")
	labSite := lab.saveSite(t, "Kestrel Lane Yard")
	if fr := tablet.importFrom(t, lab.export(t, "tablet"), lab); fr.Err != nil || fr.New != 1 {
		t.Fatalf("tablet imports the lab's site: %+v", fr)
	}
	// The tablet forges the lab's edit: right entity, the lab's device id.
	orig, err := tablet.store.Event(labSite)
	if err != nil {
		t.Fatal(err)
	}
	forged := orig.Event
	forged.Site = &record.SiteRecord{Name: "Kestrel Lane Yard (closed: do not buy)", Kind: record.SiteYard, Lat: 52.4, Lon: -1.5}
	forged.Supersedes = []record.EventID{labSite}
	forged.Clock = record.HLC{WallMs: orig.Clock.WallMs + 1000}
	raw := testkit.Enc(t, forged)
	if forged.Device != lab.store.DeviceID() {
		t.Fatal("the forged event does not claim the lab")
	}
	b, err := SealBundle(tablet.key, BundleHeader{Seq: 1, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}, [][]byte{raw}, nil)
	if err != nil {
		t.Fatal(err)
	}
	before := xContentHash(t, lab.store)
	tl := &TrustList{}
	tl.Add("tablet", tablet.key.Fingerprint())
	fr := (&Importer{Store: lab.store, Trust: tl.Func(lab.key.Fingerprint()), Now: func() time.Time { return testkit.XferNow }}).ImportBytes(b)
	if !errors.Is(fr.Err, ErrAuthorUnproven) || !errors.Is(fr.Err, ErrBundleEvent) {
		t.Fatalf("forged lab event: %v, want ErrAuthorUnproven", fr.Err)
	}
	if !strings.Contains(fr.Err.Error(), lab.store.DeviceID().String()) {
		t.Fatalf("the reason does not name the claimed device: %v", fr.Err)
	}
	if xContentHash(t, lab.store) != before {
		t.Fatal("the refused bundle changed the lab's store")
	}
	st, err := lab.store.Entity(orig.Entity)
	if err != nil || st.Conflicted() || st.Heads[0].ID != labSite {
		t.Fatalf("the lab's record no longer stands: %+v %v", st, err)
	}
}

// Relays: tablet A's events reach tablet C through the lab and tablet B,
// none of which can change them or claim them. C trusts only B; every
// event arrives with the proof of its author, and C can pass them on.
func TestRelayedEventsKeepTheirAuthorsProof(t *testing.T) {
	a, lab, b, c := xDeviceNamed(t, "a"), xDeviceNamed(t, "lab"), xDeviceNamed(t, "b"), xDeviceNamed(t, "c")
	aSite := a.saveSite(t, "Orrin Bridge Yard")
	labSite := lab.saveSite(t, "Calder Mere MRF")
	if fr := lab.importFrom(t, a.export(t, "lab"), a); fr.Err != nil || fr.New != 1 {
		t.Fatalf("lab from a: %+v", fr)
	}
	bSite := b.saveSite(t, "Orrin Bridge Yard (gate 2)")
	// The lab relays a's site with its own; b trusts only the lab.
	if fr := b.importFrom(t, lab.export(t, "b"), lab); fr.Err != nil || fr.New != 2 {
		t.Fatalf("b from lab: %+v", fr)
	}
	// b relays both on, with its own site; c trusts only b.
	file := b.export(t, "c")
	if fr := c.importFrom(t, file, b); fr.Err != nil || fr.New != 3 {
		t.Fatalf("c from b: %+v", fr)
	}
	raw, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	ob, err := OpenBundle(raw, xTrustOnly(b.key))
	if err != nil {
		t.Fatal(err)
	}
	authors := map[record.DeviceID]bool{}
	for _, p := range ob.Proofs {
		authors[p.Device] = true
	}
	for _, d := range []*xDevice{a, lab, b} {
		if !authors[d.key.DeviceID()] {
			t.Errorf("b's bundle carries no proof of %s", d.name)
		}
	}
	for _, id := range []record.EventID{aSite, labSite, bSite} {
		e, err := c.store.Event(id)
		if err != nil {
			t.Fatal(err)
		}
		if !map[record.DeviceID]bool{a.store.DeviceID(): true, lab.store.DeviceID(): true, b.store.DeviceID(): true}[e.Device] {
			t.Fatalf("event %s has author %s", id.Short(), e.Device)
		}
	}
	// And c passes them all on to a new device.
	d := xDeviceNamed(t, "d")
	if fr := d.importFrom(t, c.export(t, "d"), c); fr.Err != nil || fr.New != 3 {
		t.Fatalf("d from c: %+v", fr)
	}
}

// A store that holds another device's event without its proof (from
// before proofs existed) exports nothing and says why, instead of
// writing a bundle every receiver would refuse.
func TestExportWithoutProofRefused(t *testing.T) {
	lab := xDeviceNamed(t, "lab")
	lab.saveSite(t, "Stenhope Depot")
	m := testkit.NewMaker(0x77, 1)
	if _, err := lab.store.ApplyRaw([][]byte{testkit.Enc(t, m.Site(m.Entity(), "Pellam Supply", 45.1, 5.0))}, nil); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	_, err := Export(lab.store, lab.key, dir+string(os.PathSeparator), ExportOptions{})
	if !errors.Is(err, ErrAuthorUnproven) || !strings.Contains(err.Error(), m.Dev.String()) {
		t.Fatalf("got %v, want ErrAuthorUnproven naming device %s", err, m.Dev)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Fatalf("%d files written", len(ents))
	}
}

// A store whose device id is not its key's (made before ids were bound to
// keys) is refused by Export with the reason.
func TestExportRefusesUnboundDevice(t *testing.T) {
	dir := t.TempDir()
	s, err := store.OpenWith(dir, store.Options{Now: func() time.Time { return testkit.XferNow }})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	key, _, err := LoadOrCreateDeviceKey(dir)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Export(s, key, filepath.Join(t.TempDir(), "x.bale"), ExportOptions{})
	if !errors.Is(err, ErrDeviceKey) {
		t.Fatalf("got %v, want ErrDeviceKey", err)
	}
}

// The device id is the first 16 bytes of SHA-256 of the public key.
// Source: RFC 8032 §7.1 TEST 1 public key; the SHA-256 below was computed
// with `printf d75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a | xxd -r -p | sha256sum`.
func TestDeviceIDOfKey(t *testing.T) {
	pub := []byte{0xd7, 0x5a, 0x98, 0x01, 0x82, 0xb1, 0x0a, 0xb7, 0xd5, 0x4b, 0xfe, 0xd3, 0xc9, 0x64, 0x07, 0x3a,
		0x0e, 0xe1, 0x72, 0xf3, 0xda, 0xa6, 0x23, 0x25, 0xaf, 0x02, 0x1a, 0x68, 0xf7, 0x07, 0x51, 0x1a}
	got := DeviceIDOf(pub).String()
	if got != "21fe31dfa154a261626bf854046fd2271b7bed4b6abe45aa58877ef47f9721b9"[:32] {
		t.Fatalf("DeviceIDOf = %s", got)
	}
	if FingerprintOf(pub).String()[:17] != got[:8]+"-"+got[8:16] {
		t.Fatalf("fingerprint %s does not begin with the device id %s", FingerprintOf(pub), got)
	}
}
