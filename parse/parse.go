package parse

import (
	"bytes"
	"fmt"
	"regexp"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/text"
	"go.yaml.in/yaml/v3"

	"worth/expr"
)

// BlockKinds lists every block kind of the memo language, in the order the
// contract describes them.
var BlockKinds = []string{"assume", "alternative", "compare", "sensitivity", "risk", "scenario", "budget", "replacement", "expect", "schedule", "diagram"}

// kindsWithID are the block kinds whose info string carries an id.
var kindsWithID = map[string]bool{
	"alternative": true, "compare": true, "sensitivity": true, "risk": true,
	"scenario": true, "budget": true, "replacement": true, "schedule": true, "diagram": true,
}

// notYet are block kinds of the contract this version does not read yet.
var notYet = map[string]bool{}

// ReservedIDs may not be used as alternative ids.
var ReservedIDs = map[string]bool{"do-nothing": true}

var idPattern = regexp.MustCompile(`^[A-Za-z0-9_-]+$`)

// Markdown returns the goldmark instance worth reads prose with: CommonMark
// plus GitHub tables, strikethrough and autolinks.
func Markdown() goldmark.Markdown {
	return goldmark.New(goldmark.WithExtensions(extension.GFM))
}

// Parse reads a memo. file is used in positions. It returns the memo and,
// when anything is wrong, an ErrorList with every error found.
func Parse(file string, src []byte) (*Memo, error) {
	return ParseWith(file, src, Options{})
}

// ParseWith is Parse with options: a Resolver for the files the memo names
// (see csv.go).
func ParseWith(file string, src []byte, opt Options) (*Memo, error) {
	p := &parser{
		memo:   &Memo{File: file, Source: src, Nodes: map[ast.Node]Block{}, InlineAt: map[ast.Node]*Inline{}},
		idx:    newLineIndex(file, src),
		opt:    opt,
		limits: opt.Limits.WithDefaults(),
	}
	p.memo.Limits = p.limits
	// A memo too large, or not UTF-8 text, is not read further (limits.go).
	if !p.checkSource(src) {
		p.memo.Doc = ast.NewDocument()
		return p.memo, p.errs.Err()
	}
	body := p.frontMatter(src)
	// Markdown shaped to make the reader take quadratic time is not read
	// (prose.go).
	if !p.checkProse(body) {
		p.memo.Doc = ast.NewDocument()
		return p.memo, p.errs.Err()
	}
	doc := Markdown().Parser().Parse(text.NewReader(body))
	p.memo.Doc = doc
	p.walk(doc, body)
	p.checkIDs()
	if err := p.errs.Err(); err != nil {
		return p.memo, err
	}
	return p.memo, nil
}

type parser struct {
	memo *Memo
	idx  *lineIndex
	errs ErrorList
	opt  Options
	// limits bound the memo (limits.go); blocks and alts count the worth
	// blocks read so far.
	limits               Limits
	blocks, alts         int
	overBlocks, overAlts bool
}

func (p *parser) errorf(pos Pos, format string, args ...any) {
	p.errs.Add(pos, format, args...)
}

// frontMatter reads the YAML header, if any, and returns the source with the
// header blanked out (newlines kept, other bytes turned to spaces) so that
// byte offsets and lines stay the same for the Markdown parser.
func (p *parser) frontMatter(src []byte) []byte {
	start := 0
	if bytes.HasPrefix(src, []byte("\xef\xbb\xbf")) {
		start = 3
	}
	rest := src[start:]
	if !(bytes.HasPrefix(rest, []byte("---\n")) || bytes.HasPrefix(rest, []byte("---\r\n"))) {
		return src
	}
	// Find the closing line.
	off := start + bytes.IndexByte(rest, '\n') + 1
	yamlStart := off
	end := -1
	for off < len(src) {
		nl := bytes.IndexByte(src[off:], '\n')
		lineEnd := len(src)
		if nl >= 0 {
			lineEnd = off + nl
		}
		line := strings.TrimRight(string(src[off:lineEnd]), "\r ")
		if line == "---" || line == "..." {
			end = lineEnd
			break
		}
		if nl < 0 {
			break
		}
		off = lineEnd + 1
	}
	if end < 0 {
		p.errorf(p.idx.pos(start), "front matter opened with --- is never closed; expected a line with --- after the header")
		return src
	}
	yamlText := src[yamlStart:off]
	p.readYAML(yamlText, yamlStart)
	body := make([]byte, len(src))
	copy(body, src)
	for i := 0; i < end; i++ {
		if body[i] != '\n' && body[i] != '\r' {
			body[i] = ' '
		}
	}
	return body
}

