package render

// The PDF writer: it walks the document model and draws it with fpdf,
// laying out the text itself (line breaking, page breaks, table headers
// repeated on every page, boxes that split across pages), so that every
// position on the page is decided here and the output is the same bytes
// for the same document.
//
// Text is set in the Go fonts (golang.org/x/image/font/gofont), embedded
// as Unicode TrueType and subset by fpdf. They hold every sign a memo
// prints (€ £ ¥ − ≥ ∞ Σ ↑ ↓ and the subscript digits of PW₁); a character
// they lack is replaced by a readable stand-in (see standIn) rather than
// printed as an empty box.

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"image"
	"image/draw"
	"image/jpeg"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"time"
	"unicode"
	"unicode/utf8"

	"github.com/go-pdf/fpdf"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/gobolditalic"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/gomonobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/sfnt"
	"golang.org/x/image/math/fixed"

	"worth/compute"
)

// PDFOptions are the settings of the PDF writer that do not come from the
// memo itself.
type PDFOptions struct {
	// BaseDir is the memo's folder: a logo path is resolved against it and
	// may not leave it.
	BaseDir string
}

// MaxLogoBytes is the largest logo file the PDF writer accepts.
const MaxLogoBytes = 5 << 20

// PDF draws a document as a PDF file. The same document gives the same
// bytes: the file's dates come from SOURCE_DATE_EPOCH when it is set, else
// from the memo's date, else a fixed date, never from the clock.
func PDF(doc *Doc, opt PDFOptions) ([]byte, error) {
	w := newPDFWriter(doc)
	if doc.Logo != "" {
		base := opt.BaseDir
		if base == "" {
			base = doc.Dir
		}
		lg, err := pdfLoadLogo(base, doc.Logo)
		if err != nil {
			return nil, err
		}
		w.registerLogo(lg)
		if err := w.pdf.Error(); err != nil {
			return nil, fmt.Errorf("logo %s: %v", doc.Logo, err)
		}
	}
	w.memoHeading()
	w.nodes(doc.Body)
	if len(doc.Appendix) > 0 {
		if len(doc.Body) > 0 || w.y > w.top+w.pageH()*0.5 {
			w.newPage()
		} else {
			w.y += 12
		}
		w.inAppendix = true
		if _, ok := doc.Appendix[0].(Heading); !ok {
			w.heading(Heading{Level: 1, Text: []Inline{{Text: "Appendix"}}})
		}
		w.nodes(doc.Appendix)
	}
	if doc.Caution != "" {
		w.caution(doc.Caution)
	}
	w.decoratePages()
	if err := w.pdf.Error(); err != nil {
		return nil, fmt.Errorf("pdf: %v", err)
	}
	// The document is drawn: let it go before the pages are compressed,
	// where the writer's memory peaks, and take the bytes without a copy
	// (scale.go).
	w.doc = nil
	return pdfOutput(w.pdf)
}

// ---------------------------------------------------------------------
// Fonts and text measurement

// pdfFace is one of the embedded type faces.
type pdfFace uint8

const (
	fRegular pdfFace = iota
	fBold
	fItalic
	fBoldItalic
	fMono
	fMonoBold
	pdfNFaces
)

var pdfFaceFiles = [pdfNFaces]struct {
	family, style string
	ttf           []byte
}{
	{"sans", "", goregular.TTF},
	{"sans", "B", gobold.TTF},
	{"sans", "I", goitalic.TTF},
	{"sans", "BI", gobolditalic.TTF},
	{"mono", "", gomono.TTF},
	{"mono", "B", gomonobold.TTF},
}

// pdfFaceMetrics holds a pdfFace's advance widths in thousandths of an em, the
// unit fpdf computes with, so that what is measured here is what fpdf
// writes. Missing glyphs have width -1.
type pdfFaceMetrics struct {
	once  sync.Once
	ttf   []byte // the font file as embedded
	font  *sfnt.Font
	scale float64
	ascii [128]float64
	mu    sync.Mutex
	other map[rune]float64
}

var pdfMetrics [pdfNFaces]pdfFaceMetrics

func (m *pdfFaceMetrics) init(fc pdfFace) {
	m.once.Do(func() {
		m.ttf = pdfFaceFiles[fc].ttf
		if pdfFaceFiles[fc].family == "sans" {
			m.ttf = pdfNarrowHyphen(m.ttf)
		}
		f, err := sfnt.Parse(m.ttf)
		if err != nil {
			panic("render: embedded font: " + err.Error())
		}
		m.font = f
		m.scale = 1000 / float64(f.UnitsPerEm())
		m.other = map[rune]float64{}
		var buf sfnt.Buffer
		for r := rune(0); r < 128; r++ {
			m.ascii[r] = m.lookup(&buf, r)
		}
	})
}

func (m *pdfFaceMetrics) lookup(buf *sfnt.Buffer, r rune) float64 {
	gi, err := m.font.GlyphIndex(buf, r)
	if err != nil || gi == 0 {
		return -1
	}
	upem := fixed.Int26_6(m.font.UnitsPerEm())
	adv, err := m.font.GlyphAdvance(buf, gi, upem<<6, font.HintingNone)
	if err != nil {
		return -1
	}
	return math.Round(m.scale * float64(adv) / 64)
}

// width of r in thousandths of an em, -1 when the pdfFace lacks it.
func (m *pdfFaceMetrics) width(r rune) float64 {
	if r < 128 && r >= 0 {
		return m.ascii[r]
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	w, ok := m.other[r]
	if !ok {
		var buf sfnt.Buffer
		w = m.lookup(&buf, r)
		m.other[r] = w
	}
	return w
}

func pdfFaceOf(fc pdfFace) *pdfFaceMetrics {
	m := &pdfMetrics[fc]
	m.init(fc)
	return m
}

// pdfStrWidth is the width of s set in fc at size points.
func pdfStrWidth(s string, fc pdfFace, size float64) float64 {
	m := pdfFaceOf(fc)
	var t float64
	for _, r := range s {
		if w := m.width(r); w > 0 {
			t += w
		} else if iw, ok := pdfIcons[r]; ok && w < 0 {
			t += iw
		}
	}
	return t * size / 1000
}

// pdfIcons are signs the fonts lack that the writer draws itself, with
// their widths in thousandths of an em: a tick, a cross, a warning
// triangle.
var pdfIcons = map[rune]float64{'✓': 760, '✔': 760, '✗': 700, '✘': 700, '⚠': 900}

const pdfIconRunes = "✓✔✗✘⚠"

// pdfNarrowHyphen returns a copy of a TrueType font whose hyphen-minus is
// drawn with the font's own hyphen glyph, the one it gives the soft hyphen.
// The Go fonts draw "-" as wide as a minus sign, for code; in prose that
// reads as a dash ("life–cycle", "2026–11–30"). The character stays a
// hyphen-minus: only the font's character map changes, so the text copies
// and searches as written. The font is returned unchanged where it has no
// such glyph or its map cannot be read.
func pdfNarrowHyphen(ttf []byte) []byte {
	be := binary.BigEndian
	if len(ttf) < 12 {
		return ttf
	}
	ntab := int(be.Uint16(ttf[4:]))
	dir := -1
	for i := 0; i < ntab; i++ {
		e := 12 + 16*i
		if e+16 > len(ttf) {
			return ttf
		}
		if string(ttf[e:e+4]) == "cmap" {
			dir = e
		}
	}
	if dir < 0 {
		return ttf
	}
	cmap := int(be.Uint32(ttf[dir+8:]))
	if cmap+4 > len(ttf) {
		return ttf
	}
	sub := -1
	for k := 0; k < int(be.Uint16(ttf[cmap+2:])); k++ {
		e := cmap + 4 + 8*k
		if e+8 > len(ttf) {
			return ttf
		}
		if be.Uint16(ttf[e:]) == 3 && be.Uint16(ttf[e+2:]) == 1 {
			sub = cmap + int(be.Uint32(ttf[e+4:]))
		}
	}
	if sub < 0 || sub+14 > len(ttf) || be.Uint16(ttf[sub:]) != 4 {
		return ttf
	}
	segs := int(be.Uint16(ttf[sub+6:])) / 2
	ends := sub + 14
	starts := ends + 2*segs + 2
	deltas := starts + 2*segs
	ranges := deltas + 2*segs
	if ranges+2*segs > len(ttf) {
		return ttf
	}
	type pair struct{ code, glyph uint16 }
	var pairs []pair
	for i := 0; i < segs; i++ {
		end, start := int(be.Uint16(ttf[ends+2*i:])), int(be.Uint16(ttf[starts+2*i:]))
		delta, ro := be.Uint16(ttf[deltas+2*i:]), int(be.Uint16(ttf[ranges+2*i:]))
		for c := start; c <= end && c < 0xffff; c++ {
			g := uint16(c) + delta
			if ro != 0 {
				at := ranges + 2*i + ro + 2*(c-start)
				if at+2 > len(ttf) {
					return ttf
				}
				g = be.Uint16(ttf[at:])
				if g != 0 {
					g += delta
				}
			}
			if g != 0 {
				pairs = append(pairs, pair{uint16(c), g})
			}
		}
	}
	var soft uint16
	for _, p := range pairs {
		if p.code == 0xad {
			soft = p.glyph
		}
	}
	if soft == 0 {
		return ttf
	}
	for i := range pairs {
		if pairs[i].code == '-' {
			pairs[i].glyph = soft
		}
	}
	// A new format 4 map, one segment per run of consecutive codes with
	// consecutive glyphs.
	type seg struct{ start, end, delta uint16 }
	var ss []seg
	for _, p := range pairs {
		d := p.glyph - p.code
		if n := len(ss); n > 0 && ss[n-1].end+1 == p.code && ss[n-1].delta == d {
			ss[n-1].end = p.code
			continue
		}
		ss = append(ss, seg{p.code, p.code, d})
	}
	ss = append(ss, seg{0xffff, 0xffff, 1})
	n := len(ss)
	sr, es := 1, 0
	for sr*2 <= n {
		sr *= 2
		es++
	}
	sr *= 2
	var t []byte
	u16 := func(v uint16) { t = be.AppendUint16(t, v) }
	u16(0) // cmap version
	u16(1) // one subtable
	u16(3) // Windows
	u16(1) // Unicode BMP
	t = be.AppendUint32(t, 12)
	u16(4) // format
	u16(uint16(16 + 8*n))
	u16(0)
	u16(uint16(2 * n))
	u16(uint16(sr))
	u16(uint16(es))
	u16(uint16(2*n - sr))
	for _, s := range ss {
		u16(s.end)
	}
	u16(0)
	for _, s := range ss {
		u16(s.start)
	}
	for _, s := range ss {
		u16(s.delta)
	}
	for range ss {
		u16(0)
	}
	out := make([]byte, len(ttf), len(ttf)+len(t)+8)
	copy(out, ttf)
	for len(out)%4 != 0 {
		out = append(out, 0)
	}
	off := len(out)
	out = append(out, t...)
	for len(out)%4 != 0 {
		out = append(out, 0)
	}
	var sum uint32
	for i := off; i+4 <= len(out); i += 4 {
		sum += be.Uint32(out[i:])
	}
	be.PutUint32(out[dir+4:], sum)
	be.PutUint32(out[dir+8:], uint32(off))
	be.PutUint32(out[dir+12:], uint32(len(t)))
	return out
}

// pdfStandIns replace characters the Go fonts lack by text that says the
// same thing.
var pdfStandIns = map[rune]string{
	'₹': "INR ", '₩': "KRW ", '₫': "VND ", '₽': "RUB ", '₺': "TRY ", '₪': "ILS ",
	'₱': "PHP ", '฿': "THB ", '₦': "NGN ", '₴': "UAH ", '₸': "KZT ", '₭': "LAK ",
	'✓': "√", '✔': "√", '✗': "×", '✘': "×", '⚠': "!", '★': "*", '☆': "*",
	'\u2060': "", '\u200b': "", '\ufeff': "", '\u00ad': "",
	'\u202f': " ", '\u2009': " ", '\u2002': " ", '\u2003': " ",
}

// pdfClean returns s with every character fc cannot draw replaced: known
// signs by their stand-ins, tabs by spaces, control characters dropped,
// anything else by "?".
func pdfClean(s string, fc pdfFace) string {
	simple := true
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c >= 0x7f {
			simple = false
			break
		}
	}
	if simple {
		return s
	}
	m := pdfFaceOf(fc)
	var b strings.Builder
	for _, r := range s {
		switch {
		case r == '\t':
			b.WriteString("    ")
		case r == '\n' || r == '\r':
			b.WriteByte(' ')
		case r < 0x20 || r == 0x7f:
		case r == utf8.RuneError:
			b.WriteByte('?')
		case m.width(r) >= 0:
			b.WriteRune(r)
		case pdfIcons[r] > 0:
			b.WriteRune(r)
		default:
			if t, ok := pdfStandIns[r]; ok {
				b.WriteString(t)
			} else if unicode.Is(unicode.Mn, r) {
				// a combining mark the font lacks: leave the base letter
			} else {
				b.WriteByte('?')
			}
		}
	}
	return b.String()
}

