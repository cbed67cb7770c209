package render

import (
	"html/template"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// The SVG charts of the HTML writer. A Chart of the document model is laid
// out here into plain shapes (lines, paths, circles, texts) with their
// coordinates already formatted; chartHTML writes them out, escaping every
// label as html/template does, for the "chart" template of
// templates/chart.html (which an organization may redefine with template
// actions over the same svgChart).

// svgChart is one laid-out chart.
type svgChart struct {
	ID     string
	Kind   string
	W, H   int
	Title  string
	Desc   string
	Groups []svgGroup
	// Legend names each series of a line chart with its style class.
	Legend []svgLegend
	// Key explains the letters that mark labelled arrows of a cash-flow
	// diagram.
	Key   []svgKey
	Notes []string
	// Clip is the plot area that curves are clipped to.
	Clip *svgRect
}

type svgGroup struct {
	Class string
	// Clip names the chart's clipPath (the plot area) when the group is
	// clipped to it.
	Clip    string
	Rects   []svgRect
	Lines   []svgLine
	Paths   []svgPath
	Circles []svgCircle
	Texts   []svgText
}

type svgRect struct{ X, Y, W, H, Class string }
type svgLine struct{ X1, Y1, X2, Y2, Class string }

// svgPath is a path; Width, when set, is its stroke width.
type svgPath struct{ D, Class, Width string }
type svgCircle struct{ CX, CY, R, Class string }

// svgText is a label; Rotate, when set, turns it about its anchor point.
type svgText struct {
	X, Y, Anchor, Class, Text string
	Rotate                    string
}

type svgLegend struct{ Name, Class string }

type svgKey struct{ Letter, Text string }

// coord writes a coordinate with at most one decimal.
func coord(x float64) string {
	var a [24]byte
	return string(appendCoord(a[:0], x))
}

// appendCoord appends coord(x): strconv.FormatFloat(math.Round(x*10)/10, 'f',
// -1, 64), "0" for NaN and infinities. Below 10¹⁴ the shortest decimal of
// a whole number of tenths is that number of tenths, so it is written from
// the integer (a negative zero as "-0", as FormatFloat writes it).
func appendCoord(dst []byte, x float64) []byte {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return append(dst, '0')
	}
	t := math.Round(x * 10)
	if math.Abs(t) >= 1e15 {
		return strconv.AppendFloat(dst, t/10, 'f', -1, 64)
	}
	n := int64(t)
	if n < 0 || n == 0 && math.Signbit(t) {
		dst = append(dst, '-')
		n = -n
	}
	dst = strconv.AppendInt(dst, n/10, 10)
	if d := n % 10; d != 0 {
		dst = append(dst, '.', byte('0'+d))
	}
	return dst
}

// appendPoint appends a path command and its point: "Mx y".
func appendPoint(dst []byte, cmd byte, x, y float64) []byte {
	dst = append(dst, cmd)
	dst = appendCoord(dst, x)
	dst = append(dst, ' ')
	return appendCoord(dst, y)
}

// textWidth estimates the width of a label set at size px.
func textWidth(s string, size float64) float64 {
	return float64(utf8.RuneCountInString(s)) * size * 0.56
}

// labelBox is a label's extent, for keeping labels apart.
type labelBox struct{ x0, y0, x1, y1 float64 }

func (a labelBox) overlaps(b labelBox) bool {
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1
}

// placer keeps labels from overlapping: each label takes the first of its
// candidate positions that is free, or none.
type placer struct {
	taken  []labelBox
	bounds labelBox
}

// place tries candidate baselines (x, y) for a label with the given
// anchor and returns the one taken.
func (p *placer) place(text string, size float64, anchor string, cands [][2]float64) ([2]float64, bool) {
	w := textWidth(text, size)
	for _, c := range cands {
		x0 := c[0]
		switch anchor {
		case "middle":
			x0 -= w / 2
		case "end":
			x0 -= w
		}
		b := labelBox{x0 - 2, c[1] - size, x0 + w + 2, c[1] + size*0.3}
		if b.x0 < p.bounds.x0 || b.x1 > p.bounds.x1 || b.y0 < p.bounds.y0 || b.y1 > p.bounds.y1 {
			continue
		}
		free := true
		for _, t := range p.taken {
			if t.overlaps(b) {
				free = false
				break
			}
		}
		if free {
			p.taken = append(p.taken, b)
			return c, true
		}
	}
	return [2]float64{}, false
}

