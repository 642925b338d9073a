package desk

import (
	"context"
	"fmt"
	"strings"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

// Step is where a long job is.
type Step uint8

// The steps of long jobs.
const (
	StepDraws    Step = iota + 1 // Monte Carlo draws
	StepReading                  // import: reading and checking a file
	StepApplying                 // import: writing a file's records
	StepDone                     // a file (or the job) finished
	StepRefused                  // a file was refused
)

func (s Step) String() string {
	switch s {
	case StepDraws:
		return "draws"
	case StepReading:
		return "reading"
	case StepApplying:
		return "applying"
	case StepDone:
		return "done"
	case StepRefused:
		return "refused"
	}
	return fmt.Sprintf("step(%d)", uint8(s))
}

// Progress reports how far a long job is. Callbacks run on the job's
// goroutine: a UI posts them to its own loop.
type Progress struct {
	Step   Step
	Done   int    // draws or files done
	Of     int    // draws or files in all
	File   string // import: the file
	Events int    // import: events in the file
	// import: events applied from the files before this one
	EventsSoFar int
}

// Caution is a safety note that goes with an output.
type Caution uint8

// The cautions.
const (
	CautionCaustic Caution = iota + 1
	CautionHotGlycol
	CautionPVC
	CautionIsocyanate
	CautionBale
)

// CautionBaleText goes with every audit and every bale saved.
const CautionBaleText = "Caution: bale ties are under tension and bales spring apart when cut: cut from the side, wear eye protection, never stand under a lifted bale. Hazardous containers, sharps and lithium batteries may be inside. Local codes rule."

func (c Caution) String() string {
	switch c {
	case CautionCaustic:
		return "caustic"
	case CautionHotGlycol:
		return "hot_glycol"
	case CautionPVC:
		return "pvc"
	case CautionIsocyanate:
		return "isocyanate"
	case CautionBale:
		return "bale"
	}
	return fmt.Sprintf("caution(%d)", uint8(c))
}

// Text is the caution as the commands print it.
func (c Caution) Text() string {
	switch c {
	case CautionCaustic:
		return yield.CautionCaustic
	case CautionHotGlycol:
		return yield.CautionHotGlycol
	case CautionPVC:
		return yield.CautionPVC
	case CautionIsocyanate:
		return yield.CautionIsocyanate
	case CautionBale:
		return CautionBaleText
	}
	return ""
}

// Plan puts together a yield plan from a line (a stored line's name, a
// built-in's, or a JSON file; "" for the built-in line) and a flake spec
// (a JSON file, "none", or "" for the built-in one). A nil *Desk knows no
// stored lines.
func (d *Desk) Plan(line, flakeSpec string) (yield.Plan, error) {
	plan := yield.DefaultPlan()
	if line != "" && line != plan.Line.Line().Name {
		var l yield.Line
		body, found, err := d.setting(SettingLine, line)
		switch {
		case err != nil:
			return plan, err
		case found:
			l, err = yield.ReadLine(strings.NewReader(string(body)), line)
		default:
			l, err = yield.ReadLineFile(line)
		}
		if err != nil {
			return plan, err
		}
		if plan.Line, err = yield.Compile(l); err != nil {
			return plan, err
		}
	}
	switch flakeSpec {
	case "":
	case NoSpec:
		plan.Spec = nil
	default:
		s, err := yield.ReadFlakeSpecFile(flakeSpec)
		if err != nil {
			return plan, err
		}
		plan.Spec = &s
	}
	return plan, nil
}

// YieldOptions tune a Monte Carlo yield run.
type YieldOptions struct {
	MC yield.MCOptions
	// Sensitivity also ranks the inputs that drive the spread
	// (YieldRun.Drivers).
	Sensitivity bool
}

// SinkGroup is what sinks with the PET at one bath density: the stages
// (1-based) of that density and the categories, with the share of each
// that stays with the PET.
type SinkGroup struct {
	BathDensity float64
	Stages      []int
	With        []yield.BathShare
}

// YieldRun is a bale through the line and the reactor: the point
// estimate, the spread of the draws, and what a front end shows with it.
type YieldRun struct {
	BaleKg    float64
	Plan      yield.Plan
	Report    yield.Report
	MC        yield.MCResult
	FlakePass bool // every flake-spec limit met at the point estimate (true without a spec)
	Sinks     []SinkGroup
	Cautions  []Caution
	// Drivers rank what drives the spread of flake and polyol, with
	// YieldOptions.Sensitivity.
	Drivers []yield.Driver
}

// CautionText is a caution as it applies to this run: the hot-glycol
// caution names the glycol charged, its flash and boiling points.
func (r YieldRun) CautionText(c Caution) string {
	if c == CautionHotGlycol {
		if g, err := yield.LookupGlycol(r.Plan.Recipe.Glycol); err == nil {
			return yield.CautionHotGlycolFor(g)
		}
	}
	return c.Text()
}

// YieldPulls runs pulls through the plan: one evaluation and the Monte
// Carlo, cancellable through ctx, with progress (may be nil). It may be
// called on a nil *Desk.
func (d *Desk) YieldPulls(ctx context.Context, pulls []assess.Pull, baleKg float64, plan yield.Plan, opt YieldOptions, progress func(Progress)) (YieldRun, error) {
	if err := checkBaleKg(pulls, baleKg, true); err != nil {
		return YieldRun{}, err
	}
	var cb func(done, of int)
	if progress != nil {
		cb = func(done, of int) { progress(Progress{Step: StepDraws, Done: done, Of: of}) }
	}
	rep, mc, err := yield.Run(ctx, pulls, baleKg, plan, opt.MC, cb)
	if err != nil {
		return YieldRun{}, err
	}
	run := newYieldRun(baleKg, plan, rep, mc)
	if opt.Sensitivity {
		est, err := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: baleKg}, assess.Options{})
		if err != nil {
			return run, err
		}
		if run.Drivers, err = yield.Sensitivity(est.Spread, baleKg, plan, opt.MC); err != nil {
			return run, err
		}
	}
	return run, nil
}

