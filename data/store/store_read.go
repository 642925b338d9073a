package store

import (
	"baleassay/data/record"
	"bytes"
	"encoding/hex"
	"fmt"
	"slices"
	"strings"

	bolt "go.etcd.io/bbolt"
)

// entityRecord reads an entity's record; ok is false when the store has
// no such entity. A missing record that the kind index still lists is
// damage, not absence.
func entityRecord(tx *bolt.Tx, ent record.EntityID) (entRecord, bool, error) {
	k := recKey(ent)
	v := tx.Bucket(bEnt).Get(k)
	if v == nil {
		kb := tx.Bucket(bKinds)
		for kind := 1; kind < maxKinds; kind++ {
			if kb.Get(kindKey(record.Kind(kind), ent)) != nil {
				return entRecord{}, false, damagef("entity %s is indexed as a %s but its record is missing", ent, record.Kind(kind))
			}
		}
		return entRecord{}, false, nil
	}
	r, ok := decodeEntRecord(k, v)
	if !ok {
		return r, false, damagef("the record of entity %s does not verify", ent)
	}
	return r, true, nil
}

// stateTx folds one entity from its heads.
func stateTx(tx *bolt.Tx, ent record.EntityID) (record.EntityState, error) {
	rec, ok, err := entityRecord(tx, ent)
	if err != nil {
		return record.EntityState{}, err
	}
	if !ok {
		return record.EntityState{}, fmt.Errorf("%w: entity %s", ErrNotFound, ent)
	}
	return stateOf(tx, ent, rec)
}