var frontKeys = []string{"title", "to", "from", "date", "subject", "currency", "rate", "tax rate", "inflation", "paper", "logo", "amounts"}

// readYAML reads the front matter y, which starts at byte start of the
// memo.
func (p *parser) readYAML(y []byte, start int) {
	at := p.yamlAt(y, start)
	var doc yaml.Node
	if err := yaml.Unmarshal(y, &doc); err != nil {
		msg := err.Error()
		line := 1
		// yaml errors read "yaml: line N: ..."; take the line.
		var n int
		if _, e := fmtSscanLine(msg, &n); e == nil {
			line = n
			if i := strings.Index(msg, ": "); i >= 0 {
				msg = msg[i+2:]
				if j := strings.Index(msg, ": "); j >= 0 {
					msg = msg[j+2:]
				}
			}
		}
		msg = strings.TrimPrefix(msg, "yaml: ")
		// Fix (tests' corpus, testdata/errors): the commonest cause, a title
		// holding ": ", now says what to do about it.
		if strings.Contains(msg, "mapping values are not allowed") {
			msg += "; a value that holds \": \" must be in quotes, e.g. title: \"Intake screens: steel or wedge-wire\""
		}
		p.errorf(at(line, 1), "front matter is not valid YAML: %s", msg)
		return
	}
	if len(doc.Content) == 0 {
		return
	}
	m := doc.Content[0]
	if m.Kind != yaml.MappingNode {
		p.errorf(at(m.Line, m.Column), "front matter must be a list of \"key: value\" lines")
		return
	}
	fm := &p.memo.Front
	seen := map[string]bool{}
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := m.Content[i], m.Content[i+1]
		keyPos := at(k.Line, k.Column)
		valPos := at(v.Line, v.Column)
		key := strings.ToLower(strings.Join(strings.Fields(k.Value), " "))
		if v.Kind != yaml.ScalarNode {
			p.errorf(valPos, "front matter value of %q must be plain text", k.Value)
			continue
		}
		if seen[key] {
			p.errorf(keyPos, "front matter key %q is given twice", key)
			continue
		}
		seen[key] = true
		f := Field{Key: key, KeyPos: keyPos, Value: Text{Src: strings.TrimSpace(v.Value), Pos: valPos}}
		fm.Fields = append(fm.Fields, f)
		switch key {
		case "title":
			fm.Title = f
		case "to":
			fm.To = f
		case "from":
			fm.From = f
		case "date":
			fm.Date = f
		case "subject":
			fm.Subject = f
		case "currency":
			fm.Currency = f
		case "paper":
			fm.Paper = f
		case "logo":
			fm.Logo = f
		case "rate":
			fm.Rate = p.rateSpec(f.Value)
		case "tax rate":
			fm.TaxRate = p.rateSpec(f.Value)
		case "inflation":
			fm.Inflation = p.rateSpec(f.Value)
		case "amounts":
			fm.Amounts = p.amounts(f)
		default:
			if s := expr.Closest(key, frontKeys); s != "" && len(key) >= 3 {
				p.errorf(keyPos, "unknown front matter key %q; did you mean %q?", key, s)
				continue
			}
			fm.Extra = append(fm.Extra, f)
		}
	}
}

// yamlAt turns a line and column of the YAML header y, which starts at
// byte start of the memo, into a position in the memo.
//
// Fix (fuzzing, FuzzParse): YAML ends a line at a lone CR and at U+0085,
// U+2028 and U+2029 too, where the memo's lines (and every other position)
// end only at LF; a key after one was placed a line too far down, past the
// end of the memo's line.
func (p *parser) yamlAt(y []byte, start int) func(line, col int) Pos {
	starts := []int{0} // byte offset of each YAML line in y
	for i := 0; i < len(y); {
		r, n := utf8.DecodeRune(y[i:])
		switch r {
		case '\r':
			if i+1 < len(y) && y[i+1] == '\n' {
				n = 2
			}
			starts = append(starts, i+n)
		case '\n', '\u0085', '\u2028', '\u2029':
			starts = append(starts, i+n)
		}
		i += n
	}
	return func(line, col int) Pos {
		line = min(max(line, 1), len(starts))
		return p.idx.pos(start + starts[line-1]).Shift(max(col, 1) - 1)
	}
}

