package runio

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// npyHeader is what a .npy header says about the array.
type npyHeader struct {
	major    int
	order    binary.ByteOrder
	size     int // bytes per value: 8 or 4
	fortran  bool
	shape    []int
	dataFrom int64 // byte offset of the data
}

// Limits that keep a hostile header from asking for absurd memory.
const (
	maxNPYHeader = 1 << 20 // bytes of header dictionary
	maxColumns   = 1 << 16 // columns of a run
)

var npyMagic = []byte("\x93NUMPY")

// readNPYHeader reads the magic string, version, and header dictionary of
// the .npy format (versions 1.0, 2.0 and 3.0).
func readNPYHeader(r *bufio.Reader, file string) (*npyHeader, error) {
	bad := func(off int64, err error, format string, a ...any) error {
		return &Error{File: file, Offset: off, Err: err, Detail: fmt.Sprintf(format, a...)}
	}
	pre := make([]byte, 8)
	if n, err := io.ReadFull(r, pre); err != nil {
		return nil, bad(0, ErrTruncated, "%d bytes, a .npy file starts with 8 bytes of magic and version", n)
	}
	if string(pre[:6]) != string(npyMagic) {
		return nil, bad(0, ErrSyntax, "not a .npy file (%s, want the magic \\x93NUMPY)", found(pre[:6]))
	}
	h := &npyHeader{major: int(pre[6])}
	var hlen int
	switch pre[6] {
	case 1:
		b := make([]byte, 2)
		if _, err := io.ReadFull(r, b); err != nil {
			return nil, bad(8, ErrTruncated, "header length missing")
		}
		hlen = int(binary.LittleEndian.Uint16(b))
		h.dataFrom = 10
	case 2, 3:
		b := make([]byte, 4)
		if _, err := io.ReadFull(r, b); err != nil {
			return nil, bad(8, ErrTruncated, "header length missing")
		}
		l := binary.LittleEndian.Uint32(b)
		if l > maxNPYHeader {
			return nil, bad(8, ErrUnsupported, "header of %d bytes (at most %d read)", l, maxNPYHeader)
		}
		hlen = int(l)
		h.dataFrom = 12
	default:
		return nil, bad(6, ErrUnsupported, ".npy format version %d.%d (1.0, 2.0 and 3.0 are read)", pre[6], pre[7])
	}
	text := make([]byte, hlen)
	if n, err := io.ReadFull(r, text); err != nil {
		return nil, bad(h.dataFrom, ErrTruncated, "header announces %d bytes, found %d", hlen, n)
	}
	h.dataFrom += int64(hlen)
	if err := h.parse(string(text)); err != nil {
		if u, ok := err.(unsupported); ok {
			return nil, bad(h.dataFrom-int64(hlen), ErrUnsupported, "%s", string(u))
		}
		return nil, bad(h.dataFrom-int64(hlen), ErrSyntax, "header %s: %v", found(text), err)
	}
	return h, nil
}

// parse reads the header dictionary, a Python literal such as
// {'descr': '<f8', 'fortran_order': False, 'shape': (1000, 3), }.
func (h *npyHeader) parse(s string) error {
	p := &pyLit{s: s}
	if !p.eat('{') {
		return fmt.Errorf("does not start with {")
	}
	var descr string
	seen := map[string]bool{}
	for !p.eat('}') {
		key, err := p.str()
		if err != nil {
			return fmt.Errorf("key: %v", err)
		}
		if seen[key] {
			return fmt.Errorf("key %q twice", key)
		}
		seen[key] = true
		if !p.eat(':') {
			return fmt.Errorf("no ':' after key %q", key)
		}
		switch key {
		case "descr":
			if p.peek() == '[' {
				return errStructured
			}
			if descr, err = p.str(); err != nil {
				return fmt.Errorf("descr: %v", err)
			}
		case "fortran_order":
			switch {
			case p.word("True"):
				h.fortran = true
			case p.word("False"):
				h.fortran = false
			default:
				return fmt.Errorf("fortran_order is neither True nor False")
			}
		case "shape":
			if h.shape, err = p.tuple(); err != nil {
				return fmt.Errorf("shape: %v", err)
			}
		default:
			return fmt.Errorf("unknown key %q", key)
		}
		if !p.eat(',') {
			if !p.eat('}') {
				return fmt.Errorf("no ',' or '}' after %q", key)
			}
			break
		}
	}
	if p.skip(); p.i != len(p.s) {
		return fmt.Errorf("text after the dictionary")
	}
	for _, k := range []string{"descr", "fortran_order", "shape"} {
		if !seen[k] {
			return fmt.Errorf("key %q missing", k)
		}
	}
	switch descr {
	case "<f8", "<f4":
		h.order = binary.LittleEndian
	case ">f8", ">f4":
		h.order = binary.BigEndian
	default:
		return unsupported(fmt.Sprintf("dtype %q (read: '<f8', '>f8', '<f4', '>f4', that is float64 or float32 with a stated byte order)", descr))
	}
	h.size = 8
	if descr[2] == '4' {
		h.size = 4
	}
	return nil
}

// unsupported is a header that is valid but asks for what is not read.
type unsupported string

func (u unsupported) Error() string { return string(u) }

const errStructured = unsupported("a structured dtype (a list of fields); save a plain 2-D float array")

// pyLit is a tiny reader of the Python literals a .npy header uses.
type pyLit struct {
	s string
	i int
}

func (p *pyLit) skip() {
	for p.i < len(p.s) && strings.IndexByte(" \t\n\r", p.s[p.i]) >= 0 {
		p.i++
	}
}

func (p *pyLit) peek() byte {
	p.skip()
	if p.i < len(p.s) {
		return p.s[p.i]
	}
	return 0
}

func (p *pyLit) eat(c byte) bool {
	if p.peek() == c && c != 0 {
		p.i++
		return true
	}
	return false
}

func (p *pyLit) word(w string) bool {
	p.skip()
	if strings.HasPrefix(p.s[p.i:], w) {
		p.i += len(w)
		return true
	}
	return false
}

// str reads a quoted string without escapes.
func (p *pyLit) str() (string, error) {
	q := p.peek()
	if q != '\'' && q != '"' {
		return "", fmt.Errorf("expected a quoted string")
	}
	end := strings.IndexByte(p.s[p.i+1:], q)
	if end < 0 {
		return "", fmt.Errorf("unterminated string")
	}
	v := p.s[p.i+1 : p.i+1+end]
	if strings.IndexByte(v, '\\') >= 0 {
		return "", fmt.Errorf("escapes in string %q", v)
	}
	p.i += end + 2
	return v, nil
}

// tuple reads a tuple of non-negative integers: (), (5,), (5, 3).
func (p *pyLit) tuple() ([]int, error) {
	if !p.eat('(') {
		return nil, fmt.Errorf("expected '('")
	}
	dims := []int{}
	for !p.eat(')') {
		p.skip()
		j := p.i
		for j < len(p.s) && p.s[j] >= '0' && p.s[j] <= '9' {
			j++
		}
		if j == p.i {
			return nil, fmt.Errorf("expected a non-negative integer")
		}
		v, err := strconv.Atoi(p.s[p.i:j])
		if err != nil || v > 1<<50 {
			return nil, fmt.Errorf("dimension %s too large", p.s[p.i:j])
		}
		p.i = j
		dims = append(dims, v)
		if !p.eat(',') {
			if !p.eat(')') {
				return nil, fmt.Errorf("expected ',' or ')'")
			}
			break
		}
	}
	return dims, nil
}
