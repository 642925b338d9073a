package yield

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"baleassay/assess"
)

// calibLine is an invented line whose uncertain shares are ranges; each
// stage with a ranged share feeds its own reject stream, so weighing the
// streams can tell the stages apart.
func calibLine() Line {
	return Line{Name: "calibration test line", Stages: []Stage{
		{Kind: StageSort, Name: "bottle sort", Removal: map[string]Param{
			"pvc": Range(0.80, 0.95), "hdpe": Range(0.70, 0.90), "hazard": Fixed(1)}, PETLoss: Range(0.01, 0.04)},
		{Kind: StageGrind, PETLoss: Fixed(0.005), DustMade: Fixed(0.01)},
		{Kind: StageSinkFloat, BathDensity: 1.0, Efficiency: Range(0.94, 0.99), ProductLoss: Range(0.002, 0.010)},
		{Kind: StageCausticWash, Removal: map[string]Param{
			"paper": Fixed(0.95), "fines": Fixed(0.95), "liquid": Fixed(1), "labels": Fixed(0.5)}, PETLoss: Range(0.005, 0.02)},
		{Kind: StageDry, Moisture: Range(0.005, 0.015)},
		{Kind: StageScreen, Removal: map[string]Param{"dust": Fixed(0.9), "fines": Fixed(0.8)}, PETLoss: Range(0.001, 0.006)},
	}}
}

// trueShares are the invented "true" efficiencies of the plant behind
// the synthetic history: off the ranges' midpoints, the sort's PET loss
// above its stated range.
var trueShares = map[string]float64{
	"stage 1 removal.pvc":  0.91,
	"stage 1 removal.hdpe": 0.74,
	"stage 1 pet_loss":     0.046,
	"stage 3 efficiency":   0.955,
	"stage 3 product_loss": 0.0085,
	"stage 4 pet_loss":     0.017,
	"stage 5 moisture":     0.0125,
	"stage 6 pet_loss":     0.002,
}

func trueLine(t testing.TB, l Line) Line { return lineWith(l, trueShares) }

// lineWith is l with the named shares fixed at the given values.
func lineWith(l Line, shares map[string]float64) Line {
	tl := CloneLine(l)
	for _, ref := range LineParams(l) {
		if v, ok := shares[ref.String()]; ok {
			ref.Set(&tl, Fixed(v))
		}
	}
	return tl
}

// synthBale draws an invented bale: a composition around the typical
// bale with the contaminants scaled up to threefold, and pulls sampled
// from it with lognormal noise per category (σ = 0.5, mean 1), so that
// the audit's estimate differs from the truth as a real audit's does.
func synthBale(t testing.TB, rng *rand.Rand, nPulls int) (BatchBale, []float64) {
	base := typicalBale(t)
	share := make([]float64, len(base))
	total := 0.0
	for j, v := range base {
		k := 1.0
		switch assess.CategoryAt(j).Key {
		case "pvc", "hdpe":
			k = 0.2 + 2.8*rng.Float64()
		case "closures", "labels", "pp":
			k = 0.5 + rng.Float64()
		case "fines", "liquid", "paper":
			k = 0.5 + 1.5*rng.Float64()
		}
		share[j] = v * k
		total += share[j]
	}
	baleKg := 450 + 200*rng.Float64()
	trueKg := make([]float64, len(share))
	for j := range share {
		share[j] /= total
		trueKg[j] = share[j] * baleKg
	}
	const sigma = 0.5
	pulls := make([]assess.Pull, nPulls)
	for i := range pulls {
		p := assess.NewPull(fmt.Sprintf("P%d", i+1))
		size := 20 + 15*rng.Float64()
		for j, s := range share {
			p.Kg[j] = s * size * math.Exp(sigma*rng.NormFloat64()-sigma*sigma/2)
		}
		pulls[i] = p
	}
	return BatchBale{Pulls: pulls, BaleKg: baleKg}, trueKg
}

// synthHistory makes n measured batches of 6–10 bales: the truth run
// through the true line, weighed with the default measurement error
// (0.5 % ⊕ 1 kg, moisture ± 0.1 point), and the prediction's audit
// covariance from PredictBatch.
func synthHistory(t testing.TB, seed uint64, n int, observe []Observable) ([]Measurement, []Batch) {
	return synthHistoryOf(t, trueShares, seed, n, observe)
}

