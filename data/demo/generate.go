package demo

import (
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// A generated season: an invented region of pickup sites graded by
// several devices over a year, at any size, for measuring the store and
// the lab's merge (DEVELOPERS.md, "The lab's merge at scale"). One
// device is the office (it creates and edits sites, corrects bales and
// resolves conflicts); the others are grading tablets, each serving a
// share of the sites. A bale is received, weighed and sampled (four to
// six pulls); now and then a tablet corrects a bale's weight or a pull,
// deletes a pull typed twice, or the office corrects a bale that the
// tablet corrects at the same time (a conflict, most of them resolved a
// week later). Every name is made up; any likeness to a real business is
// chance. Every event is marked as a demo record (a store of real records
// takes them only when told to). The same options give the same events,
// byte for byte.

// GenOptions choose a generated season.
type GenOptions struct {
	Events    int       // about this many events
	Devices   int       // the office and Devices-1 tablets (default 6, at least 2)
	Seed      uint64    // default 1
	End       time.Time // last day of the season (default GenDefaultEnd)
	Weeks     int       // length of the season (default 52)
	PerBundle int       // a device exports when it holds this many events (default 5000)
}

// GenDefaultEnd is the default last day of a generated season: a fixed
// day in the past, so that a seed always gives the same events.
var GenDefaultEnd = time.Date(2025, 11, 28, 0, 0, 0, 0, time.UTC)

func (o *GenOptions) defaults() error {
	if o.Events < 1 {
		return fmt.Errorf("a generated season needs at least 1 event, not %d", o.Events)
	}
	if o.Devices == 0 {
		o.Devices = 6
	}
	if o.Devices < 2 || o.Devices > 1000 {
		return fmt.Errorf("a generated season has 2 to 1000 devices (the office and the tablets), not %d", o.Devices)
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	if o.End.IsZero() {
		o.End = GenDefaultEnd
	}
	if o.Weeks == 0 {
		o.Weeks = 52
	}
	if o.Weeks < 1 || o.Weeks > 520 {
		return fmt.Errorf("a generated season lasts 1 to 520 weeks, not %d", o.Weeks)
	}
	if o.PerBundle == 0 {
		o.PerBundle = 5000
	}
	if o.PerBundle < 1 {
		return fmt.Errorf("events per bundle must be positive, not %d", o.PerBundle)
	}
	return nil
}

// GenSummary says what a generated season holds.
type GenSummary struct {
	Events, Sites, Bales, Pulls    int
	Edits, Deletions, Conflicts    int // corrections, tombstones, concurrent edits made
	Resolved                       int // conflicts resolved by the office
	Bundles                        int // bundle files written (GenerateBundles)
	Devices                        []GenDevice
	From, To                       time.Time
	FirstClockMs, LastClockMs      int64
	largestBundle, largestBundleEv int
}

// GenDevice is one device of a generated season.
type GenDevice struct {
	Name string // "office", "tablet-01", ...
	ID   record.DeviceID
	seed [32]byte // of its signing key
}

// genDevices names the season's devices and derives each one's signing
// key from the season's seed and its id from the key, as every device's
// id is (transfer.DeviceIDOf).
func genDevices(o GenOptions) []GenDevice {
	out := make([]GenDevice, o.Devices)
	for i := range out {
		name := "office"
		if i > 0 {
			name = fmt.Sprintf("tablet-%02d", i)
		}
		out[i] = GenDevice{Name: name, seed: sha256.Sum256(fmt.Appendf(nil, "baleassay generated season %d key %s", o.Seed, name))}
		out[i].ID = out[i].Key().DeviceID()
	}
	return out
}

// Key is the device's signing key.
func (d GenDevice) Key() *transfer.DeviceKey {
	k, err := transfer.NewDeviceKeyFromSeed(d.seed[:])
	if err != nil {
		panic(err) // a 32-byte seed always makes a key
	}
	return k
}

// genEvent is one event of the season with its author and time.
type genEvent struct {
	dev int
	at  time.Time
	ev  record.Event
}

// sink receives the season's events one day at a time, in time order,
// each already encoded, with the device that made it.
type sink func(dev int, raw []byte, e record.Event) error

// season drives the scenario.
type season struct {
	o       GenOptions
	r       *rand.Rand
	idr     *rand.ChaCha8
	devs    []GenDevice
	clocks  []record.HLC // last stamp per device
	sum     GenSummary
	sites   []genSite
	recent  []genBale // bales of the last days, for corrections
	pending []genConflict
	out     sink
	made    int
}

type genSite struct {
	id   record.EntityID
	head record.EventID
	rec  record.SiteRecord
	dirt float64
	tab  int // the tablet that grades its bales
}

type genBale struct {
	id    record.EntityID
	head  record.EventID
	rec   record.BaleRecord
	dev   int
	at    time.Time
	pulls []genPull
}

type genPull struct {
	id   record.EntityID
	head record.EventID
	rec  record.PullRecord
}

type genConflict struct {
	bale    record.EntityID
	kind    record.Kind
	heads   []record.EventID
	rec     record.BaleRecord
	resolve time.Time
}

// sitesFor is the number of sites of a season of n events: about 2.5
// bales a week per site over the season, six events a bale.
func sitesFor(o GenOptions) int {
	perSite := 2.5 * float64(o.Weeks) * 6
	return max(12, int(math.Round(float64(o.Events)/perSite)))
}

func newSeason(o GenOptions, out sink) *season {
	var seed [32]byte
	binary.LittleEndian.PutUint64(seed[:], o.Seed)
	seed[31] = 0x5e
	s := &season{o: o, r: rand.New(rand.NewPCG(o.Seed, 0x5ea50)), idr: rand.NewChaCha8(seed), devs: genDevices(o), out: out}
	s.clocks = make([]record.HLC, len(s.devs))
	s.sum.Devices = s.devs
	return s
}

// emit stamps an event for its device (hybrid logical clock: the wall
// time, or one more in the counter when the device already stamped that
// millisecond), encodes it and hands it to the sink.
func (s *season) emit(g genEvent) (record.EventID, error) {
	c := &s.clocks[g.dev]
	ms := g.at.UnixMilli()
	if ms > c.WallMs {
		*c = record.HLC{WallMs: ms}
	} else {
		c.Logical++
	}
	g.ev.Version, g.ev.Device, g.ev.Clock, g.ev.Demo = record.FormatVersion, s.devs[g.dev].ID, *c, true
	raw, err := record.EncodeEvent(g.ev)
	if err != nil {
		return record.EventID{}, err
	}
	if s.sum.FirstClockMs == 0 {
		s.sum.FirstClockMs = c.WallMs
	}
	s.sum.LastClockMs = max(s.sum.LastClockMs, c.WallMs)
	s.made++
	s.sum.Events++
	return record.IDOf(raw), s.out(g.dev, raw, g.ev)
}

func (s *season) newID(t time.Time) record.EntityID {
	id, _ := record.EntityIDAt(t.UnixMilli(), s.idr)
	return id
}

func (s *season) done() bool { return s.made >= s.o.Events }
