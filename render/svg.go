package render

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// The SVG charts of the HTML writer. A Chart of the document model is laid
// out here into plain shapes (lines, paths, circles, texts) with their
// coordinates already formatted; the template in templates/chart.html
// writes them out, so html/template escapes every label.

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

// num writes a coordinate with at most one decimal.
func num(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "0"
	}
	return strconv.FormatFloat(math.Round(x*10)/10, 'f', -1, 64)
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
	g := svgGroup{Class: "axes"}
	for _, t := range c.YTicks {
		y := f.y(t.At)
		g.Lines = append(g.Lines, svgLine{num(f.left), num(y), num(f.right), num(y), "grid"})
		g.Texts = append(g.Texts, svgText{X: num(f.left - 6), Y: num(y + 4), Anchor: "end", Class: "tick", Text: t.Label})
	}
	for _, t := range c.XTicks {
		x := f.x(t.At)
		if !yearTicksAtBottom {
			g.Lines = append(g.Lines, svgLine{num(x), num(f.top), num(x), num(f.bottom), "grid"})
		}
		g.Lines = append(g.Lines, svgLine{num(x), num(f.bottom), num(x), num(f.bottom + 4), "tickmark"})
		g.Texts = append(g.Texts, svgText{X: num(x), Y: num(f.bottom + 16), Anchor: "middle", Class: "tick", Text: t.Label})
	}
	g.Lines = append(g.Lines,
		svgLine{num(f.left), num(f.top), num(f.left), num(f.bottom), "axis"},
		svgLine{num(f.left), num(f.bottom), num(f.right), num(f.bottom), "axis"})
	if c.XLabel != "" {
		g.Texts = append(g.Texts, svgText{X: num((f.left + f.right) / 2), Y: num(h - 6), Anchor: "middle", Class: "axis-title", Text: c.XLabel})
	}
	if c.YLabel != "" {
		cy := (f.top + f.bottom) / 2
		g.Texts = append(g.Texts, svgText{X: "14", Y: num(cy), Anchor: "middle", Class: "axis-title", Text: c.YLabel, Rotate: "rotate(-90 14 " + num(cy) + ")"})
	}
	return g
}

// layoutChart lays out a chart of the document model.
func layoutChart(c *Chart, id string) svgChart {
	if c.Kind == "cashflow" {
		return layoutCashflow(c, id)
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
	var up, down strings.Builder
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
		b.WriteString("M" + num(x) + " " + num(y0) + "V" + num(yt-dir*hh*0.5))
		b.WriteString("M" + num(x-hw) + " " + num(yt-dir*hh) + "L" + num(x) + " " + num(yt) + "L" + num(x+hw) + " " + num(yt-dir*hh) + "Z")
	}
	arrows := svgGroup{Class: "arrows"}
	if up.Len() > 0 {
		arrows.Paths = append(arrows.Paths, svgPath{up.String(), "inflow", num(stroke)})
	}
	if down.Len() > 0 {
		arrows.Paths = append(arrows.Paths, svgPath{down.String(), "outflow", num(stroke)})
	}
	arrows.Lines = append(arrows.Lines, svgLine{num(f.left), num(y0), num(f.right), num(y0), "time-axis"})
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
			marks.Texts = append(marks.Texts, svgText{X: num(pos[0]), Y: num(pos[1]), Anchor: "middle", Class: "keyletter", Text: text})
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
		out.Groups = append(out.Groups, svgGroup{Class: "zero", Lines: []svgLine{{num(f.left), num(f.y(0)), num(f.right), num(f.y(0)), "zero"}}})
	}
	out.Clip = &svgRect{num(f.left), num(f.top), num(f.right - f.left), num(f.bottom - f.top), ""}
	curves := svgGroup{Class: "series", Clip: id + "-clip"}
	faint := len(c.Series) > manySeries
	for k, s := range c.Series {
		cls := seriesClass(k)
		if faint && !s.Emphasis {
			cls += " faint"
		}
		out.Legend = append(out.Legend, svgLegend{Name: s.Name, Class: cls})
		var d strings.Builder
		pen := false
		for i := range s.X {
			if i >= len(s.Y) || math.IsNaN(s.Y[i]) || math.IsInf(s.Y[i], 0) || s.X[i] < f.xmin || s.X[i] > f.xmax {
				pen = false
				continue
			}
			// The plot area clips the curve; far values are held just
			// outside it.
			y := math.Max(f.top-50, math.Min(f.bottom+50, f.y(s.Y[i])))
			if pen {
				d.WriteString("L")
			} else {
				d.WriteString("M")
			}
			d.WriteString(num(f.x(s.X[i])) + " " + num(y))
			pen = true
		}
		if d.Len() > 0 {
			curves.Paths = append(curves.Paths, svgPath{d.String(), "curve " + cls, ""})
		}
	}
	out.Groups = append(out.Groups, curves)
	// Marks: reference lines first, then points, then their labels.
	marks := svgGroup{Class: "marks"}
	p := &placer{bounds: labelBox{f.left, f.top - 16, f.right + 4, f.bottom}}
	for _, m := range c.Marks {
		if m.HasX && !m.HasY && m.X >= f.xmin && m.X <= f.xmax {
			x := f.x(m.X)
			marks.Lines = append(marks.Lines, svgLine{num(x), num(f.top), num(x), num(f.bottom), "refline"})
			if pos, ok := p.place(m.Label, labelSize, "start", [][2]float64{{x + 4, f.top + 10}, {x + 4, f.top + 24}}); ok {
				marks.Texts = append(marks.Texts, svgText{X: num(pos[0]), Y: num(pos[1]), Anchor: "start", Class: "mark-label", Text: m.Label})
			}
		}
		if !m.HasX && m.HasY && m.Y >= f.ymin && m.Y <= f.ymax {
			y := f.y(m.Y)
			marks.Lines = append(marks.Lines, svgLine{num(f.left), num(y), num(f.right), num(y), "refline"})
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
			marks.Paths = append(marks.Paths, svgPath{"M" + num(x) + " " + num(y-5) + "L" + num(x+5) + " " + num(y) + "L" + num(x) + " " + num(y+5) + "L" + num(x-5) + " " + num(y) + "Z", "crossover", ""})
		default:
			marks.Circles = append(marks.Circles, svgCircle{num(x), num(y), "4", cls})
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
				marks.Texts = append(marks.Texts, svgText{X: num(pos[0]), Y: num(pos[1]), Anchor: anchorFor(k), Class: lc, Text: m.Label})
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