// frame is the plot area of a chart and its scales.
type frame struct {
	left, top, right, bottom float64
	xmin, xmax, ymin, ymax   float64
}

func (f frame) x(v float64) float64 {
	if f.xmax == f.xmin {
		return f.left
	}
	return f.left + (v-f.xmin)/(f.xmax-f.xmin)*(f.right-f.left)
}

func (f frame) y(v float64) float64 {
	if f.ymax == f.ymin {
		return f.bottom
	}
	return f.bottom - (v-f.ymin)/(f.ymax-f.ymin)*(f.bottom-f.top)
}

const (
	tickSize  = 11.0
	labelSize = 11.0
)

// axes draws the grid, the y ticks and labels, the x ticks and labels and
// the axis titles.
func axes(c *Chart, f frame, h float64, yearTicksAtBottom bool) svgGroup {
	g := svgGroup{Class: "axes",
		Lines: make([]svgLine, 0, len(c.YTicks)+2*len(c.XTicks)+2),
		Texts: make([]svgText, 0, len(c.YTicks)+len(c.XTicks)+2)}
	left, right, top, bottom := coord(f.left), coord(f.right), coord(f.top), coord(f.bottom)
	tickX := coord(f.left - 6)
	for _, t := range c.YTicks {
		y := f.y(t.At)
		ys := coord(y)
		g.Lines = append(g.Lines, svgLine{left, ys, right, ys, "grid"})
		g.Texts = append(g.Texts, svgText{X: tickX, Y: coord(y + 4), Anchor: "end", Class: "tick", Text: t.Label})
	}
	markEnd, labelY := coord(f.bottom+4), coord(f.bottom+16)
	for _, t := range c.XTicks {
		xs := coord(f.x(t.At))
		if !yearTicksAtBottom {
			g.Lines = append(g.Lines, svgLine{xs, top, xs, bottom, "grid"})
		}
		g.Lines = append(g.Lines, svgLine{xs, bottom, xs, markEnd, "tickmark"})
		g.Texts = append(g.Texts, svgText{X: xs, Y: labelY, Anchor: "middle", Class: "tick", Text: t.Label})
	}
	g.Lines = append(g.Lines,
		svgLine{left, top, left, bottom, "axis"},
		svgLine{left, bottom, right, bottom, "axis"})
	if c.XLabel != "" {
		g.Texts = append(g.Texts, svgText{X: coord((f.left + f.right) / 2), Y: coord(h - 6), Anchor: "middle", Class: "axis-title", Text: c.XLabel})
	}
	if c.YLabel != "" {
		cy := (f.top + f.bottom) / 2
		g.Texts = append(g.Texts, svgText{X: "14", Y: coord(cy), Anchor: "middle", Class: "axis-title", Text: c.YLabel, Rotate: "rotate(-90 14 " + coord(cy) + ")"})
	}
	return g
}

// layoutChart lays out a chart of the document model.
func layoutChart(c *Chart, id string) svgChart {
	if c.Kind == "cashflow" {
		return layoutCashflow(c, id)
	}
	if c.Kind == "tornado" {
		return layoutTornado(c, id) // analysis.go
	}
	return layoutLines(c, id)
}

// yMargin is the room the y tick labels need.
func yMargin(c *Chart) float64 {
	w := 0.0
	for _, t := range c.YTicks {
		w = math.Max(w, textWidth(t.Label, tickSize))
	}
	return math.Max(56, w+34)
}

