package store

import (
	"baleassay/data/record"
	"bytes"
	"encoding/hex"
	"errors"
	"fmt"
	"strings"

	bolt "go.etcd.io/bbolt"
)

// decodeStored decodes bytes the store itself checked on the way in.
func decodeStored(id record.EventID, raw []byte) (record.Stamped, error) {
	e, err := record.DecodeTrusted(raw)
	if err != nil {
		return record.Stamped{}, fmt.Errorf("data: stored event %s: %w", id.Short(), err)
	}
	return record.Stamped{ID: id, Event: e}, nil
}

func eventTx(tx *bolt.Tx, id record.EventID) (record.Stamped, error) {
	raw := tx.Bucket(bEvents).Get(id[:])
	if raw == nil {
		return record.Stamped{}, fmt.Errorf("%w: event %s", ErrNotFound, id.Short())
	}
	return decodeStored(id, raw)
}

// stateTx folds one entity from the head index.
func stateTx(tx *bolt.Tx, ent record.EntityID) (record.EntityState, error) {
	k := tx.Bucket(bEntity).Get(ent[:])
	if k == nil {
		return record.EntityState{}, fmt.Errorf("%w: entity %s", ErrNotFound, ent)
	}
	st := record.EntityState{ID: ent, Kind: record.Kind(k[0])}
	c := tx.Bucket(bHeads).Cursor()
	for hk, _ := c.Seek(ent[:]); hk != nil && bytes.HasPrefix(hk, ent[:]); hk, _ = c.Next() {
		var id record.EventID
		copy(id[:], hk[16:])
		e, err := eventTx(tx, id)
		if err != nil {
			return st, err
		}
		st.Heads = append(st.Heads, e)
	}
	record.SortStamped(st.Heads)
	st.Events = countPrefix(tx.Bucket(bByEntity), ent[:])
	return st, nil
}

// Entity returns the folded state of one entity, ErrNotFound if the store
// has no event of it.
func (s *Store) Entity(id record.EntityID) (record.EntityState, error) {
	var st record.EntityState
	err := s.view(func(tx *bolt.Tx) error {
		var err error
		st, err = stateTx(tx, id)
		return err
	})
	return st, err
}

// Entities returns the state of every entity of a kind (all kinds when
// kind is 0), deleted ones included, in id order (UUIDv7: creation order).
func (s *Store) Entities(kind record.Kind) ([]record.EntityState, error) {
	var out []record.EntityState
	err := s.view(func(tx *bolt.Tx) error {
		return tx.Bucket(bEntity).ForEach(func(k, v []byte) error {
			if kind != 0 && record.Kind(v[0]) != kind {
				return nil
			}
			var id record.EntityID
			copy(id[:], k)
			st, err := stateTx(tx, id)
			if err != nil {
				return err
			}
			out = append(out, st)
			return nil
		})
	})
	return out, err
}

// History returns every event of an entity, superseded and tombstones
// included, in view order.
func (s *Store) History(ent record.EntityID) ([]record.Stamped, error) {
	var out []record.Stamped
	err := s.view(func(tx *bolt.Tx) error {
		c := tx.Bucket(bByEntity).Cursor()
		for k, _ := c.Seek(ent[:]); k != nil && bytes.HasPrefix(k, ent[:]); k, _ = c.Next() {
			var id record.EventID
			copy(id[:], k[16:])
			e, err := eventTx(tx, id)
			if err != nil {
				return err
			}
			out = append(out, e)
		}
		if out == nil {
			return fmt.Errorf("%w: entity %s", ErrNotFound, ent)
		}
		return nil
	})
	record.SortStamped(out)
	return out, err
}

// Event returns one stored event.
func (s *Store) Event(id record.EventID) (record.Stamped, error) {
	var e record.Stamped
	err := s.view(func(tx *bolt.Tx) error {
		var err error
		e, err = eventTx(tx, id)
		return err
	})
	return e, err
}