// ---------------------------------------------------------------------
// Colours and geometry

type pdfRgb struct{ r, g, b int }

var (
	pdfColText     = pdfRgb{28, 33, 40}
	pdfColMuted    = pdfRgb{96, 104, 114}
	pdfColFaint    = pdfRgb{150, 156, 164}
	pdfColRule     = pdfRgb{200, 205, 211}
	pdfColHair     = pdfRgb{226, 229, 233}
	pdfColAccent   = pdfRgb{22, 84, 112}   // headings, rules, the heading block
	pdfColLink     = pdfRgb{22, 92, 170}   // links
	pdfColHeadFill = pdfRgb{232, 237, 242} // table header rows
	pdfColZebra    = pdfRgb{247, 248, 250}
	pdfColCodeFill = pdfRgb{244, 245, 247}
	pdfColEqFill   = pdfRgb{246, 248, 250}
	pdfColRecFill  = pdfRgb{231, 244, 237}
	pdfColPick     = pdfRgb{238, 247, 241} // the recommended column of a table
	pdfColRecBar   = pdfRgb{30, 120, 80}
	pdfColWarnFill = pdfRgb{253, 240, 228}
	pdfColWarnBar  = pdfRgb{196, 82, 18}
	pdfColNoteFill = pdfRgb{236, 241, 247}
	pdfColNoteBar  = pdfRgb{90, 112, 140}
)

const (
	pdfBodySize  = 10.0
	pdfBodyLead  = 1.42 // line height as a multiple of the font size
	pdfSmallSize = 8.5
	pdfTableSize = 8.8
	pdfMonoSize  = 8.6
)

type pdfWriter struct {
	doc  *Doc
	pdf  *fpdf.Fpdf
	cur  compute.Currency
	pw   float64 // page width
	ph   float64 // page height
	top  float64 // where the text starts on a page
	bot  float64 // where it ends
	lm   float64 // page margins
	rm   float64
	left float64 // the current text column
	righ float64
	y    float64

	added      [pdfNFaces]bool
	pdfFace    pdfFace
	size       float64
	hasFont    bool
	textColor  pdfRgb
	quoteBars  []float64
	marker     *pdfListMarker
	anchors    map[string]int
	logo       *pdfLogoImage
	inAppendix bool
	lastGap    float64 // space left below the previous block
	outline    int     // level of the last bookmark

	hasTextColor bool // textColor is set in fpdf (setTextColor)
}

type pdfListMarker struct {
	text    string
	right   float64 // the marker is set flush right against this x
	pdfFace pdfFace
}

func newPDFWriter(doc *Doc) *pdfWriter {
	size := "Letter"
	if strings.EqualFold(strings.TrimSpace(doc.Paper), "a4") {
		size = "A4"
	}
	p := fpdf.New("P", "pt", size, "")
	p.SetCompression(true)
	p.SetCatalogSort(true)
	stamp := pdfDocTime(doc)
	p.SetCreationDate(stamp)
	p.SetModificationDate(stamp)
	p.SetProducer("worth", false)
	p.SetCreator("worth", false)
	p.SetAutoPageBreak(false, 0)
	p.SetMargins(0, 0, 0)
	p.SetTitle(doc.Title, true)
	for _, kv := range doc.Heading {
		switch strings.ToLower(kv.Key) {
		case "from":
			p.SetAuthor(kv.Value, true)
		case "subject":
			p.SetSubject(kv.Value, true)
		}
	}
	pw, ph := p.GetPageSize()
	w := &pdfWriter{doc: doc, pdf: p, pw: pw, ph: ph, anchors: map[string]int{}}
	w.lm, w.rm = 60, 60
	w.top, w.bot = 62, ph-58
	w.left, w.righ = w.lm, pw-w.rm
	if c, ok := compute.CurrencyOf(strings.TrimSpace(doc.Currency)); ok {
		w.cur = c
	} else if doc.Currency != "" {
		w.cur = compute.Currency{Code: doc.Currency, Symbol: doc.Currency + " ", Decimals: 2}
	} else {
		w.cur = compute.Currency{Code: "USD", Symbol: "$", Decimals: 2}
	}
	// Links to headings: every heading with an id gets a destination.
	var scan func(ns []Node)
	scan = func(ns []Node) {
		for _, n := range ns {
			switch n := n.(type) {
			case Heading:
				if n.ID != "" {
					if _, ok := w.anchors[n.ID]; !ok {
						w.anchors[n.ID] = p.AddLink()
					}
				}
			case List:
				for _, it := range n.Items {
					scan(it)
				}
			case Quote:
				scan(n.Body)
			}
		}
	}
	scan(doc.Body)
	scan(doc.Appendix)
	p.AddPage()
	w.y = w.top
	return w
}

// pdfDocTime is the date written into the file: SOURCE_DATE_EPOCH, else the
// memo's date, else a fixed date.
func pdfDocTime(doc *Doc) time.Time {
	if s := strings.TrimSpace(os.Getenv("SOURCE_DATE_EPOCH")); s != "" {
		if n, err := strconv.ParseInt(s, 10, 64); err == nil && n >= 0 {
			return time.Unix(n, 0).UTC()
		}
	}
	date := doc.Date
	if date == "" {
		for _, kv := range doc.Heading {
			if strings.EqualFold(kv.Key, "date") {
				date = kv.Value
			}
		}
	}
	for _, layout := range []string{"2006-01-02", "January 2, 2006", "2 January 2006", "Jan 2, 2006", "2 Jan 2006", "2006-01"} {
		if t, err := time.Parse(layout, strings.TrimSpace(date)); err == nil {
			return t.UTC()
		}
	}
	return time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
}

func (w *pdfWriter) pageH() float64 { return w.bot - w.top }

// setFont selects a pdfFace and size, embedding the pdfFace the first time it is
// used (a pdfFace never used costs nothing).
func (w *pdfWriter) setFont(fc pdfFace, size float64) {
	if !w.added[fc] {
		// fpdf writes into the font bytes it is given while subsetting,
		// so each document gets its own copy.
		ff := pdfFaceFiles[fc]
		w.pdf.AddUTF8FontFromBytes(ff.family, ff.style, append([]byte(nil), pdfFaceOf(fc).ttf...))
		w.added[fc] = true
	}
	if w.hasFont && w.pdfFace == fc && w.size == size {
		return
	}
	ff := pdfFaceFiles[fc]
	w.pdf.SetFont(ff.family, ff.style, size)
	w.pdfFace, w.size, w.hasFont = fc, size, true
}

func (w *pdfWriter) setTextColor(c pdfRgb) {
	if w.hasTextColor && w.textColor == c {
		return // fpdf keeps it (across pages too); setting it again only formats it again
	}
	w.pdf.SetTextColor(c.r, c.g, c.b)
	w.textColor, w.hasTextColor = c, true
}

