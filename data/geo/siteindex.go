package geo

import (
	"baleassay/data/record"
	"bytes"
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"sync"

	"github.com/dhconnelly/rtreego"
)

// Branching factors of the R-tree (see BenchmarkNearest for the figures).
const (
	treeMinChildren = 8
	treeMaxChildren = 16
)

// IndexedSite is what the index keeps of a site.
type IndexedSite struct {
	ID       record.EntityID
	Name     string
	Lat, Lon float64 // WGS 84 degrees
}

// Hit is a site found by a query, with its haversine distance from the
// query point (0 for box queries).
type Hit struct {
	IndexedSite
	Km float64
}

type siteObj struct {
	IndexedSite
	u    [3]float64 // unit vector
	rect rtreego.Rect
}

func (o *siteObj) Bounds() rtreego.Rect { return o.rect }

// newSiteObj makes the tree object of a site. Its rectangle is the point
// itself, both corners sharing the object's own coordinate array: no
// allocation besides the object, and the coordinates sit next to it in
// memory (rtreego never writes into an object's rectangle).
func newSiteObj(s IndexedSite) *siteObj {
	o := &siteObj{IndexedSite: s, u: UnitVector(s.Lat, s.Lon)}
	o.rect, _ = rtreego.NewRectFromPoints(o.u[:], o.u[:])
	return o
}

// SiteIndex is an R-tree (github.com/dhconnelly/rtreego) over the sites'
// unit vectors. Queries are exact: the tree only proposes candidates, which
// are then ranked by haversine distance. It is safe for concurrent use.
type SiteIndex struct {
	mu   sync.RWMutex
	tree *rtreego.Rtree
	byID map[record.EntityID]*siteObj
}

// NewSiteIndex bulk-loads sites (rtreego's overlap-minimising top-down
// load). Invalid coordinates are the caller's error; sites from the store
// are validated.
func NewSiteIndex(sites []IndexedSite) *SiteIndex {
	ix := &SiteIndex{byID: make(map[record.EntityID]*siteObj, len(sites))}
	objs := make([]rtreego.Spatial, 0, len(sites))
	for _, s := range sites {
		if old, dup := ix.byID[s.ID]; dup {
			// A later entry for the same id wins (the tree is not built yet).
			old.IndexedSite, old.u = s, UnitVector(s.Lat, s.Lon)
			continue
		}
		o := newSiteObj(s)
		ix.byID[s.ID] = o
		objs = append(objs, o)
	}
	ix.tree = rtreego.NewTree(3, treeMinChildren, treeMaxChildren, objs...)
	return ix
}

// Len is the number of indexed sites.
func (ix *SiteIndex) Len() int {
	ix.mu.RLock()
	defer ix.mu.RUnlock()
	return len(ix.byID)
}

// Get returns an indexed site.
func (ix *SiteIndex) Get(id record.EntityID) (IndexedSite, bool) {
	ix.mu.RLock()
	defer ix.mu.RUnlock()
	o, ok := ix.byID[id]
	if !ok {
		return IndexedSite{}, false
	}
	return o.IndexedSite, true
}

// Put adds a site or moves it.
func (ix *SiteIndex) Put(s IndexedSite) {
	ix.mu.Lock()
	defer ix.mu.Unlock()
	ix.putLocked(s)
}

func (ix *SiteIndex) putLocked(s IndexedSite) {
	if old, ok := ix.byID[s.ID]; ok {
		ix.tree.Delete(old)
	}
	o := newSiteObj(s)
	ix.byID[s.ID] = o
	ix.tree.Insert(o)
}

// Remove drops a site; it reports whether it was there.
func (ix *SiteIndex) Remove(id record.EntityID) bool {
	ix.mu.Lock()
	defer ix.mu.Unlock()
	return ix.removeLocked(id)
}

func (ix *SiteIndex) removeLocked(id record.EntityID) bool {
	o, ok := ix.byID[id]
	if !ok {
		return false
	}
	delete(ix.byID, id)
	return ix.tree.Delete(o)
}

// Update is one change to the index: a site put (added or moved) or
// removed.
type Update struct {
	Site   IndexedSite
	Remove bool
}

