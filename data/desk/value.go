package desk

import (
	"context"
	"fmt"
	"math"
	"strings"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

// LoadPrices reads a price sheet from a JSON file, or gives the
// illustrative built-in sheet for "".
func LoadPrices(path string) (yield.PriceSheet, error) {
	if path == "" {
		return yield.BuiltinPriceSheet(), nil
	}
	return yield.ReadPriceSheetFile(path)
}

// ValueOptions tune a valuation.
type ValueOptions struct {
	// Prices is the price sheet; the zero value means the illustrative
	// built-in one.
	Prices yield.PriceSheet
	MC     yield.MCOptions
}

func (o ValueOptions) prices() yield.PriceSheet {
	if o.Prices.Name == "" {
		return yield.BuiltinPriceSheet()
	}
	return o.Prices
}

// BaleValue is a bale's value per tonne by a price sheet.
type BaleValue struct {
	Bale     record.EntityID // zero for pulls from a file
	Record   record.BaleRecord
	SiteName string
	Value    yield.ValueResult
	Cautions []Caution
}

// Headline is the value on the sheet's own route.
func (v BaleValue) Headline() yield.RouteValue { return v.Value.Of(v.Value.Headline) }

// ValuePulls prices pulls read from a file: every Monte Carlo draw of
// the yield is priced by the sheet (yield.Value). It may be called on a
// nil *Desk.
func (d *Desk) ValuePulls(ctx context.Context, pulls []assess.Pull, baleKg float64, plan yield.Plan, opt ValueOptions, progress func(Progress)) (BaleValue, error) {
	if err := checkBaleKg(pulls, baleKg, true); err != nil {
		return BaleValue{}, err
	}
	var cb func(done, of int)
	if progress != nil {
		cb = func(done, of int) { progress(Progress{Step: StepDraws, Done: done, Of: of}) }
	}
	v, err := yield.Value(ctx, pulls, baleKg, plan, opt.prices(), opt.MC, cb)
	if err != nil {
		return BaleValue{}, err
	}
	return BaleValue{Value: v, Cautions: []Caution{CautionCaustic, CautionHotGlycol}}, nil
}

// ValueBale prices a stored bale's pulls.
func (d *Desk) ValueBale(ctx context.Context, text string, plan yield.Plan, opt ValueOptions, progress func(Progress)) (BaleValue, error) {
	a, err := d.AuditBale(text, AuditOptions{Spec: NoSpec})
	if err != nil {
		return BaleValue{Bale: a.Bale}, err
	}
	v, err := d.ValuePulls(ctx, a.Input.Pulls, a.Record.GrossKg, plan, opt, progress)
	v.Bale, v.Record = a.Bale, a.Record
	if site, err := d.st.Entity(a.Record.Site); err == nil {
		if cur, ok := site.Current(); ok && cur.Site != nil {
			v.SiteName = cur.Site.Name
		}
	}
	return v, err
}

// SiteValueRow is one bale of a site's valuation: its value, or why it
// has none (no pulls, an audit that failed).
type SiteValueRow struct {
	ID     record.EntityID
	Record record.BaleRecord
	Value  *yield.ValueResult // nil when not valued
	Why    string             // why not valued
}

// SiteValue values the bales of one site received in a date range.
type SiteValue struct {
	Site   SiteRow
	Range  DateRange
	Prices yield.PriceSheet
	Rows   []SiteValueRow
	Valued int
	Tonnes float64 // gross tonnes of the valued bales
	// MeanPerT is the expected value per tonne of the valued bales
	// together on the sheet's route: Σ (mean value per bale) / Σ tonnes,
	// the expectation of the lot (means add; percentiles do not, so the
	// lot's P10–P90 is not given).
	MeanPerT float64
	// LowP50 and HighP50 are the lowest and highest per-bale P50 per
	// tonne: how far the site's bales differ.
	LowP50, HighP50 float64
	Cautions        []Caution
}

// ValueSite values every bale of a site received in r, one after the
// other, with the same plan and options; progress counts bales.
func (d *Desk) ValueSite(ctx context.Context, text string, r DateRange, plan yield.Plan, opt ValueOptions, progress func(Progress)) (SiteValue, error) {
	st, err := d.Resolve(text, record.KindSite)
	if err != nil {
		return SiteValue{}, err
	}
	cur, err := live(st)
	if err != nil {
		return SiteValue{}, err
	}
	out := SiteValue{Site: SiteRow{ID: st.ID, Site: *cur.Site, Conflicted: st.Conflicted()}, Range: r, Prices: opt.prices(),
		Cautions: []Caution{CautionCaustic, CautionHotGlycol}}
	rows, err := d.Bales(BaleFilter{Site: st.ID.String(), Range: r})
	if err != nil {
		return out, err
	}
	total := 0.0
	for i, b := range rows {
		if err := ctx.Err(); err != nil {
			return out, err
		}
		row := SiteValueRow{ID: b.ID, Record: b.Bale}
		switch b.Audit.State {
		case AuditNoPulls:
			row.Why = "no pulls yet"
		case AuditFailed:
			row.Why = "the pulls could not be assessed: " + errText(b.Audit.Err)
		default:
			v, err := d.ValueBale(ctx, b.ID.String(), plan, opt, nil)
			if err != nil {
				if ctx.Err() != nil {
					return out, ctx.Err()
				}
				row.Why = errText(err)
				break
			}
			row.Value = &v.Value
			h := v.Headline()
			if out.Valued == 0 || h.PerT.P50 < out.LowP50 {
				out.LowP50 = h.PerT.P50
			}
			if out.Valued == 0 || h.PerT.P50 > out.HighP50 {
				out.HighP50 = h.PerT.P50
			}
			out.Valued++
			out.Tonnes += b.Bale.GrossKg / 1000
			total += h.PerBale.Mean
		}
		out.Rows = append(out.Rows, row)
		if progress != nil {
			progress(Progress{Step: StepDone, Done: i + 1, Of: len(rows)})
		}
	}
	if out.Tonnes > 0 {
		out.MeanPerT = total / out.Tonnes
	}
	return out, nil
}

func errText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}

