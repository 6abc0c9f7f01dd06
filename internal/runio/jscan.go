package runio

import (
	"fmt"
	"strconv"
	"unicode/utf8"
)

// jscan is a small in-place scanner for the flat JSON objects of JSON
// Lines runs. It reads numbers without making strings and skips values it
// is not asked for.
type jscan struct {
	b      []byte
	i      int
	keybuf []byte
	stack  []byte
}

// jerr is a scan error before the line number is attached.
type jerr struct {
	field  string
	kind   error // nil means ErrSyntax
	detail string
}

// jfield describes a field of the first line.
type jfield struct {
	name string
	num  bool // a number
	arr  int  // length of an array of numbers, or -1
}

const maxDepth = 64

func (s *jscan) ws() {
	for s.i < len(s.b) {
		switch s.b[s.i] {
		case ' ', '\t', '\r', '\n':
			s.i++
		default:
			return
		}
	}
}

func (s *jscan) at() byte {
	s.ws()
	if s.i < len(s.b) {
		return s.b[s.i]
	}
	return 0
}

func (s *jscan) here(field, what string) *jerr {
	if s.i >= len(s.b) {
		return &jerr{field: field, detail: what + ", found the end of the line"}
	}
	end := min(len(s.b), s.i+20)
	return &jerr{field: field, detail: what + ", " + found(s.b[s.i:end])}
}

// each calls fn for every member of the object on the line; fn must
// consume the value (number, array or skipValue).
func (s *jscan) each(b []byte, fn func(key []byte, isArr bool) *jerr) *jerr {
	s.b, s.i = b, 0
	if s.at() != '{' {
		return s.here("", "expected a JSON object")
	}
	s.i++
	if s.at() == '}' {
		s.i++
	} else {
		for {
			key, e := s.str("")
			if e != nil {
				return e
			}
			if s.at() != ':' {
				return s.here(string(key), "expected ':'")
			}
			s.i++
			if e := fn(key, s.at() == '['); e != nil {
				return e
			}
			c := s.at()
			if c == ',' {
				s.i++
				continue
			}
			if c == '}' {
				s.i++
				break
			}
			return s.here(string(key), "expected ',' or '}'")
		}
	}
	if s.at() != 0 {
		return s.here("", "text after the object")
	}
	return nil
}

// fields lists the members of the first line.
func (s *jscan) fields(b []byte) ([]jfield, *jerr) {
	var out []jfield
	e := s.each(b, func(key []byte, isArr bool) *jerr {
		f := jfield{name: string(key), arr: -1}
		for _, g := range out {
			if g.name == f.name {
				return &jerr{field: f.name, detail: "field appears twice"}
			}
		}
		start := s.i
		switch c := s.at(); {
		case c == '[':
			if n, e := s.array(nil, nil); e == nil {
				f.arr = n
			} else {
				s.i = start
				if e := s.skipValue(f.name); e != nil {
					return e
				}
			}
		case c != '"' && c != '{' && !s.word("true") && !s.word("false") && !s.word("null"):
			// A bare value that is not true, false or null must be a
			// number: NaN, Infinity and the like are refused here rather
			// than dropped from the columns.
			var v float64
			if e := s.number(f.name, &v); e != nil {
				return e
			}
			f.num = true
		default:
			if e := s.skipValue(f.name); e != nil {
				return e
			}
		}
		out = append(out, f)
		return nil
	})
	return out, e
}

// str reads a JSON string; the result is valid until the next str.
func (s *jscan) str(field string) ([]byte, *jerr) {
	if s.at() != '"' {
		return nil, s.here(field, "expected a quoted field name")
	}
	s.i++
	start := s.i
	for s.i < len(s.b) {
		switch c := s.b[s.i]; {
		case c == '"':
			out := s.b[start:s.i]
			s.i++
			return out, nil
		case c == '\\':
			return s.strEscaped(field, start)
		case c < 0x20:
			return nil, s.here(field, "control character in a string")
		}
		s.i++
	}
	return nil, &jerr{field: field, detail: "unterminated string"}
}

