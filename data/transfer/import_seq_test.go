package transfer

import (
	"slices"
	"testing"

	"pgregory.net/rapid"
)

func TestSeqSet(t *testing.T) {
	var s SeqSet
	for _, n := range []uint64{5, 1, 3, 2, 9, 5} {
		s = s.Add(n)
	}
	// Source: worked by hand: {1,2,3,5,9} = [1,3] [5,5] [9,9], missing 4 and 6–8.
	if len(s) != 3 || s[0] != (SeqRange{Lo: 1, Hi: 3}) || s[2] != (SeqRange{Lo: 9, Hi: 9}) {
		t.Fatalf("set %v", s)
	}
	m := s.Missing()
	if len(m) != 2 || m[0] != (SeqRange{Lo: 4, Hi: 4}) || m[1] != (SeqRange{Lo: 6, Hi: 8}) {
		t.Fatalf("missing %v", m)
	}
	b, err := encodeSeqSet(s)
	if err != nil {
		t.Fatal(err)
	}
	back, err := decodeSeqSet(b)
	if err != nil || len(back) != 3 || !back.Has(2) || back.Has(4) {
		t.Fatalf("round trip %v %v", back, err)
	}
	bad, _ := encodeSeqSet(SeqSet{{Lo: 3, Hi: 1}})
	if _, err := decodeSeqSet(bad); err == nil {
		t.Fatal("damaged sequence record accepted")
	}
}

// TestSeqSetOrderFree: the set, and so its stored bytes, depends only on
// which numbers were added, never on their order or repeats; Missing is
// exactly the complement below the maximum.
func TestSeqSetOrderFree(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		nums := rapid.SliceOfN(rapid.Uint64Range(1, 60), 1, 40).Draw(rt, "nums")
		perm := rapid.Permutation(nums).Draw(rt, "perm")
		var a, b SeqSet
		for _, n := range nums {
			a = a.Add(n)
		}
		for _, n := range append(perm, perm[:len(perm)/2]...) {
			b = b.Add(n)
		}
		ea, _ := encodeSeqSet(a)
		eb, _ := encodeSeqSet(b)
		if string(ea) != string(eb) {
			rt.Fatalf("orders gave %v and %v", a, b)
		}
		hi := slices.Max(nums)
		for n := uint64(1); n <= hi; n++ {
			inMissing := false
			for _, r := range a.Missing() {
				inMissing = inMissing || (r.Lo <= n && n <= r.Hi)
			}
			if a.Has(n) == inMissing || a.Has(n) != slices.Contains(nums, n) {
				rt.Fatalf("%d: has %v, missing %v, added %v", n, a.Has(n), inMissing, slices.Contains(nums, n))
			}
		}
	})
}
