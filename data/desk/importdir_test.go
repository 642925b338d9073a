package desk

// Source: devices, sites and bales here are invented test inputs; the
// expected counts follow from how many bundles each device wrote and
// which files were removed or spoiled on the way.

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// tablet makes a device's store with one site and writes one bundle per
// new bale into dir (names tablet<i>-<n>.bale), bales bundles in all.
// The first bundle carries the site too.
func tablet(t *testing.T, i, bales int, dir string) (*Desk, transfer.Fingerprint, record.DeviceID) {
	t.Helper()
	d := openTest(t)
	site := mustSite(t, d, fmt.Sprintf("Tablet %d Yard", i), 45+float64(i)/10, 4.7)
	key, _, err := d.key()
	if err != nil {
		t.Fatal(err)
	}
	for n := 1; n <= bales; n++ {
		mustBale(t, d, site, 400+float64(n), fmt.Sprintf("T%d-%03d", i, n))
		res, err := transfer.Export(d.Store(), key, filepath.Join(dir, fmt.Sprintf("tablet%d-%03d.bale", i, n)), transfer.ExportOptions{SinceLast: "lab"})
		if err != nil || len(res.Files) != 1 {
			t.Fatalf("export %d/%d: %v %v", i, n, res, err)
		}
	}
	return d, key.Fingerprint(), d.Store().DeviceID()
}

