package yield

import (
	"fmt"
	"strings"

	"baleassay/assess"
)

// term is one share of a component that a stage sends away: coef times
// the value of parameter param.
type term struct {
	param int
	coef  float64
}

// cstage is a compiled stage: for every component up to two terms whose
// sum is the share sent to the stage's reject stream.
type cstage struct {
	kind   StageKind
	stream int
	rem    [][2]term
	ops    []op // the components with a non-zero term, for eval
	dust   int  // parameter of dust_made (grind), -1 if none
	moist  int  // parameter of moisture (dry), -1 if none
	where  string
	bath   float64 // sink_float: bath density
	keep   Side    // sink_float: the side that goes on
}

// op is one component a stage acts on, with its two terms.
type op struct {
	c int
	t [2]term
}

// sparse lists the components of rem that have a non-zero term.
func (cs *cstage) sparse() {
	cs.ops = cs.ops[:0]
	for c, t := range cs.rem {
		if t[0].coef != 0 || t[1].coef != 0 {
			cs.ops = append(cs.ops, op{c, t})
		}
	}
}

// Model is a validated, compiled line profile ready to run.
type Model struct {
	line    Line
	params  []Param
	names   []string // what each parameter is, for the sensitivity table
	stages  []cstage
	streams []string
	glue    int // parameter of glue_share_of_labels, -1 if none
	labels  int // component index of labels
	liquid  int // component index of free liquid
	nCat    int
}

// zeroParam is the index of the built-in parameter that is always 0.
const zeroParam = 0

// Compile validates a line profile and prepares it for evaluation.
func Compile(l Line) (*Model, error) { return compile(l) }

// addParam adds a parameter named for the sensitivity table and returns
// its index.
func (m *Model) addParam(p Param, name string) int {
	m.params = append(m.params, p)
	m.names = append(m.names, name)
	return len(m.params) - 1
}

func (m *Model) streamIndex(name string) int {
	for i, s := range m.streams {
		if s == name {
			return i
		}
	}
	m.streams = append(m.streams, name)
	return len(m.streams) - 1
}

func compile(l Line) (*Model, error) {
	if strings.TrimSpace(l.Name) == "" {
		return nil, fieldErr("line", "name", ErrBadLine, "the profile needs a name")
	}
	if len(l.Stages) == 0 {
		return nil, fieldErr("line", "stages", ErrBadLine, "the profile lists no stages")
	}
	nc := NumComponents()
	m := &Model{line: l, glue: -1, nCat: assess.NumCategories()}
	m.labels, _ = assess.CategoryIndex("labels")
	m.liquid, _ = assess.CategoryIndex("liquid")
	m.addParam(Fixed(0), "")
	if l.GlueShareOfLabels.set {
		if err := checkParam("line", "glue_share_of_labels", l.GlueShareOfLabels); err != nil {
			return nil, err
		}
		m.glue = m.addParam(l.GlueShareOfLabels, "line: glue_share_of_labels")
	}
	for i, s := range l.Stages {
		cs, err := m.compileStage(i, s, nc)
		if err != nil {
			return nil, err
		}
		m.stages = append(m.stages, cs)
	}
	return m, nil
}

