package acquire

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"unsafe"
)

// readBufferSize is the bufio buffer used by the readers. Lines longer than
// this are gathered into a separate growing buffer up to maxLineBytes.
const (
	readBufferSize = 1 << 20
	maxLineBytes   = 64 << 20
)

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// lineReader hands out the lines of a stream one at a time without holding
// more than the current line. Line ends (LF or CRLF) are removed; a UTF-8
// byte-order mark at the start of the stream is skipped.
type lineReader struct {
	br   *bufio.Reader
	name string
	line int // number of the line last returned
	long []byte
	// terminated reports whether the last line returned ended with a line
	// feed (false only for a final line cut off at end of file).
	terminated bool
	started    bool
	// sizeHint is the number of bytes the input holds when known (0
	// otherwise); readers use it to size their sample slices once.
	sizeHint int64
	// consumed counts the bytes read so far (line ends included).
	consumed int64
	// pending is a line handed back by pushBack.
	pending           []byte
	pendingLine       int
	pendingTerminated bool
	hasPending        bool
}

// pushBack makes the next call of next return line (a copy is kept) as
// line number n again.
func (lr *lineReader) pushBack(line []byte, n int) {
	lr.pending = bytes.Clone(line)
	lr.pendingLine, lr.pendingTerminated, lr.hasPending = n, lr.terminated, true
}

func newLineReader(r io.Reader, name string) *lineReader {
	hint := int64(0)
	switch v := r.(type) {
	case interface{ Len() int }:
		hint = int64(v.Len())
	case *os.File:
		if fi, err := v.Stat(); err == nil && fi.Mode().IsRegular() {
			if off, err := v.Seek(0, io.SeekCurrent); err == nil {
				hint = fi.Size() - off
			}
		}
	}
	size := readBufferSize
	// A small in-memory input needs no large buffer.
	if l, ok := r.(interface{ Len() int }); ok && l.Len() < size {
		size = max(l.Len()+1, 4096)
	}
	br, ok := r.(*bufio.Reader)
	if !ok || br.Size() < size {
		br = bufio.NewReaderSize(r, size)
	}
	return &lineReader{br: br, name: name, sizeHint: hint}
}

// next returns the next line, valid until the following call, and false at
// end of input. I/O errors are returned as they are.
func (lr *lineReader) next() ([]byte, bool, error) {
	if lr.hasPending {
		lr.hasPending = false
		lr.line, lr.terminated = lr.pendingLine, lr.pendingTerminated
		return lr.pending, true, nil
	}
	if !lr.started {
		lr.started = true
		if b, err := lr.br.Peek(3); err == nil && bytes.Equal(b, utf8BOM) {
			lr.br.Discard(3)
		}
	}
	b, err := lr.br.ReadSlice('\n')
	if errors.Is(err, bufio.ErrBufferFull) {
		lr.long = append(lr.long[:0], b...)
		for errors.Is(err, bufio.ErrBufferFull) {
			if len(lr.long) > maxLineBytes {
				return nil, false, &ParseError{File: lr.name, Line: lr.line + 1,
					Err: kerr(ErrSyntax, fmt.Sprintf("line longer than %d bytes", maxLineBytes)), Expected: "a line of CSV text"}
			}
			b, err = lr.br.ReadSlice('\n')
			lr.long = append(lr.long, b...)
		}
		b = lr.long
	}
	lr.consumed += int64(len(b))
	switch {
	case err == io.EOF:
		if len(b) == 0 {
			return nil, false, nil
		}
		lr.terminated = false
	case err != nil:
		return nil, false, err
	default:
		lr.terminated = true
		b = b[:len(b)-1]
	}
	if n := len(b); n > 0 && b[n-1] == '\r' {
		b = b[:n-1]
	}
	lr.line++
	if lr.line == 1 && bytes.IndexByte(b, '\r') >= 0 {
		// Lines ended by a bare carriage return would make the whole file
		// one line; say so rather than report a strange first field.
		return nil, false, &ParseError{File: lr.name, Line: 1, Err: kerr(ErrSyntax, "carriage return inside the first line (lines ended by CR alone?)"),
			Expected: "lines ending in LF or CRLF"}
	}
	return b, true, nil
}

// isBlank reports whether a line holds only spaces and tabs.
func isBlank(b []byte) bool {
	for _, c := range b {
		if c != ' ' && c != '\t' {
			return false
		}
	}
	return true
}

// isComment reports whether a line starts, after spaces, with prefix.
func isComment(b []byte, prefix []byte) bool {
	if len(prefix) == 0 {
		return false
	}
	return bytes.HasPrefix(bytes.TrimLeft(b, " \t"), prefix)
}

