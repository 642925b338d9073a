package demo

import (
	"crypto/sha256"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/data/transfer"
)

// genStoreBatch is the number of events per transaction when a season
// goes straight into a store.
const genStoreBatch = 20_000

// GenerateStore writes a generated season into a store, in time order,
// in transactions of genStoreBatch events, and marks it a demo store.
func GenerateStore(s *store.Store, o GenOptions) (GenSummary, error) {
	if err := o.defaults(); err != nil {
		return GenSummary{}, err
	}
	note := fmt.Sprintf("generated season: %d events, %d devices, seed %d, %d weeks to %s", o.Events, o.Devices, o.Seed, o.Weeks, o.End.Format("2006-01-02"))
	at := o.End.AddDate(0, 0, 2) // checked as on a day after the season
	var batch [][]byte
	flush := func() error {
		if len(batch) == 0 {
			return nil
		}
		_, err := s.WriteDemo(batch, at, note)
		batch = batch[:0]
		return err
	}
	sea := newSeason(o, func(_ int, raw []byte, _ record.Event) error {
		batch = append(batch, raw)
		if len(batch) == genStoreBatch {
			return flush()
		}
		return nil
	})
	if err := sea.run(); err != nil {
		return sea.sum, err
	}
	return sea.sum, flush()
}

// KeysDir is the folder, inside a generated bundle folder, that holds
// each device's public key (the file 'bale trust add' reads).
const KeysDir = "keys"

// GenerateBundles writes a generated season as the signed bundles its
// devices would send: each device exports when it holds o.PerBundle
// events, when four weeks passed since its last export, and at the end
// of the season. Files are named "<arrival>-<device>-<bundle>.bale", so
// that importing the folder takes them in the order they reached the
// lab. Each device's public key goes to dir/keys/<device>.pem. dir must
// not hold bundles already.
func GenerateBundles(dir string, o GenOptions) (GenSummary, error) {
	if err := o.defaults(); err != nil {
		return GenSummary{}, err
	}
	if m, _ := filepath.Glob(filepath.Join(dir, "*"+transfer.BundleExt)); len(m) > 0 {
		return GenSummary{}, fmt.Errorf("%s already holds bundles (%s, ...): choose an empty folder", dir, filepath.Base(m[0]))
	}
	if err := os.MkdirAll(filepath.Join(dir, KeysDir), 0o755); err != nil {
		return GenSummary{}, err
	}
	type outbox struct {
		key  *transfer.DeviceKey
		raws [][]byte
		seq  uint64
		prev [32]byte
		last time.Time // time of the last export (or of the first event)
		at   time.Time // time of the newest event held
	}
	devs := genDevices(o)
	boxes := make([]*outbox, len(devs))
	for i, d := range devs {
		k := d.Key()
		if err := os.WriteFile(filepath.Join(dir, KeysDir, d.Name+".pem"), k.PublicPEM(), 0o644); err != nil {
			return GenSummary{}, err
		}
		boxes[i] = &outbox{key: k}
	}
	var sum *GenSummary
	arrival := 0
	export := func(i int) error {
		b := boxes[i]
		if len(b.raws) == 0 {
			return nil
		}
		b.seq++
		arrival++
		stamp := b.at.Add(10 * time.Minute)
		h := transfer.BundleHeader{Device: devs[i].ID, Seq: b.seq, Prev: b.prev, WallMs: stamp.UnixMilli(), Part: 1, Parts: 1}
		raw, err := transfer.SealBundle(b.key, h, b.raws, nil) // a device's own events: SealBundle proves them
		if err != nil {
			return err
		}
		name := filepath.Join(dir, fmt.Sprintf("%06d-%s-%04d%s", arrival, devs[i].Name, b.seq, transfer.BundleExt))
		if err := os.WriteFile(name, raw, 0o644); err != nil {
			return err
		}
		b.prev = sha256.Sum256(raw)
		sum.Bundles++
		if len(raw) > sum.largestBundle {
			sum.largestBundle, sum.largestBundleEv = len(raw), len(b.raws)
		}
		b.raws, b.last = b.raws[:0], stamp
		return nil
	}
	sea := newSeason(o, nil)
	sum = &sea.sum
	sea.out = func(dev int, raw []byte, e record.Event) error {
		b := boxes[dev]
		at := time.UnixMilli(e.Clock.WallMs).UTC()
		if b.last.IsZero() {
			b.last = at
		}
		// Four weeks since the last export; the office sends its first
		// sites on the first day.
		due := at.Sub(b.last) > 28*24*time.Hour || (dev == 0 && b.seq == 0 && at.Sub(b.at) > 12*time.Hour)
		if len(b.raws) > 0 && due {
			if err := export(dev); err != nil {
				return err
			}
		}
		b.raws, b.at = append(b.raws, raw), at
		if len(b.raws) >= o.PerBundle {
			return export(dev)
		}
		return nil
	}
	err := sea.run()
	for i := range boxes {
		if err != nil {
			break
		}
		err = export(i)
	}
	if err == nil && sea.sum.Bundles == 0 {
		err = errors.New("no bundle was written")
	}
	return sea.sum, err
}

// LargestBundle is the size in bytes and events of the largest bundle
// written.
func (g GenSummary) LargestBundle() (bytes, events int) { return g.largestBundle, g.largestBundleEv }