func (m *Model) compileStage(i int, s Stage, nc int) (cstage, error) {
	where := s.where(i)
	if s.Kind < StageSort || s.Kind >= stageKindEnd {
		return cstage{}, fieldErr(where, "kind", ErrBadLine, "missing or unknown stage kind; use one of %s", strings.Join(stageKeys[1:], ", "))
	}
	only := func(field string, set bool, kind StageKind) error {
		if set && s.Kind != kind {
			return fieldErr(where, field, ErrBadLine, "applies to %s stages only", kind)
		}
		return nil
	}
	for _, c := range []error{
		only("dust_made", s.DustMade.set, StageGrind),
		only("bath_density", s.BathDensity != 0, StageSinkFloat),
		only("keep", s.Keep != SideUnset, StageSinkFloat),
		only("efficiency", s.Efficiency.set, StageSinkFloat),
		only("product_loss", s.ProductLoss.set, StageSinkFloat),
		only("moisture", s.Moisture.set, StageDry),
	} {
		if c != nil {
			return cstage{}, c
		}
	}
	stream := s.Stream
	keep := s.Keep
	if s.Kind == StageSinkFloat {
		switch keep {
		case SideUnset, SideSink:
			keep = SideSink
		case SideFloat:
			if stream == "" {
				stream = "sinks"
			}
		default:
			return cstage{}, fieldErr(where, "keep", ErrBadLine, "%v: say which side goes on, \"sink\" or \"float\"", s.Keep)
		}
	}
	if stream == "" {
		stream = defaultStream[s.Kind]
	}
	if !streamName.MatchString(stream) {
		return cstage{}, fieldErr(where, "stream", ErrBadLine, "%q: use lower-case letters, digits and _", stream)
	}
	cs := cstage{kind: s.Kind, stream: m.streamIndex(stream), rem: make([][2]term, nc), dust: -1, moist: -1, where: where, bath: s.BathDensity, keep: keep}
	removal, from, err := s.removalFor(where)
	if err != nil {
		return cstage{}, err
	}
	pet := -1
	if s.PETLoss.set {
		if err := checkParam(where, "pet_loss", s.PETLoss); err != nil {
			return cstage{}, err
		}
		pet = m.addParam(s.PETLoss, where+": pet_loss")
	}
	// One parameter per removal entry: a group's members share one draw.
	entry := map[string]int{}
	for c := 0; c < nc; c++ {
		cs.rem[c] = [2]term{{zeroParam, 0}, {zeroParam, 0}}
		if removal[c].set {
			pi, ok := entry[from[c]]
			if !ok {
				pi = m.addParam(removal[c], where+": removal."+from[c])
				entry[from[c]] = pi
			}
			cs.rem[c][0] = term{pi, 1}
		}
		if pet >= 0 && isPET(c) {
			cs.rem[c][1] = term{pet, 1}
		}
	}
	switch s.Kind {
	case StageGrind:
		if s.DustMade.set {
			if err := checkParam(where, "dust_made", s.DustMade); err != nil {
				return cstage{}, err
			}
			cs.dust = m.addParam(s.DustMade, where+": dust_made")
		}
	case StageDry:
		if !s.Moisture.set {
			return cstage{}, fieldErr(where, "moisture", ErrBadLine, "a dry stage needs the moisture left in the flake (e.g. 0.008 for 0.8 %%)")
		}
		if err := checkParam(where, "moisture", s.Moisture); err != nil {
			return cstage{}, err
		}
		if s.Moisture.Hi >= 1 {
			return cstage{}, fieldErr(where, "moisture", ErrOutOfRange, "%s leaves only water; give the moisture share of the wet flake below 1", assess.Plain(s.Moisture.Hi))
		}
		cs.moist = m.addParam(s.Moisture, where+": moisture")
	case StageSinkFloat:
		if err := m.compileSinkFloat(where, s, keep, &cs); err != nil {
			return cstage{}, err
		}
	}
	cs.sparse()
	return cs, closes(where, s, cs, m.params)
}

