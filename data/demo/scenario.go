package demo

import (
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
)

// The demo scenario: an invented region (the "Vale of Orrin") with twelve
// invented yards, depots and suppliers, several weeks of bales and pulls,
// clean and dirty sites, two devices (a yard tablet and a lab laptop),
// one concurrent edit left as a conflict and one duplicate bale deleted.
// Every name is made up; any likeness to a real business is chance.

// DemoOptions tune the scenario.
type DemoOptions struct {
	End   time.Time // last day of the scenario (default: today, UTC; never after the clock)
	Weeks int       // default 6
	Seed  uint64    // default 1
	// Device gives the invented devices' ids by name ("yard tablet",
	// "lab laptop"); nil derives them from the name and the seed. The
	// desk passes ids of invented signing keys, so that the demo's
	// records carry their authors' proofs like any others.
	Device func(name string) record.DeviceID
}

// DemoSummary says what WriteDemo made.
type DemoSummary struct {
	Sites, Bales, Pulls, Events int
	Measured                    int // measured batches (the lab's, of the demo plant)
	ConflictSite                record.EntityID
	DeletedBale                 record.EntityID
	YardDevice, LabDevice       record.DeviceID
	From, To                    time.Time
}

type demoSite struct {
	name  string
	kind  record.SiteKind
	lat   float64
	lon   float64
	dirt  float64 // 0 clean … 1 dirty
	notes string
}

// The region lies around 45.0° N, 4.7° E; names are invented.
var demoSites = []demoSite{
	{"Orrin Bridge Yard", record.SiteYard, 45.112, 4.688, 0.15, "weighbridge closes 16:00"},
	{"Calder Mere MRF", record.SiteMRF, 45.021, 4.552, 0.55, "single-stream line; ask for the shift lead"},
	{"Stenhope Depot", record.SiteDepot, 44.958, 4.803, 0.05, "deposit-return counting centre"},
	{"Ashgrove Reclaim", record.SiteYard, 45.204, 4.911, 0.35, ""},
	{"Fellmoor Trading", record.SiteSupplier, 44.887, 4.640, 0.70, "trader; bales from several towns"},
	{"Kettleby Yard", record.SiteYard, 45.067, 4.402, 0.25, "gate code at the office"},
	{"Marrow Lane Depot", record.SiteDepot, 44.995, 4.962, 0.10, ""},
	{"Westerly Sorting", record.SiteMRF, 45.158, 4.497, 0.80, "mixed plastics line, frequent film"},
	{"Holloway Mill Yard", record.SiteYard, 44.842, 4.851, 0.45, ""},
	{"Brackwater MRF", record.SiteMRF, 45.243, 4.726, 0.60, "bales stored outdoors: watch moisture"},
	{"Tansy Cross Yard", record.SiteYard, 44.921, 4.495, 0.20, ""},
	{"Pellam Supply", record.SiteSupplier, 45.089, 5.041, 0.90, "new supplier, audit every bale"},
}

// demoBase is a clean bale's composition by category (mass fractions).
// Illustrative values of our own, not measurements.
var demoBase = map[string]float64{
	"pet_clear": 0.66, "pet_tinted": 0.07, "pet_green": 0.05, "pet_amber": 0.01, "pet_colour_other": 0.01,
	"pet_opaque": 0.02, "pet_thermoform": 0.05,
	"hdpe": 0.012, "pvc": 0.002, "ldpe": 0.004, "pp": 0.008, "ps": 0.002, "pla": 0.001, "other_resin": 0.003,
	"closures": 0.03, "labels": 0.015, "film": 0.006,
	"paper": 0.008, "aluminium": 0.003, "steel": 0.001, "glass": 0.003,
	"liquid": 0.01, "fines": 0.008,
}

