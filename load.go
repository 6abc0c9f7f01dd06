package plumb

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/plumbdyn/plumb/internal/expr"
)

// FileError is an error in a system file with its place: the JSON path of
// the offending field (e.g. "variables[1].rate") and, for JSON syntax and
// unknown fields, the line and column in the file. A formula error also
// wraps the *expr.ParseError that gives the position inside the formula.
type FileError struct {
	Field     string // JSON path, "" when only the line and column are known
	Line, Col int    // 1-based place in the file, 0 when not known
	Err       error
}

// Error names the field or place and the problem.
func (e *FileError) Error() string {
	var where []string
	if e.Field != "" {
		where = append(where, e.Field)
	}
	if e.Line > 0 {
		where = append(where, fmt.Sprintf("line %d, column %d", e.Line, e.Col))
	}
	return "plumb: system file: " + strings.Join(where, ", ") + ": " + e.Err.Error()
}

// Unwrap returns ErrSystemFile and the underlying error.
func (e *FileError) Unwrap() []error { return []error{ErrSystemFile, e.Err} }

// Kind says what a system is: a flow (rates of change), a map (next values)
// or a Hamiltonian (an energy function of coordinates and momenta).
type Kind string

// The kinds of system.
const (
	KindFlow        Kind = "flow"
	KindMap         Kind = "map"
	KindHamiltonian Kind = "hamiltonian"
)

// maxFileSize bounds the bytes LoadSystem reads.
const maxFileSize = 8 << 20

// Limits on the formulas of a system file, so that a file within
// maxFileSize compiles in bounded time and memory (about 150 bytes a
// node at the peak of compiling) or is refused: maxNodes bounds the
// distinct numbers, names and operations of the formulas together with
// their derivatives, maxDiffWork the nodes visited while deriving the
// Jacobian (each rate is walked once per state it uses).
const (
	maxNodes    = 1 << 20
	maxDiffWork = 1 << 23
)

// fileSystem is the JSON layout of a system file; see LoadSystem.
type fileSystem struct {
	Name        string         `json:"name"`
	Description string         `json:"description"`
	Kind        string         `json:"kind"`
	TimeUnit    string         `json:"time_unit"`
	Parameters  []fileParam    `json:"parameters"`
	Variables   []fileVariable `json:"variables"`
	Coordinates []fileVariable `json:"coordinates"`
	Momenta     []fileVariable `json:"momenta"`
	Energy      *string        `json:"energy"`
}

type fileParam struct {
	Name        string   `json:"name"`
	Value       *float64 `json:"value"`
	Unit        string   `json:"unit"`
	Description string   `json:"description"`
}

type fileVariable struct {
	Name        string   `json:"name"`
	Start       *float64 `json:"start"`
	Unit        string   `json:"unit"`
	Description string   `json:"description"`
	Period      *float64 `json:"period"`
	Rate        *string  `json:"rate"`
	Next        *string  `json:"next"`
}

