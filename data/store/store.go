package store

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"sync/atomic"
	"time"

	bolt "go.etcd.io/bbolt"
	berrors "go.etcd.io/bbolt/errors"
)

// DBFile is the name of the bbolt file inside a store directory.
const DBFile = "records.db"

// OpenTimeout is how long Open waits for another process to release the
// store before it gives up with ErrStoreInUse.
const OpenTimeout = 300 * time.Millisecond

// Bucket names. The layout is described in DEVELOPERS.md.
var (
	bEvents    = []byte("events")   // event id → deterministic CBOR bytes
	bSeq       = []byte("seq")      // local insertion number (uint64 BE) → event id
	bEntity    = []byte("entity")   // entity id → kind (1 byte)
	bByEntity  = []byte("byentity") // entity id ‖ event id → empty
	bHeads     = []byte("heads")    // entity id ‖ event id → empty, for events nobody supersedes
	bSupBy     = []byte("supby")    // entity id ‖ superseded id ‖ superseding id → empty
	bMeta      = []byte("meta")     // key → value (device id, clock, "xfer/..." keys)
	bDrafts    = []byte("drafts")   // draft name → CBOR of a PullRecord
	bSites     = []byte("sites")    // site entity id → shown lat, lon, name (for the index at open)
	allBuckets = [][]byte{bEvents, bSeq, bEntity, bByEntity, bHeads, bSupBy, bMeta, bDrafts, bSites}
)

// Meta keys owned by the store itself.
const (
	metaDevice  = "device"
	metaClock   = "clock"
	metaCreated = "created"
	metaDemo    = "demo"
	metaSites   = "sitecache" // set once the sites bucket is complete
	// MetaTransferPrefix is the prefix of meta keys that ApplyRaw may write.
	MetaTransferPrefix = "xfer/"
)

// Options tune Open. The zero value is the normal setting.
type Options struct {
	// Now is the wall clock (time.Now when nil); tests may fix it.
	Now func() time.Time
	// Timeout overrides OpenTimeout when positive.
	Timeout time.Duration

	// beforeCommit, when set (tests only), runs at the end of every write
	// transaction; an error from it is treated as a failed write.
	beforeCommit func() error
}

// Store is an open records store: one bbolt file in a directory. Its
// methods are safe for concurrent use within one process; only one process
// may have the store open.
type Store struct {
	dir    string
	db     *bolt.DB
	device record.DeviceID
	clock  *record.Clock
	now    func() time.Time
	hook   func() error

	wmu    sync.Mutex // serialises writes; guards failed and closed
	failed error
	closed bool

	sites *geo.SiteIndex
	demo  atomic.Bool // made by the demo scenario: saves are marked as demo records
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

// OpenWith opens the store in dir. A new store gets a random device id.
// When another process holds the store, it fails after the timeout with a
// *StoreInUseError (errors.Is(err, ErrStoreInUse)).
func OpenWith(dir string, o Options) (*Store, error) {
	if o.Now == nil {
		o.Now = time.Now
	}
	if o.Timeout <= 0 {
		o.Timeout = OpenTimeout
	}
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return nil, fmt.Errorf("data: create store folder: %w", err)
	}
	path := filepath.Join(dir, DBFile)
	db, err := bolt.Open(path, 0o600, &bolt.Options{Timeout: o.Timeout, FreelistType: bolt.FreelistMapType})
	if err != nil {
		if errors.Is(err, berrors.ErrTimeout) {
			return nil, &StoreInUseError{Path: dir}
		}
		return nil, fmt.Errorf("data: open store %s: %w", dir, err)
	}
	s := &Store{dir: dir, db: db, now: o.Now, hook: o.beforeCommit}
	var last record.HLC
	err = db.Update(func(tx *bolt.Tx) error {
		for _, name := range allBuckets {
			if _, err := tx.CreateBucketIfNotExists(name); err != nil {
				return err
			}
		}
		m := tx.Bucket(bMeta)
		if d := m.Get([]byte(metaDevice)); len(d) == len(s.device) {
			copy(s.device[:], d)
		} else {
			dev, err := record.NewDeviceID()
			if err != nil {
				return err
			}
			s.device = dev
			if err := m.Put([]byte(metaDevice), dev[:]); err != nil {
				return err
			}
			if err := m.Put([]byte(metaCreated), []byte(o.Now().UTC().Format(time.RFC3339))); err != nil {
				return err
			}
		}
		last = record.HLCFromBytes(m.Get([]byte(metaClock)))
		s.demo.Store(len(m.Get([]byte(metaDemo))) > 0)
		if m.Get([]byte(metaSites)) == nil {
			if err := rebuildSiteCache(tx); err != nil {
				return err
			}
			return m.Put([]byte(metaSites), []byte{1})
		}
		return nil
	})
	if err != nil {
		db.Close()
		return nil, fmt.Errorf("data: prepare store %s: %w", dir, err)
	}
	s.clock = record.NewClock(o.Now, last)
	if err := s.loadSites(); err != nil {
		db.Close()
		return nil, err
	}
	return s, nil
}

