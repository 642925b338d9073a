package transfer

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/data/store"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/fxamacker/cbor/v2"
)

// xBenchSetup is shared by the benchmarks: 100,000 events, their bundle
// and their JSON.
type xBenchSetup struct {
	raws   [][]byte
	evs    []record.Event
	bundle []byte   // all 100,000 events in one bundle
	parts  [][]byte // the same events cut at DefaultPartBytes, as Export cuts them
	key    *DeviceKey
	js     []byte
}

var xBenchCache *xBenchSetup

func xSetup100k(b *testing.B) *xBenchSetup {
	if xBenchCache != nil {
		return xBenchCache
	}
	key := xKey(b, 0x11)
	raws, evs := testkit.BenchRawsBy(b, 100_000, 1, testkit.XferNow.AddDate(-1, 0, 0).UnixMilli(), key.DeviceID())
	bundle, err := SealBundle(key, BundleHeader{Device: evs[0].Device, Seq: 1, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}, raws, nil)
	if err != nil {
		b.Fatal(err)
	}
	js, err := json.Marshal(evs)
	if err != nil {
		b.Fatal(err)
	}
	var parts [][]byte
	for i, seq := 0, uint64(1); i < len(raws); seq++ {
		j, size := i, 64
		for j < len(raws) && (j == i || size+bodyOverhead(len(raws[j]))+len(raws[j]) <= DefaultPartBytes) {
			size += bodyOverhead(len(raws[j])) + len(raws[j])
			j++
		}
		p, err := SealBundle(key, BundleHeader{Device: evs[0].Device, Seq: seq, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}, raws[i:j], nil)
		if err != nil {
			b.Fatal(err)
		}
		parts = append(parts, p)
		i = j
	}
	xBenchCache = &xBenchSetup{raws, evs, bundle, parts, key, js}
	return xBenchCache
}

func xReport(b *testing.B, events int) {
	b.ReportMetric(float64(events)*float64(b.N)/b.Elapsed().Seconds(), "events/s")
}