// WriteDemo fills a store with the demo scenario in one transaction and
// marks the store as a demo store.
func WriteDemo(s *store.Store, o DemoOptions) (DemoSummary, error) {
	if o.End.IsZero() {
		o.End = time.Now().UTC()
	}
	if o.Weeks <= 0 {
		o.Weeks = 6
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	// The scenario ends at 17:00 UTC of the given day, or of the day
	// before when that is still ahead of the clock: no demo record is
	// stamped in the future.
	end := time.Date(o.End.Year(), o.End.Month(), o.End.Day(), 17, 0, 0, 0, time.UTC)
	for end.After(time.Now()) {
		end = end.AddDate(0, 0, -1)
	}
	start := end.AddDate(0, 0, -7*o.Weeks)
	var seed [32]byte
	binary.LittleEndian.PutUint64(seed[:], o.Seed)
	idr := rand.NewChaCha8(seed)
	r := rand.New(rand.NewPCG(o.Seed, 0xba1e))
	device := o.Device
	if device == nil {
		device = func(name string) record.DeviceID { return demoDevice(name, o.Seed) }
	}
	yard, lab := device("yard tablet"), device("lab laptop")
	sum := DemoSummary{YardDevice: yard, LabDevice: lab, From: start, To: end}

	var raws [][]byte
	add := func(e record.Event) (record.EventID, error) {
		e.Version = record.FormatVersion
		e.Demo = true
		raw, err := record.EncodeEvent(e)
		if err != nil {
			return record.EventID{}, err
		}
		raws = append(raws, raw)
		return record.IDOf(raw), nil
	}
	newID := func(t time.Time) record.EntityID {
		id, _ := record.EntityIDAt(t.UnixMilli(), idr)
		return id
	}
	ms := func(t time.Time) record.HLC { return record.HLC{WallMs: t.UnixMilli()} }

	siteIDs := make([]record.EntityID, len(demoSites))
	siteHeads := make([]record.EventID, len(demoSites))
	for i, d := range demoSites {
		t := start.Add(-time.Duration(len(demoSites)-i) * time.Hour)
		siteIDs[i] = newID(t)
		h, err := add(record.Event{Entity: siteIDs[i], Kind: record.KindSite, Device: lab, Clock: ms(t),
			Site: &record.SiteRecord{Name: d.name, Kind: d.kind, Lat: d.lat, Lon: d.lon, Notes: d.notes}})
		if err != nil {
			return sum, err
		}
		siteHeads[i] = h
		sum.Sites++
	}
	var truths []baleTruth
	graders := []string{"A. Okafor", "M. Lindqvist", "R. Duarte"}
	tag := 4100
	for day := start; day.Before(end); day = day.AddDate(0, 0, 1) {
		if wd := day.Weekday(); wd == time.Saturday || wd == time.Sunday {
			continue
		}
		for si, d := range demoSites {
			// About 2.5 bales a week per site, fewer from the small depots.
			if r.Float64() > 0.5-0.15*float64(si%3)/2 {
				continue
			}
			rx := day.Add(time.Duration(7*60+r.IntN(9*60)) * time.Minute)
			bale := newID(rx)
			tag++
			gross := clamp(545+80*r.NormFloat64(), 300, 770) // typical PET bale 295–770 kg (650–1,700 lb), about 545 kg: from memory of published state container-recycling bale figures
			l, w, h := 1.22+0.03*r.NormFloat64(), 0.76+0.02*r.NormFloat64(), 1.52+0.04*r.NormFloat64()
			if _, err := add(record.Event{Entity: bale, Kind: record.KindBale, Device: yard, Clock: ms(rx), Bale: &record.BaleRecord{
				Site: siteIDs[si], ReceivedMs: rx.UnixMilli(), GrossKg: round2(gross),
				LengthM: round2(l), WidthM: round2(w), HeightM: round2(h),
				Tag: fmt.Sprintf("VO-%05d", tag), Grader: graders[r.IntN(len(graders))], Spec: "glycol-feed"}}); err != nil {
				return sum, err
			}
			sum.Bales++
			comp := demoComposition(r, d.dirt)
			truths = append(truths, baleTruth{id: bale, site: si, rx: rx, kg: round2(gross), share: comp})
			for p, n := 0, 4+r.IntN(3); p < n; p++ {
				at := rx.Add(time.Duration(20+10*p) * time.Minute)
				pull := demoPull(r, comp, d.dirt)
				pull.Bale, pull.Label, pull.TakenMs = bale, fmt.Sprintf("P%d", p+1), at.UnixMilli()
				if _, err := add(record.Event{Entity: newID(at), Kind: record.KindPull, Device: yard, Clock: ms(at), Pull: &pull}); err != nil {
					return sum, err
				}
				sum.Pulls++
			}
		}
	}
	// One bale typed twice on the tablet, the copy deleted (a tombstone).
	dup := end.Add(-26 * time.Hour)
	sum.DeletedBale = newID(dup)
	dupHead, err := add(record.Event{Entity: sum.DeletedBale, Kind: record.KindBale, Device: yard, Clock: ms(dup), Bale: &record.BaleRecord{
		Site: siteIDs[0], ReceivedMs: dup.UnixMilli(), GrossKg: 512, Tag: fmt.Sprintf("VO-%05d", tag), Grader: graders[0]}})
	if err != nil {
		return sum, err
	}
	if _, err := add(record.Event{Entity: sum.DeletedBale, Kind: record.KindBale, Device: yard, Clock: ms(dup.Add(5 * time.Minute)),
		Deleted: true, Supersedes: []record.EventID{dupHead}}); err != nil {
		return sum, err
	}
	// The conflict: while offline, the tablet and the lab both edit the
	// same site, each superseding the original.
	c := 2
	sum.ConflictSite = siteIDs[c]
	d := demoSites[c]
	t1, t2 := end.Add(-50*time.Hour), end.Add(-49*time.Hour)
	if _, err := add(record.Event{Entity: siteIDs[c], Kind: record.KindSite, Device: yard, Clock: ms(t1), Supersedes: []record.EventID{siteHeads[c]},
		Site: &record.SiteRecord{Name: d.name, Kind: d.kind, Lat: d.lat, Lon: d.lon, Notes: "gate moved to the north side, call ahead"}}); err != nil {
		return sum, err
	}
	if _, err := add(record.Event{Entity: siteIDs[c], Kind: record.KindSite, Device: lab, Clock: ms(t2), Supersedes: []record.EventID{siteHeads[c]},
		Site: &record.SiteRecord{Name: d.name + " (north gate)", Kind: d.kind, Lat: math.Round((d.lat+0.004)*1e5) / 1e5, Lon: d.lon, Notes: d.notes}}); err != nil {
		return sum, err
	}
	if sum.Measured, err = demoMeasured(o.Seed, truths, end, lab, add, newID); err != nil {
		return sum, err
	}
	note := fmt.Sprintf("seed %d, %d weeks to %s", o.Seed, o.Weeks, end.Format("2006-01-02"))
	res, err := s.WriteDemo(raws, end.Add(time.Hour), note)
	sum.Events = res.New
	return sum, err
}

func demoDevice(name string, seed uint64) record.DeviceID {
	h := sha256.Sum256([]byte(fmt.Sprintf("baleassay demo %s %d", name, seed)))
	var d record.DeviceID
	copy(d[:], h[:])
	return d
}

// demoComposition draws one bale's composition around the clean base:
// contaminants scaled up by the site's dirt, then a bale-to-bale
// log-normal spread, normalised to 1.
func demoComposition(r *rand.Rand, dirt float64) map[string]float64 {
	out := make(map[string]float64, len(demoBase))
	var tot float64
	for _, k := range record.SortedKeys(demoBase) {
		f := demoBase[k]
		c, _ := assess.LookupCategory(k)
		if c.Group != assess.GroupPET {
			f *= 0.4 + 3.2*dirt
		}
		f *= math.Exp(0.35*r.NormFloat64() - 0.35*0.35/2)
		out[k] = f
		tot += f
	}
	for k := range out {
		out[k] /= tot
	}
	return out
}

// demoPull sorts one pull of 18–34 kg around the bale composition, with
// pull-to-pull spread, weighed to 0.01 kg; dirty sites now and then give
// a hazard (a battery or an oil bottle).
func demoPull(r *rand.Rand, comp map[string]float64, dirt float64) record.PullRecord {
	mass := clamp(26+4*r.NormFloat64(), 18, 34)
	kg := make(map[string]float64, len(comp)+1)
	var tot float64
	w := make(map[string]float64, len(comp))
	for _, k := range record.SortedKeys(comp) {
		w[k] = comp[k] * math.Exp(0.3*r.NormFloat64()-0.045)
		tot += w[k]
	}
	for _, k := range record.SortedKeys(w) {
		if m := round2(mass * w[k] / tot); m > 0 {
			kg[k] = m
		}
	}
	p := record.PullRecord{Kg: kg}
	if r.Float64() < 0.04*dirt {
		kg["hazard"] = round2(0.05 + 0.4*r.Float64())
		p.Pieces = map[string]int64{"hazard": 1}
	}
	p.StatedKg = round2(p.PartsKg() + 0.02*r.Float64())
	return p
}

func clamp(x, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, x)) }
func round2(x float64) float64        { return math.Round(x*100) / 100 }
