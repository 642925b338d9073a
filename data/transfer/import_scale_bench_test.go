package transfer

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// oneBundleMix makes n events of one mix for a single bundle:
//
//	sites  n new sites whose ids are stamped at random times, so the
//	       bundle's order is not the ids' order (the bundle that was
//	       quadratic in the old layout)
//	pulls  n new pulls of one bale, ids in random order too
//	edits  one site and n-1 edits of it, each superseding the one before
//	heads  one site and n-1 concurrent edits of it (all supersede the
//	       first: one entity with n-1 heads)
func oneBundleMix(tb testing.TB, mix string, n int, dev record.DeviceID) [][]byte {
	m := testkit.NewMaker(0x61, uint64(n))
	m.Dev = dev // the signer's own events: the bundle proves them
	m.Wall = testkit.XferNow.AddDate(0, -1, 0).UnixMilli()
	rng := rand.New(rand.NewPCG(uint64(n), 0x61))
	randomID := func() record.EntityID {
		ms := testkit.XferNow.AddDate(-3, 0, 0).UnixMilli() + rng.Int64N(3*365*24*3600*1000)
		id, err := record.EntityIDAt(ms, rngReader{rng})
		if err != nil {
			tb.Fatal(err)
		}
		return id
	}
	raws := make([][]byte, 0, n)
	site, bale := m.Entity(), m.Entity()
	var first, prev record.EventID
	for i := range n {
		var e record.Event
		switch {
		case mix == "sites":
			e = m.Site(randomID(), fmt.Sprintf("Invented yard %d", i), -60+float64(i%12000)/100, -170+float64(i%34000)/100)
		case mix == "pulls":
			e = m.Pull(randomID(), bale, fmt.Sprintf("P%d", i), 9.5)
		case i == 0:
			e = m.Site(site, "Invented yard", 51, 4)
		case mix == "edits":
			e = m.Site(site, fmt.Sprintf("Invented yard, edit %d", i), 51, 4, prev)
		default: // heads
			e = m.Site(site, fmt.Sprintf("Invented yard, edit %d", i), 51, 4, first)
		}
		raw := testkit.Enc(tb, e)
		prev = record.IDOf(raw)
		if i == 0 {
			first = prev
		}
		raws = append(raws, raw)
	}
	return raws
}

// rngReader reads random bytes from a seeded generator.
type rngReader struct{ r *rand.Rand }

func (g rngReader) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = byte(g.r.Uint32())
	}
	return len(p), nil
}

// BenchmarkImportOneBundle imports one bundle of each mix at 10k, 20k,
// 40k and 80k events into an empty store (the store made outside the
// timer), the whole import: signature, checks, write, site index. ns per
// event that stays flat from 10k to 80k is linear time; the old layout
// took 0.67 s, 1.5 s, 5.5 s and 19.6 s for the sites.
// BALEASSAY_ONE_BUNDLE=160000,320000,480000 runs other sizes (480,000
// sites make a bundle just under the 64 MiB cap).
func BenchmarkImportOneBundle(b *testing.B) {
	key := xKey(b, 0x61)
	sizes := []int{10_000, 20_000, 40_000, 80_000}
	if v := os.Getenv("BALEASSAY_ONE_BUNDLE"); v != "" {
		sizes = nil
		for _, f := range strings.Split(v, ",") {
			n, err := strconv.Atoi(f)
			if err != nil || n < 2 {
				b.Fatalf("BALEASSAY_ONE_BUNDLE=%q: give event counts separated by commas", v)
			}
			sizes = append(sizes, n)
		}
	}
	for _, mix := range []string{"sites", "pulls", "edits", "heads"} {
		for _, n := range sizes {
			raws := oneBundleMix(b, mix, n, key.DeviceID())
			bundle, err := SealBundle(key, BundleHeader{Seq: 1, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}, raws, nil)
			if err != nil {
				b.Fatal(err)
			}
			b.Run(fmt.Sprintf("%s-%dk", mix, n/1000), func(b *testing.B) {
				dir := b.TempDir()
				i := 0
				for b.Loop() {
					b.StopTimer()
					i++
					s := xferStore(b, filepath.Join(dir, fmt.Sprint(i)), testkit.XferNow)
					im := &Importer{Store: s, Trust: xTrustOnly(key), Now: func() time.Time { return testkit.XferNow }}
					b.StartTimer()
					fr := im.ImportBytes(bundle)
					b.StopTimer()
					if fr.Err != nil || fr.New != n {
						b.Fatalf("%+v", fr)
					}
					s.Close()
					b.StartTimer()
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/event")
				b.ReportMetric(float64(len(bundle))/1e6, "MB")
			})
		}
	}
}

// TestWriteOneBundles (BALEASSAY_WRITE_BUNDLES=DIR, with
// BALEASSAY_ONE_BUNDLE=N,...) writes the one-bundle mixes of
// BenchmarkImportOneBundle as files DIR/<mix>-<n>.bale, and the signer's
// public key as DIR/keys/bench.pem, for scripts/scale.sh to import each
// in a process of its own and measure its memory.
func TestWriteOneBundles(t *testing.T) {
	dir := os.Getenv("BALEASSAY_WRITE_BUNDLES")
	if dir == "" {
		t.Skip("set BALEASSAY_WRITE_BUNDLES=DIR to write the one-bundle mixes")
	}
	key := xKey(t, 0x61)
	if err := os.MkdirAll(filepath.Join(dir, "keys"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "keys", "bench.pem"), key.PublicPEM(), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, f := range strings.Split(os.Getenv("BALEASSAY_ONE_BUNDLE"), ",") {
		n, err := strconv.Atoi(f)
		if err != nil || n < 2 {
			t.Fatalf("BALEASSAY_ONE_BUNDLE: %q", f)
		}
		for _, mix := range []string{"sites", "pulls", "edits", "heads"} {
			b, err := SealBundle(key, BundleHeader{Seq: 1, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}, oneBundleMix(t, mix, n, key.DeviceID()), nil)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("%s-%d.bale", mix, n)), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}
