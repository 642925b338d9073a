package main

import (
	"baleassay/data/transfer"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

func init() {
	register(command{
		name:    "export",
		usage:   "--to PATH [--since-last DEST | --all] [--part-mb N] [--store DIR] | " + exportFormatsUsage,
		summary: "write this store's records as signed bundle files (to carry on a USB stick), or as CSV or GeoJSON for other tools",
		run:     runExport,
	})
}

func runExport(args []string, stdout, stderr io.Writer) error {
	if len(args) > 0 {
		if run, ok := exportFormats[args[0]]; ok {
			return run(args[1:], stdout)
		}
	}
	fs := newFlags("export")
	store := storeFlag(fs)
	to := fs.String("to", "", "bundle `PATH`: a file, or an existing folder for bale-<device>-<seq>.bale names")
	since := fs.String("since-last", "", "only what destination `DEST` (e.g. lab) has not had from this store yet")
	all := fs.Bool("all", false, "every event in the store (the default)")
	partMB := fs.Int("part-mb", transfer.DefaultPartBytes>>20, "split into signed parts of at most `N` MiB")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	switch {
	case len(pos) != 0:
		return usagef("unexpected argument %q", pos[0])
	case *to == "":
		return usagef("give --to PATH")
	case *all && *since != "":
		return usagef("--all and --since-last exclude each other")
	case *partMB < 1 || *partMB > transfer.MaxBundleBytes>>20:
		return usagef("--part-mb must be 1 to %d", transfer.MaxBundleBytes>>20)
	}
	if err := checkExportTarget(*to); err != nil {
		return err
	}
	d, err := openDesk(*store, false)
	if err != nil {
		return err
	}
	defer d.Close()
	s := d.Store()
	key, _, err := deviceKey(s.Dir())
	if err != nil {
		return err
	}
	res, err := transfer.Export(s, key, *to, transfer.ExportOptions{SinceLast: *since, PartBytes: *partMB << 20})
	if err != nil {
		return err
	}
	if len(res.Files) == 0 {
		if *since != "" {
			fmt.Fprintf(stdout, "nothing new for %s since the last export; no file written\n", *since)
		} else {
			fmt.Fprintln(stdout, "the store has no events; no file written")
		}
		return nil
	}
	for i, f := range res.Files {
		fmt.Fprintf(stdout, "wrote %s (bundle %d, part %d of %d)\n", f, res.Seqs[i], i+1, len(res.Files))
	}
	fmt.Fprintf(stdout, "%d events, %d bytes, signed by %s\n", res.Events, res.Bytes, key.Fingerprint())
	return nil
}

// checkExportTarget refuses, before anything is written, a --to whose
// folder does not exist, with a message that says what to do.
func checkExportTarget(to string) error {
	dir := to
	if !strings.HasSuffix(to, string(os.PathSeparator)) {
		if fi, err := os.Stat(to); err == nil && fi.IsDir() {
			return nil
		}
		dir = filepath.Dir(to)
	}
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return fmt.Errorf("folder %s does not exist: plug in or mount the stick, or create the folder, then export again", dir)
	case err != nil:
		return fmt.Errorf("cannot use %s: %v", dir, err)
	case !fi.IsDir():
		return fmt.Errorf("%s is a file, not a folder: give a folder or a new file name for --to", dir)
	}
	return nil
}