// splitter cuts a line into fields at a delimiter, honouring RFC 4180
// quoting ("a ""quoted"" field"). Quoted fields must close on the same
// line.
type splitter struct {
	delim   byte
	fields  [][]byte
	scratch []byte
}

// splitError is a structural problem in a line: the 1-based field index
// and a message.
type splitError struct {
	field int
	msg   string
}

// split returns the fields of line, valid until the next call.
func (s *splitter) split(line []byte) ([][]byte, *splitError) {
	s.fields = s.fields[:0]
	if bytes.IndexByte(line, '"') < 0 {
		for {
			i := bytes.IndexByte(line, s.delim)
			if i < 0 {
				s.fields = append(s.fields, line)
				return s.fields, nil
			}
			s.fields = append(s.fields, line[:i])
			line = line[i+1:]
		}
	}
	s.scratch = s.scratch[:0]
	for {
		// Leading spaces before an opening quote are allowed.
		j := 0
		for j < len(line) && line[j] == ' ' {
			j++
		}
		if j < len(line) && line[j] == '"' {
			start := len(s.scratch)
			k := j + 1
			closed := false
			for k < len(line) {
				c := line[k]
				if c == '"' {
					if k+1 < len(line) && line[k+1] == '"' {
						s.scratch = append(s.scratch, '"')
						k += 2
						continue
					}
					closed = true
					k++
					break
				}
				s.scratch = append(s.scratch, c)
				k++
			}
			if !closed {
				return nil, &splitError{len(s.fields) + 1, "quoted field not closed before the end of the line"}
			}
			for k < len(line) && line[k] == ' ' {
				k++
			}
			s.fields = append(s.fields, s.scratch[start:len(s.scratch):len(s.scratch)])
			if k == len(line) {
				return s.fields, nil
			}
			if line[k] != s.delim {
				return nil, &splitError{len(s.fields), fmt.Sprintf("%q after a closing quote", line[k])}
			}
			line = line[k+1:]
			continue
		}
		i := bytes.IndexByte(line, s.delim)
		f := line
		if i >= 0 {
			f = line[:i]
		}
		if bytes.IndexByte(f, '"') >= 0 {
			return nil, &splitError{len(s.fields) + 1, "quote inside an unquoted field"}
		}
		s.fields = append(s.fields, f)
		if i < 0 {
			return s.fields, nil
		}
		line = line[i+1:]
	}
}

// detectDelimiter picks the delimiter of a header row: tab if the row has a
// tab outside quotes, else semicolon if it has one, else comma.
func detectDelimiter(header []byte) byte {
	var tab, semi bool
	inQuote := false
	for _, c := range header {
		switch {
		case c == '"':
			inQuote = !inQuote
		case inQuote:
		case c == '\t':
			tab = true
		case c == ';':
			semi = true
		}
	}
	switch {
	case tab:
		return '\t'
	case semi:
		return ';'
	}
	return ','
}

// numberStatus is the outcome of parsing a numeric field.
type numberStatus int

const (
	numOK numberStatus = iota
	numEmpty
	numSyntax
	numNonFinite
	numWrongMark // decimal mark differs from the one the file uses
)

// numberParser parses decimal numbers from byte slices without allocating.
// It accepts an optional sign, digits with at most one decimal mark, and an
// optional exponent; no hexadecimal, underscores, digit grouping, NaN or
// infinity. The decimal mark is '.' or ',' (',' only when the delimiter is
// not a comma); the first mark seen fixes it for the rest of the file.
type numberParser struct {
	allowComma bool
	mark       byte // 0 until the first mark is seen
	buf        [64]byte
}

// parse returns the value of field b, trimmed of spaces.
func (p *numberParser) parse(b []byte) (float64, numberStatus) {
	for len(b) > 0 && b[0] == ' ' {
		b = b[1:]
	}
	for len(b) > 0 && b[len(b)-1] == ' ' {
		b = b[:len(b)-1]
	}
	if len(b) == 0 {
		return 0, numEmpty
	}
	v, m, ok := fastDecimal(b)
	if m == fastTooLong {
		// A decimal number beyond the exact fast path: only the mark
		// needs checking before strconv converts it.
		return p.parseLong(b)
	}
	if !ok {
		// Not a plain decimal number.
		if isNonFiniteWord(b) {
			return 0, numNonFinite
		}
		return 0, numSyntax
	}
	if m != 0 {
		if st := p.useMark(m); st != numOK {
			return 0, st
		}
	}
	return v, numOK
}