// bulkApply is the batch size, relative to the index, from which Apply
// rebuilds the tree by bulk loading instead of inserting one site at a
// time: an R-tree insert costs a descent and now and then a split, a bulk
// load about a constant per site, so a bundle of 80,000 new sites takes
// linear time either way but the rebuild is several times faster.
const bulkApply = 8

// Apply makes a batch of changes under one lock.
func (ix *SiteIndex) Apply(ups []Update) {
	if len(ups) == 0 {
		return
	}
	ix.mu.Lock()
	defer ix.mu.Unlock()
	if len(ups) >= 1024 && len(ups)*bulkApply >= len(ix.byID) {
		for _, u := range ups {
			if u.Remove {
				delete(ix.byID, u.Site.ID)
			} else {
				ix.byID[u.Site.ID] = newSiteObj(u.Site)
			}
		}
		objs := make([]rtreego.Spatial, 0, len(ix.byID))
		for _, o := range ix.byID {
			objs = append(objs, o)
		}
		ix.tree = rtreego.NewTree(3, treeMinChildren, treeMaxChildren, objs...)
		return
	}
	for _, u := range ups {
		if u.Remove {
			ix.removeLocked(u.Site.ID)
		} else {
			ix.putLocked(u.Site)
		}
	}
}

// search returns the sites whose unit vectors lie in the box [lo, hi],
// appended to out. With limit > 0 it stops once limit sites are found and
// reports that it stopped.
func (ix *SiteIndex) search(lo, hi [3]float64, out []*siteObj, limit int) ([]*siteObj, bool) {
	r, _ := rtreego.NewRectFromPoints(rtreego.Point{lo[0], lo[1], lo[2]}, rtreego.Point{hi[0], hi[1], hi[2]})
	start, stopped := len(out), false
	ix.tree.SearchIntersect(r, func(_ []rtreego.Spatial, obj rtreego.Spatial) (bool, bool) {
		if limit > 0 && len(out)-start >= limit {
			stopped = true
			return true, true
		}
		out = append(out, obj.(*siteObj))
		return true, false // collect here, keep rtreego's result slice empty
	})
	return out, stopped
}

func (ix *SiteIndex) searchAll(lo, hi [3]float64) []*siteObj {
	out, _ := ix.search(lo, hi, nil, 0)
	return out
}

// cube returns the axis-aligned cube of half-side h around u, padded.
func cube(u [3]float64, h float64) (lo, hi [3]float64) {
	h += 1e-12
	for i := range u {
		lo[i], hi[i] = u[i]-h, u[i]+h
	}
	return
}

func sortHits(h []Hit) {
	sort.Slice(h, func(i, j int) bool {
		if h[i].Km != h[j].Km {
			return h[i].Km < h[j].Km
		}
		return bytes.Compare(h[i].ID[:], h[j].ID[:]) < 0
	})
}

func checkPoint(lat, lon float64) error {
	if err := record.ValidateLatLon(lat, lon); err != nil {
		return fmt.Errorf("%w: %w", ErrBadQuery, err)
	}
	return nil
}

// nearestCap bounds the candidates of one probe of Nearest: a probe that
// finds more stops early and the cube shrinks.
const nearestCap = 256

