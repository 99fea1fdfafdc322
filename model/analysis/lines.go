package analysis

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"unicode/utf8"
)

// Limits of what the reader takes as a text CSV file (common practice, no
// source): a line of a pressure–volume recording is tens of bytes.
const (
	maxLineBytes = 1 << 16 // a longer line is not a recording's
	// maxLeadLines caps the comment and blank lines before the header.
	maxLeadLines = 10000
)

// lineReader reads a text file line by line without holding more than one
// line (the bufio buffer), checking that it is text: no NUL bytes (binary
// files, UTF-16), lines ended by LF or CRLF (not CR alone), no line longer
// than maxLineBytes. Lines come without their line end.
type lineReader struct {
	br   *bufio.Reader
	name string
	line int // number of the last line returned
}

func newLineReader(r io.Reader, name string) *lineReader {
	return &lineReader{br: bufio.NewReaderSize(r, maxLineBytes), name: name}
}

// errf is an InputError at a column of the current line.
func (lr *lineReader) errf(col int, format string, a ...any) *InputError {
	return &InputError{File: lr.name, Line: max(lr.line, 1), Col: max(col, 1), Msg: fmt.Sprintf(format, a...)}
}

// start checks the first bytes: a UTF-8 byte-order mark is skipped, UTF-16
// (with or without its mark) is refused with a message saying so.
func (lr *lineReader) start() error {
	head, _ := lr.br.Peek(512)
	switch {
	case bytes.HasPrefix(head, []byte{0xef, 0xbb, 0xbf}):
		_, _ = lr.br.Discard(3)
	case bytes.HasPrefix(head, []byte{0xff, 0xfe}), bytes.HasPrefix(head, []byte{0xfe, 0xff}):
		lr.line = 1
		return lr.errf(1, "the file is UTF-16 text (it starts with a UTF-16 byte-order mark); save or export it as UTF-8 or ASCII CSV")
	case looksUTF16(head):
		lr.line = 1
		return lr.errf(1, "the file looks like UTF-16 text (every other byte is NUL); save or export it as UTF-8 or ASCII CSV")
	}
	if i := bytes.IndexByte(head, 0); i >= 0 {
		// Binary data (a device, an image): say so before looking for lines.
		nl := bytes.LastIndexByte(head[:i], '\n')
		lr.line = bytes.Count(head[:i], []byte{'\n'}) + 1
		return lr.errf(runeCol(head[nl+1:], i-nl-1), "NUL byte: this is a binary file (or UTF-16 text), not a CSV text file")
	}
	return nil
}

// looksUTF16 reports whether most of the even or odd bytes of b are NUL while
// the others are printable ASCII: UTF-16 text without a byte-order mark.
func looksUTF16(b []byte) bool {
	if len(b) < 8 {
		return false
	}
	var nul [2]int
	for i, c := range b {
		if c == 0 {
			nul[i%2]++
		}
	}
	half := len(b) / 2
	return nul[0] > half*3/4 && nul[1] == 0 || nul[1] > half*3/4 && nul[0] == 0
}

// next returns the next line (valid until the following call), or io.EOF.
func (lr *lineReader) next() ([]byte, error) {
	b, err := lr.br.ReadSlice('\n')
	if len(b) == 0 && err != nil {
		if errors.Is(err, io.EOF) {
			return nil, io.EOF
		}
		return nil, err
	}
	lr.line++
	if errors.Is(err, bufio.ErrBufferFull) {
		if i := bytes.IndexByte(b, '\r'); i >= 0 {
			return nil, lr.crOnly(b, i)
		}
		return nil, lr.errf(1, "line is longer than %d KiB: this is not a pressure–volume CSV file (or its lines do not end)", maxLineBytes>>10)
	}
	if err != nil && !errors.Is(err, io.EOF) {
		return nil, err
	}
	b = bytes.TrimSuffix(b, []byte{'\n'})
	b = bytes.TrimSuffix(b, []byte{'\r'})
	if i := bytes.IndexByte(b, 0); i >= 0 {
		return nil, lr.errf(runeCol(b, i), "NUL byte: this is a binary file (or UTF-16 text), not a CSV text file")
	}
	if i := bytes.IndexByte(b, '\r'); i >= 0 {
		return nil, lr.crOnly(b, i)
	}
	return b, nil
}

// crOnly explains a carriage return inside a line.
func (lr *lineReader) crOnly(b []byte, i int) error {
	if lr.line == 1 && bytes.Count(b, []byte{'\r'}) > 1 {
		return lr.errf(runeCol(b, i), "lines end with CR alone (old Mac line ends); convert them to LF or CRLF, e.g. tr '\\r' '\\n' < in.csv > out.csv")
	}
	return lr.errf(runeCol(b, i), "carriage return (CR) inside a line; lines must end with LF or CRLF")
}

// runeCol is the 1-based character column of byte offset i in line b.
func runeCol(b []byte, i int) int {
	i = min(i, len(b))
	if utf8.Valid(b[:i]) {
		return utf8.RuneCount(b[:i]) + 1
	}
	return i + 1 // not UTF-8: count bytes
}

// cell is one field of a line: its text (quotes removed) and where it starts.
type cell struct {
	text []byte
	at   int // byte offset in the line
}

// splitLine cuts a line into cells at delim. A cell may be quoted with "
// (a doubled "" inside stands for one); a quote must close on its line. It
// returns the cells (reusing dst) or the offset and text of a problem.
func splitLine(line []byte, delim byte, dst []cell) ([]cell, int, string) {
	dst = dst[:0]
	i := 0
	for {
		for i < len(line) && line[i] == ' ' {
			i++
		}
		if i < len(line) && line[i] == '"' {
			open := i
			var buf []byte
			i++
			for {
				j := bytes.IndexByte(line[i:], '"')
				if j < 0 {
					return dst, open, "quote opened here is not closed on this line; a quoted cell must end with \" on its own line"
				}
				buf = append(buf, line[i:i+j]...)
				i += j + 1
				if i < len(line) && line[i] == '"' {
					buf = append(buf, '"')
					i++
					continue
				}
				break
			}
			for i < len(line) && line[i] == ' ' {
				i++
			}
			if i < len(line) && line[i] != delim {
				return dst, i, fmt.Sprintf("text after the closing quote of a cell; expected the separator %s", delimName(delim))
			}
			dst = append(dst, cell{buf, open})
		} else {
			j := bytes.IndexByte(line[i:], delim)
			if j < 0 {
				j = len(line) - i
			}
			dst = append(dst, cell{line[i : i+j], i})
			i += j
		}
		if i >= len(line) {
			return dst, -1, ""
		}
		i++ // the separator
	}
}

// delimName names a separator for messages.
func delimName(d byte) string {
	switch d {
	case '\t':
		return "tab"
	case ';':
		return "semicolon"
	}
	return "comma"
}

// sniffDelimiter picks comma, semicolon or tab by their count outside quotes
// on the header line (comma wins ties).
func sniffDelimiter(line []byte) byte {
	var n [3]int
	quoted := false
	for _, c := range line {
		switch {
		case c == '"':
			quoted = !quoted
		case quoted:
		case c == ',':
			n[0]++
		case c == ';':
			n[1]++
		case c == '\t':
			n[2]++
		}
	}
	best, d := 0, byte(',')
	for k, c := range []byte{',', ';', '\t'} {
		if n[k] > best {
			best, d = n[k], c
		}
	}
	return d
}

// isComment reports whether a line is blank or a # comment.
func isComment(line []byte) bool {
	t := bytes.TrimLeft(line, " \t")
	return len(t) == 0 || t[0] == '#'
}