func stateOf(tx *bolt.Tx, ent record.EntityID, rec entRecord) (record.EntityState, error) {
	st := record.EntityState{ID: ent, Kind: rec.Kind, Events: int(rec.Events)}
	prefix := entPrefix(ent, tagHistory)
	c := tx.Bucket(bEnt).Cursor()
	var oc orderCheck
	var n uint64
	for k, v := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, v = c.Next() {
		seq, head, ok := parseHist(v)
		if len(k) != 49 || !ok || !oc.next(k) {
			return st, damagef("entity %s: a damaged history entry", ent)
		}
		n++
		if !head {
			continue
		}
		e, err := eventAt(tx, seq, entryID(k), ent, rec.Kind)
		if err != nil {
			return st, err
		}
		st.Heads = append(st.Heads, e)
	}
	if uint64(len(st.Heads)) != rec.Heads || n != rec.Events {
		return st, damagef("entity %s: %d events and %d heads found, its record says %d and %d", ent, n, len(st.Heads), rec.Events, rec.Heads)
	}
	record.SortStamped(st.Heads)
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

// forKind calls fn for every entity of a kind (every kind when kind is
// 0), in kind then id order, and checks the number found against the
// counts record.
func forKind(tx *bolt.Tx, kind record.Kind, fn func(ent record.EntityID, rec entRecord) error) error {
	c, err := loadCounts(tx)
	if err != nil {
		return err
	}
	var prefix []byte
	want := c.allEntities()
	if kind != 0 {
		if int(kind) >= maxKinds {
			return fmt.Errorf("%w: kind %d", ErrNotFound, kind)
		}
		prefix, want = []byte{byte(kind)}, c.Entities[kind]
	}
	cur := tx.Bucket(bKinds).Cursor()
	var oc orderCheck
	var n uint64
	for k, _ := cur.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, _ = cur.Next() {
		if len(k) != 17 || !oc.next(k) {
			return damagef("the kind index has a damaged entry")
		}
		var ent record.EntityID
		copy(ent[:], k[1:])
		rec, ok, err := entityRecord(tx, ent)
		if err != nil {
			return err
		}
		if !ok || rec.Kind != record.Kind(k[0]) {
			return damagef("the kind index lists %s as a %s, its record disagrees", ent, record.Kind(k[0]))
		}
		n++
		if err := fn(ent, rec); err != nil {
			return err
		}
	}
	if n != want {
		return damagef("%d entities of kind %s found, the counts say %d", n, kindName(kind), want)
	}
	return nil
}

func kindName(k record.Kind) string {
	if k == 0 {
		return "any"
	}
	return k.String()
}

// Entities returns the state of every entity of a kind (all kinds when
// kind is 0), deleted ones included, in kind then id order (UUIDv7:
// creation order).
func (s *Store) Entities(kind record.Kind) ([]record.EntityState, error) {
	var out []record.EntityState
	err := s.view(func(tx *bolt.Tx) error {
		return forKind(tx, kind, func(ent record.EntityID, rec entRecord) error {
			st, err := stateOf(tx, ent, rec)
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
		rec, ok, err := entityRecord(tx, ent)
		if err != nil {
			return err
		}
		if !ok {
			return fmt.Errorf("%w: entity %s", ErrNotFound, ent)
		}
		prefix := entPrefix(ent, tagHistory)
		c := tx.Bucket(bEnt).Cursor()
		var oc orderCheck
		for k, v := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, v = c.Next() {
			seq, _, ok := parseHist(v)
			if len(k) != 49 || !ok || !oc.next(k) {
				return damagef("entity %s: a damaged history entry", ent)
			}
			e, err := eventAt(tx, seq, entryID(k), ent, rec.Kind)
			if err != nil {
				return err
			}
			out = append(out, e)
		}
		if uint64(len(out)) != rec.Events {
			return damagef("entity %s: %d events in its history, its record says %d", ent, len(out), rec.Events)
		}
		return nil
	})
	record.SortStamped(out)
	return out, err
}

// Conflicts returns every entity with more than one head, in id order.
func (s *Store) Conflicts() ([]record.EntityState, error) {
	var out []record.EntityState
	err := s.view(func(tx *bolt.Tx) error {
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		cur := tx.Bucket(bConflicts).Cursor()
		var oc orderCheck
		for k, _ := cur.First(); k != nil; k, _ = cur.Next() {
			if len(k) != 16 || !oc.next(k) {
				return damagef("the conflict set has a damaged entry")
			}
			st, err := stateTx(tx, record.EntityID(k))
			if err != nil {
				return err
			}
			if len(st.Heads) < 2 {
				return damagef("entity %s is in the conflict set with %d head", st.ID, len(st.Heads))
			}
			out = append(out, st)
		}
		if uint64(len(out)) != c.Conflicts {
			return damagef("%d conflicts found, the counts say %d", len(out), c.Conflicts)
		}
		return nil
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
	var found, tail []record.EntityID
	err := s.view(func(tx *bolt.Tx) error {
		lo, _ := hex.DecodeString(h[:len(h)/2*2])
		cur := tx.Bucket(bKinds).Cursor()
		for kind := 1; kind < maxKinds && len(found) < 2; kind++ {
			start := append([]byte{byte(kind)}, lo...)
			for k, _ := cur.Seek(start); k != nil && k[0] == byte(kind) && len(found) < 2; k, _ = cur.Next() {
				if len(k) != 17 || !strings.HasPrefix(hex.EncodeToString(k[1:]), h) {
					break
				}
				found = append(found, record.EntityID(k[1:]))
			}
		}
		if len(found) == 1 || len(h) < 6 && len(found) > 0 {
			return nil
		}
		// UUIDv7 ids made close in time share their leading digits; their
		// trailing digits are random, so a unique suffix works too. This
		// walk also counts the kind index, so an entity lost to damage is
		// reported rather than not found.
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		var n uint64
		var oc orderCheck
		for k, _ := cur.First(); k != nil; k, _ = cur.Next() {
			if len(k) != 17 || !oc.next(k) {
				return damagef("the kind index has a damaged entry")
			}
			n++
			if len(h) >= 6 && len(tail) < 2 && strings.HasSuffix(hex.EncodeToString(k[1:]), h) {
				tail = append(tail, record.EntityID(k[1:]))
			}
		}
		if n != c.allEntities() {
			return damagef("the kind index lists %d entities, the counts say %d", n, c.allEntities())
		}
		return nil
	})
	if err != nil {
		return record.EntityID{}, err
	}
	switch {
	case len(found) == 1 && len(tail) == 0:
		return found[0], nil
	case len(found) == 0 && len(tail) == 1:
		return tail[0], nil
	case len(found) == 0 && len(tail) == 0:
		return record.EntityID{}, fmt.Errorf("%w: no entity id starts or ends with %q", ErrNotFound, text)
	}
	return record.EntityID{}, fmt.Errorf("%w: %q (give more digits, or the last 8 digits of the id)", ErrAmbiguousID, text)
}

// MatchIDs lists the entities of a kind (any kind when kind is 0) whose id,
// as 32 lower-case hex digits, starts or ends with frag (any length,
// dashes removed by the caller), at most limit of them, in id order. It
// reads only the kind index; a walk that finds fewer than limit counts
// the index against the counts record, so an entity lost to damage is
// reported rather than not found.
func (s *Store) MatchIDs(frag string, kind record.Kind, limit int) ([]record.EntityID, error) {
	frag = strings.ToLower(frag)
	var out []record.EntityID
	err := s.view(func(tx *bolt.Tx) error {
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		cur := tx.Bucket(bKinds).Cursor()
		var seen, want uint64
		full := true
		for k := 1; k < maxKinds; k++ {
			if kind != 0 && record.Kind(k) != kind {
				continue
			}
			want += c.Entities[k]
			found := 0
			var oc orderCheck
			for key, _ := cur.Seek([]byte{byte(k)}); key != nil && key[0] == byte(k); key, _ = cur.Next() {
				if len(key) != 17 || !oc.next(key) {
					return damagef("the kind index has a damaged entry")
				}
				seen++
				h := hex.EncodeToString(key[1:])
				if strings.HasPrefix(h, frag) || strings.HasSuffix(h, frag) {
					out = append(out, record.EntityID(key[1:]))
					if found++; limit > 0 && found >= limit {
						full = false
						break
					}
				}
			}
		}
		if full && seen != want {
			return damagef("the kind index lists %d entities, the counts say %d", seen, want)
		}
		return nil
	})
	slices.SortFunc(out, func(a, b record.EntityID) int { return bytes.Compare(a[:], b[:]) })
	if limit > 0 && len(out) > limit {
		out = out[:limit]
	}
	return out, err
}