// Nearest returns the k sites nearest to (lat, lon), nearest first, ties
// broken by id: exactly the first k of a haversine scan of every site
// sorted by (km, id).
//
// rtreego's own NearestNeighbors does not prune well in 3-D, so the query
// probes a cube of half-side r around the query's unit vector u with
// SearchIntersect. Every site outside the cube has chord > r, hence a
// great-circle distance above D(r) = 2R·asin(r/2); once the cube holds k
// sites within D(r) (less a rounding margin) those k are certain, and the
// candidates are ranked exactly by haversine. The first r, ⅛·√(4k/n),
// would hold about k/64 sites if they were spread evenly (a cap of chord
// r has area π r², the sphere 4π): small probes are cheap, and rtreego
// cannot stop a large one early, which in a dense cluster costs more than
// a few extra small probes elsewhere (BenchmarkNearest). A probe with fewer than k sites grows r
// by the density it saw; once it holds k sites, the k-th smallest chord
// among them bounds the k-th nearest from above and sizes the next cube;
// a probe stopped at nearestCap sites (a dense cluster) shrinks it.
func (ix *SiteIndex) Nearest(lat, lon float64, k int) ([]Hit, error) {
	if err := checkPoint(lat, lon); err != nil {
		return nil, err
	}
	if k <= 0 {
		return nil, fmt.Errorf("%w: k = %d, want at least 1", ErrBadQuery, k)
	}
	ix.mu.RLock()
	defer ix.mu.RUnlock()
	n := len(ix.byID)
	if n == 0 {
		return nil, nil
	}
	k = min(k, n)
	u := UnitVector(lat, lon)
	r := min(2, max(0.125*math.Sqrt(4*float64(k)/float64(n)), 1e-9))
	limit := max(nearestCap, 4*k)
	var cands []*siteObj
	var hits []Hit
	var chords []float64
	settle := false
	for iter := 0; ; iter++ {
		if r >= 2 || iter >= 64 {
			r, settle = min(r, 2), true
		}
		lo, hi := cube(u, r)
		var stopped bool
		probeLimit := limit
		if settle {
			probeLimit = 0
		}
		cands, stopped = ix.search(lo, hi, cands[:0], probeLimit)
		if stopped || len(cands) >= k {
			// The k-th smallest chord among real sites bounds the k-th
			// nearest: a ball of that chord (padded for the margin below)
			// holds at least k sites.
			chords = chords[:0]
			for _, o := range cands {
				chords = append(chords, chord(u, o.u))
			}
			sort.Float64s(chords)
			next := coverChord(chords[k-1])
			if stopped {
				// Shrink at least fourfold; at the smallest useful cube
				// (many sites on one spot) take every candidate.
				floor := coverChord(0)
				if r <= floor {
					settle = true
				} else {
					r = max(floor, min(next, r/4))
				}
				continue
			}
			if next < r {
				next = r // the current cube already covers the bound
			}
			if done, out := rankIfCertain(lat, lon, r, k, cands, &hits); done {
				return out, nil
			}
			r = next
			continue
		}
		if done, out := rankIfCertain(lat, lon, r, k, cands, &hits); done {
			return out, nil
		}
		// Fewer than k sites in the cube: grow by the local density,
		// c sites in the cube → about 1.5k in the next, at least double.
		r *= min(8, max(2, math.Sqrt(1.5*float64(k)/float64(max(len(cands), 1)))))
	}
}

// rankIfCertain ranks the candidates of a cube of half-side r by
// haversine and returns the first k when at least k lie within the
// distance the cube guarantees (D(r) less a margin for rounding).
func rankIfCertain(lat, lon, r float64, k int, cands []*siteObj, hits *[]Hit) (bool, []Hit) {
	h := (*hits)[:0]
	within := certainKm(r)
	inside := 0
	for _, o := range cands {
		d := HaversineKm(lat, lon, o.Lat, o.Lon)
		h = append(h, Hit{o.IndexedSite, d})
		if d <= within {
			inside++
		}
	}
	*hits = h
	if inside < k && r < 2 {
		return false, nil
	}
	sortHits(h)
	return true, append([]Hit(nil), h[:k]...)
}

// certainKm is the distance within which a cube of half-side r around
// the query holds every site: D(r) less 1 ppm and 1 m for rounding in the
// haversine and chord arithmetic.
func certainKm(r float64) float64 { return kmForChord(r)*(1-1e-6) - 0.001 }

// coverChord is a cube half-side r whose certainKm(r) reaches a site at
// chord c.
func coverChord(c float64) float64 {
	return min(2, chordForKm((kmForChord(c)+0.002)*(1+2e-6)))
}

func chord(a, b [3]float64) float64 {
	x, y, z := a[0]-b[0], a[1]-b[1], a[2]-b[2]
	return math.Sqrt(x*x + y*y + z*z)
}

