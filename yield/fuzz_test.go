package yield

import (
	"bytes"
	"encoding/json"
	"os"
	"testing"
)

// FuzzReadLine: any bytes either fail with an error or give a profile
// whose mass balance closes on a typical bale. Never a panic.
func FuzzReadLine(f *testing.F) {
	for _, p := range []string{"testdata/line-example.json", "testdata/line-not-closed.json", "testdata/line-unknown-key.json"} {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	b, _ := json.Marshal(BuiltinLine())
	f.Add(b)
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := ReadLine(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			return
		}
		m, err := Compile(l)
		if err != nil {
			t.Fatalf("ReadLine accepted a profile Compile refuses: %v", err)
		}
		bal, err := m.Run(typicalBale(t))
		// Source: common practice (conservation of mass).
		if err != nil || bal.Closure > ClosureTolerance || bal.FlakeKg < 0 {
			t.Fatalf("accepted profile does not close: %v, closure %g, flake %g", err, bal.Closure, bal.FlakeKg)
		}
	})
}

// FuzzParsePolyol: command-line polyols never panic and, when accepted,
// are valid blend components.
func FuzzParsePolyol(f *testing.F) {
	for _, s := range []string{"350:10", "350:10:0.5", "castor:3", "x:1", "1e400:1", "NaN:1", "::"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		p, err := ParsePolyol(s, 1)
		if err != nil {
			return
		}
		if _, err := MixBlend(Blend{Polyols: []Polyol{p, Castor(1)}, NCOPct: 30, Index: 100}); err != nil {
			t.Fatalf("accepted %q but the blend fails: %v", s, err)
		}
	})
}
