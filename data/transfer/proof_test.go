package transfer

import (
	"baleassay/data/record"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"math/rand/v2"
	"slices"
	"testing"
	"time"
)

// Has agrees with a linear scan for hashed ids, for ids crowded into one
// corner of the space (which an attacker could list to slow an
// interpolation search), and for ids that share their first 8 bytes.
func TestAuthorProofHas(t *testing.T) {
	key := xKey(t, 7)
	r := rand.New(rand.NewPCG(1, 2))
	sets := map[string][]record.EventID{}
	var hashed, skewed, shared []record.EventID
	for i := range 5000 {
		hashed = append(hashed, sha256.Sum256(binary.BigEndian.AppendUint64(nil, uint64(i))))
		var s record.EventID
		binary.BigEndian.PutUint64(s[:8], uint64(i*i*i)) // crowded near zero, then spread
		s[31] = byte(r.Uint32())
		skewed = append(skewed, s)
		var c record.EventID
		c[0], c[31] = 0x42, byte(i) // the same first 8 bytes
		c[30] = byte(i >> 8)
		shared = append(shared, c)
	}
	sets["hashed"], sets["skewed"], sets["shared prefix"] = hashed, skewed, shared
	for name, ids := range sets {
		listed := ids[:len(ids)/2]
		raw, err := NewAuthorProof(key, listed)
		if err != nil {
			t.Fatal(err)
		}
		p, err := ParseAuthorProof(raw)
		if err != nil {
			t.Fatal(err)
		}
		in := map[record.EventID]bool{}
		for _, id := range listed {
			in[id] = true
		}
		probe := append(slices.Clone(ids), record.EventID{}, record.EventID{0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff})
		for _, id := range probe {
			if p.Has(id) != in[id] {
				t.Fatalf("%s: Has(%x) = %v, listed %v", name, id[:8], p.Has(id), in[id])
			}
		}
		for i := 1; i < p.Len(); i++ {
			a, b := p.ID(i-1), p.ID(i)
			if bytes.Compare(a[:], b[:]) >= 0 {
				t.Fatalf("%s: ids not ascending at %d", name, i)
			}
		}
	}
}

// BenchmarkProofHas looks up 100,000 hashed ids in a proof listing them,
// with Has and, as the baseline in the same iterations, a plain binary
// search over whole ids.
func BenchmarkProofHas(b *testing.B) {
	ids := make([]record.EventID, 100_000)
	for i := range ids {
		ids[i] = sha256.Sum256(binary.BigEndian.AppendUint64(nil, uint64(i)))
	}
	raw, err := NewAuthorProof(xKey(b, 7), ids)
	if err != nil {
		b.Fatal(err)
	}
	p, err := ParseAuthorProof(raw)
	if err != nil {
		b.Fatal(err)
	}
	plain := func(id record.EventID) bool {
		lo, hi := 0, p.Len()
		for lo < hi {
			m := int(uint(lo+hi) >> 1)
			switch c := bytes.Compare(p.ids[m*idEntry+2:(m+1)*idEntry], id[:]); {
			case c == 0:
				return true
			case c < 0:
				lo = m + 1
			default:
				hi = m
			}
		}
		return false
	}
	var has, bin float64
	for b.Loop() {
		t0 := time.Now()
		for _, id := range ids {
			if !p.Has(id) {
				b.Fatal("missed")
			}
		}
		t1 := time.Now()
		for _, id := range ids {
			if !plain(id) {
				b.Fatal("missed")
			}
		}
		has, bin = has+t1.Sub(t0).Seconds(), bin+time.Since(t1).Seconds()
	}
	b.ReportMetric(has*1e3/float64(b.N), "has-ms")
	b.ReportMetric(bin*1e3/float64(b.N), "binary-ms")
	b.ReportMetric(bin/has, "speedup")
}
