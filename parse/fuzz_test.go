package parse

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/yuin/goldmark/ast"
)

// FuzzParse feeds arbitrary bytes to the parser, as a memo and as the CSV
// file the memo reads:
//
//	go test ./parse -run XXX -fuzz FuzzParse -fuzztime 10m
//
// Whatever the input, Parse does not panic, returns a memo (never nil,
// also with errors), returns either nil or a non-empty ErrorList, and every
// position it gives — of an error and of every value it keeps — is inside
// the file it names: a line of the file and a column of that line (at most
// one past its last character).
func FuzzParse(f *testing.F) {
	for _, s := range fuzzSeeds(f) {
		f.Add(s, []byte(fuzzCSV))
	}
	f.Fuzz(func(t *testing.T, src, csvData []byte) {
		m, err := Parse("memo.md", src)
		checkParsed(t, m, err, map[string][]byte{"memo.md": src})
		if m == nil || len(m.Includes) == 0 {
			return
		}
		// A memo that reads a file: again, with the file.
		resolve := func(path string) (string, []byte, error) {
			if path == "missing.csv" {
				return "", nil, errors.New("no such file")
			}
			return "flows.csv", csvData, nil
		}
		m, err = ParseWith("memo.md", src, Options{Resolve: resolve})
		checkParsed(t, m, err, map[string][]byte{"memo.md": src, "flows.csv": csvData})
	})
}

// fuzzCSV is the seed of the CSV file: every column, a comment, a salvage.
const fuzzCSV = "year,amount,kind,note\n# a comment\n0,-480000,,first cost\n1,12500,benefit,rent\n" +
	"2,\"1,250\",cost,\"a note, quoted\"\n10,40000,salvage,\n"

// fuzzSeeds are the corpus the fuzz targets of this package start from: the
// examples, the malformed-memo corpus, the renderer's test memos and a few
// hand-made hostile inputs.
func fuzzSeeds(f *testing.F) [][]byte {
	var seeds [][]byte
	for _, pat := range []string{"../examples/*.md", "../testdata/errors/*.md", "../testdata/csv/*.md", "../render/testdata/*.md"} {
		files, err := filepath.Glob(pat)
		if err != nil {
			f.Fatal(err)
		}
		for _, p := range files {
			b, err := os.ReadFile(p)
			if err != nil {
				f.Fatal(err)
			}
			seeds = append(seeds, b)
		}
	}
	if len(seeds) < 20 {
		f.Fatalf("only %d seed memos found; run from the package folder", len(seeds))
	}
	return append(seeds, hostileSeeds...)
}

// hostileSeeds are hand-made inputs at the edges of the grammar: an
// unclosed front matter, a byte-order mark and CR LF lines, NUL and invalid
// UTF-8, fences inside lists and quotes, tabs, deep parentheses and long
// numbers.
var hostileSeeds = [][]byte{
	[]byte(""),
	[]byte("---\n"),
	[]byte("---\ntitle: x\n"),
	[]byte("\xef\xbb\xbf---\r\ntitle: a\r\nrate: 7%\r\n---\r\n```alternative a\r\nlife: 5\r\nfirst cost: 1\r\n```\r\n"),
	[]byte("---\n: :\n- x\n---\n"),
	[]byte("---\ntitle: a\rto: b\u2028from: c\u0085date: d\u2029rate: 7%\n---\n"),
	[]byte("---\nrate: nominal\ntax rate: 7% nominal compounded\ninflation: real real\n---\n"),
	[]byte("```alternative\n```\n```alternative a b c\n```\n```assume x\n```\n"),
	[]byte("> ```alternative a\n> life: 5\n> first cost: 1\n> ```\n\n- ```compare c\n  alternatives: a\n  ```\n"),
	[]byte("```assume\n\tx\t=\t1 ~ triangular(1,2,\n= 3\nx = \"#\" # c\ny = ((((((((((1))))))))))\n```\n"),
	[]byte("```alternative a\x00\nlife: \xff\xfe\nfirst cost: 1e999999\nannual cost from year 9999999999999999999 to year -1: 1,,2\n```\n"),
	[]byte("`=` `= ` `=pw(` ``= pw(a)`` `\xff=`\n"),
	[]byte("```risk r\ntrials: 1e400\nseed: -1\nvary: x\n```\n```sensitivity s\nvary x by 1000%\nrange x: 1 to 1\n```\n"),
	[]byte("```alternative a\ncash flows from: flows.csv\n```\n```alternative b\ncash flows from: \"missing.csv\"\n```\n"),
	[]byte("~~~alternative a\nlife: 5\n~~~\n````compare c\n```\n````\n"),
	[]byte("é\u2028```alternative é\nname: é—€\u00a0\nlife:\u00a05\n```\n"),
}

