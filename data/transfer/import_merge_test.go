package transfer

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/data/store"
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"testing"
	"time"

	"pgregory.net/rapid"
)

// simDevice is one simulated offline device: its own store and key.
type simDevice struct {
	name  string
	dir   string
	store *store.Store
	key   *DeviceKey
	now   time.Time
}

// simWorld is a set of devices passing bundle files around.
type simWorld struct {
	t       testing.TB
	devs    []*simDevice
	files   []string // every bundle written, in writing order
	outDir  string
	keys    map[Fingerprint]string
	skewed  int // index of the device whose clock is a year ahead, or -1
	events  map[record.EventID]bool
	counter int
	relayed int // events of other devices passed on in exports, with their authors' proofs
}

func newSimWorld(t testing.TB, n int, skewed int) *simWorld {
	w := &simWorld{t: t, outDir: t.TempDir(), keys: map[Fingerprint]string{}, skewed: skewed, events: map[record.EventID]bool{}}
	for i := range n {
		d := &simDevice{name: fmt.Sprintf("tablet-%d", i), dir: t.TempDir(), now: testkit.XferNow}
		if i == skewed {
			d.now = testkit.XferNow.AddDate(1, 0, 0) // Source: issue 5 §4, "clocks skewed by a year"
		}
		now := d.now
		s, key, err := OpenStore(d.dir, store.Options{Now: func() time.Time { return now }})
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { s.Close() }) // also closed by close(); a second Close is a no-op
		d.store, d.key = s, key
		w.keys[d.key.Fingerprint()] = d.name
		w.devs = append(w.devs, d)
	}
	return w
}

// close releases the devices' stores (property runs open many worlds).
func (w *simWorld) close() {
	for _, d := range w.devs {
		d.store.Close()
	}
}

func (w *simWorld) trust(fp Fingerprint) (string, bool) { n, ok := w.keys[fp]; return n, ok }

func (w *simWorld) importer(s *store.Store, now time.Time) *Importer {
	return &Importer{Store: s, Trust: w.trust, Now: func() time.Time { return now }}
}

// save stores events on a device and remembers their ids.
func (w *simWorld) save(d *simDevice, evs ...record.Event) {
	ids, err := d.store.Save(evs, store.SaveOptions{Confirm: true})
	if err != nil {
		w.t.Fatalf("%s save: %v", d.name, err)
	}
	for _, id := range ids {
		w.events[id] = true
	}
}

// step performs one random offline action on device d.
func (w *simWorld) step(rt *rapid.T, d *simDevice) {
	sites, err := d.store.Entities(record.KindSite)
	if err != nil {
		w.t.Fatal(err)
	}
	var live []record.EntityState
	for _, st := range sites {
		if !st.Deleted() {
			live = append(live, st)
		}
	}
	w.counter++
	switch op := rapid.IntRange(0, 6).Draw(rt, "op"); {
	case op == 0 || len(live) == 0:
		w.save(d, record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: fmt.Sprintf("Yard %d", w.counter), Kind: record.SiteYard,
			Lat: rapid.Float64Range(-89, 89).Draw(rt, "lat"), Lon: rapid.Float64Range(-179, 179).Draw(rt, "lon")}})
	case op == 1 || op == 2: // edit a site: the same field, concurrently on other devices too
		st := live[rapid.IntRange(0, len(live)-1).Draw(rt, "site")]
		w.save(d, record.Event{Entity: st.ID, Kind: record.KindSite, Supersedes: st.HeadIDs(),
			Site: &record.SiteRecord{Name: fmt.Sprintf("Yard %d renamed on %s", w.counter, d.name), Lat: 10, Lon: 20}})
	case op == 3: // delete, possibly against an edit elsewhere
		st := live[rapid.IntRange(0, len(live)-1).Draw(rt, "del")]
		w.save(d, record.Event{Entity: st.ID, Kind: record.KindSite, Supersedes: st.HeadIDs(), Deleted: true})
	case op == 4 || op == 5: // export, since-last or everything (duplicates)
		opt := ExportOptions{SinceLast: "lab"}
		if op == 5 {
			opt = ExportOptions{}
		}
		res, err := Export(d.store, d.key, w.outDir+string(os.PathSeparator), opt)
		if err != nil {
			w.t.Fatalf("%s export: %v", d.name, err)
		}
		w.files = append(w.files, res.Files...)
		w.relayed += res.Relayed
	case op == 6 && len(w.files) > 0: // a file travels to this device
		f := w.files[rapid.IntRange(0, len(w.files)-1).Draw(rt, "file")]
		rep := w.importer(d.store, d.now).ImportFiles([]string{f})
		if rep.Files[0].Err != nil {
			w.t.Fatalf("%s import %s: %v", d.name, f, rep.Files[0].Err)
		}
	}
}

// finalExports makes every device export what it has, so that every
// event saved anywhere is in some file.
func (w *simWorld) finalExports() {
	for _, d := range w.devs {
		res, err := Export(d.store, d.key, w.outDir+string(os.PathSeparator), ExportOptions{SinceLast: "final"})
		if err != nil {
			w.t.Fatal(err)
		}
		w.files = append(w.files, res.Files...)
		w.relayed += res.Relayed
	}
}

