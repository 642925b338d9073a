package demo

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

// baleTruth is a demo bale as it really is: the composition its pulls
// were drawn from.
type baleTruth struct {
	id    record.EntityID
	site  int
	rx    time.Time
	kg    float64
	share map[string]float64
}

// demoPlantLine is the invented plant that ran the demo bales: the
// built-in line with every share at its midpoint, except that its flake
// sorter throws out more good flake (pet_loss 0.03, where the profile
// says 0.005–0.02) and its caustic wash loses PET at the top of its
// range (0.015, profile 0.005–0.015). The demo's measured batches come
// from this line, so 'bale calibrate --demo' has something to find.
func demoPlantLine() yield.Line {
	l := yield.CloneLine(yield.BuiltinLine())
	for _, ref := range yield.LineParams(l) {
		p, _ := ref.Get(l)
		ref.Set(&l, yield.Fixed(p.Mid()))
	}
	for i, s := range l.Stages {
		switch {
		case s.Kind == yield.StageSort && s.Stream == "flake_sort_rejects":
			l.Stages[i].PETLoss = yield.Fixed(0.03)
		case s.Kind == yield.StageCausticWash:
			l.Stages[i].PETLoss = yield.Fixed(0.015)
		}
	}
	return l
}

// demoMeasured makes the lab's measured batches: every fortnight, the
// bales of one site received in it (three or more) run together through
// the demo plant; the flake, its moisture and three reject streams are
// weighed with a scale good to 0.5 % ± 1 kg, and every other batch's
// flake is glycolysed (DEG 1:1) and its hydroxyl and acid values
// measured. The acid value carries 0.6 mg KOH/g of acids the model does
// not know (from hydrolysis; illustrative). All figures are invented.
func demoMeasured(seed uint64, truths []baleTruth, end time.Time, lab record.DeviceID,
	add func(record.Event) (record.EventID, error), newID func(time.Time) record.EntityID) (int, error) {
	if len(truths) == 0 {
		return 0, nil
	}
	plant, err := yield.Compile(demoPlantLine())
	if err != nil {
		return 0, err
	}
	r := rand.New(rand.NewPCG(seed, 0x3ea5))
	start := truths[0].rx
	groups := map[[2]int][]baleTruth{}
	var keys [][2]int
	for _, b := range truths {
		k := [2]int{int(b.rx.Sub(start).Hours() / (24 * 14)), b.site}
		if _, ok := groups[k]; !ok {
			keys = append(keys, k)
		}
		groups[k] = append(groups[k], b)
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i][0] != keys[j][0] {
			return keys[i][0] < keys[j][0]
		}
		return keys[i][1] < keys[j][1]
	})
	weigh := func(kg float64) float64 {
		return math.Max(0, math.Round(2*(kg*(1+0.005*r.NormFloat64())+r.NormFloat64()))/2)
	}
	pvc, _ := assess.CategoryIndex("pvc")
	n := 0
	for bi, k := range keys {
		bs := groups[k]
		if len(bs) < 3 {
			continue
		}
		last := bs[len(bs)-1].rx
		ran := time.Date(last.Year(), last.Month(), last.Day(), 6, 0, 0, 0, time.UTC).AddDate(0, 0, 2)
		at := ran.Add(10 * time.Hour)
		if !at.Before(end) {
			continue
		}
		comp := make([]float64, assess.NumCategories())
		var ids []record.EntityID
		for _, b := range bs {
			ids = append(ids, b.id)
			for key, s := range pullExpectation(b.share, r) {
				j, _ := assess.CategoryIndex(key)
				comp[j] += s * b.kg
			}
		}
		bal, err := plant.Run(comp)
		if err != nil {
			return n, err
		}
		moist := math.Round(100*(100*bal.MoistureKg/bal.FlakeKg+0.1*r.NormFloat64())) / 100
		m := &record.MeasuredRecord{Line: yield.BuiltinLineName, Bales: ids, RanMs: ran.UnixMilli(), FlakeKg: weigh(bal.FlakeKg),
			MoisturePct: &moist, StreamsKg: map[string]float64{}, Notes: fmt.Sprintf("demo batch %d (invented)", n+1)}
		for _, s := range []string{"sorted_out", "floats", "flake_sort_rejects"} {
			m.StreamsKg[s] = weigh(bal.StreamKg(s))
		}
		if bi%2 == 0 {
			charge := math.Round(math.Min(1000, 0.9*bal.FlakeDryKg))
			k := charge / bal.FlakeDryKg
			rec := yield.DefaultRecipe(bal.PETKg*k, "DEG", 0)
			rec.Ratio, rec.GlycolKg = 0, charge
			rec.PVCKg = bal.Flake[pvc] * k
			g, err := yield.Glycolyse(rec)
			if err != nil {
				return n, err
			}
			av := math.Max(0, math.Round(100*(g.AcidValuePVC+0.6+0.1*r.NormFloat64()))/100)
			m.Reactor = &record.ReactorRecord{FlakeKg: charge, Glycol: "DEG", GlycolKg: charge, ProductKg: weigh(g.GlycolysateKg),
				HydroxylValue: math.Round(10*(g.HydroxylValue+4*r.NormFloat64())) / 10, HydroxylMethod: record.MethodD4274,
				AcidValue: &av, AcidMethod: record.MethodD4662}
		}
		if _, err := add(record.Event{Entity: newID(at), Kind: record.KindMeasured, Device: lab, Clock: record.HLC{WallMs: at.UnixMilli()}, Measured: m}); err != nil {
			return n, err
		}
		n++
	}
	return n, nil
}

// pullExpectation is the composition a bale's pulls estimate on average:
// demoPull draws each category's weight with a log-normal factor and
// normalises, so a pull's expected shares differ a little from comp
// (Jensen's inequality). The bale "as it is" is what its pulls are
// unbiased samples of: the mean of 2,000 such normalised draws.
func pullExpectation(comp map[string]float64, r *rand.Rand) map[string]float64 {
	const draws = 2000
	keys := record.SortedKeys(comp)
	out := make(map[string]float64, len(comp))
	w := make([]float64, len(keys))
	for range draws {
		tot := 0.0
		for i, k := range keys {
			w[i] = comp[k] * math.Exp(0.3*r.NormFloat64()-0.045)
			tot += w[i]
		}
		for i, k := range keys {
			out[k] += w[i] / tot / draws
		}
	}
	return out
}
