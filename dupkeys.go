package plumb

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"
)

// jsonFrame is an open object or array while duplicateKey reads.
type jsonFrame struct {
	object bool
	path   string           // the container's JSON path
	keys   map[string]int64 // an object's keys, each with the offset just past it
	key    string           // the path of the object's value being read
	want   bool             // an object expects a key next
	index  int              // an array's next element
}

// duplicateKey returns a *FileError for the first key that appears twice
// in one object of the JSON text data, naming the key's path and both
// places, or for the first key that is not lower case; otherwise nil. encoding/json keeps the last of two equal keys silently
// ("kind": "map", "kind": "flow" would run a flow); a system file must say
// what it means once. Invalid JSON gives nil here: the decoder reports it.
func duplicateKey(data []byte) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	var stack []*jsonFrame
	for {
		tok, err := dec.Token()
		if err != nil {
			return nil
		}
		var top *jsonFrame
		if len(stack) > 0 {
			top = stack[len(stack)-1]
		}
		if top != nil && top.object && top.want {
			if tok == json.Delim('}') {
				stack = stack[:len(stack)-1]
				valueDone(stack)
				continue
			}
			k, _ := tok.(string)
			end := dec.InputOffset()
			top.key = k
			if top.path != "" {
				top.key = top.path + "." + k
			}
			if canon := strings.ToLower(strings.ToUpper(k)); canon != k {
				// encoding/json matches field names regardless of case,
				// so "Kind" would count as "kind".
				line, col := lineCol(data, keyStart(data, end))
				return &FileError{Field: top.key, Line: line, Col: col,
					Err: fmt.Errorf("field names are lower case: write %q, not %q", canon, k)}
			}
			if prev, dup := top.keys[k]; dup {
				line, col := lineCol(data, keyStart(data, end))
				pl, pc := lineCol(data, keyStart(data, prev))
				return &FileError{Field: top.key, Line: line, Col: col,
					Err: fmt.Errorf("duplicate key %q (first at line %d, column %d): give each field once", k, pl, pc)}
			}
			top.keys[k] = end
			top.want = false
			continue
		}
		var path string
		switch {
		case top == nil:
		case top.object:
			path = top.key
		default:
			path = top.path + "[" + strconv.Itoa(top.index) + "]"
		}
		switch tok {
		case json.Delim('{'):
			stack = append(stack, &jsonFrame{object: true, path: path, keys: map[string]int64{}, want: true})
			continue
		case json.Delim('['):
			stack = append(stack, &jsonFrame{path: path})
			continue
		case json.Delim(']'):
			stack = stack[:len(stack)-1]
		}
		valueDone(stack)
	}
}

// valueDone moves the innermost container past a complete value: an object
// expects its next key, an array its next element.
func valueDone(stack []*jsonFrame) {
	if len(stack) == 0 {
		return
	}
	top := stack[len(stack)-1]
	if top.object {
		top.want = true
	} else {
		top.index++
	}
}

// keyStart returns the offset of the opening quote of the JSON string that
// ends just before offset end (the decoder's offset past a key).
func keyStart(data []byte, end int64) int64 {
	i := min(end, int64(len(data))) - 1
	for i >= 0 && data[i] != '"' { // back to the closing quote
		i--
	}
	for i--; i >= 0; i-- {
		if data[i] != '"' {
			continue
		}
		// A quote preceded by an odd number of backslashes is escaped.
		b := 0
		for j := i - 1; j >= 0 && data[j] == '\\'; j-- {
			b++
		}
		if b%2 == 0 {
			return i
		}
	}
	return 0
}