var yamlLine = regexp.MustCompile(`line (\d+)`)

func fmtSscanLine(msg string, n *int) (int, error) {
	m := yamlLine.FindStringSubmatch(msg)
	if m == nil {
		return 0, errNoLine
	}
	v := 0
	for _, c := range m[1] {
		v = v*10 + int(c-'0')
	}
	*n = v
	return 1, nil
}

type parseErr string

func (e parseErr) Error() string { return string(e) }

const errNoLine = parseErr("no line")

// compounding periods a year of a nominal rate.
var periods = map[string]int{
	"annually": 1, "yearly": 1, "annual": 1,
	"semiannually": 2, "semiannual": 2, "semi-annually": 2, "semi-annual": 2, "half-yearly": 2,
	"quarterly": 4, "monthly": 12, "weekly": 52, "daily": 365,
}

// rateSpec splits a rate as written into its value and how it compounds:
// "7%", "0.07", "6% nominal monthly", "8% continuous", "3% real",
// "7% effective".
func (p *parser) rateSpec(t Text) *RateSpec {
	rs := &RateSpec{Text: t, Value: t}
	words := strings.Fields(strings.ToLower(t.Src))
	if len(words) == 0 {
		p.errorf(t.Pos, "a rate is needed here, e.g. 7%% or 6%% nominal monthly")
		return nil
	}
	// Find where the modifier words begin: the first word that is a known
	// modifier.
	cut := -1
	for i, w := range words {
		switch w {
		case "nominal", "continuous", "continuously", "real", "effective", "compounded":
			cut = i
		}
		if cut >= 0 {
			break
		}
	}
	if cut < 0 {
		return rs
	}
	// Byte offset of the modifier in the original text: the start of its
	// field (a name holding "real" is not the modifier).
	at := wordOffset(t.Src, cut)
	rs.Value = Text{Src: strings.TrimSpace(t.Src[:at]), Pos: t.Pos}
	if rs.Value.Src == "" {
		p.errorf(t.Pos, "the rate's value is missing before %q", words[cut])
		return nil
	}
	mods := words[cut:]
	modPos := t.Pos.Shift(len([]rune(t.Src[:at])))
	bad := func() *RateSpec {
		p.errorf(modPos, "cannot read %q as a rate's compounding; expected e.g. \"nominal monthly\", \"nominal quarterly\", \"continuous\", \"real\" or \"effective\"", strings.Join(mods, " "))
		return nil
	}
	switch {
	case len(mods) == 1 && mods[0] == "effective":
		return rs
	case len(mods) == 1 && (mods[0] == "continuous" || mods[0] == "continuously"):
		rs.Mode = "continuous"
	case len(mods) == 2 && mods[0] == "compounded" && mods[1] == "continuously":
		rs.Mode = "continuous"
	case len(mods) == 1 && mods[0] == "real":
		rs.Mode = "real"
	case len(mods) >= 2 && (mods[0] == "nominal" || mods[0] == "compounded"):
		rest := mods[1:]
		if rest[0] == "compounded" && len(rest) > 1 {
			rest = rest[1:]
		}
		if len(rest) != 1 {
			return bad()
		}
		n, ok := periods[rest[0]]
		if !ok {
			return bad()
		}
		rs.Mode, rs.PerYear, rs.Period = "nominal", n, rest[0]
	default:
		return bad()
	}
	return rs
}

// wordOffset is the byte offset of the n-th space-separated word of s.
func wordOffset(s string, n int) int {
	in := false
	k := -1
	for i, c := range s {
		space := c == ' ' || c == '\t'
		if !space && !in {
			k++
			if k == n {
				return i
			}
		}
		in = !space
	}
	return len(s)
}

// walk visits the Markdown document and turns worth blocks and inline
// values into typed values.
func (p *parser) walk(doc ast.Node, body []byte) {
	_ = ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch n := n.(type) {
		case *ast.FencedCodeBlock:
			p.fenced(n, body)
			return ast.WalkSkipChildren, nil
		case *ast.CodeSpan:
			p.codeSpan(n, body)
			return ast.WalkSkipChildren, nil
		}
		return ast.WalkContinue, nil
	})
}