func (w *pdfWriter) setDraw(c pdfRgb, width float64) {
	w.pdf.SetDrawColor(c.r, c.g, c.b)
	w.pdf.SetLineWidth(width)
}

func (w *pdfWriter) setFill(c pdfRgb) { w.pdf.SetFillColor(c.r, c.g, c.b) }

// text draws s with its pdfBaseline at y.
func (w *pdfWriter) text(x, y float64, s string, fc pdfFace, size float64, c pdfRgb) {
	s = pdfClean(s, fc)
	if s == "" {
		return
	}
	if strings.ContainsAny(s, pdfIconRunes) {
		// Signs the font lacks are drawn between runs of text.
		start := 0
		for i, r := range s {
			if pdfIcons[r] == 0 || pdfFaceOf(fc).width(r) >= 0 {
				continue
			}
			if start < i {
				w.text(x, y, s[start:i], fc, size, c)
				x += pdfStrWidth(s[start:i], fc, size)
			}
			w.icon(r, x, y, size)
			x += pdfIcons[r] * size / 1000
			start = i + utf8.RuneLen(r)
		}
		if start < len(s) {
			w.text(x, y, s[start:], fc, size, c)
		}
		return
	}
	w.setFont(fc, size)
	w.setTextColor(c)
	w.pdf.Text(x, y, strings.ReplaceAll(s, "\u00a0", " "))
}

// icon draws one of pdfIcons with its left edge at x on baseline y.
func (w *pdfWriter) icon(r rune, x, y, size float64) {
	em := size
	w.pdf.SetLineCapStyle("round")
	w.pdf.SetLineJoinStyle("round")
	switch r {
	case '✓', '✔':
		w.setDraw(pdfColBenefit, em*0.12)
		w.polyline([]fpdf.PointType{{X: x + em*0.1, Y: y - em*0.33}, {X: x + em*0.3, Y: y - em*0.08}, {X: x + em*0.66, Y: y - em*0.66}})
	case '✗', '✘':
		w.setDraw(pdfColCost, em*0.12)
		w.pdf.Line(x+em*0.14, y-em*0.62, x+em*0.56, y-em*0.06)
		w.pdf.Line(x+em*0.56, y-em*0.62, x+em*0.14, y-em*0.06)
	case '⚠':
		w.setFill(pdfColWarnBar)
		w.pdf.Polygon([]fpdf.PointType{{X: x + em*0.45, Y: y - em*0.74}, {X: x + em*0.86, Y: y + em*0.02}, {X: x + em*0.04, Y: y + em*0.02}}, "F")
		w.setFill(pdfRgb{255, 255, 255})
		w.pdf.Rect(x+em*0.41, y-em*0.5, em*0.08, em*0.3, "F")
		w.pdf.Rect(x+em*0.41, y-em*0.14, em*0.08, em*0.08, "F")
	}
	w.pdf.SetLineCapStyle("butt")
	w.pdf.SetLineJoinStyle("miter")
}

// textRight draws s ending at x.
func (w *pdfWriter) textRight(x, y float64, s string, fc pdfFace, size float64, c pdfRgb) {
	s = pdfClean(s, fc)
	w.text(x-pdfStrWidth(s, fc, size), y, s, fc, size, c)
}

func (w *pdfWriter) textCenter(x, y float64, s string, fc pdfFace, size float64, c pdfRgb) {
	s = pdfClean(s, fc)
	w.text(x-pdfStrWidth(s, fc, size)/2, y, s, fc, size, c)
}

// pdfFit shortens s with an ellipsis until it fits in width.
func pdfFit(s string, fc pdfFace, size, width float64) string {
	s = pdfClean(s, fc)
	if pdfStrWidth(s, fc, size) <= width {
		return s
	}
	rs := []rune(s)
	for len(rs) > 0 && pdfStrWidth(string(rs)+"…", fc, size) > width {
		rs = rs[:len(rs)-1]
	}
	return strings.TrimSpace(string(rs)) + "…"
}

// pdfBaseline is where text of the given size sits in a line of height h
// starting at y.
func pdfBaseline(y, h, size float64) float64 { return y + h/2 + size*0.34 }

// ---------------------------------------------------------------------
// Pages

func (w *pdfWriter) newPage() {
	w.pdf.AddPage()
	w.hasFont = false
	w.y = w.top
	w.lastGap = 0
}

// room is the space left on the page.
func (w *pdfWriter) room() float64 { return w.bot - w.y }

// ensure starts a new page unless h fits on this one.
func (w *pdfWriter) ensure(h float64) {
	if w.y+h > w.bot && w.y > w.top+0.5 {
		w.newPage()
	}
}

// gap adds vertical space before a block, merging with the space the
// previous block left (the larger wins), and never at the top of a page.
func (w *pdfWriter) gap(g float64) {
	if w.y <= w.top+0.5 {
		return
	}
	if g > w.lastGap {
		w.y += g - w.lastGap
		w.lastGap = g
	}
}

func (w *pdfWriter) after(g float64) {
	w.y += g
	w.lastGap = g
}

// decorate draws what runs beside the text from y0 to y1: the bars of the
// quotes the text is in.
func (w *pdfWriter) decorate(y0, y1 float64) {
	for _, x := range w.quoteBars {
		w.setFill(pdfColRule)
		w.pdf.Rect(x, y0, 2, y1-y0, "F")
	}
}

// flushMarker draws a pending list marker on the first line of its item.
func (w *pdfWriter) flushMarker(base float64) {
	if w.marker == nil {
		return
	}
	m := w.marker
	w.marker = nil
	w.textRight(m.right, base, m.text, m.pdfFace, pdfBodySize, pdfColMuted)
}

// decoratePages draws the running header and the page numbers once every
// page exists, so "page N of M" is exact.
func (w *pdfWriter) decoratePages() {
	n := w.pdf.PageCount()
	title := w.doc.Title
	date := w.doc.Date
	for p := 1; p <= n; p++ {
		w.pdf.SetPage(p)
		w.hasFont = false
		// fpdf only writes a font change when the font differs from the one
		// it last set, which may have been on another page: force it.
		w.setFont(fRegular, 7.5)
		w.setFont(fRegular, 8)
		if p > 1 {
			hy := 34.0
			dw := pdfStrWidth(pdfClean(date, fRegular), fRegular, 8)
			t := pdfFit(title, fRegular, 8, w.pw-w.lm-w.rm-dw-24)
			w.text(w.lm, hy, t, fRegular, 8, pdfColMuted)
			w.textRight(w.pw-w.rm, hy, date, fRegular, 8, pdfColMuted)
			w.setDraw(pdfColRule, 0.5)
			w.pdf.Line(w.lm, hy+6, w.pw-w.rm, hy+6)
		}
		fy := w.ph - 32
		w.setDraw(pdfColHair, 0.5)
		w.pdf.Line(w.lm, fy-11, w.pw-w.rm, fy-11)
		w.textRight(w.pw-w.rm, fy, fmt.Sprintf("page %d of %d", p, n), fRegular, 8, pdfColMuted)
		if p > 1 && w.doc.Currency != "" {
			w.text(w.lm, fy, "amounts in "+w.cur.Code, fRegular, 8, pdfColFaint)
		}
	}
}

// ---------------------------------------------------------------------
// The memo heading

func (w *pdfWriter) memoHeading() {
	x0, x1 := w.lm, w.pw-w.rm
	y := 48.0
	titleRight := x1
	if w.logo != nil {
		lw, lh := w.logo.size(150, 44)
		w.pdf.ImageOptions(w.logo.name, x1-lw, y-4, lw, lh, false, fpdf.ImageOptions{ImageType: w.logo.typ}, 0, "")
		titleRight = x1 - lw - 16
	}
	// A small label, then the title.
	w.text(x0, y+6, "MEMORANDUM", fBold, 7.5, pdfColAccent)
	y += 14
	title := w.doc.Title
	if title == "" {
		title = "Memorandum"
	}
	lines := pdfWrapPlain(title, fBold, 19, titleRight-x0)
	for _, l := range lines {
		w.text(x0, y+19, l, fBold, 19, pdfColText)
		y += 24
	}
	if w.logo != nil {
		_, lh := w.logo.size(150, 44)
		y = math.Max(y, 44+lh+6)
	}
	y += 4
	w.setFill(pdfColAccent)
	w.pdf.Rect(x0, y, x1-x0, 2, "F")
	y += 10
	// The To / From / Date / Subject grid.
	var kw float64
	for _, kv := range w.doc.Heading {
		kw = math.Max(kw, pdfStrWidth(strings.ToUpper(kv.Key), fBold, 7.5))
	}
	kw += 14
	for _, kv := range w.doc.Heading {
		vl := pdfWrapPlain(kv.Value, fRegular, pdfBodySize, x1-x0-kw)
		if len(vl) == 0 {
			vl = []string{""}
		}
		lh := pdfBodySize * 1.45
		w.text(x0, pdfBaseline(y, lh, pdfBodySize), strings.ToUpper(kv.Key), fBold, 7.5, pdfColMuted)
		fc := fRegular
		if strings.EqualFold(kv.Key, "subject") {
			fc = fBold
		}
		for _, l := range vl {
			w.text(x0+kw, pdfBaseline(y, lh, pdfBodySize), l, fc, pdfBodySize, pdfColText)
			y += lh
		}
		y += 1
	}
	y += 5
	w.setDraw(pdfColRule, 0.6)
	w.pdf.Line(x0, y, x1, y)
	w.y = y + 16
	w.lastGap = 16
	w.setFont(fRegular, pdfBodySize)
	w.pdf.Bookmark(pdfClean(title, fRegular), 0, 0)
}

// ---------------------------------------------------------------------
// Blocks

