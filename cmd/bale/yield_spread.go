package main

import (
	"baleassay/assess"
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"baleassay/yield"
)

// driverJSON is one row of the sensitivity table (see README).
type driverJSON struct {
	Input            string  `json:"input"`
	Kind             string  `json:"kind"`
	FlakeSD          float64 `json:"flake_sd_kg"`
	GlycolysateSD    float64 `json:"glycolysate_sd_kg"`
	HydroxylSD       float64 `json:"hydroxyl_sd"`
	FlakeShare       float64 `json:"flake_share"`
	GlycolysateShare float64 `json:"glycolysate_share"`
	HydroxylShare    float64 `json:"hydroxyl_share"`
}

func driversJSON(ds []yield.Driver) []driverJSON {
	out := make([]driverJSON, 0, len(ds))
	for _, d := range ds {
		out = append(out, driverJSON{d.Name, d.Kind.String(), d.FlakeSD, d.GlycolysateSD, d.OHVSD, d.FlakeShare, d.GlycolysateShare, d.HydroxylShare})
	}
	return out
}

// addSpread fills the fields of a yield output that say how the audit's
// uncertainty was carried.
func addSpread(out *yieldJSON, mc yield.MCResult, drivers []yield.Driver, plan yield.Plan) {
	out.Spread = mc.Spread.String()
	out.TargetPET = summaryOf(mc.TargetPET)
	out.Sensitivity = driversJSON(drivers)
	if plan.Conversion.Varies() {
		out.ConversionRange = &[2]float64{plan.Conversion.Lo, plan.Conversion.Hi}
	}
	if plan.StripEG.Varies() {
		out.StripEGRange = &[2]float64{plan.StripEG.Lo, plan.StripEG.Hi}
	}
}

// printSpread says where the spread comes from: the target-PET share as
// drawn (its P5–P95 is the audit's 90 % interval), or that one pull
// gives none; then what drives the spread most.
func printSpread(w io.Writer, o yieldJSON, unit string) {
	switch o.Spread {
	case yield.SpreadNone.String():
		fmt.Fprintf(w, "One %s: no spread of the audit can be given; the P10–P90 carry only the line's and the recipe's ranges.\n", unit)
	case yield.SpreadKnown.String():
		fmt.Fprintln(w, "Sorted whole: the composition is known; the P10–P90 carry only the line's and the recipe's ranges.")
	default:
		if o.TargetPET.P5 != nil {
			fmt.Fprintf(w, "Target PET as drawn: P5 %.2f %%, P50 %.2f %%, P95 %.2f %% (the audit's 90 %% interval, from its own estimator)\n",
				100**o.TargetPET.P5, 100**o.TargetPET.P50, 100**o.TargetPET.P95)
		}
	}
	if len(o.Sensitivity) == 0 {
		return
	}
	fmt.Fprintln(w, "\nWhat drives the spread (each input alone; measure the top ones better first):")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "  input\tflake SD kg\tshare\tglycolysate SD kg\tshare\tOHV SD\n")
	for i, d := range o.Sensitivity {
		if i == 6 {
			fmt.Fprintf(tw, "  … %d more in --json\t\t\t\t\t\n", len(o.Sensitivity)-6)
			break
		}
		fmt.Fprintf(tw, "  %s\t%.2f\t%.0f %%\t%.2f\t%.0f %%\t%.2f\n", d.Input, d.FlakeSD, 100*d.FlakeShare, d.GlycolysateSD, 100*d.GlycolysateShare, d.HydroxylSD)
	}
	tw.Flush()
}

// shareFlag is a share given as one value (0.95) or as a range LO:HI
// (0.9:0.98) that the Monte Carlo draws from.
type shareFlag struct {
	p     yield.Param
	isSet bool
}

func (f *shareFlag) String() string {
	if f == nil || !f.p.IsSet() {
		return ""
	}
	if f.p.Varies() {
		return fmt.Sprintf("%s:%s", assess.Plain(f.p.Lo), assess.Plain(f.p.Hi))
	}
	return fmt.Sprint(f.p.Lo)
}

func (f *shareFlag) Set(s string) error {
	lo, hi, isRange := strings.Cut(s, ":")
	a, err := assess.ParseDecimal(strings.TrimSpace(lo))
	if err != nil {
		return fmt.Errorf("%q: give a share like 0.95, or a range like 0.9:0.98", s)
	}
	b := a
	if isRange {
		if b, err = assess.ParseDecimal(strings.TrimSpace(hi)); err != nil {
			return fmt.Errorf("%q: give a range as LOW:HIGH, like 0.9:0.98", s)
		}
	}
	f.p, f.isSet = yield.Range(a, b), true
	return nil
}

func newShareFlag(fs *flag.FlagSet, name string, def float64, usage string) *shareFlag {
	f := &shareFlag{p: yield.Fixed(def)}
	fs.Var(f, name, usage)
	return f
}
