package desk

import (
	"math"

	"baleassay/assess"
	"baleassay/data/record"
)

// Stat is the spread of one share across bales: count, mean, sample
// standard deviation (n − 1; 0 when n < 2), minimum and maximum.
type Stat struct {
	N        int
	Mean, SD float64
	Min, Max float64
	m2       float64
}

func (s *Stat) add(x float64) {
	// Welford's update (B. P. Welford, Technometrics 4 (1962) 419).
	s.N++
	if s.N == 1 {
		s.Min, s.Max = x, x
	}
	s.Min, s.Max = math.Min(s.Min, x), math.Max(s.Max, x)
	d := x - s.Mean
	s.Mean += d / float64(s.N)
	s.m2 += d * (x - s.Mean)
	if s.N > 1 {
		s.SD = math.Sqrt(s.m2 / float64(s.N-1))
	}
}

// GroupStat is the spread of one group's share.
type GroupStat struct {
	Group assess.Group
	Stat
}

// Flagged names a bale that needs a look, with its site.
type Flagged struct {
	Bale     record.EntityID
	Tag      string
	Site     record.EntityID
	SiteName string
}

// Summary describes the bales received from a set of sites in a date
// range. Shares are per bale, by Cochran's ratio estimator r = Σc/Σw over
// the bale's pulls (assess.Assess), then summarised across bales.
type Summary struct {
	Sites       int
	Bales       int // received in the range
	Audited     int // of which with pulls that could be assessed
	TargetPET   Stat
	Groups      []GroupStat // every group but target PET, in report order
	Hazards     []Flagged   // audited bales with a hazard found
	LabelClash  []Flagged   // bales whose pulls share a label (two devices): assessed, and a conflict to resolve
	Unassessed  []Flagged   // bales with pulls that could not be assessed
	HazardSites []record.EntityID
}

// SummarizeSites summarises the bales of the given sites received in r.
func (d *Desk) SummarizeSites(sites []record.EntityID, r DateRange) (Summary, error) {
	sum := Summary{Sites: len(sites)}
	for _, g := range assess.Groups() {
		if g != assess.GroupPET {
			sum.Groups = append(sum.Groups, GroupStat{Group: g})
		}
	}
	in := make(map[record.EntityID]bool, len(sites))
	for _, s := range sites {
		in[s] = true
	}
	rows, err := d.Bales(BaleFilter{Range: r})
	if err != nil {
		return sum, err
	}
	pulls, err := d.st.PullsByBale()
	if err != nil {
		return sum, err
	}
	hz := map[record.EntityID]bool{}
	for _, b := range rows {
		if !in[b.Bale.Site] {
			continue
		}
		sum.Bales++
		f := Flagged{b.ID, b.Bale.Tag, b.Bale.Site, b.SiteName}
		if len(b.Audit.LabelClash) > 0 {
			sum.LabelClash = append(sum.LabelClash, f)
		}
		switch b.Audit.State {
		case AuditNoPulls:
			continue
		case AuditFailed:
			sum.Unassessed = append(sum.Unassessed, f)
			continue
		}
		a, _, err := auditOf(b.Bale, pulls[b.ID])
		if err != nil {
			continue
		}
		res, err := assess.Assess(a, assess.Options{})
		if err != nil {
			continue
		}
		sum.Audited++
		sum.TargetPET.add(res.Group(assess.GroupPET).Fraction)
		for i := range sum.Groups {
			sum.Groups[i].add(res.Group(sum.Groups[i].Group).Fraction)
		}
		if b.Audit.Hazard {
			sum.Hazards = append(sum.Hazards, f)
			if !hz[b.Bale.Site] {
				hz[b.Bale.Site] = true
				sum.HazardSites = append(sum.HazardSites, b.Bale.Site)
			}
		}
	}
	return sum, nil
}

// SummarizeRegion summarises the sites a spatial query finds.
func (d *Desk) SummarizeRegion(q Query, r DateRange) (Summary, error) {
	hits, err := d.FindSites(q)
	if err != nil {
		return Summary{}, err
	}
	ids := make([]record.EntityID, len(hits))
	for i, h := range hits {
		ids[i] = h.ID
	}
	return d.SummarizeSites(ids, r)
}

// SummarizeSite summarises one site's bales.
func (d *Desk) SummarizeSite(site string, r DateRange) (record.EntityID, Summary, error) {
	st, err := d.Resolve(site, record.KindSite)
	if err != nil {
		return st.ID, Summary{}, err
	}
	sum, err := d.SummarizeSites([]record.EntityID{st.ID}, r)
	return st.ID, sum, err
}
