package geo

import (
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/dhconnelly/rtreego"
)

// The benchmarks of the site index run on 1,000,000 sites (testSites,
// with its polar and antimeridian clusters). Compare ns/op of
// BenchmarkNearest/index with BenchmarkNearest/haversine-scan in the same
// run; the goal is a ratio of at least 1,000.

const benchSites = 1_000_000

var (
	benchOnce  sync.Once
	benchData  []IndexedSite
	benchIndex *SiteIndex
)

func benchSetup() ([]IndexedSite, *SiteIndex) {
	benchOnce.Do(func() {
		benchData = testSites(benchSites, 21)
		benchIndex = NewSiteIndex(benchData)
	})
	return benchData, benchIndex
}

func BenchmarkNearest(b *testing.B) {
	sites, ix := benchSetup()
	r := rand.New(rand.NewPCG(1, 1))
	qs := queryPoints(r, 256)
	b.Run("index", func(b *testing.B) {
		for i := 0; b.Loop(); i++ {
			q := qs[i%len(qs)]
			if _, err := ix.Nearest(q[0], q[1], 10); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("haversine-scan", func(b *testing.B) {
		for i := 0; b.Loop(); i++ {
			q := qs[i%len(qs)]
			bruteNearest(sites, q[0], q[1], 10)
		}
	})
	// rtreego's own k-nearest on the same tree, for the record.
	b.Run("rtreego-NearestNeighbors", func(b *testing.B) {
		for i := 0; b.Loop(); i++ {
			q := qs[i%len(qs)]
			u := UnitVector(q[0], q[1])
			ix.tree.NearestNeighbors(10, rtreego.Point{u[0], u[1], u[2]})
		}
	})
}

func BenchmarkBulkLoad(b *testing.B) {
	sites, _ := benchSetup()
	b.Run("NewTree-1e6", func(b *testing.B) {
		for b.Loop() {
			NewSiteIndex(sites)
		}
	})
}
