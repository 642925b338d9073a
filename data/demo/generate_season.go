package demo

import (
	"fmt"
	"math"
	"time"

	"baleassay/data/record"
)

// Rates of the generated season (illustrative, our own): shares of bales
// or pulls that get each kind of edit.
const (
	genBaleFix      = 0.03  // a tablet corrects a bale's weight
	genPullFix      = 0.02  // a tablet corrects a pull
	genPullTwice    = 0.005 // a pull typed twice, the copy deleted
	genConflictRate = 0.002 // the office and the tablet correct a bale at once
	genResolved     = 0.7   // conflicts the office resolves a week later
	genSiteEdit     = 0.05  // sites whose details the office edits in a season
	genLateSites    = 0.1   // sites that start delivering during the season
	genEventsABale  = 6.2   // a bale, five pulls on average, and the edits
)

// run makes the season: the office's morning work, each tablet's bales in
// turn, the office's evening corrections, day by day until about
// o.Events events are made.
func (s *season) run() error {
	o := s.o
	end := time.Date(o.End.Year(), o.End.Month(), o.End.Day(), 17, 0, 0, 0, time.UTC)
	start := end.AddDate(0, 0, -7*o.Weeks)
	s.sum.From, s.sum.To = start, end
	nSites := sitesFor(o)
	workdays := float64(5 * o.Weeks)
	// Bales a site delivers per working day, so the season ends near
	// o.Events; the last day takes up what chance left over.
	rate := math.Min(1, 1.05*float64(o.Events)/(genEventsABale*workdays*float64(nSites)))
	first := nSites - int(genLateSites*float64(nSites))
	office := start.Add(-16 * time.Hour) // the evening before the first day
	for i := 0; i < first && !s.done(); i++ {
		if err := s.addSite(office.Add(time.Duration(i) * 10 * time.Millisecond)); err != nil {
			return err
		}
	}
	tablets := o.Devices - 1
	for day := start.Truncate(24 * time.Hour); !s.done(); day = day.AddDate(0, 0, 1) {
		last := !day.Before(end.Truncate(24 * time.Hour))
		if wd := day.Weekday(); (wd == time.Saturday || wd == time.Sunday) && !last {
			continue
		}
		if err := s.morning(day, nSites, workdays); err != nil {
			return err
		}
		var evening []genBale
		for t := 1; t <= tablets && !s.done(); t++ {
			// The sites that deliver today, graded one after another
			// between 07:00 and 17:00: each bale gets an equal slot.
			var today []int
			for i := range s.sites {
				if s.sites[i].tab == t && (last || s.r.Float64() < rate) {
					today = append(today, i)
				}
			}
			if len(today) == 0 {
				continue
			}
			slot := 10 * time.Hour / time.Duration(len(today))
			for k, i := range today {
				if s.done() {
					break
				}
				b, err := s.bale(&s.sites[i], t, day.Add(7*time.Hour+time.Duration(k)*slot), slot)
				if err != nil {
					return err
				}
				if s.r.Float64() < genConflictRate {
					evening = append(evening, b)
				}
			}
		}
		for i, b := range evening {
			if err := s.conflict(b, day.Add(17*time.Hour+time.Duration(i)*time.Minute)); err != nil {
				return err
			}
		}
		if len(s.recent) > 4000 {
			s.recent = s.recent[len(s.recent)-2000:]
		}
	}
	return nil
}

// morning: the office adds the sites that start delivering, edits a few
// sites' details and resolves the conflicts that are a week old.
func (s *season) morning(day time.Time, nSites int, workdays float64) error {
	at := day.Add(7 * time.Hour)
	step := func() time.Time { at = at.Add(time.Duration(1+s.r.IntN(90)) * time.Second); return at }
	if len(s.sites) < nSites && s.r.Float64() < float64(nSites)*genLateSites/workdays*2 {
		if err := s.addSite(step()); err != nil {
			return err
		}
	}
	if len(s.sites) > 0 && s.r.Float64() < genSiteEdit*float64(len(s.sites))/workdays {
		site := &s.sites[s.r.IntN(len(s.sites))]
		rec := site.rec
		rec.Notes = fmt.Sprintf("gate hours changed (%s)", day.Format("2 Jan"))
		id, err := s.emit(genEvent{dev: 0, at: step(), ev: record.Event{Entity: site.id, Kind: record.KindSite, Supersedes: []record.EventID{site.head}, Site: &rec}})
		if err != nil {
			return err
		}
		site.head, site.rec = id, rec
		s.sum.Edits++
	}
	keep := s.pending[:0]
	for _, c := range s.pending {
		if c.resolve.After(day) {
			keep = append(keep, c)
			continue
		}
		if s.done() {
			continue
		}
		rec := c.rec
		if _, err := s.emit(genEvent{dev: 0, at: step(), ev: record.Event{Entity: c.bale, Kind: c.kind, Supersedes: c.heads, Bale: &rec}}); err != nil {
			return err
		}
		s.sum.Resolved++
	}
	s.pending = keep
	return nil
}