func (p *parser) codeSpan(n *ast.CodeSpan, body []byte) {
	var b strings.Builder
	start, end := -1, -1
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		if t, ok := c.(*ast.Text); ok {
			if start < 0 {
				start = t.Segment.Start
			}
			end = t.Segment.Stop
			b.Write(t.Segment.Value(body))
		}
	}
	s := plainSpaces(b.String())
	if start < 0 || !strings.HasPrefix(strings.TrimSpace(s), "=") {
		return
	}
	lead := len(s) - len(strings.TrimLeft(s, " "))
	exprSrc := strings.TrimSpace(s)[1:]
	lead2 := len(exprSrc) - len(strings.TrimLeft(exprSrc, " "))
	exprSrc = strings.TrimSpace(exprSrc)
	pos := p.idx.pos(start + lead + 1 + lead2)
	if exprSrc == "" {
		p.errorf(pos, "inline value `=` has no expression; write e.g. `= pw(steel)`")
		return
	}
	in := &Inline{Expr: Text{Src: exprSrc, Pos: pos}, Node: n, Offset: start, End: end}
	p.memo.Inline = append(p.memo.Inline, in)
	p.memo.InlineAt[n] = in
}

// srcLine is one line of a block's body with its position.
type srcLine struct {
	text string // without the trailing newline and without a comment
	raw  string
	pos  Pos // first character
}

func (p *parser) fenced(n *ast.FencedCodeBlock, body []byte) {
	if n.Info == nil {
		return
	}
	info := string(n.Info.Segment.Value(body))
	words := strings.Fields(info)
	if len(words) == 0 {
		return
	}
	kind := words[0]
	known := false
	for _, k := range BlockKinds {
		if k == kind {
			known = true
		}
	}
	infoPos := p.idx.pos(n.Info.Segment.Start)
	if !known {
		if s := expr.Closest(kind, BlockKinds); s != "" && len(kind) >= 4 {
			p.errorf(infoPos, "unknown block kind %q; did you mean %q?", kind, s)
		}
		return // an ordinary code block
	}
	head := BlockHead{Kind: kind, Pos: infoPos, Node: n}
	head.EndLine = infoPos.Line + n.Lines().Len() + 1
	if kindsWithID[kind] {
		if len(words) < 2 {
			p.errorf(infoPos.Shift(len([]rune(kind))), "%s %s block needs an id after %q, e.g. ```%s %s", article(kind), kind, kind, kind, exampleID[kind])
		} else {
			head.ID = words[1]
			at := strings.Index(info, words[1])
			head.IDPos = infoPos.Shift(len([]rune(info[:at])))
			if !idPattern.MatchString(head.ID) {
				p.errorf(head.IDPos, "block id %q may hold only letters, digits, - and _", head.ID)
			}
		}
		if len(words) > 2 {
			at := strings.LastIndex(info, words[2])
			p.errorf(infoPos.Shift(len([]rune(info[:at]))), "unexpected %q after the block id; a %s block's first line is ```%s ID", words[2], kind, kind)
		}
	} else if len(words) > 1 {
		at := strings.Index(info[len(kind):], words[1]) + len(kind)
		p.errorf(infoPos.Shift(len([]rune(info[:at]))), "%s %s block takes no id; remove %q", article(kind), kind, words[1])
	}
	if notYet[kind] {
		p.errorf(infoPos, "the %s block is part of the memo language but this version of worth does not read it yet", kind)
		return
	}
	if !p.countBlock(kind, infoPos) {
		return // past a limit (limits.go)
	}
	lines := p.blockLines(n, body)
	var b Block
	switch kind {
	case "assume":
		b = p.assume(head, lines)
	case "alternative":
		b = p.alternative(head, lines)
	case "compare":
		b = p.compare(head, lines)
	case "expect":
		b = p.expect(head, lines)
	case "schedule", "diagram":
		b = p.place(head, lines)
	case "replacement":
		b = p.replacement(head, lines)
	case "sensitivity":
		b = p.sensitivity(head, lines)
	case "scenario":
		b = p.scenario(head, lines)
	case "budget":
		b = p.budget(head, lines)
	case "risk":
		b = p.risk(head, lines)
	}
	if b != nil {
		p.memo.Blocks = append(p.memo.Blocks, b)
		p.memo.Nodes[n] = b
	}
}

// article is "an" before a block kind that starts with a vowel, else "a".
//
// Fix (tests' corpus, testdata/errors): messages read "a alternative block"
// and "a assume block".
func article(kind string) string {
	if kind != "" && strings.ContainsRune("aeiou", rune(kind[0])) {
		return "an"
	}
	return "a"
}

