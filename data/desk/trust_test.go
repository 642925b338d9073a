package desk

// Source: names, sites and keys here are invented test inputs; checks
// compare against the rules of the transfer layer.

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// A key is trusted only after its fingerprint is checked: Matches wants
// at least 16 hex digits of it and refuses a different key.
func TestTrustCandidateMatches(t *testing.T) {
	d := openTest(t)
	lab := openTest(t)
	info, err := lab.Key()
	if err != nil {
		t.Fatal(err)
	}
	pem := filepath.Join(t.TempDir(), "lab.pem")
	if err := lab.WritePublicKey(pem); err != nil {
		t.Fatal(err)
	}
	c, err := CandidateOf(pem)
	if err != nil || c.Fingerprint != info.Fingerprint || c.Device != lab.Store().DeviceID() || c.Source != FromPEM {
		t.Fatalf("candidate %+v, %v", c, err)
	}
	full := info.Fingerprint.String()
	if err := c.Matches(full[:17]); err != nil { // 16 digits and a dash
		t.Fatalf("16 digits: %v", err)
	}
	if err := c.Matches(strings.ToUpper(full)); err != nil {
		t.Fatalf("whole fingerprint in capitals: %v", err)
	}
	if err := c.Matches(full[:8]); !errors.Is(err, ErrUsage) {
		t.Fatalf("8 digits accepted: %v", err)
	}
	wrong := []byte(full[:17])
	if wrong[16] == '0' {
		wrong[16] = '1'
	} else {
		wrong[16] = '0'
	}
	if err := c.Matches(string(wrong)); !errors.Is(err, ErrFingerprintMismatch) {
		t.Fatalf("a different key: %v", err)
	}
	if err := d.TrustKey(c.Fingerprint, "lab"); err != nil {
		t.Fatal(err)
	}
	if err := d.TrustKey(c.Fingerprint, "lab again"); !errors.Is(err, transfer.ErrTrustName) {
		t.Fatalf("same key twice: %v", err)
	}
	own, _ := d.Key()
	if err := d.TrustKey(own.Fingerprint, "me"); !errors.Is(err, ErrOwnKey) {
		t.Fatalf("own key: %v", err)
	}
	if e, err := d.TrustRemove("LAB"); err != nil || e.Fingerprint != c.Fingerprint {
		t.Fatalf("remove: %+v %v", e, err)
	}
}

// The demo store's records carry the proofs of the invented devices that
// wrote them: it exports, and another demo store imports the bundle.
func TestDemoStoreExports(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo")
	if _, _, err := MakeDemo(DemoOptions{Dir: dir, Weeks: 1, Seed: 3}); err != nil {
		t.Fatal(err)
	}
	d, err := Open(Location{Dir: dir}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer d.Close()
	stick := t.TempDir()
	res, fp, err := d.ExportBundles(stick+string(os.PathSeparator), BundleOptions{})
	if err != nil || len(res.Files) == 0 || res.Relayed != res.Events {
		t.Fatalf("demo export: %+v, %v", res, err)
	}
	other := filepath.Join(t.TempDir(), "demo2")
	if _, _, err := MakeDemo(DemoOptions{Dir: other, Weeks: 1, Seed: 4}); err != nil {
		t.Fatal(err)
	}
	d2, err := Open(Location{Dir: other}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer d2.Close()
	if err := d2.TrustKey(fp, "first demo"); err != nil {
		t.Fatal(err)
	}
	rep, err := d2.Import(context.Background(), res.Files, ImportOptions{}, nil)
	if err != nil || rep.Refused() != 0 || rep.Files[0].New == 0 {
		t.Fatalf("import of the demo export: %+v %v", rep.Files, err)
	}
}

// show lists an edit after what it supersedes even when its author's
// clock was an hour behind.
func TestShowOrdersBySupersessionFirst(t *testing.T) {
	d := openTest(t)
	site := mustSite(t, d, "Kettleby Yard", 45.067, 4.402)
	det, err := d.Show(site.String())
	if err != nil {
		t.Fatal(err)
	}
	first := det.History[0]
	slow := first.Event
	slow.Device = record.DeviceID{0x5e}
	slow.Clock = record.HLC{WallMs: first.Clock.WallMs - 3600_000}
	slow.Site = &record.SiteRecord{Name: "Kettleby Yard (north gate)", Lat: 45.067, Lon: 4.402}
	slow.Supersedes = []record.EventID{first.ID}
	raw, err := record.EncodeEvent(slow)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := d.Store().ApplyRaw([][]byte{raw}, nil); err != nil {
		t.Fatal(err)
	}
	det, err = d.Show(site.String())
	if err != nil || len(det.History) != 2 {
		t.Fatalf("show: %+v %v", det, err)
	}
	if det.History[0].ID != first.ID || det.History[1].Site.Name != "Kettleby Yard (north gate)" {
		t.Fatalf("history %s, then %s: the edit comes first", det.History[0].Site.Name, det.History[1].Site.Name)
	}
}
