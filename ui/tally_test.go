package ui

import (
	"image"
	"math"
	"testing"
	"time"

	"gioui.org/io/key"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/record"
)

// Source: sites, bales and pulls here are invented test inputs.

var testNow = time.Date(2026, 11, 24, 9, 30, 0, 0, time.UTC)

// testDesk is a fresh store with one site and one 500 kg bale.
func testDesk(t *testing.T) (*desk.Desk, record.EntityID) {
	t.Helper()
	d, err := desk.Open(desk.Location{Dir: t.TempDir()}, desk.Options{Create: true, Now: func() time.Time { return testNow }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { d.Close() })
	site, err := d.AddSite(record.SiteRecord{Name: "Wrenfield Lane Yard", Kind: record.SiteYard, Lat: 52.41, Lon: -1.52}, desk.SaveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	bale, err := d.AddBale(desk.BaleInput{Site: site.String(), BaleRecord: record.BaleRecord{GrossKg: 500, Tag: "WL-1", ReceivedMs: testNow.Add(-time.Hour).UnixMilli()}}, desk.SaveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return d, bale
}

func newTestApp(t *testing.T, d *desk.Desk) (*App, *driver) {
	a := New(Config{Desk: d, Now: func() time.Time { return testNow }})
	t.Cleanup(a.Close)
	dr := newDriver(t, a, image.Pt(1280, 800))
	dr.settle()
	return a, dr
}

// typePull types a whole pull by keyboard alone: its mass, then for each
// fraction the category key and the mass, then Enter to save.
func (d *driver) typePull(total string, fracs ...[2]string) {
	for _, c := range total {
		d.pressChar(key.Name(c))
	}
	d.press(key.NameReturn, 0)
	for _, f := range fracs {
		d.pressChar(key.Name(f[0]))
		for _, c := range f[1] {
			d.pressChar(key.Name(c))
		}
		d.press(key.NameReturn, 0)
	}
}

func TestTallyWholePullByKeyboard(t *testing.T) {
	d, bale := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.press("3", key.ModShortcut)
	if a.Screen() != ScreenTally {
		t.Fatalf("Ctrl+3 opened %v", a.Screen())
	}
	dr.typePull("12.5", [2]string{"1", "10.2"}, [2]string{"3", "0.4+0.3"}, [2]string{"C", "1,1"})
	acts := dr.press(key.NameReturn, 0)
	var save SavePull
	for _, act := range acts {
		if s, ok := act.(SavePull); ok {
			save = s
		}
	}
	if save.Bale != bale || save.Pull.Label != "P1" {
		t.Fatalf("Enter returned %v, want SavePull of P1 on the bale", acts)
	}
	dr.settle()
	_, rows, err := d.Pulls(bale.String())
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1 {
		t.Fatalf("the store holds %d pulls, want exactly 1", len(rows))
	}
	p := rows[0].Pull
	want := map[string]float64{"pet_clear": 10.2, "pvc": 0.7, "closures": 1.1}
	if p.Label != "P1" || p.StatedKg != 12.5 || len(p.Kg) != len(want) {
		t.Fatalf("saved pull = %+v, want P1, 12.5 kg weighed, %v", p, want)
	}
	for k, v := range want {
		if math.Abs(p.Kg[k]-v) > 1e-9 {
			t.Errorf("%s = %v kg, want %v", k, p.Kg[k], v)
		}
	}
	if names, _ := d.Drafts(); len(names) != 0 {
		t.Errorf("drafts left after the save: %v", names)
	}
	if a.tally.step != stepPullMass || a.tally.label != "P2" {
		t.Errorf("after the save the tally is at %v for %q, want pull-mass for P2", a.tally.step, a.tally.label)
	}
}

// Backspace undoes the last fraction; a bad mass keeps what was typed and
// says what to fix.
func TestTallyUndoAndBadValue(t *testing.T) {
	d, _ := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.press("3", key.ModShortcut)
	dr.typePull("8", [2]string{"1", "5"}, [2]string{"2", "1"})
	dr.press(key.NameDeleteBackward, 0)
	if n := len(a.tally.entries); n != 1 {
		t.Fatalf("after Backspace %d fractions remain, want 1", n)
	}
	dr.press("4", key.ModShortcut|key.ModShift) // not a category key: nothing
	dr.pressChar("4")
	dr.pressChar("-") // not a number key: ignored
	dr.pressChar("0")
	dr.press(key.NameReturn, 0)
	if a.tally.frac.Text() != "0" || a.tally.frac.Problem == "" {
		t.Fatalf("bad fraction: text %q, problem %q; want the text kept and a sentence", a.tally.frac.Text(), a.tally.frac.Problem)
	}
	if c := assess.CategoryAt(a.tally.cat); c.Key != "ldpe" {
		t.Fatalf("key 4 chose %s, want ldpe", c.Key)
	}
}

// Half a pull typed, the app gone: a new app on the same store opens the
// Tally on that bale with the pull as it was.
func TestTallyDraftRestored(t *testing.T) {
	d, bale := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.press("3", key.ModShortcut)
	dr.typePull("9.8", [2]string{"2", "0.5"})
	dr.settle()
	a.Close()
	b := New(Config{Desk: d, Now: func() time.Time { return testNow }})
	defer b.Close()
	dr2 := newDriver(t, b, image.Pt(1280, 800))
	waitFor(t, dr2, func() bool { return b.m.draft.Has && !b.m.draft.Busy })
	dr2.settle()
	s := b.tally
	if b.Screen() != ScreenTally || b.m.bale != bale || s.step != stepPick || s.pullMass.Text() != "9.8" ||
		len(s.entries) != 1 || assess.CategoryAt(s.entries[0].cat).Key != "hdpe" || s.entries[0].kg != 0.5 {
		t.Fatalf("restored: screen %v, step %v, mass %q, entries %+v", b.Screen(), s.step, s.pullMass.Text(), s.entries)
	}
}
