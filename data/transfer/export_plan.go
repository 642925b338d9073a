package transfer

import (
	"baleassay/data/record"
	"baleassay/data/store"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
)

// metaProof is the prefix of the stored authorship proofs of other
// devices: xfer/proof/<SHA-256 of the proof, hex> → the proof's bytes.
// An import stores every proof of a bundle except this device's own;
// an export sends them on with the events they prove.
const metaProof = "xfer/proof/"

func metaProofKey(p []byte) string {
	sum := sha256.Sum256(p)
	return metaProof + hex.EncodeToString(sum[:])
}

// exportPart is a run of local insertion numbers (after, last] in one
// bundle, and the stored proofs (indices into exportPlan.proofs) its
// other devices' events need.
type exportPart struct {
	after, last uint64
	events      int
	relayed     int
	proofs      []int
}

// exportPlan is what an export writes: its parts and the stored proofs
// they use.
type exportPlan struct {
	parts  []exportPart
	proofs [][]byte
}

// ownProofOverhead bounds the encoded size of a proof beyond its ids:
// envelope, protected header with the 32-byte key, signature, statement.
const ownProofOverhead = 200

// planExport cuts the events after local seq `after` into parts whose
// payload stays under limit bytes (a single larger event, with its
// proof, gets its own part) and at most MaxBundleProofs proofs, and
// picks for every event of another device a stored proof of its author.
// It reads the store twice (authors, then sizes) and keeps in memory
// the ids of the other devices' events of the export.
func planExport(s *store.Store, self record.DeviceID, after uint64, limit int) (exportPlan, error) {
	var plan exportPlan
	need := map[record.EventID]record.DeviceID{}
	err := s.ForEachRawSince(after, func(n uint64, id record.EventID, raw []byte) error {
		dev, ok := record.AuthorOf(raw)
		if !ok {
			return fmt.Errorf("the stored event %s (insertion %d) is damaged: its author cannot be read", id.Short(), n)
		}
		if dev != self {
			need[id] = dev
		}
		return nil
	})
	if err != nil {
		return plan, err
	}
	proofOf, err := pickProofs(s, need, &plan)
	if err != nil {
		return plan, err
	}
	cur := exportPart{after: after, last: after}
	size := 64 // body array, header and the heads of the proofs and events arrays, generously
	inPart := map[int]bool{}
	ownInPart := false
	// cost is what adding the event adds to the current part's payload,
	// and whether it brings a proof the part does not carry yet.
	cost := func(id record.EventID, raw []byte) (add, pi int, foreign, newProof bool) {
		add = bodyOverhead(len(raw)) + len(raw)
		pi, foreign = proofOf[id]
		switch {
		case foreign && !inPart[pi]:
			newProof = true
			add += proofOverhead(len(plan.proofs[pi])) + len(plan.proofs[pi])
		case !foreign:
			add += idEntry
			if !ownInPart {
				add += ownProofOverhead
			}
		}
		return add, pi, foreign, newProof
	}
	err = s.ForEachRawSince(after, func(n uint64, id record.EventID, raw []byte) error {
		add, pi, foreign, newProof := cost(id, raw)
		if cur.events > 0 && (size+add > limit || newProof && len(cur.proofs)+2 > MaxBundleProofs) {
			plan.parts = append(plan.parts, cur)
			cur, size, inPart, ownInPart = exportPart{after: cur.last, last: cur.last}, 64, map[int]bool{}, false
			add, pi, foreign, newProof = cost(id, raw)
		}
		if newProof {
			inPart[pi] = true
			cur.proofs = append(cur.proofs, pi)
		}
		if foreign {
			cur.relayed++
		} else {
			ownInPart = true
		}
		cur.last, cur.events, size = n, cur.events+1, size+add
		return nil
	})
	if err != nil {
		return plan, err
	}
	if cur.events > 0 {
		plan.parts = append(plan.parts, cur)
	}
	return plan, nil
}

// pickProofs finds, for every event in need (id → author), a stored
// proof of that author listing it. The proofs are read in key order and
// each event takes the first that lists it, so the choice depends only
// on what the store holds. Proofs that no longer verify are passed over.
// It returns, per event, the index of its proof in plan.proofs; an event
// left without one stops the export.
func pickProofs(s *store.Store, need map[record.EventID]record.DeviceID, plan *exportPlan) (map[record.EventID]int, error) {
	proofOf := make(map[record.EventID]int, len(need))
	if len(need) == 0 {
		return proofOf, nil
	}
	var damaged int
	err := s.ForEachMeta(metaProof, func(k string, v []byte) error {
		if len(proofOf) == len(need) {
			return nil
		}
		raw := append([]byte(nil), v...)
		p, err := ParseAuthorProof(raw)
		if err != nil {
			damaged++
			return nil
		}
		idx := -1
		for j := range p.Len() {
			id := p.ID(j)
			if dev, ok := need[id]; !ok || dev != p.Device {
				continue
			}
			if _, done := proofOf[id]; done {
				continue
			}
			if idx < 0 {
				idx = len(plan.proofs)
				plan.proofs = append(plan.proofs, raw)
			}
			proofOf[id] = idx
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if missing := len(need) - len(proofOf); missing > 0 {
		var ex record.EventID
		for id := range need {
			if _, ok := proofOf[id]; !ok && (ex == (record.EventID{}) || string(id[:]) < string(ex[:])) {
				ex = id
			}
		}
		msg := fmt.Sprintf("%d %s of other devices %s no proof of %s author in this store (e.g. event %s by device %s)", missing, plural(missing, "event", "events"), plural(missing, "has", "have"), plural(missing, "its", "their"), ex.Short(), need[ex])
		if damaged > 0 {
			msg += fmt.Sprintf("; %d stored proofs no longer verify (a damaged store?)", damaged)
		}
		return nil, fmt.Errorf("%w: %s; nothing was exported", ErrAuthorUnproven, msg)
	}
	return proofOf, nil
}

// ProveStoredEvents signs, with key, a proof over every event in s whose
// author is key's device, and stores it as an import would store a
// relayed proof, so that s can pass those events on. It is for events
// written into a store without a bundle (the invented devices of the
// demo scenario, whose keys the program holds); a device's own events
// need none (Export proves them afresh).
func ProveStoredEvents(s *store.Store, key *DeviceKey) (int, error) {
	var ids []record.EventID
	dev := key.DeviceID()
	err := s.ForEachRawSince(0, func(_ uint64, id record.EventID, raw []byte) error {
		if a, ok := record.AuthorOf(raw); ok && a == dev {
			ids = append(ids, id)
		}
		return nil
	})
	if err != nil || len(ids) == 0 {
		return 0, err
	}
	p, err := NewAuthorProof(key, ids)
	if err != nil {
		return 0, err
	}
	if _, err := s.ApplyRaw(nil, map[string][]byte{metaProofKey(p): p}); err != nil {
		return 0, err
	}
	return len(ids), nil
}
