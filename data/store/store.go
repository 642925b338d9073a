package store

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"errors"
	"fmt"
	"runtime/debug"
	"sync"
	"sync/atomic"
	"time"

	bolt "go.etcd.io/bbolt"
)

// DBFile is the name of the bbolt file inside a store directory.
const DBFile = "records.db"

// OpenTimeout is how long Open waits for another process to release the
// store before it gives up with ErrStoreInUse.
const OpenTimeout = 300 * time.Millisecond

// Options tune Open. The zero value is the normal setting.
type Options struct {
	// Now is the wall clock (time.Now when nil); tests may fix it.
	Now func() time.Time
	// Timeout overrides OpenTimeout when positive.
	Timeout time.Duration
	// Device is the device id a new store takes (the transfer layer
	// derives it from the device's signing key); zero means random. An
	// existing store keeps the id it has.
	Device record.DeviceID
	// ReadOnly opens an existing store for reading only: the file is
	// opened read-only (a store on read-only media can be read), other
	// readers may have it open at the same time, and every write fails
	// with ErrReadOnly.
	ReadOnly bool
	// ReadFirst opens an existing store as ReadOnly does, and reopens the
	// file for writing (taking the write lock then) at the first write;
	// a store not made yet is made and opened for writing. Front ends
	// use it, so reading commands never need the write lock or writable
	// media.
	ReadFirst bool
	// NoSiteIndex skips loading the site index (check, rescue, bulk
	// imports that do not need it); SiteIndex then returns an empty index
	// that writes do not maintain.
	NoSiteIndex bool

	// beforeCommit, when set (tests only), runs at the end of every write
	// transaction; an error from it is treated as a failed write.
	beforeCommit func() error
	// noEntityCheck (benchmarks only) skips the check of every touched
	// entity before a commit, to measure what it costs.
	noEntityCheck bool
	// noPathGuard (benchmarks only) writes without checking the pages a
	// write changes (guard.go), to measure what the check costs.
	noPathGuard bool
}

// Store is an open records store: one bbolt file in a directory. Its
// methods are safe for concurrent use within one process; only one process
// may have the store open for writing.
type Store struct {
	dir           string
	db            *bolt.DB     // replaced only under wmu and dbmu (reopenWritable)
	dbmu          sync.RWMutex // readers of db hold it shared
	readOnly      bool
	readFirst     bool
	timeout       time.Duration
	device        record.DeviceID
	clock         *record.Clock
	now           func() time.Time
	hook          func() error
	noEntityCheck bool            // Options.noEntityCheck
	noPathGuard   bool            // Options.noPathGuard
	newDevice     record.DeviceID // Options.Device: the id a new store takes

	wmu    sync.Mutex // serialises writes; guards failed and closed
	failed error
	closed bool

	sites *geo.SiteIndex // nil when opened with NoSiteIndex
	demo  atomic.Bool    // made by the demo scenario: saves are marked as demo records
}

// WriteError reports that a write transaction failed on the disk side. The
// store refuses every later write; nothing of the failed save is kept.
type WriteError struct{ Err error }

func (e *WriteError) Error() string {
	return "store write failed, nothing of this save was kept and the store accepts no more writes until reopened: " + e.Err.Error()
}
func (e *WriteError) Unwrap() []error { return []error{ErrStoreFailed, e.Err} }

// Open opens (creating if needed) the store in dir with default options.
func Open(dir string) (*Store, error) { return OpenWith(dir, Options{}) }

// OpenReadOnly opens the existing store in dir for reading only.
func OpenReadOnly(dir string) (*Store, error) { return OpenWith(dir, Options{ReadOnly: true}) }

// OpenWith opens the store in dir. A new store gets a random device id; a
// store of the previous layout is upgraded first (see upgrade.go). When
// another process holds the store, it fails after the timeout with a
// *StoreInUseError (errors.Is(err, ErrStoreInUse)). A file that does not
// hold together gives a *DamagedError.
func OpenWith(dir string, o Options) (s *Store, err error) {
	if o.Now == nil {
		o.Now = time.Now
	}
	if o.Timeout <= 0 {
		o.Timeout = OpenTimeout
	}
	defer func() {
		var de *DamagedError
		if errors.As(err, &de) && de.Dir == "" {
			de.Dir = dir
		}
	}()
	s, err = openOnce(dir, o)
	if errors.Is(err, errNeedsUpgrade) {
		if err = upgrade(dir, o); err != nil {
			return nil, err
		}
		s, err = openOnce(dir, o)
	}
	return s, err
}