// strEscaped finishes a string with escapes, decoding it into keybuf.
func (s *jscan) strEscaped(field string, start int) ([]byte, *jerr) {
	j := start
	for j < len(s.b) && s.b[j] != '"' {
		if s.b[j] == '\\' {
			j++
		}
		j++
	}
	if j >= len(s.b) {
		return nil, &jerr{field: field, detail: "unterminated string"}
	}
	v, err := strconv.Unquote(string(s.b[start-1 : j+1]))
	if err != nil || !utf8.ValidString(v) {
		return nil, &jerr{field: field, detail: "bad escape in string " + found(s.b[start-1:j+1])}
	}
	s.i = j + 1
	s.keybuf = append(s.keybuf[:0], v...)
	return s.keybuf, nil
}

// word reports whether the next bare value is w.
func (s *jscan) word(w string) bool {
	s.ws()
	end := s.i + len(w)
	if end > len(s.b) || string(s.b[s.i:end]) != w {
		return false
	}
	if end == len(s.b) {
		return true
	}
	switch s.b[end] {
	case ',', '}', ']', ' ', '\t', '\r', '\n':
		return true
	}
	return false
}

// token returns the bytes of a bare value (number or word).
func (s *jscan) token() []byte {
	s.ws()
	start := s.i
	for s.i < len(s.b) {
		c := s.b[s.i]
		if c == ',' || c == '}' || c == ']' || c == ' ' || c == '\t' || c == '\r' || c == '\n' {
			break
		}
		s.i++
	}
	return s.b[start:s.i]
}

// number reads a finite number into dst.
func (s *jscan) number(field string, dst *float64) *jerr {
	switch s.at() {
	case '"', '[', '{':
		e := s.here(field, "expected a number")
		e.kind = ErrNumber
		return e
	}
	tok := s.token()
	v, err := parseNumber(tok)
	if err != nil {
		d := found(tok)
		if err == errEmptyCell {
			d = "no value"
		}
		return &jerr{field: field, kind: ErrNumber, detail: d}
	}
	*dst = v
	return nil
}

// array reads an array of numbers; entry e goes to dst[sel[e]] when
// e < len(sel) and sel[e] >= 0. It returns the number of entries.
func (s *jscan) array(sel []int, dst []float64) (int, *jerr) {
	s.ws()
	s.i++ // '['
	if s.at() == ']' {
		s.i++
		return 0, nil
	}
	n := 0
	for {
		var v float64
		if e := s.number("y", &v); e != nil {
			e.detail = fmt.Sprintf("entry %d: %s", n, e.detail)
			return n, e
		}
		if n < len(sel) && sel[n] >= 0 {
			dst[sel[n]] = v
		}
		n++
		switch s.at() {
		case ',':
			s.i++
		case ']':
			s.i++
			return n, nil
		default:
			return n, s.here("y", "expected ',' or ']'")
		}
	}
}

// skipValue passes over any JSON value, checking its brackets, keys and
// commas (bare words and numbers are not checked: they are not read).
func (s *jscan) skipValue(field string) *jerr {
	stack := s.stack[:0]
	defer func() { s.stack = stack[:0] }()
	key := func() *jerr {
		if _, e := s.str(field); e != nil {
			return e
		}
		if s.at() != ':' {
			return s.here(field, "expected ':'")
		}
		s.i++
		return nil
	}
	for {
		// A value is expected here.
		switch c := s.at(); c {
		case '{', '[':
			s.i++
			closer := byte('}')
			if c == '[' {
				closer = ']'
			}
			if s.at() == closer {
				s.i++
				break
			}
			if len(stack) == maxDepth {
				return s.here(field, "nested too deeply")
			}
			stack = append(stack, closer)
			if c == '{' {
				if e := key(); e != nil {
					return e
				}
			}
			continue
		case '"':
			if _, e := s.str(field); e != nil {
				return e
			}
		case 0, '}', ']', ',', ':':
			return s.here(field, "expected a value")
		default:
			s.token()
		}
		// After a value: close containers or move to the next element.
		for {
			if len(stack) == 0 {
				return nil
			}
			top := stack[len(stack)-1]
			c := s.at()
			if c == top {
				s.i++
				stack = stack[:len(stack)-1]
				continue
			}
			if c != ',' {
				return s.here(field, "expected ',' or a closing bracket")
			}
			s.i++
			if top == '}' {
				if e := key(); e != nil {
					return e
				}
			}
			break
		}
	}
}
