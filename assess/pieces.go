package assess

// PieceShare is the share of counted pieces that fall in one category,
// with its Wilson and Clopper–Pearson intervals.
//
// Pieces are counted in pulls, so they are clustered: both intervals
// treat the pieces as independent draws and are therefore narrower than
// the truth when pulls differ. They answer "what share of items is it",
// which is what zero-tolerance and count limits ask; mass shares come
// from Assess.
type PieceShare struct {
	Key            string
	Pieces         int // pieces of this category
	Total          int // all pieces counted in the same pulls
	Fraction       float64
	Wilson         Interval
	ClopperPearson Interval
}

// pieceShares computes piece shares for every category that was counted
// in at least one pull. The denominator of a category is the pieces of
// every counted category in the pulls where this category was counted.
func pieceShares(pulls []Pull, conf float64) []PieceShare {
	var out []PieceShare
	for j, c := range catalogue {
		x, total, counted := 0, 0, false
		for _, p := range pulls {
			if p.Pieces == nil || p.Pieces[j] == NotCounted {
				continue
			}
			counted = true
			x += p.Pieces[j]
			for _, n := range p.Pieces {
				if n > 0 {
					total += n
				}
			}
		}
		if !counted {
			continue
		}
		ps := PieceShare{Key: c.Key, Pieces: x, Total: total,
			Wilson: Wilson(x, total, conf), ClopperPearson: ClopperPearson(x, total, conf)}
		if total > 0 {
			ps.Fraction = float64(x) / float64(total)
		}
		out = append(out, ps)
	}
	return out
}