func synthHistoryOf(t testing.TB, shares map[string]float64, seed uint64, n int, observe []Observable) ([]Measurement, []Batch) {
	rng := rand.New(rand.NewPCG(seed, 99))
	truth, err := Compile(lineWith(calibLine(), shares))
	if err != nil {
		t.Fatal(err)
	}
	plan := DefaultPlan()
	if plan.Line, err = Compile(calibLine()); err != nil {
		t.Fatal(err)
	}
	var ms []Measurement
	var bs []Batch
	for i := range n {
		b := Batch{Observe: observe}
		sum := make([]float64, assess.NumCategories())
		for range 6 + rng.IntN(5) {
			bb, kg := synthBale(t, rng, 10)
			b.Bales = append(b.Bales, bb)
			for j, v := range kg {
				sum[j] += v
			}
		}
		bal, err := truth.Run(sum)
		if err != nil {
			t.Fatal(err)
		}
		vals := make([]float64, len(observe))
		for a, o := range observe {
			var v float64
			switch o.Kind {
			case ObsFlakeKg:
				v = bal.FlakeKg
			case ObsFlakeDryKg:
				v = bal.FlakeDryKg
			case ObsStreamKg:
				v = bal.StreamKg(o.Stream)
			}
			if o.Kind == ObsMoisturePct {
				vals[a] = 100*bal.MoistureKg/bal.FlakeKg + DefaultMoistureSD*rng.NormFloat64()
			} else {
				vals[a] = v*(1+DefaultScaleRelSD*rng.NormFloat64()) + DefaultScaleAbsKg*rng.NormFloat64()
			}
		}
		pred, err := PredictBatch(context.Background(), b, plan, MCOptions{Draws: 1500, Seed: uint64(i) + 1})
		if err != nil {
			t.Fatal(err)
		}
		ms = append(ms, Measurement{Composition: pred.Composition, Observe: observe, Values: vals, AuditCov: pred.AuditCov, ShareVar: pred.ShareVar})
		bs = append(bs, b)
	}
	return ms, bs
}

var weighedAll = []Observable{{Kind: ObsFlakeDryKg}, {Kind: ObsMoisturePct},
	{Kind: ObsStreamKg, Stream: "sorted_out"}, {Kind: ObsStreamKg, Stream: "floats"}, {Kind: ObsStreamKg, Stream: "fines"}}

