package store

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"encoding/binary"
	"fmt"
	"os"
	"path/filepath"
	"testing"
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