// BenchmarkTransfer100k compares, on the same 100,000 events:
//
//	seal        encode the body and sign it (export without the store)
//	export      Export from a store to a file (store read, seal, atomic write, meta)
//	open        the transfer layer alone: signature, strict body, event ids
//	check       everything import checks: open, then strict DecodeEvent,
//	            IDOf and ValidateEvent of every event on the importer's
//	            workers (one per CPU; ApplyRaw's checkEvents)
//	check-serial the same on one goroutine
//	ratios      plain-cbor, check, check-serial and json timed in the same iterations
//	import      the same events as Export cuts them (DefaultPartBytes parts),
//	            each checked and applied in one synced transaction, into an
//	            empty store
//	plain-cbor  cbor.Unmarshal of the same payload, then of each event, default options
//	json        encoding/json Unmarshal of the same events as a JSON array
//
// MB/s is over the bundle's bytes (the JSON's for json).
func BenchmarkTransfer100k(b *testing.B) {
	st := xSetup100k(b)
	n := len(st.raws)
	b.Run("seal", func(b *testing.B) {
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			if _, err := SealBundle(st.key, BundleHeader{Seq: 1, Part: 1, Parts: 1}, st.raws, nil); err != nil {
				b.Fatal(err)
			}
		}
		xReport(b, n)
	})
	b.Run("export", func(b *testing.B) {
		dir := b.TempDir()
		// A store of st.key's device, holding its own 100,000 events.
		s, err := store.OpenWith(dir, store.Options{Now: func() time.Time { return testkit.XferNow }, Device: st.key.DeviceID()})
		if err != nil {
			b.Fatal(err)
		}
		defer s.Close()
		if _, err := s.ApplyRaw(st.raws, nil); err != nil {
			b.Fatal(err)
		}
		out := filepath.Join(dir, "x.bale")
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			if _, err := Export(s, st.key, out, ExportOptions{Force: true}); err != nil {
				b.Fatal(err)
			}
		}
		xReport(b, n)
	})
	trust := xTrustOnly(st.key)
	b.Run("check", func(b *testing.B) {
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			xCheckAll(b, st.bundle, trust)
		}
		xReport(b, n)
	})
	b.Run("check-serial", func(b *testing.B) {
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			xCheckSerial(b, st.bundle, trust)
		}
		xReport(b, n)
	})
	b.Run("open", func(b *testing.B) { // the transfer layer alone: signature, strict body, ids
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			if _, err := OpenBundle(st.bundle, trust); err != nil {
				b.Fatal(err)
			}
		}
		xReport(b, n)
	})
	b.Run("authorship", func(b *testing.B) { // the share of open that checks the authors' proofs, timed in the same iterations
		env, err := parseSign1(st.bundle)
		if err != nil {
			b.Fatal(err)
		}
		h, proofs, raws, ids, err := decodeBody(env.payload, env.payloadOff)
		if err != nil {
			b.Fatal(err)
		}
		var whole, auth time.Duration
		for b.Loop() {
			t0 := time.Now()
			if _, err := OpenBundle(st.bundle, trust); err != nil {
				b.Fatal(err)
			}
			t1 := time.Now()
			if _, err := checkAuthorship(h.Device, proofs, raws, ids); err != nil {
				b.Fatal(err)
			}
			whole, auth = whole+t1.Sub(t0), auth+time.Since(t1)
		}
		b.ReportMetric(auth.Seconds()/whole.Seconds(), "authorship/open")
		b.ReportMetric(float64(auth.Milliseconds())/float64(b.N), "authorship-ms")
	})
	b.Run("ratios", func(b *testing.B) { // the three decodes timed in the same iterations
		var plain, check, serial, js time.Duration
		for b.Loop() {
			t0 := time.Now()
			xPlainDecode(b, st.bundle)
			t1 := time.Now()
			xCheckAll(b, st.bundle, trust)
			t2 := time.Now()
			xCheckSerial(b, st.bundle, trust)
			t3 := time.Now()
			var evs []record.Event
			if err := json.Unmarshal(st.js, &evs); err != nil {
				b.Fatal(err)
			}
			plain, check, serial, js = plain+t1.Sub(t0), check+t2.Sub(t1), serial+t3.Sub(t2), js+time.Since(t3)
		}
		b.ReportMetric(plain.Seconds()/check.Seconds(), "check-speed/plain-cbor")
		b.ReportMetric(plain.Seconds()/serial.Seconds(), "check-serial-speed/plain-cbor")
		b.ReportMetric(js.Seconds()/check.Seconds(), "check-speed/json")
	})
	b.Run("import", func(b *testing.B) {
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			b.StopTimer()
			s := xferStore(b, b.TempDir(), testkit.XferNow)
			im := &Importer{Store: s, Trust: trust, Now: func() time.Time { return testkit.XferNow }}
			b.StartTimer()
			got := 0
			for _, p := range st.parts {
				fr := im.ImportBytes(p)
				if fr.Err != nil {
					b.Fatalf("%+v", fr)
				}
				got += fr.New
			}
			if got != n {
				b.Fatalf("imported %d of %d events", got, n)
			}
			b.StopTimer()
			s.Close()
			b.StartTimer()
		}
		xReport(b, n)
	})
	b.Run("plain-cbor", func(b *testing.B) {
		b.SetBytes(int64(len(st.bundle)))
		for b.Loop() {
			xPlainDecode(b, st.bundle)
		}
		xReport(b, n)
	})
	b.Run("json", func(b *testing.B) {
		b.SetBytes(int64(len(st.js)))
		for b.Loop() {
			var evs []record.Event
			if err := json.Unmarshal(st.js, &evs); err != nil {
				b.Fatal(err)
			}
		}
		xReport(b, n)
	})
}

// xCheckAll does every check of the importer short of the store, with
// the importer's own code (OpenBundle, then checkEvents with the workers
// ApplyRaw uses: strict DecodeEvent, IDOf and ValidateEventAt of every
// event). xCheckSerial is the same on one goroutine.
func xCheckAll(b *testing.B, bundle []byte, trust TrustFunc) {
	ob, err := OpenBundle(bundle, trust)
	if err != nil {
		b.Fatal(err)
	}
	if _, _, err := record.CheckEvents(ob.Raws, ob.IDs, testkit.XferNow, record.CheckWorkers(len(ob.Raws))); err != nil {
		b.Fatal(err)
	}
}

