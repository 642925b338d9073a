package main

import (
	"baleassay/data/desk"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strings"
)

func init() {
	register(command{
		name:    "import",
		usage:   "FILE|FOLDER... [--store DIR] [--allow-demo] [--files] [--json]",
		summary: "merge signed bundle files or folders of them into this store (each file all or nothing; a summary per device)",
		run:     runImport,
	})
}

// fileJSON is one file of `bale import --json`.
type fileJSON struct {
	Path      string   `json:"path"`
	Device    string   `json:"device,omitempty"`
	Bundle    uint64   `json:"bundle,omitempty"`
	Part      uint64   `json:"part,omitempty"`
	Parts     uint64   `json:"parts,omitempty"`
	Signer    string   `json:"signer,omitempty"`
	Events    int      `json:"events"`
	New       int      `json:"new"`
	Present   int      `json:"present"`
	Conflicts int      `json:"conflicts"`
	Replay    bool     `json:"replay"`
	Flags     []string `json:"flags"`
	Error     string   `json:"error,omitempty"`
}

func runImport(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("import")
	store := storeFlag(fs)
	allowDemo := fs.Bool("allow-demo", false, "take records of the invented demo scenario into a store of real records")
	asJSON := fs.Bool("json", false, "print JSON: {files: [...], gaps: [text], devices: [...], refused: [...], skipped: [path]} (see README)")
	everyFile := fs.Bool("files", false, "list every file, not only the refused and flagged ones")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("give at least one bundle file or folder")
	}
	n, err := countBundles(pos)
	if err != nil {
		return err
	}
	d, err := openDesk(*store, true)
	if err != nil {
		return err
	}
	defer d.Close()
	defer limitImportMemory(pos)()
	run, err := d.ImportPaths(context.Background(), pos, desk.ImportOptions{AllowDemo: *allowDemo}, newProgress(stderr, n).show)
	if err != nil {
		return err
	}
	if *asJSON {
		if err := json.NewEncoder(stdout).Encode(importJSONOf(run)); err != nil {
			return err
		}
	} else {
		printImport(stdout, run, *everyFile)
	}
	if n := len(run.Refused); n > 0 {
		return fmt.Errorf("%d of %s refused (listed above); nothing of a refused file was applied", n, desk.Plural(len(run.Report.Files), "file", "files"))
	}
	return nil
}

// progress shows import progress on stderr: a redrawn bar on a
// terminal, plain lines otherwise (logs, pipes, tests).
type progress struct {
	w     io.Writer
	tty   bool
	files int
}

func newProgress(w io.Writer, files int) *progress {
	p := &progress{w: w, files: files}
	if f, ok := w.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			p.tty = true
		}
	}
	return p
}

func (p *progress) show(e desk.Progress) {
	end := e.Step == desk.StepDone || e.Step == desk.StepRefused
	if p.tty {
		const width = 24
		n := width * e.Done / max(1, e.Of)
		fmt.Fprintf(p.w, "\r[%s%s] %d/%s, %s %-9s", strings.Repeat("#", n), strings.Repeat(" ", width-n), e.Done, desk.Plural(e.Of, "file", "files"), desk.Plural(e.EventsSoFar, "event", "events"), e.Step)
		if e.Done == e.Of && end {
			fmt.Fprintln(p.w)
		}
		return
	}
	if e.Step == desk.StepApplying && (p.files > 1 || e.Events >= 10_000) {
		fmt.Fprintf(p.w, "import: file %d of %d: %s: checking and applying %s\n", e.Done+1, e.Of, e.File, desk.Plural(e.Events, "event", "events"))
	}
}