// Invented place-name parts; combinations are our own.
var (
	genFirst  = []string{"Ash", "Brack", "Calder", "Fell", "Holl", "Kettle", "Marrow", "Pell", "Sten", "Tansy", "Wester", "Rook", "Orrin", "Thorn", "Gild", "Wick"}
	genSecond = []string{"mere", "hope", "grove", "moor", "by", "water", "cross", "ford", "field", "stead", "combe", "holt"}
	genKinds  = []record.SiteKind{record.SiteYard, record.SiteYard, record.SiteMRF, record.SiteDepot, record.SiteSupplier}
	genWords  = map[record.SiteKind]string{record.SiteYard: "Yard", record.SiteMRF: "MRF", record.SiteDepot: "Depot", record.SiteSupplier: "Supply"}
)

func (s *season) addSite(at time.Time) error {
	n := len(s.sites)
	kind := genKinds[s.r.IntN(len(genKinds))]
	rec := record.SiteRecord{
		Name: fmt.Sprintf("%s%s %s %d", genFirst[s.r.IntN(len(genFirst))], genSecond[s.r.IntN(len(genSecond))], genWords[kind], n+1),
		Kind: kind,
		// An invented region around 47° N, 3° E, about 600 by 450 km.
		Lat: math.Round((47+4*(s.r.Float64()-0.5))*1e5) / 1e5,
		Lon: math.Round((3+8*(s.r.Float64()-0.5))*1e5) / 1e5,
	}
	site := genSite{id: s.newID(at), rec: rec, dirt: s.r.Float64(), tab: 1 + n%(s.o.Devices-1)}
	id, err := s.emit(genEvent{dev: 0, at: at, ev: record.Event{Entity: site.id, Kind: record.KindSite, Site: &rec}})
	if err != nil {
		return err
	}
	site.head = id
	s.sites = append(s.sites, site)
	s.sum.Sites++
	return nil
}

// bale: a tablet receives a bale at a site at the start of its slot of
// the working day, takes four to six pulls, and now and then corrects
// the bale or a pull, all within the slot.
func (s *season) bale(site *genSite, tab int, from time.Time, slot time.Duration) (genBale, error) {
	step := max(time.Millisecond, slot/16) // pulls and corrections, at most 15 steps
	rx := from.Add(time.Duration(s.r.Int64N(int64(step))))
	l, w, h := 1.22+0.03*s.r.NormFloat64(), 0.76+0.02*s.r.NormFloat64(), 1.52+0.04*s.r.NormFloat64()
	b := genBale{id: s.newID(rx), dev: tab, at: rx, rec: record.BaleRecord{
		Site: site.id, ReceivedMs: rx.UnixMilli(), GrossKg: round2(clamp(545+80*s.r.NormFloat64(), 300, 770)),
		LengthM: round2(l), WidthM: round2(w), HeightM: round2(h),
		Tag: fmt.Sprintf("G%d-%06d", tab, s.sum.Bales+1), Grader: fmt.Sprintf("grader %d", tab), Spec: "glycolysis feed"}}
	head, err := s.emit(genEvent{dev: tab, at: rx, ev: record.Event{Entity: b.id, Kind: record.KindBale, Bale: &b.rec}})
	if err != nil {
		return b, err
	}
	b.head = head
	s.sum.Bales++
	comp := demoComposition(s.r, site.dirt)
	at := rx
	for p, n := 0, 4+s.r.IntN(3); p < n && !s.done(); p++ {
		at = at.Add(step)
		pr := genPullOf(s, comp, site.dirt)
		pr.Bale, pr.Label, pr.TakenMs = b.id, fmt.Sprintf("P%d", p+1), at.UnixMilli()
		gp := genPull{id: s.newID(at), rec: pr}
		if gp.head, err = s.emit(genEvent{dev: tab, at: at, ev: record.Event{Entity: gp.id, Kind: record.KindPull, Pull: &gp.rec}}); err != nil {
			return b, err
		}
		s.sum.Pulls++
		if s.r.Float64() < genPullTwice && !s.done() {
			at = at.Add(step / 2)
			dup := genPull{id: s.newID(at), rec: pr}
			id, err := s.emit(genEvent{dev: tab, at: at, ev: record.Event{Entity: dup.id, Kind: record.KindPull, Pull: &dup.rec}})
			if err == nil && !s.done() {
				at = at.Add(step / 2)
				_, err = s.emit(genEvent{dev: tab, at: at, ev: record.Event{Entity: dup.id, Kind: record.KindPull, Deleted: true, Supersedes: []record.EventID{id}}})
				s.sum.Deletions++
			}
			if err != nil {
				return b, err
			}
		}
		b.pulls = append(b.pulls, gp)
	}
	for i := range b.pulls {
		if s.r.Float64() >= genPullFix || s.done() {
			continue
		}
		at = at.Add(step / 2)
		p := &b.pulls[i]
		rec := p.rec
		rec.Kg = make(map[string]float64, len(p.rec.Kg))
		for k, v := range p.rec.Kg {
			rec.Kg[k] = v
		}
		rec.Kg["pet_clear"] = round2(rec.Kg["pet_clear"] + 0.1)
		rec.StatedKg = round2(rec.StatedKg + 0.1)
		id, err := s.emit(genEvent{dev: tab, at: at, ev: record.Event{Entity: p.id, Kind: record.KindPull, Supersedes: []record.EventID{p.head}, Pull: &rec}})
		if err != nil {
			return b, err
		}
		p.head, p.rec = id, rec
		s.sum.Edits++
	}
	if s.r.Float64() < genBaleFix && !s.done() {
		at = at.Add(step)
		rec := b.rec
		rec.GrossKg = round2(rec.GrossKg + 5)
		id, err := s.emit(genEvent{dev: tab, at: at, ev: record.Event{Entity: b.id, Kind: record.KindBale, Supersedes: []record.EventID{b.head}, Bale: &rec}})
		if err != nil {
			return b, err
		}
		b.head, b.rec = id, rec
		s.sum.Edits++
	}
	b.at = at
	s.recent = append(s.recent, b)
	return b, nil
}