func xCheckSerial(b *testing.B, bundle []byte, trust TrustFunc) {
	ob, err := OpenBundle(bundle, trust)
	if err != nil {
		b.Fatal(err)
	}
	if _, _, err := record.CheckEvents(ob.Raws, ob.IDs, testkit.XferNow, 1); err != nil {
		b.Fatal(err)
	}
}

// xPlainDecode is the baseline: cbor.Unmarshal with default options of
// the same payload, then of each event into Event; no signature, no
// strictness, no validation.
func xPlainDecode(b *testing.B, bundle []byte) {
	env, err := parseSign1(bundle)
	if err != nil {
		b.Fatal(err)
	}
	var body struct {
		_      struct{} `cbor:",toarray"`
		Header map[int]any
		Proofs [][]byte
		Events [][2][]byte
	}
	if err := cbor.Unmarshal(env.payload, &body); err != nil {
		b.Fatal(err)
	}
	for _, e := range body.Events {
		var ev record.Event
		if err := cbor.Unmarshal(e[1], &ev); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkBundleSizes logs the sizes the figures refer to.
func BenchmarkBundleSizes(b *testing.B) {
	st := xSetup100k(b)
	for b.Loop() {
	}
	b.ReportMetric(float64(len(st.bundle)), "bundle-bytes")
	b.ReportMetric(float64(testkit.RawBytes(st.raws)), "event-bytes")
	b.ReportMetric(float64(len(st.js)), "json-bytes")
}

// TestImportPeakMemory1M (set BALE_MEM_1M=1; slow) imports 1,000,000
// events from bundles of the default part size and records the peak Go
// heap and the process's peak resident size. BALE_MEM_1M=check measures
// the reader and the event checks alone; BALE_MEM_ORDER=time makes the
// parts consecutive in time (see xPeakMemory); BALE_MEM_N and
// BALE_MEM_PART change the event count and the events per part.
func TestImportPeakMemory1M(t *testing.T) {
	if os.Getenv("BALE_MEM_1M") == "" {
		t.Skip("set BALE_MEM_1M=1 to import 1,000,000 events and measure peak memory (minutes)")
	}
	per := DefaultPartBytes / 200 // events average about 195 encoded bytes: parts just under DefaultPartBytes
	if v, err := strconv.Atoi(os.Getenv("BALE_MEM_PART")); err == nil && v > 0 {
		per = v
	}
	n := 1_000_000
	if v, err := strconv.Atoi(os.Getenv("BALE_MEM_N")); err == nil && v > 0 {
		n = v // for measuring how memory grows with the store
	}
	xPeakMemory(t, n, per, os.Getenv("BALE_MEM_1M") == "check", os.Getenv("BALE_MEM_ORDER") == "time")
}

// xPeakMemory writes n events as default-size parts, then imports them
// into an empty store while sampling the Go heap; the generation phase
// is excluded (GC before, peak RSS reset through /proc/self/clear_refs).
//
// By default every part starts its clock at the same day, so the parts'
// entity ids (UUIDv7, time-ordered) interleave, as files of many devices
// grading the same weeks would. With timeOrdered, each part starts where
// the previous one ended, as one device's consecutive exports do.
//
// With checkOnly, the files go through every check of the importer
// (size cap, signature, strict body, ids, DecodeEvent and ValidateEvent
// one event at a time) but not into a store, which separates the
// reader's memory from the store's.
func xPeakMemory(t *testing.T, n, perPart int, checkOnly, timeOrdered bool) {
	dir := t.TempDir()
	key := xKey(t, 0x11)
	var files []string
	var largest, total int64
	seq := uint64(0)
	var prev [32]byte
	wall := testkit.XferNow.AddDate(-1, 0, 0).UnixMilli()
	for done := 0; done < n; {
		k := min(n-done, perPart)
		raws, evs := testkit.BenchRawsBy(t, k, seq+100, wall, key.DeviceID()) // a seed per part: no duplicates
		raws = raws[:k]
		if timeOrdered {
			wall = evs[len(evs)-1].Clock.WallMs + 1
		}
		seq++
		h := BundleHeader{Device: evs[0].Device, Seq: seq, Prev: prev, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}
		b, err := SealBundle(key, h, raws, nil)
		if err != nil {
			t.Fatal(err)
		}
		prev = xSHA256(b)
		f := filepath.Join(dir, fmt.Sprintf("part-%03d%s", seq, BundleExt))
		if err := os.WriteFile(f, b, 0o644); err != nil {
			t.Fatal(err)
		}
		files = append(files, f)
		largest, total = max(largest, int64(len(b))), total+int64(len(b))
		done += k
	}
	s := xferStore(t, filepath.Join(dir, "lab"), testkit.XferNow)
	im := &Importer{Store: s, Trust: xTrustOnly(key), Now: func() time.Time { return testkit.XferNow }}
	runtime.GC()
	var base runtime.MemStats
	runtime.ReadMemStats(&base)
	_ = os.WriteFile("/proc/self/clear_refs", []byte("5"), 0) // reset VmHWM where Linux allows it
	stop := make(chan struct{})
	peak := make(chan uint64)
	go func() {
		var m runtime.MemStats
		var hi uint64
		tick := time.NewTicker(2 * time.Millisecond)
		defer tick.Stop()
		for {
			select {
			case <-stop:
				peak <- hi
				return
			case <-tick.C:
				runtime.ReadMemStats(&m)
				hi = max(hi, m.HeapInuse)
			}
		}
	}()
	start := time.Now()
	var rep ImportReport
	if checkOnly {
		for _, f := range files {
			fr := FileReport{Path: f}
			raw, err := ReadBundleFile(f, 0)
			if err == nil {
				var ob *OpenedBundle
				if ob, err = OpenBundle(raw, im.Trust); err == nil {
					for _, r := range ob.Raws {
						e, derr := record.DecodeEvent(r)
						if derr == nil {
							_, derr = record.ValidateEventAt(e, testkit.XferNow)
						}
						if derr != nil {
							err = derr
							break
						}
						fr.New++
					}
				}
			}
			fr.Err = err
			rep.Files = append(rep.Files, fr)
		}
	} else {
		rep = im.ImportFiles(files)
	}
	el := time.Since(start)
	close(stop)
	hi := <-peak
	runtime.GC()
	var after, after2 runtime.MemStats
	runtime.ReadMemStats(&after)
	runtime.GC() // a second cycle empties sync.Pools (bbolt keeps freed pages in one)
	runtime.ReadMemStats(&after2)
	events := 0
	for _, fr := range rep.Files {
		if fr.Err != nil {
			t.Fatalf("%s: %v", fr.Path, fr.Err)
		}
		events += fr.New
	}
	if events != n {
		t.Fatalf("imported %d events, want %d", events, n)
	}
	t.Logf("check only: %v, time-ordered parts: %v; %d events in %d bundles (%.1f MB, largest %.1f MB) imported in %v (%.0f events/s)",
		checkOnly, timeOrdered, n, len(files), float64(total)/1e6, float64(largest)/1e6, el.Round(time.Millisecond), float64(n)/el.Seconds())
	t.Logf("peak Go heap in use %.1f MB (before import %.1f MB, live after import and GC %.1f MB, after a second GC %.1f MB); peak RSS %s",
		float64(hi)/1e6, float64(base.HeapInuse)/1e6, float64(after.HeapInuse)/1e6, float64(after2.HeapInuse)/1e6, xVmHWM())
}

func xSHA256(b []byte) [32]byte { return sha256.Sum256(b) }

// xVmHWM reads the peak resident set size from /proc/self/status.
func xVmHWM() string {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return "unknown"
	}
	for _, l := range strings.Split(string(b), "\n") {
		if strings.HasPrefix(l, "VmHWM:") {
			return strings.TrimSpace(strings.TrimPrefix(l, "VmHWM:"))
		}
	}
	return "unknown"
}
