package record_test

import (
	"fmt"
	"testing"

	"baleassay/data/internal/testkit"
	"baleassay/data/record"

	"pgregory.net/rapid"
)

// An edit stamped before the event it supersedes (its author's clock was
// behind) is shown after it: supersession first, then the clock. Before
// SortHistory, show listed the edit first.
func TestSortHistorySupersessionFirst(t *testing.T) {
	ms := testkit.T0.UnixMilli()
	first := testkit.StampedOf(t, testkit.SiteEv(testkit.Ent(1), testkit.DevA, ms, "Yard", 1, 1))
	// Device B's clock runs an hour slow: its edit of the first event
	// is stamped before it.
	edit := testkit.StampedOf(t, testkit.SiteEv(testkit.Ent(1), testkit.DevB, ms-3600_000, "Yard (gate 2)", 1, 1, first.ID))
	// An unrelated concurrent event keeps its clock place.
	other := testkit.StampedOf(t, testkit.SiteEv(testkit.Ent(1), testkit.DevA, ms-7200_000, "Yard old", 1, 1))
	h := []record.Stamped{edit, first, other}
	record.SortHistory(h)
	if h[0].ID != other.ID || h[1].ID != first.ID || h[2].ID != edit.ID {
		t.Fatalf("order %s %s %s, want other, first, edit", h[0].Site.Name, h[1].Site.Name, h[2].Site.Name)
	}
	c := []record.Stamped{edit, first, other}
	record.SortStamped(c)
	if c[0].ID != other.ID || c[1].ID != edit.ID {
		t.Fatal("clock order alone would not have put the edit first: the test would not show the change")
	}
}

// Property: for random histories with random clocks (edits may be
// stamped before what they supersede), SortHistory gives a topological
// order of the supersession relation, the same order for every input
// permutation, and plain clock order when nothing supersedes anything.
func TestSortHistoryProperties(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		n := rapid.IntRange(1, 12).Draw(rt, "n")
		base := testkit.T0.UnixMilli()
		var evs []record.Stamped
		for i := range n {
			var sup []record.EventID
			for j := range i {
				if rapid.IntRange(0, 3).Draw(rt, fmt.Sprintf("sup%d-%d", i, j)) == 0 {
					sup = append(sup, evs[j].ID)
				}
			}
			ms := base + rapid.Int64Range(-5000, 5000).Draw(rt, "ms")
			e := testkit.SiteEv(testkit.Ent(1), testkit.DevA, ms, fmt.Sprintf("v%d", i), 1, 1, sup...)
			raw, err := record.EncodeEvent(e)
			if err != nil {
				rt.Fatal(err)
			}
			evs = append(evs, record.Stamped{ID: record.IDOf(raw), Event: e})
		}
		a := rapid.Permutation(evs).Draw(rt, "perm a")
		b := rapid.Permutation(evs).Draw(rt, "perm b")
		record.SortHistory(a)
		record.SortHistory(b)
		pos := map[record.EventID]int{}
		for i, e := range a {
			if b[i].ID != e.ID {
				t.Fatalf("order depends on the input order at %d", i)
			}
			pos[e.ID] = i
		}
		plain := true
		for _, e := range a {
			for _, s := range e.Supersedes {
				plain = false
				if pos[s] >= pos[e.ID] {
					t.Fatalf("%s placed before the event it supersedes", e.Site.Name)
				}
			}
		}
		if plain {
			c := append([]record.Stamped(nil), evs...)
			record.SortStamped(c)
			for i := range c {
				if c[i].ID != a[i].ID {
					t.Fatal("without supersession the order is not clock order")
				}
			}
		}
	})
}