var exampleID = map[string]string{
	"alternative": "steel", "compare": "screens", "sensitivity": "screens-sens", "risk": "screens-risk",
	"scenario": "high-energy", "budget": "program", "replacement": "pump-2", "schedule": "steel", "diagram": "steel",
}

// blockLines returns the non-blank, comment-stripped lines of a block.
func (p *parser) blockLines(n *ast.FencedCodeBlock, body []byte) []srcLine {
	var out []srcLine
	for i := 0; i < n.Lines().Len(); i++ {
		seg := n.Lines().At(i)
		raw := strings.TrimRight(string(seg.Value(body)), "\r\n")
		t := stripComment(plainSpaces(raw))
		lead := len(t) - len(strings.TrimLeft(t, " \t"))
		t = strings.TrimSpace(t)
		if t == "" {
			continue
		}
		out = append(out, srcLine{text: t, raw: raw, pos: p.idx.pos(seg.Start + lead)})
	}
	return out
}

// plainSpaces turns every space character (tab, \v, \f, no-break space,
// the other Unicode spaces) into a plain space, one character for one, so
// that columns stay those of the line.
//
// Fix (fuzzing, FuzzParse): the line readers measure the spaces and tabs
// they trim while strings.TrimSpace drops every Unicode space, so a value
// after a \v or a no-break space ("life:\v5") was placed columns off.
func plainSpaces(s string) string {
	return strings.Map(func(r rune) rune {
		if r != ' ' && unicode.IsSpace(r) {
			return ' '
		}
		return r
	}, s)
}

// stripComment removes a # comment that is not inside a quoted string.
func stripComment(s string) string {
	if i := unquoted(s, '#'); i >= 0 {
		return s[:i]
	}
	return s
}

// unquoted returns the byte offset of the first c in s outside quoted
// strings, or -1.
func unquoted(s string, c rune) int {
	var quote rune
	for i, r := range s {
		switch {
		case quote != 0:
			if r == quote {
				quote = 0
			}
		case r == '"' || r == '\'':
			quote = r
		case r == c:
			return i
		}
	}
	return -1
}

// at returns the text s found inside line l, with its position. s must be a
// substring of l.text starting at byte offset off.
func (l srcLine) at(off int, s string) Text {
	return Text{Src: s, Pos: l.pos.Shift(len([]rune(l.text[:off])))}
}

// splitKV splits "key: value" at the first colon.
func (l srcLine) splitKV() (key string, keyText Text, value Text, ok bool) {
	i := strings.IndexByte(l.text, ':')
	if i < 0 {
		return "", Text{}, Text{}, false
	}
	k := strings.TrimSpace(l.text[:i])
	v := l.text[i+1:]
	lead := len(v) - len(strings.TrimLeft(v, " \t"))
	v = strings.TrimSpace(v)
	return normKey(k), l.at(0, k), l.at(i+1+lead, v), true
}

// keyLine is one "key: value" line of a block.
type keyLine struct {
	srcLine
	key     string // lower case, single spaces
	keyText Text   // the key as written
	val     Text
}

// keyLines reads the "key: value" lines of a block. A line without a colon
// (the error quotes example, e.g. "trials: 20000", when one is given), a
// key given a second time, and a key without a value are errors; the other
// lines are returned in order. canon, when not nil, maps a key to the one
// it stands for before the repeat check.
func (p *parser) keyLines(h BlockHead, lines []srcLine, example string, canon func(string) string) []keyLine {
	seen := map[string]int{}
	var out []keyLine
	for _, l := range lines {
		key, keyText, val, ok := l.splitKV()
		if !ok {
			eg := ""
			if example != "" {
				eg = fmt.Sprintf(", e.g. %q", example)
			}
			p.errorf(l.pos, "expected \"key: value\" in %s %s%s; got %q", h.Kind, h.ID, eg, l.text)
			continue
		}
		if canon != nil {
			key = canon(key)
		}
		if prev, dup := seen[key]; dup {
			p.errorf(keyText.Pos, "%s is given twice in %s %s (first at line %d)", key, h.Kind, h.ID, prev)
			continue
		}
		seen[key] = l.pos.Line
		if val.Src == "" {
			p.errorf(val.Pos, "%s has no value after the colon", keyText.Src)
			continue
		}
		out = append(out, keyLine{l, key, keyText, val})
	}
	return out
}

func normKey(k string) string {
	return strings.ToLower(strings.Join(strings.Fields(k), " "))
}

var namePattern = regexp.MustCompile(`^[A-Za-z_][A-Za-z0-9_]*$`)

