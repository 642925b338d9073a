package store

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"encoding/binary"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"syscall"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

// benchEvents makes n valid events: with allSites, n sites; otherwise the
// demo's mix (one site per 50 events, bales, and pulls).
func benchEvents(b *testing.B, n int, allSites bool) [][]byte {
	b.Helper()
	raws := make([][]byte, 0, n)
	var site, bale record.EntityID
	for i := 0; len(raws) < n; i++ {
		var id record.EntityID
		binary.BigEndian.PutUint32(id[12:], uint32(i+1))
		id[6], id[8] = 0x70, 0x80
		var e record.Event
		switch {
		case allSites || i%50 == 0:
			site = id
			e = testkit.SiteEv(id, testkit.DevA, testkit.T0.UnixMilli()+int64(i), fmt.Sprint("site ", i), randLatDet(i), float64(i%360)-179.5)
		case i%6 == 1:
			bale = id
			e = testkit.BaleEv(id, site, testkit.DevA, testkit.T0.UnixMilli()+int64(i), 540)
		default:
			e = testkit.PullEv(id, bale, testkit.DevA, testkit.T0.UnixMilli()+int64(i), map[string]float64{"pet_clear": 20, "pvc": 0.1, "labels": 0.4, "film": 0.3})
			e.Pull.Label = fmt.Sprint("P", i)
		}
		raws = append(raws, testkit.MustEncode(b, e))
	}
	return raws
}

func randLatDet(i int) float64 { return float64((i*7919)%17999)/100 - 89.99 }

func BenchmarkOpen100k(b *testing.B) {
	for _, c := range []struct {
		name     string
		allSites bool
	}{{"mixed", false}, {"all-sites", true}} {
		b.Run(c.name, func(b *testing.B) {
			dir := b.TempDir()
			s, err := Open(dir)
			if err != nil {
				b.Fatal(err)
			}
			if _, err := s.ApplyRaw(benchEvents(b, 100_000, c.allSites), nil); err != nil {
				b.Fatal(err)
			}
			s.Close()
			b.ResetTimer()
			for b.Loop() {
				s, err := Open(dir)
				if err != nil {
					b.Fatal(err)
				}
				if s.SiteIndex().Len() == 0 {
					b.Fatal("index not ready")
				}
				s.Close()
			}
		})
	}
}

// BenchmarkSave compares one committed and synced transaction per event,
// 100 events per transaction, and the floor: one bare write+fsync of a
// small file on the same disk. Compare the per-event figures (ns/event).
func BenchmarkSave(b *testing.B) {
	site := func(i int) record.Event {
		return record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: fmt.Sprint("s", i), Lat: 1, Lon: 2}}
	}
	b.Run("one-per-tx", func(b *testing.B) {
		s, _ := Open(b.TempDir())
		defer s.Close()
		i := 0
		for b.Loop() {
			if _, err := s.Save([]record.Event{site(i)}, SaveOptions{}); err != nil {
				b.Fatal(err)
			}
			i++
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(i), "ns/event")
	})
	b.Run("100-per-tx", func(b *testing.B) {
		s, _ := Open(b.TempDir())
		defer s.Close()
		i := 0
		for b.Loop() {
			evs := make([]record.Event, 100)
			for j := range evs {
				evs[j] = site(i)
				i++
			}
			if _, err := s.Save(evs, SaveOptions{}); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(i), "ns/event")
	})
	b.Run("bare-fsync", func(b *testing.B) {
		f, err := os.Create(filepath.Join(b.TempDir(), "f"))
		if err != nil {
			b.Fatal(err)
		}
		defer f.Close()
		buf := make([]byte, 200)
		n := 0
		for b.Loop() {
			if _, err := f.WriteAt(buf, int64(n%64)*200); err != nil {
				b.Fatal(err)
			}
			if err := f.Sync(); err != nil {
				b.Fatal(err)
			}
			n++
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(n), "ns/event")
	})
}

