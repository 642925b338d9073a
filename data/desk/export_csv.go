package desk

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

// Table is what a CSV export holds.
type Table uint8

// The tables.
const (
	TableBales Table = iota + 1
	TablePulls
	TableSites
)

func (t Table) String() string {
	switch t {
	case TableBales:
		return "bales"
	case TablePulls:
		return "pulls"
	case TableSites:
		return "sites"
	}
	return fmt.Sprintf("table(%d)", uint8(t))
}

// ParseTable reads bales, pulls or sites.
func ParseTable(s string) (Table, error) {
	for _, t := range []Table{TableBales, TablePulls, TableSites} {
		if s == t.String() {
			return t, nil
		}
	}
	return 0, fmt.Errorf("%w: no table %q: give bales, pulls or sites", ErrUsage, s)
}

// ExportOptions narrow and tune an export.
type ExportOptions struct {
	Range DateRange // bales received in the range (sites: their bales counted in it)
	// Line and FlakeSpec choose the plan of the point-yield columns, as
	// Plan takes them.
	Line, FlakeSpec string
	// Value, when set, adds to the bales table the value per tonne of
	// each audited bale under the price sheet (ValueColumns), from its
	// own Monte Carlo draws with these options.
	Value *ValueOptions
}

// ExportCSV writes one table as RFC 4180 CSV: CRLF line ends, one header
// row, fields quoted only where they must be. Column names carry their
// units (_kg, _m, _pct of the bale's mass, _deg, _utc); times are ISO 8601
// in UTC (RFC 3339, milliseconds where they are not zero); numbers use a
// dot and never an exponent; an unknown or not-measured value is an
// empty field. It returns the data rows written. The columns are listed
// in README ("bale export csv"). The value columns' draws stop when ctx
// is done.
func (d *Desk) ExportCSV(ctx context.Context, w io.Writer, t Table, opt ExportOptions) (int, error) {
	sites, err := d.Sites()
	if err != nil {
		return 0, err
	}
	var plan *yield.Plan // the pulls table has no yield columns
	if t != TablePulls {
		p, err := d.Plan(opt.Line, opt.FlakeSpec)
		if err != nil {
			return 0, err
		}
		plan = &p
	}
	stats, points, err := d.collect(sites, opt.Range, plan)
	if err != nil {
		return 0, err
	}
	cw := csv.NewWriter(w)
	cw.UseCRLF = true
	var n int
	switch t {
	case TableBales:
		cols := baleColumns()
		if opt.Value != nil {
			if cols, err = d.valueColumns(ctx, cols, points, *plan, *opt.Value); err != nil {
				return 0, err
			}
		}
		n, err = writeRows(cw, cols, points)
	case TablePulls:
		n, err = d.writePulls(cw, points)
	case TableSites:
		n, err = writeRows(cw, siteColumns, stats)
	default:
		return 0, fmt.Errorf("%w: unknown table %s", ErrUsage, t)
	}
	if err != nil {
		return n, err
	}
	cw.Flush()
	return n, cw.Error()
}

// column is one CSV column: its header and how a row gives its field.
type column[T any] struct {
	name  string
	field func(*T) string
}

func writeRows[T any](cw *csv.Writer, cols []column[T], rows []T) (int, error) {
	rec := make([]string, len(cols))
	for i, c := range cols {
		rec[i] = c.name
	}
	if err := cw.Write(rec); err != nil {
		return 0, err
	}
	for r := range rows {
		for i, c := range cols {
			rec[i] = c.field(&rows[r])
		}
		if err := cw.Write(rec); err != nil {
			return r, err
		}
	}
	return len(rows), nil
}

// Field writers: dot decimals, no exponent, empty for NaN, ±Inf or a
// value that is not there.

func fnum(x float64, digits int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return Num(x, digits)
}

// fpos is fnum, empty for 0 (not measured).
func fpos(x float64, digits int) string {
	if x == 0 {
		return ""
	}
	return fnum(x, digits)
}

