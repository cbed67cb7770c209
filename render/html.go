package render

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html"
	"html/template"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"unicode/utf8"

	"worth/templates"
)

// HTMLOptions choose the templates of the HTML writer.
type HTMLOptions struct {
	// TemplateDir is an organization's own templates folder holding files
	// with the names of the embedded ones (templates.Names); a file it
	// lacks is taken from the embedded set. Empty: the embedded templates.
	TemplateDir string
}

// maxLogoBytes is the largest logo the HTML writer embeds.
const maxLogoBytes = 2 << 20

// HTML writes the document as one self-contained HTML file: inline CSS
// (screen and print), inline SVG charts with titles and descriptions, no
// script, nothing fetched. html/template escapes every string; raw HTML
// from the prose is escaped as text unless doc.AllowHTML, and links with
// script or data schemes are dropped either way.
func HTML(doc *Doc, opt HTMLOptions) ([]byte, error) {
	var dt *docTemplates
	var css string
	if opt.TemplateDir == "" {
		embeddedOnce.Do(func() { embeddedTmpl, embeddedCSS, embeddedErr = loadTemplates(templates.FS, nil) })
		if embeddedErr != nil {
			return nil, embeddedErr
		}
		css = embeddedCSS
		if v, ok := embeddedPool.Get().(*docTemplates); ok {
			dt = v
		} else {
			t, err := embeddedTmpl.Clone()
			if err != nil {
				return nil, err
			}
			dt = bindTemplates(t)
		}
		defer func() {
			dt.st = docState{}
			embeddedPool.Put(dt)
		}()
	} else {
		t, c, err := loadTemplates(templates.FS, os.DirFS(opt.TemplateDir))
		if err != nil {
			return nil, err
		}
		dt, css = bindTemplates(t), c
	}
	// The memo's top heading level becomes h2 (h1 is the memo's title).
	top := 6
	size := 4<<10 + len(css)
	for _, ns := range [][]Node{doc.Body, doc.Appendix} {
		walk(ns, func(n Node) {
			if h, ok := n.(Heading); ok && h.Level < top {
				top = h.Level
			}
			size += sizeHint(n)
		})
	}
	dt.st = docState{doc: doc, top: top}
	page := struct {
		Doc      *Doc
		CSS      template.CSS
		PageSize string
		Logo     template.URL
	}{Doc: doc, CSS: template.CSS(css), PageSize: "letter", Logo: logoURI(doc)}
	if doc.Paper == "a4" {
		page.PageSize = "A4"
	}
	var buf bytes.Buffer
	buf.Grow(size)
	if err := dt.t.ExecuteTemplate(&buf, "page", page); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

var (
	embeddedOnce sync.Once
	embeddedTmpl *template.Template
	embeddedCSS  string
	embeddedErr  error
	// embeddedPool holds copies of the embedded templates, each bound to
	// its own docState, for one document at a time: html/template escapes
	// a copy on its first use only.
	embeddedPool sync.Pool
)

// docTemplates are templates whose document-dependent functions read the
// document being written from st.
type docTemplates struct {
	t  *template.Template
	st docState
}

// docState is what the document-dependent template functions need.
type docState struct {
	doc    *Doc
	top    int // the memo's top heading level
	charts int // charts written so far, for their ids
}

// bindTemplates binds the document-dependent functions of t (a set not yet
// executed) to a new docState.
func bindTemplates(t *template.Template) *docTemplates {
	dt := &docTemplates{t: t}
	st := &dt.st
	t.Funcs(template.FuncMap{
		"headingLevel": func(l int) int { return min(max(l-st.top+2, 2), 6) },
		"rawHTML": func(s string) any {
			if st.doc.AllowHTML {
				return template.HTML(neutraliseRaw(s))
			}
			return s
		},
		"allowHTML": func() bool { return st.doc.AllowHTML },
		"runsHTML":  func(r []Inline) template.HTML { return runsHTML(r, st.doc.AllowHTML) },
		"layout": func(c Chart) svgChart {
			st.charts++
			return layoutChart(&c, "chart-"+strconv.Itoa(st.charts))
		},
	})
	return dt
}

// loadTemplates parses the template files, each from over when it has it,
// else from base, and returns the stylesheet's text.
func loadTemplates(base, over fs.FS) (*template.Template, string, error) {
	t := template.New("worth").Funcs(htmlFuncs)
	var css string
	for _, name := range templates.Names {
		var b []byte
		var err error
		if over != nil {
			b, err = fs.ReadFile(over, name)
			if err != nil && !errors.Is(err, fs.ErrNotExist) {
				return nil, "", fmt.Errorf("template %s: %w", name, err)
			}
		}
		if over == nil || err != nil {
			if b, err = fs.ReadFile(base, name); err != nil {
				return nil, "", fmt.Errorf("template %s: %w", name, err)
			}
		}
		if strings.HasSuffix(name, ".css") {
			css = string(b)
			continue
		}
		if _, err := t.New(name).Parse(string(b)); err != nil {
			return nil, "", fmt.Errorf("template %s: %w", name, err)
		}
	}
	if t.Lookup("page") == nil {
		return nil, "", errors.New(`templates: no template named "page"`)
	}
	return t, css, nil
}

// htmlFuncs are the template functions; headingLevel, rawHTML, allowHTML,
// layout and runsHTML are replaced for each document.
var htmlFuncs = template.FuncMap{
	"kind":         nodeKind,
	"headingLevel": func(l int) int { return min(max(l+1, 2), 6) },
	"safeLink":     SafeLink,
	"colClass":     colClass,
	"rowClass":     rowClass,
	"rowID":        rowID,
	"cellTrace":    cellTrace,
	"sameTerms":    sameTerms,
	"termClass":    termClass,
	"rawHTML":      func(s string) any { return s },
	"allowHTML":    func() bool { return false },
	"layout":       func(c Chart) svgChart { return layoutChart(&c, "chart") },
	// Written in Go (see below): the default definitions of the templates
	// "runs", "table", "equations" and "chart".
	"runsHTML":      func(r []Inline) template.HTML { return runsHTML(r, false) },
	"tableHTML":     tableHTML,
	"equationsHTML": equationsHTML,
	"chartHTML":     chartHTML,
}

// sizeHint estimates the bytes a block takes on the page, a little over
// rather than under, so that the page's buffer is allocated once.
func sizeHint(n Node) int {
	runs := func(rs []Inline) int {
		s := 0
		for _, r := range rs {
			s += len(r.Text) + len(r.Source) + 16
			if r.Value || r.Link != "" {
				s += 48 + len(r.Link)
			}
		}
		return s
	}
	cells := func(cs []string) int {
		s := 0
		for _, c := range cs {
			s += len(c)*9/8 + 24
		}
		return s
	}
	switch x := n.(type) {
	case Heading:
		return 32 + len(x.ID) + runs(x.Text)
	case Paragraph:
		return 16 + runs(x.Text)
	case List:
		return 16 + 16*len(x.Items)
	case CodeBlock:
		return 64 + len(x.Text)*9/8
	case Table:
		s := 192 + len(x.Caption) + len(x.Note) + len(x.Source) + cells(x.Header) + traceBytes(x)
		for _, r := range x.Rows {
			s += 24 + cells(r)
		}
		return s
	case Equations:
		s := 64 + len(x.Title)
		for _, st := range x.Steps {
			s += 320 + len(st.Label) + len(st.LHS) + len(st.Result) + cells(st.Symbolic) + cells(st.Substituted)
		}
		return s
	case Callout:
		s := 320 + 2*len(x.Title) + len(x.Text) + cells(x.Items)
		for _, f := range x.Facts {
			s += 32 + len(f.Key) + len(f.Value)
		}
		return s
	case Chart:
		s := 1536 + 3*len(x.Title) + len(x.Alt) + 72*len(x.Arrows) + 128*(len(x.XTicks)+len(x.YTicks)) + 160*len(x.Marks) + cells(x.Notes)
		for _, se := range x.Series {
			s += 160 + len(se.Name) + 12*len(se.X)
		}
		return s
	}
	return 16
}

// nodeKind names a node for the templates' dispatch.
func nodeKind(n Node) string {
	switch x := n.(type) {
	case Heading:
		return "heading"
	case Paragraph:
		if len(x.Text) == 1 && x.Text[0].RawHTML {
			return "rawblock"
		}
		return "paragraph"
	case List:
		return "list"
	case Quote:
		return "quote"
	case CodeBlock:
		return "code"
	case Rule:
		return "rule"
	case Table:
		return "table"
	case Equations:
		return "equations"
	case Callout:
		return "callout"
	case Chart:
		return "chart"
	}
	return ""
}

// colClass is the class of a table's column: "num" for a right-aligned
// (numeric) column, "ctr" for a centred one, and "b" for a bold one.
func colClass(t Table, i int) string {
	var cls []string
	if i < len(t.Align) {
		switch t.Align[i] {
		case 'r':
			cls = append(cls, "num")
		case 'c':
			cls = append(cls, "ctr")
		}
	}
	if i < len(t.BoldCols) && t.BoldCols[i] {
		cls = append(cls, "b")
	}
	return strings.Join(cls, " ")
}

func rowClass(t Table, r int) string {
	if r < len(t.BoldRows) && t.BoldRows[r] {
		return "b"
	}
	return ""
}

// linkAttr finds attributes of raw HTML that hold a URL.
var linkAttr = regexp.MustCompile(`(?i)(\s(?:href|src|action|formaction|xlink:href|poster|background|cite|data|srcset)\s*=\s*)("[^"]*"|'[^']*'|[^\s>]+)`)

// neutraliseRaw keeps raw HTML as written but replaces any URL attribute
// whose scheme could run script or smuggle content with "#".
func neutraliseRaw(s string) string {
	return linkAttr.ReplaceAllStringFunc(s, func(m string) string {
		sub := linkAttr.FindStringSubmatch(m)
		v := strings.Trim(sub[2], `"'`)
		if SafeLink(html.UnescapeString(v)) == "" {
			return sub[1] + `"#"`
		}
		return m
	})
}

// logoURI embeds the memo's logo as a data: URI when it is a PNG or JPEG
// file of at most maxLogoBytes inside the memo's folder; anything else is
// left out.
func logoURI(doc *Doc) template.URL {
	if doc.Logo == "" || filepath.IsAbs(doc.Logo) {
		return ""
	}
	dir := doc.Dir
	if dir == "" {
		dir = "."
	}
	root, err := filepath.Abs(dir)
	if err != nil {
		return ""
	}
	if r, err := filepath.EvalSymlinks(root); err == nil {
		root = r
	}
	p, err := filepath.EvalSymlinks(filepath.Join(root, filepath.FromSlash(doc.Logo)))
	if err != nil {
		return ""
	}
	if rel, err := filepath.Rel(root, p); err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return ""
	}
	info, err := os.Stat(p)
	if err != nil || !info.Mode().IsRegular() || info.Size() > maxLogoBytes {
		return ""
	}
	b, err := os.ReadFile(p)
	if err != nil {
		return ""
	}
	var mime string
	switch {
	case bytes.HasPrefix(b, []byte("\x89PNG\r\n\x1a\n")):
		mime = "image/png"
	case bytes.HasPrefix(b, []byte("\xff\xd8\xff")):
		mime = "image/jpeg"
	default:
		return ""
	}
	return template.URL("data:" + mime + ";base64," + base64.StdEncoding.EncodeToString(b))
}