// Close releases the store. Later calls fail with ErrClosed.
func (s *Store) Close() error {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if s.closed {
		return nil
	}
	s.closed = true
	return s.db.Close()
}

// Dir is the store's folder.
func (s *Store) Dir() string { return s.dir }

// DeviceID is the id of this store's device, the author of its saves.
func (s *Store) DeviceID() record.DeviceID { return s.device }

// Clock is the store's hybrid logical clock.
func (s *Store) Clock() *record.Clock { return s.clock }

// SiteIndex is the spatial index of the visible sites, kept current by every
// write.
func (s *Store) SiteIndex() *geo.SiteIndex { return s.sites }

func (s *Store) view(fn func(tx *bolt.Tx) error) error {
	s.wmu.Lock()
	closed := s.closed
	s.wmu.Unlock()
	if closed {
		return ErrClosed
	}
	return s.db.View(fn)
}

// Has reports whether the store holds the event.
func (s *Store) Has(id record.EventID) (bool, error) {
	var ok bool
	err := s.view(func(tx *bolt.Tx) error {
		ok = tx.Bucket(bEvents).Get(id[:]) != nil
		return nil
	})
	return ok, err
}

// Raw returns a copy of an event's stored bytes, ErrNotFound if absent.
func (s *Store) Raw(id record.EventID) ([]byte, error) {
	var out []byte
	err := s.view(func(tx *bolt.Tx) error {
		v := tx.Bucket(bEvents).Get(id[:])
		if v == nil {
			return fmt.Errorf("%w: event %s", ErrNotFound, id.Short())
		}
		out = bytes.Clone(v)
		return nil
	})
	return out, err
}

// ForEachRawSince calls fn for every event inserted after local sequence
// number afterSeq, in insertion order (numbers start at 1). raw is valid
// only during the call: copy it to keep it. An error from fn stops the
// walk and is returned. fn runs inside a read transaction: it may read
// the store but must not write to it (a write that grows the file would
// wait for the read to end).
func (s *Store) ForEachRawSince(afterSeq uint64, fn func(seq uint64, id record.EventID, raw []byte) error) error {
	return s.view(func(tx *bolt.Tx) error {
		ev := tx.Bucket(bEvents)
		c := tx.Bucket(bSeq).Cursor()
		for k, v := c.Seek(seqKey(afterSeq + 1)); k != nil; k, v = c.Next() {
			var id record.EventID
			copy(id[:], v)
			raw := ev.Get(v)
			if raw == nil {
				return fmt.Errorf("%w: event %s listed at seq %d", ErrNotFound, id.Short(), binary.BigEndian.Uint64(k))
			}
			if err := fn(binary.BigEndian.Uint64(k), id, raw); err != nil {
				return err
			}
		}
		return nil
	})
}

