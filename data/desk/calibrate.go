package desk

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"sort"

	"baleassay/data/record"
	"baleassay/yield"
)

// DefaultCalibrationDraws is the number of Monte Carlo draws per batch
// prediction unless another is given.
const DefaultCalibrationDraws = 4000

// CalibrateOptions choose the measured batches and tune the predictions.
type CalibrateOptions struct {
	Site   string    // only batches whose bales all come from this site (id, prefix, suffix or name)
	Line   string    // only batches run on this line (its name)
	Range  DateRange // when the batches ran
	MC     yield.MCOptions
	Errors yield.CalibrateOptions // the plant's measurement errors
}

// BatchCheck is one measured batch against its prediction.
type BatchCheck struct {
	ID  record.EntityID
	Rec record.MeasuredRecord
	// Site is the one site all the batch's bales come from (zero when
	// they come from several); SiteName its name.
	Site     record.EntityID
	SiteName string
	Observe  []yield.Observable
	Measured []float64
	Pred     yield.BatchPrediction
	// Skipped says why the batch was not predicted ("" when it was).
	Skipped string
}

// QuantityAgreement is the agreement of one measured quantity.
type QuantityAgreement struct {
	Quantity yield.Observable
	yield.Agreement
}

// GroupAgreement is the agreement of the batches of one site or one
// line, quantity by quantity.
type GroupAgreement struct {
	Name       string
	Site       record.EntityID // zero for a line
	Batches    int
	Quantities []QuantityAgreement
}

// LineReport is what the measured batches of one line say about it.
type LineReport struct {
	Line    string
	Current yield.Line
	Batches []BatchCheck
	All     GroupAgreement
	// Proposal holds the calibrated shares and the proposed profile;
	// nil with ProposalErr saying why there is none.
	Proposal    *yield.LineCalibration
	ProposalErr error
}

// CalibrationReport is the outcome of Calibrate.
type CalibrationReport struct {
	Lines   []LineReport
	Sites   []GroupAgreement // batches of one site each, over every line
	Skipped []BatchCheck
	// MixedLeftOut counts batches that hold bales of the chosen site
	// together with other sites' bales, left out by the site filter.
	MixedLeftOut int
	Method       string
}

