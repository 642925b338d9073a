package store

import (
	"bytes"
	"encoding/binary"
	"fmt"

	bolt "go.etcd.io/bbolt"
)

// Meta values carry a CRC (sealCRC); the counts record says how many
// meta keys there are, so a key lost to a damaged page is noticed when
// the store opens (verifyMeta reads the whole meta bucket, which holds
// a few keys per imported bundle).

// confirmAbsent confirms that key is not in b, a bucket whose values are
// sealed (sealCRC). A damaged key, or key length, leaves its entry
// between the same neighbours (the keys are checked for order), so were
// key's entry damaged it would be the entry a seek for key finds or the
// one before it; both must verify, whose CRC covers the key.
func confirmAbsent(b *bolt.Bucket, bucket, key []byte) error {
	c := b.Cursor()
	k, v := c.Seek(key)
	if k == nil {
		k, v = c.Last()
	} else {
		if _, ok := openCRC(bucket, k, v); !ok {
			return damagef("bucket %q: an entry beside %q does not verify", bucket, key)
		}
		k, v = c.Prev()
	}
	if k != nil {
		if _, ok := openCRC(bucket, k, v); !ok {
			return damagef("bucket %q: an entry beside %q does not verify", bucket, key)
		}
	}
	return nil
}

// metaGet reads a meta value, checking its CRC.
func metaGet(m *bolt.Bucket, key string) ([]byte, bool, error) {
	if m == nil {
		return nil, false, damagef("the meta bucket is missing")
	}
	sealed := m.Get([]byte(key))
	if sealed == nil {
		return nil, false, confirmAbsent(m, bMeta, []byte(key))
	}
	v, ok := openCRC(bMeta, []byte(key), sealed)
	if !ok {
		return nil, false, damagef("meta value %q does not verify", key)
	}
	return v, true, nil
}

// metaPut writes a meta value, counting a new key in c.
func metaPut(m guardedBucket, c *counts, key string, val []byte) error {
	k := []byte(key)
	if m.Get(k) == nil {
		c.Meta++
	}
	return m.Put(k, sealCRC(bMeta, k, val))
}

func loadCounts(tx *bolt.Tx) (counts, error) {
	v, ok, err := metaGet(tx.Bucket(bMeta), metaCounts)
	if err != nil {
		return counts{}, err
	}
	c, good := decodeCounts(v)
	if !ok || !good {
		return counts{}, damagef("the store's counts record is missing or damaged")
	}
	return c, nil
}

func putCounts(w wtx, c counts) error {
	k := []byte(metaCounts)
	return w.bucket(bMeta).Put(k, sealCRC(bMeta, k, c.encode()))
}

// verifyMeta walks every meta key: keys must come in order and their
// number must match the counts record. Values are checked where they are
// read (metaGet, ForEachMeta), not here: the transfer side keeps
// authorship proofs of some hundred kilobytes each in meta, and reading
// them all at every open would cost more than the open itself.
func verifyMeta(tx *bolt.Tx) (counts, error) {
	for _, name := range allBuckets {
		if tx.Bucket(name) == nil {
			return counts{}, damagef("bucket %q is missing", name)
		}
	}
	c, err := loadCounts(tx)
	if err != nil {
		return c, err
	}
	var n uint64
	var prev []byte
	cur := tx.Bucket(bMeta).Cursor()
	for k, v := cur.First(); k != nil; k, v = cur.Next() {
		if prev != nil && bytes.Compare(prev, k) >= 0 {
			return c, damagef("meta keys out of order at %q", k)
		}
		prev = append(prev[:0], k...)
		if v == nil || len(v) < 4 {
			return c, damagef("meta value %q is cut short", k)
		}
		if string(k) != metaCounts {
			n++
		}
	}
	if n != c.Meta {
		return c, damagef("the meta bucket holds %d keys, its count says %d", n, c.Meta)
	}
	return c, nil
}

// checkLogEnd checks that the log ends at the event count: local
// insertion numbers run from 1 without gaps.
func checkLogEnd(tx *bolt.Tx, c counts) error {
	k, _ := tx.Bucket(bLog).Cursor().Last()
	var last uint64
	if k != nil {
		if len(k) != 8 {
			return damagef("log key of %d bytes", len(k))
		}
		last = binary.BigEndian.Uint64(k)
	}
	if last != c.Events {
		return damagef("the log ends at event %d, the counts say %d events", last, c.Events)
	}
	return nil
}

// metaValues returns copies of every meta value but the counts (used
// by the check and the rescue).
func metaValues(tx *bolt.Tx) (map[string][]byte, []string) {
	out := map[string][]byte{}
	var bad []string
	_ = tx.Bucket(bMeta).ForEach(func(k, v []byte) error {
		if string(k) == metaCounts {
			return nil
		}
		if val, ok := openCRC(bMeta, k, v); ok {
			out[string(k)] = bytes.Clone(val)
		} else {
			bad = append(bad, fmt.Sprintf("%q", k))
		}
		return nil
	})
	return out, bad
}