// newYieldRun gathers what a front end shows with a yield: the overall
// flake-spec pass, what sinks with the PET and the cautions that apply.
func newYieldRun(massKg float64, plan yield.Plan, rep yield.Report, mc yield.MCResult) YieldRun {
	run := YieldRun{BaleKg: massKg, Plan: plan, Report: rep, MC: mc, FlakePass: true,
		Cautions: []Caution{CautionCaustic, CautionHotGlycol}}
	for _, c := range rep.Checks {
		run.FlakePass = run.FlakePass && c.Pass
	}
	if rep.Glycolysate.HClKg > 0 {
		run.Cautions = append(run.Cautions, CautionPVC)
	}
	run.Sinks = sinkGroups(plan.Line.BathNotes(rep.Balance.Flake[:len(rep.BaleComposition)]))
	return run
}

// YieldBale runs a stored bale's pulls through the plan.
func (d *Desk) YieldBale(ctx context.Context, text string, plan yield.Plan, opt YieldOptions, progress func(Progress)) (record.EntityID, YieldRun, error) {
	a, err := d.AuditBale(text, AuditOptions{Spec: NoSpec})
	if err != nil {
		return a.Bale, YieldRun{}, err
	}
	run, err := d.YieldPulls(ctx, a.Input.Pulls, a.Record.GrossKg, plan, opt, progress)
	return a.Bale, run, err
}

// sinkGroups gathers, once per bath density at which the PET sinks, the
// contaminants left in the flake that sink with it.
func sinkGroups(notes []yield.BathNote) []SinkGroup {
	var out []SinkGroup
	at := map[float64]int{}
	for _, n := range notes {
		if n.Keep != yield.SideSink || len(n.WithPET) == 0 {
			continue
		}
		i, ok := at[n.BathDensity]
		if !ok {
			i = len(out)
			at[n.BathDensity] = i
			out = append(out, SinkGroup{BathDensity: n.BathDensity, With: n.WithPET})
		}
		out[i].Stages = append(out[i].Stages, n.Index)
	}
	return out
}
