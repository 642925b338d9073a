package store

import (
	"math"
	"time"

	"baleassay/assess"
	"baleassay/data/geo"
	"baleassay/data/record"
)

// Stat is the spread of one share across bales: count, mean, sample
// standard deviation (n − 1 in the denominator; 0 when n < 2), minimum
// and maximum (common practice).
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

// RegionSummary describes the bales received from a set of sites in a
// date range. Shares are per bale, by Cochran's ratio estimator r = Σc/Σw
// over the bale's pulls (assess.Assess), then summarised across bales.
type RegionSummary struct {
	Sites       int
	Bales       int // bales received in the range
	Audited     int // of which with pulls that could be assessed
	TargetPET   Stat
	Groups      []GroupStat // every group but target PET, in report order
	HazardBales int         // audited bales with a hazard found
}

// Summarize summarises the bales of the given sites received in
// [from, to); a zero from or to leaves that end open.
func (s *Store) Summarize(sites []geo.Hit, from, to time.Time) (RegionSummary, error) {
	sum := RegionSummary{Sites: len(sites)}
	for _, g := range assess.Groups() {
		if g != assess.GroupPET {
			sum.Groups = append(sum.Groups, GroupStat{Group: g})
		}
	}
	in := make(map[record.EntityID]bool, len(sites))
	for _, h := range sites {
		in[h.ID] = true
	}
	bales, err := s.Bales(record.EntityID{})
	if err != nil {
		return sum, err
	}
	pulls, err := s.PullsByBale()
	if err != nil {
		return sum, err
	}
	for _, b := range bales {
		if !in[b.Bale.Site] {
			continue
		}
		t := time.UnixMilli(b.Bale.ReceivedMs)
		if (!from.IsZero() && t.Before(from)) || (!to.IsZero() && !t.Before(to)) {
			continue
		}
		sum.Bales++
		a, err := AuditOf(b.Bale, pulls[b.ID])
		if err != nil || len(a.Pulls) == 0 {
			continue
		}
		res, err := assess.Assess(a, assess.Options{})
		if err != nil {
			continue // e.g. duplicate labels from two devices: shown by 'bale show'
		}
		sum.Audited++
		sum.TargetPET.add(res.Group(assess.GroupPET).Fraction)
		for i := range sum.Groups {
			sum.Groups[i].add(res.Group(sum.Groups[i].Group).Fraction)
		}
		if len(res.HazardPulls) > 0 || res.HazardPieces > 0 {
			sum.HazardBales++
		}
	}
	return sum, nil
}
