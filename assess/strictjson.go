package assess

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
)

// Errors of CheckJSON.
var (
	ErrDuplicateKey = errors.New("a key appears twice in one JSON object")
	ErrControlText  = errors.New("text holds a control character")
)

// CheckJSON refuses what encoding/json reads without complaint but a
// person would not mean: an object that repeats a key (the decoder keeps
// the last one silently, so two readers of one file could see different
// values), and a string holding a control character, spelled raw or as
// an escape such as \u001b (a terminal escape in a name or description
// that is printed later). It does not check the document's fields; the
// caller decodes it afterwards.
func CheckJSON(b []byte) error {
	dec := json.NewDecoder(bytes.NewReader(b))
	type frame struct {
		object bool
		keys   map[string]bool
		atKey  bool // the next token of an object is a key
	}
	var stack []*frame
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return err
		}
		var top *frame
		if len(stack) > 0 {
			top = stack[len(stack)-1]
		}
		if d, ok := tok.(json.Delim); ok {
			switch d {
			case '{', '[':
				if top != nil && top.object {
					top.atKey = true
				}
				stack = append(stack, &frame{object: d == '{', keys: map[string]bool{}, atKey: true})
			default:
				stack = stack[:len(stack)-1]
			}
			continue
		}
		s, isString := tok.(string)
		if isString {
			if r, at, ok := TerminalSafe(s); !ok {
				return fmt.Errorf("%w: U+%04X at byte %d of %s (offset %d)", ErrControlText, r, at, excerpt(s), dec.InputOffset())
			}
		}
		if top != nil && top.object {
			if top.atKey && isString {
				if top.keys[s] {
					return fmt.Errorf("%w: %s (offset %d); keep one", ErrDuplicateKey, excerpt(s), dec.InputOffset())
				}
				top.keys[s] = true
				top.atKey = false
				continue
			}
			top.atKey = true
		}
	}
}

// TerminalSafe reports the first character of s that must not appear in
// text a person reads from a record or a file, and its byte offset: C0
// and C1 control characters (terminal escapes, newlines, tabs, DEL) and
// the Unicode bidirectional controls that can make printed text read
// differently from what it holds (U+061C, U+200E, U+200F, U+202A–U+202E,
// U+2066–U+2069), and the line and paragraph separators U+2028, U+2029.
// ok is true when s holds none.
func TerminalSafe(s string) (r rune, at int, ok bool) {
	for i, c := range s {
		switch {
		case c < 0x20 || (c >= 0x7f && c <= 0x9f),
			c == 0x061c || c == 0x200e || c == 0x200f || c == 0x2028 || c == 0x2029,
			c >= 0x202a && c <= 0x202e, c >= 0x2066 && c <= 0x2069:
			return c, i, false
		}
	}
	return 0, 0, true
}

// excerpt quotes at most 40 characters of s, safe to print: a message
// about a bad cell or value never echoes a whole hostile input.
func excerpt(s string) string {
	const max = 40
	r := []rune(s)
	more := ""
	if len(r) > max {
		r, more = r[:max], "…"
	}
	return fmt.Sprintf("%+q", string(r)) + more
}