// compileSinkFloat sets the sink–float shares: a component whose ideal
// side (from SinkShare) is the reject side leaves with the efficiency,
// the rest with the product loss.
func (m *Model) compileSinkFloat(where string, s Stage, keep Side, cs *cstage) error {
	if err := checkPositive(where, "bath_density", s.BathDensity); err != nil {
		return err
	}
	if s.BathDensity > 5 {
		return fieldErr(where, "bath_density", ErrOutOfRange, "%s g/cm³ is not a wash bath; give the bath density in g/cm³ (water 1.00)", assess.Plain(s.BathDensity))
	}
	if len(s.Removal) > 0 || s.PETLoss.set {
		return fieldErr(where, "removal", ErrBadLine, "a sink_float stage separates by density; give efficiency and product_loss instead of removal or pet_loss")
	}
	if !s.Efficiency.set {
		return fieldErr(where, "efficiency", ErrBadLine, "a sink_float stage needs its separation efficiency (e.g. 0.98)")
	}
	if err := checkParam(where, "efficiency", s.Efficiency); err != nil {
		return err
	}
	eff := m.addParam(s.Efficiency, where+": efficiency")
	loss := zeroParam
	if s.ProductLoss.set {
		if err := checkParam(where, "product_loss", s.ProductLoss); err != nil {
			return err
		}
		loss = m.addParam(s.ProductLoss, where+": product_loss")
	}
	pc, _ := assess.CategoryIndex("pet_clear")
	petRange := assess.CategoryAt(pc).Density // dust is bottle PET
	for c := range cs.rem {
		var sink float64
		var ok bool
		switch {
		case c == m.nCat: // glue sits on the bottle wall
		case c == m.nCat+1: // dust is PET
			sink, ok = SinkShare(petRange, s.BathDensity)
		default:
			sink, ok = SinkShare(assess.CategoryAt(c).Density, s.BathDensity)
		}
		reject := 0.0 // unknown density or attached: stays with the product
		if ok {
			reject = 1 - sink
			if keep == SideFloat {
				reject = sink
			}
		}
		cs.rem[c] = [2]term{{eff, reject}, {loss, 1 - reject}}
	}
	return nil
}

// closes checks that no stage sends away more than all of a component,
// at the top of every range.
func closes(where string, s Stage, cs cstage, params []Param) error {
	for c, t := range cs.rem {
		total := t[0].coef*params[t[0].param].Hi + t[1].coef*params[t[1].param].Hi
		if cs.dust >= 0 && isPET(c) && c < len(cs.rem)-1 {
			total += params[cs.dust].Hi
		}
		if total > 1+1e-12 {
			return fieldErr(where, "removal."+ComponentKey(c), ErrNotClosed,
				"the stage does not close: the shares sent away add up to %s (removal, pet_loss and dust_made together), more than all of it; lower them so they sum to at most 1", assess.Sig(total, 4))
		}
	}
	return nil
}

// BathNote says which categories a sink–float stage leaves on the PET's
// side, wholly (Share 1) or in part, because their density range does
// not clear the bath density.
type BathNote struct {
	Index       int // 1-based stage number
	Stage       string
	BathDensity float64
	Keep        Side // the PET's side
	WithPET     []BathShare
}

// BathShare is a category and the share of it that stays with the PET
// before the separation efficiency applies.
type BathShare struct {
	Key   string
	Share float64
}

// BathNotes lists, for every sink–float stage, the non-PET categories
// present in kg (by catalogue index; nil lists them all) that the bath
// cannot separate from the PET.
func (m *Model) BathNotes(kg []float64) []BathNote {
	var out []BathNote
	for i, s := range m.stages {
		if s.kind != StageSinkFloat {
			continue
		}
		n := BathNote{Index: i + 1, Stage: s.where, BathDensity: s.bath, Keep: s.keep}
		for c := 0; c < m.nCat; c++ {
			if isPETCatIdx(c) || (kg != nil && !(kg[c] > 0)) {
				continue
			}
			if share := 1 - s.rem[c][0].coef; share > 0 {
				n.WithPET = append(n.WithPET, BathShare{assess.CategoryAt(c).Key, share})
			}
		}
		out = append(out, n)
	}
	return out
}

func isPETCatIdx(c int) bool { return assess.CategoryAt(c).IsTargetPET() }

// Streams returns the names of the reject streams in first-use order.
func (m *Model) Streams() []string { return append([]string(nil), m.streams...) }

// Line returns the profile the model was compiled from.
func (m *Model) Line() Line { return m.line }

// String names the line.
func (m *Model) String() string {
	return fmt.Sprintf("line %q (%d stages)", m.line.Name, len(m.stages))
}
