package yield

import (
	"context"
	"testing"
	"time"
)

// BenchmarkLab times the lab's computations against a baseline in the
// same run: run is yield.Run (10,000 draws of a 20-pull bale, the
// baseline); value is the same draws priced on both routes; batch is
// PredictBatch of 8 such bales (10,000 draws, the line drawn once per
// draw); calibrate is Calibrate on 40 synthetic batches of 6–10 bales
// with five weighed quantities each (the batch predictions made
// beforehand, not timed). ratios interleaves run, value and batch8 in
// every iteration, so that load on the shared machine hits all alike,
// and reports value/run and batch8/run.
func BenchmarkLab(b *testing.B) {
	pulls := inventedPulls(b, 20, 1)
	plan := DefaultPlan()
	opt := MCOptions{Draws: DefaultDraws, Seed: 1}
	sheet := BuiltinPriceSheet()
	b.Run("run", func(b *testing.B) {
		for b.Loop() {
			if _, _, err := Run(context.Background(), pulls, 548, plan, opt, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("value", func(b *testing.B) {
		for b.Loop() {
			if _, err := Value(context.Background(), pulls, 548, plan, sheet, opt, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	batch := Batch{Observe: weighedAll[:2]}
	for i := range 8 {
		batch.Bales = append(batch.Bales, BatchBale{Pulls: inventedPulls(b, 20, uint64(i)+1), BaleKg: 548})
	}
	b.Run("batch8", func(b *testing.B) {
		for b.Loop() {
			if _, err := PredictBatch(context.Background(), batch, plan, opt); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("ratios", func(b *testing.B) {
		var tRun, tValue, tBatch time.Duration
		for b.Loop() {
			t0 := time.Now()
			if _, _, err := Run(context.Background(), pulls, 548, plan, opt, nil); err != nil {
				b.Fatal(err)
			}
			t1 := time.Now()
			if _, err := Value(context.Background(), pulls, 548, plan, sheet, opt, nil); err != nil {
				b.Fatal(err)
			}
			t2 := time.Now()
			if _, err := PredictBatch(context.Background(), batch, plan, opt); err != nil {
				b.Fatal(err)
			}
			tRun, tValue, tBatch = tRun+t1.Sub(t0), tValue+t2.Sub(t1), tBatch+time.Since(t2)
		}
		b.ReportMetric(float64(tValue)/float64(tRun), "value/run")
		b.ReportMetric(float64(tBatch)/float64(tRun), "batch8/run")
	})
	ms, _ := synthHistory(b, 7, 40, weighedAll)
	b.Run("calibrate40", func(b *testing.B) {
		for b.Loop() {
			if _, err := Calibrate(calibLine(), ms, CalibrateOptions{}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
