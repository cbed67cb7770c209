package parse

import (
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"
)

// Pos is a place in a memo file: 1-based line and column (columns count
// characters, as editors do). The zero Pos means "no position".
type Pos struct {
	File string
	Line int
	Col  int
}

// IsValid reports whether the position names a line.
func (p Pos) IsValid() bool { return p.Line > 0 }

// String formats the position as file:line:col.
func (p Pos) String() string {
	switch {
	case !p.IsValid():
		return p.File
	case p.Col > 0:
		return fmt.Sprintf("%s:%d:%d", p.File, p.Line, p.Col)
	default:
		return fmt.Sprintf("%s:%d", p.File, p.Line)
	}
}

// Shift returns the position n characters to the right on the same line.
func (p Pos) Shift(n int) Pos {
	if p.IsValid() {
		p.Col += n
	}
	return p
}

// Error is one mistake in a memo, at a position.
type Error struct {
	Pos Pos
	Msg string
}

func (e *Error) Error() string {
	if e.Pos.File == "" && !e.Pos.IsValid() {
		return e.Msg
	}
	return e.Pos.String() + ": " + e.Msg
}

// ErrorList collects the errors of a memo so that all of them are reported
// at once, in source order.
type ErrorList []*Error

// Add appends an error at pos.
func (l *ErrorList) Add(pos Pos, format string, args ...any) {
	*l = append(*l, &Error{Pos: pos, Msg: fmt.Sprintf(format, args...)})
}

// Len, Less and Swap sort the list by file, line and column.
func (l ErrorList) Len() int      { return len(l) }
func (l ErrorList) Swap(i, j int) { l[i], l[j] = l[j], l[i] }
func (l ErrorList) Less(i, j int) bool {
	a, b := l[i].Pos, l[j].Pos
	if a.File != b.File {
		return a.File < b.File
	}
	if a.Line != b.Line {
		return a.Line < b.Line
	}
	return a.Col < b.Col
}

// Sort sorts the list and removes exact duplicates.
func (l *ErrorList) Sort() {
	sort.Stable(*l)
	out := (*l)[:0]
	for i, e := range *l {
		if i > 0 && e.Pos == out[len(out)-1].Pos && e.Msg == out[len(out)-1].Msg {
			continue
		}
		out = append(out, e)
	}
	*l = out
}

// Error prints every error, one a line.
func (l ErrorList) Error() string {
	var b strings.Builder
	for i, e := range l {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	return b.String()
}

// Err returns nil for an empty list, else the sorted list itself.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	l.Sort()
	return l
}

// lineIndex turns byte offsets of a source into positions.
type lineIndex struct {
	file   string
	src    []byte
	starts []int // byte offset of each line's first byte
}

func newLineIndex(file string, src []byte) *lineIndex {
	starts := []int{0}
	for i, c := range src {
		if c == '\n' {
			starts = append(starts, i+1)
		}
	}
	return &lineIndex{file: file, src: src, starts: starts}
}

// pos returns the position of byte offset off.
func (x *lineIndex) pos(off int) Pos {
	if off < 0 {
		off = 0
	}
	if off > len(x.src) {
		off = len(x.src)
	}
	line := sort.Search(len(x.starts), func(i int) bool { return x.starts[i] > off }) - 1
	col := utf8.RuneCount(x.src[x.starts[line]:off]) + 1
	return Pos{File: x.file, Line: line + 1, Col: col}
}