// labImport imports files in the given order into a fresh lab store.
func (w *simWorld) labImport(order []string) (*store.Store, ImportReport) {
	s := xferStore(w.t, w.t.TempDir(), testkit.XferNow)
	return s, w.importer(s, testkit.XferNow).ImportFiles(order)
}

func conflictSet(t testing.TB, s *store.Store) []string {
	cs, err := s.Conflicts()
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, c := range cs {
		out = append(out, c.ID.String())
	}
	sort.Strings(out)
	return out
}

// TestMergeProperties: random offline histories on 2–8 devices, exports
// on random schedules (with duplicates), files travelling between
// devices, then the lab imports every file in two random orders, with
// tampered and truncated copies mixed in. Every order gives the same
// store (apart from local insertion numbers), holds every saved event,
// shows the same conflicts as a fold over all events, and refuses only
// the damaged files. One device's clock runs a year ahead; the stores
// still converge and its bundles are flagged.
func TestMergeProperties(t *testing.T) {
	var runs, withConflicts, withDamage, withRelays int
	rapid.Check(t, func(rt *rapid.T) {
		runs++
		n := rapid.IntRange(2, 8).Draw(rt, "devices")
		skewed := rapid.IntRange(-1, n-1).Draw(rt, "skewed")
		w := newSimWorld(t, n, skewed)
		defer w.close()
		steps := rapid.IntRange(4, 24).Draw(rt, "steps")
		for i := range steps {
			if i == steps/2 { // a meeting: everyone exports and takes in every file so far
				w.finalExports()
				for _, d := range w.devs {
					if rep := w.importer(d.store, d.now).ImportFiles(w.files); rep.Refused() != 0 {
						t.Fatalf("%s: refused a good file at the meeting", d.name)
					}
				}
			}
			w.step(rt, w.devs[rapid.IntRange(0, n-1).Draw(rt, "device")])
		}
		w.finalExports()
		var damaged []string
		for i, f := range w.files {
			if i%3 != 0 {
				continue
			}
			b, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			bad := filepath.Join(w.outDir, fmt.Sprintf("damaged-%d%s", i, BundleExt))
			if i%2 == 0 {
				b = b[:len(b)/2]
			} else {
				b[len(b)/2] ^= 0x20
			}
			if err := os.WriteFile(bad, b, 0o644); err != nil {
				t.Fatal(err)
			}
			damaged = append(damaged, bad)
		}
		all := append(append([]string(nil), w.files...), w.files[:len(w.files)/2]...) // duplicates
		perm1 := rapid.Permutation(append(append([]string(nil), all...), damaged...)).Draw(rt, "order1")
		perm2 := rapid.Permutation(all).Draw(rt, "order2")
		lab1, rep1 := w.labImport(perm1)
		defer lab1.Close()
		lab2, rep2 := w.labImport(perm2)
		defer lab2.Close()
		if rep1.Refused() != len(damaged) || rep2.Refused() != 0 {
			t.Fatalf("refused %d (want %d damaged) and %d (want 0)", rep1.Refused(), len(damaged), rep2.Refused())
		}
		for _, fr := range rep1.Files {
			if (fr.Err != nil) != bytes.Contains([]byte(fr.Path), []byte("damaged-")) {
				t.Fatalf("%s: refusal %v does not match damage", fr.Path, fr.Err)
			}
		}
		if xMergeHash(t, lab1) != xMergeHash(t, lab2) {
			t.Fatal("two import orders gave different stores")
		}
		for id := range w.events {
			if ok, _ := lab1.Has(id); !ok {
				t.Fatalf("event %s saved on a device is missing at the lab", id.Short())
			}
		}
		if len(damaged) > 0 {
			withDamage++
		}
		if w.relayed > 0 {
			withRelays++
		}
		if len(conflictSet(t, lab1)) > 0 {
			withConflicts++
		}
		if c1, c2 := conflictSet(t, lab1), conflictSet(t, lab2); fmt.Sprint(c1) != fmt.Sprint(c2) || fmt.Sprint(c1) != fmt.Sprint(foldConflicts(t, lab1)) {
			t.Fatalf("conflicts differ: %v / %v / fold %v", c1, c2, foldConflicts(t, lab1))
		}
		if skewed >= 0 {
			for _, fr := range rep2.Files {
				flagged := false
				for _, fl := range fr.Flags {
					flagged = flagged || bytes.Contains([]byte(fl), []byte("clock skew"))
				}
				if fromSkewed := fr.Device == w.devs[skewed].store.DeviceID(); fromSkewed != flagged {
					t.Fatalf("%s: from the skewed device %v, flagged %v (%v)", fr.Path, fromSkewed, flagged, fr.Flags)
				}
			}
		}
	})
	// The generator must reach the interesting cases, or the checks above
	// prove little (common practice: guard property tests against a
	// generator that never hits the case).
	t.Logf("%d histories, %d with conflicts at the lab, %d with damaged files, %d with relayed events", runs, withConflicts, withDamage, withRelays)
	if runs >= 20 && (withConflicts == 0 || withDamage == 0 || withRelays == 0) {
		t.Fatalf("in %d histories: %d had conflicts, %d damaged files, %d relays; the generator misses cases", runs, withConflicts, withDamage, withRelays)
	}
}