func (w *pdfWriter) nodes(ns []Node) {
	for i, n := range ns {
		var next Node
		if i+1 < len(ns) {
			next = ns[i+1]
		}
		if h, ok := n.(Heading); ok {
			w.headingWith(h, next)
			continue
		}
		if p, ok := n.(Paragraph); ok && next != nil && pdfIntroduces(p) {
			// A paragraph that pdfIntroduces what follows ("as the chart
			// shows:") stays on its page.
			lines := w.layout(p.Text, fRegular, pdfBodySize, w.righ-w.left)
			if h := float64(len(lines)) * pdfBodySize * pdfBodyLead; h < w.pageH()/3 {
				w.gap(6)
				w.ensure(h + 6 + w.minHeight(next))
			}
		}
		w.node(n)
	}
}

// pdfIntroduces reports whether a paragraph ends with a colon.
func pdfIntroduces(p Paragraph) bool {
	t := strings.TrimSpace(pdfPlainText(p.Text))
	return strings.HasSuffix(t, ":")
}

func (w *pdfWriter) node(n Node) {
	switch n := n.(type) {
	case Heading:
		w.heading(n)
	case Paragraph:
		w.paragraph(n.Text, pdfBodySize, pdfColText, 0)
	case List:
		w.list(n)
	case Quote:
		w.quote(n)
	case CodeBlock:
		w.codeBlock(n)
	case Rule:
		w.gap(8)
		w.ensure(2)
		w.setDraw(pdfColRule, 0.6)
		w.pdf.Line(w.left, w.y, w.righ, w.y)
		w.decorate(w.y-4, w.y+4)
		w.after(10)
	case Table:
		w.table(&n)
	case Equations:
		w.equations(&n)
	case Callout:
		w.callout(&n)
	case Chart:
		w.chart(&n)
	case *Table:
		w.table(n)
	case *Equations:
		w.equations(n)
	case *Callout:
		w.callout(n)
	case *Chart:
		w.chart(n)
	case *Heading:
		w.heading(*n)
	case *Paragraph:
		w.paragraph(n.Text, pdfBodySize, pdfColText, 0)
	case *List:
		w.list(*n)
	case *Quote:
		w.quote(*n)
	case *CodeBlock:
		w.codeBlock(*n)
	case *Rule:
		w.node(Rule{})
	}
}

var pdfHeadingSizes = [...]float64{0, 15, 12.5, 11, 10.5, 10, 10}

func pdfHeadingSize(level int) float64 {
	if level < 1 {
		level = 1
	}
	if level >= len(pdfHeadingSizes) {
		level = len(pdfHeadingSizes) - 1
	}
	return pdfHeadingSizes[level]
}

// headingWith sets a heading so that it is never left alone at the foot of
// a page: the start of what follows it must pdfFit below it.
func (w *pdfWriter) headingWith(h Heading, next Node) {
	size := pdfHeadingSize(h.Level)
	lines := w.layout(h.Text, fBold, size, w.righ-w.left)
	need := float64(len(lines))*size*1.3 + 14
	if next != nil {
		need += w.minHeight(next)
	}
	w.gap(pdfHeadingGapBefore(h.Level))
	w.ensure(need)
	w.heading(h)
}

func pdfHeadingGapBefore(level int) float64 {
	switch level {
	case 1:
		return 18
	case 2:
		return 14
	}
	return 10
}

func (w *pdfWriter) heading(h Heading) {
	size := pdfHeadingSize(h.Level)
	color := pdfColAccent
	if h.Level >= 3 {
		color = pdfColText
	}
	w.gap(pdfHeadingGapBefore(h.Level))
	lines := w.layout(h.Text, fBold, size, w.righ-w.left)
	w.ensure(float64(len(lines)) * size * 1.3)
	if id, ok := w.anchors[h.ID]; ok && h.ID != "" {
		w.pdf.SetLink(id, w.y, w.pdf.PageNo())
	}
	if h.Level <= 3 {
		// The outline: under the title, each level at most one below the
		// one before it.
		w.setFont(fBold, size)
		level := min(max(h.Level, 1), w.outline+1)
		w.outline = level
		w.pdf.Bookmark(pdfClean(pdfPlainText(h.Text), fRegular), level, w.y)
	}
	w.emitLines(lines, size*1.3, color)
	if h.Level <= 2 {
		w.setDraw(pdfColHair, 0.6)
		w.pdf.Line(w.left, w.y+1, w.righ, w.y+1)
		w.after(7)
	} else {
		w.after(4)
	}
}

// minHeight is how much of a block must pdfFit below a heading for the
// heading to stay on the page.
func (w *pdfWriter) minHeight(n Node) float64 {
	lh := pdfBodySize * pdfBodyLead
	switch n := n.(type) {
	case Paragraph:
		k := len(w.layout(n.Text, fRegular, pdfBodySize, w.righ-w.left))
		return float64(min(k, 3))*lh + 4
	case *Paragraph:
		return w.minHeight(*n)
	case Table:
		return 70
	case *Table:
		return 70
	case Chart:
		return w.chartHeight(&n) + 10
	case *Chart:
		return w.chartHeight(n) + 10
	case Equations:
		return 80
	case *Equations:
		return 80
	case Callout:
		return math.Min(w.calloutHeight(&n), 160)
	case *Callout:
		return math.Min(w.calloutHeight(n), 160)
	case CodeBlock, *CodeBlock:
		return 3*pdfMonoSize*1.4 + 12
	}
	return 2 * lh
}

// paragraph sets prose at the given size, indented by indent.
func (w *pdfWriter) paragraph(text []Inline, size float64, c pdfRgb, indent float64) {
	if len(text) == 0 {
		return
	}
	w.gap(6)
	lines := w.layout(text, fRegular, size, w.righ-w.left-indent)
	save := w.left
	w.left += indent
	w.emitLines(lines, size*pdfBodyLead, c)
	w.left = save
	w.after(5)
}

// emitLines draws laid-out lines one by one, breaking pages between them,
// never leaving the first line of several alone at the foot of a page nor
// the last alone at the top of the next.
func (w *pdfWriter) emitLines(lines []pdfTextLine, lead float64, c pdfRgb) {
	height := func(k int) float64 { return math.Max(lead, lines[k].size*pdfBodyLead) }
	n := len(lines)
	for i, ln := range lines {
		h := height(i)
		switch {
		case i == 0 && n >= 2:
			w.ensure(h + height(1))
		case i >= 2 && i == n-2 && w.y+h <= w.bot && w.y+h+height(n-1) > w.bot:
			w.newPage()
		}
		w.ensure(h)
		base := pdfBaseline(w.y, h, ln.size)
		w.flushMarker(base)
		w.drawLine(ln, w.left, base, c)
		w.decorate(w.y, w.y+h)
		w.y += h
		w.lastGap = 0
	}
}

func (w *pdfWriter) list(l List) {
	w.gap(4)
	indent := 18.0
	if l.Ordered {
		last := l.Start + len(l.Items) - 1
		indent = math.Max(18, pdfStrWidth(strconv.Itoa(last)+".", fRegular, pdfBodySize)+8)
	}
	save := w.left
	w.left += indent
	for k, item := range l.Items {
		m := "•"
		if l.Ordered {
			m = strconv.Itoa(l.Start+k) + "."
		}
		w.marker = &pdfListMarker{text: m, right: w.left - 6, pdfFace: fRegular}
		for j, n := range item {
			if p, ok := n.(Paragraph); ok && j == 0 {
				// tight items: no space above the first paragraph
				lines := w.layout(p.Text, fRegular, pdfBodySize, w.righ-w.left)
				w.emitLines(lines, pdfBodySize*pdfBodyLead, pdfColText)
				w.after(2)
				continue
			}
			w.node(n)
		}
		if w.marker != nil {
			// an empty item: its marker alone
			w.ensure(pdfBodySize * pdfBodyLead)
			w.flushMarker(pdfBaseline(w.y, pdfBodySize*pdfBodyLead, pdfBodySize))
			w.y += pdfBodySize * pdfBodyLead
		}
	}
	w.left = save
	w.after(4)
}

func (w *pdfWriter) quote(q Quote) {
	w.gap(6)
	x := w.left + 2
	w.quoteBars = append(w.quoteBars, x)
	save := w.left
	w.left += 14
	for _, n := range q.Body {
		if p, ok := n.(Paragraph); ok {
			w.gap(4)
			lines := w.layout(pdfItalicize(p.Text), fRegular, pdfBodySize, w.righ-w.left)
			w.emitLines(lines, pdfBodySize*pdfBodyLead, pdfColMuted)
			w.after(4)
			continue
		}
		w.node(n)
	}
	w.left = save
	w.quoteBars = w.quoteBars[:len(w.quoteBars)-1]
	w.after(6)
}

func pdfItalicize(in []Inline) []Inline {
	out := make([]Inline, len(in))
	for i, r := range in {
		r.Italic = !r.Code
		out[i] = r
	}
	return out
}

// pdfBoxRow is one row of a boxed block; rows with the same keep id (above
// zero) stay on one page where they can.
type pdfBoxRow struct {
	h    float64
	keep int
	draw func(x, y float64)
}

type pdfBoxStyle struct {
	fill      pdfRgb
	bar       pdfRgb
	barW      float64
	border    bool
	padX      float64
	padTop    float64
	padBottom float64
	continued string // what a part on a later page says it continues
}