// ValueColumns are the header cells of the value columns of a bale
// export under a sheet: the value per tonne of bale on the sheet's route
// at P10, P50 and P90, with the currency and route in the names
// (value_eur_per_t_glycolysate_p10, ...).
func ValueColumns(sheet yield.PriceSheet) []string {
	base := fmt.Sprintf("value_%s_per_t_%s_", strings.ToLower(sheet.Currency), sheet.Route)
	return []string{base + "p10", base + "p50", base + "p90"}
}

// ValueCells are a bale's cells under ValueColumns: dot decimals to the
// cent, empty where there is no value (v nil, or no draws).
func ValueCells(v *yield.ValueResult) []string {
	if v == nil {
		return []string{"", "", ""}
	}
	s := v.Of(v.Headline).PerT
	cell := func(x float64) string {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return ""
		}
		return fmt.Sprintf("%.2f", x)
	}
	return []string{cell(s.P10), cell(s.P50), cell(s.P90)}
}

// ValueBales values bales by id, for an export's value columns: a bale
// that cannot be valued (no pulls, a failed audit) maps to nil. The
// same plan and options serve every bale; ctx stops the run.
func (d *Desk) ValueBales(ctx context.Context, ids []record.EntityID, plan yield.Plan, opt ValueOptions) (map[record.EntityID]*yield.ValueResult, error) {
	out := make(map[record.EntityID]*yield.ValueResult, len(ids))
	for _, id := range ids {
		if err := ctx.Err(); err != nil {
			return out, err
		}
		v, err := d.ValueBale(ctx, id.String(), plan, opt, nil)
		if err != nil {
			if ctx.Err() != nil {
				return out, ctx.Err()
			}
			out[id] = nil
			continue
		}
		out[id] = &v.Value
	}
	return out, nil
}
