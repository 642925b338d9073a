package desk

import (
	"math"

	"baleassay/assess"
)

// baleColumns are the columns of the bales table. Shares are percent of
// the bale's mass by Cochran's ratio estimate; the interval is the
// audit's default two-sided 90 % one. The _point columns put the bale
// through the export's plan at that estimate.
func baleColumns() []column[BalePoint] {
	done := func(p *BalePoint) bool { return p.Audit.State == AuditDone }
	cols := []column[BalePoint]{
		{"bale_id", func(p *BalePoint) string { return p.ID.String() }},
		{"tag", func(p *BalePoint) string { return p.Bale.Tag }},
		{"site_id", func(p *BalePoint) string { return idOf(p.Bale.Site) }},
		{"site_name", func(p *BalePoint) string { return p.SiteName }},
		{"received_utc", func(p *BalePoint) string { return fms(p.Bale.ReceivedMs) }},
		{"gross_kg", func(p *BalePoint) string { return fnum(p.Bale.GrossKg, KgDigits) }},
		{"length_m", func(p *BalePoint) string { return fpos(p.Bale.LengthM, KgDigits) }},
		{"width_m", func(p *BalePoint) string { return fpos(p.Bale.WidthM, KgDigits) }},
		{"height_m", func(p *BalePoint) string { return fpos(p.Bale.HeightM, KgDigits) }},
		{"density_kg_per_m3", func(p *BalePoint) string { return fpos(p.Bale.DensityKgM3(), 1) }},
		{"grader", func(p *BalePoint) string { return p.Bale.Grader }},
		{"spec", func(p *BalePoint) string { return p.Audit.Spec }},
		{"pulls", func(p *BalePoint) string { return fint(p.Pulls) }},
		{"sampled_kg", func(p *BalePoint) string { return when(done(p), fnum(p.Result.SampledKg, KgDigits)) }},
		{"audit", func(p *BalePoint) string { return p.Audit.State.String() }},
		{"target_pet_pct", func(p *BalePoint) string { return when(done(p), fpct(pet(p).Fraction)) }},
		{"target_pet_ci90_low_pct", func(p *BalePoint) string { return when(done(p) && pet(p).HasInterval, fpct(pet(p).Low)) }},
		{"target_pet_ci90_high_pct", func(p *BalePoint) string { return when(done(p) && pet(p).HasInterval, fpct(pet(p).High)) }},
	}
	for _, g := range assess.Groups() {
		if g == assess.GroupPET {
			continue
		}
		cols = append(cols, column[BalePoint]{g.Key() + "_pct", func(p *BalePoint) string {
			return when(done(p), fpct(p.Result.Group(g).Fraction))
		}})
	}
	return append(cols,
		column[BalePoint]{"verdict", func(p *BalePoint) string { return when(p.Audit.HasVerdict, p.Audit.Verdict.String()) }},
		column[BalePoint]{"hazard_found", func(p *BalePoint) string { return when(done(p), fbool(p.Audit.Hazard)) }},
		column[BalePoint]{"label_clash", func(p *BalePoint) string { return fbool(len(p.Audit.LabelClash) > 0) }},
		column[BalePoint]{"conflicted", func(p *BalePoint) string { return fbool(p.Conflicted) }},
		column[BalePoint]{"flake_kg_point", func(p *BalePoint) string { return when(p.Yield.Has, fnum(p.Yield.FlakeKg, KgDigits)) }},
		column[BalePoint]{"glycolysate_kg_point", func(p *BalePoint) string { return when(p.Yield.Has, fnum(p.Yield.GlycolysateKg, KgDigits)) }},
		column[BalePoint]{"hydroxyl_value_mg_koh_per_g_point", func(p *BalePoint) string { return when(p.Yield.Has, fnum(p.Yield.HydroxylValue, 2)) }},
	)
}

func pet(p *BalePoint) assess.Share { return p.Result.Group(assess.GroupPET) }

// when gives s, or an empty field.
func when(ok bool, s string) string {
	if !ok {
		return ""
	}
	return s
}

// siteColumns are the columns of the sites table: each site's bales
// received in the export's range.
var siteColumns = []column[SiteStat]{
	{"site_id", func(s *SiteStat) string { return s.ID.String() }},
	{"name", func(s *SiteStat) string { return s.Site.Name }},
	{"kind", func(s *SiteStat) string { return s.Site.Kind.String() }},
	{"lat_deg", func(s *SiteStat) string { return fnum(s.Site.Lat, DegDigits) }},
	{"lon_deg", func(s *SiteStat) string { return fnum(s.Site.Lon, DegDigits) }},
	{"notes", func(s *SiteStat) string { return s.Site.Notes }},
	{"bales", func(s *SiteStat) string { return fint(s.Bales) }},
	{"audited", func(s *SiteStat) string { return fint(s.Audited) }},
	{"pass", func(s *SiteStat) string { return fint(s.Verdicts.Pass) }},
	{"undecided", func(s *SiteStat) string { return fint(s.Verdicts.Undecided) }},
	{"fail", func(s *SiteStat) string { return fint(s.Verdicts.Fail) }},
	{"no_verdict", func(s *SiteStat) string { return fint(s.Verdicts.NoVerdict) }},
	{"no_pulls", func(s *SiteStat) string { return fint(s.Verdicts.NoPulls) }},
	{"unassessed", func(s *SiteStat) string { return fint(s.Verdicts.Unassessed) }},
	{"hazard_bales", func(s *SiteStat) string { return fint(s.Hazards) }},
	{"target_pet_mean_pct", func(s *SiteStat) string { return when(s.TargetPET.N > 0, fpct(s.TargetPET.Mean)) }},
	{"target_pet_sd_pct", func(s *SiteStat) string { return when(s.TargetPET.N > 1, fpct(s.TargetPET.SD)) }},
	{"target_pet_min_pct", func(s *SiteStat) string { return when(s.TargetPET.N > 0, fpct(s.TargetPET.Min)) }},
	{"target_pet_max_pct", func(s *SiteStat) string { return when(s.TargetPET.N > 0, fpct(s.TargetPET.Max)) }},
	{"latest_received_utc", func(s *SiteStat) string {
		return latest(s, func(p *BalePoint) string { return fms(p.Bale.ReceivedMs) })
	}},
	{"latest_tag", func(s *SiteStat) string { return latest(s, func(p *BalePoint) string { return p.Bale.Tag }) }},
	{"latest_verdict", func(s *SiteStat) string { return s.LatestVerdict() }},
	{"flake_kg_per_t", func(s *SiteStat) string { return fnum(s.PerTonne(s.FlakeKg), 1) }},
	{"glycolysate_kg_per_t", func(s *SiteStat) string { return fnum(s.PerTonne(s.Glycolysate), 1) }},
	{"conflicted", func(s *SiteStat) string { return fbool(s.Conflicted) }},
}

// latest gives a field of the site's latest bale with a verdict, empty
// without one.
func latest(s *SiteStat, f func(*BalePoint) string) string {
	if s.Latest == nil {
		return ""
	}
	return f(s.Latest)
}

// LatestVerdict is the verdict of the most recently received bale that
// has one ("" when none has).
func (s SiteStat) LatestVerdict() string {
	if s.Latest == nil {
		return ""
	}
	return s.Latest.Audit.Verdict.String()
}

// PerTonne is kg per tonne of the bales put through the plan; NaN when
// none was.
func (s SiteStat) PerTonne(kg float64) float64 {
	if !(s.YieldBaleKg > 0) {
		return math.NaN()
	}
	return 1000 * kg / s.YieldBaleKg
}
