package desk

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// DeviceImport sums up what one device's files brought in a run.
type DeviceImport struct {
	Device  record.DeviceID
	Signers []string // trust-list names that signed its files
	Files   int      // files accepted (a bundle may come in parts)
	// Bundles lists the bundle numbers seen in this run, ascending.
	Bundles []uint64
	Replays int // files imported before: nothing changed
	// Events in the files; New were added, Present were there already.
	Events, New, Present int
	Conflicts            int // conflicts the new events created
	Warnings             int // new events the checks only warned about
	// Gaps are the bundle numbers below the highest seen from the device
	// (in this run or before) that this store has never seen.
	Gaps  []transfer.SeqGap
	Flags []string // clock skew, chain mismatches, warnings, by file
}

// Missing counts the bundle numbers in Gaps.
func (d DeviceImport) Missing() int {
	n := 0
	for _, g := range d.Gaps {
		n += int(g.To - g.From + 1)
	}
	return n
}

// RefusedFile is a file that was refused, whole, with the reason.
type RefusedFile struct {
	Path string
	Err  error
}

// ImportRun is the outcome of importing files and folders: the per-file
// report, a summary per device, every refusal, and files in the folders
// that are not bundles.
type ImportRun struct {
	Report  transfer.ImportReport
	Devices []DeviceImport // by device id
	Refused []RefusedFile  // in the order the files were read
	Skipped []string       // files in the folders given that do not end in .bale
	// Totals over the accepted files.
	Files, Events, New, Present, Conflicts int
}

// ImportPaths imports files and folders (a folder stands for its *.bale
// files, sorted by name, not recursive). Files are read, checked and
// applied one at a time, each all or nothing, so hundreds of bundles
// never sit in memory together; a refused file does not stop the others.
// It stops between files when ctx is done (the run so far is returned
// with ctx's error). progress may be nil.
func (d *Desk) ImportPaths(ctx context.Context, args []string, opt ImportOptions, progress func(Progress)) (ImportRun, error) {
	files, err := transfer.ExpandPaths(args)
	if err != nil {
		return ImportRun{}, fmt.Errorf("%w: %v", ErrUsage, err)
	}
	skipped, err := notBundles(args)
	if err != nil {
		return ImportRun{}, err
	}
	if len(files) == 0 {
		return ImportRun{Skipped: skipped}, fmt.Errorf("%w: no %s files in %s", ErrNotFound, transfer.BundleExt, strings.Join(args, ", "))
	}
	rep, err := d.Import(ctx, files, opt, progress)
	run := SummarizeImport(rep)
	run.Skipped = skipped
	return run, err
}

// notBundles lists the regular files in the folders among args that the
// import leaves alone (hidden files aside).
func notBundles(args []string) ([]string, error) {
	var out []string
	for _, a := range args {
		fi, err := os.Stat(a)
		if err != nil || !fi.IsDir() {
			continue
		}
		ents, err := os.ReadDir(a)
		if err != nil {
			return nil, fmt.Errorf("cannot read folder %s: %w", a, err)
		}
		for _, e := range ents {
			n := e.Name()
			if e.Type().IsRegular() && !strings.HasPrefix(n, ".") && !strings.HasSuffix(n, transfer.BundleExt) {
				out = append(out, filepath.Join(a, n))
			}
		}
	}
	return out, nil
}

// SummarizeImport folds a per-file import report into one summary per
// device, the list of refusals and the totals.
func SummarizeImport(rep transfer.ImportReport) ImportRun {
	run := ImportRun{Report: rep}
	at := map[record.DeviceID]int{}
	for _, f := range rep.Files {
		if f.Err != nil {
			run.Refused = append(run.Refused, RefusedFile{f.Path, f.Err})
			continue
		}
		i, ok := at[f.Device]
		if !ok {
			i = len(run.Devices)
			at[f.Device] = i
			run.Devices = append(run.Devices, DeviceImport{Device: f.Device})
		}
		dv := &run.Devices[i]
		dv.Files++
		if !slices.Contains(dv.Bundles, f.Seq) {
			dv.Bundles = append(dv.Bundles, f.Seq)
		}
		if f.Signer != "" && !slices.Contains(dv.Signers, f.Signer) {
			dv.Signers = append(dv.Signers, f.Signer)
		}
		if f.Replay {
			dv.Replays++
		}
		dv.Events += f.Events
		dv.New += f.New
		dv.Present += f.Present
		dv.Conflicts += f.Conflicts
		dv.Warnings += f.Warnings
		for _, fl := range f.Flags {
			dv.Flags = append(dv.Flags, filepath.Base(f.Path)+": "+fl)
		}
		run.Files++
		run.Events += f.Events
		run.New += f.New
		run.Present += f.Present
		run.Conflicts += f.Conflicts
	}
	for _, g := range rep.Gaps {
		i, ok := at[g.Device]
		if !ok {
			i = len(run.Devices)
			at[g.Device] = i
			run.Devices = append(run.Devices, DeviceImport{Device: g.Device})
		}
		run.Devices[i].Gaps = append(run.Devices[i].Gaps, g)
	}
	for i := range run.Devices {
		slices.Sort(run.Devices[i].Bundles)
	}
	sort.Slice(run.Devices, func(i, j int) bool {
		return bytes.Compare(run.Devices[i].Device[:], run.Devices[j].Device[:]) < 0
	})
	return run
}

// Ranges writes ascending numbers as runs: "1–4, 7, 9–10".
func Ranges(ns []uint64) string {
	var b strings.Builder
	for i := 0; i < len(ns); {
		j := i
		for j+1 < len(ns) && ns[j+1] == ns[j]+1 {
			j++
		}
		if b.Len() > 0 {
			b.WriteString(", ")
		}
		if j == i {
			fmt.Fprintf(&b, "%d", ns[i])
		} else {
			fmt.Fprintf(&b, "%d–%d", ns[i], ns[j])
		}
		i = j + 1
	}
	return b.String()
}
