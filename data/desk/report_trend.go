package desk

import (
	"fmt"
	"math"
	"sort"
	"time"

	"baleassay/assess"
)

// TrendUnit is the width of a trend's buckets.
type TrendUnit uint8

// The bucket widths.
const (
	TrendWeek  TrendUnit = iota + 1 // ISO weeks, Monday 00:00 UTC
	TrendMonth                      // calendar months, UTC
)

func (u TrendUnit) String() string {
	switch u {
	case TrendWeek:
		return "week"
	case TrendMonth:
		return "month"
	}
	return fmt.Sprintf("trend(%d)", uint8(u))
}

// MaxWeeklyTrend is the longest span (in weeks) drawn week by week;
// longer spans are drawn month by month.
const MaxWeeklyTrend = 16

// TrendBucket is the spread of per-bale shares among the audited bales
// received in [Start, End). Empty buckets are kept, so a chart shows a
// week without bales as a gap rather than joining across it.
type TrendBucket struct {
	Start, End time.Time
	TargetPET  Stat
	Groups     []GroupStat // every group but target PET, report order
}

// Trend is the shares over time.
type Trend struct {
	Unit    TrendUnit
	Buckets []TrendBucket
}

// trendOf buckets the audited bales by week, or by month when they span
// more than MaxWeeklyTrend weeks.
func trendOf(points []BalePoint) Trend {
	var first, last time.Time
	for _, p := range points {
		if p.Audit.State != AuditDone {
			continue
		}
		t := p.Received()
		if first.IsZero() || t.Before(first) {
			first = t
		}
		if t.After(last) {
			last = t
		}
	}
	if first.IsZero() {
		return Trend{Unit: TrendWeek}
	}
	tr := Trend{Unit: TrendWeek}
	if last.Sub(first) > MaxWeeklyTrend*7*24*time.Hour {
		tr.Unit = TrendMonth
	}
	for s := tr.Unit.start(first); !s.After(last); s = tr.Unit.next(s) {
		b := TrendBucket{Start: s, End: tr.Unit.next(s)}
		for _, g := range assess.Groups() {
			if g != assess.GroupPET {
				b.Groups = append(b.Groups, GroupStat{Group: g})
			}
		}
		tr.Buckets = append(tr.Buckets, b)
	}
	for _, p := range points {
		if p.Audit.State != AuditDone {
			continue
		}
		t := p.Received()
		i := sort.Search(len(tr.Buckets), func(i int) bool { return tr.Buckets[i].End.After(t) })
		b := &tr.Buckets[i]
		b.TargetPET.add(p.Result.Group(assess.GroupPET).Fraction)
		for j := range b.Groups {
			b.Groups[j].add(p.Result.Group(b.Groups[j].Group).Fraction)
		}
	}
	return tr
}

// start is the beginning of the bucket that holds t.
func (u TrendUnit) start(t time.Time) time.Time {
	t = t.UTC()
	if u == TrendMonth {
		return time.Date(t.Year(), t.Month(), 1, 0, 0, 0, 0, time.UTC)
	}
	day := time.Date(t.Year(), t.Month(), t.Day(), 0, 0, 0, 0, time.UTC)
	back := (int(day.Weekday()) + 6) % 7 // days since Monday
	return day.AddDate(0, 0, -back)
}

// next is the beginning of the bucket after the one starting at s.
func (u TrendUnit) next(s time.Time) time.Time {
	if u == TrendMonth {
		return s.AddDate(0, 1, 0)
	}
	return s.AddDate(0, 0, 7)
}

// Label names a bucket: "2026-W44" (ISO week) or "2026-11".
func (u TrendUnit) Label(start time.Time) string {
	if u == TrendMonth {
		return start.Format("2006-01")
	}
	y, w := start.ISOWeek()
	return fmt.Sprintf("%d-W%02d", y, w)
}

// Quantile is the q-quantile of sorted data by definition 7 of Hyndman
// and Fan (Am. Stat. 50 (1996) 361), the linear interpolation between
// order statistics that R and NumPy use by default:
//
//	h = (n − 1)·q,  Q = x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋])
//
// NaN for no data.
func Quantile(sorted []float64, q float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := float64(n-1) * q
	lo := int(math.Floor(h))
	if lo >= n-1 {
		return sorted[n-1]
	}
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}