func (p *parser) assume(h BlockHead, lines []srcLine) Block {
	b := &Assume{BlockHead: h}
	for _, l := range lines {
		eq := strings.IndexByte(l.text, '=')
		if eq < 0 || (eq+1 < len(l.text) && l.text[eq+1] == '=') {
			p.errorf(l.pos, "expected \"name = value\" in an assume block, got %q", l.text)
			continue
		}
		name := strings.TrimSpace(l.text[:eq])
		if !namePattern.MatchString(name) {
			p.errorf(l.pos, "%q is not a name: a name starts with a letter or _ and holds letters, digits and _", name)
			continue
		}
		rest := l.text[eq+1:]
		restOff := eq + 1
		a := &Assumption{Name: name, NamePos: l.pos, Line: l.pos.Line}
		if t := tilde(rest); t >= 0 {
			d := strings.TrimSpace(rest[t+1:])
			dOff := restOff + t + 1 + (len(rest[t+1:]) - len(strings.TrimLeft(rest[t+1:], " \t")))
			a.Dist = p.distribution(l, dOff, d)
			rest = rest[:t]
		}
		lead := len(rest) - len(strings.TrimLeft(rest, " \t"))
		v := strings.TrimSpace(rest)
		if v == "" {
			p.errorf(l.pos.Shift(len([]rune(l.text[:eq+1]))), "%s has no value after =", name)
			continue
		}
		a.Expr = l.at(restOff+lead, v)
		b.Items = append(b.Items, a)
	}
	return b
}

// tilde finds a ~ outside quotes.
func tilde(s string) int { return unquoted(s, '~') }

// DistributionArgs gives the number of parameters of each distribution.
var DistributionArgs = map[string]int{"triangular": 3, "uniform": 2, "normal": 2, "pert": 3, "lognormal": 2}

var distNames = []string{"triangular", "uniform", "normal", "pert", "lognormal"}

func (p *parser) distribution(l srcLine, off int, s string) *Distribution {
	pos := l.at(off, s).Pos
	open := strings.IndexByte(s, '(')
	if open < 0 || !strings.HasSuffix(s, ")") {
		p.errorf(pos, "expected a distribution after ~, e.g. triangular(min, mode, max), got %q", s)
		return nil
	}
	kind := strings.ToLower(strings.TrimSpace(s[:open]))
	n, ok := DistributionArgs[kind]
	if !ok {
		msg := "unknown distribution %q; expected triangular, uniform, normal, pert or lognormal"
		if c := expr.Closest(kind, distNames); c != "" {
			p.errorf(pos, msg+"; did you mean %q?", kind, c)
		} else {
			p.errorf(pos, msg, kind)
		}
		return nil
	}
	inner := s[open+1 : len(s)-1]
	parts := SplitArgs(inner)
	if len(parts) != n {
		p.errorf(pos, "%s takes %d values, got %d", kind, n, len(parts))
		return nil
	}
	d := &Distribution{Kind: kind, Pos: pos}
	for _, a := range parts {
		lead := len(a.S) - len(strings.TrimLeft(a.S, " \t"))
		d.Args = append(d.Args, l.at(off+open+1+a.Off+lead, strings.TrimSpace(a.S)))
	}
	return d
}

// Arg is one comma-separated part of an argument list and its byte offset.
type Arg struct {
	S   string
	Off int
}

// SplitArgs splits a list at commas outside parentheses and quotes. A comma
// between a digit and exactly three digits (1,250,000) is a thousands
// separator, not a split.
func SplitArgs(s string) []Arg {
	var out []Arg
	depth, start := 0, 0
	var quote byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case quote != 0:
			if c == quote {
				quote = 0
			}
		case c == '"' || c == '\'':
			quote = c
		case c == '(':
			depth++
		case c == ')':
			depth--
		case c == ',' && depth == 0:
			if i > 0 && isDigit(s[i-1]) && i+3 < len(s)+1 && i+3 <= len(s)-0 && threeDigits(s[i+1:]) {
				continue
			}
			out = append(out, Arg{S: s[start:i], Off: start})
			start = i + 1
		}
	}
	return append(out, Arg{S: s[start:], Off: start})
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

func threeDigits(s string) bool {
	if len(s) < 3 || !isDigit(s[0]) || !isDigit(s[1]) || !isDigit(s[2]) {
		return false
	}
	return len(s) == 3 || !isDigit(s[3])
}
