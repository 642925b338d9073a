package demo

import (
	"math"
	"testing"
	"time"

	"baleassay/assess"
	"baleassay/data/geo"
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/data/store"
)

var demoEnd = time.Date(2026, 11, 27, 0, 0, 0, 0, time.UTC)

func TestDemoScenario(t *testing.T) {
	s := openTemp(t)
	sum, err := WriteDemo(s, DemoOptions{End: demoEnd})
	if err != nil {
		t.Fatal(err)
	}
	if sum.Sites != 12 || sum.Bales < 100 || sum.Pulls < 4*sum.Bales || sum.Measured < 5 || sum.Events != sum.Sites+sum.Bales+sum.Pulls+sum.Measured+4 {
		t.Fatalf("summary %+v", sum)
	}
	if demo, _ := s.IsDemo(); !demo {
		t.Fatal("demo store not marked")
	}
	cs, _ := s.Conflicts()
	if len(cs) != 1 || cs[0].ID != sum.ConflictSite {
		t.Fatalf("conflicts %d, want exactly the demo's one", len(cs))
	}
	if st, _ := s.Entity(sum.DeletedBale); !st.Deleted() || st.Events != 2 {
		t.Fatal("the duplicate bale is not a kept tombstone")
	}
	// Same seed, same store content (event set).
	s2 := openTemp(t)
	if _, err := WriteDemo(s2, DemoOptions{End: demoEnd}); err != nil {
		t.Fatal(err)
	}
	h1, _ := s.EventSetHash()
	h2, _ := s2.EventSetHash()
	if h1 != h2 {
		t.Fatal("demo scenario is not reproducible")
	}
	// Clean and dirty sites differ: the deposit depot (dirt 0.05) against
	// the new supplier (dirt 0.9), by the scenario's own design (Source:
	// data/scenario.go, an invented demo; the bounds are loose on purpose).
	share := func(name string) store.Stat {
		for _, v := range mustSites(t, s) {
			if v.Site.Name == name {
				rs, err := s.Summarize([]geo.Hit{{IndexedSite: geo.IndexedSite{ID: v.ID}}}, time.Time{}, time.Time{})
				if err != nil {
					t.Fatal(err)
				}
				return rs.TargetPET
			}
		}
		t.Fatalf("no site %q", name)
		return store.Stat{}
	}
	clean, dirty := share("Marrow Lane Depot"), share("Pellam Supply")
	if clean.N < 5 || dirty.N < 5 || clean.Mean < 0.88 || dirty.Mean > 0.82 || clean.Mean-dirty.Mean < 0.08 {
		t.Fatalf("clean site %.3f (n=%d), dirty site %.3f (n=%d)", clean.Mean, clean.N, dirty.Mean, dirty.N)
	}
	if clean.SD <= 0 || clean.SD > 0.05 {
		t.Fatalf("bale-to-bale spread %.4f is not realistic", clean.SD)
	}
}

func mustSites(t *testing.T, s *store.Store) []store.SiteView {
	v, err := s.Sites()
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestSummarizeMatchesHandComputation(t *testing.T) {
	s := openTemp(t)
	site := testkit.Ent(1)
	ev := []record.Event{{Entity: site, Kind: record.KindSite, Site: &record.SiteRecord{Name: "Y", Lat: 45, Lon: 4}}}
	// Two bales, two pulls each. Target-PET shares by the ratio estimator:
	// bale 1: (18+19)/(20+20) = 0.925; bale 2: (15+16)/(20+20) = 0.775
	// (Source: hand computation). Mean 0.85, sample SD |0.925−0.775|/√2 = 0.10607.
	pulls := [][2]float64{{18, 2}, {19, 1}, {15, 5}, {16, 4}}
	for b := 0; b < 2; b++ {
		bale := testkit.Ent(byte(10 + b))
		ev = append(ev, record.Event{Entity: bale, Kind: record.KindBale, Bale: &record.BaleRecord{Site: site, ReceivedMs: testkit.T0.AddDate(0, 0, b).UnixMilli(), GrossKg: 500}})
		for p := 0; p < 2; p++ {
			m := pulls[2*b+p]
			ev = append(ev, record.Event{Entity: testkit.Ent(byte(20 + 2*b + p)), Kind: record.KindPull, Pull: &record.PullRecord{Bale: bale, Label: string(rune('A' + p)),
				Kg: map[string]float64{"pet_clear": m[0], "film": m[1]}}})
		}
	}
	if _, err := s.Save(ev, store.SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	hits, _ := s.SiteIndex().Within(45, 4, 1)
	rs, err := s.Summarize(hits, time.Time{}, time.Time{})
	if err != nil {
		t.Fatal(err)
	}
	if rs.Bales != 2 || rs.Audited != 2 || math.Abs(rs.TargetPET.Mean-0.85) > 1e-12 || math.Abs(rs.TargetPET.SD-0.15/math.Sqrt2) > 1e-12 {
		t.Fatalf("summary %+v", rs.TargetPET)
	}
	var other store.GroupStat
	for _, g := range rs.Groups {
		if g.Group == assess.GroupOtherPlastics {
			other = g
		}
	}
	if math.Abs(other.Mean-0.15) > 1e-12 || other.Min != 0.075 || math.Abs(other.Max-0.225) > 1e-12 {
		t.Fatalf("film group %+v", other.Stat)
	}
	// The date range keeps only the second bale.
	rs, _ = s.Summarize(hits, testkit.T0.Add(12*time.Hour), time.Time{})
	if rs.Bales != 1 || math.Abs(rs.TargetPET.Mean-0.775) > 1e-12 {
		t.Fatalf("range summary %+v", rs)
	}
}

func openTemp(t testing.TB) *store.Store {
	t.Helper()
	s, err := store.OpenWith(t.TempDir(), store.Options{Now: func() time.Time { return testkit.T0.Add(24 * time.Hour) }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// TestDemoInThePastAndMarked: with the default end (today) no event is
// stamped ahead of the clock, every event is marked as a demo record,
// and every bale names a built-in spec.
func TestDemoInThePastAndMarked(t *testing.T) {
	s, err := store.Open(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if _, err := WriteDemo(s, DemoOptions{Weeks: 1}); err != nil {
		t.Fatal(err)
	}
	now := time.Now().UnixMilli()
	n := 0
	err = s.ForEachRawSince(0, func(_ uint64, _ record.EventID, raw []byte) error {
		e, err := record.DecodeEvent(raw)
		if err != nil {
			return err
		}
		if e.Clock.WallMs > now {
			t.Errorf("event stamped %s, after the clock", e.Clock)
		}
		if !e.Demo {
			t.Errorf("event of %s not marked as demo", e.Kind)
		}
		if e.Bale != nil && e.Bale.Spec != "" {
			if _, ok := assess.BuiltinSpec(e.Bale.Spec); !ok {
				t.Errorf("bale names spec %q, which is not built in", e.Bale.Spec)
			}
		}
		n++
		return nil
	})
	if err != nil || n == 0 {
		t.Fatalf("walked %d events: %v", n, err)
	}
}