// TestCalibrateRecoversTrueEfficiencies: on a synthetic history of 40
// batches whose true efficiencies are known (trueShares, one outside its
// stated range), the calibration recovers every share it claims to have
// learnt within three posterior standard deviations, learns the shares
// the weighed streams expose, and moves each towards the truth.
func TestCalibrateRecoversTrueEfficiencies(t *testing.T) {
	ms, _ := synthHistory(t, 7, 40, weighedAll)
	cal, err := Calibrate(calibLine(), ms, CalibrateOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !cal.Converged || cal.ProposalErr != nil {
		t.Fatalf("converged %v, proposal %v", cal.Converged, cal.ProposalErr)
	}
	t.Logf("χ² %.1f → %.1f on %d values; %d iterations", cal.ChiSqPrior, cal.ChiSqPost, cal.Observations, cal.Iterations)
	if len(cal.Params) != len(trueShares) {
		t.Fatalf("%d shares calibrated, want the %d ranged ones", len(cal.Params), len(trueShares))
	}
	for _, p := range cal.Params {
		truth := trueShares[p.Ref.String()]
		z := (p.Mean - truth) / p.SD
		t.Logf("%-22s prior %.4f±%.4f  true %.4f  recovered %.4f±%.4f  (z %+.2f, informed %.2f)", p.Ref, p.PriorMean, p.PriorSD, truth, p.Mean, p.SD, z, p.Informed)
		// Source: computed (the synthetic truth; 3σ is the noise bound).
		if math.Abs(z) > 3 {
			t.Errorf("%s: recovered %.4f ± %.4f, true %.4f: %.1f SD off", p.Ref, p.Mean, p.SD, truth, z)
		}
		if math.Abs(p.Mean-truth) > math.Abs(p.PriorMean-truth)+p.SD {
			t.Errorf("%s moved away from the truth: %.4f (prior %.4f, true %.4f)", p.Ref, p.Mean, p.PriorMean, truth)
		}
		if lo, hi := p.Proposed.Lo, p.Proposed.Hi; !(lo <= p.Mean && p.Mean <= hi) || math.Abs((hi-lo)/math.Sqrt(12)-p.SD) > 1e-9 && lo > 0 && hi < 1 {
			t.Errorf("%s: proposed [%g, %g] is not mean ± √3·SD of %g ± %g", p.Ref, lo, hi, p.Mean, p.SD)
		}
	}
	// The weighed sort stream, screen fines, dry flake and moisture expose
	// these: they must be learnt.
	for _, name := range []string{"stage 1 pet_loss", "stage 4 pet_loss", "stage 5 moisture", "stage 6 pet_loss"} {
		p := estimateOf(t, cal, name)
		if p.Informed < 0.5 {
			t.Errorf("%s: informed %.2f, want at least 0.5 from weighed streams", name, p.Informed)
		}
	}
	if cal.ChiSqPost >= cal.ChiSqPrior {
		t.Errorf("the fit did not improve: χ² %g → %g", cal.ChiSqPrior, cal.ChiSqPost)
	}
	// Source: computed. With the noise model right, χ²/values ≈ 1.
	if r := cal.ChiSqPost / float64(cal.Observations); r < 0.5 || r > 2 {
		t.Errorf("χ²/values = %.2f after the fit: the noise model is off", r)
	}
	if !strings.Contains(cal.Line.Note, "calibrated on 40 measured batches") {
		t.Errorf("note: %q", cal.Line.Note)
	}
}

// TestCalibrateFlakeOnly: with only the dry flake weighed, the stages'
// PET losses cannot be told apart, but their joint effect can: the
// calibrated line predicts the flake without bias, where the uncalibrated
// one is biased, and the losses come out correlated.
func TestCalibrateFlakeOnly(t *testing.T) {
	obs := []Observable{{Kind: ObsFlakeDryKg}}
	ms, bs := synthHistory(t, 11, 30, obs)
	cal, err := Calibrate(calibLine(), ms, CalibrateOptions{})
	if err != nil {
		t.Fatal(err)
	}
	before, after := agreeOn(t, calibLine(), ms, bs), agreeOn(t, cal.Line, ms, bs)
	t.Logf("dry flake bias before %.2f %% [%.1f, %.1f] kg, coverage %d/%d; after %.2f %% [%.1f, %.1f] kg, coverage %d/%d",
		100*before.BiasRel, before.BiasLow, before.BiasHigh, before.Inside, before.N, 100*after.BiasRel, after.BiasLow, after.BiasHigh, after.Inside, after.N)
	// Source: computed (the true line loses more PET than the profile's
	// midpoints: the uncalibrated prediction is too high).
	if !(before.BiasHigh < 0) {
		t.Errorf("uncalibrated bias interval [%g, %g] should lie below 0", before.BiasLow, before.BiasHigh)
	}
	if !(after.BiasLow <= 0 && 0 <= after.BiasHigh) {
		t.Errorf("calibrated bias interval [%g, %g] should hold 0", after.BiasLow, after.BiasHigh)
	}
	if math.Abs(after.BiasRel) > 0.25*math.Abs(before.BiasRel) {
		t.Errorf("relative bias %.4f after, %.4f before: not removed", after.BiasRel, before.BiasRel)
	}
	// The joint PET yield is learnt and recovered within the noise.
	truthYield := petYieldOf(t, trueLine(t, calibLine()))
	py := cal.PETYield
	t.Logf("PET yield prior %.4f ± %.4f, true %.4f, calibrated %.4f ± %.4f", py.PriorMean, py.PriorSD, truthYield, py.Mean, py.SD)
	// Source: computed (the synthetic truth; 3σ is the noise bound).
	if math.Abs(py.Mean-truthYield) > 3*py.SD || py.SD > 0.3*py.PriorSD {
		t.Errorf("PET yield %.4f ± %.4f, true %.4f (prior SD %.4f)", py.Mean, py.SD, truthYield, py.PriorSD)
	}
	for _, p := range cal.Params {
		if p.Ref.Field == "pet_loss" && p.Informed > 0.9 {
			t.Errorf("%s informed %.2f from the flake alone: a single total cannot pin one stage", p.Ref, p.Informed)
		}
	}
}

// petYieldOf is the PET share of 1,000 kg of clear PET that reaches the
// flake through l.
func petYieldOf(t *testing.T, l Line) float64 {
	t.Helper()
	m, err := Compile(l)
	if err != nil {
		t.Fatal(err)
	}
	in := make([]float64, assess.NumCategories())
	in[catIdx(t, "pet_clear")] = 1000
	b, err := m.Run(in)
	if err != nil {
		t.Fatal(err)
	}
	return b.PETKg / 1000
}

func estimateOf(t *testing.T, cal LineCalibration, name string) ParamEstimate {
	t.Helper()
	for _, p := range cal.Params {
		if p.Ref.String() == name {
			return p
		}
	}
	t.Fatalf("no estimate of %s", name)
	return ParamEstimate{}
}

// agreeOn predicts every batch with line l and compares with the first
// measured value of each.
func agreeOn(t *testing.T, l Line, ms []Measurement, bs []Batch) Agreement {
	t.Helper()
	plan := DefaultPlan()
	var err error
	if plan.Line, err = Compile(l); err != nil {
		t.Fatal(err)
	}
	var pairs []Pair
	for i, b := range bs {
		pred, err := PredictBatch(context.Background(), b, plan, MCOptions{Draws: 1500, Seed: uint64(i) + 1})
		if err != nil {
			t.Fatal(err)
		}
		pairs = append(pairs, Pair{Predicted: pred.Full[0], Measured: ms[i].Values[0]})
	}
	return Agree(pairs)
}

func TestCalibrateRefusals(t *testing.T) {
	ms, _ := synthHistory(t, 3, 2, []Observable{{Kind: ObsFlakeDryKg}})
	fixed := calibLine()
	for i := range fixed.Stages {
		fixed.Stages[i] = Stage{Kind: fixed.Stages[i].Kind, Name: fixed.Stages[i].Name, BathDensity: fixed.Stages[i].BathDensity,
			Efficiency: fixedIfSet(fixed.Stages[i].Efficiency), Moisture: fixedIfSet(fixed.Stages[i].Moisture)}
	}
	bad := ms[0]
	bad.Values = []float64{math.NaN()}
	neg := ms[0]
	neg.Values = []float64{-5}
	short := ms[0]
	short.AuditCov = nil
	glyc := ms[0]
	glyc.Observe = []Observable{{Kind: ObsHydroxylValue}}
	for _, c := range []struct {
		name string
		line Line
		ms   []Measurement
		opt  CalibrateOptions
		want error
	}{
		{"no batches", calibLine(), nil, CalibrateOptions{}, ErrCalibration},
		{"nothing ranged", fixed, ms, CalibrateOptions{}, ErrCalibration},
		{"NaN measured", calibLine(), []Measurement{bad}, CalibrateOptions{}, ErrBadNumber},
		{"negative measured", calibLine(), []Measurement{neg}, CalibrateOptions{}, ErrBadNumber},
		{"no covariance", calibLine(), []Measurement{short}, CalibrateOptions{}, ErrCalibration},
		{"reactor quantity", calibLine(), []Measurement{glyc}, CalibrateOptions{}, ErrCalibration},
		{"scale error in per cent", calibLine(), ms, CalibrateOptions{ScaleRelSD: 5}, ErrOutOfRange},
		{"negative moisture error", calibLine(), ms, CalibrateOptions{MoistureSD: -1}, ErrOutOfRange},
	} {
		if _, err := Calibrate(c.line, c.ms, c.opt); !errors.Is(err, c.want) {
			t.Errorf("%s: got %v, want %v", c.name, err, c.want)
		}
	}
}

func fixedIfSet(p Param) Param {
	if !p.IsSet() {
		return p
	}
	return Fixed(p.Mid())
}

// TestCalibrateHonestSD repeats the synthetic history twelve times, each
// with true shares drawn from the calibration's own prior (the check of
// Cook, Gelman & Rubin, J. Comput. Graph. Stat. 15 (2006) 675): if the
// posterior standard deviations are honest, the errors z = (recovered −
// true)/SD of every share over every run behave like standard normal
// draws, mean z² near 1 and about 95 % within ±2.
func TestCalibrateHonestSD(t *testing.T) {
	if testing.Short() {
		t.Skip("12 synthetic histories; run without -short")
	}
	var z2 float64
	n, within := 0, 0
	for seed := uint64(100); seed < 112; seed++ {
		rng := rand.New(rand.NewPCG(seed, 5))
		shares := map[string]float64{}
		for _, ref := range LineParams(calibLine()) {
			if p, _ := ref.Get(calibLine()); p.Varies() {
				shares[ref.String()] = clamp01(p.Mid() + (p.Hi-p.Lo)/math.Sqrt(12)*rng.NormFloat64())
			}
		}
		ms, _ := synthHistoryOf(t, shares, seed, 25, weighedAll)
		cal, err := Calibrate(calibLine(), ms, CalibrateOptions{})
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range cal.Params {
			z := (p.Mean - shares[p.Ref.String()]) / p.SD
			if math.Abs(z) > 2 {
				t.Logf("seed %d %s: true %.4f recovered %.4f ± %.4f (z %+.2f, informed %.2f)", seed, p.Ref, shares[p.Ref.String()], p.Mean, p.SD, z, p.Informed)
			}
			z2 += z * z
			n++
			if math.Abs(z) <= 2 {
				within++
			}
		}
	}
	t.Logf("%d estimates: mean z² %.2f, %d within ±2 SD (%.0f %%)", n, z2/float64(n), within, 100*float64(within)/float64(n))
	// Source: computed. χ² with 96 degrees of freedom lies within 0.6–1.5
	// times 96 with probability above 0.99 (for independent z); 95 % of
	// normal draws lie within ±2 (at least 85 % allowed for 96 draws).
	if m := z2 / float64(n); m < 0.6 || m > 1.5 {
		t.Errorf("mean z² = %.2f: the posterior SDs are not honest", m)
	}
	if float64(within) < 0.85*float64(n) {
		t.Errorf("only %d of %d within ±2 SD", within, n)
	}
}