// box draws rows on a filled background, splitting across pages between
// rows and drawing the background of each page's part first.
func (w *pdfWriter) box(st pdfBoxStyle, rows []pdfBoxRow) {
	i := 0
	for i < len(rows) {
		cont := 0.0
		if i > 0 && st.continued != "" {
			cont = 13 // a line that says what continues here
		}
		avail := w.bot - w.y - st.padTop - st.padBottom - cont
		var sum float64
		j := i
		for j < len(rows) {
			r := rows[j]
			if r.keep > 0 && (j == i || rows[j-1].keep != r.keep) {
				// the whole group, if it fits on a page at all
				var gh float64
				k := j
				for k < len(rows) && rows[k].keep == r.keep {
					gh += rows[k].h
					k++
				}
				if sum+gh > avail && gh <= w.pageH()-st.padTop-st.padBottom && (j > i || w.y > w.top+0.5) {
					break
				}
			}
			if sum+r.h > avail && (j > i || w.y > w.top+0.5) {
				break
			}
			sum += r.h
			j++
		}
		if j == i {
			w.newPage()
			continue
		}
		h := st.padTop + cont + sum + st.padBottom
		x0, x1 := w.left, w.righ
		w.setFill(st.fill)
		w.pdf.Rect(x0, w.y, x1-x0, h, "F")
		if st.barW > 0 {
			w.setFill(st.bar)
			w.pdf.Rect(x0, w.y, st.barW, h, "F")
		}
		if st.border {
			w.setDraw(st.bar, 0.6)
			w.pdf.Rect(x0, w.y, x1-x0, h, "D")
		}
		w.decorate(w.y, w.y+h)
		y := w.y + st.padTop
		if cont > 0 {
			w.text(x0+st.padX+st.barW, y+9, pdfFit(st.continued+" (continued)", fItalic, 8.5, x1-x0-2*st.padX-st.barW), fItalic, 8.5, pdfColMuted)
			y += cont
		}
		for _, r := range rows[i:j] {
			if r.draw != nil {
				r.draw(x0+st.padX+st.barW, y)
			}
			y += r.h
		}
		w.y += h
		w.lastGap = 0
		i = j
		if i < len(rows) {
			w.newPage()
		}
	}
}

func (w *pdfWriter) codeBlock(c CodeBlock) {
	w.gap(8)
	size := pdfMonoSize
	lh := size * 1.4
	cw := pdfCharWidth(size)
	pad := 8.0
	maxChars := int((w.righ - w.left - 2*pad - 3) / cw)
	if maxChars < 10 {
		maxChars = 10
	}
	text := strings.TrimRight(strings.ReplaceAll(c.Text, "\r\n", "\n"), "\n")
	var rows []pdfBoxRow
	for _, ln := range strings.Split(text, "\n") {
		ln = strings.ReplaceAll(ln, "\t", "    ")
		for _, part := range pdfHardWrap(pdfClean(ln, fMono), maxChars, "  ") {
			s := part
			rows = append(rows, pdfBoxRow{h: lh, draw: func(x, y float64) {
				w.text(x, pdfBaseline(y, lh, size), s, fMono, size, pdfColText)
			}})
		}
	}
	w.flushMarkerAt()
	w.box(pdfBoxStyle{fill: pdfColCodeFill, bar: pdfColRule, barW: 3, padX: pad, padTop: 5, padBottom: 5}, rows)
	w.after(8)
}

// flushMarkerAt draws a pending list marker beside a block that is not a
// line of text.
func (w *pdfWriter) flushMarkerAt() {
	if w.marker != nil {
		w.ensure(30)
		w.flushMarker(pdfBaseline(w.y, pdfBodySize*pdfBodyLead, pdfBodySize))
	}
}

func pdfCharWidth(size float64) float64 { return pdfFaceOf(fMono).width('0') * size / 1000 }

// pdfHardWrap cuts a line of monospaced text to at most n characters a line,
// before a space where it can, continuing with indent.
func pdfHardWrap(s string, n int, indent string) []string {
	rs := []rune(s)
	if len(rs) <= n {
		return []string{s}
	}
	var out []string
	first := true
	for len(rs) > 0 {
		limit := n
		if !first {
			limit = n - len([]rune(indent))
		}
		if len(rs) <= limit {
			if first {
				out = append(out, string(rs))
			} else {
				out = append(out, indent+string(rs))
			}
			break
		}
		cut := limit
		for k := limit; k > limit/2; k-- {
			if rs[k] == ' ' {
				cut = k
				break
			}
		}
		part := strings.TrimRight(string(rs[:cut]), " ")
		if first {
			out = append(out, part)
		} else {
			out = append(out, indent+part)
		}
		rs = rs[cut:]
		for len(rs) > 0 && rs[0] == ' ' {
			rs = rs[1:]
		}
		first = false
	}
	return out
}

// ---------------------------------------------------------------------
// Equations

func (w *pdfWriter) equations(e *Equations) {
	w.gap(10)
	size := pdfMonoSize
	lh := size * 1.45
	cw := pdfCharWidth(size)
	pad := 10.0
	maxChars := int((w.righ - w.left - 2*pad - 3) / cw)
	var rows []pdfBoxRow
	if e.Title != "" {
		tl := pdfWrapPlain(e.Title, fBold, 9.5, w.righ-w.left-2*pad)
		for k, l := range tl {
			s := l
			h := 13.0
			if k == len(tl)-1 {
				h = 17
			}
			rows = append(rows, pdfBoxRow{h: h, keep: 1, draw: func(x, y float64) {
				w.text(x, y+10, s, fBold, 9.5, pdfColText)
			}})
		}
	}
	for k, st := range e.Steps {
		keep := k + 2
		if k == 0 {
			keep = 1 // the title stays with the first step
		}
		if st.Label != "" {
			for _, l := range pdfWrapPlain(st.Label, fItalic, 8.5, w.righ-w.left-2*pad) {
				s := l
				rows = append(rows, pdfBoxRow{h: 12, keep: keep, draw: func(x, y float64) {
					w.text(x, y+9, s, fItalic, 8.5, pdfColMuted)
				}})
			}
		}
		lines := st.Lines(maxChars)
		indent := strings.Repeat(" ", len([]rune(st.LHS))+3)
		for li, l := range lines {
			fc := fMono
			if li == len(lines)-1 {
				fc = fMonoBold
			}
			for _, part := range pdfHardWrap(pdfClean(l, fc), maxChars, indent) {
				s, f := part, fc
				rows = append(rows, pdfBoxRow{h: lh, keep: keep, draw: func(x, y float64) {
					w.text(x, pdfBaseline(y, lh, size), s, f, size, pdfColText)
				}})
			}
		}
		if k < len(e.Steps)-1 {
			rows = append(rows, pdfBoxRow{h: 7, keep: keep})
		}
	}
	w.flushMarkerAt()
	w.box(pdfBoxStyle{fill: pdfColEqFill, bar: pdfColAccent, barW: 2.5, padX: pad, padTop: 7, padBottom: 7, continued: e.Title}, rows)
	w.after(10)
}

// ---------------------------------------------------------------------
// Callouts

func pdfCalloutColors(kind string) (fill, bar pdfRgb) {
	switch kind {
	case "recommendation":
		return pdfColRecFill, pdfColRecBar
	case "warning":
		return pdfColWarnFill, pdfColWarnBar
	}
	return pdfColNoteFill, pdfColNoteBar
}

func (w *pdfWriter) calloutRows(c *Callout) []pdfBoxRow {
	_, bar := pdfCalloutColors(c.Kind)
	pad := 12.0
	iconW := 0.0
	if c.Kind == "warning" || c.Kind == "recommendation" {
		iconW = 17
	}
	width := w.righ - w.left - 2*pad - 4
	var rows []pdfBoxRow
	title := c.Title
	if title == "" {
		switch c.Kind {
		case "recommendation":
			title = "Recommendation"
		case "warning":
			title = "Warning"
		default:
			title = "Note"
		}
	}
	tl := pdfWrapPlain(title, fBold, 10.5, width-iconW)
	for k, l := range tl {
		s, first := l, k == 0
		rows = append(rows, pdfBoxRow{h: 15, keep: 1, draw: func(x, y float64) {
			if first {
				switch c.Kind {
				case "warning":
					w.warningIcon(x, y+1.5, 11, bar)
				case "recommendation":
					w.checkIcon(x, y+1.5, 11, bar)
				}
			}
			w.text(x+iconW, pdfBaseline(y, 15, 10.5), s, fBold, 10.5, bar)
		}})
	}
	rows = append(rows, pdfBoxRow{h: 3, keep: 1})
	lh := pdfBodySize * pdfBodyLead
	for k, l := range pdfWrapPlain(c.Text, fRegular, pdfBodySize, width) {
		s := l
		keep := 0
		if k < 2 {
			keep = 1
		}
		rows = append(rows, pdfBoxRow{h: lh, keep: keep, draw: func(x, y float64) {
			w.text(x, pdfBaseline(y, lh, pdfBodySize), s, fRegular, pdfBodySize, pdfColText)
		}})
	}
	if len(c.Facts) > 0 {
		rows = append(rows, pdfBoxRow{h: 5})
		var kw float64
		for _, f := range c.Facts {
			kw = math.Max(kw, pdfStrWidth(pdfClean(f.Key, fBold), fBold, 8.5))
		}
		kw = math.Min(kw+10, width/3)
		for _, f := range c.Facts {
			h := 9.5 * 1.4
			for k, l := range pdfWrapPlain(f.Value, fRegular, 9.5, width-kw) {
				key, s := f.Key, l
				if k > 0 {
					key = ""
				}
				rows = append(rows, pdfBoxRow{h: h, draw: func(x, y float64) {
					if key != "" {
						w.text(x, pdfBaseline(y, h, 9.5), pdfFit(key, fBold, 8.5, kw-6), fBold, 8.5, pdfColMuted)
					}
					w.text(x+kw, pdfBaseline(y, h, 9.5), s, fRegular, 9.5, pdfColText)
				}})
			}
		}
	}
	if len(c.Items) > 0 {
		rows = append(rows, pdfBoxRow{h: 4})
	}
	for _, it := range c.Items {
		for k, l := range pdfWrapPlain(it, fRegular, 9.5, width-14) {
			s, first := l, k == 0
			h := 9.5 * pdfBodyLead
			rows = append(rows, pdfBoxRow{h: h, draw: func(x, y float64) {
				if first {
					w.setFill(bar)
					w.pdf.Circle(x+4, y+h/2, 1.6, "F")
				}
				w.text(x+14, pdfBaseline(y, h, 9.5), s, fRegular, 9.5, pdfColText)
			}})
		}
	}
	return rows
}