// LoadSystem reads a system file: a JSON object describing a flow, a map or
// a Hamiltonian with ordinary infix formulas, and returns it as a System
// whose Problem has the exact (symbolic) Jacobian.
//
// The object's fields (all names lower case; any other field is an error):
//
//	name         optional; a short name for the system
//	description  optional; what it models
//	kind         "flow", "map" or "hamiltonian"
//	time_unit    optional; the unit of t, for reports
//	parameters   optional list of {name, value, unit, description}
//	variables    flow and map: list of {name, start, unit, description,
//	             period, rate | next}
//	coordinates  hamiltonian: list of {name, start, unit, description, period}
//	momenta      hamiltonian: list of {name, start, unit, description},
//	             as many as coordinates
//	energy       hamiltonian: the formula for H(coordinates, momenta)
//
// A flow gives each variable a "rate", the formula for its time derivative;
// a map gives each a "next", the formula for its value one step later. In a
// Hamiltonian plumb derives Hamilton's equations q' = ∂H/∂p, p' = -∂H/∂q
// symbolically; the state is the coordinates followed by the momenta, and
// when H = T(p) + V(q) the Problem carries the separable parts for
// symplectic methods. "period" (optional, > 0) marks an angle and gives its
// period. "start" and "value" are required numbers.
//
// Formulas follow the grammar of internal/expr: + - * / ^, unary minus,
// parentheses, numbers like 1.5e-3, pi, and sin cos tan exp log sqrt abs
// tanh sinh cosh atan sign step atan2 pow min max. They may use the
// variables (or coordinates and momenta), the parameters, and, in flows and
// Hamiltonians, the time t. Names start with a letter or _, continue with
// letters, digits or _, must be unique, and may not be t, pi or a function
// name.
//
// A key given twice in one object is an error (JSON decoders differ on which
// one counts). Errors are *FileError values (matching ErrSystemFile) that name the field,
// and for formulas wrap an *expr.ParseError with the position in the formula
// and a caret line. The file format is documented with a full example in
// docs/system-file.md.
func LoadSystem(r io.Reader) (*System, error) {
	if r == nil {
		return nil, fmt.Errorf("plumb: LoadSystem from a nil reader: %w", ErrNoSystem)
	}
	data, err := io.ReadAll(io.LimitReader(r, maxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("plumb: reading system file: %w", err)
	}
	if len(data) > maxFileSize {
		return nil, &FileError{Err: fmt.Errorf("file is larger than %d bytes", maxFileSize)}
	}
	if err := notSystemFile(data); err != nil {
		return nil, err
	}
	if err := duplicateKey(data); err != nil {
		return nil, err
	}
	var f fileSystem
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&f); err != nil {
		return nil, jsonError(data, dec, err)
	}
	if _, err := dec.Token(); err != io.EOF {
		line, col := lineCol(data, dec.InputOffset())
		return nil, &FileError{Line: line, Col: col, Err: errors.New("unexpected data after the system object")}
	}
	if err := checkFileText(&f); err != nil {
		return nil, err
	}
	return buildSystem(&f)
}

// jsonError turns a decoding error into a *FileError with the place.
func jsonError(data []byte, dec *json.Decoder, err error) error {
	off := dec.InputOffset()
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
		err = errors.New(strings.TrimPrefix(se.Error(), "json: "))
	case errors.As(err, &te):
		if lit, ok := strings.CutPrefix(te.Value, "number "); ok && goTypeName(te.Type.String()) == "number" {
			if _, perr := strconv.ParseFloat(lit, 64); errors.Is(perr, strconv.ErrRange) {
				// The offset is just past the number; point at its start.
				at := te.Offset
				if start := te.Offset - int64(len(lit)); start >= 0 && string(data[start:te.Offset]) == lit {
					at = start
				}
				line, col := lineCol(data, at)
				return &FileError{Field: te.Field, Line: line, Col: col,
					Err: fmt.Errorf("the number %s is out of range: a float64 holds magnitudes up to about 1.8e308", lit)}
			}
		}
		line, col := lineCol(data, te.Offset)
		return &FileError{Field: te.Field, Line: line, Col: col,
			Err: fmt.Errorf("a JSON %s cannot be a %s", te.Value, goTypeName(te.Type.String()))}
	case errors.Is(err, io.EOF):
		err = errors.New("empty file: expected a JSON object")
	case errors.Is(err, io.ErrUnexpectedEOF):
		err = errors.New("the file ends inside the JSON object")
	default:
		err = errors.New(strings.TrimPrefix(err.Error(), "json: "))
	}
	line, col := lineCol(data, off)
	return &FileError{Line: line, Col: col, Err: err}
}

