package desk

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"

	"baleassay/data/record"
)

// Source: invented test records; the checks are the rules of Export.

func TestExportRemembersDestinationAndWritesOnlyWhatIsNew(t *testing.T) {
	d := openTest(t)
	site := mustSite(t, d, "Tamsin Quay Depot", 51.2, -2.1)
	mustBale(t, d, site, 420, "TQ-1")
	stick := t.TempDir()
	res, err := d.Export(stick, "lab")
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Files) != 1 || res.Events != 2 {
		t.Fatalf("first export: %d files, %d events; want 1 file of 2 events (site, bale)", len(res.Files), res.Events)
	}
	again, err := d.Export(stick, "lab")
	if err != nil {
		t.Fatal(err)
	}
	if len(again.Files) != 0 {
		t.Fatalf("second export with nothing new wrote %v", again.Files)
	}
	mustBale(t, d, site, 380, "TQ-2")
	third, err := d.Export(stick, "lab")
	if err != nil || third.Events != 1 {
		t.Fatalf("third export: %+v, %v; want the one new bale", third, err)
	}
	ds, err := d.Destinations()
	if err != nil || len(ds) != 1 || ds[0].Name != "lab" || ds[0].Dir != stick {
		t.Fatalf("destinations = %+v, %v; want lab at %s", ds, err, stick)
	}
	// A second store imports the files: the records arrive.
	other, err := Open(Location{Dir: t.TempDir()}, Options{Create: true, Now: func() time.Time { return now }})
	if err != nil {
		t.Fatal(err)
	}
	defer other.Close()
	if _, _, err := other.TrustAdd(res.Files[0], "tablet"); err != nil {
		t.Fatal(err)
	}
	rep, err := other.Import(context.Background(), append(res.Files, third.Files...), ImportOptions{}, nil)
	if err != nil || rep.Refused() != 0 {
		t.Fatalf("import: %v, refused %d", err, rep.Refused())
	}
	rows, err := other.Bales(BaleFilter{})
	if err != nil || len(rows) != 2 {
		t.Fatalf("the other store has %d bales (%v), want 2", len(rows), err)
	}
}

func TestExportRefusesMissingFolderAndBadName(t *testing.T) {
	d := openTest(t)
	mustSite(t, d, "Tamsin Quay Depot", 51.2, -2.1)
	if _, err := d.Export(filepath.Join(t.TempDir(), "not-mounted"), "lab"); !errors.Is(err, ErrUsage) {
		t.Fatalf("missing folder: %v, want ErrUsage", err)
	}
	if _, err := d.Export(t.TempDir(), "the lab!"); !errors.Is(err, ErrUsage) {
		t.Fatalf("bad destination name: %v, want ErrUsage", err)
	}
	if _, err := d.Export(t.TempDir(), ""); !errors.Is(err, ErrUsage) {
		t.Fatalf("no destination name: %v, want ErrUsage", err)
	}
	if ds, _ := d.Destinations(); len(ds) != 0 {
		t.Fatalf("a refused export remembered %+v", ds)
	}
}

func TestDestinationsDamagedFileSaysWhatToDo(t *testing.T) {
	d := openTest(t)
	if err := os.WriteFile(filepath.Join(d.Dir(), destinationsFile), []byte("{not json"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := d.Destinations(); err == nil {
		t.Fatal("a damaged destinations file was read without error")
	}
}

func TestPreviewBaleDensity(t *testing.T) {
	// Hand sums: 548 kg / (1.22 × 0.76 × 1.52 m³ = 1.409344 m³) = 388.8 kg/m³.
	p := PreviewBale(record.BaleRecord{GrossKg: 548, LengthM: 1.22, WidthM: 0.76, HeightM: 1.52})
	if p.DensityKgM3 < 388.7 || p.DensityKgM3 > 388.9 || len(p.Checks) != 0 {
		t.Fatalf("preview = %+v, want 388.8 kg/m³ and no checks", p)
	}
	// 150 kg in the same volume: 106 kg/m³, below the 160 kg/m³ minimum.
	light := PreviewBale(record.BaleRecord{GrossKg: 150, LengthM: 1.22, WidthM: 0.76, HeightM: 1.52})
	if len(light.Checks) != 1 || light.Checks[0].Concern != ConcernLightBale {
		t.Fatalf("light bale preview = %+v, want one light-bale check", light)
	}
	// 1400 kg: 993 kg/m³, above the plausible 900.
	dense := PreviewBale(record.BaleRecord{GrossKg: 1400, LengthM: 1.22, WidthM: 0.76, HeightM: 1.52})
	if len(dense.Checks) != 1 || dense.Checks[0].Concern != ConcernDenseBale {
		t.Fatalf("dense bale preview = %+v, want one dense-bale check", dense)
	}
	// Sides not all given: no density, no check.
	if p := PreviewBale(record.BaleRecord{GrossKg: 548, LengthM: 1.22}); p.DensityKgM3 != 0 || len(p.Checks) != 0 {
		t.Fatalf("partial sides preview = %+v", p)
	}
}
