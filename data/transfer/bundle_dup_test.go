package transfer

import (
	"baleassay/data/record"
	"testing"
)

// TestFirstRepeat: the duplicate check sorts 8-byte prefixes first; ids
// that share a prefix but differ are not duplicates, equal ids are found
// wherever they are.
func TestFirstRepeat(t *testing.T) {
	id := func(prefix, rest byte) record.EventID {
		var e record.EventID
		for i := range 8 {
			e[i] = prefix
		}
		e[31] = rest
		return e
	}
	cases := []struct {
		name string
		ids  []record.EventID
		dup  bool
	}{
		{"none", []record.EventID{id(1, 0), id(2, 0), id(3, 0)}, false},
		{"empty", nil, false},
		{"shared prefix only", []record.EventID{id(7, 1), id(3, 0), id(7, 2), id(7, 3)}, false},
		{"equal, apart", []record.EventID{id(5, 1), id(9, 0), id(2, 0), id(5, 1)}, true},
		{"equal within a shared prefix", []record.EventID{id(7, 1), id(7, 2), id(7, 3), id(7, 2)}, true},
	}
	for _, c := range cases {
		i, dup := firstRepeat(c.ids)
		if dup != c.dup {
			t.Errorf("%s: repeat %v, want %v", c.name, dup, c.dup)
			continue
		}
		if dup {
			n := 0
			for _, x := range c.ids {
				if x == c.ids[i] {
					n++
				}
			}
			if n < 2 {
				t.Errorf("%s: index %d names an id that appears once", c.name, i)
			}
		}
	}
}