// notSystemFile returns a *FileError when data is plainly not a system
// file (CSV, a series of numbers, another kind of text, or JSON that is not
// an object), saying what a system file is and what was found instead; nil
// when data starts like a JSON object (or is empty, which the decoder
// reports).
func notSystemFile(data []byte) error {
	body := bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")) // a UTF-8 byte order mark
	trimmed := bytes.TrimLeft(body, " \t\r\n")
	if len(trimmed) == 0 || trimmed[0] == '{' {
		return nil
	}
	off := int64(len(data) - len(trimmed))
	line, col := lineCol(data, off)
	first, _, _ := bytes.Cut(trimmed, []byte("\n"))
	first = bytes.TrimRight(first, "\r")
	found := string(first)
	if r := []rune(found); len(r) > 40 {
		found = string(r[:40]) + "…"
	}
	what := fmt.Sprintf("it starts with %q", found)
	if json.Valid(trimmed) {
		kind := "a JSON value"
		switch trimmed[0] {
		case '[':
			kind = "a JSON array"
		case '"':
			kind = "a JSON string"
		case 't', 'f':
			kind = "a JSON true or false"
		case 'n':
			kind = "a JSON null"
		default:
			kind = "a JSON number"
		}
		what = "it holds " + kind
	} else if bytes.Count(first, []byte(",")) > 0 && !bytes.ContainsAny(first, "{}\"") {
		what += ", which looks like CSV (a series or a trajectory, not a system)"
	}
	return &FileError{Line: line, Col: col, Err: fmt.Errorf(
		"this is not a system file: expected a JSON object such as {\"kind\": \"flow\", \"variables\": [...]} (see docs/system-file.md), but %s", what)}
}

// goTypeName names a Go type of the file layout in the file's terms.
func goTypeName(t string) string {
	switch {
	case strings.HasPrefix(t, "[]"):
		return "list"
	case t == "string", t == "*string":
		return "string"
	case t == "float64", t == "*float64":
		return "number"
	}
	return "object"
}