// conflict: the tablet and the office both correct the bale's weight,
// each superseding the value both saw; most are resolved a week later.
func (s *season) conflict(b genBale, at time.Time) error {
	if s.done() {
		return nil
	}
	mine := b.rec
	mine.GrossKg = round2(mine.GrossKg - 3)
	theirs := b.rec
	theirs.Notes = "weight checked again at the office"
	theirs.GrossKg = round2(theirs.GrossKg - 2)
	t1, err := s.emit(genEvent{dev: b.dev, at: at, ev: record.Event{Entity: b.id, Kind: record.KindBale, Supersedes: []record.EventID{b.head}, Bale: &mine}})
	if err != nil || s.done() {
		return err
	}
	t2, err := s.emit(genEvent{dev: 0, at: at.Add(time.Minute), ev: record.Event{Entity: b.id, Kind: record.KindBale, Supersedes: []record.EventID{b.head}, Bale: &theirs}})
	if err != nil {
		return err
	}
	s.sum.Conflicts++
	if s.r.Float64() < genResolved {
		s.pending = append(s.pending, genConflict{bale: b.id, kind: record.KindBale, heads: []record.EventID{t1, t2}, rec: theirs, resolve: at.AddDate(0, 0, 7)})
	}
	return nil
}

// genPullOf sorts one pull of 18–34 kg around the bale's composition;
// categories under 0.2 % of a pull are not weighed separately (as a
// grader lumps crumbs), so a pull names eight to fifteen categories.
func genPullOf(s *season, comp map[string]float64, dirt float64) record.PullRecord {
	mass := clamp(26+4*s.r.NormFloat64(), 18, 34)
	kg := make(map[string]float64, 16)
	var tot float64
	keys := record.SortedKeys(comp)
	w := make([]float64, len(keys))
	for i, k := range keys {
		w[i] = comp[k] * math.Exp(0.3*s.r.NormFloat64()-0.045)
		tot += w[i]
	}
	for i, k := range keys {
		if f := w[i] / tot; f >= 0.002 {
			kg[k] = round2(mass * f)
		}
	}
	p := record.PullRecord{Kg: kg}
	if s.r.Float64() < 0.04*dirt {
		kg["hazard"] = round2(0.05 + 0.4*s.r.Float64())
		p.Pieces = map[string]int64{"hazard": 1}
	}
	p.StatedKg = round2(p.PartsKg() + 0.02*s.r.Float64())
	return p
}