// Calibrate predicts every measured batch chosen by opt (the bales'
// audits through the line the batch ran on, the line's ranges drawn once
// per batch, yield.PredictBatch), compares the predictions with the
// measurements per line and per site (bias, spread, coverage of the
// predicted P10–P90, yield.Agree) and proposes, per line, new ranges for
// its uncertain shares (yield.Calibrate). Batches that cannot be
// predicted (a bale without pulls or not in this store, an unknown line)
// are listed with the reason. Progress counts batches.
func (d *Desk) Calibrate(ctx context.Context, opt CalibrateOptions, progress func(Progress)) (CalibrationReport, error) {
	rep := CalibrationReport{Method: yield.CalibrationMethod}
	var site record.EntityID
	if opt.Site != "" {
		st, err := d.Resolve(opt.Site, record.KindSite)
		if err != nil {
			return rep, err
		}
		site = st.ID
	}
	if opt.MC.Draws == 0 {
		opt.MC.Draws = DefaultCalibrationDraws
	}
	rows, err := d.Measured(MeasuredFilter{Line: opt.Line, Range: opt.Range})
	if err != nil {
		return rep, err
	}
	names, err := d.siteNames()
	if err != nil {
		return rep, err
	}
	lines := map[string]*LineReport{}
	plans := map[string]yield.Plan{}
	var order []string
	for i, row := range rows {
		if err := ctx.Err(); err != nil {
			return rep, err
		}
		bc, bales, sites := d.batchOf(row, names)
		if site != (record.EntityID{}) && bc.Site != site {
			if sites[site] {
				rep.MixedLeftOut++
			}
			continue
		}
		plan, ok := plans[row.Rec.Line]
		if !ok && bc.Skipped == "" {
			m, _, err := d.lineModel(row.Rec.Line)
			switch {
			case errors.Is(err, ErrNotFound):
				bc.Skipped = fmt.Sprintf("line %q is not in this store", row.Rec.Line)
			case err != nil:
				return rep, err
			default:
				plan = yield.DefaultPlan()
				plan.Line, plan.Spec = m, nil
				plans[row.Rec.Line] = plan
			}
		}
		if bc.Skipped == "" {
			mc := opt.MC
			mc.Seed += uint64(i) * 7919
			bc.Pred, err = yield.PredictBatch(ctx, yield.Batch{Bales: bales, Observe: bc.Observe, Reactor: reactorOf(row.Rec)}, plan, mc)
			if err != nil {
				if ctx.Err() != nil {
					return rep, ctx.Err()
				}
				bc.Skipped = errText(err)
			}
		}
		if progress != nil {
			progress(Progress{Step: StepDone, Done: i + 1, Of: len(rows)})
		}
		if bc.Skipped != "" {
			rep.Skipped = append(rep.Skipped, bc)
			continue
		}
		lr, ok := lines[row.Rec.Line]
		if !ok {
			lr = &LineReport{Line: row.Rec.Line, Current: plan.Line.Line()}
			lines[row.Rec.Line] = lr
			order = append(order, row.Rec.Line)
		}
		lr.Batches = append(lr.Batches, bc)
	}
	sort.Strings(order)
	bySite := map[record.EntityID][]BatchCheck{}
	for _, name := range order {
		lr := lines[name]
		lr.All = agreeGroup(name, record.EntityID{}, lr.Batches, opt.Errors)
		cal, err := yield.Calibrate(lr.Current, measurementsOf(lr.Batches), opt.Errors)
		if err != nil {
			lr.ProposalErr = err
		} else {
			lr.Proposal = &cal
		}
		rep.Lines = append(rep.Lines, *lr)
		for _, b := range lr.Batches {
			if b.Site != (record.EntityID{}) {
				bySite[b.Site] = append(bySite[b.Site], b)
			}
		}
	}
	for id, bs := range bySite {
		rep.Sites = append(rep.Sites, agreeGroup(names[id], id, bs, opt.Errors))
	}
	sort.Slice(rep.Sites, func(i, j int) bool { return rep.Sites[i].Name < rep.Sites[j].Name })
	return rep, nil
}

func (d *Desk) siteNames() (map[record.EntityID]string, error) {
	sites, err := d.st.Sites()
	if err != nil {
		return nil, err
	}
	out := map[record.EntityID]string{}
	for _, s := range sites {
		out[s.ID] = s.Site.Name
	}
	return out, nil
}

// batchOf gathers a measured batch's bales and audits, and the sites
// they come from.
func (d *Desk) batchOf(row MeasuredRow, names map[record.EntityID]string) (BatchCheck, []yield.BatchBale, map[record.EntityID]bool) {
	bc := BatchCheck{ID: row.ID, Rec: row.Rec}
	bc.Observe, bc.Measured = observationsOf(row.Rec)
	sites := map[record.EntityID]bool{}
	var bales []yield.BatchBale
	for _, id := range row.Rec.Bales {
		st, err := d.st.Entity(id)
		cur, ok := st.Current()
		if err != nil || !ok || cur.Bale == nil {
			bc.Skipped = fmt.Sprintf("bale %s is not in this store (it may come with a later import)", id)
			continue
		}
		sites[cur.Bale.Site] = true
		pulls, err := d.st.Pulls(id)
		if err != nil || len(pulls) == 0 {
			bc.Skipped = fmt.Sprintf("bale %s has no pulls", baleLabel(id, *cur.Bale))
			continue
		}
		a, _, err := auditOf(*cur.Bale, pulls)
		if err != nil {
			bc.Skipped = fmt.Sprintf("bale %s: %v", baleLabel(id, *cur.Bale), err)
			continue
		}
		bales = append(bales, yield.BatchBale{Pulls: a.Pulls, BaleKg: cur.Bale.GrossKg})
	}
	if len(sites) == 1 {
		for s := range sites {
			bc.Site, bc.SiteName = s, names[s]
		}
	}
	return bc, bales, sites
}

