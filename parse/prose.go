package parse

import "bytes"

// Bounds on the shape of a memo's Markdown (README.md, "Limits").
//
// The Markdown reader takes time that grows with the square of some
// shapes: containers nested on one line (`>>>>>...`, lists indented level
// upon level), runs of backticks of many lengths, emphasis markers that
// never close (`*a_*a_...`) and brackets (links). A 600 KB memo of such
// text kept worth busy for minutes. No memo written by a person comes near
// these bounds; a memo past one is reported at the place, before the
// Markdown is read.
const (
	// MaxNesting bounds the lists and block quotes one line opens.
	MaxNesting = 100
	// MaxIndent bounds a line's indentation, in columns (tabs count 4),
	// outside fenced blocks: nesting by indentation is nesting too.
	MaxIndent = 256
	// MaxBackticks bounds a run of backticks outside a fence line.
	MaxBackticks = 16
	// MaxEmphasisMarks bounds the * and _ of one paragraph.
	MaxEmphasisMarks = 10000
	// MaxBrackets bounds the [ of the memo's prose (links, images).
	MaxBrackets = 20000
	// MaxTableColumns bounds the | of one line of prose.
	MaxTableColumns = 256
)

// checkProse reports the first place where body passes one of the bounds
// above, and false then: the Markdown is not read further.
func (p *parser) checkProse(body []byte) bool {
	var fenceChar byte
	fenceLen := 0
	brackets, marks := 0, 0
	fail := func(off int, format string, args ...any) bool {
		p.errorf(p.idx.pos(off), format, args...)
		return false
	}
	for off := 0; off < len(body); {
		end := bytes.IndexByte(body[off:], '\n')
		if end < 0 {
			end = len(body)
		} else {
			end += off
		}
		line := body[off:end]
		start := off
		off = end + 1
		// The line's container prefix: indentation, > and list markers.
		i, col, nest := 0, 0, 0
		for i < len(line) {
			c := line[i]
			switch {
			case c == ' ':
				col++
				i++
				continue
			case c == '\t':
				col += 4
				i++
				continue
			case c == '>':
				nest++
				i++
				continue
			case (c == '-' || c == '*' || c == '+') && i+1 < len(line) && (line[i+1] == ' ' || line[i+1] == '\t'):
				nest++
				i++
				continue
			case c >= '0' && c <= '9':
				j := i
				for j < len(line) && j-i < 9 && line[j] >= '0' && line[j] <= '9' {
					j++
				}
				if j+1 < len(line) && (line[j] == '.' || line[j] == ')') && (line[j+1] == ' ' || line[j+1] == '\t') {
					nest++
					i = j + 1
					continue
				}
			}
			break
		}
		rest := line[i:]
		// Fences: inside one, the lines are literal.
		if n := fenceRun(rest); n >= 3 && (fenceChar == 0 || (rest[0] == fenceChar && n >= fenceLen && len(bytes.TrimSpace(rest[n:])) == 0)) {
			if fenceChar == 0 {
				fenceChar, fenceLen = rest[0], n
			} else {
				fenceChar, fenceLen = 0, 0
			}
			continue
		}
		if fenceChar != 0 {
			continue
		}
		// A blank line ends a paragraph; the front matter, blanked to
		// spaces, reads as blank lines.
		if len(bytes.TrimSpace(line)) == 0 {
			marks = 0
			continue
		}
		if nest > MaxNesting {
			return fail(start, "this line nests %d lists and block quotes; worth reads Markdown nested at most %d deep", nest, MaxNesting)
		}
		if col > MaxIndent {
			return fail(start, "this line is indented %d columns; worth reads lines indented at most %d (lists nested this deep are a sign of a damaged file)", col, MaxIndent)
		}
		run, bars := 0, 0
		for k, c := range line {
			if c == '`' {
				run++
				if run > MaxBackticks {
					return fail(start+k, "a run of more than %d backticks; worth reads runs of at most %d outside a fence line", MaxBackticks, MaxBackticks)
				}
				continue
			}
			run = 0
			switch c {
			case '*', '_':
				marks++
				if marks > MaxEmphasisMarks {
					return fail(start+k, "this paragraph holds more than %s * and _ marks; worth reads at most %s in one paragraph", Thousands(MaxEmphasisMarks), Thousands(MaxEmphasisMarks))
				}
			case '[':
				brackets++
				if brackets > MaxBrackets {
					return fail(start+k, "the memo's prose holds more than %s [ brackets (links and images); worth reads at most %s", Thousands(MaxBrackets), Thousands(MaxBrackets))
				}
			case '|':
				bars++
				if bars > MaxTableColumns {
					return fail(start+k, "this line holds more than %d | marks; a table may have at most %d columns", MaxTableColumns, MaxTableColumns)
				}
			}
		}
	}
	return true
}

// fenceRun is the length of the run of ` or ~ that starts s, or 0.
func fenceRun(s []byte) int {
	if len(s) == 0 || (s[0] != '`' && s[0] != '~') {
		return 0
	}
	n := 0
	for n < len(s) && s[n] == s[0] {
		n++
	}
	return n
}