// The heavy, repetitive parts of the page — runs of inline text, tables,
// worked equations and the SVG charts (svg.go) — are written here in Go
// rather than through template actions, which cost a reflective call per
// cell, term and shape. The templates call them (tableHTML, equationsHTML,
// runsHTML, chartHTML) and stay the layer an organization overrides: a
// folder's own nodes.html or chart.html may define "table", "equations",
// "runs" or "chart" in full with template actions instead. The output is
// byte for byte what those template actions give: every string is escaped
// exactly as html/template escapes it (escapeHTML), links go through
// SafeLink and html/template's URL filter and normaliser (writeLink).

// escapeHTML appends s escaped as html/template escapes a plain string in
// element text, RCDATA (<title>) and quoted attribute values: NUL becomes
// U+FFFD and " & ' + < > become &#34; &amp; &#39; &#43; &lt; &gt;. No byte
// of a multi-byte UTF-8 sequence is below 0x80, so a byte loop is exact.
func escapeHTML(b *strings.Builder, s string) {
	last := 0
	for i := 0; i < len(s); i++ {
		if r := htmlEscapes[s[i]]; r != "" {
			b.WriteString(s[last:i])
			b.WriteString(r)
			last = i + 1
		}
	}
	b.WriteString(s[last:])
}

// htmlEscapes is html/template's replacement table for plain strings.
var htmlEscapes = [256]string{
	0:    "\uFFFD",
	'"':  "&#34;",
	'&':  "&amp;",
	'\'': "&#39;",
	'+':  "&#43;",
	'<':  "&lt;",
	'>':  "&gt;",
}

