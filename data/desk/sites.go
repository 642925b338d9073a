package desk

import (
	"fmt"
	"strings"

	"baleassay/data/geo"
	"baleassay/data/record"
	"baleassay/data/store"
)

// NearbyKm is how close a new site may come to another before the save
// asks to confirm (50 m).
const NearbyKm = 0.05

// SiteRow is a visible site.
type SiteRow struct {
	ID         record.EntityID
	Site       record.SiteRecord
	Conflicted bool
}

// Sites lists the visible sites by name.
func (d *Desk) Sites() ([]SiteRow, error) {
	vs, err := d.st.Sites()
	if err != nil {
		return nil, err
	}
	out := make([]SiteRow, len(vs))
	for i, v := range vs {
		out[i] = SiteRow{v.ID, v.Site, v.Conflicted}
	}
	return out, nil
}

// SaveOptions confirm a save's checks.
type SaveOptions struct {
	Confirm bool // save although the checks found something implausible
}

// AddSite saves a new site. A site within 50 m of another, or with the
// name of another, needs confirming (*ConfirmError).
func (d *Desk) AddSite(s record.SiteRecord, opt SaveOptions) (record.EntityID, error) {
	if !opt.Confirm {
		checks, err := d.siteChecks(record.EntityID{}, s)
		if err != nil {
			return record.EntityID{}, err
		}
		if len(checks) > 0 {
			return record.EntityID{}, &ConfirmError{checks}
		}
	}
	return d.saveNew(record.Event{Kind: record.KindSite, Site: &s}, opt)
}

// siteChecks finds other sites near s or of its name.
func (d *Desk) siteChecks(self record.EntityID, s record.SiteRecord) ([]Check, error) {
	if err := record.ValidateLatLon(s.Lat, s.Lon); err != nil {
		return nil, nil // the save refuses it with the field named
	}
	var checks []Check
	hits, err := d.st.SiteIndex().Within(s.Lat, s.Lon, NearbyKm)
	if err != nil {
		return nil, err
	}
	for _, h := range hits {
		if h.ID != self {
			checks = append(checks, Check{ConcernSiteNearby, fmt.Sprintf("site %q (%s) is %s m away: the same place?", h.Name, h.ID, Num(1000*h.Km, 0))})
		}
	}
	all, err := d.st.Sites()
	if err != nil {
		return nil, err
	}
	for _, o := range all {
		if o.ID != self && strings.EqualFold(strings.TrimSpace(o.Site.Name), strings.TrimSpace(s.Name)) {
			checks = append(checks, Check{ConcernSiteSameName, fmt.Sprintf("site %s already has the name %q", o.ID, o.Site.Name)})
		}
	}
	return checks, nil
}

// SiteEdit holds the fields to change; nil leaves a field as it is.
type SiteEdit struct {
	Name, Notes *string
	Kind        *record.SiteKind
	Lat, Lon    *float64
}

// EditSite saves a new value of a site that supersedes the current one;
// the old value stays in the history.
func (d *Desk) EditSite(text string, e SiteEdit, opt SaveOptions) (record.EntityID, record.SiteRecord, error) {
	st, err := d.Resolve(text, record.KindSite)
	if err != nil {
		return st.ID, record.SiteRecord{}, err
	}
	cur, err := live(st)
	if err != nil {
		return st.ID, record.SiteRecord{}, err
	}
	rec := *cur.Site
	set(&rec.Name, e.Name)
	set(&rec.Notes, e.Notes)
	set(&rec.Kind, e.Kind)
	set(&rec.Lat, e.Lat)
	set(&rec.Lon, e.Lon)
	if !opt.Confirm {
		checks, err := d.siteChecks(st.ID, rec)
		if err != nil {
			return st.ID, rec, err
		}
		if len(checks) > 0 {
			return st.ID, rec, &ConfirmError{checks}
		}
	}
	_, err = d.st.Supersede(st.ID, record.Event{Site: &rec}, store.SaveOptions{Confirm: opt.Confirm})
	return st.ID, rec, saveError(err)
}

func set[T any](dst *T, v *T) {
	if v != nil {
		*dst = *v
	}
}

// RemoveSite saves a tombstone for a site. A site that still has bales is
// refused unless confirmed; the message says how many.
func (d *Desk) RemoveSite(text string, opt SaveOptions) (record.EntityID, error) {
	st, err := d.Resolve(text, record.KindSite)
	if err != nil {
		return st.ID, err
	}
	bales, err := d.st.Bales(st.ID)
	if err != nil {
		return st.ID, err
	}
	if len(bales) > 0 && !opt.Confirm {
		return st.ID, &ConfirmError{[]Check{{ConcernSiteHasBales,
			fmt.Sprintf("site %s still has %s, which keep naming it", st.ID, Plural(len(bales), "bale", "bales"))}}}
	}
	_, err = d.st.Delete(st.ID)
	return st.ID, saveError(err)
}

// Query is a spatial question about sites.
type Query struct {
	Kind QueryKind
	// Near, Within: the point (WGS 84 degrees); Within: the radius in km;
	// Near: K sites.
	Lat, Lon, Km float64
	K            int
	// Box: south, west, north, east (west > east crosses the antimeridian).
	South, West, North, East float64
}

// QueryKind is the kind of a site query.
type QueryKind uint8

// The site queries.
const (
	QueryNear QueryKind = iota + 1
	QueryWithin
	QueryBox
)

func (k QueryKind) String() string {
	switch k {
	case QueryNear:
		return "near"
	case QueryWithin:
		return "within"
	case QueryBox:
		return "box"
	}
	return fmt.Sprintf("query(%d)", uint8(k))
}

// FindSites runs a spatial query on the site index.
func (d *Desk) FindSites(q Query) ([]geo.Hit, error) {
	ix := d.st.SiteIndex()
	var hits []geo.Hit
	var err error
	switch q.Kind {
	case QueryNear:
		hits, err = ix.Nearest(q.Lat, q.Lon, q.K)
	case QueryWithin:
		hits, err = ix.Within(q.Lat, q.Lon, q.Km)
	case QueryBox:
		hits, err = ix.InBox(q.South, q.West, q.North, q.East)
	default:
		return nil, fmt.Errorf("%w: unknown site query %s", ErrUsage, q.Kind)
	}
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrUsage, err)
	}
	return hits, nil
}

// saveNew saves one event of a new entity and returns the entity's id.
func (d *Desk) saveNew(ev record.Event, opt SaveOptions) (record.EntityID, error) {
	ids, err := d.st.Save([]record.Event{ev}, store.SaveOptions{Confirm: opt.Confirm})
	if err != nil {
		return record.EntityID{}, saveError(err)
	}
	e, err := d.st.Event(ids[0])
	return e.Entity, err
}
