package yield

import (
	"fmt"
	"math"

	"baleassay/assess"
)

// eval runs the line once. in holds the bale's kg by catalogue index;
// par the parameter values; st (length NumComponents) receives the flake
// by component and streams (length of m.streams) the reject kg, both
// overwritten. It returns the water held in the flake and the process
// water the dryers left in it (an input of the balance). It allocates
// nothing.
//
// Each stage sends away, from every component c, the share
//
//	r_c = Σ coef·value  (removal + pet_loss, or the sink–float shares)
//
// so that kg out = kg in · (1 − r_c) and the stream gains kg in · r_c;
// grinding moves dust_made of the PET to dust; drying evaporates the
// free liquid and the water held so far and leaves moisture m in the
// flake: water = m/(1 − m) · dry mass. Material a later stage takes out
// carries its share of that water with it.
func (m *Model) eval(in, par, st, streams []float64) (water, processWater float64) {
	copy(st, in)
	st[m.nCat] = 0
	st[m.nCat+1] = 0
	if m.glue >= 0 {
		g := st[m.labels] * par[m.glue]
		st[m.labels] -= g
		st[m.nCat] = g
	}
	for i := range streams {
		streams[i] = 0
	}
	dry := -1.0 // dry mass, tracked once a dryer has run
	for si := range m.stages {
		s := &m.stages[si]
		sent := 0.0
		for _, o := range s.ops {
			r := o.t[0].coef*par[o.t[0].param] + o.t[1].coef*par[o.t[1].param]
			moved := st[o.c] * r
			st[o.c] -= moved
			sent += moved
		}
		streams[s.stream] += sent
		if dry >= 0 && sent > 0 {
			// Flake taken out after a dryer takes its moisture along.
			w := water * sent / dry
			dry -= sent
			water -= w
			streams[s.stream] += w
		}
		switch s.kind {
		case StageGrind:
			if s.dust >= 0 {
				d := par[s.dust]
				for _, c := range petCats {
					moved := st[c] * d
					st[c] -= moved
					st[m.nCat+1] += moved
				}
			}
		case StageDry:
			streams[s.stream] += water + st[m.liquid]
			st[m.liquid] = 0
			dry = 0
			for _, v := range st {
				dry += v
			}
			mo := par[s.moist]
			water = mo / (1 - mo) * dry
			processWater += water
		}
	}
	return water, processWater
}

// petCats lists the catalogue indices of target PET.
var petCats = func() []int {
	var out []int
	for i := 0; i < assess.NumCategories(); i++ {
		if assess.CategoryAt(i).IsTargetPET() {
			out = append(out, i)
		}
	}
	return out
}()

// Stream is one reject stream of the line.
type Stream struct {
	Name string
	Kg   float64
}

// Balance is the mass balance of one bale through the line.
type Balance struct {
	// BaleKg is what went in; ProcessWaterKg the water the dryers left
	// in the flake, the only other input.
	BaleKg, ProcessWaterKg float64
	// FlakeKg is the clean flake as delivered (moisture included),
	// FlakeDryKg without moisture, FlakeShare = FlakeKg / BaleKg.
	FlakeKg, FlakeDryKg, FlakeShare float64
	// PETKg is the target PET in the flake (dust included), MoistureKg
	// the water and free liquid in it.
	PETKg, MoistureKg float64
	// Flake is the flake's dry content by component (ComponentKey).
	Flake []float64
	// Streams are the reject streams in the order the line first feeds
	// them.
	Streams []Stream
	// Closure is |inputs − outputs| / inputs; the model keeps it below
	// 1e-9.
	Closure float64
}

// ClosureTolerance is the largest relative imbalance Run accepts.
const ClosureTolerance = 1e-9

// Run puts one bale of known composition (kg by catalogue index) through
// the line at the parameters' midpoints.
func (m *Model) Run(baleKg []float64) (Balance, error) {
	if len(baleKg) != m.nCat {
		return Balance{}, fieldErr("bale", "kg", ErrBadAudit, "composition has %d categories, the catalogue %d", len(baleKg), m.nCat)
	}
	total := 0.0
	for i, v := range baleKg {
		if err := checkNonNegative("bale", assess.CategoryAt(i).Key, v); err != nil {
			return Balance{}, err
		}
		total += v
	}
	if total <= 0 {
		return Balance{}, fieldErr("bale", "kg", ErrBadAudit, "the bale has no mass")
	}
	par := make([]float64, len(m.params))
	for i, p := range m.params {
		par[i] = p.Mid()
	}
	return m.balance(baleKg, par)
}

func (m *Model) balance(baleKg, par []float64) (Balance, error) {
	st := make([]float64, NumComponents())
	streams := make([]float64, len(m.streams))
	water, pw := m.eval(baleKg, par, st, streams)
	b := Balance{ProcessWaterKg: pw, Flake: st}
	for _, v := range baleKg {
		b.BaleKg += v
	}
	out := water
	for c, v := range st {
		out += v
		if c == m.liquid {
			continue
		}
		b.FlakeDryKg += v
		if isPET(c) {
			b.PETKg += v
		}
	}
	b.MoistureKg = water + st[m.liquid]
	b.FlakeKg = b.FlakeDryKg + b.MoistureKg
	b.FlakeShare = b.FlakeKg / b.BaleKg
	for i, name := range m.streams {
		b.Streams = append(b.Streams, Stream{name, streams[i]})
		out += streams[i]
	}
	in := b.BaleKg + pw
	b.Closure = math.Abs(in-out) / in
	if !(b.Closure <= ClosureTolerance) {
		return b, fmt.Errorf("%w: inputs %s kg, outputs %s kg (relative %s)", ErrNotClosed, assess.Sig(in, 9), assess.Sig(out, 9), assess.Sig(b.Closure, 2))
	}
	return b, nil
}

// StreamKg returns the kg of a named reject stream (0 if the line has none).
func (b Balance) StreamKg(name string) float64 {
	for _, s := range b.Streams {
		if s.Name == name {
			return s.Kg
		}
	}
	return 0
}

// ResidualPPM returns every non-PET component left in the flake in mg
// per kg of dry flake, by component key (zeros included).
func (b Balance) ResidualPPM() map[string]float64 {
	out := make(map[string]float64)
	liquid, _ := assess.CategoryIndex("liquid")
	for c, v := range b.Flake {
		if isPET(c) || c == liquid {
			continue
		}
		out[ComponentKey(c)] = ppm(v, b.FlakeDryKg)
	}
	return out
}

// Composition returns the flake's dry composition as mass shares by
// component key.
func (b Balance) Composition() map[string]float64 {
	out := make(map[string]float64)
	liquid, _ := assess.CategoryIndex("liquid")
	for c, v := range b.Flake {
		if c == liquid {
			continue
		}
		if b.FlakeDryKg > 0 {
			out[ComponentKey(c)] = v / b.FlakeDryKg
		}
	}
	return out
}

func ppm(kg, of float64) float64 {
	if of <= 0 {
		return 0
	}
	return kg / of * 1e6
}