// foldConflicts recomputes the conflicted entities with Fold over every
// stored event, independently of the store's head index.
func foldConflicts(t testing.TB, s *store.Store) []string {
	var evs []record.Stamped
	if err := s.ForEachRawSince(0, func(_ uint64, id record.EventID, raw []byte) error {
		e, err := record.DecodeEvent(raw)
		evs = append(evs, record.Stamped{ID: id, Event: e})
		return err
	}); err != nil {
		t.Fatal(err)
	}
	var out []string
	for id, st := range record.Fold(evs) {
		if st.Conflicted() {
			out = append(out, id.String())
		}
	}
	sort.Strings(out)
	return out
}

// permutations calls fn with every ordering of n items (Heap's algorithm).
func permutations(n int, fn func([]int)) {
	p := make([]int, n)
	for i := range p {
		p[i] = i
	}
	var gen func(k int)
	gen = func(k int) {
		if k == 1 {
			fn(p)
			return
		}
		for i := 0; i < k; i++ {
			gen(k - 1)
			if k%2 == 0 {
				p[i], p[k-1] = p[k-1], p[i]
			} else {
				p[0], p[k-1] = p[k-1], p[0]
			}
		}
	}
	gen(n)
}

// TestMergeAll120Orders imports five files, in every one of the 5! = 120
// orders, into fresh stores: all give the same store and the same
// conflicts. The files hold concurrent edits of one site's name on three
// devices, a deletion against an edit, and a duplicate export.
func TestMergeAll120Orders(t *testing.T) {
	w := newSimWorld(t, 3, -1)
	a, b, c := w.devs[0], w.devs[1], w.devs[2]
	export := func(d *simDevice, opt ExportOptions) string {
		res, err := Export(d.store, d.key, w.outDir+string(os.PathSeparator), opt)
		if err != nil || len(res.Files) != 1 {
			t.Fatalf("%s export: %v %v", d.name, res, err)
		}
		return res.Files[0]
	}
	w.save(a, record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Riverside depot", Lat: 52.1, Lon: 0.1}},
		record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Hilltop yard", Lat: 52.2, Lon: 0.2}})
	f1 := export(a, ExportOptions{SinceLast: "lab"})
	for _, d := range []*simDevice{b, c} {
		if rep := w.importer(d.store, testkit.XferNow).ImportFiles([]string{f1}); rep.Refused() != 0 {
			t.Fatal(rep.Files[0].Err)
		}
	}
	sites := func(d *simDevice) []record.EntityState {
		st, err := d.store.Entities(record.KindSite)
		if err != nil || len(st) != 2 {
			t.Fatalf("%s sites: %v %v", d.name, st, err)
		}
		return st
	}
	for i, d := range []*simDevice{a, b, c} {
		s0 := sites(d)[0]
		w.save(d, record.Event{Entity: s0.ID, Kind: record.KindSite, Supersedes: s0.HeadIDs(),
			Site: &record.SiteRecord{Name: fmt.Sprintf("Riverside depot (%d)", i), Lat: 52.1, Lon: 0.1}})
	}
	s1 := sites(c)[1]
	w.save(c, record.Event{Entity: s1.ID, Kind: record.KindSite, Supersedes: s1.HeadIDs(), Deleted: true})
	s1b := sites(b)[1]
	w.save(b, record.Event{Entity: s1b.ID, Kind: record.KindSite, Supersedes: s1b.HeadIDs(), Site: &record.SiteRecord{Name: "Hilltop yard, north gate", Lat: 52.2, Lon: 0.2}})
	files := []string{f1, export(a, ExportOptions{SinceLast: "lab"}), export(b, ExportOptions{SinceLast: "lab"}),
		export(c, ExportOptions{SinceLast: "lab"}), export(b, ExportOptions{})}
	var want [32]byte
	var wantConf string
	orders := 0
	permutations(len(files), func(p []int) {
		order := make([]string, len(p))
		for i, j := range p {
			order[i] = files[j]
		}
		s, rep := w.labImport(order)
		if rep.Refused() != 0 {
			t.Fatalf("order %v refused a file", p)
		}
		h, conf := xMergeHash(t, s), fmt.Sprint(conflictSet(t, s))
		if orders == 0 {
			want, wantConf = h, conf
			// Source: the scenario above: three concurrent renames of the
			// first site, a deletion against an edit of the second.
			if len(conflictSet(t, s)) != 2 {
				t.Fatalf("conflicts %v, want both sites", conf)
			}
		} else if h != want || conf != wantConf {
			t.Fatalf("order %v gave a different store (conflicts %s, first order %s)", p, conf, wantConf)
		}
		s.Close()
		orders++
	})
	if orders != 120 { // Source: 5! = 120
		t.Fatalf("%d orders tried, want 120", orders)
	}
}