// useMark checks a decimal mark against the delimiter and against the
// mark the file has used so far, which the first mark fixes.
func (p *numberParser) useMark(m byte) numberStatus {
	if m == ',' && !p.allowComma {
		return numSyntax
	}
	if p.mark == 0 {
		p.mark = m
	} else if p.mark != m {
		return numWrongMark
	}
	return numOK
}

// isNonFiniteWord reports whether b spells NaN or infinity in a way a
// spreadsheet or a C/Go/Python program might print it.
func isNonFiniteWord(b []byte) bool {
	s := bytes.ToLower(bytes.TrimLeft(b, "+-"))
	switch string(s) {
	case "nan", "inf", "infinity", "1.#inf", "1.#ind", "1.#qnan", "#num!", "#div/0!":
		return true
	}
	return false
}

// fastTooLong is the mark fastDecimal reports for a well-formed plain
// decimal number that lies outside its exact limits.
const fastTooLong = 0xFF

// parseLong converts a well-formed plain decimal number (digits, at most
// one mark, optional exponent) with strconv.
func (p *numberParser) parseLong(b []byte) (float64, numberStatus) {
	markAt := bytes.IndexAny(b, ".,")
	if markAt >= 0 {
		m := b[markAt]
		if st := p.useMark(m); st != numOK {
			return 0, st
		}
		if m == ',' {
			var nb []byte
			if len(b) <= len(p.buf) {
				nb = p.buf[:len(b)]
			} else {
				nb = make([]byte, len(b)) // rare: a number longer than 64 characters
			}
			copy(nb, b)
			nb[markAt] = '.'
			b = nb
		}
	}
	v, err := strconv.ParseFloat(unsafe.String(unsafe.SliceData(b), len(b)), 64)
	if err != nil {
		if math.IsInf(v, 0) {
			return 0, numNonFinite
		}
		return 0, numSyntax
	}
	return v, numOK
}

// pow10 holds the powers of ten that float64 represents exactly.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// fastDecimal converts a plain decimal number to the nearest float64 and
// reports the decimal mark it used ('.', ',' or 0 for none). It returns
// ok = false when the text is not a plain decimal number (mark 0), or,
// leaving the number to strconv.ParseFloat, when it has more than 19
// significant digits or eiselLemire cannot decide it (mark fastTooLong).
//
// When the significand m is at most 2⁵³ and the power of ten e lies
// within ±22, m and 10^|e| are both exact float64 values, so the one IEEE
// multiplication or division m·10^e or m/10^-e is correctly rounded: W. D.
// Clinger, "How to read floating point numbers accurately", PLDI 1990,
// section 3 (the fast path). Other numbers go to eiselLemire.
// TestFastDecimal, TestEiselLemire and FuzzFastDecimal check both against
// strconv.
func fastDecimal(b []byte) (v float64, mark byte, ok bool) {
	i := 0
	neg := false
	if i < len(b) && (b[i] == '+' || b[i] == '-') {
		neg = b[i] == '-'
		i++
	}
	var m uint64
	nd, exp := 0, 0
	digits := false
	for ; i < len(b); i++ {
		c := b[i]
		switch {
		case c >= '0' && c <= '9':
			digits = true
			if m == 0 && c == '0' {
				if mark != 0 {
					exp--
				}
				continue
			}
			if nd == 19 {
				return 0, fastTooLong, false
			}
			m = m*10 + uint64(c-'0')
			nd++
			if mark != 0 {
				exp--
			}
			continue
		case (c == '.' || c == ',') && mark == 0:
			mark = c
			continue
		case c == 'e' || c == 'E':
		default:
			return 0, 0, false
		}
		break
	}
	if !digits {
		return 0, 0, false
	}
	if i < len(b) { // exponent
		i++
		eneg := false
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			eneg = b[i] == '-'
			i++
		}
		if i == len(b) {
			return 0, 0, false
		}
		e := 0
		for ; i < len(b); i++ {
			c := b[i]
			if c < '0' || c > '9' {
				return 0, 0, false
			}
			if e < 100000 {
				e = e*10 + int(c-'0')
			}
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	switch {
	case m == 0:
		v = 0
	case m <= 1<<53 && exp == 0:
		v = float64(m)
	case m <= 1<<53 && exp > 0 && exp <= 22:
		v = float64(m) * pow10[exp]
	case m <= 1<<53 && exp < 0 && exp >= -22:
		v = float64(m) / pow10[-exp]
	default:
		var decided bool
		if v, decided = eiselLemire(m, exp, neg); !decided {
			return 0, fastTooLong, false
		}
		return v, mark, true
	}
	if neg {
		v = -v
	}
	return v, mark, true
}