// layoutCashflow draws one arrow per year from the time axis, up for a net
// inflow and down for a net outflow, its length to scale. Labelled years
// carry letters explained in the key under the chart, so that labels never
// crowd the arrows however long the horizon.
func layoutCashflow(c *Chart, id string) svgChart {
	const W, H = 720.0, 320.0
	out := svgChart{ID: id, Kind: "cashflow", W: int(W), H: int(H), Title: c.Title, Desc: c.Alt, Notes: c.Notes}
	f := frame{left: yMargin(c), top: 26, right: W - 16, bottom: H - 40, ymin: c.YMin, ymax: c.YMax}
	// Half a year's room at each end, and at least 8 points off the axis.
	pad := math.Max(0.5, 8/((f.right-f.left)/math.Max(1, c.XMax-c.XMin+1)))
	f.xmin, f.xmax = c.XMin-pad, c.XMax+0.5
	if f.ymax <= f.ymin {
		f.ymin, f.ymax = -1, 1
	}
	// Room for the letters above the highest and below the lowest arrow.
	span := f.ymax - f.ymin
	if c.YMax > 0 {
		f.ymax += span * 0.06
	}
	if c.YMin < 0 {
		f.ymin -= span * 0.06
	}
	out.Groups = append(out.Groups, axes(c, f, H, true))
	y0 := f.y(0)
	spacing := (f.right - f.left) / math.Max(1, f.xmax-f.xmin)
	stroke := math.Min(3, math.Max(0.6, spacing*0.35))
	head := math.Min(5, math.Max(1.2, spacing*0.42))
	var up, down []byte
	for _, a := range c.Arrows {
		if a.Amount == 0 {
			continue
		}
		x := f.x(float64(a.Year))
		yt := f.y(a.Amount)
		dir := 1.0 // head points down for an outflow
		b := &down
		if a.Amount > 0 {
			dir, b = -1, &up
		}
		// The head shrinks with a short arrow, so a small amount stays small.
		hh := math.Min(head*1.6, math.Abs(yt-y0))
		hw := head * hh / (head * 1.6)
		*b = appendPoint(*b, 'M', x, y0)
		*b = appendCoord(append(*b, 'V'), yt-dir*hh*0.5)
		*b = appendPoint(*b, 'M', x-hw, yt-dir*hh)
		*b = appendPoint(*b, 'L', x, yt)
		*b = appendPoint(*b, 'L', x+hw, yt-dir*hh)
		*b = append(*b, 'Z')
	}
	arrows := svgGroup{Class: "arrows"}
	if len(up) > 0 {
		arrows.Paths = append(arrows.Paths, svgPath{string(up), "inflow", coord(stroke)})
	}
	if len(down) > 0 {
		arrows.Paths = append(arrows.Paths, svgPath{string(down), "outflow", coord(stroke)})
	}
	arrows.Lines = append(arrows.Lines, svgLine{coord(f.left), coord(y0), coord(f.right), coord(y0), "time-axis"})
	out.Groups = append(out.Groups, arrows)
	// Letters for the labelled amounts: one letter per distinct label.
	letters := map[string]int{}
	var keyYears [][]int
	marks := svgGroup{Class: "keys"}
	p := &placer{bounds: labelBox{f.left - 4, 0, W, H}}
	for _, a := range c.Arrows {
		if a.Label == "" {
			continue
		}
		var ls []string
		for _, part := range strings.Split(a.Label, "; ") {
			k, ok := letters[part]
			if !ok {
				k = len(out.Key)
				letters[part] = k
				out.Key = append(out.Key, svgKey{Letter: keyLetter(k), Text: part})
				keyYears = append(keyYears, nil)
			}
			keyYears[k] = append(keyYears[k], a.Year)
			ls = append(ls, keyLetter(k))
		}
		text := strings.Join(ls, ",")
		x := f.x(float64(a.Year))
		yt := f.y(a.Amount)
		var cands [][2]float64
		if a.Amount >= 0 {
			for k := 0; k < 4; k++ {
				cands = append(cands, [2]float64{x, yt - 5 - float64(k)*12})
			}
		} else {
			for k := 0; k < 4; k++ {
				cands = append(cands, [2]float64{x, yt + 14 + float64(k)*12})
			}
		}
		if pos, ok := p.place(text, labelSize, "middle", cands); ok {
			marks.Texts = append(marks.Texts, svgText{X: coord(pos[0]), Y: coord(pos[1]), Anchor: "middle", Class: "keyletter", Text: text})
		}
	}
	for k := range out.Key {
		out.Key[k].Text += " — " + yearList(keyYears[k])
	}
	out.Groups = append(out.Groups, marks)
	return out
}

