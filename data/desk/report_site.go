package desk

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"time"

	"baleassay/assess"
	"baleassay/data/geo"
	"baleassay/data/record"
)

// SiteScope is what a site report covers: one site, or the sites of a
// region (a QueryWithin).
type SiteScope struct {
	Site   string // id, prefix, suffix or name of one site; or
	Within *Query // a region: Kind QueryWithin, Lat, Lon, Km
}

// SiteReportOptions choose the plan for the per-tonne figures.
type SiteReportOptions struct {
	Line, FlakeSpec string // as Plan takes them ("" for the built-in line and flake spec)
}

// TonneFigure is one product per tonne of bale: the mass-weighted figure
// over the bales (Σ product / Σ bale mass) and the spread of the
// per-bale figures across bales (P10, P50, P90 by Quantile).
type TonneFigure struct {
	KgPerTonne    float64
	P10, P50, P90 float64
}

// PerTonne is what the audited bales of a report make per tonne, each
// bale at its audit's point estimate through one plan.
type PerTonne struct {
	Bales              int     // bales put through the plan
	BaleKg             float64 // their gross mass
	Flake, Glycolysate TonneFigure
	HydroxylValue      Stat // mg KOH/g, across bales
	// The plan: line name, glycol and its ratio (kg per kg of dry flake,
	// or mol per mol of PET repeat unit when Molar).
	Line        string
	Glycol      string
	GlycolRatio float64
	Molar       bool
}

// SpecMin is a reference line for the target-PET trend: the minimum of
// target PET in the spec most bales of the report are judged against.
type SpecMin struct {
	Spec string
	Min  float64
	Has  bool
}

// SiteReport is everything the site or region report shows.
type SiteReport struct {
	Generated time.Time
	Demo      bool
	Scope     SiteScope
	Range     DateRange
	Sites     []SiteStat // the sites in scope: by name (one site), nearest first (region)
	Others    []SiteRow  // other sites inside the map's frame, for context
	Bales     []BalePoint
	All       SiteStat // every bale of the report together (SiteRow zero)
	Trend     Trend
	PerTonne  PerTonne
	Reference SpecMin
	// LabelClash lists bales whose pulls share a label (two devices).
	LabelClash   []BalePoint
	Cautions     []Caution
	CautionTexts []string // as they apply to the report's plan
}

// ReportSites gathers a site or region report for bales received in r.
func (d *Desk) ReportSites(scope SiteScope, r DateRange, opt SiteReportOptions) (SiteReport, error) {
	rep := SiteReport{Generated: d.now().UTC(), Demo: d.holdsDemo(), Scope: scope, Range: r,
		Cautions: []Caution{CautionBale, CautionCaustic, CautionHotGlycol, CautionIsocyanate}}
	all, err := d.Sites()
	if err != nil {
		return rep, err
	}
	var in []SiteRow
	km := map[record.EntityID]float64{}
	switch {
	case scope.Within != nil && scope.Site != "":
		return rep, fmt.Errorf("%w: give one site or a region, not both", ErrUsage)
	case scope.Within != nil:
		q := *scope.Within
		q.Kind = QueryWithin
		rep.Scope.Within = &q
		hits, err := d.FindSites(q)
		if err != nil {
			return rep, err
		}
		for _, h := range hits {
			km[h.ID] = h.Km
		}
		for _, s := range all {
			if _, ok := km[s.ID]; ok {
				in = append(in, s)
			}
		}
		sort.SliceStable(in, func(i, j int) bool { return km[in[i].ID] < km[in[j].ID] })
	case scope.Site != "":
		st, err := d.Resolve(scope.Site, record.KindSite)
		if err != nil {
			return rep, err
		}
		for _, s := range all {
			if s.ID == st.ID {
				in = append(in, s)
			}
		}
		if len(in) == 0 {
			return rep, fmt.Errorf("%w: site %s is removed", ErrDeleted, st.ID)
		}
	default:
		return rep, fmt.Errorf("%w: give a site, or a region (within LAT LON KM)", ErrUsage)
	}
	plan, err := d.Plan(opt.Line, opt.FlakeSpec)
	if err != nil {
		return rep, err
	}
	if rep.Sites, rep.Bales, err = d.collect(in, r, &plan); err != nil {
		return rep, err
	}
	for i := range rep.Sites {
		rep.Sites[i].Km = km[rep.Sites[i].ID]
	}
	rep.All = newSiteStat(SiteRow{})
	for i := range rep.Bales {
		rep.All.add(&rep.Bales[i])
		if len(rep.Bales[i].Audit.LabelClash) > 0 {
			rep.LabelClash = append(rep.LabelClash, rep.Bales[i])
		}
	}
	rep.Trend = trendOf(rep.Bales)
	rep.PerTonne = perTonne(rep.Bales)
	g := plan.Recipe
	rep.PerTonne.Line, rep.PerTonne.Glycol, rep.PerTonne.GlycolRatio, rep.PerTonne.Molar = plan.Line.Line().Name, g.Glycol, g.Ratio, g.Molar
	rep.Reference = d.referenceMin(rep.Bales)
	rep.Others = others(all, in, rep.Scope.Within)
	for _, c := range rep.Cautions {
		rep.CautionTexts = append(rep.CautionTexts, YieldRun{Plan: plan}.CautionText(c))
	}
	return rep, nil
}

