package ui

import (
	"os"
	"path/filepath"
	"testing"
	"time"

	"gioui.org/io/key"

	"baleassay/data/desk"
	"baleassay/data/record"
)

// Source: invented test records.

// A correction made on the Tally screen saves a new value that supersedes
// the old one: the pull keeps its id, its history holds both.
func TestTallyCorrectionSupersedes(t *testing.T) {
	d, bale := testDesk(t)
	if _, _, err := d.AddPulls(bale.String(), []record.PullRecord{{Label: "P1", StatedKg: 12, Kg: map[string]float64{"pet_clear": 11, "pvc": 0.5}}}, desk.SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	a, dr := newTestApp(t, d)
	dr.press("3", key.ModShortcut)
	dr.settle()
	dr.click("Correct P1")
	if a.tally.corrects.IsZero() || len(a.tally.entries) != 2 {
		t.Fatalf("Correct P1 loaded %d fractions, corrects %v", len(a.tally.entries), a.tally.corrects)
	}
	dr.press(key.NameDeleteBackward, 0) // drop the PVC
	dr.pressChar("3")
	dr.pressChar("0")
	dr.pressChar(".")
	dr.pressChar("2")
	dr.press(key.NameReturn, 0)
	acts := dr.press(key.NameReturn, 0)
	var save SavePull
	for _, act := range acts {
		if s, ok := act.(SavePull); ok {
			save = s
		}
	}
	if save.Corrects.IsZero() {
		t.Fatalf("Enter returned %v, want a SavePull that corrects P1", acts)
	}
	dr.settle()
	_, rows, err := d.Pulls(bale.String())
	if err != nil || len(rows) != 1 {
		t.Fatalf("pulls after the correction: %d (%v), want 1", len(rows), err)
	}
	if got := rows[0].Pull.Kg["pvc"]; got != 0.2 || rows[0].ID != save.Corrects {
		t.Fatalf("corrected pull: pvc %v kg, id %v; want 0.2 kg on the same pull %v", got, rows[0].ID, save.Corrects)
	}
	det, err := d.Show(rows[0].ID.String())
	if err != nil {
		t.Fatal(err)
	}
	if len(det.History) != 2 || len(det.History[1].Event.Supersedes) != 1 || det.History[1].Event.Supersedes[0] != det.History[0].ID {
		t.Fatalf("history = %d events; want the first value and a correction that supersedes it", len(det.History))
	}
}

// Records exported by another store come in through the Transfer screen's
// actions; an unknown signer is shown and trusted by name first.
func TestTransferImportBringsOtherStoresEvents(t *testing.T) {
	other, otherBale := testDesk(t)
	if _, _, err := other.AddPulls(otherBale.String(), []record.PullRecord{{Label: "P1", Kg: map[string]float64{"pet_clear": 20}}}, desk.SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	stick := t.TempDir()
	if _, err := other.Export(stick, "lab"); err != nil {
		t.Fatal(err)
	}
	mine, err := desk.Open(desk.Location{Dir: t.TempDir()}, desk.Options{Create: true, Now: func() time.Time { return testNow }})
	if err != nil {
		t.Fatal(err)
	}
	defer mine.Close()
	a, dr := newTestApp(t, mine)
	dr.press("5", key.ModShortcut)
	dr.focus(&a.transfer.inDir.Editor)
	dr.typeText(stick)
	acts := dr.click("Import the folder")
	if !hasAction(acts, ImportFrom{Dir: filepath.Clean(stick)}) {
		t.Fatalf("Import returned %v (field %q, problem %q)", acts, a.transfer.inDir.Text(), a.transfer.inDir.Problem)
	}
	waitFor(t, dr, func() bool { return a.m.imported.Has && !a.m.imported.Busy })
	if us, _ := unknownSigner(a.m.imported.Value); us == nil {
		t.Fatalf("import from an unknown device: report %+v, want the unknown signer", a.m.imported.Value)
	}
	dr.focus(&a.transfer.trustName.Editor)
	dr.typeText("tablet west")
	dr.click("Trust this sender")
	waitFor(t, dr, func() bool { return a.m.trusted.Has && !a.m.trusted.Busy })
	if a.m.trusted.Err != nil {
		t.Fatal(a.m.trusted.Err)
	}
	dr.click("Import the folder")
	waitFor(t, dr, func() bool { return a.m.imported.Has && !a.m.imported.Busy })
	rep := a.m.imported.Value
	if rep.Refused() != 0 || len(rep.Files) != 1 || rep.Files[0].New != 3 {
		t.Fatalf("second import: %+v, want one file with 3 new events (site, bale, pull)", rep.Files)
	}
	rows, err := mine.Bales(desk.BaleFilter{})
	if err != nil || len(rows) != 1 || rows[0].Pulls != 1 {
		t.Fatalf("this store after the import: %+v (%v), want the other store's bale and its pull", rows, err)
	}
	entries, err := os.ReadDir(stick)
	if err != nil || len(entries) != 1 {
		t.Fatalf("the import changed the stick: %v", entries)
	}
}

// waitFor runs frames until cond holds (background work finished), at
// most 10 s.
func waitFor(t *testing.T, d *driver, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatal("background work did not finish in 10 s")
		}
		d.a.owner.idle()
		time.Sleep(2 * time.Millisecond)
		d.frame()
	}
	d.frame()
}
