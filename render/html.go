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
	var base *template.Template
	var css string
	var err error
	if opt.TemplateDir == "" {
		embeddedOnce.Do(func() { embeddedTmpl, embeddedCSS, embeddedErr = loadTemplates(templates.FS, nil) })
		base, css, err = embeddedTmpl, embeddedCSS, embeddedErr
	} else {
		base, css, err = loadTemplates(templates.FS, os.DirFS(opt.TemplateDir))
	}
	if err != nil {
		return nil, err
	}
	t, err := base.Clone()
	if err != nil {
		return nil, err
	}
	charts := 0
	// The memo's top heading level becomes h2 (h1 is the memo's title).
	top := 6
	for _, ns := range [][]Node{doc.Body, doc.Appendix} {
		walk(ns, func(n Node) {
			if h, ok := n.(Heading); ok && h.Level < top {
				top = h.Level
			}
		})
	}
	t.Funcs(template.FuncMap{
		"headingLevel": func(l int) int { return min(max(l-top+2, 2), 6) },
		"rawHTML": func(s string) any {
			if doc.AllowHTML {
				return template.HTML(neutraliseRaw(s))
			}
			return s
		},
		"allowHTML": func() bool { return doc.AllowHTML },
		"layout": func(c Chart) svgChart {
			charts++
			return layoutChart(&c, "chart-"+strconv.Itoa(charts))
		},
	})
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
	buf.Grow(64 << 10)
	if err := t.ExecuteTemplate(&buf, "page", page); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

var (
	embeddedOnce sync.Once
	embeddedTmpl *template.Template
	embeddedCSS  string
	embeddedErr  error
)

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

// htmlFuncs are the template functions; rawHTML, allowHTML and layout are
// replaced for each document.
var htmlFuncs = template.FuncMap{
	"kind":         nodeKind,
	"headingLevel": func(l int) int { return min(max(l+1, 2), 6) },
	"safeLink":     SafeLink,
	"colClass":     colClass,
	"rowClass":     rowClass,
	"sameTerms":    sameTerms,
	"termClass": func(s string) string {
		if len([]rune(s)) > 60 {
			return "term long"
		}
		return "term"
	},
	"rawHTML":   func(s string) any { return s },
	"allowHTML": func() bool { return false },
	"layout":    func(c Chart) svgChart { return layoutChart(&c, "chart") },
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