// writeLink writes the value of an href attribute for a link target that
// SafeLink kept, as html/template writes a string there: a scheme other
// than http, https or mailto becomes "#ZgotmplZ", the URL is normalised
// (bytes outside RFC 3986's unreserved and reserved sets percent-encoded,
// valid escapes kept) and the result escaped for the attribute.
func writeLink(b *strings.Builder, s string) {
	if scheme, _, ok := strings.Cut(s, ":"); ok && !strings.Contains(scheme, "/") &&
		!strings.EqualFold(scheme, "http") && !strings.EqualFold(scheme, "https") && !strings.EqualFold(scheme, "mailto") {
		s = "#ZgotmplZ"
	}
	var n strings.Builder
	n.Grow(len(s) + 16)
	written := 0
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case 'a' <= c && c <= 'z', 'A' <= c && c <= 'Z', '0' <= c && c <= '9':
			continue
		case strings.IndexByte("!#$&*+,/:;=?@[]-._~", c) >= 0:
			continue
		case c == '%' && i+2 < len(s) && isHexDigit(s[i+1]) && isHexDigit(s[i+2]):
			continue
		}
		n.WriteString(s[written:i])
		n.WriteByte('%')
		n.WriteByte("0123456789abcdef"[c>>4])
		n.WriteByte("0123456789abcdef"[c&15])
		written = i + 1
	}
	n.WriteString(s[written:])
	escapeHTML(b, n.String())
}

