package main

import (
	"baleassay/assess"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"baleassay/data/desk"
	"baleassay/data/record"
)

func init() {
	register(command{
		name: "measured",
		usage: "add --bales B1,B2,... --flake-kg N [--line NAME] [--moisture-pct P] [--stream NAME=KG ...] [--ran DATE] [--notes TEXT] " +
			"[--reactor-flake-kg K --glycol KEY --glycol-kg G [--strip-eg F] [--glycolysate-kg P] [--ohv V [--ohv-method D4274|ISO14900]] " +
			"[--acid-value A [--av-method D4662|ISO2114]]] [--yes] | list [--line NAME] [--from DATE --to DATE] [--json] | remove ID  [--store DIR|--demo]",
		summary: "record what the wash line and the reactor really gave for a batch of bales (it travels in bundles like any record)",
		run:     runMeasured,
	})
}

func runMeasured(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout, sub("add", measuredAdd), sub("list", measuredList), sub("remove", measuredRemove))
}

func measuredAdd(args []string, stdout io.Writer) error {
	fs := newFlags("measured add")
	dir := storeFlag(fs)
	line := fs.String("line", "", "the line profile the batch ran on: a stored line's name (default: the built-in line)")
	bales := fs.String("bales", "", "the batch's bales: ids, unique prefixes or suffixes, or tags, separated by commas (required)")
	flake := fs.Float64("flake-kg", 0, "flake weighed off the line, kg, moisture included (required)")
	moisture := fs.String("moisture-pct", "", "the flake's moisture, % of the wet flake (empty: not measured)")
	streams := map[string]float64{}
	fs.Func("stream", "a reject stream weighed, NAME=KG (the line's stream names; repeat for each)", func(s string) error {
		name, kg, ok := strings.Cut(s, "=")
		v, err := assess.ParseDecimal(strings.TrimSpace(kg))
		if !ok || err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("give NAME=KG, e.g. floats=31.5")
		}
		streams[strings.TrimSpace(name)] = v
		return nil
	})
	ran := fs.String("ran", "", "when the batch ran: a day (2026-03-02) or an RFC 3339 time (default: now)")
	notes := fs.String("notes", "", "free text")
	rFlake := fs.Float64("reactor-flake-kg", 0, "flake charged to the glycolysis reactor from this batch, kg")
	glycol := fs.String("glycol", "", "the glycol charged: EG, DEG, PG, DPG or glycerol")
	glycolKg := fs.Float64("glycol-kg", 0, "glycol charged, kg")
	strip := fs.Float64("strip-eg", 0, "share (0–1) of the liberated ethylene glycol stripped")
	product := fs.Float64("glycolysate-kg", 0, "glycolysate weighed, kg")
	ohv := fs.Float64("ohv", 0, "hydroxyl value measured, mg KOH/g")
	ohvMethod := fs.String("ohv-method", "ASTM D4274", "the hydroxyl value's method: ASTM D4274 or ISO 14900")
	av := fs.String("acid-value", "", "acid value measured, mg KOH/g")
	avMethod := fs.String("av-method", "ASTM D4662", "the acid value's method: ASTM D4662 or ISO 2114")
	yes := fs.Bool("yes", false, "save although the checks find something implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q: name the bales with --bales", pos[0])
	}
	if *bales == "" || !flagSet(fs, "flake-kg") {
		return usagef("--bales and --flake-kg are required")
	}
	in := desk.MeasuredInput{Line: *line, FlakeKg: *flake, StreamsKg: streams, Notes: *notes}
	for _, b := range strings.Split(*bales, ",") {
		if b = strings.TrimSpace(b); b != "" {
			in.Bales = append(in.Bales, b)
		}
	}
	if *moisture != "" {
		v, err := assess.ParseDecimal(*moisture)
		if err != nil {
			return usagef("--moisture-pct %q is not a number", *moisture)
		}
		in.MoisturePct = &v
	}
	if *ran != "" {
		if in.Ran, err = desk.ParseWhen("ran", *ran); err != nil {
			return usagef("%v", err)
		}
	}
	reactor := flagSet(fs, "reactor-flake-kg") || flagSet(fs, "glycol") || flagSet(fs, "glycol-kg") || flagSet(fs, "glycolysate-kg") ||
		flagSet(fs, "ohv") || flagSet(fs, "acid-value") || flagSet(fs, "strip-eg")
	if reactor {
		if !flagSet(fs, "reactor-flake-kg") || *glycol == "" || !flagSet(fs, "glycol-kg") {
			return usagef("a reactor charge needs --reactor-flake-kg, --glycol and --glycol-kg")
		}
		r := &record.ReactorRecord{FlakeKg: *rFlake, Glycol: *glycol, GlycolKg: *glycolKg, StripEG: *strip, ProductKg: *product, HydroxylValue: *ohv}
		if flagSet(fs, "ohv") {
			if r.HydroxylMethod, err = record.ParseMethod(*ohvMethod); err != nil || !r.HydroxylMethod.HydroxylMethod() {
				return usagef("--ohv-method %q: give ASTM D4274 or ISO 14900", *ohvMethod)
			}
		}
		if *av != "" {
			v, err := assess.ParseDecimal(*av)
			if err != nil {
				return usagef("--acid-value %q is not a number", *av)
			}
			r.AcidValue = &v
			if r.AcidMethod, err = record.ParseMethod(*avMethod); err != nil || !r.AcidMethod.AcidMethod() {
				return usagef("--av-method %q: give ASTM D4662 or ISO 2114", *avMethod)
			}
		}
		in.Reactor = r
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.AddMeasured(in, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "saved measured batch %s\n", id)
	return nil
}