func (w *pdfWriter) calloutHeight(c *Callout) float64 {
	var h float64
	for _, r := range w.calloutRows(c) {
		h += r.h
	}
	return h + 20
}

func (w *pdfWriter) callout(c *Callout) {
	w.gap(12)
	fill, bar := pdfCalloutColors(c.Kind)
	rows := w.calloutRows(c)
	var h float64
	for _, r := range rows {
		h += r.h
	}
	if h+20 < w.pageH()*0.6 {
		w.ensure(h + 20)
	}
	w.flushMarkerAt()
	st := pdfBoxStyle{fill: fill, bar: bar, barW: 4, padX: 12, padTop: 9, padBottom: 10}
	if c.Kind == "warning" {
		st.border = true
	}
	w.box(st, rows)
	w.after(12)
}

// warningIcon draws a triangle with an exclamation mark, size s, top-left
// at (x, y).
func (w *pdfWriter) warningIcon(x, y, s float64, c pdfRgb) {
	w.setFill(c)
	w.pdf.Polygon([]fpdf.PointType{{X: x + s/2, Y: y}, {X: x + s, Y: y + s*0.9}, {X: x, Y: y + s*0.9}}, "F")
	w.setFill(pdfRgb{255, 255, 255})
	w.pdf.Rect(x+s/2-0.6, y+s*0.3, 1.2, s*0.32, "F")
	w.pdf.Rect(x+s/2-0.6, y+s*0.7, 1.2, 1.2, "F")
}

// checkIcon draws a tick in a filled circle.
func (w *pdfWriter) checkIcon(x, y, s float64, c pdfRgb) {
	w.setFill(c)
	w.pdf.Circle(x+s/2, y+s/2, s/2, "F")
	w.setDraw(pdfRgb{255, 255, 255}, 1.3)
	w.pdf.SetLineCapStyle("round")
	w.pdf.SetLineJoinStyle("round")
	w.pdf.Polygon([]fpdf.PointType{{X: x + s*0.27, Y: y + s*0.52}, {X: x + s*0.44, Y: y + s*0.7}, {X: x + s*0.75, Y: y + s*0.32}}, "")
	w.pdf.SetLineCapStyle("butt")
	w.pdf.SetLineJoinStyle("miter")
}

// caution closes the memo with the usual caution.
func (w *pdfWriter) caution(text string) {
	w.gap(18)
	lines := pdfWrapPlain(text, fItalic, pdfSmallSize, w.righ-w.left)
	lh := pdfSmallSize * 1.45
	w.ensure(float64(len(lines))*lh + 10)
	w.setDraw(pdfColRule, 0.6)
	w.pdf.Line(w.left, w.y, w.left+120, w.y)
	w.y += 6
	for _, l := range lines {
		w.text(w.left, pdfBaseline(w.y, lh, pdfSmallSize), l, fItalic, pdfSmallSize, pdfColMuted)
		w.y += lh
	}
}

// ---------------------------------------------------------------------
// Inline text layout

// pdfPiece is a run of text in one style, laid out on a line.
type pdfPiece struct {
	text    string
	pdfFace pdfFace
	size    float64
	w       float64
	link    string
	code    bool
	strike  bool
	glue    bool // a breakable space
}

type pdfTextLine struct {
	pieces []pdfPiece
	width  float64
	size   float64
}

func pdfStyleFace(in Inline, base pdfFace) pdfFace {
	if in.Code {
		return fMono
	}
	bold := in.Bold || base == fBold || base == fBoldItalic
	italic := in.Italic || base == fItalic || base == fBoldItalic
	switch {
	case bold && italic:
		return fBoldItalic
	case bold:
		return fBold
	case italic:
		return fItalic
	}
	return fRegular
}

// pdfSafeLink keeps the link targets a reader may follow: web and mail
// addresses and anchors in the memo.
func pdfSafeLink(s string) string {
	s = strings.TrimSpace(s)
	l := strings.ToLower(s)
	switch {
	case strings.HasPrefix(l, "https://"), strings.HasPrefix(l, "http://"), strings.HasPrefix(l, "mailto:"), strings.HasPrefix(s, "#"):
		return s
	}
	return ""
}

// layout breaks inline runs into lines of at most width points.
func (w *pdfWriter) layout(runs []Inline, base pdfFace, size float64, width float64) []pdfTextLine {
	width += 0.01
	type token struct {
		p     pdfPiece
		brk   bool // hard break
		start bool // starts a new word
	}
	var toks []token
	prevGlue := true
	for _, in := range runs {
		if in.Break {
			toks = append(toks, token{brk: true})
			prevGlue = true
			continue
		}
		fc := pdfStyleFace(in, base)
		sz := size
		if in.Code {
			sz = size * 0.9
		}
		link := pdfSafeLink(in.Link)
		text := pdfClean(in.Text, fc)
		i := 0
		for i < len(text) {
			j := i
			if text[i] == ' ' {
				for j < len(text) && text[j] == ' ' {
					j++
				}
				toks = append(toks, token{p: pdfPiece{text: " ", pdfFace: fc, size: sz, w: pdfStrWidth(" ", fc, sz), link: link, code: in.Code, strike: in.Strike, glue: true}})
				prevGlue = true
			} else {
				for j < len(text) && text[j] != ' ' {
					j++
				}
				s := text[i:j]
				toks = append(toks, token{p: pdfPiece{text: s, pdfFace: fc, size: sz, w: pdfStrWidth(s, fc, sz), link: link, code: in.Code, strike: in.Strike}, start: prevGlue})
				prevGlue = false
			}
			i = j
		}
	}
	var lines []pdfTextLine
	var cur pdfTextLine
	push := func() {
		// drop trailing spaces
		for len(cur.pieces) > 0 && cur.pieces[len(cur.pieces)-1].glue {
			cur.width -= cur.pieces[len(cur.pieces)-1].w
			cur.pieces = cur.pieces[:len(cur.pieces)-1]
		}
		if cur.size == 0 {
			cur.size = size
		}
		lines = append(lines, cur)
		cur = pdfTextLine{}
	}
	for k := 0; k < len(toks); k++ {
		t := toks[k]
		if t.brk {
			push()
			continue
		}
		if t.p.glue {
			if len(cur.pieces) == 0 {
				continue // no space at the start of a line
			}
			cur.pieces = append(cur.pieces, t.p)
			cur.width += t.p.w
			continue
		}
		if t.start {
			// the whole word: this token and those glued to it
			ww := t.p.w
			for m := k + 1; m < len(toks) && !toks[m].brk && !toks[m].p.glue && !toks[m].start; m++ {
				ww += toks[m].p.w
			}
			if len(cur.pieces) > 0 && cur.width+ww > width {
				push()
			}
		}
		p := t.p
		// A word longer than the line is cut where it must.
		for cur.width+p.w > width && p.w > width*0.25 {
			rs := []rune(p.text)
			room := width - cur.width
			n := 0
			for n < len(rs) && pdfStrWidth(string(rs[:n+1]), p.pdfFace, p.size) <= room {
				n++
			}
			if n == 0 {
				if len(cur.pieces) == 0 {
					n = 1
				} else {
					push()
					continue
				}
			}
			head := p
			head.text = string(rs[:n])
			head.w = pdfStrWidth(head.text, p.pdfFace, p.size)
			cur.pieces = append(cur.pieces, head)
			cur.width += head.w
			cur.size = math.Max(cur.size, p.size)
			push()
			p.text = string(rs[n:])
			p.w = pdfStrWidth(p.text, p.pdfFace, p.size)
			if p.text == "" {
				break
			}
		}
		if p.text == "" {
			continue
		}
		cur.pieces = append(cur.pieces, p)
		cur.width += p.w
		cur.size = math.Max(cur.size, p.size)
	}
	if len(cur.pieces) > 0 {
		push()
	}
	for i := range lines {
		if lines[i].size == 0 {
			lines[i].size = size
		}
		if lines[i].size < size {
			lines[i].size = size
		}
	}
	return lines
}

// drawLine draws a laid-out line, joining pieces of one style into one
// string so that the text extracts with its spaces.
func (w *pdfWriter) drawLine(ln pdfTextLine, x, base float64, c pdfRgb) {
	for i := 0; i < len(ln.pieces); {
		p := ln.pieces[i]
		j := i + 1
		text := p.text
		wd := p.w
		for j < len(ln.pieces) {
			q := ln.pieces[j]
			if q.pdfFace != p.pdfFace || q.size != p.size || q.link != p.link || q.code != p.code || q.strike != p.strike {
				break
			}
			text += q.text
			wd += q.w
			j++
		}
		col := c
		if p.link != "" {
			col = pdfColLink
		}
		if p.code {
			w.setFill(pdfColCodeFill)
			lead, trail := 0.0, 0.0
			if strings.HasPrefix(text, " ") {
				lead = pdfStrWidth(" ", p.pdfFace, p.size)
			}
			if strings.HasSuffix(text, " ") {
				trail = pdfStrWidth(" ", p.pdfFace, p.size)
			}
			w.pdf.Rect(x+lead-1.2, base-p.size*0.78, wd-lead-trail+2.4, p.size*1.05, "F")
		}
		w.text(x, base, text, p.pdfFace, p.size, col)
		if p.link != "" {
			w.setDraw(pdfColLink, 0.4)
			w.pdf.Line(x, base+1.3, x+wd, base+1.3)
			if strings.HasPrefix(p.link, "#") {
				if id, ok := w.anchors[p.link[1:]]; ok {
					w.pdf.Link(x, base-p.size, wd, p.size*1.3, id)
				}
			} else {
				w.pdf.LinkString(x, base-p.size, wd, p.size*1.3, p.link)
			}
		}
		if p.strike {
			w.setDraw(col, 0.5)
			w.pdf.Line(x, base-p.size*0.3, x+wd, base-p.size*0.3)
		}
		x += wd
		i = j
	}
}