// perTonne sums the point yields of the bales per tonne of bale.
func perTonne(points []BalePoint) PerTonne {
	var pt PerTonne
	var flake, gly, fs, gs []float64
	for _, p := range points {
		if !p.Yield.Has || !(p.Bale.GrossKg > 0) {
			continue
		}
		pt.Bales++
		pt.BaleKg += p.Bale.GrossKg
		flake = append(flake, p.Yield.FlakeKg)
		gly = append(gly, p.Yield.GlycolysateKg)
		fs = append(fs, 1000*p.Yield.FlakeKg/p.Bale.GrossKg)
		gs = append(gs, 1000*p.Yield.GlycolysateKg/p.Bale.GrossKg)
		pt.HydroxylValue.add(p.Yield.HydroxylValue)
	}
	pt.Flake = tonneFigure(flake, fs, pt.BaleKg)
	pt.Glycolysate = tonneFigure(gly, gs, pt.BaleKg)
	return pt
}

func tonneFigure(kg, perT []float64, baleKg float64) TonneFigure {
	if len(kg) == 0 {
		nan := math.NaN()
		return TonneFigure{nan, nan, nan, nan}
	}
	var sum float64
	for _, v := range kg {
		sum += v
	}
	slices.Sort(perT)
	return TonneFigure{KgPerTonne: 1000 * sum / baleKg, P10: Quantile(perT, 0.1), P50: Quantile(perT, 0.5), P90: Quantile(perT, 0.9)}
}

// referenceMin finds the target-PET minimum of the spec most bales are
// judged against.
func (d *Desk) referenceMin(points []BalePoint) SpecMin {
	count := map[string]int{}
	best := ""
	for _, p := range points {
		if p.Audit.HasVerdict {
			count[p.Audit.Spec]++
			if n := count[p.Audit.Spec]; n > count[best] || (n == count[best] && p.Audit.Spec < best) {
				best = p.Audit.Spec
			}
		}
	}
	if best == "" {
		return SpecMin{}
	}
	spec, err := d.LoadSpec(best)
	if err != nil {
		return SpecMin{}
	}
	for _, l := range spec.Limits {
		if l.Item == assess.GroupPET.Key() && l.Min != nil {
			return SpecMin{Spec: spec.Name, Min: *l.Min, Has: true}
		}
	}
	return SpecMin{}
}

// others lists the sites that are not in the report but lie near enough
// to be drawn on its map: within the region's circle frame, or within
// 25 km of a single site.
func others(all, in []SiteRow, within *Query) []SiteRow {
	if len(in) == 0 {
		return nil
	}
	lat, lon, km := in[0].Site.Lat, in[0].Site.Lon, ContextKm
	if within != nil {
		lat, lon, km = within.Lat, within.Lon, within.Km*1.25
	}
	var out []SiteRow
	for _, s := range all {
		if slices.ContainsFunc(in, func(x SiteRow) bool { return x.ID == s.ID }) {
			continue
		}
		if geo.HaversineKm(lat, lon, s.Site.Lat, s.Site.Lon) <= km {
			out = append(out, s)
		}
	}
	return out
}

// ContextKm is how far around a single site the report's map shows
// other sites.
const ContextKm = 25.0
