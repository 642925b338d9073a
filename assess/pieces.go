package assess

import "fmt"

// PieceBasis says what a piece count is reported against.
type PieceBasis int

// The bases of piece reports.
const (
	// BasisCounts: no total of pieces examined was given, so there is no
	// share: the counts are reported per pull and per 100 kg sorted.
	BasisCounts PieceBasis = iota + 1
	// BasisExamined: a share of the pieces examined (the pulls' totals).
	BasisExamined
)

func (b PieceBasis) String() string {
	switch b {
	case BasisCounts:
		return "counts"
	case BasisExamined:
		return "examined"
	}
	return fmt.Sprintf("PieceBasis(%d)", int(b))
}

// PieceShare is what the piece counts of one category say.
//
// Without the number of pieces examined, counting only some categories
// gives no share ("8 PVC of 9 pieces counted" is not 89 % PVC): the
// counts are then given per pull and per 100 kg of the pulls where the
// category was counted. With a per-pull total of pieces examined
// (Pull.TotalPieces), the share is the category's pieces over the pieces
// examined in the pulls that have both, with Wilson and Clopper–Pearson
// intervals.
//
// Pieces are counted in pulls, so they are clustered: both intervals
// treat the pieces as independent draws and are therefore narrower than
// the truth when pulls differ.
type PieceShare struct {
	Key    string
	Pieces int     // pieces of this category in the pulls where it was counted
	Pulls  int     // pulls where it was counted
	Kg     float64 // mass of those pulls
	// PerPull and Per100Kg are the counts per pull and per 100 kg sorted.
	PerPull, Per100Kg float64
	Basis             PieceBasis
	// With BasisExamined: pieces of this category and pieces examined in
	// the pulls that give a total, and the share with its intervals.
	ExaminedPieces, Examined int
	Fraction                 float64
	Wilson                   Interval
	ClopperPearson           Interval
	Level                    float64
}

// NoneText is the bound of a category counted but never found, in a
// grader's words ("none of 412 pieces examined: at most 0.73 % at 90 %"),
// or "" when some were found or there is no total.
func (p PieceShare) NoneText() string {
	if p.Basis != BasisExamined || p.ExaminedPieces > 0 || p.Examined == 0 {
		return ""
	}
	return fmt.Sprintf("none of %d %s examined: at most %s %% at %s %%", p.Examined, plural(p.Examined, "piece", "pieces"), pctText(p.ClopperPearson.High), levelText(p.Level))
}

// pieceShares reports the piece counts of every category that was
// counted in at least one pull.
func pieceShares(pulls []Pull, conf float64) []PieceShare {
	var out []PieceShare
	for j, c := range catalogue {
		ps := PieceShare{Key: c.Key, Basis: BasisCounts, Level: conf}
		for _, p := range pulls {
			if p.Pieces == nil || p.Pieces[j] == NotCounted {
				continue
			}
			ps.Pulls++
			ps.Pieces += p.Pieces[j]
			ps.Kg += p.TotalKg()
			if p.TotalPieces > 0 {
				ps.ExaminedPieces += p.Pieces[j]
				ps.Examined += p.TotalPieces
			}
		}
		if ps.Pulls == 0 {
			continue
		}
		ps.PerPull = float64(ps.Pieces) / float64(ps.Pulls)
		ps.Per100Kg = 100 * float64(ps.Pieces) / ps.Kg
		if ps.Examined > 0 {
			ps.Basis = BasisExamined
			ps.Fraction = float64(ps.ExaminedPieces) / float64(ps.Examined)
			ps.Wilson = Wilson(ps.ExaminedPieces, ps.Examined, conf)
			ps.ClopperPearson = ClopperPearson(ps.ExaminedPieces, ps.Examined, conf)
		}
		out = append(out, ps)
	}
	return out
}