// pdfWrapPlain breaks plain text into lines of at most width points.
func pdfWrapPlain(s string, fc pdfFace, size, width float64) []string {
	if s == "" {
		return nil
	}
	width += 0.01 // what was measured to fit, fits
	var out []string
	for _, para := range strings.Split(s, "\n") {
		para = pdfClean(para, fc)
		words := strings.Fields(para)
		line := ""
		for _, wd := range words {
			cand := wd
			if line != "" {
				cand = line + " " + wd
			}
			if pdfStrWidth(cand, fc, size) <= width || line == "" && pdfStrWidth(wd, fc, size) <= width {
				line = cand
				continue
			}
			if line != "" {
				out = append(out, line)
			}
			// a word wider than the line is cut
			for pdfStrWidth(wd, fc, size) > width {
				rs := []rune(wd)
				n := 1
				for n < len(rs) && pdfStrWidth(string(rs[:n+1]), fc, size) <= width {
					n++
				}
				out = append(out, string(rs[:n]))
				wd = string(rs[n:])
			}
			line = wd
		}
		if line != "" || len(words) == 0 {
			out = append(out, line)
		}
	}
	return out
}

func pdfPlainText(in []Inline) string {
	var b strings.Builder
	for _, r := range in {
		if r.Break {
			b.WriteByte(' ')
			continue
		}
		b.WriteString(r.Text)
	}
	return b.String()
}

// ---------------------------------------------------------------------
// Tables

type pdfTableLayout struct {
	size   float64
	widths []float64
	padX   float64
	padY   float64
	lead   float64
}

// table sets a table. One too wide for the column even when set small and
// wrapped is split into groups of columns, each repeating the first
// (label) column, one below the other.
func (w *pdfWriter) table(t *Table) {
	ncol := len(t.Header)
	for _, r := range t.Rows {
		ncol = max(ncol, len(r))
	}
	if ncol == 0 {
		return
	}
	avail := w.righ - w.left
	m := pdfMeasureTable(t, ncol)
	if lay, ok := m.layout(avail); ok {
		w.tableFitted(t, ncol, lay)
		return
	}
	for k, g := range m.groups(avail) {
		sub := pdfSubTable(t, g, ncol)
		sub.Caption = strings.TrimSpace(fmt.Sprintf("%s (columns %d–%d of %d)", t.Caption, g[min(1, len(g)-1)]+1, g[len(g)-1]+1, ncol))
		if k > 0 {
			sub.Source = ""
		}
		if k < len(m.groups(avail))-1 {
			sub.Note = ""
		}
		sm := pdfMeasureTable(sub, len(g))
		lay, _ := sm.layout(avail)
		w.tableFitted(sub, len(g), lay)
	}
}

// pdfSubTable keeps the columns cols of t.
func pdfSubTable(t *Table, cols []int, ncol int) *Table {
	pick := func(row []string) []string {
		out := make([]string, len(cols))
		for i, c := range cols {
			if c < len(row) {
				out[i] = row[c]
			}
		}
		return out
	}
	sub := &Table{Caption: t.Caption, Note: t.Note, Source: t.Source, BoldRows: t.BoldRows}
	for _, c := range cols {
		sub.BoldCols = append(sub.BoldCols, c < len(t.BoldCols) && t.BoldCols[c])
	}
	if len(t.Header) > 0 {
		sub.Header = pick(t.Header)
	}
	for _, r := range t.Rows {
		sub.Rows = append(sub.Rows, pick(r))
	}
	for _, c := range cols {
		al := byte('l')
		if c < len(t.Align) {
			al = t.Align[c]
		}
		sub.Align = append(sub.Align, al)
	}
	return sub
}

// tableFitted draws a table whose columns pdfFit the text column.
func (w *pdfWriter) tableFitted(t *Table, ncol int, lay pdfTableLayout) {
	w.gap(10)
	avail := w.righ - w.left
	align := func(c int) byte {
		if c < len(t.Align) {
			return t.Align[c]
		}
		return 'l'
	}
	bold := func(r int) bool { return r < len(t.BoldRows) && t.BoldRows[r] }
	boldCol := func(c int) bool { return c < len(t.BoldCols) && t.BoldCols[c] }
	cellFace := func(r, c int) pdfFace {
		if bold(r) || boldCol(c) {
			return fBold
		}
		return fRegular
	}
	cell := func(row []string, c int) string {
		if c < len(row) {
			return row[c]
		}
		return ""
	}
	wrapCell := func(s string, c int, fc pdfFace) []string {
		l := pdfWrapPlain(s, fc, lay.size, lay.widths[c]-2*lay.padX)
		if len(l) == 0 {
			l = []string{""}
		}
		return l
	}
	var tw float64
	for _, x := range lay.widths {
		tw += x
	}
	// The header row.
	var headLines [][]string
	headN := 1
	for c := 0; c < ncol; c++ {
		l := wrapCell(cell(t.Header, c), c, fBold)
		headLines = append(headLines, l)
		headN = max(headN, len(l))
	}
	headH := float64(headN)*lay.lead + 2*lay.padY
	hasHeader := len(t.Header) > 0
	if !hasHeader {
		headH = 0
	}
	capSize := 9.5
	capLines := pdfWrapPlain(t.Caption, fBold, capSize, avail)
	capH := float64(len(capLines)) * 13
	if capH > 0 {
		capH += 3
	}
	rowLines := func(r int) ([][]string, float64) {
		n := 1
		var ls [][]string
		for c := 0; c < ncol; c++ {
			l := wrapCell(cell(t.Rows[r], c), c, cellFace(r, c))
			ls = append(ls, l)
			n = max(n, len(l))
		}
		return ls, float64(n)*lay.lead + 2*lay.padY
	}
	drawCaption := func(cont bool) {
		for k, l := range capLines {
			if cont && k == len(capLines)-1 {
				l += " (continued)"
			}
			w.text(w.left, w.y+10, l, fBold, capSize, pdfColText)
			w.decorate(w.y, w.y+13)
			w.y += 13
		}
		if capH > 0 {
			w.y += 3
		}
	}
	drawHeader := func() {
		if !hasHeader {
			w.setDraw(pdfColText, 0.8)
			w.pdf.Line(w.left, w.y, w.left+tw, w.y)
			return
		}
		w.setFill(pdfColHeadFill)
		w.pdf.Rect(w.left, w.y, tw, headH, "F")
		x := w.left
		for c := 0; c < ncol; c++ {
			w.cellText(x, w.y, lay, c, headLines[c], align(c), fBold, pdfColText)
			x += lay.widths[c]
		}
		w.setDraw(pdfColText, 0.8)
		w.pdf.Line(w.left, w.y+headH, w.left+tw, w.y+headH)
		w.decorate(w.y, w.y+headH)
		w.y += headH
	}
	firstH := 0.0
	if len(t.Rows) > 0 {
		_, firstH = rowLines(0)
	}
	w.ensure(capH + headH + math.Min(firstH, 120) + 2)
	w.flushMarkerAt()
	drawCaption(false)
	drawHeader()
	for r := range t.Rows {
		ls, h := rowLines(r)
		if w.y+h > w.bot {
			w.setDraw(pdfColRule, 0.5)
			w.pdf.Line(w.left, w.y, w.left+tw, w.y)
			w.newPage()
			drawCaption(true)
			drawHeader()
		}
		if r%2 == 1 {
			w.setFill(pdfColZebra)
			w.pdf.Rect(w.left, w.y, tw, h, "F")
		}
		if bold(r) {
			w.setDraw(pdfColMuted, 0.6)
			w.pdf.Line(w.left, w.y, w.left+tw, w.y)
		}
		x := w.left
		for c := 0; c < ncol; c++ {
			if boldCol(c) {
				// the recommended alternative's column, tinted
				w.setFill(pdfColPick)
				w.pdf.Rect(x, w.y, lay.widths[c], h, "F")
			}
			w.cellText(x, w.y, lay, c, ls[c], align(c), cellFace(r, c), pdfColText)
			x += lay.widths[c]
		}
		w.decorate(w.y, w.y+h)
		w.y += h
		if r < len(t.Rows)-1 {
			w.setDraw(pdfColHair, 0.4)
			w.pdf.Line(w.left, w.y, w.left+tw, w.y)
		}
	}
	w.setDraw(pdfColText, 0.8)
	w.pdf.Line(w.left, w.y, w.left+tw, w.y)
	w.y += 2
	w.lastGap = 0
	if t.Note != "" {
		for _, l := range pdfWrapPlain(t.Note, fItalic, 8, avail) {
			w.ensure(11)
			w.text(w.left, w.y+9, l, fItalic, 8, pdfColMuted)
			w.decorate(w.y, w.y+11)
			w.y += 11
		}
	}
	if t.Source != "" {
		s := "Source: " + t.Source
		w.ensure(11)
		w.text(w.left, w.y+9, pdfFit(s, fRegular, 7.5, avail), fRegular, 7.5, pdfColFaint)
		w.y += 11
	}
	w.after(10)
}

func (w *pdfWriter) cellText(x, y float64, lay pdfTableLayout, c int, lines []string, al byte, fc pdfFace, col pdfRgb) {
	cw := lay.widths[c]
	for k, l := range lines {
		base := pdfBaseline(y+lay.padY+float64(k)*lay.lead, lay.lead, lay.size)
		switch al {
		case 'r':
			w.textRight(x+cw-lay.padX, base, l, fc, lay.size, col)
		case 'c':
			w.textCenter(x+cw/2, base, l, fc, lay.size, col)
		default:
			w.text(x+lay.padX, base, l, fc, lay.size, col)
		}
	}
}

// pdfTableMeasure holds a table's column widths at a font size of one
// point: the natural width (each cell on one line) and the least width
// (the widest thing that may not be broken: a word of text, a whole
// number).
type pdfTableMeasure struct {
	nat, least []float64
	key        bool // the first column labels the rows
}

