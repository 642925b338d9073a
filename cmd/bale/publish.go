package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"

	"baleassay/data/desk"
	"baleassay/data/publish"
)

func init() {
	register(command{
		name:    "publish",
		usage:   "postgres://USER@HOST/DATABASE | \"host=SOCKET-FOLDER dbname=DATABASE\" [--store DIR|--demo] [--schema NAME] [--batch N] [--postgis auto|require|off] [--full] [--reaudit] [--json]",
		summary: "load the store's records into PostgreSQL: the events, views of the current records, audits (incremental)",
		run:     runPublish,
	})
}

// publishJSON is the output of 'bale publish --json'.
type publishJSON struct {
	Target      string  `json:"target"`
	Schema      string  `json:"schema"`
	Versions    []int   `json:"schema_versions"`
	PostGIS     bool    `json:"postgis"`
	PostGISNote string  `json:"postgis_note,omitempty"`
	Device      string  `json:"device"`
	FromSeq     uint64  `json:"from_seq"`
	ToSeq       uint64  `json:"to_seq"`
	Resumed     bool    `json:"resumed"`
	Restart     string  `json:"restart,omitempty"`
	Read        int     `json:"read"`
	Present     int     `json:"present"`
	New         int     `json:"new"`
	Batches     int     `json:"batches"`
	Audits      int     `json:"audits"`
	AuditErrors int     `json:"audit_errors"`
	Seconds     float64 `json:"seconds"`
}

func runPublish(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("publish")
	store := storeFlag(fs)
	schema := fs.String("schema", publish.DefaultSchema, "PostgreSQL schema to publish into")
	batch := fs.Int("batch", publish.DefaultBatch, "store events per transaction")
	gis := fs.String("postgis", "auto", "use PostGIS: auto (when the server has it), require, off")
	full := fs.Bool("full", false, "walk the whole store, not only what came after the last publish")
	reaudit := fs.Bool("reaudit", false, "recompute every bale's audit")
	asJSON := fs.Bool("json", false, "print the report as JSON")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give one database address, e.g. postgres://lab@db.example/records or \"host=/run/postgresql dbname=records\"")
	}
	mode, err := publish.ParsePostGIS(*gis)
	if err != nil {
		return usagef("--postgis: %v", err)
	}
	if *batch < 1 {
		return usagef("--batch %d: give 1 or more", *batch)
	}
	d, err := openDesk(*store, false)
	if err != nil {
		return err
	}
	defer d.Close()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	target, rep, err := d.Publish(ctx, pos[0], publish.Options{
		Schema: *schema, Batch: *batch, PostGIS: mode, Full: *full, Reaudit: *reaudit,
		Progress: publishProgress(stderr),
	})
	if err != nil {
		if rep.New > 0 || rep.Audits > 0 {
			return fmt.Errorf("%w\n%s and %s were committed before that; publishing again resumes there", err, desk.Plural(rep.New, "event", "events"), desk.Plural(rep.Audits, "audit", "audits"))
		}
		return err
	}
	if *asJSON {
		return recJSON(stdout, publishJSON{
			Target: target.String(), Schema: rep.Schema.Name, Versions: rep.Schema.Versions,
			PostGIS: rep.Schema.PostGIS, PostGISNote: rep.Schema.Note, Device: rep.Device.String(),
			FromSeq: rep.FromSeq, ToSeq: rep.ToSeq, Resumed: rep.Resumed, Restart: rep.Restart,
			Read: rep.Read, Present: rep.Present, New: rep.New, Batches: rep.Batches,
			Audits: rep.Audits, AuditErrors: rep.AuditErr, Seconds: rep.Elapsed.Seconds(),
		})
	}
	printPublishReport(stdout, target, rep)
	return nil
}

func printPublishReport(w io.Writer, target publish.Target, rep publish.Report) {
	fmt.Fprintf(w, "published store %s to %s, schema %s (steps %v)\n", rep.Device, target, rep.Schema.Name, rep.Schema.Versions)
	if rep.Restart != "" {
		fmt.Fprintf(w, "  note: %s\n", rep.Restart)
	}
	switch {
	case rep.Read == 0:
		fmt.Fprintf(w, "  events: nothing new since the last publish (store sequence %d)\n", rep.ToSeq)
	default:
		fmt.Fprintf(w, "  events: %d read (store sequence %d to %d), %d new, %d already in the database\n",
			rep.Read, rep.FromSeq+1, rep.ToSeq, rep.New, rep.Present)
	}
	fmt.Fprintf(w, "  audits: %d written", rep.Audits)
	if rep.AuditErr > 0 {
		fmt.Fprintf(w, ", %d of them say why no estimate was possible", rep.AuditErr)
	}
	fmt.Fprintln(w)
	if rep.Schema.PostGIS {
		fmt.Fprintln(w, "  PostGIS: sites have a geography column with a GiST index")
	} else {
		fmt.Fprintf(w, "  PostGIS: not used: %s\n", rep.Schema.Note)
	}
	fmt.Fprintf(w, "  took %.1f s; views: %s.sites, bales, pulls, settings, conflicts, bale_audits, site_quality\n",
		rep.Elapsed.Seconds(), rep.Schema.Name)
}

// publishProgress prints a line per batch and per audit chunk once a
// step takes more than one.
func publishProgress(w io.Writer) func(publish.Progress) {
	var n [2]int
	return func(p publish.Progress) {
		n[p.Step]++
		switch {
		case n[p.Step] < 2:
		case p.Step == publish.StepAudits:
			fmt.Fprintf(w, "publishing: %s written\n", desk.Plural(p.Audits, "audit", "audits"))
		default:
			fmt.Fprintf(w, "publishing: %s read, %d new (store sequence %d)\n", desk.Plural(p.Read, "event", "events"), p.New, p.Seq)
		}
	}
}
