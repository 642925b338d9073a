package transfer

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"baleassay/data/store"
	"bytes"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"
)

var updateFixtures = flag.Bool("update", false, "rewrite data/transfer/testdata/bundles from the fixture generator")

const fixtureDir = "testdata/bundles"

// fixtureStore is a lab store that trusts the tablet and has imported
// its bundle 1.
func fixtureStore(t testing.TB, g *fixGen) (*store.Store, *Importer) {
	t.Helper()
	s := xferStore(t, t.TempDir(), testkit.XferNow)
	im := &Importer{Store: s, Trust: xTrustOnly(g.trusted), Now: func() time.Time { return testkit.XferNow }}
	if fr := im.ImportBytes(g.baseFile); fr.Err != nil || fr.New != 3 {
		t.Fatalf("base bundle: %+v", fr)
	}
	return s, im
}

// TestBundleFixturesGenerate keeps data/transfer/testdata/bundles equal to what
// the generator makes: with -update it rewrites the files, without it it
// fails on any difference (run `go test ./data/transfer -run Fixtures -update`
// after changing the format or the event encoding, and review the diff).
func TestBundleFixturesGenerate(t *testing.T) {
	cases := fixCases()
	if *updateFixtures {
		if err := os.MkdirAll(fixtureDir, 0o755); err != nil {
			t.Fatal(err)
		}
		old, _ := filepath.Glob(filepath.Join(fixtureDir, "*"+BundleExt))
		for _, f := range old {
			os.Remove(f)
		}
		writeFuzzSeeds(t, cases)
	}
	names := map[string]bool{}
	for _, c := range cases {
		if names[c.name] {
			t.Fatalf("fixture name %s used twice", c.name)
		}
		names[c.name] = true
		b := c.build(newFixGen(t)) // a fresh generator per case: builds do not depend on each other
		path := filepath.Join(fixtureDir, c.name+BundleExt)
		if *updateFixtures {
			if err := os.WriteFile(path, b, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Errorf("%s: %v (run with -update)", c.name, err)
		} else if !bytes.Equal(got, b) {
			t.Errorf("%s: committed file differs from the generator (run with -update and review)", c.name)
		}
	}
	files, _ := filepath.Glob(filepath.Join(fixtureDir, "*"+BundleExt))
	for _, f := range files {
		if !names[strings.TrimSuffix(filepath.Base(f), BundleExt)] {
			t.Errorf("%s has no case in fixCases", f)
		}
	}
}

// fixClass sorts a fixture into the class of hostile input it tries,
// for the figures of the report (DEVELOPERS.md).
func fixClass(name string) string {
	switch {
	case strings.HasPrefix(name, "header-device-") || strings.HasPrefix(name, "event-impersonates-") ||
		strings.HasPrefix(name, "proof") || strings.HasPrefix(name, "relayed-"):
		return "authorship"
	case strings.HasPrefix(name, "header-clock-year") || strings.HasPrefix(name, "header-clock-2e") || strings.HasPrefix(name, "event-clock-"):
		return "clock"
	case strings.Contains(name, "terminal-escape") || strings.Contains(name, "newline") || strings.Contains(name, "bidi"):
		return "text"
	case strings.HasPrefix(name, "event-") && (strings.Contains(name, "mass") || strings.Contains(name, "kg") || strings.Contains(name, "pieces") ||
		strings.Contains(name, "latitude") || strings.Contains(name, "longitude") || strings.Contains(name, "received") || strings.Contains(name, "parts")):
		return "values"
	case strings.HasPrefix(name, "event-"):
		return "event encoding"
	}
	return "file, envelope, header, body"
}

// fixTally counts, per class, the fixtures tried, refused with their
// specific error (or accepted as they must be), panics, hangs and lost
// events.
type fixTally struct{ tried, specific, panics, hangs, lost int }

// TestBundleFixtures imports every committed fixture into a fresh lab
// store: each is refused with its specific error (or, for the replay,
// accepted as a no-op), the store's content hash does not change, and
// nothing panics or hangs.
func TestBundleFixtures(t *testing.T) {
	g := newFixGen(t)
	cases := fixCases()
	if len(cases) < 50 {
		t.Fatalf("%d fixtures, the suite needs at least 50", len(cases)) // Source: issue 5 §3
	}
	var slowest time.Duration
	var slowName string
	tally := map[string]*fixTally{}
	for _, c := range cases {
		cl := tally[fixClass(c.name)]
		if cl == nil {
			cl = &fixTally{}
			tally[fixClass(c.name)] = cl
		}
		cl.tried++
		ok := t.Run(c.name, func(t *testing.T) {
			raw, err := os.ReadFile(filepath.Join(fixtureDir, c.name+BundleExt))
			if err != nil {
				t.Fatalf("%v (run go test ./data/transfer -run Fixtures -update)", err)
			}
			s, im := fixtureStore(t, g)
			before := xContentHash(t, s)
			start := time.Now()
			type outcome struct {
				fr    FileReport
				panic any
			}
			done := make(chan outcome, 1)
			go func() {
				defer func() {
					if p := recover(); p != nil {
						done <- outcome{panic: p}
					}
				}()
				done <- outcome{fr: im.ImportBytes(raw)}
			}()
			var fr FileReport
			select {
			case o := <-done:
				if o.panic != nil {
					cl.panics++
					t.Fatalf("panic: %v", o.panic)
				}
				fr = o.fr
			case <-time.After(10 * time.Second):
				cl.hangs++
				t.Fatal("import hung for 10 s")
			}
			if d := time.Since(start); d > slowest {
				slowest, slowName = d, c.name
			}
			if c.accept > 0 {
				raws, _ := fixEvents(raw)
				for _, r := range raws {
					if has, _ := s.Has(record.IDOf(r)); !has {
						cl.lost++
					}
				}
			}
			if c.accept > 0 {
				if fr.Err != nil || fr.New != c.accept {
					t.Fatalf("want accepted with %d new events, got %+v", c.accept, fr)
				}
				return
			}
			if after := xContentHash(t, s); after != before {
				t.Errorf("store content changed (err %v)", fr.Err)
			}
			if c.noop {
				if fr.Err != nil || fr.New != 0 || !fr.Replay {
					t.Fatalf("want accepted no-op, got %+v", fr)
				}
				return
			}
			if fr.Err == nil {
				t.Fatalf("accepted, want refusal with %v", c.want)
			}
			for _, w := range c.want {
				if !errors.Is(fr.Err, w) {
					t.Errorf("error %q does not wrap %q", fr.Err, w)
				}
			}
			if c.as != nil && !c.as(fr.Err) {
				t.Errorf("error %q lacks the expected decoder error type", fr.Err)
			}
		})
		if ok {
			cl.specific++
		}
	}
	t.Logf("%d fixtures; slowest import %v (%s)", len(cases), slowest, slowName)
	classes := make([]string, 0, len(tally))
	for k := range tally {
		classes = append(classes, k)
	}
	sort.Strings(classes)
	for _, k := range classes {
		c := tally[k]
		t.Logf("class %-28s tried %3d, refused with the specific error (or accepted as required) %3d, panics %d, hangs %d, events lost %d", k, c.tried, c.specific, c.panics, c.hangs, c.lost)
	}
}

// fixEvents slices the events out of a bundle without any check, to see
// what an accepted fixture carried.
func fixEvents(raw []byte) ([][]byte, error) {
	env, err := parseSign1(raw)
	if err != nil {
		return nil, err
	}
	_, _, raws, _, err := decodeBody(env.payload, env.payloadOff)
	return raws, err
}

// TestBundleFixtureNames checks that fixture names say the failure mode
// and that the suite covers the modes the issue lists.
func TestBundleFixtureNames(t *testing.T) {
	var names []string
	for _, c := range fixCases() {
		names = append(names, c.name)
	}
	sort.Strings(names)
	all := strings.Join(names, " ")
	// Source: issue 5 §3, the list of required failure modes.
	for _, mode := range []string{"empty-file", "truncated-", "trailing-", "outer-tag-", "outer-tag-missing", "signature-",
		"payload-byte-flipped", "signature-byte-flipped", "unknown-signer", "algorithm-only-unprotected", "algorithm-",
		"duplicate", "indefinite", "tag-", "nesting-10000", "claims-2e", "nonminimal", "invalid-utf8", "nan-mass",
		"negative-mass", "version-2", "event-id-mismatch", "event-", "replayed-old-bundle"} {
		if !strings.Contains(all, mode) {
			t.Errorf("no fixture for %q", mode)
		}
	}
}

// BenchmarkMalformedSuite imports every fixture once per iteration into
// a lab store (refused files change nothing, so one store serves) and
// reports the slowest file's time; the bound is 100 ms a file.
func BenchmarkMalformedSuite(b *testing.B) {
	g := newFixGen(b)
	_, im := fixtureStore(b, g)
	cases := fixCases()
	raws := make([][]byte, len(cases))
	for i, c := range cases {
		var err error
		if raws[i], err = os.ReadFile(filepath.Join(fixtureDir, c.name+BundleExt)); err != nil {
			b.Fatal(err)
		}
	}
	var slowest time.Duration
	for b.Loop() {
		for _, r := range raws {
			t0 := time.Now()
			im.ImportBytes(r)
			slowest = max(slowest, time.Since(t0))
		}
	}
	b.ReportMetric(float64(slowest.Microseconds())/1000, "slowest-ms/file")
	b.ReportMetric(float64(b.Elapsed().Microseconds())/1000/float64(b.N*len(raws)), "mean-ms/file")
}