// Conflicts returns every entity with more than one head, in id order.
func (s *Store) Conflicts() ([]record.EntityState, error) {
	var out []record.EntityState
	err := s.view(func(tx *bolt.Tx) error {
		c := tx.Bucket(bHeads).Cursor()
		var prev []byte
		n := 0
		flush := func() error {
			if n > 1 {
				var id record.EntityID
				copy(id[:], prev)
				st, err := stateTx(tx, id)
				if err != nil {
					return err
				}
				out = append(out, st)
			}
			return nil
		}
		for k, _ := c.First(); k != nil; k, _ = c.Next() {
			if prev != nil && bytes.Equal(prev, k[:16]) {
				n++
				continue
			}
			if err := flush(); err != nil {
				return err
			}
			prev, n = bytes.Clone(k[:16]), 1
		}
		return flush()
	})
	return out, err
}

// FindEntity resolves a full UUID, a unique prefix of its hex digits
// (dashes optional, at least 4 digits) or a unique suffix (at least 6) to
// an entity id.
func (s *Store) FindEntity(text string) (record.EntityID, error) {
	if id, err := record.ParseEntityID(text); err == nil {
		return id, nil
	}
	h := strings.ToLower(strings.ReplaceAll(text, "-", ""))
	if len(h) < 4 || len(h) > 32 {
		return record.EntityID{}, fmt.Errorf("%w: %q is not an entity id (give the UUID or at least 4 of its leading hex digits)", ErrNotFound, text)
	}
	if _, err := hex.DecodeString(h + strings.Repeat("0", len(h)%2)); err != nil {
		return record.EntityID{}, fmt.Errorf("%w: %q is not an entity id (hex digits only)", ErrNotFound, text)
	}
	var found []record.EntityID
	err := s.view(func(tx *bolt.Tx) error {
		c := tx.Bucket(bEntity).Cursor()
		lo, _ := hex.DecodeString(h[:len(h)/2*2])
		for k, _ := c.Seek(lo); k != nil && strings.HasPrefix(hex.EncodeToString(k), h); k, _ = c.Next() {
			var id record.EntityID
			copy(id[:], k)
			found = append(found, id)
			if len(found) > 1 {
				break
			}
		}
		return nil
	})
	if err != nil {
		return record.EntityID{}, err
	}
	if len(found) == 1 {
		return found[0], nil
	}
	// UUIDv7 ids made close in time share their leading digits; their
	// trailing digits are random, so a unique suffix works too.
	var tail []record.EntityID
	if len(h) >= 6 {
		err = s.view(func(tx *bolt.Tx) error {
			return tx.Bucket(bEntity).ForEach(func(k, _ []byte) error {
				if strings.HasSuffix(hex.EncodeToString(k), h) && len(tail) < 2 {
					var id record.EntityID
					copy(id[:], k)
					tail = append(tail, id)
				}
				return nil
			})
		})
		if err != nil {
			return record.EntityID{}, err
		}
		if len(tail) == 1 && len(found) == 0 {
			return tail[0], nil
		}
	}
	if len(found) == 0 && len(tail) == 0 {
		return record.EntityID{}, fmt.Errorf("%w: no entity id starts or ends with %q", ErrNotFound, text)
	}
	return record.EntityID{}, fmt.Errorf("%w: %q (give more digits, or the last 8 digits of the id)", ErrAmbiguousID, text)
}

// MatchIDs lists the entities of a kind (any kind when kind is 0) whose id,
// as 32 lower-case hex digits, starts or ends with frag (any length,
// dashes removed by the caller), at most limit of them, in id order. It
// reads only the entity index.
func (s *Store) MatchIDs(frag string, kind record.Kind, limit int) ([]record.EntityID, error) {
	frag = strings.ToLower(frag)
	var out []record.EntityID
	err := s.view(func(tx *bolt.Tx) error {
		return tx.Bucket(bEntity).ForEach(func(k, v []byte) error {
			if kind != 0 && record.Kind(v[0]) != kind {
				return nil
			}
			h := hex.EncodeToString(k)
			if strings.HasPrefix(h, frag) || strings.HasSuffix(h, frag) {
				var id record.EntityID
				copy(id[:], k)
				out = append(out, id)
				if limit > 0 && len(out) >= limit {
					return errStopMatch
				}
			}
			return nil
		})
	})
	if errors.Is(err, errStopMatch) {
		err = nil
	}
	return out, err
}

var errStopMatch = errors.New("enough matches")
