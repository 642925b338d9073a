package desk

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"regexp"
	"strconv"
	"strings"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
)

// Unit is the mass unit of a pulls file. The store keeps kg.
type Unit uint8

// The units.
const (
	UnitKg Unit = iota + 1
	UnitLb      // avoirdupois pound, 0.45359237 kg exactly
)

// KgPerLb is the international avoirdupois pound (Source: NIST Handbook
// 44, Appendix C; the 1959 international yard and pound agreement).
const KgPerLb = 0.45359237

func (u Unit) String() string {
	switch u {
	case UnitKg:
		return "kg"
	case UnitLb:
		return "lb"
	}
	return fmt.Sprintf("unit(%d)", uint8(u))
}

// ParseUnit reads "kg" or "lb".
func ParseUnit(s string) (Unit, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "kg":
		return UnitKg, nil
	case "lb", "lbs":
		return UnitLb, nil
	}
	return 0, fmt.Errorf("%w: unit %q: give kg or lb", ErrUsage, s)
}

// The optional columns of a pulls file besides the categories.
const (
	ColWeighed = "weighed" // the pull's mass before sorting, in the file's unit
	ColTaken   = "taken"   // when it was taken: RFC 3339 or 2026-03-02 14:30 (UTC)
)

// maxPullsFile bounds what ReadPulls reads.
const maxPullsFile = 16 << 20

// PullsError refuses a pulls file with the exact fix, located as
// file:line:column (as assess.InputError is).
type PullsError struct {
	Name   string
	Line   int // 0 when about the whole file
	Column int // byte column, 1-based; 0 when about the whole line
	Msg    string
}

func (e *PullsError) Error() string {
	switch {
	case e.Line > 0 && e.Column > 0:
		return fmt.Sprintf("%s:%d:%d: %s", e.Name, e.Line, e.Column, e.Msg)
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %s", e.Name, e.Line, e.Msg)
	}
	return e.Name + ": " + e.Msg
}

func (e *PullsError) Unwrap() error { return ErrBadPulls }

// ErrBadPulls is the sentinel of a pulls file refused as it is.
var ErrBadPulls = errors.New("pulls file refused")

var (
	unitLine     = regexp.MustCompile(`(?i)^#\s*unit\s*[:=]\s*(\S+)\s*$`)
	decimalComma = regexp.MustCompile(`^\s*-?\d+,\d+\s*$`)
)