// observationsOf lists what was measured of a batch and the values: the
// line's quantities first (the dry flake and moisture when the moisture
// was measured, otherwise the flake as weighed; the streams by name),
// then the reactor's.
func observationsOf(m record.MeasuredRecord) ([]yield.Observable, []float64) {
	var obs []yield.Observable
	var val []float64
	add := func(o yield.Observable, v float64) {
		obs = append(obs, o)
		val = append(val, v)
	}
	if p := m.MoisturePct; p != nil {
		add(yield.Observable{Kind: yield.ObsFlakeDryKg}, m.FlakeKg*(1-*p/100))
		add(yield.Observable{Kind: yield.ObsMoisturePct}, *p)
	} else {
		add(yield.Observable{Kind: yield.ObsFlakeKg}, m.FlakeKg)
	}
	for _, k := range record.SortedKeys(m.StreamsKg) {
		add(yield.Observable{Kind: yield.ObsStreamKg, Stream: k}, m.StreamsKg[k])
	}
	if r := m.Reactor; r != nil {
		if r.ProductKg > 0 {
			add(yield.Observable{Kind: yield.ObsGlycolysateKg}, r.ProductKg)
		}
		if r.HydroxylValue > 0 {
			add(yield.Observable{Kind: yield.ObsHydroxylValue}, r.HydroxylValue)
		}
		if r.AcidValue != nil {
			add(yield.Observable{Kind: yield.ObsAcidValue}, *r.AcidValue)
		}
	}
	return obs, val
}

func reactorOf(m record.MeasuredRecord) *yield.ReactorCharge {
	r := m.Reactor
	if r == nil {
		return nil
	}
	return &yield.ReactorCharge{FlakeKg: r.FlakeKg, Glycol: r.Glycol, GlycolKg: r.GlycolKg, StripEG: r.StripEG}
}

func isLineQuantity(o yield.Observable) bool {
	switch o.Kind {
	case yield.ObsFlakeKg, yield.ObsFlakeDryKg, yield.ObsMoisturePct, yield.ObsStreamKg:
		return true
	}
	return false
}

// measurementsOf turns predicted batches into the calibration's input:
// the line quantities only (they come first), with their block of the
// audit covariance.
func measurementsOf(bs []BatchCheck) []yield.Measurement {
	var out []yield.Measurement
	for _, b := range bs {
		k := 0
		for k < len(b.Observe) && isLineQuantity(b.Observe[k]) {
			k++
		}
		cov := make([][]float64, k)
		for i := range cov {
			cov[i] = b.Pred.AuditCov[i][:k]
		}
		out = append(out, yield.Measurement{Composition: b.Pred.Composition, Observe: b.Observe[:k], Values: b.Measured[:k],
			AuditCov: cov, ShareVar: b.Pred.ShareVar})
	}
	return out
}

// agreeGroup compares predictions with measurements quantity by
// quantity over a group of batches.
func agreeGroup(name string, site record.EntityID, bs []BatchCheck, errs yield.CalibrateOptions) GroupAgreement {
	g := GroupAgreement{Name: name, Site: site, Batches: len(bs)}
	pairs := map[yield.Observable][]yield.Pair{}
	var keys []yield.Observable
	for _, b := range bs {
		for i, o := range b.Observe {
			if _, ok := pairs[o]; !ok {
				keys = append(keys, o)
			}
			pairs[o] = append(pairs[o], yield.Pair{Predicted: b.Pred.Full[i], Measured: b.Measured[i], MeasureSD: errs.MeasureSD(o, b.Measured[i])})
		}
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i].Kind != keys[j].Kind {
			return keys[i].Kind < keys[j].Kind
		}
		return keys[i].Stream < keys[j].Stream
	})
	for _, k := range keys {
		g.Quantities = append(g.Quantities, QuantityAgreement{Quantity: k, Agreement: yield.Agree(pairs[k])})
	}
	return g
}

// SaveCalibratedLine keeps a proposed line profile in the store under its
// name: a new version of that line (the old one stays in the history),
// which from then on wins over a built-in line of the same name.
func (d *Desk) SaveCalibratedLine(l yield.Line) (record.EntityID, bool, error) {
	body, err := json.MarshalIndent(l, "", "  ")
	if err != nil {
		return record.EntityID{}, false, err
	}
	return d.SaveSetting(SettingLine, append(body, '\n'), "calibrated line "+l.Name)
}
