package ui

import (
	"context"
	"fmt"
	"image"
	"testing"
	"time"

	"gioui.org/io/input"
	"gioui.org/layout"
	"gioui.org/op"

	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/uitest"
)

// Source: the pulls here are invented benchmark inputs.

// benchDesk is a store with one bale of n pulls.
func benchDesk(b *testing.B, n int) (*desk.Desk, record.EntityID) {
	b.Helper()
	d, err := desk.Open(desk.Location{Dir: b.TempDir()}, desk.Options{Create: true, Now: func() time.Time { return testNow }})
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { d.Close() })
	site, err := d.AddSite(record.SiteRecord{Name: "Bench Yard", Kind: record.SiteYard, Lat: 51, Lon: 0.1}, desk.SaveOptions{})
	if err != nil {
		b.Fatal(err)
	}
	bale, err := d.AddBale(desk.BaleInput{Site: site.String(), BaleRecord: record.BaleRecord{GrossKg: 2000, Tag: "B-50", ReceivedMs: testNow.Add(-time.Hour).UnixMilli()}}, desk.SaveOptions{})
	if err != nil {
		b.Fatal(err)
	}
	var ps []record.PullRecord
	for i := 0; i < n; i++ {
		f := float64(i%7) / 100
		ps = append(ps, record.PullRecord{Label: fmt.Sprintf("P%d", i+1), StatedKg: 20,
			Kg: map[string]float64{"pet_clear": 16 - 10*f, "pet_green": 1 + 5*f, "hdpe": 0.4, "pvc": 0.05 + f/10, "closures": 0.8, "labels": 0.3, "paper": 0.2 + f, "fines": 0.1}})
	}
	if _, _, err := d.AddPulls(bale.String(), ps, desk.SaveOptions{}); err != nil {
		b.Fatal(err)
	}
	return d, bale
}

// BenchmarkLayout times one frame's layout (recording the ops) of the
// Tally with 50 saved pulls and of the Outcome, at 1280×800, against a
// baseline frame holding one line of text in the same run. Goal: under 4
// ms a frame on 2 cores.
func BenchmarkLayout(b *testing.B) {
	d, _ := benchDesk(b, 50)
	a := New(Config{Desk: d, Now: func() time.Time { return testNow }})
	defer a.Close()
	size := image.Pt(1280, 800)
	r := new(input.Router)
	var ops op.Ops
	frame := func() {
		ops.Reset()
		a.Apply(a.Layout(uitest.Context(&ops, r, size)))
		r.Frame(&ops)
	}
	deadline := time.Now().Add(30 * time.Second)
	for !(a.m.result.Has && !a.m.result.Busy && a.m.pulls.Has) && time.Now().Before(deadline) {
		a.owner.idle()
		time.Sleep(5 * time.Millisecond)
		a.in.drain()
		frame()
	}
	if len(a.m.pulls.Value) != 50 {
		b.Fatalf("the bale shows %d pulls, want 50", len(a.m.pulls.Value))
	}
	b.Run("baseline-one-label", func(b *testing.B) {
		th := a.Theme()
		for i := 0; i < b.N; i++ {
			ops.Reset()
			gtx := uitest.Context(&ops, r, size)
			kit.Label(th, "Tally pulls of bale B-50").Layout(gtx)
		}
	})
	for _, s := range []Screen{ScreenTally, ScreenOutcome, ScreenSites} {
		a.Apply([]Action{GoTo{Screen: s}})
		frame()
		frame()
		b.Run(s.String(), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				ops.Reset()
				gtx := uitest.Context(&ops, r, size)
				_ = a.Layout(gtx)
			}
		})
		b.Run(s.String()+"+router", func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				frame()
			}
		})
	}
}

// BenchmarkPullToOutcome times what follows a changed pull: the
// correction saved (committed and synced), then the audit and the
// Monte Carlo yield (10,000 draws) of the bale, as the Outcome runs
// them off the frame loop. Goal: under 100 ms. The baseline is the save
// alone.
func BenchmarkPullToOutcome(b *testing.B) {
	for _, n := range []int{6, 50} {
		d, bale := benchDesk(b, n)
		_, rows, err := d.Pulls(bale.String())
		if err != nil {
			b.Fatal(err)
		}
		p := rows[0]
		edit := func(i int) {
			rec := p.Pull
			rec.Kg = map[string]float64{}
			for k, v := range p.Pull.Kg {
				rec.Kg[k] = v
			}
			rec.Kg["pvc"] = 0.05 + float64(i%10)/100
			if _, err := d.EditPull(p.ID.String(), rec, desk.SaveOptions{Confirm: true}); err != nil {
				b.Fatal(err)
			}
		}
		b.Run(fmt.Sprintf("%d-pulls/save-only", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				edit(i)
			}
		})
		b.Run(fmt.Sprintf("%d-pulls/save+audit+YieldBale(reads-again)", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				edit(i)
				if _, err := d.AuditBale(bale.String(), desk.AuditOptions{}); err != nil {
					b.Fatal(err)
				}
				plan, _ := d.Plan("", "")
				if _, _, err := d.YieldBale(context.Background(), bale.String(), plan, desk.YieldOptions{}, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("%d-pulls/save+audit+yield", n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				edit(i)
				o := computeOutcome(context.Background(), d, bale)
				if o.AuditErr != nil || o.YieldErr != nil {
					b.Fatal(o.AuditErr, o.YieldErr)
				}
			}
		})
	}
}

var _ layout.Dimensions