// keyLetter names the k-th key: A..Z, then AA, AB, ...
func keyLetter(k int) string {
	s := ""
	for {
		s = string(rune('A'+k%26)) + s
		k = k/26 - 1
		if k < 0 {
			return s
		}
	}
}

// yearList writes years compactly: "year 5", "years 6, 12, 18",
// "years 5, 10, … 95 (19 times)".
func yearList(ys []int) string {
	if len(ys) == 1 {
		return "year " + strconv.Itoa(ys[0])
	}
	parts := make([]string, 0, len(ys))
	if len(ys) > 8 {
		for _, y := range ys[:3] {
			parts = append(parts, strconv.Itoa(y))
		}
		return "years " + strings.Join(parts, ", ") + ", … " + strconv.Itoa(ys[len(ys)-1]) + " (" + strconv.Itoa(len(ys)) + " times)"
	}
	for _, y := range ys {
		parts = append(parts, strconv.Itoa(y))
	}
	return "years " + strings.Join(parts, ", ")
}

// layoutLines draws x-y curves with their marks: reference lines at a
// rate, points at rates of return, crossovers and payback years.
func layoutLines(c *Chart, id string) svgChart {
	const W, H = 720.0, 340.0
	out := svgChart{ID: id, Kind: "lines", W: int(W), H: int(H), Title: c.Title, Desc: c.Alt, Notes: c.Notes}
	f := frame{left: yMargin(c), top: 22, right: W - 18, bottom: H - 44,
		xmin: c.XMin, xmax: c.XMax, ymin: c.YMin, ymax: c.YMax}
	if f.xmax <= f.xmin {
		f.xmax = f.xmin + 1
	}
	if f.ymax <= f.ymin {
		f.ymax = f.ymin + 1
	}
	out.Groups = append(out.Groups, axes(c, f, H, false))
	if f.ymin < 0 && f.ymax > 0 {
		out.Groups = append(out.Groups, svgGroup{Class: "zero", Lines: []svgLine{{coord(f.left), coord(f.y(0)), coord(f.right), coord(f.y(0)), "zero"}}})
	}
	out.Clip = &svgRect{coord(f.left), coord(f.top), coord(f.right - f.left), coord(f.bottom - f.top), ""}
	curves := svgGroup{Class: "series", Clip: id + "-clip"}
	faint := len(c.Series) > manySeries
	for k, s := range c.Series {
		cls := seriesClass(k)
		if faint && !s.Emphasis {
			cls += " faint"
		}
		out.Legend = append(out.Legend, svgLegend{Name: s.Name, Class: cls})
		var d []byte
		pen := false
		for i := range s.X {
			if i >= len(s.Y) || math.IsNaN(s.Y[i]) || math.IsInf(s.Y[i], 0) || s.X[i] < f.xmin || s.X[i] > f.xmax {
				pen = false
				continue
			}
			// The plot area clips the curve; far values are held just
			// outside it.
			y := math.Max(f.top-50, math.Min(f.bottom+50, f.y(s.Y[i])))
			cmd := byte('M')
			if pen {
				cmd = 'L'
			}
			d = appendPoint(d, cmd, f.x(s.X[i]), y)
			pen = true
		}
		if len(d) > 0 {
			curves.Paths = append(curves.Paths, svgPath{string(d), "curve " + cls, ""})
		}
	}
	out.Groups = append(out.Groups, curves)
	// Marks: reference lines first, then points, then their labels.
	marks := svgGroup{Class: "marks"}
	p := &placer{bounds: labelBox{f.left, f.top - 16, f.right + 4, f.bottom}}
	for _, m := range c.Marks {
		if m.HasX && !m.HasY && m.X >= f.xmin && m.X <= f.xmax {
			x := f.x(m.X)
			marks.Lines = append(marks.Lines, svgLine{coord(x), coord(f.top), coord(x), coord(f.bottom), "refline"})
			if pos, ok := p.place(m.Label, labelSize, "start", [][2]float64{{x + 4, f.top + 10}, {x + 4, f.top + 24}}); ok {
				marks.Texts = append(marks.Texts, svgText{X: coord(pos[0]), Y: coord(pos[1]), Anchor: "start", Class: "mark-label", Text: m.Label})
			}
		}
		if !m.HasX && m.HasY && m.Y >= f.ymin && m.Y <= f.ymax {
			y := f.y(m.Y)
			marks.Lines = append(marks.Lines, svgLine{coord(f.left), coord(y), coord(f.right), coord(y), "refline"})
		}
	}
	for _, m := range c.Marks {
		if !(m.HasX && m.HasY) || m.X < f.xmin || m.X > f.xmax || m.Y < f.ymin || m.Y > f.ymax {
			continue
		}
		x, y := f.x(m.X), f.y(m.Y)
		cls := "mark"
		if m.Series >= 0 {
			cls += " " + seriesClass(m.Series)
		}
		switch m.Kind {
		case "crossover":
			marks.Paths = append(marks.Paths, svgPath{"M" + coord(x) + " " + coord(y-5) + "L" + coord(x+5) + " " + coord(y) + "L" + coord(x) + " " + coord(y+5) + "L" + coord(x-5) + " " + coord(y) + "Z", "crossover", ""})
		default:
			marks.Circles = append(marks.Circles, svgCircle{coord(x), coord(y), "4", cls})
		}
		// Labels try above, below, then further out, on either side.
		var cands [][2]float64
		for _, dy := range []float64{-8, 17, -20, 29, -32, 41} {
			cands = append(cands, [2]float64{x + 6, y + dy}, [2]float64{x - 6, y + dy})
		}
		anchorFor := func(k int) string {
			if k%2 == 0 {
				return "start"
			}
			return "end"
		}
		for k, cand := range cands {
			if pos, ok := p.place(m.Label, labelSize, anchorFor(k), [][2]float64{cand}); ok {
				lc := "mark-label"
				if m.Series >= 0 {
					lc += " t" + strconv.Itoa(m.Series%8)
				}
				marks.Texts = append(marks.Texts, svgText{X: coord(pos[0]), Y: coord(pos[1]), Anchor: anchorFor(k), Class: lc, Text: m.Label})
				break
			}
		}
	}
	out.Groups = append(out.Groups, marks)
	return out
}