func pdfMeasureTable(t *Table, ncol int) pdfTableMeasure {
	m := pdfTableMeasure{nat: make([]float64, ncol), least: make([]float64, ncol)}
	m.key = ncol > 1 && (len(t.Align) == 0 || t.Align[0] == 'l')
	numeric := func(c int) bool { return c < len(t.Align) && t.Align[c] != 'l' }
	measure := func(row []string, fc pdfFace, header bool) {
		for c := 0; c < ncol && c < len(row); c++ {
			s := pdfClean(row[c], fc)
			wd := pdfStrWidth(s, fc, 1)
			m.nat[c] = math.Max(m.nat[c], wd)
			if numeric(c) && !header {
				m.least[c] = math.Max(m.least[c], wd)
				continue
			}
			for _, f := range strings.Fields(s) {
				m.least[c] = math.Max(m.least[c], pdfStrWidth(f, fc, 1))
			}
		}
	}
	measure(t.Header, fBold, true)
	for r, row := range t.Rows {
		fc := fRegular
		if r < len(t.BoldRows) && t.BoldRows[r] || len(t.BoldCols) > 0 {
			fc = fBold // the wider face, for rows and columns set in bold
		}
		measure(row, fc, false)
	}
	return m
}

const (
	pdfTablePadX     = 5.0
	pdfTablePadTight = 3.5
	pdfTableMinSize  = 7.0
)

func (m pdfTableMeasure) sum(ws []float64, cols []int, size, pad float64) float64 {
	var t float64
	for _, c := range cols {
		t += ws[c]*size + 2*pad
	}
	return t
}

func pdfAllCols(n int) []int {
	cs := make([]int, n)
	for i := range cs {
		cs[i] = i
	}
	return cs
}

// layout sizes the columns to pdfFit avail: at the table size where they
// pdfFit on one line each, else smaller (down to pdfTableMinSize), else with
// text wrapped inside cells. It reports false when even that is too wide.
func (m pdfTableMeasure) layout(avail float64) (pdfTableLayout, bool) {
	n := len(m.nat)
	cols := pdfAllCols(n)
	size, pad := pdfTableSize, pdfTablePadX
	mk := func(widths []float64) pdfTableLayout {
		return pdfTableLayout{size: size, widths: widths, padX: pad, padY: 3, lead: size * 1.3}
	}
	if m.sum(m.nat, cols, size, pad) > avail {
		pad = pdfTablePadTight
		for size > 7.5 && m.sum(m.nat, cols, size, pad) > avail {
			size -= 0.25
		}
	}
	widths := make([]float64, n)
	if tt := m.sum(m.nat, cols, size, pad); tt <= avail {
		for c := range widths {
			widths[c] = m.nat[c]*size + 2*pad
		}
		// A table nearly as wide as the column fills it.
		if tt > avail*0.72 {
			for c := range widths {
				widths[c] += (avail - tt) / float64(n)
			}
		}
		return mk(widths), true
	}
	// Wrap: every column gets its least width; the rest of the room goes
	// to the columns in proportion to what they lack. A long word of text
	// (a web address) is not allowed to claim more than a third of it.
	least := func(c int) float64 { return math.Min(m.least[c]*size+2*pad, avail/3) }
	sumLeast := func() float64 {
		var t float64
		for c := range widths {
			t += least(c)
		}
		return t
	}
	for size > pdfTableMinSize && sumLeast() > avail {
		size -= 0.25
	}
	if sumLeast() > avail {
		return mk(nil), false
	}
	var sl, sn float64
	for c := range widths {
		sl += least(c)
		sn += m.nat[c]*size + 2*pad
	}
	for c := range widths {
		widths[c] = least(c)
		if sn > sl {
			widths[c] += (avail - sl) * (m.nat[c]*size + 2*pad - least(c)) / (sn - sl)
		}
	}
	return mk(widths), true
}

// groups splits the columns into groups that pdfFit avail at the smallest
// size, each starting with the first column when that is a label column.
func (m pdfTableMeasure) groups(avail float64) [][]int {
	n := len(m.nat)
	w := func(c int) float64 { return math.Min(m.least[c]*pdfTableMinSize+2*pdfTablePadTight, avail/3) }
	var out [][]int
	var cur []int
	var used float64
	start := 0
	key := m.key
	if key {
		start = 1
	}
	for c := start; c < n; c++ {
		if len(cur) == 0 && key {
			cur = []int{0}
			used = w(0)
		}
		if used+w(c) > avail && len(cur) > 1 {
			out = append(out, cur)
			cur, used = nil, 0
			if key {
				cur = []int{0}
				used = w(0)
			}
		}
		cur = append(cur, c)
		used += w(c)
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// ---------------------------------------------------------------------
// The logo

type pdfLogoImage struct {
	name string
	typ  string
	data []byte
	w, h float64
}

// size scales the logo to pdfFit in maxW by maxH points.
func (l *pdfLogoImage) size(maxW, maxH float64) (float64, float64) {
	if l.w <= 0 || l.h <= 0 {
		return maxW, maxH
	}
	s := math.Min(maxW/l.w, maxH/l.h)
	return l.w * s, l.h * s
}

func (w *pdfWriter) registerLogo(lg *pdfLogoImage) {
	info := w.pdf.RegisterImageOptionsReader(lg.name, fpdf.ImageOptions{ImageType: lg.typ}, bytes.NewReader(lg.data))
	if info == nil {
		return
	}
	lg.w, lg.h = info.Width(), info.Height()
	w.logo = lg
}

// CheckLogo reports why the logo at path (relative to the memo's folder
// base) cannot go into a PDF, or nil: the command line reports it at the
// front matter's logo line before anything is drawn.
func CheckLogo(base, path string) error {
	_, err := pdfLoadLogo(base, path)
	return err
}

// pdfLoadLogo reads a PNG or JPEG logo from path, relative to base. It
// refuses absolute paths, paths that leave base, symbolic links anywhere
// along the path, files that are not PNG or JPEG images, and files over
// MaxLogoBytes.
func pdfLoadLogo(base, path string) (*pdfLogoImage, error) {
	fail := func(format string, a ...any) error {
		return fmt.Errorf("logo %q: %s", path, fmt.Sprintf(format, a...))
	}
	if base == "" {
		base = "."
	}
	if filepath.IsAbs(path) || strings.HasPrefix(path, "/") || strings.HasPrefix(path, `\`) || filepath.VolumeName(path) != "" {
		return nil, fail("must be a path relative to the memo's folder")
	}
	rel := filepath.Clean(filepath.FromSlash(path))
	if rel == "." || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return nil, fail("leaves the memo's folder")
	}
	// No symbolic link anywhere below the memo's folder.
	parts := strings.Split(rel, string(filepath.Separator))
	p := base
	for _, part := range parts {
		p = filepath.Join(p, part)
		fi, err := os.Lstat(p)
		if err != nil {
			return nil, fail("%v", errors.Unwrap(err))
		}
		if fi.Mode()&os.ModeSymlink != 0 {
			return nil, fail("is or passes through a symbolic link")
		}
	}
	root, err := os.OpenRoot(base)
	if err != nil {
		return nil, fail("%v", err)
	}
	defer root.Close()
	f, err := root.Open(rel)
	if err != nil {
		return nil, fail("%v", err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, fail("%v", err)
	}
	if !fi.Mode().IsRegular() {
		return nil, fail("is not a regular file")
	}
	if fi.Size() > MaxLogoBytes {
		return nil, fail("is %d bytes; the limit is %d (5 MB)", fi.Size(), MaxLogoBytes)
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxLogoBytes+1))
	if err != nil {
		return nil, fail("%v", err)
	}
	if len(data) > MaxLogoBytes {
		return nil, fail("is larger than 5 MB")
	}
	lg := &pdfLogoImage{name: "logo", data: data}
	switch {
	case bytes.HasPrefix(data, []byte("\x89PNG\r\n\x1a\n")):
		lg.typ = "PNG"
	case bytes.HasPrefix(data, []byte{0xff, 0xd8, 0xff}):
		lg.typ = "JPG"
	default:
		return nil, fail("is not a PNG or JPEG image")
	}
	cfg, _, err := image.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		return nil, fail("cannot be read as an image: %v", err)
	}
	if cfg.Width <= 0 || cfg.Height <= 0 || cfg.Width > 8000 || cfg.Height > 8000 || cfg.Width*cfg.Height > 16<<20 {
		return nil, fail("is %d×%d pixels; a logo may have at most 8000 on a side and 16 million in all", cfg.Width, cfg.Height)
	}
	// Fix (hostile input): a PNG whose header reads well but whose data is
	// damaged made fpdf panic; the whole image is decoded first.
	if _, _, err := image.Decode(bytes.NewReader(data)); err != nil {
		return nil, fail("cannot be read as an image: %v", err)
	}
	if lg.typ == "PNG" && !pdfSimplePNG(data) {
		// fpdf reads 8-bit, non-interlaced PNG; anything else is decoded
		// and written again in that form.
		img, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			return nil, fail("cannot be read as an image: %v", err)
		}
		nrgba := image.NewNRGBA(img.Bounds())
		draw.Draw(nrgba, nrgba.Bounds(), img, img.Bounds().Min, draw.Src)
		var buf bytes.Buffer
		if err := png.Encode(&buf, nrgba); err != nil {
			return nil, fail("%v", err)
		}
		lg.data = buf.Bytes()
	}
	if lg.typ == "JPG" {
		if _, err := jpeg.DecodeConfig(bytes.NewReader(data)); err != nil {
			return nil, fail("cannot be read as an image: %v", err)
		}
	}
	return lg, nil
}

// pdfSimplePNG reports whether a PNG has 8-bit channels (or a palette) and no
// interlacing, the form fpdf reads directly.
func pdfSimplePNG(data []byte) bool {
	if len(data) < 29 || string(data[12:16]) != "IHDR" {
		return false
	}
	depth, ctype, interlace := data[24], data[25], data[28]
	if interlace != 0 {
		return false
	}
	switch ctype {
	case 0, 2, 4, 6:
		return depth == 8
	case 3:
		return depth <= 8
	}
	return false
}
