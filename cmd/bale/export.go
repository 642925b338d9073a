package main

import (
	"baleassay/data/desk"
	"fmt"
	"io"
)

func init() {
	register(command{
		name:    "export",
		usage:   "--to PATH [--since-last DEST | --all] [--force] [--part-mb N] [--store DIR] | " + exportFormatsUsage,
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
	to := fs.String("to", "", "bundle `PATH`: a new file, or a folder for bale-<device>-<seq>.bale names")
	since := fs.String("since-last", "", "only what destination `DEST` (e.g. lab) has not had from this store yet")
	all := fs.Bool("all", false, "every event in the store (the default)")
	force := fs.Bool("force", false, "replace the file --to names if it exists (never done otherwise)")
	partMB := fs.Int("part-mb", desk.DefaultPartMiB, "split into signed parts of at most `N` MiB")
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
	case *partMB < 1 || *partMB > desk.MaxPartMiB:
		return usagef("--part-mb must be 1 to %d", desk.MaxPartMiB)
	}
	if err := desk.CheckExportTarget(*to); err != nil {
		return err
	}
	d, err := openDesk(*store, false)
	if err != nil {
		return err
	}
	defer d.Close()
	res, fp, err := d.ExportBundles(*to, desk.BundleOptions{SinceLast: *since, PartBytes: *partMB << 20, Force: *force})
	if err != nil {
		return err
	}
	if res.CleanedTemps > 0 {
		fmt.Fprintf(stdout, "removed %d temporary file(s) an interrupted export had left\n", res.CleanedTemps)
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
	fmt.Fprintf(stdout, "%s (%d of other devices, with their authors' proofs), %s, signed by %s\n",
		desk.Plural(res.Events, "event", "events"), res.Relayed, desk.Plural(int(res.Bytes), "byte", "bytes"), fp)
	return nil
}