// ReadPulls reads the pulls CSV (see README): a header "pull", category
// keys (masses) and "<key>_count" columns, optionally "total_count" (the
// pieces examined in the pull, all categories together), "weighed" (the
// pull's mass before sorting) and "taken". Lines starting with # are
// comments; "# unit: lb" declares the unit (unit, when not 0, must agree
// with it). A UTF-8 byte-order mark is accepted; UTF-16 text, semicolon
// separators and decimal commas are refused with the fix, unknown keys
// with the nearest valid one, and a commented-out line that reads as a
// pull is refused rather than dropped. Masses come back in kg.
func ReadPulls(r io.Reader, name string, unit Unit) ([]record.PullRecord, error) {
	raw, err := io.ReadAll(io.LimitReader(r, maxPullsFile+1))
	if err != nil {
		return nil, fmt.Errorf("cannot read %s: %v", name, err)
	}
	if len(raw) > maxPullsFile {
		return nil, &PullsError{Name: name, Msg: "the file is larger than 16 MiB: is it really a pulls file?"}
	}
	if bytes.HasPrefix(raw, []byte{0xff, 0xfe}) || bytes.HasPrefix(raw, []byte{0xfe, 0xff}) || bytes.Count(raw, []byte{0}) > len(raw)/4 {
		return nil, &PullsError{Name: name, Msg: "the file is UTF-16 text: save it as UTF-8 (in a spreadsheet: Save As, CSV UTF-8)"}
	}
	raw = bytes.TrimPrefix(raw, []byte("\xef\xbb\xbf"))
	lines := strings.Split(strings.ReplaceAll(string(raw), "\r\n", "\n"), "\n")
	fileUnit := Unit(0)
	header, hline := []string(nil), 0
	var hcols []int // byte column of each header field in its line
	for i, l := range lines {
		t := strings.TrimSpace(l)
		if m := unitLine.FindStringSubmatch(t); m != nil {
			u, err := ParseUnit(m[1])
			if err != nil {
				return nil, &PullsError{Name: name, Line: i + 1, Msg: fmt.Sprintf("unit %q: give kg or lb", m[1])}
			}
			fileUnit = u
			continue
		}
		if t == "" || strings.HasPrefix(t, "#") || header != nil {
			continue
		}
		if strings.Count(t, ";") > 0 && !strings.Contains(t, ",") {
			return nil, &PullsError{Name: name, Line: i + 1, Msg: "fields are separated by semicolons: save the file with commas between fields (a spreadsheet in a decimal-comma language writes semicolons; choose comma-separated CSV)"}
		}
		header, hcols, err = csvFields(strings.TrimRight(l, " \t"))
		if err != nil {
			return nil, &PullsError{Name: name, Line: i + 1, Msg: err.Error()}
		}
		hline = i + 1
	}
	if header == nil {
		return nil, &PullsError{Name: name, Msg: "no header line: the first line must be pull, then category keys"}
	}
	switch {
	case unit != 0 && fileUnit != 0 && unit != fileUnit:
		return nil, &PullsError{Name: name, Msg: fmt.Sprintf("the file says its unit is %s, the command says %s: give one", fileUnit, unit)}
	case unit == 0 && fileUnit != 0:
		unit = fileUnit
	case unit == 0:
		unit = UnitKg
	}
	weighedCol, takenCol := -1, -1
	var keep []int
	for j, h := range header {
		k := strings.ToLower(strings.TrimSpace(h))
		switch {
		case k == ColWeighed || k == ColWeighed+"_kg" || k == ColWeighed+"_lb":
			weighedCol = j
		case k == ColTaken:
			takenCol = j
		default:
			if j > 0 {
				if err := checkKey(k); err != nil {
					return nil, &PullsError{Name: name, Line: hline, Column: hcols[j], Msg: err.Error()}
				}
			}
			keep = append(keep, j)
		}
	}
	var clean strings.Builder
	type extra struct {
		weighed float64
		taken   int64
	}
	var extras []extra
	for i, l := range lines {
		t := strings.TrimSpace(l)
		switch {
		case i+1 == hline:
			writeCSV(&clean, pick(header, keep))
			continue
		case t == "" || i+1 < hline:
			clean.WriteString("\n")
			continue
		case strings.HasPrefix(t, "#"):
			if looksLikePull(strings.TrimPrefix(t, "#"), len(header)) {
				return nil, &PullsError{Name: name, Line: i + 1, Msg: "this commented-out line reads as a pull: labels may not start with #; rename the pull, or delete the line if it is not one"}
			}
			clean.WriteString("\n")
			continue
		}
		f, cols, err := csvFields(strings.TrimRight(l, " \t"))
		if err != nil {
			return nil, &PullsError{Name: name, Line: i + 1, Msg: err.Error()}
		}
		for j := 1; j < len(f); j++ {
			if c := f[j]; decimalComma.MatchString(c) {
				return nil, &PullsError{Name: name, Line: i + 1, Column: cols[j], Msg: fmt.Sprintf("%q has a decimal comma: write %s", c, strings.Replace(strings.TrimSpace(c), ",", ".", 1))}
			}
		}
		if len(f) > len(header) {
			return nil, &PullsError{Name: name, Line: i + 1, Msg: fmt.Sprintf("%d fields under a header of %d: decimal commas (write 1.5, not 1,5) or a stray comma?", len(f), len(header))}
		}
		var x extra
		if weighedCol >= 0 && weighedCol < len(f) && strings.TrimSpace(f[weighedCol]) != "" {
			w, err := assess.ParseDecimal(strings.TrimSpace(f[weighedCol]))
			if err != nil {
				return nil, &PullsError{Name: name, Line: i + 1, Column: cols[weighedCol], Msg: fmt.Sprintf("weighed mass %q is not a plain decimal number", f[weighedCol])}
			}
			x.weighed = w
		}
		if takenCol >= 0 && takenCol < len(f) && strings.TrimSpace(f[takenCol]) != "" {
			tm, err := parseTaken(strings.TrimSpace(f[takenCol]))
			if err != nil {
				return nil, &PullsError{Name: name, Line: i + 1, Column: cols[takenCol], Msg: err.Error()}
			}
			x.taken = tm.UnixMilli()
		}
		extras = append(extras, x)
		writeCSV(&clean, pick(f, keep))
	}
	pulls, err := assess.ReadPulls(strings.NewReader(clean.String()), name)
	if err != nil {
		return nil, err
	}
	if len(pulls) != len(extras) {
		return nil, &PullsError{Name: name, Msg: "some lines could not be matched to pulls: remove blank cells at line ends"}
	}
	factor := 1.0
	if unit == UnitLb {
		factor = KgPerLb
	}
	out := make([]record.PullRecord, len(pulls))
	for i, p := range pulls {
		out[i] = RecordOfPull(p, factor)
		out[i].StatedKg = extras[i].weighed * factor
		out[i].TakenMs = extras[i].taken
	}
	return out, nil
}

