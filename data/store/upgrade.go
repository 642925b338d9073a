package store

import (
	"baleassay/data/record"
	"bytes"
	"crypto/sha256"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	bolt "go.etcd.io/bbolt"
	berrors "go.etcd.io/bbolt/errors"
)

// Upgrading a store of the first layout (buckets "events", "seq",
// "entity", "byentity", "heads", "supby", "sites", "meta", "drafts"):
// every event, in its local insertion order, with the meta values and
// drafts, is written into a new file beside the old one, which then
// replaces it by an atomic rename. A crash leaves either the old file or
// the new one, never a mixture; the half-built new file is removed on
// the next try. The old file, unlinked by the rename, is marked
// "upgraded" so that a process that had it open reopens the new one.

const (
	upgradeDir    = ".upgrade"
	metaUpgraded1 = "upgraded" // in the old file: it has been replaced
)

// upgrade replaces the store of the first layout in dir by one of this
// layout.
func upgrade(dir string, o Options) error {
	path := filepath.Join(dir, DBFile)
	old, err := bolt.Open(path, 0o600, &bolt.Options{Timeout: o.Timeout})
	if err != nil {
		if errors.Is(err, berrors.ErrTimeout) {
			return &StoreInUseError{Path: dir}
		}
		return fmt.Errorf("the store at %s has the previous layout and must be upgraded by a writing command, but opening it for writing failed: %w", dir, err)
	}
	defer old.Close()
	src := rebuildSource{meta: map[string][]byte{}, drafts: map[string][]byte{}}
	var lost []string
	err = old.View(func(tx *bolt.Tx) error {
		if m := tx.Bucket(bMeta); m != nil {
			if m.Get([]byte(metaUpgraded1)) != nil {
				return errReopen
			}
			_ = m.ForEach(func(k, v []byte) error {
				if string(k) != "sitecache" {
					src.meta[string(k)] = bytes.Clone(v)
				}
				return nil
			})
		}
		if d := tx.Bucket(bDrafts); d != nil {
			_ = d.ForEach(func(k, v []byte) error { src.drafts[string(k)] = bytes.Clone(v); return nil })
		}
		return nil
	})
	if errors.Is(err, errReopen) {
		return nil
	}
	if err != nil {
		return err
	}
	src.events = func(yield func(record.EventID, []byte) error) error {
		return old.View(func(tx *bolt.Tx) error {
			ev, seq := tx.Bucket([]byte("events")), tx.Bucket([]byte("seq"))
			if ev == nil || seq == nil {
				return damagef("a store of the previous layout without its events")
			}
			return seq.ForEach(func(_, v []byte) error {
				raw := ev.Get(v)
				if len(v) != 32 || raw == nil || sha256.Sum256(raw) != [32]byte(v) {
					lost = append(lost, fmt.Sprintf("%x", v))
					return nil
				}
				return yield(record.EventID(v), raw)
			})
		})
	}
	tmp := filepath.Join(dir, upgradeDir)
	if err := os.RemoveAll(tmp); err != nil {
		return err
	}
	rep, err := rebuild(tmp, src, o.Now)
	if err != nil {
		return fmt.Errorf("upgrading the store at %s: %w", dir, err)
	}
	if len(lost)+len(rep.Refused) > 0 {
		os.RemoveAll(tmp)
		return damagef("upgrading to the new layout found %d events that do not verify; nothing was changed", len(lost)+len(rep.Refused))
	}
	if err := os.Rename(filepath.Join(tmp, DBFile), path); err != nil {
		return err
	}
	if err := syncDir(dir); err != nil {
		return err
	}
	os.RemoveAll(tmp)
	return old.Update(func(tx *bolt.Tx) error {
		m, err := tx.CreateBucketIfNotExists(bMeta)
		if err != nil {
			return err
		}
		return m.Put([]byte(metaUpgraded1), []byte{1})
	})
}

var errReopen = errors.New("store replaced, reopen")

// syncDir makes a rename in dir durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	return d.Sync()
}
