package assess

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// InputError locates a problem in a pulls file: file, line and column
// (1-based, as encoding/csv counts them) and the column's header.
type InputError struct {
	File   string
	Line   int
	Column int
	Field  string // header of the column, "" for the whole row or file
	Msg    string // what is wrong and what to fix
	Err    error  // a sentinel of this package
}

func (e *InputError) Error() string {
	loc := e.File
	if e.Line > 0 {
		loc += fmt.Sprintf(":%d", e.Line)
		if e.Column > 0 {
			loc += fmt.Sprintf(":%d", e.Column)
		}
	}
	if e.Field != "" {
		return fmt.Sprintf("%s: column %s: %s", loc, excerpt(e.Field), e.Msg)
	}
	return fmt.Sprintf("%s: %s", loc, e.Msg)
}

func (e *InputError) Unwrap() error { return e.Err }

// column says what one CSV column holds.
type column struct {
	cat    int  // catalogue index
	pieces bool // true for a <key>_count column
	total  bool // true for the total_count column (pieces examined)
}

// TotalCountColumn is the header of the optional column holding the
// number of pieces examined in each pull, all categories together.
const TotalCountColumn = "total_count"

// ReadPullsFile reads a pulls CSV file; see ReadPulls.
func ReadPullsFile(path string) ([]Pull, error) {
	b, err := ReadFileLimited(path, MaxPullsFileBytes)
	if err != nil {
		return nil, &InputError{File: path, Msg: fmt.Sprintf("cannot read the file (%v); check the path", err), Err: err}
	}
	return ReadPulls(bytes.NewReader(b), path)
}

// ReadPulls reads pulls from CSV (RFC 4180, via encoding/csv). The first
// row is the header: "pull", then category keys (masses in kg) and
// optionally "<key>_count" columns (piece counts) and a "total_count"
// column (pieces examined in the pull, all categories together). Lines starting with '#'
// are comments. An empty mass cell is 0 kg; an empty count cell means
// not counted. Every row is checked; the first problem is returned as an
// *InputError naming file, line and column, and no pull is returned then.
func ReadPulls(r io.Reader, name string) ([]Pull, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &InputError{File: name, Msg: "file is empty; it needs a header row 'pull,<category key>,...' and one row per pull", Err: ErrBadHeader}
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	cols, err := parseHeader(cr, header, name)
	if err != nil {
		return nil, err
	}
	var pulls []Pull
	seen := map[string]int{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(name, err)
		}
		line, _ := cr.FieldPos(0)
		p, err := parseRow(cr, rec, cols, name)
		if err != nil {
			return nil, err
		}
		if first, dup := seen[p.Label]; dup {
			return nil, &InputError{File: name, Line: line, Column: 1, Field: "pull",
				Msg: fmt.Sprintf("pull label %s is used twice (first on line %d); give every pull its own label", excerpt(p.Label), first), Err: ErrDuplicatePull}
		}
		seen[p.Label] = line
		if counted := p.countedPieces(); p.TotalPieces > 0 && counted > p.TotalPieces {
			return nil, &InputError{File: name, Line: line, Field: TotalCountColumn,
				Msg: fmt.Sprintf("pull %q: %d %s examined, but the categories count %d; the total counts every piece of the pull", p.Label, p.TotalPieces, plural(p.TotalPieces, "piece", "pieces"), counted), Err: ErrBadTotal}
		}
		if p.TotalKg() <= 0 {
			return nil, &InputError{File: name, Line: line, Field: "pull",
				Msg: fmt.Sprintf("pull %s weighs 0 kg; enter its masses or delete the row", excerpt(p.Label)), Err: ErrEmptyPull}
		}
		pulls = append(pulls, p)
	}
	if len(pulls) == 0 {
		return nil, &InputError{File: name, Msg: "no pulls: add one row per pull under the header", Err: ErrNoPulls}
	}
	return pulls, nil
}