// TestImportFolderSummary imports a folder of 150 bundles from three
// devices, with one bundle missing, one spoiled and one file that is not
// a bundle, and checks the summary device by device.
func TestImportFolderSummary(t *testing.T) {
	stick := t.TempDir()
	const perDevice = 50
	lab := openTest(t)
	devs := map[record.DeviceID]int{}
	for i := 1; i <= 3; i++ {
		_, fp, dev := tablet(t, i, perDevice, stick)
		devs[dev] = i
		if _, _, err := lab.TrustAdd(fp.String(), fmt.Sprintf("tablet %d", i)); err != nil {
			t.Fatal(err)
		}
	}
	// Tablet 2's bundle 17 never reaches the lab; tablet 3's bundle 30 is
	// spoiled on the stick; a note lies beside the bundles.
	if err := os.Remove(filepath.Join(stick, "tablet2-017.bale")); err != nil {
		t.Fatal(err)
	}
	spoiled := filepath.Join(stick, "tablet3-030.bale")
	raw, err := os.ReadFile(spoiled)
	if err != nil {
		t.Fatal(err)
	}
	raw[len(raw)/2] ^= 0x40
	os.WriteFile(spoiled, raw, 0o644)
	os.WriteFile(filepath.Join(stick, "README.txt"), []byte("week 14"), 0o644)

	var steps, applied int
	run, err := lab.ImportPaths(context.Background(), []string{stick}, ImportOptions{}, func(p Progress) {
		steps++
		if p.Step == StepDone {
			applied++
		}
		if p.Of != 3*perDevice-1 {
			t.Errorf("progress of %d files, want %d", p.Of, 3*perDevice-1)
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	if got := len(run.Report.Files); got != 3*perDevice-1 {
		t.Fatalf("%d files read, want %d", got, 3*perDevice-1)
	}
	if applied != 3*perDevice-2 || steps < 2*applied {
		t.Errorf("progress: %d done of %d steps", applied, steps)
	}
	if len(run.Refused) != 1 || filepath.Base(run.Refused[0].Path) != "tablet3-030.bale" || !errors.Is(run.Refused[0].Err, transfer.ErrBadSignature) {
		t.Fatalf("refused %+v", run.Refused)
	}
	if len(run.Skipped) != 1 || filepath.Base(run.Skipped[0]) != "README.txt" {
		t.Fatalf("skipped %v", run.Skipped)
	}
	if len(run.Devices) != 3 {
		t.Fatalf("%d devices, want 3", len(run.Devices))
	}
	total := 0
	for _, dv := range run.Devices {
		i := devs[dv.Device]
		wantBundles, wantMissing := perDevice, 0
		// Events per bundle: one bale each; the first also holds the site.
		wantEvents := perDevice + 1
		switch i {
		case 2:
			wantBundles, wantMissing, wantEvents = perDevice-1, 1, perDevice
		case 3:
			wantBundles, wantMissing, wantEvents = perDevice-1, 1, perDevice
		}
		if len(dv.Bundles) != wantBundles || dv.Files != wantBundles || dv.Missing() != wantMissing ||
			dv.Events != wantEvents || dv.New != wantEvents || dv.Present != 0 || dv.Conflicts != 0 {
			t.Errorf("tablet %d: %d bundles (%s), %d files, %d missing, %d events, %d new, %d present, %d conflicts",
				i, len(dv.Bundles), Ranges(dv.Bundles), dv.Files, dv.Missing(), dv.Events, dv.New, dv.Present, dv.Conflicts)
		}
		if len(dv.Signers) != 1 || dv.Signers[0] != fmt.Sprintf("tablet %d", i) {
			t.Errorf("tablet %d signed by %v", i, dv.Signers)
		}
		switch i {
		case 2:
			if len(dv.Gaps) != 1 || dv.Gaps[0].From != 17 || dv.Gaps[0].To != 17 || Ranges(dv.Bundles) != "1–16, 18–50" {
				t.Errorf("tablet 2 gaps %v bundles %s", dv.Gaps, Ranges(dv.Bundles))
			}
		case 3:
			if len(dv.Gaps) != 1 || dv.Gaps[0].From != 30 || Ranges(dv.Bundles) != "1–29, 31–50" {
				t.Errorf("tablet 3 gaps %v bundles %s", dv.Gaps, Ranges(dv.Bundles))
			}
		}
		total += dv.New
	}
	if total != run.New || run.Files != 3*perDevice-2 {
		t.Errorf("totals: %d new (devices %d), %d files", run.New, total, run.Files)
	}
	// The store holds exactly what the accepted files carried.
	rows, err := lab.Bales(BaleFilter{})
	if err != nil || len(rows) != 3*perDevice-2 {
		t.Fatalf("lab has %d bales (%v), want %d", len(rows), err, 3*perDevice-2)
	}
	// Again: nothing new, every accepted file a replay.
	again, err := lab.ImportPaths(context.Background(), []string{stick}, ImportOptions{}, nil)
	if err != nil || again.New != 0 || again.Present != run.New || len(again.Refused) != 1 {
		t.Fatalf("second run: %d new, %d present, %d refused, %v", again.New, again.Present, len(again.Refused), err)
	}
	for _, dv := range again.Devices {
		if dv.Replays != dv.Files {
			t.Errorf("second run: %d of %d files replays", dv.Replays, dv.Files)
		}
	}
}

// TestImportStopsBetweenFiles cancels a folder import: the files before
// stay imported, the run says why it stopped.
func TestImportStopsBetweenFiles(t *testing.T) {
	stick := t.TempDir()
	lab := openTest(t)
	_, fp, _ := tablet(t, 1, 5, stick)
	if _, _, err := lab.TrustAdd(fp.String(), "tablet"); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	run, err := lab.ImportPaths(ctx, []string{stick}, ImportOptions{}, func(p Progress) {
		if p.Step == StepDone && p.Done == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) || run.Files != 2 || len(run.Report.Files) != 2 {
		t.Fatalf("cancelled run: %d files, %v", run.Files, err)
	}
}

// TestImportPathsRefusesNothingToImport names a folder without bundles.
func TestImportPathsRefusesNothingToImport(t *testing.T) {
	lab := openTest(t)
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "notes.txt"), nil, 0o644)
	run, err := lab.ImportPaths(context.Background(), []string{dir}, ImportOptions{}, nil)
	if !errors.Is(err, ErrNotFound) || len(run.Skipped) != 1 || !strings.Contains(err.Error(), ".bale") {
		t.Fatalf("empty folder: %v %v", run.Skipped, err)
	}
	if _, err := lab.ImportPaths(context.Background(), []string{filepath.Join(dir, "missing")}, ImportOptions{}, nil); !errors.Is(err, ErrUsage) {
		t.Fatalf("missing folder: %v", err)
	}
}

func TestRanges(t *testing.T) {
	for _, c := range []struct {
		in   []uint64
		want string
	}{{nil, ""}, {[]uint64{3}, "3"}, {[]uint64{1, 2, 3, 5, 7, 8}, "1–3, 5, 7–8"}} {
		if got := Ranges(c.in); got != c.want {
			t.Errorf("Ranges(%v) = %q, want %q", c.in, got, c.want)
		}
	}
}

// TestConcurrentImportsKeepEverySequenceRecord: four imports of one
// device's bundles run at once through one desk (the app's import beside
// a second window's, say). Each import reads the device's seen set before
// its write; run side by side, one could write over another's (they are now
// read and written inside the write transaction). Afterwards
// the lab must know all 24 bundles: a later import of the whole folder
// reports no gap.
func TestConcurrentImportsKeepEverySequenceRecord(t *testing.T) {
	stick := t.TempDir()
	const n = 24
	_, fp, _ := tablet(t, 1, n, stick)
	lab := openTest(t)
	if _, _, err := lab.TrustAdd(fp.String(), "tablet 1"); err != nil {
		t.Fatal(err)
	}
	errs := make(chan error, 4)
	for g := range 4 {
		go func() {
			var files []string
			for k := g + 1; k <= n; k += 4 {
				files = append(files, filepath.Join(stick, fmt.Sprintf("tablet1-%03d.bale", k)))
			}
			_, err := lab.Import(context.Background(), files, ImportOptions{}, nil)
			errs <- err
		}()
	}
	for range 4 {
		if err := <-errs; err != nil {
			t.Fatal(err)
		}
	}
	rep, err := lab.Import(context.Background(), []string{filepath.Join(stick, fmt.Sprintf("tablet1-%03d.bale", n))}, ImportOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Gaps) != 0 {
		t.Fatalf("after the concurrent imports the lab misses bundles %+v", rep.Gaps)
	}
}
