package yield

import (
	"math"
	"sort"

	"baleassay/assess"
)

// InputKind says what kind of input a sensitivity row is about.
type InputKind int

// The kinds of input.
const (
	InputAudit      InputKind = iota + 1 // the sampling error of the pulls
	InputLine                            // a ranged parameter of the line profile
	InputConversion                      // the share of PET that dissolves
	InputStripEG                         // the share of liberated EG stripped
)

func (k InputKind) String() string {
	switch k {
	case InputAudit:
		return "audit"
	case InputLine:
		return "line"
	case InputConversion:
		return "conversion"
	case InputStripEG:
		return "strip_eg"
	}
	return "InputKind(?)"
}

// Driver is one input's part in the spread of the outputs: the standard
// deviation of flake kg, glycolysate kg and hydroxyl value when only
// this input varies, and its share of the sum of those variances.
type Driver struct {
	Kind InputKind
	// Name says which input: "audit: sampling of the pulls", a line
	// parameter as "stage 6 (sink_float, …): efficiency", or the recipe
	// field.
	Name                          string
	FlakeSD, GlycolysateSD, OHVSD float64
	FlakeShare, GlycolysateShare  float64
	HydroxylShare                 float64
}

// SensitivityDraws is the number of draws per input unless the run's
// own draws are fewer.
const SensitivityDraws = 2000

// Sensitivity ranks the inputs that drive the spread of flake and
// polyol: for each varying input (the audit's sampling error, every
// ranged line parameter, the conversion and EG-stripping ranges) the
// Monte Carlo is run with that input alone varying and the rest at their
// estimate or midpoint, and the variance it leaves is that input's part.
// For a model additive in its inputs this is the first-order variance
// V[E(Y|X_i)] of each input (Saltelli et al., Global Sensitivity
// Analysis: The Primer, Wiley 2008, ch. 1), and the shares add to 1;
// interactions make the sum of the parts differ from the joint variance.
// The rows are sorted by the mean of the flake and glycolysate shares,
// largest first: what to measure better first.
func Sensitivity(sp assess.Spread, massKg float64, plan Plan, opt MCOptions) ([]Driver, error) {
	if err := plan.validate(); err != nil {
		return nil, err
	}
	draws := SensitivityDraws
	if opt.Draws > 0 && opt.Draws < draws {
		draws = opt.Draws
	}
	base := newSimulator(sp, massKg, plan, opt)
	type input struct {
		kind  InputKind
		name  string
		param int
	}
	var inputs []input
	if base.audit {
		inputs = append(inputs, input{InputAudit, "audit: sampling of the pulls", -1})
	}
	for _, i := range base.vary {
		inputs = append(inputs, input{InputLine, plan.Line.names[i], i})
	}
	if base.conv {
		inputs = append(inputs, input{InputConversion, "glycolysis: conversion", -1})
	}
	if base.strip {
		inputs = append(inputs, input{InputStripEG, "glycolysis: strip_eg", -1})
	}
	out := make([]Driver, 0, len(inputs))
	flake, product, ohv := make([]float64, draws), make([]float64, draws), make([]float64, 0, draws)
	for k, in := range inputs {
		s := newSimulator(sp, massKg, plan, MCOptions{Seed: opt.Seed + uint64(k) + 1, FixedLine: true})
		s.audit = in.kind == InputAudit && base.audit
		s.conv, s.strip = in.kind == InputConversion, in.kind == InputStripEG
		if in.kind == InputLine {
			s.vary = []int{in.param}
		}
		ohv = ohv[:0]
		for d := range draws {
			f, p, h := s.draw()
			flake[d], product[d] = f, p
			if !math.IsNaN(h) {
				ohv = append(ohv, h)
			}
		}
		out = append(out, Driver{Kind: in.kind, Name: in.name, FlakeSD: sd(flake), GlycolysateSD: sd(product), OHVSD: sd(ohv)})
	}
	var vf, vg, vh float64
	for _, d := range out {
		vf += d.FlakeSD * d.FlakeSD
		vg += d.GlycolysateSD * d.GlycolysateSD
		vh += d.OHVSD * d.OHVSD
	}
	share := func(sd, v float64) float64 {
		if v == 0 {
			return 0
		}
		return sd * sd / v
	}
	for i := range out {
		out[i].FlakeShare = share(out[i].FlakeSD, vf)
		out[i].GlycolysateShare = share(out[i].GlycolysateSD, vg)
		out[i].HydroxylShare = share(out[i].OHVSD, vh)
	}
	sort.SliceStable(out, func(i, j int) bool {
		return out[i].FlakeShare+out[i].GlycolysateShare > out[j].FlakeShare+out[j].GlycolysateShare
	})
	return out, nil
}

// sd is the sample standard deviation, 0 for fewer than two values or
// when it is rounding noise (below 1e-9 of the mean).
func sd(x []float64) float64 {
	if len(x) < 2 {
		return 0
	}
	m := 0.0
	for _, v := range x {
		m += v
	}
	m /= float64(len(x))
	ss := 0.0
	for _, v := range x {
		ss += (v - m) * (v - m)
	}
	v := math.Sqrt(ss / float64(len(x)-1))
	if v <= 1e-9*math.Abs(m) {
		return 0
	}
	return v
}