func parseHeader(cr *csv.Reader, header []string, name string) ([]column, error) {
	herr := func(i int, msg string, sentinel error) error {
		line, col := cr.FieldPos(i)
		return &InputError{File: name, Line: line, Column: col, Field: header[i], Msg: msg, Err: sentinel}
	}
	if strings.ToLower(strings.TrimSpace(header[0])) != "pull" {
		return nil, herr(0, "the first header cell must be 'pull' (the pull label column)", ErrBadHeader)
	}
	cols := make([]column, len(header)-1)
	used := map[string]bool{}
	for i, h := range header[1:] {
		key := strings.ToLower(strings.TrimSpace(h))
		if key == TotalCountColumn {
			if used[key] {
				return nil, herr(i+1, "this column appears twice; keep one", ErrBadHeader)
			}
			used[key] = true
			cols[i] = column{total: true}
			continue
		}
		pieces := false
		if k, ok := strings.CutSuffix(key, "_count"); ok {
			key, pieces = k, true
		}
		idx, ok := CategoryIndex(key)
		if !ok {
			msg := fmt.Sprintf("unknown category %s; valid keys are: %s (add _count for piece counts)", excerpt(key), strings.Join(CategoryKeys(), ", "))
			if s := suggestKey(key); len(s) > 0 {
				msg = fmt.Sprintf("unknown category %s; did you mean %s? valid keys are: %s", excerpt(key), strings.Join(s, " or "), strings.Join(CategoryKeys(), ", "))
			}
			return nil, herr(i+1, msg, ErrUnknownCategory)
		}
		full := strings.ToLower(strings.TrimSpace(h))
		if used[full] {
			return nil, herr(i+1, "this column appears twice; keep one", ErrBadHeader)
		}
		used[full] = true
		cols[i] = column{cat: idx, pieces: pieces}
	}
	return cols, nil
}

func parseRow(cr *csv.Reader, rec []string, cols []column, name string) (Pull, error) {
	line, _ := cr.FieldPos(0)
	if len(rec) != len(cols)+1 {
		return Pull{}, &InputError{File: name, Line: line,
			Msg: fmt.Sprintf("row has %d %s, the header has %d; every row needs one cell per header column", len(rec), plural(len(rec), "cell", "cells"), len(cols)+1), Err: ErrBadCSV}
	}
	label := strings.TrimSpace(rec[0])
	if label == "" {
		return Pull{}, &InputError{File: name, Line: line, Column: 1, Field: "pull", Msg: "the pull label is empty; give the pull a label", Err: ErrNoLabel}
	}
	p := NewPull(label)
	for i, c := range cols {
		cell := strings.TrimSpace(rec[i+1])
		if cell == "" {
			continue
		}
		_, colNo := cr.FieldPos(i + 1)
		field := CategoryAt(c.cat).Key
		cerr := func(msg string, sentinel error) error {
			if c.pieces {
				field += "_count"
			}
			return &InputError{File: name, Line: line, Column: colNo, Field: field, Msg: msg, Err: sentinel}
		}
		if c.total {
			n, err := strconv.Atoi(cell)
			if err != nil {
				return Pull{}, &InputError{File: name, Line: line, Column: colNo, Field: TotalCountColumn, Msg: fmt.Sprintf("pieces examined %q is not a whole number", cell), Err: ErrBadNumber}
			}
			if n < 0 {
				return Pull{}, &InputError{File: name, Line: line, Column: colNo, Field: TotalCountColumn, Msg: fmt.Sprintf("pieces examined %d is negative; counts are 0 or more", n), Err: ErrNegativeCount}
			}
			p.TotalPieces = n
			continue
		}
		if c.pieces {
			n, err := ParseWhole(cell)
			if err != nil {
				return Pull{}, cerr(fmt.Sprintf("piece count %s is not a whole number", excerpt(cell)), ErrBadNumber)
			}
			if n < 0 {
				return Pull{}, cerr(fmt.Sprintf("piece count %d is negative; counts are 0 or more", n), ErrNegativeCount)
			}
			_ = p.SetPieces(field, n)
			continue
		}
		v, err := ParseDecimal(cell)
		if f, ferr := strconv.ParseFloat(cell, 64); err != nil && ferr == nil && (math.IsNaN(f) || math.IsInf(f, 0)) {
			v, err = f, nil // named below as not finite
		}
		switch {
		case err != nil:
			return Pull{}, cerr(fmt.Sprintf("mass %s is not a number; write kilograms as a plain decimal, e.g. 1.25 (no hexadecimal, no digit separators)", excerpt(cell)), ErrBadNumber)
		case math.IsNaN(v) || math.IsInf(v, 0):
			return Pull{}, cerr(fmt.Sprintf("mass %s is not a finite number; write kilograms, e.g. 1.25", excerpt(cell)), ErrNonFiniteMass)
		case v < 0:
			return Pull{}, cerr(fmt.Sprintf("mass %s kg is negative; masses are 0 or more", Plain(v)), ErrNegativeMass)
		}
		p.Kg[c.cat] = v
	}
	return p, nil
}

func csvError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		msg := pe.Err.Error()
		if errors.Is(pe.Err, csv.ErrFieldCount) {
			msg = "row has a different number of cells than the header; every row needs one cell per header column"
		} else if errors.Is(pe.Err, csv.ErrQuote) || errors.Is(pe.Err, csv.ErrBareQuote) {
			msg += "; close the quoted cell or remove the stray quote"
		}
		return &InputError{File: name, Line: pe.Line, Column: pe.Column, Msg: msg, Err: ErrBadCSV}
	}
	return &InputError{File: name, Msg: fmt.Sprintf("cannot read the file (%v)", err), Err: err}
}
