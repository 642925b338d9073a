package store

import (
	"bytes"
	"sort"

	"baleassay/assess"
	"baleassay/data/record"

	bolt "go.etcd.io/bbolt"
)

// View is the shown value of one visible entity: its current head, and
// whether concurrent heads are waiting to be resolved.
type View struct {
	ID         record.EntityID
	Head       record.Stamped
	Conflicted bool
}

// SiteView is a visible site.
type SiteView struct {
	View
	Site record.SiteRecord
}

// BaleView is a visible bale.
type BaleView struct {
	View
	Bale record.BaleRecord
}

// PullView is a visible pull.
type PullView struct {
	View
	Pull record.PullRecord
}

// visibleTx calls fn for every entity of a kind that is not deleted, with
// its current head.
func visibleTx(tx *bolt.Tx, kind record.Kind, fn func(v View) error) error {
	return tx.Bucket(bEntity).ForEach(func(k, val []byte) error {
		if record.Kind(val[0]) != kind {
			return nil
		}
		var id record.EntityID
		copy(id[:], k)
		st, err := stateTx(tx, id)
		if err != nil {
			return err
		}
		cur, ok := st.Current()
		if !ok {
			return nil
		}
		return fn(View{ID: id, Head: cur, Conflicted: st.Conflicted()})
	})
}

// Sites lists the visible sites by name, then id.
func (s *Store) Sites() ([]SiteView, error) {
	var out []SiteView
	err := s.view(func(tx *bolt.Tx) error {
		return visibleTx(tx, record.KindSite, func(v View) error {
			out = append(out, SiteView{v, *v.Head.Site})
			return nil
		})
	})
	sort.Slice(out, func(i, j int) bool {
		if out[i].Site.Name != out[j].Site.Name {
			return out[i].Site.Name < out[j].Site.Name
		}
		return bytes.Compare(out[i].ID[:], out[j].ID[:]) < 0
	})
	return out, err
}

// Bales lists the visible bales of a site (all sites when site is zero),
// by received time, then id.
func (s *Store) Bales(site record.EntityID) ([]BaleView, error) {
	var out []BaleView
	err := s.view(func(tx *bolt.Tx) error {
		return visibleTx(tx, record.KindBale, func(v View) error {
			if site.IsZero() || v.Head.Bale.Site == site {
				out = append(out, BaleView{v, *v.Head.Bale})
			}
			return nil
		})
	})
	sort.Slice(out, func(i, j int) bool {
		if out[i].Bale.ReceivedMs != out[j].Bale.ReceivedMs {
			return out[i].Bale.ReceivedMs < out[j].Bale.ReceivedMs
		}
		return bytes.Compare(out[i].ID[:], out[j].ID[:]) < 0
	})
	return out, err
}

// PullsByBale returns the visible pulls grouped by bale, each group in
// label order, then id.
func (s *Store) PullsByBale() (map[record.EntityID][]PullView, error) {
	out := map[record.EntityID][]PullView{}
	err := s.view(func(tx *bolt.Tx) error {
		return visibleTx(tx, record.KindPull, func(v View) error {
			out[v.Head.Pull.Bale] = append(out[v.Head.Pull.Bale], PullView{v, *v.Head.Pull})
			return nil
		})
	})
	for _, ps := range out {
		sortPulls(ps)
	}
	return out, err
}

// Pulls lists the visible pulls of one bale in label order.
func (s *Store) Pulls(bale record.EntityID) ([]PullView, error) {
	var out []PullView
	err := s.view(func(tx *bolt.Tx) error {
		return visibleTx(tx, record.KindPull, func(v View) error {
			if v.Head.Pull.Bale == bale {
				out = append(out, PullView{v, *v.Head.Pull})
			}
			return nil
		})
	})
	sortPulls(out)
	return out, err
}

func sortPulls(ps []PullView) {
	sort.Slice(ps, func(i, j int) bool {
		if ps[i].Pull.Label != ps[j].Pull.Label {
			return ps[i].Pull.Label < ps[j].Pull.Label
		}
		return bytes.Compare(ps[i].ID[:], ps[j].ID[:]) < 0
	})
}

// AuditOf builds the audit of package assess for a bale from its pulls.
func AuditOf(b record.BaleRecord, pulls []PullView) (assess.Audit, error) {
	a := assess.Audit{BaleKg: b.GrossKg}
	for _, p := range pulls {
		ap, err := record.AssessPull(p.Pull)
		if err != nil {
			return a, err
		}
		a.Pulls = append(a.Pulls, ap)
	}
	return a, nil
}