// checkParsed holds the result of one parse to the package's promises.
func checkParsed(t *testing.T, m *Memo, err error, files map[string][]byte) {
	t.Helper()
	if m == nil {
		t.Fatalf("Parse returned a nil memo (error %v)", err)
	}
	if err != nil {
		var list ErrorList
		if !errors.As(err, &list) {
			t.Fatalf("error is a %T, not an ErrorList: %v", err, err)
		}
		if len(list) == 0 {
			t.Fatalf("an empty ErrorList returned as an error")
		}
		for _, e := range list {
			if e.Msg == "" {
				t.Errorf("%v: an error without a message", e.Pos)
			}
			if !e.Pos.IsValid() {
				t.Errorf("error without a position: %v", e)
				continue
			}
			checkPos(t, e.Pos, files, "error "+e.Msg)
		}
	}
	walkValues(reflect.ValueOf(m), "memo", func(v any, path string) {
		switch v := v.(type) {
		case Pos:
			if v.IsValid() || v.Col != 0 {
				checkPos(t, v, files, path)
			}
		case Text:
			// A value read from a block line stands as written at its
			// position (a file name may be in quotes; every space character
			// is read as a plain space), so that a column inside it is a
			// column of the line. Not checked: the front matter, whose YAML
			// may quote or fold a value, and CSV cells.
			if v.Src == "" || !v.Pos.IsValid() || v.Pos.File != "memo.md" || strings.HasPrefix(path, "memo.Front") {
				return
			}
			line, ok := lineAt(files["memo.md"], v.Pos.Line)
			if !ok || v.Pos.Col < 1 || v.Pos.Col > utf8.RuneCount(line)+1 {
				return // reported as a position
			}
			rest := plainSpaces(string(line[colOffset(line, v.Pos.Col):]))
			if !strings.HasPrefix(rest, v.Src) && !strings.HasPrefix(strings.TrimLeft(rest, `"'`), v.Src) {
				t.Errorf("%s: %q is not at %v, which reads %q", path, v.Src, v.Pos, rest)
			}
		}
	})
}

// checkPos fails when p is not inside its file.
func checkPos(t *testing.T, p Pos, files map[string][]byte, what string) {
	t.Helper()
	src, ok := files[p.File]
	if !ok {
		t.Errorf("%s: position %v names an unknown file", what, p)
		return
	}
	line, ok := lineAt(src, p.Line)
	if !ok {
		t.Errorf("%s: position %v: the file has no line %d", what, p, p.Line)
		return
	}
	if n := utf8.RuneCount(line); p.Col < 1 || p.Col > n+1 {
		t.Errorf("%s: position %v: column outside line %d (%d characters)", what, p, p.Line, n)
	}
}

// lineAt returns line n (1-based) of src without its newline.
func lineAt(src []byte, n int) ([]byte, bool) {
	if n < 1 {
		return nil, false
	}
	for i := 1; i < n; i++ {
		nl := bytes.IndexByte(src, '\n')
		if nl < 0 {
			return nil, false
		}
		src = src[nl+1:]
	}
	if nl := bytes.IndexByte(src, '\n'); nl >= 0 {
		src = src[:nl]
	}
	return src, true
}

// colOffset is the byte offset of column col (1-based, in characters, an
// invalid byte counting as one) of line.
func colOffset(line []byte, col int) int {
	off := 0
	for c := 1; c < col && off < len(line); c++ {
		_, n := utf8.DecodeRune(line[off:])
		off += n
	}
	return off
}

var nodeType = reflect.TypeFor[ast.Node]()

// walkValues calls fn with every Pos and Text reachable from v, leaving
// out the Markdown tree (whose nodes point at each other) and the maps into
// it.
func walkValues(v reflect.Value, path string, fn func(v any, path string)) {
	switch v.Kind() {
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() || v.Type().Implements(nodeType) || v.Kind() == reflect.Interface && v.Elem().Type().Implements(nodeType) {
			return
		}
		walkValues(v.Elem(), path, fn)
	case reflect.Struct:
		switch x := v.Interface().(type) {
		case Pos:
			fn(x, path)
			return
		case Text:
			fn(x, path)
		}
		for i := range v.NumField() {
			if f := v.Type().Field(i); f.IsExported() {
				walkValues(v.Field(i), path+"."+f.Name, fn)
			}
		}
	case reflect.Slice, reflect.Array:
		if v.Type().Elem().Kind() == reflect.Uint8 {
			return
		}
		for i := range v.Len() {
			walkValues(v.Index(i), path, fn)
		}
	}
}