func isHexDigit(c byte) bool {
	return '0' <= c && c <= '9' || 'a' <= c && c <= 'f' || 'A' <= c && c <= 'F'
}

// runsHTML writes a run of inline text as the "runs" template did with
// template actions; raw HTML is kept (its links neutralised) only when
// allowHTML.
func runsHTML(runs []Inline, allowHTML bool) template.HTML {
	var b strings.Builder
	n := 0
	for i := range runs {
		n += len(runs[i].Text) + 16
	}
	b.Grow(n)
	for i := range runs {
		writeRun(&b, &runs[i], allowHTML)
	}
	return template.HTML(b.String())
}

func writeRun(b *strings.Builder, r *Inline, allowHTML bool) {
	switch {
	case r.Break:
		b.WriteString("<br>")
		return
	case r.RawHTML:
		if allowHTML {
			b.WriteString(neutraliseRaw(r.Text))
		} else {
			escapeHTML(b, r.Text)
		}
		return
	}
	link := SafeLink(r.Link)
	if link != "" {
		b.WriteString(`<a href="`)
		writeLink(b, link)
		b.WriteString(`">`)
	}
	if r.Bold {
		b.WriteString("<strong>")
	}
	if r.Italic {
		b.WriteString("<em>")
	}
	if r.Strike {
		b.WriteString("<del>")
	}
	switch {
	case r.Value:
		b.WriteString(`<span class="value" title="= `)
		escapeHTML(b, r.Source)
		b.WriteString(" (line ")
		b.WriteString(strconv.Itoa(r.Line))
		b.WriteString(`)">`)
		escapeHTML(b, r.Text)
		b.WriteString("</span>")
	case r.Code:
		b.WriteString("<code>")
		escapeHTML(b, r.Text)
		b.WriteString("</code>")
	default:
		escapeHTML(b, r.Text)
	}
	if r.Strike {
		b.WriteString("</del>")
	}
	if r.Italic {
		b.WriteString("</em>")
	}
	if r.Bold {
		b.WriteString("</strong>")
	}
	if link != "" {
		b.WriteString("</a>")
	}
}