// lineCol converts a byte offset of data to a 1-based line and column.
func lineCol(data []byte, off int64) (int, int) {
	off = min(max(off, 0), int64(len(data)))
	line, col := 1, 1
	for _, r := range string(data[:off]) {
		if r == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return line, col
}

// validName reports why name cannot name a variable or parameter, or "".
func validName(name string) string {
	if name == "" {
		return "is empty"
	}
	for i, r := range name {
		if r == utf8.RuneError {
			return "is not valid UTF-8"
		}
		if !(r == '_' || unicode.IsLetter(r) || (i > 0 && unicode.IsDigit(r))) {
			return fmt.Sprintf("%q is not a name (letters, digits and _, starting with a letter or _)", name)
		}
	}
	if name == "t" {
		return `"t" is reserved for time`
	}
	if expr.IsReserved(name) {
		return fmt.Sprintf("%q is a function or constant of the formula language", name)
	}
	return ""
}

func fileErr(field string, format string, args ...any) error {
	return &FileError{Field: field, Err: fmt.Errorf(format, args...)}
}

func buildSystem(f *fileSystem) (*System, error) {
	kind := Kind(f.Kind)
	switch kind {
	case KindFlow, KindMap, KindHamiltonian:
	case "":
		return nil, fileErr("kind", `missing: say "flow", "map" or "hamiltonian"`)
	default:
		return nil, fileErr("kind", `%q is not "flow", "map" or "hamiltonian"`, f.Kind)
	}
	var vars []fileVariable
	var paths []string
	if kind == KindHamiltonian {
		if len(f.Variables) > 0 {
			return nil, fileErr("variables", "a hamiltonian has coordinates and momenta, not variables")
		}
		if len(f.Coordinates) == 0 {
			return nil, fileErr("coordinates", "a hamiltonian needs at least one coordinate")
		}
		if len(f.Momenta) != len(f.Coordinates) {
			return nil, fileErr("momenta", "%d momenta for %d coordinates: give one momentum per coordinate", len(f.Momenta), len(f.Coordinates))
		}
		if f.Energy == nil {
			return nil, fileErr("energy", "missing: a hamiltonian needs the energy formula H")
		}
		for i, v := range f.Coordinates {
			vars = append(vars, v)
			paths = append(paths, fmt.Sprintf("coordinates[%d]", i))
		}
		for i, v := range f.Momenta {
			if v.Period != nil {
				return nil, fileErr(fmt.Sprintf("momenta[%d].period", i), "momenta cannot be angles")
			}
			vars = append(vars, v)
			paths = append(paths, fmt.Sprintf("momenta[%d]", i))
		}
		for i, v := range vars {
			if v.Rate != nil || v.Next != nil {
				return nil, fileErr(paths[i], "a hamiltonian's equations come from its energy: remove rate and next")
			}
		}
	} else {
		if len(f.Coordinates) > 0 || len(f.Momenta) > 0 || f.Energy != nil {
			return nil, fileErr("kind", "coordinates, momenta and energy belong to a hamiltonian, not a %s", kind)
		}
		if len(f.Variables) == 0 {
			return nil, fileErr("variables", "a %s needs at least one variable", kind)
		}
		for i, v := range f.Variables {
			p := fmt.Sprintf("variables[%d]", i)
			if kind == KindFlow && v.Next != nil {
				return nil, fileErr(p+".next", `a flow gives each variable a "rate", not "next"`)
			}
			if kind == KindMap && v.Rate != nil {
				return nil, fileErr(p+".rate", `a map gives each variable a "next", not "rate"`)
			}
			vars = append(vars, v)
			paths = append(paths, p)
		}
	}

	seen := map[string]string{}
	names := []string{"t"}
	if kind == KindMap {
		names[0] = "" // maps have no time; an empty slot name cannot be written
	}
	s := &System{Name: f.Name, Title: f.Description, Source: "system file"}
	s.y0 = make([]float64, len(vars))
	s.periods = make([]float64, len(vars))
	anyPeriod := false
	for i, v := range vars {
		if why := validName(v.Name); why != "" {
			return nil, fileErr(paths[i]+".name", "%s", why)
		}
		if prev, dup := seen[v.Name]; dup {
			return nil, fileErr(paths[i]+".name", "%q is already used by %s", v.Name, prev)
		}
		seen[v.Name] = paths[i]
		if v.Start == nil {
			return nil, fileErr(paths[i]+".start", "missing: give the start value of %s", v.Name)
		}
		s.y0[i] = *v.Start
		if v.Period != nil {
			if p := *v.Period; !(p > 0) || math.IsInf(p, 0) {
				return nil, fileErr(paths[i]+".period", "%v is not a positive finite period", p)
			}
			s.periods[i] = *v.Period
			anyPeriod = true
		}
		names = append(names, v.Name)
		s.States = append(s.States, v.Name)
		s.units = append(s.units, v.Unit)
	}
	if !anyPeriod {
		s.periods = nil
	}
	for i, p := range f.Parameters {
		path := fmt.Sprintf("parameters[%d]", i)
		if why := validName(p.Name); why != "" {
			return nil, fileErr(path+".name", "%s", why)
		}
		if prev, dup := seen[p.Name]; dup {
			return nil, fileErr(path+".name", "%q is already used by %s", p.Name, prev)
		}
		seen[p.Name] = path
		if p.Value == nil {
			return nil, fileErr(path+".value", "missing: give the value of %s", p.Name)
		}
		names = append(names, p.Name)
		s.pinfo = append(s.pinfo, Param{Name: p.Name, Value: *p.Value, Doc: p.Description, Unit: p.Unit})
		s.params = append(s.params, *p.Value)
	}

	g := expr.NewGraph(names)
	g.SetLimits(maxNodes, maxDiffWork)
	fs := &formulaSystem{kind: kind, g: g, n: len(vars), timeUnit: f.TimeUnit}
	parse := func(field, src string) (expr.Expr, error) {
		e, err := g.Parse(src)
		if err != nil {
			return 0, &FileError{Field: field, Err: err}
		}
		return e, nil
	}
	switch kind {
	case KindFlow, KindMap:
		for i, v := range vars {
			field, src := paths[i]+".rate", v.Rate
			if kind == KindMap {
				field, src = paths[i]+".next", v.Next
			}
			if src == nil {
				return nil, fileErr(field, "missing: give the formula for %s", v.Name)
			}
			e, err := parse(field, *src)
			if err != nil {
				return nil, err
			}
			fs.rates = append(fs.rates, e)
		}
	case KindHamiltonian:
		h, err := parse("energy", *f.Energy)
		if err != nil {
			return nil, err
		}
		if err := fs.setHamiltonian(h); err != nil {
			return nil, &FileError{Field: "energy", Err: err}
		}
	}
	if err := fs.finish(); err != nil {
		field := "energy"
		var re *rateError
		if errors.As(err, &re) && kind != KindHamiltonian {
			field = paths[re.row] + ".rate"
			if kind == KindMap {
				field = paths[re.row] + ".next"
			}
		}
		return nil, &FileError{Field: field, Err: fmt.Errorf("its Jacobian: %w", err)}
	}
	s.form = fs
	s.kind = kind
	return s, nil
}