// LastSeq is the local sequence number of the latest inserted event, 0
// for an empty store.
func (s *Store) LastSeq() (uint64, error) {
	var n uint64
	err := s.view(func(tx *bolt.Tx) error {
		if k, _ := tx.Bucket(bSeq).Cursor().Last(); k != nil {
			n = binary.BigEndian.Uint64(k)
		}
		return nil
	})
	return n, err
}

// Meta returns a copy of a meta value, nil and no error when absent.
func (s *Store) Meta(key string) ([]byte, error) {
	var out []byte
	err := s.view(func(tx *bolt.Tx) error {
		if v := tx.Bucket(bMeta).Get([]byte(key)); v != nil {
			out = bytes.Clone(v)
		}
		return nil
	})
	return out, err
}

// ContentHash is SHA-256 over every bucket in name order, and in each its
// keys and values in key order, each length-prefixed: two stores hash the
// same exactly when their files hold the same data. It covers the local
// parts too (device id, insertion order), so use it to prove that a
// refused write changed nothing; use EventSetHash to compare two stores'
// records.
func (s *Store) ContentHash() ([32]byte, error) {
	var sum [32]byte
	err := s.view(func(tx *bolt.Tx) error {
		h := sha256.New()
		var n [4]byte
		put := func(b []byte) {
			binary.BigEndian.PutUint32(n[:], uint32(len(b)))
			h.Write(n[:])
			h.Write(b)
		}
		err := tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			put(name)
			err := b.ForEach(func(k, v []byte) error {
				put(k)
				put(v)
				return nil
			})
			h.Write([]byte{0xff, 0xff, 0xff, 0xff})
			return err
		})
		copy(sum[:], h.Sum(nil))
		return err
	})
	return sum, err
}

// EventSetHash is SHA-256 over the events (id and bytes, in id order): it
// depends only on the set of events, so two stores that merged the same
// files in any order hash the same.
func (s *Store) EventSetHash() ([32]byte, error) {
	var sum [32]byte
	err := s.view(func(tx *bolt.Tx) error {
		h := sha256.New()
		var n [4]byte
		err := tx.Bucket(bEvents).ForEach(func(k, v []byte) error {
			h.Write(k)
			binary.BigEndian.PutUint32(n[:], uint32(len(v)))
			h.Write(n[:])
			h.Write(v)
			return nil
		})
		copy(sum[:], h.Sum(nil))
		return err
	})
	return sum, err
}

// IsDemo reports whether the store was made by the demo scenario.
func (s *Store) IsDemo() (bool, error) {
	v, err := s.Meta(metaDemo)
	return len(v) > 0, err
}

func seqKey(n uint64) []byte {
	b := make([]byte, 8)
	binary.BigEndian.PutUint64(b, n)
	return b
}

func pairKey(a record.EntityID, id record.EventID) []byte {
	k := make([]byte, 0, 48)
	k = append(k, a[:]...)
	return append(k, id[:]...)
}

// SharedHash is SHA-256 over everything that two stores which imported
// the same bundles must agree on, whatever the order: every bucket but
// the local insertion numbers, and of the meta keys only the sequence
// records that imports write ("xfer/seen/", "xfer/b/"). Device id,
// creation time, clock and the exporter's own records are local.
func (s *Store) SharedHash() ([32]byte, error) {
	var sum [32]byte
	err := s.view(func(tx *bolt.Tx) error {
		h := sha256.New()
		err := tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			if bytes.Equal(name, bSeq) {
				return nil
			}
			h.Write(name)
			return b.ForEach(func(k, v []byte) error {
				if bytes.Equal(name, bMeta) && !bytes.HasPrefix(k, []byte(MetaTransferPrefix+"seen/")) && !bytes.HasPrefix(k, []byte(MetaTransferPrefix+"b/")) {
					return nil
				}
				var n [8]byte
				binary.BigEndian.PutUint32(n[:4], uint32(len(k)))
				binary.BigEndian.PutUint32(n[4:], uint32(len(v)))
				h.Write(n[:])
				h.Write(k)
				h.Write(v)
				return nil
			})
		})
		copy(sum[:], h.Sum(nil))
		return err
	})
	return sum, err
}