// Within returns the sites within km of (lat, lon) by haversine distance,
// nearest first, ties broken by id.
func (ix *SiteIndex) Within(lat, lon, km float64) ([]Hit, error) {
	if err := checkPoint(lat, lon); err != nil {
		return nil, err
	}
	if math.IsNaN(km) || math.IsInf(km, 0) || km < 0 {
		return nil, fmt.Errorf("%w: radius %s km, want a finite value ≥ 0", ErrBadQuery, strconv.FormatFloat(km, 'f', -1, 64))
	}
	ix.mu.RLock()
	defer ix.mu.RUnlock()
	u := UnitVector(lat, lon)
	c := chordForKm(km*(1+1e-6) + 0.001)
	lo, hi := cube(u, min(c, 2))
	var hits []Hit
	for _, o := range ix.searchAll(lo, hi) {
		if d := HaversineKm(lat, lon, o.Lat, o.Lon); d <= km {
			hits = append(hits, Hit{o.IndexedSite, d})
		}
	}
	sortHits(hits)
	return hits, nil
}

// InBox returns the sites with south ≤ lat ≤ north and west ≤ lon ≤ east,
// in name then id order. A box with west > east crosses the antimeridian
// (lon ≥ west or lon ≤ east).
func (ix *SiteIndex) InBox(south, west, north, east float64) ([]Hit, error) {
	if err := checkPoint(south, west); err != nil {
		return nil, err
	}
	if err := checkPoint(north, east); err != nil {
		return nil, err
	}
	if south > north {
		return nil, fmt.Errorf("%w: south %s is north of north %s", ErrBadQuery, strconv.FormatFloat(south, 'f', -1, 64), strconv.FormatFloat(north, 'f', -1, 64))
	}
	lo, hi := boxAABB(south, west, north, east)
	ix.mu.RLock()
	defer ix.mu.RUnlock()
	var hits []Hit
	for _, o := range ix.searchAll(lo, hi) {
		if inBox(o.Lat, o.Lon, south, west, north, east) {
			hits = append(hits, Hit{IndexedSite: o.IndexedSite})
		}
	}
	sort.Slice(hits, func(i, j int) bool {
		if hits[i].Name != hits[j].Name {
			return hits[i].Name < hits[j].Name
		}
		return bytes.Compare(hits[i].ID[:], hits[j].ID[:]) < 0
	})
	return hits, nil
}

func inBox(lat, lon, south, west, north, east float64) bool {
	if lat < south || lat > north {
		return false
	}
	if west <= east {
		return lon >= west && lon <= east
	}
	return lon >= west || lon <= east
}

// boxAABB bounds the unit vectors of a latitude/longitude box: z from the
// latitudes; x and y as products of the radius cos φ (range over the
// latitudes) and cos λ, sin λ (range over the longitudes, with the
// quadrant angles inside the range), padded for rounding.
func boxAABB(south, west, north, east float64) (lo, hi [3]float64) {
	cs, cn := math.Cos(south*degToRad), math.Cos(north*degToRad)
	rmin, rmax := min(cs, cn), max(cs, cn)
	if south <= 0 && north >= 0 {
		rmax = 1
	}
	e := east
	if e < west {
		e += 360
	}
	angles := []float64{west, e}
	for a := math.Ceil(west/90) * 90; a < e; a += 90 {
		angles = append(angles, a)
	}
	cmin, cmax, smin, smax := 2.0, -2.0, 2.0, -2.0
	for _, a := range angles {
		c, s := math.Cos(a*degToRad), math.Sin(a*degToRad)
		cmin, cmax = min(cmin, c), max(cmax, c)
		smin, smax = min(smin, s), max(smax, s)
	}
	span := func(a, b float64) (float64, float64) {
		p := []float64{rmin * a, rmin * b, rmax * a, rmax * b}
		return min(p[0], p[1], p[2], p[3]), max(p[0], p[1], p[2], p[3])
	}
	const pad = 1e-9
	lo[0], hi[0] = span(cmin, cmax)
	lo[1], hi[1] = span(smin, smax)
	lo[2], hi[2] = math.Sin(south*degToRad), math.Sin(north*degToRad)
	for i := range lo {
		lo[i] -= pad
		hi[i] += pad
	}
	return
}

// ErrBadQuery is the sentinel of a query with invalid arguments.
var ErrBadQuery = errors.New("invalid query")
