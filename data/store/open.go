package store

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime/debug"
	"syscall"

	bolt "go.etcd.io/bbolt"
	berrors "go.etcd.io/bbolt/errors"
)

func openOnce(dir string, o Options) (*Store, error) {
	path := filepath.Join(dir, DBFile)
	_, statErr := os.Stat(path)
	exists := statErr == nil
	if o.ReadOnly && !exists {
		return nil, fmt.Errorf("%w: %s", ErrNoStore, dir)
	}
	if !exists {
		if err := os.MkdirAll(dir, 0o700); err != nil {
			return nil, fmt.Errorf("create store folder: %w", err)
		}
	}
	s := &Store{dir: dir, now: o.Now, hook: o.beforeCommit, noEntityCheck: o.noEntityCheck, noPathGuard: o.noPathGuard, timeout: o.Timeout, readFirst: o.ReadFirst && !o.ReadOnly, newDevice: o.Device}
	if err := s.attach(o.ReadOnly || (o.ReadFirst && exists)); err != nil {
		return nil, err
	}
	if o.NoSiteIndex {
		return s, nil
	}
	if err := s.loadSites(); err != nil {
		s.db.Close()
		return nil, err
	}
	return s, nil
}

// attach opens the bbolt file, for reading only or for writing, checks
// it and reads the store's identity and clock into s. For writing, the
// free-page list is checked before anything is written, and a new file
// gets its buckets.
func (s *Store) attach(readOnly bool) (err error) {
	path := filepath.Join(s.dir, DBFile)
	if st, err := os.Stat(path); err == nil && st.Size() > 0 {
		if err := checkHeaderCopies(path); err != nil {
			return err
		}
		if readOnly {
			if err := checkNoLoops(path); err != nil {
				return err
			}
		}
	}
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer recoverDamage(&err)
	db, err := bolt.Open(path, 0o600, &bolt.Options{Timeout: s.timeout, FreelistType: bolt.FreelistMapType, ReadOnly: readOnly, InitialMmapSize: initialMmap})
	if err != nil {
		switch {
		case errors.Is(err, berrors.ErrTimeout):
			return &StoreInUseError{Path: s.dir}
		case errors.Is(err, berrors.ErrInvalid), errors.Is(err, berrors.ErrChecksum), errors.Is(err, berrors.ErrVersionMismatch):
			return damagef("bbolt refused the file: %v", err)
		case !readOnly && (errors.Is(err, syscall.EROFS) || errors.Is(err, os.ErrPermission)):
			return fmt.Errorf("the store at %s cannot be written (read-only media or no permission): %w", s.dir, err)
		}
		return fmt.Errorf("open store %s: %w", s.dir, err)
	}
	defer func() {
		if err != nil {
			db.Close()
		}
	}()
	if !readOnly {
		// Before any write: a damaged free-page list would hand live
		// pages to the first commit.
		if err := checkFreelist(path); err != nil {
			return err
		}
	}
	var layout int
	if err := db.View(func(tx *bolt.Tx) error { layout = layoutOf(tx); return nil }); err != nil {
		return err
	}
	switch {
	case layout == 1:
		return errNeedsUpgrade
	case layout == 0 && readOnly:
		return fmt.Errorf("%w: %s holds an empty file", ErrNoStore, s.dir)
	case layout == 0:
		if err := updateGuarded(db, false, func(w wtx) error { return initStore(w, s.now(), s.newDevice) }); err != nil {
			return fmt.Errorf("make store %s: %w", s.dir, err)
		}
	}
	var dev record.DeviceID
	var last record.HLC
	var demo bool
	err = db.View(func(tx *bolt.Tx) error {
		c, err := verifyMeta(tx)
		if err != nil {
			return err
		}
		m := tx.Bucket(bMeta)
		d, ok, err := metaGet(m, metaDevice)
		if err != nil || !ok || len(d) != len(dev) {
			return damagef("the store's device id is missing or damaged")
		}
		copy(dev[:], d)
		clock, _, err := metaGet(m, metaClock)
		if err != nil {
			return err
		}
		last = record.HLCFromBytes(clock)
		v, _, err := metaGet(m, metaDemo)
		if err != nil {
			return err
		}
		demo = len(v) > 0
		return checkLogEnd(tx, c)
	})
	if err != nil {
		if errors.Is(err, ErrDamaged) {
			return err
		}
		return fmt.Errorf("prepare store %s: %w", s.dir, err)
	}
	if s.clock != nil && dev != s.device {
		return damagef("the store's device id changed while it was open")
	}
	s.device = dev
	if s.clock == nil {
		s.clock = record.NewClock(s.now, last)
	} else {
		s.clock.Observe(last)
	}
	s.demo.Store(demo)
	s.db, s.readOnly = db, readOnly
	return nil
}

// reopenWritable reopens a store opened with ReadFirst for writing, at
// its first write. The caller holds wmu. Another process may have
// written meanwhile: the identity is checked again, the clock takes in
// the stored one and the site index is loaded afresh. If the file cannot
// be opened for writing, the store goes back to reading.
func (s *Store) reopenWritable() error {
	s.dbmu.Lock()
	defer s.dbmu.Unlock()
	if err := s.db.Close(); err != nil {
		return err
	}
	err := s.attach(false)
	if err == nil {
		if s.sites == nil {
			return nil
		}
		var sites []geo.IndexedSite
		if sites, err = s.siteCacheLocked(); err == nil {
			s.sites = geo.NewSiteIndex(sites)
			return nil
		}
	}
	if back := s.attach(true); back != nil {
		s.failed = fmt.Errorf("the store could not be opened again after %v: %w", err, back)
	}
	return err
}