// BenchmarkVerifyCost measures what reading with verification costs:
//
//	apply  200,000 events of a grading season in 40 writes of 5,000
//	    (time-ordered, as a lab receives them) into an empty store, with
//	    and without the check of every touched entity before each commit,
//	    both in each iteration
//	walk-verified / walk-raw  the same 200,000 events read back in
//	    insertion order through ForEachRawSince (each event's SHA-256
//	    against its id, numbers in sequence) and through a bare bbolt
//	    cursor over the log
//
// Compare ns/event within a pair: the ratio is the verification's price.
func BenchmarkVerifyCost(b *testing.B) {
	const n, per = 200_000, 5_000
	raws, _ := testkit.BenchRawsFrom(b, n, 7, testkit.XferNow.AddDate(-1, 0, 0).UnixMilli())
	apply := func(b *testing.B, noCheck bool) *Store {
		s, err := OpenWith(b.TempDir(), Options{Now: func() time.Time { return testkit.XferNow }, noEntityCheck: noCheck, NoSiteIndex: true})
		if err != nil {
			b.Fatal(err)
		}
		for i := 0; i < n; i += per {
			if _, err := s.ApplyRaw(raws[i:i+per], nil); err != nil {
				b.Fatal(err)
			}
		}
		return s
	}
	// Both in every iteration, one after the other, so that the load of
	// a shared machine falls on both alike.
	b.Run("apply", func(b *testing.B) {
		var took, cpu [2]time.Duration // checked, unchecked
		for i := 0; b.Loop(); i++ {
			for _, noCheck := range [][2]bool{{false, true}, {true, false}}[i%2] { // alternate which goes first
				t0, c0 := time.Now(), cpuTime()
				apply(b, noCheck).Close()
				took[btoi(noCheck)] += time.Since(t0)
				cpu[btoi(noCheck)] += cpuTime() - c0
			}
		}
		per := func(d time.Duration) float64 { return float64(d.Nanoseconds()) / float64(b.N*n) }
		b.ReportMetric(per(took[0]), "checked-ns/event")
		b.ReportMetric(per(took[1]), "unchecked-ns/event")
		b.ReportMetric(per(cpu[0]), "checked-cpu-ns/event")
		b.ReportMetric(per(cpu[1]), "unchecked-cpu-ns/event")
		b.ReportMetric(float64(cpu[0])/float64(cpu[1]), "cpu-checked/unchecked")
	})
	s := apply(b, false)
	defer s.Close()
	b.Run("walk-verified", func(b *testing.B) {
		for b.Loop() {
			k := 0
			if err := s.ForEachRawSince(0, func(uint64, record.EventID, []byte) error { k++; return nil }); err != nil || k != n {
				b.Fatal(err, k)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/event")
	})
	b.Run("walk-raw", func(b *testing.B) {
		for b.Loop() {
			k := 0
			err := s.db.View(func(tx *bolt.Tx) error {
				return tx.Bucket(bLog).ForEach(func(_, v []byte) error { k += len(v) & 1; return nil })
			})
			if err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/event")
	})
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

// cpuTime is the process's user and system CPU time: on a shared machine
// it varies less than the wall clock.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkPathGuardCost measures what the check of the pages a write
// changes (guard.go) costs, guarded and unguarded in every iteration:
//
//	apply     200,000 events in 40 writes of 5,000 into an empty store
//	spread    the same events shuffled, so each write touches pages all
//	          over the entity bucket (devices sending old weeks)
//	save-one  one site saved per transaction into a store of 20,000
//
// Compare within a pair: the ratio is the guard's price.
func BenchmarkPathGuardCost(b *testing.B) {
	const n, per = 200_000, 5_000
	raws, _ := testkit.BenchRawsFrom(b, n, 7, testkit.XferNow.AddDate(-1, 0, 0).UnixMilli())
	spread := slices.Clone(raws)
	rand.New(rand.NewPCG(3, 3)).Shuffle(len(spread), func(i, j int) { spread[i], spread[j] = spread[j], spread[i] })
	open := func(b *testing.B, off bool) *Store {
		s, err := OpenWith(b.TempDir(), Options{Now: func() time.Time { return testkit.XferNow }, noPathGuard: off, NoSiteIndex: true})
		if err != nil {
			b.Fatal(err)
		}
		return s
	}
	apply := func(b *testing.B, s *Store, raws [][]byte) {
		for i := 0; i < len(raws); i += per {
			if _, err := s.ApplyRaw(raws[i:min(i+per, len(raws))], nil); err != nil {
				b.Fatal(err)
			}
		}
	}
	pair := func(name string, setup func(b *testing.B, s *Store), run func(b *testing.B, s *Store) int) {
		b.Run(name, func(b *testing.B) {
			var took, cpu [2]time.Duration // guarded, unguarded
			count := 0
			for i := 0; b.Loop(); i++ {
				for _, off := range [][2]bool{{false, true}, {true, false}}[i%2] {
					s := open(b, off)
					setup(b, s)
					t0, c0 := time.Now(), cpuTime()
					k := run(b, s)
					took[btoi(off)] += time.Since(t0)
					cpu[btoi(off)] += cpuTime() - c0
					s.Close()
					if !off {
						count += k
					}
				}
			}
			b.ReportMetric(float64(took[0].Nanoseconds())/float64(count), "guarded-ns/op")
			b.ReportMetric(float64(took[1].Nanoseconds())/float64(count), "unguarded-ns/op")
			b.ReportMetric(float64(took[0])/float64(took[1]), "guarded/unguarded")
			b.ReportMetric(float64(cpu[0])/float64(cpu[1]), "cpu-guarded/unguarded")
		})
	}
	none := func(*testing.B, *Store) {}
	pair("apply", none, func(b *testing.B, s *Store) int { apply(b, s, raws); return n })
	pair("spread", func(b *testing.B, s *Store) { apply(b, s, raws[:n/2]) }, func(b *testing.B, s *Store) int { apply(b, s, spread); return n })
	pair("save-one", func(b *testing.B, s *Store) { apply(b, s, raws[:20_000]) }, func(b *testing.B, s *Store) int {
		for i := range 200 {
			ev := record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: fmt.Sprint("s", i), Lat: 1, Lon: 2}}
			if _, err := s.Save([]record.Event{ev}, SaveOptions{}); err != nil {
				b.Fatal(err)
			}
		}
		return 200
	})
}