func fpct(x float64) string { return fnum(100*x, PctDigits) }

func fint(n int) string { return strconv.Itoa(n) }

func fbool(b bool) string { return strconv.FormatBool(b) }

// ftime writes a time in UTC, RFC 3339 with milliseconds where not zero;
// empty for the zero time.
func ftime(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(TimeLayout)
}

// fms is ftime of Unix milliseconds; empty for 0 (not recorded).
func fms(ms int64) string {
	if ms == 0 {
		return ""
	}
	return ftime(time.UnixMilli(ms))
}

// Digits of the exported numbers: masses to the gram, shares to 1e-6 of
// the bale (4 decimals of a percent), coordinates to about 1 cm.
const (
	KgDigits   = 3
	PctDigits  = 4
	DegDigits  = 7
	TimeLayout = "2006-01-02T15:04:05.999Z07:00"
)

func (d *Desk) writePulls(cw *csv.Writer, points []BalePoint) (int, error) {
	header := []string{"pull_id", "bale_id", "bale_tag", "site_id", "site_name", "label", "taken_utc", "weighed_kg", "sorted_kg"}
	cats := assess.Categories()
	for _, c := range cats {
		header = append(header, c.Key+"_kg")
	}
	for _, c := range cats {
		header = append(header, c.Key+"_pieces")
	}
	header = append(header, "total_pieces", "conflicted")
	if err := cw.Write(header); err != nil {
		return 0, err
	}
	byBale, err := d.st.PullsByBale()
	if err != nil {
		return 0, err
	}
	n := 0
	rec := make([]string, len(header))
	for _, p := range points {
		for _, pv := range byBale[p.ID] {
			pr := pv.Pull
			rec = rec[:0]
			rec = append(rec, pv.ID.String(), p.ID.String(), p.Bale.Tag, p.Bale.Site.String(), p.SiteName, pr.Label,
				fms(pr.TakenMs), fpos(pr.StatedKg, KgDigits), fnum(pr.PartsKg(), KgDigits))
			for _, c := range cats {
				rec = append(rec, fnum(pr.Kg[c.Key], KgDigits))
			}
			for _, c := range cats {
				if v, ok := pr.Pieces[c.Key]; ok {
					rec = append(rec, strconv.FormatInt(v, 10))
				} else {
					rec = append(rec, "")
				}
			}
			rec = append(rec, fpos(float64(pr.TotalPieces), 0), fbool(pv.Conflicted))
			if err := cw.Write(rec); err != nil {
				return n, err
			}
			n++
		}
	}
	return n, nil
}

// idOf writes an entity id, empty for the zero id.
func idOf(id record.EntityID) string {
	if id.IsZero() {
		return ""
	}
	return id.String()
}

// valueColumns appends the value columns of a price sheet: each audited
// bale valued by ValuePulls (its own draws), an empty cell for a bale
// that has no value.
func (d *Desk) valueColumns(ctx context.Context, cols []column[BalePoint], points []BalePoint, plan yield.Plan, opt ValueOptions) ([]column[BalePoint], error) {
	cells := make(map[record.EntityID][]string, len(points))
	for _, p := range points {
		if p.Audit.State != AuditDone {
			continue
		}
		v, err := d.ValuePulls(ctx, p.Input.Pulls, p.Bale.GrossKg, plan, opt, nil)
		if err != nil {
			if ctx.Err() != nil {
				return nil, ctx.Err()
			}
			continue
		}
		cells[p.ID] = ValueCells(&v.Value)
	}
	empty := ValueCells(nil)
	for i, name := range ValueColumns(opt.prices()) {
		cols = append(cols, column[BalePoint]{name, func(p *BalePoint) string {
			if c, ok := cells[p.ID]; ok {
				return c[i]
			}
			return empty[i]
		}})
	}
	return cols, nil
}