var errNeedsUpgrade = errors.New("store of the previous layout")

// layoutOf tells the layout of an open file: 0 for an empty file, 1 for
// the first layout (bucket "events"), 2 for this one.
func layoutOf(tx *bolt.Tx) int {
	switch {
	case tx.Bucket(bMeta) != nil && tx.Bucket(bLog) != nil:
		return layoutVersion
	case tx.Bucket([]byte("events")) != nil:
		return 1 // a replaced file marked "upgraded" is reopened by upgrade
	}
	empty := true
	_ = tx.ForEach(func([]byte, *bolt.Bucket) error { empty = false; return nil })
	if empty {
		return 0
	}
	return layoutVersion // buckets are checked one by one by verifyMeta and the reads
}

// initStore makes the buckets and the first meta of a new store, with
// device id dev (a random one when zero).
func initStore(w wtx, now time.Time, dev record.DeviceID) error {
	for _, name := range allBuckets {
		if _, err := w.CreateBucket(name); err != nil {
			return err
		}
	}
	b := w.Bucket(bLog)
	b.FillPercent = logFill
	if dev == (record.DeviceID{}) {
		var err error
		if dev, err = record.NewDeviceID(); err != nil {
			return err
		}
	}
	var c counts
	m := w.bucket(bMeta)
	for _, kv := range []struct{ k, v string }{
		{metaDevice, string(dev[:])},
		{metaCreated, now.UTC().Format(time.RFC3339)},
		{metaLayout, fmt.Sprint(layoutVersion)},
	} {
		if err := metaPut(m, &c, kv.k, []byte(kv.v)); err != nil {
			return err
		}
	}
	return putCounts(w, c)
}

// recoverDamage turns a panic inside bbolt or the store (a page that does
// not parse, a fault reading the mapped file) into a *DamagedError, so no
// panic reaches the user. bbolt rolls back the transaction on the way
// out, so nothing is written. Use it deferred, beside
// debug.SetPanicOnFault(true).
func recoverDamage(err *error) {
	if r := recover(); r != nil {
		*err = damagef("reading the file failed: %v", r)
	}
}

// Close releases the store. Later calls fail with ErrClosed.
func (s *Store) Close() (err error) {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if s.closed {
		return nil
	}
	s.closed = true
	s.dbmu.Lock()
	defer s.dbmu.Unlock()
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer recoverDamage(&err)
	return s.db.Close()
}

// Dir is the store's folder.
func (s *Store) Dir() string { return s.dir }

// ReadOnly reports whether the store was opened for reading only.
func (s *Store) ReadOnly() bool { return s.readOnly }

// DeviceID is the id of this store's device, the author of its saves.
func (s *Store) DeviceID() record.DeviceID { return s.device }

// Clock is the store's hybrid logical clock.
func (s *Store) Clock() *record.Clock { return s.clock }

// SiteIndex is the spatial index of the visible sites, kept current by every
// write.
func (s *Store) SiteIndex() *geo.SiteIndex {
	if s.sites == nil {
		return geo.NewSiteIndex(nil) // opened with NoSiteIndex
	}
	return s.sites
}

// view runs fn in a read transaction behind the store boundary: a panic
// becomes a *DamagedError naming this store.
func (s *Store) view(fn func(tx *bolt.Tx) error) (err error) {
	s.wmu.Lock()
	closed := s.closed
	s.wmu.Unlock()
	if closed {
		return ErrClosed
	}
	s.dbmu.RLock()
	defer s.dbmu.RUnlock()
	defer s.nameDamage(&err)
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer recoverDamage(&err)
	return s.db.View(fn)
}

// nameDamage puts the store's folder into a *DamagedError.
func (s *Store) nameDamage(err *error) {
	var de *DamagedError
	if errors.As(*err, &de) && de.Dir == "" {
		de.Dir = s.dir
	}
}

// IsDemo reports whether the store was made by the demo scenario.
func (s *Store) IsDemo() (bool, error) {
	v, err := s.Meta(metaDemo)
	return len(v) > 0, err
}