// seriesClass is the style of the k-th series: eight colours, and a dash
// pattern for each round of them, so curves stay apart in grey print.
func seriesClass(k int) string {
	return "s" + strconv.Itoa(k%8) + " d" + strconv.Itoa((k/8)%4)
}

// chartHTML writes a laid-out chart as the "chart" template did with
// template actions, every label and attribute value escaped as
// html/template escapes it (escapeHTML).
func chartHTML(c svgChart) template.HTML {
	var b strings.Builder
	n := 2048 + len(c.Title)*2 + len(c.Desc)
	for _, g := range c.Groups {
		n += 64 + len(g.Rects)*80 + len(g.Lines)*80 + len(g.Circles)*64 + len(g.Texts)*96
		for _, p := range g.Paths {
			n += len(p.D) + 64
		}
	}
	for _, s := range c.Notes {
		n += len(s) + 12
	}
	b.Grow(n)
	b.WriteString(`<figure class="chart `)
	escapeHTML(&b, c.Kind)
	b.WriteString("\">\n<figcaption>")
	escapeHTML(&b, c.Title)
	b.WriteString("</figcaption>\n" + `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 `)
	b.WriteString(strconv.Itoa(c.W))
	b.WriteByte(' ')
	b.WriteString(strconv.Itoa(c.H))
	b.WriteString(`" role="img" aria-labelledby="`)
	escapeHTML(&b, c.ID)
	b.WriteString("-title ")
	escapeHTML(&b, c.ID)
	b.WriteString("-desc\">\n<title id=\"")
	escapeHTML(&b, c.ID)
	b.WriteString(`-title">`)
	escapeHTML(&b, c.Title)
	b.WriteString("</title>\n<desc id=\"")
	escapeHTML(&b, c.ID)
	b.WriteString(`-desc">`)
	escapeHTML(&b, c.Desc)
	b.WriteString("</desc>")
	if r := c.Clip; r != nil {
		b.WriteString("\n<defs><clipPath id=\"")
		escapeHTML(&b, c.ID)
		b.WriteString(`-clip"><rect`)
		attr(&b, "x", r.X)
		attr(&b, "y", r.Y)
		attr(&b, "width", r.W)
		attr(&b, "height", r.H)
		b.WriteString("/></clipPath></defs>")
	}
	for i := range c.Groups {
		g := &c.Groups[i]
		b.WriteString("\n<g")
		attr(&b, "class", g.Class)
		if g.Clip != "" {
			b.WriteString(` clip-path="url(#`)
			escapeHTML(&b, g.Clip)
			b.WriteString(`)"`)
		}
		b.WriteByte('>')
		for _, r := range g.Rects {
			b.WriteString("<rect")
			attr(&b, "x", r.X)
			attr(&b, "y", r.Y)
			attr(&b, "width", r.W)
			attr(&b, "height", r.H)
			attr(&b, "class", r.Class)
			b.WriteString("/>")
		}
		for _, l := range g.Lines {
			b.WriteString("<line")
			attr(&b, "x1", l.X1)
			attr(&b, "y1", l.Y1)
			attr(&b, "x2", l.X2)
			attr(&b, "y2", l.Y2)
			attr(&b, "class", l.Class)
			b.WriteString("/>")
		}
		for _, p := range g.Paths {
			b.WriteString("<path")
			attr(&b, "d", p.D)
			attr(&b, "class", p.Class)
			if p.Width != "" {
				attr(&b, "stroke-width", p.Width)
			}
			b.WriteString("/>")
		}
		for _, ci := range g.Circles {
			b.WriteString("<circle")
			attr(&b, "cx", ci.CX)
			attr(&b, "cy", ci.CY)
			attr(&b, "r", ci.R)
			attr(&b, "class", ci.Class)
			b.WriteString("/>")
		}
		for _, t := range g.Texts {
			b.WriteString("<text")
			attr(&b, "x", t.X)
			attr(&b, "y", t.Y)
			attr(&b, "text-anchor", t.Anchor)
			attr(&b, "class", t.Class)
			if t.Rotate != "" {
				attr(&b, "transform", t.Rotate)
			}
			b.WriteByte('>')
			escapeHTML(&b, t.Text)
			b.WriteString("</text>")
		}
		b.WriteString("\n</g>")
	}
	b.WriteString("\n</svg>")
	if len(c.Legend) > 0 {
		b.WriteString("\n<ul class=\"legend\">")
		for _, l := range c.Legend {
			b.WriteString("\n" + `<li><svg class="swatch" viewBox="0 0 28 10" aria-hidden="true"><line x1="1" y1="5" x2="27" y2="5" class="curve `)
			escapeHTML(&b, l.Class)
			b.WriteString(`"/></svg>`)
			escapeHTML(&b, l.Name)
			b.WriteString("</li>")
		}
		b.WriteString("\n</ul>")
	}
	if len(c.Key) > 0 {
		b.WriteString("\n<dl class=\"key\">")
		for _, k := range c.Key {
			b.WriteString("\n<div><dt>")
			escapeHTML(&b, k.Letter)
			b.WriteString("</dt><dd>")
			escapeHTML(&b, k.Text)
			b.WriteString("</dd></div>")
		}
		b.WriteString("\n</dl>")
	}
	if len(c.Notes) > 0 {
		b.WriteString("\n<ul class=\"chart-notes\">")
		for _, s := range c.Notes {
			b.WriteString("\n<li>")
			escapeHTML(&b, s)
			b.WriteString("</li>")
		}
		b.WriteString("\n</ul>")
	}
	b.WriteString("\n</figure>")
	return template.HTML(b.String())
}

// attr writes ` name="value"`, the value escaped.
func attr(b *strings.Builder, name, value string) {
	b.WriteByte(' ')
	b.WriteString(name)
	b.WriteString(`="`)
	escapeHTML(b, value)
	b.WriteByte('"')
}