// measuredJSON is one batch in 'measured list --json'.
type measuredJSON struct {
	ID          string             `json:"id"`
	Line        string             `json:"line"`
	Bales       []string           `json:"bales"`
	Ran         string             `json:"ran"`
	FlakeKg     float64            `json:"flake_kg"`
	MoisturePct *float64           `json:"moisture_pct"`
	StreamsKg   map[string]float64 `json:"streams_kg"`
	Reactor     *reactorJSON       `json:"reactor"`
	Notes       string             `json:"notes,omitempty"`
	Conflicted  bool               `json:"conflicted"`
}

type reactorJSON struct {
	FlakeKg        float64  `json:"flake_kg"`
	Glycol         string   `json:"glycol"`
	GlycolKg       float64  `json:"glycol_kg"`
	StripEG        float64  `json:"strip_eg"`
	GlycolysateKg  *float64 `json:"glycolysate_kg"`
	HydroxylValue  *float64 `json:"hydroxyl_value"`
	HydroxylMethod string   `json:"hydroxyl_method,omitempty"`
	AcidValue      *float64 `json:"acid_value"`
	AcidMethod     string   `json:"acid_method,omitempty"`
}

func measuredOut(r desk.MeasuredRow) measuredJSON {
	m := r.Rec
	out := measuredJSON{ID: r.ID.String(), Line: m.Line, Ran: recTime(m.RanMs), FlakeKg: m.FlakeKg, MoisturePct: m.MoisturePct,
		StreamsKg: map[string]float64{}, Notes: m.Notes, Conflicted: r.Conflicted}
	for _, b := range m.Bales {
		out.Bales = append(out.Bales, b.String())
	}
	for k, v := range m.StreamsKg {
		out.StreamsKg[k] = v
	}
	if x := m.Reactor; x != nil {
		rj := &reactorJSON{FlakeKg: x.FlakeKg, Glycol: x.Glycol, GlycolKg: x.GlycolKg, StripEG: x.StripEG, AcidValue: x.AcidValue}
		if x.ProductKg > 0 {
			rj.GlycolysateKg = &x.ProductKg
		}
		if x.HydroxylValue > 0 {
			rj.HydroxylValue, rj.HydroxylMethod = &x.HydroxylValue, x.HydroxylMethod.String()
		}
		if x.AcidValue != nil {
			rj.AcidMethod = x.AcidMethod.String()
		}
		out.Reactor = rj
	}
	return out
}

func measuredList(args []string, stdout io.Writer) error {
	fs := newFlags("measured list")
	dir := storeFlag(fs)
	line := fs.String("line", "", "only batches run on this line")
	from := fs.String("from", "", "batches run from this day or time")
	to := fs.String("to", "", "batches run up to this day (inclusive) or time")
	asJSON := fs.Bool("json", false, "print JSON")
	_, d, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer d.Close()
	r, err := desk.ParseDateRange(*from, *to)
	if err != nil {
		return usagef("%v", err)
	}
	rows, err := d.Measured(desk.MeasuredFilter{Line: *line, Range: r})
	if err != nil {
		return err
	}
	if *asJSON {
		out := []measuredJSON{}
		for _, r := range rows {
			out = append(out, measuredOut(r))
		}
		return writeJSON(stdout, out)
	}
	if len(rows) == 0 {
		fmt.Fprintln(stdout, "no measured batches")
		return nil
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tran\tline\tbales\tflake kg\tmoisture %\tstreams\treactor")
	for _, r := range rows {
		m := r.Rec
		moist := ""
		if m.MoisturePct != nil {
			moist = desk.Num(*m.MoisturePct, 2)
		}
		var st []string
		for _, k := range record.SortedKeys(m.StreamsKg) {
			st = append(st, k+" "+desk.Num(m.StreamsKg[k], 1))
		}
		rx := ""
		if x := m.Reactor; x != nil {
			rx = fmt.Sprintf("%s kg + %s kg %s", desk.Num(x.FlakeKg, 1), desk.Num(x.GlycolKg, 1), x.Glycol)
			if x.HydroxylValue > 0 {
				rx += fmt.Sprintf(", OHV %s", desk.Num(x.HydroxylValue, 1))
			}
			if x.AcidValue != nil {
				rx += fmt.Sprintf(", AV %s", desk.Num(*x.AcidValue, 2))
			}
		}
		id := r.ID.String()
		if r.Conflicted {
			id += " (conflict)"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%d\t%s\t%s\t%s\t%s\n", id, desk.TimeText(m.RanMs)[:10], m.Line, len(m.Bales), desk.Num(m.FlakeKg, 1), moist, strings.Join(st, ", "), rx)
	}
	return tw.Flush()
}

func measuredRemove(args []string, stdout io.Writer) error {
	fs := newFlags("measured remove")
	dir := storeFlag(fs)
	pos, d, err := openForArgs(fs, dir, args, 1, "give the measured batch's id")
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.RemoveMeasured(pos[0])
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "removed measured batch %s (its history is kept)\n", id)
	return nil
}