// tableHTML writes a table as the "table" template did with template
// actions.
func tableHTML(t Table) template.HTML {
	var b strings.Builder
	n := 512 + len(t.Caption) + len(t.Note) + len(t.Source)
	for _, h := range t.Header {
		n += len(h) + 40
	}
	for _, row := range t.Rows {
		n += 24
		for _, c := range row {
			n += len(c) + 32
		}
	}
	b.Grow(n + traceBytes(t)) // the titles and links too (scale.go)
	cols := len(t.Header)
	for _, row := range t.Rows {
		cols = max(cols, len(row))
	}
	// Each column's class attribute, once.
	attr := make([]string, cols)
	for i := range attr {
		if c := colClass(t, i); c != "" {
			attr[i] = ` class="` + c + `"`
		}
	}
	id := ""
	if t.ID != "" {
		id = ` id="` + t.ID + `"` // trace.go: ids hold only [A-Za-z0-9_-]
	}
	if t.Caption != "" {
		b.WriteString(`<figure class="table computed"` + id + ">\n<figcaption>")
		escapeHTML(&b, t.Caption)
		b.WriteString("</figcaption>")
	} else {
		b.WriteString(`<figure class="table"` + id + `>`)
	}
	b.WriteString("\n<div class=\"scroll\"><table>\n<thead><tr>")
	for i, h := range t.Header {
		b.WriteString(`<th scope="col"`)
		b.WriteString(attr[i])
		b.WriteByte('>')
		escapeHTML(&b, h)
		b.WriteString("</th>")
	}
	b.WriteString("</tr></thead>\n<tbody>")
	for r, row := range t.Rows {
		b.WriteString("\n<tr")
		if id := rowID(t, r); id != "" {
			b.WriteString(` id="` + id + `"`)
		}
		if rowClass(t, r) != "" {
			b.WriteString(` class="b">`)
		} else {
			b.WriteString(">")
		}
		for i, c := range row {
			if i == 0 && t.Caption != "" {
				b.WriteString(`<th scope="row"`)
				b.WriteString(attr[i])
				b.WriteByte('>')
				escapeHTML(&b, c)
				b.WriteString("</th>")
				continue
			}
			b.WriteString("<td")
			b.WriteString(attr[i])
			if tr := cellTrace(t, r, i); tr.Title != "" {
				writeTraced(&b, c, tr)
				continue
			}
			b.WriteByte('>')
			escapeHTML(&b, c)
			b.WriteString("</td>")
		}
		b.WriteString("</tr>")
	}
	b.WriteString("\n</tbody>\n</table></div>")
	if t.Note != "" || t.Source != "" {
		b.WriteString("\n<p class=\"table-note\">")
		escapeHTML(&b, t.Note)
		if t.Source != "" {
			b.WriteString(` <span class="source">Source: `)
			escapeHTML(&b, t.Source)
			b.WriteString(".</span>")
		}
		b.WriteString("</p>")
	}
	b.WriteString("\n</figure>")
	return template.HTML(b.String())
}

// equationsHTML writes a worked solution as the "equations" template did
// with template actions.
func equationsHTML(e Equations) template.HTML {
	var b strings.Builder
	n := 64 + len(e.Title)
	for _, s := range e.Steps {
		n += 320 + len(s.Label) + len(s.LHS) + len(s.Result)
		for _, t := range s.Symbolic {
			n += len(t) + 32
		}
		for _, t := range s.Substituted {
			n += len(t) + 32
		}
	}
	b.Grow(n)
	b.WriteString("<figure class=\"equations\"")
	if e.ID != "" {
		b.WriteString(` id="` + e.ID + `"`)
	}
	b.WriteString(">\n<figcaption>")
	escapeHTML(&b, e.Title)
	b.WriteString("</figcaption>")
	for _, s := range e.Steps {
		b.WriteString("\n<div class=\"eq\">\n<p class=\"eq-label\">")
		escapeHTML(&b, s.Label)
		b.WriteString("</p>\n<div class=\"eq-grid\">\n<span class=\"lhs\">")
		escapeHTML(&b, s.LHS)
		b.WriteString(`</span><span class="rel">=</span><span class="rhs">`)
		writeTerms(&b, s.Symbolic)
		b.WriteString("</span>")
		if !sameTerms(s.Symbolic, s.Substituted) {
			b.WriteString("\n" + `<span class="lhs"></span><span class="rel">=</span><span class="rhs">`)
			writeTerms(&b, s.Substituted)
			b.WriteString("</span>")
		}
		b.WriteString("\n" + `<span class="lhs"></span><span class="rel">=</span><span class="rhs result">`)
		escapeHTML(&b, s.Result)
		b.WriteString("</span>\n</div>\n</div>")
	}
	b.WriteString("\n</figure>")
	return template.HTML(b.String())
}

func writeTerms(b *strings.Builder, terms []string) {
	for i, t := range terms {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(`<span class="`)
		b.WriteString(termClass(t))
		b.WriteString(`">`)
		escapeHTML(b, t)
		b.WriteString("</span>")
	}
}

// termClass is the class of a term of an equation: long terms wrap.
func termClass(s string) string {
	if utf8.RuneCountInString(s) > 60 {
		return "term long"
	}
	return "term"
}
