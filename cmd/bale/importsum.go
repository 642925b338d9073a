package main

import (
	"encoding/hex"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"baleassay/data/desk"
)

// countBundles expands the arguments as the import will and refuses, up
// front, arguments that name no bundle at all.
func countBundles(pos []string) (int, error) {
	files, err := desk.BundleFiles(pos)
	return len(files), err
}

// printImport prints, after the run: every accepted file with a flag
// (every file with every), one summary per device, the totals, and every
// refused file with its reason.
func printImport(w io.Writer, run desk.ImportRun, every bool) {
	listed := false
	for _, f := range run.Report.Files {
		if every || (f.Err == nil && len(f.Flags) > 0) {
			fmt.Fprintln(w, f.SummaryLine())
			listed = true
		}
	}
	if listed && len(run.Devices) > 0 {
		fmt.Fprintln(w)
	}
	for _, dv := range run.Devices {
		fmt.Fprintln(w, deviceLine(dv))
		for _, g := range dv.Gaps {
			fmt.Fprintln(w, "  gap: "+g.String())
		}
	}
	fmt.Fprintf(w, "\n%s read: %d accepted (%s: %d new, %d already present, %s created), %d refused",
		desk.Plural(len(run.Report.Files), "file", "files"), run.Files, desk.Plural(run.Events, "event", "events"),
		run.New, run.Present, desk.Plural(run.Conflicts, "conflict", "conflicts"), len(run.Refused))
	if n := len(run.Skipped); n > 0 {
		fmt.Fprintf(w, "; %s not ending in %s left alone", desk.Plural(n, "file", "files"), desk.BundleExt)
	}
	fmt.Fprintln(w)
	for _, r := range run.Refused {
		fmt.Fprintf(w, "  refused: %s: %v\n", filepath.Base(r.Path), r.Err)
	}
}

// deviceLine is one device's summary.
func deviceLine(dv desk.DeviceImport) string {
	var b strings.Builder
	fmt.Fprintf(&b, "device %s", hex.EncodeToString(dv.Device[:]))
	if len(dv.Signers) > 0 {
		fmt.Fprintf(&b, " (%s)", strings.Join(dv.Signers, ", "))
	}
	if dv.Files == 0 {
		fmt.Fprintf(&b, ": no file accepted in this run")
	} else {
		fmt.Fprintf(&b, ": %s (%s) in %s, %s: %d new, %d already present, %s created",
			desk.Plural(len(dv.Bundles), "bundle", "bundles"), desk.Ranges(dv.Bundles), desk.Plural(dv.Files, "file", "files"),
			desk.Plural(dv.Events, "event", "events"), dv.New, dv.Present, desk.Plural(dv.Conflicts, "conflict", "conflicts"))
	}
	if n := dv.Missing(); n > 0 {
		fmt.Fprintf(&b, "; %s missing", desk.Plural(n, "bundle", "bundles"))
	} else {
		b.WriteString("; no gaps")
	}
	if dv.Replays > 0 {
		fmt.Fprintf(&b, "; %s imported before", desk.Plural(dv.Replays, "file", "files"))
	}
	return b.String()
}

// importJSON is `bale import --json`.
type importJSON struct {
	Files   []fileJSON    `json:"files"`
	Gaps    []string      `json:"gaps"`
	Devices []deviceJSON  `json:"devices"`
	Refused []refusedJSON `json:"refused"`
	Skipped []string      `json:"skipped"`
}

type deviceJSON struct {
	Device    string   `json:"device"`
	Signers   []string `json:"signers"`
	Files     int      `json:"files"`
	Bundles   []uint64 `json:"bundles"`
	Missing   int      `json:"missing"`
	Gaps      []string `json:"gaps"`
	Events    int      `json:"events"`
	New       int      `json:"new"`
	Present   int      `json:"present"`
	Conflicts int      `json:"conflicts"`
	Replays   int      `json:"replays"`
}

type refusedJSON struct {
	Path  string `json:"path"`
	Error string `json:"error"`
}

func importJSONOf(run desk.ImportRun) importJSON {
	out := importJSON{Files: []fileJSON{}, Gaps: []string{}, Devices: []deviceJSON{}, Refused: []refusedJSON{}, Skipped: []string{}}
	for _, f := range run.Report.Files {
		j := fileJSON{Path: f.Path, Events: f.Events, New: f.New, Present: f.Present, Conflicts: f.Conflicts, Replay: f.Replay, Flags: f.Flags}
		if j.Flags == nil {
			j.Flags = []string{}
		}
		if f.Err != nil {
			j.Error = f.Err.Error()
		} else {
			j.Device, j.Bundle, j.Part, j.Parts, j.Signer = f.Device.String(), f.Seq, f.Part, f.Parts, f.Signer
		}
		out.Files = append(out.Files, j)
	}
	for _, g := range run.Report.Gaps {
		out.Gaps = append(out.Gaps, g.String())
	}
	for _, dv := range run.Devices {
		j := deviceJSON{Device: dv.Device.String(), Signers: append([]string{}, dv.Signers...), Files: dv.Files,
			Bundles: append([]uint64{}, dv.Bundles...), Missing: dv.Missing(), Gaps: []string{}, Events: dv.Events,
			New: dv.New, Present: dv.Present, Conflicts: dv.Conflicts, Replays: dv.Replays}
		for _, g := range dv.Gaps {
			j.Gaps = append(j.Gaps, g.String())
		}
		out.Devices = append(out.Devices, j)
	}
	for _, r := range run.Refused {
		out.Refused = append(out.Refused, refusedJSON{r.Path, r.Err.Error()})
	}
	out.Skipped = append(out.Skipped, run.Skipped...)
	return out
}