// RecordOfPull converts a pull of the audit model to a record: categories
// with mass above 0 (times factor), the counted categories and the pieces
// examined.
func RecordOfPull(p assess.Pull, factor float64) record.PullRecord {
	r := record.PullRecord{Label: p.Label, Kg: map[string]float64{}, TotalPieces: int64(p.TotalPieces)}
	for i, m := range p.Kg {
		if m != 0 {
			r.Kg[assess.CategoryAt(i).Key] = m * factor
		}
	}
	for i, n := range p.Pieces {
		if n != assess.NotCounted {
			if r.Pieces == nil {
				r.Pieces = map[string]int64{}
			}
			r.Pieces[assess.CategoryAt(i).Key] = int64(n)
		}
	}
	return r
}

// csvFields reads one CSV line (surrounding spaces ignored) and the byte
// column of each field in it, 1-based.
func csvFields(line string) ([]string, []int, error) {
	r := csv.NewReader(strings.NewReader(line))
	r.FieldsPerRecord = -1
	r.LazyQuotes = false
	r.TrimLeadingSpace = true
	f, err := r.Read()
	if err != nil {
		return nil, nil, fmt.Errorf("not CSV: %v", err)
	}
	cols := make([]int, len(f))
	for j := range f {
		_, cols[j] = r.FieldPos(j)
	}
	return f, cols, nil
}

func writeCSV(b *strings.Builder, f []string) {
	w := csv.NewWriter(b)
	w.Write(f)
	w.Flush()
}

func pick(f []string, idx []int) []string {
	out := make([]string, 0, len(idx))
	for _, j := range idx {
		if j < len(f) {
			out = append(out, f[j])
		}
	}
	return out
}

// looksLikePull reports whether a commented line has the header's field
// count and numbers (or nothing) after the label.
func looksLikePull(line string, fields int) bool {
	f, _, err := csvFields(line)
	if err != nil || len(f) != fields || fields < 2 || strings.TrimSpace(f[0]) == "" {
		return false
	}
	numbers := 0
	for _, c := range f[1:] {
		c = strings.TrimSpace(c)
		if c == "" {
			continue
		}
		if _, err := strconv.ParseFloat(c, 64); err != nil {
			if _, err := parseTaken(c); err != nil {
				return false
			}
		}
		numbers++
	}
	return numbers > 0
}

func parseTaken(s string) (time.Time, error) {
	for _, layout := range []string{time.RFC3339, "2006-01-02T15:04", "2006-01-02 15:04", "2006-01-02"} {
		if t, err := time.Parse(layout, s); err == nil {
			return t, nil
		}
	}
	return time.Time{}, fmt.Errorf("taken %q: give a time as 2026-03-02T14:30:00Z or 2026-03-02 14:30 (UTC)", s)
}

// aliases are spellings users type for a category key.
var aliases = map[string]string{"aluminum": "aluminium", "color": "colour", "pet_colored": "pet_colour_other", "pet_color_other": "pet_colour_other", "caps": "closures", "lids": "closures"}

// checkKey refuses a header key that is not a category key (or its
// _count column), with "did you mean".
func checkKey(k string) error {
	if k == assess.TotalCountColumn {
		return nil
	}
	if totalAliases[k] {
		return fmt.Errorf("unknown column %q: did you mean %q (the pieces examined in the pull, all categories together)?", k, assess.TotalCountColumn)
	}
	base := strings.TrimSuffix(k, "_count")
	if _, ok := assess.CategoryIndex(base); ok {
		return nil
	}
	if a, ok := aliases[base]; ok {
		return fmt.Errorf("unknown column %q: did you mean %q?", k, strings.Replace(k, base, a, 1))
	}
	best, bestD := "", 3
	for _, c := range assess.CategoryKeys() {
		if d := editDistance(base, c); d < bestD {
			best, bestD = c, d
		}
	}
	if best != "" {
		return fmt.Errorf("unknown column %q: did you mean %q? (the keys are listed by bale categories)", k, strings.Replace(k, base, best, 1))
	}
	if editDistance(k, assess.TotalCountColumn) < 3 {
		return fmt.Errorf("unknown column %q: did you mean %q?", k, assess.TotalCountColumn)
	}
	return fmt.Errorf("unknown column %q: the first column is pull, then category keys (bale categories lists them), %s, %s and %s", k, assess.TotalCountColumn, ColWeighed, ColTaken)
}

// totalAliases are headers users type for the pieces examined.
var totalAliases = map[string]bool{"total": true, "pieces": true, "total_pieces": true, "pieces_examined": true, "pieces_total": true, "count": true}

// editDistance is the Levenshtein distance of two short strings.
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
