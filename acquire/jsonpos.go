package acquire

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"strconv"
)

// jsonPaths walks a JSON document and returns the byte offset at which
// the value of each path starts. Paths are written as in Go selectors:
// "channels[0].x.unit". A document that is not valid JSON gives a partial
// map; the decoder reports the syntax error itself.
func jsonPaths(data []byte) map[string]int64 {
	out := map[string]int64{}
	dec := json.NewDecoder(bytes.NewReader(data))
	type frame struct {
		path  string
		array bool
		index int
		key   string // pending key in an object
	}
	var stack []frame
	child := func() string {
		if len(stack) == 0 {
			return ""
		}
		f := &stack[len(stack)-1]
		if f.array {
			p := f.path + "[" + strconv.Itoa(f.index) + "]"
			f.index++
			return p
		}
		if f.path == "" {
			return f.key
		}
		return f.path + "." + f.key
	}
	expectKey := func() bool {
		return len(stack) > 0 && !stack[len(stack)-1].array && stack[len(stack)-1].key == ""
	}
	for {
		off := dec.InputOffset()
		tok, err := dec.Token()
		if err != nil {
			if !errors.Is(err, io.EOF) {
				return out
			}
			return out
		}
		if d, ok := tok.(json.Delim); ok && (d == '}' || d == ']') {
			stack = stack[:len(stack)-1]
			if len(stack) > 0 && !stack[len(stack)-1].array {
				stack[len(stack)-1].key = ""
			}
			continue
		}
		if expectKey() {
			stack[len(stack)-1].key = tok.(string)
			continue
		}
		// A value starts after any separators: skip to its first byte.
		for off < int64(len(data)) && bytes.IndexByte([]byte(" \t\r\n,:"), data[off]) >= 0 {
			off++
		}
		p := child()
		out[p] = off
		if d, ok := tok.(json.Delim); ok {
			stack = append(stack, frame{path: p, array: d == '['})
			continue
		}
		if len(stack) > 0 && !stack[len(stack)-1].array {
			stack[len(stack)-1].key = ""
		}
	}
}

// lineCol converts a byte offset into a 1-based line and column.
func lineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	line := 1 + bytes.Count(data[:off], []byte{'\n'})
	col := int(off) - bytes.LastIndexByte(data[:off], '\n')
	return line, col
}
