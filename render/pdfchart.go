package render

// Charts for the PDF writer, drawn as vectors with fpdf's own primitives:
// the cash-flow diagram (one arrow a year, up for benefits, down for
// costs, to scale), line charts (present worth against rate, cumulative
// cash flow) and bar charts.

import (
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/go-pdf/fpdf"
)

const (
	pdfChartTitleSize = 9.5
	pdfChartTextSize  = 7.5
)

var (
	pdfColBenefit = pdfRgb{24, 122, 84}
	pdfColCost    = pdfRgb{186, 56, 42}
	pdfColAxis    = pdfRgb{70, 76, 84}
	pdfColGrid    = pdfRgb{228, 231, 235}
)

// pdfSeriesStyles are the curves' colours and dash patterns: distinct in
// colour on screen and in dash on a grey printer.
var pdfSeriesStyles = []struct {
	c    pdfRgb
	dash []float64
}{
	{pdfRgb{22, 96, 140}, nil},
	{pdfRgb{214, 112, 22}, []float64{5, 2.5}},
	{pdfRgb{120, 72, 168}, []float64{1.5, 2}},
	{pdfRgb{48, 140, 70}, []float64{7, 2, 1.5, 2}},
	{pdfRgb{190, 40, 60}, []float64{3, 3}},
	{pdfRgb{96, 104, 118}, []float64{8, 3}},
}

// chartNotes are the lines under a chart: its notes, then its source.
func (w *pdfWriter) chartNotes(c *Chart) []string {
	var out []string
	for _, n := range c.Notes {
		out = append(out, pdfWrapPlain(n, fItalic, pdfChartTextSize+0.5, w.righ-w.left)...)
	}
	return out
}

const pdfChartNoteLead = 10.5

// chartHeight is the height a chart takes with its title and notes.
func (w *pdfWriter) chartHeight(c *Chart) float64 { return w.chartHeightShrunk(c, 0) }

// chartShrink is how much a chart's plot may give up to stay on a page
// rather than leave most of one empty.
func chartShrink(c *Chart) float64 {
	if c.Kind == "cashflow" {
		return 50
	}
	if c.Kind == "tornado" {
		return 0 // its rows are sized to fit their labels
	}
	return 40
}

func (w *pdfWriter) chartHeightShrunk(c *Chart, shrink float64) float64 {
	h := 0.0
	keyW := 0.0
	if c.Kind == "cashflow" {
		keyW = 80
	}
	if c.Title != "" {
		h += float64(len(pdfWrapPlain(c.Title, fBold, pdfChartTitleSize, w.righ-w.left-keyW)))*13 + 4
	} else if keyW > 0 {
		h += 17
	}
	switch c.Kind {
	case "cashflow":
		h += 200 - shrink
	case "tornado":
		h += tornadoHeight(c) - shrink // analysis.go
	default:
		h += 210 - shrink + w.legendHeight(c)
	}
	if n := len(w.chartNotes(c)); n > 0 {
		h += 4 + float64(n)*pdfChartNoteLead
	}
	if c.Source != "" {
		h += 11
	}
	return h
}

func (w *pdfWriter) chart(c *Chart) {
	w.gap(12)
	h := w.chartHeight(c)
	if room := w.room() - 4; h > room && w.y > w.top+0.5 && h-chartShrink(c) <= room {
		h = w.chartHeightShrunk(c, h-room)
	}
	w.ensure(h + 4)
	w.flushMarkerAt()
	y := w.y
	keyW := 0.0
	if c.Kind == "cashflow" {
		keyW = 80
		w.cashflowKey(w.righ, y+10)
	}
	if c.Title != "" {
		for _, l := range pdfWrapPlain(c.Title, fBold, pdfChartTitleSize, w.righ-w.left-keyW) {
			w.text(w.left, y+10, l, fBold, pdfChartTitleSize, pdfColText)
			y += 13
		}
		y += 4
	} else if keyW > 0 {
		y += 17
	}
	notes := w.chartNotes(c)
	foot := 0.0
	if len(notes) > 0 {
		foot += 4 + float64(len(notes))*pdfChartNoteLead
	}
	if c.Source != "" {
		foot += 11
	}
	area := pdfRect{w.left, y, w.righ - w.left, w.y + h - y - foot}
	switch c.Kind {
	case "cashflow":
		w.cashflowChart(c, area)
	case "bars":
		w.xyChart(c, area, true)
	case "tornado":
		w.tornadoPDF(c, area) // analysis.go
	default:
		w.xyChart(c, area, false)
	}
	ny := area.y + area.h
	if len(notes) > 0 {
		ny += 4
		for _, l := range notes {
			w.text(w.left, ny+8, l, fItalic, pdfChartTextSize+0.5, pdfColMuted)
			ny += pdfChartNoteLead
		}
	}
	if c.Source != "" {
		w.text(w.left, ny+9, pdfFit("Source: "+c.Source, fRegular, 7.5, w.righ-w.left), fRegular, 7.5, pdfColFaint)
	}
	w.decorate(w.y, w.y+h)
	w.y += h
	w.lastGap = 0
	w.after(10)
}

type pdfRect struct{ x, y, w, h float64 }

func (r pdfRect) overlaps(o pdfRect) bool {
	return r.x < o.x+o.w && o.x < r.x+r.w && r.y < o.y+o.h && o.y < r.y+r.h
}

// ---------------------------------------------------------------------
// The cash-flow diagram

func (w *pdfWriter) cashflowChart(c *Chart, a pdfRect) {
	if len(c.Arrows) == 0 {
		w.textCenter(a.x+a.w/2, a.y+a.h/2, "no cash flows", fItalic, pdfChartTextSize, pdfColMuted)
		return
	}
	first, last := 0, 0
	var maxUp, maxDown float64
	for _, ar := range c.Arrows {
		first = min(first, ar.Year)
		last = max(last, ar.Year)
		if ar.Amount > 0 {
			maxUp = math.Max(maxUp, ar.Amount)
		} else {
			maxDown = math.Max(maxDown, -ar.Amount)
		}
	}
	if last == first {
		last = first + 1
	}
	xlabel := c.XLabel
	if xlabel == "" {
		xlabel = "year"
	}
	xlabel = strings.ToLower(xlabel)
	// The money scale: the document's ticks where it has them.
	ylo, yhi := -maxDown, maxUp
	ticks := c.YTicks
	if c.YMax > c.YMin && c.YMin <= 0 && c.YMax >= 0 && len(ticks) > 0 {
		ylo, yhi = c.YMin, c.YMax
	} else {
		step := pdfNiceStep(yhi-ylo, 4)
		ylo = math.Floor(ylo/step-1e-9) * step
		yhi = math.Ceil(yhi/step+1e-9) * step
		lab := w.labeler("money", ylo, yhi, step)
		ticks = nil
		for v := ylo; v <= yhi+step*1e-6; v += step {
			ticks = append(ticks, Tick{At: v, Label: lab.label(v)})
		}
	}
	if yhi == ylo {
		yhi = ylo + 1
	}
	var tickW float64
	for _, t := range ticks {
		tickW = math.Max(tickW, pdfStrWidth(pdfClean(t.Label, fRegular), fRegular, pdfChartTextSize-0.5))
	}
	// Horizontal: the scale's labels, a little room left of year 0, and
	// the axis arrow with its label at the right.
	x0 := a.x + tickW + 16
	x1 := a.x + a.w - 36
	step := (x1 - x0) / float64(last-first)
	xAt := func(year int) float64 { return x0 + float64(year-first)*step }
	// Vertical: label bands above and below, the year strip at the foot.
	labelBand := 2 * (pdfChartTextSize + 3)
	scaleH := 14.0
	top := a.y + labelBand
	bottom := a.y + a.h - scaleH - labelBand
	scale := (bottom - top) / (yhi - ylo)
	yAt := func(v float64) float64 { return top + (yhi-v)*scale }
	axisY := yAt(0)
	// Scale lines and labels.
	for _, t := range ticks {
		if t.At < ylo-1e-9 || t.At > yhi+1e-9 {
			continue
		}
		y := yAt(t.At)
		if t.At != 0 {
			w.setDraw(pdfColGrid, 0.35)
			w.pdf.Line(x0-6, y, x1, y)
		}
		w.textRight(x0-9, y+2.6, t.Label, fRegular, pdfChartTextSize-0.5, pdfColFaint)
	}
	// The time axis with its arrow.
	w.setDraw(pdfColAxis, 0.7)
	w.pdf.Line(x0-6, axisY, x1+22, axisY)
	w.setFill(pdfColAxis)
	w.pdf.Polygon([]fpdf.PointType{{X: x1 + 27, Y: axisY}, {X: x1 + 20, Y: axisY - 2.6}, {X: x1 + 20, Y: axisY + 2.6}}, "F")
	// Year strip at the foot, thinned to fit.
	yearW := pdfStrWidth(strconv.Itoa(max(pdfIabs(last), pdfIabs(first))), fRegular, pdfChartTextSize) + 6
	every := 1
	for _, k := range []int{1, 2, 5, 10, 20, 25, 50, 100, 200, 250, 500, 1000} {
		every = k
		if float64(k)*step >= yearW {
			break
		}
	}
	sy := a.y + a.h - 3
	w.setDraw(pdfColRule, 0.4)
	w.pdf.Line(x0, sy-10, x1, sy-10)
	lastLabel := math.Inf(-1)
	for yr := first; yr <= last; yr++ {
		x := xAt(yr)
		major := yr%every == 0 || yr == first
		tick := 1.5
		if major {
			tick = 3
		}
		w.setDraw(pdfColAxis, 0.4)
		w.pdf.Line(x, axisY-tick, x, axisY+tick)
		w.setDraw(pdfColRule, 0.4)
		w.pdf.Line(x, sy-10, x, sy-10+tick)
		if major || yr == last {
			s := strconv.Itoa(yr)
			lw := pdfStrWidth(s, fRegular, pdfChartTextSize)
			if x-lw/2 < lastLabel+4 {
				continue
			}
			if yr != last && xAt(last)-pdfStrWidth(strconv.Itoa(last), fRegular, pdfChartTextSize)/2 < x+lw/2+4 {
				continue // leave room for the last year's number
			}
			w.textCenter(x, sy, s, fRegular, pdfChartTextSize, pdfColMuted)
			lastLabel = x + lw/2
		}
	}
	w.text(math.Max(lastLabel+5, x1+10), sy, xlabel, fItalic, pdfChartTextSize, pdfColMuted)
	// The arrows, to scale (an amount too small to see is drawn 1.5 pt
	// long so that its year is not mistaken for an empty one).
	shaft := math.Min(1.2, math.Max(0.35, step*0.25))
	headW := math.Min(6, math.Max(1.6, step*0.7))
	headL := math.Min(7, headW*1.3)
	var occupied []pdfRect
	type tip struct {
		x, y float64
		up   bool
	}
	tips := make([]tip, len(c.Arrows))
	for i, ar := range c.Arrows {
		x := xAt(ar.Year)
		l := math.Abs(ar.Amount) * scale
		if ar.Amount != 0 && l < 1.5 {
			l = 1.5
		}
		col := pdfColBenefit
		up := ar.Amount > 0
		ty := axisY - l
		if !up {
			col = pdfColCost
			ty = axisY + l
		}
		tips[i] = tip{x, ty, up}
		if ar.Amount == 0 {
			continue
		}
		hl := math.Min(headL, l*0.6)
		w.setDraw(col, shaft)
		w.setFill(col)
		if up {
			w.pdf.Line(x, axisY, x, ty+hl*0.8)
			w.pdf.Polygon([]fpdf.PointType{{X: x, Y: ty}, {X: x - headW/2, Y: ty + hl}, {X: x + headW/2, Y: ty + hl}}, "F")
			occupied = append(occupied, pdfRect{x - headW/2, ty, headW, axisY - ty})
		} else {
			w.pdf.Line(x, axisY, x, ty-hl*0.8)
			w.pdf.Polygon([]fpdf.PointType{{X: x, Y: ty}, {X: x - headW/2, Y: ty - hl}, {X: x + headW/2, Y: ty - hl}}, "F")
			occupied = append(occupied, pdfRect{x - headW/2, axisY, headW, ty - axisY})
		}
	}
	// Labels: the first arrow with each label text first, stacked clear
	// of the arrows if need be; then the repeats, only where they fit
	// beside their arrows, so that a long horizon is thinned rather than
	// crowded. A long label takes two lines.
	var firsts, repeats []int
	seen := map[string]bool{}
	for i, ar := range c.Arrows {
		switch {
		case ar.Label == "":
		case !seen[ar.Label]:
			seen[ar.Label] = true
			firsts = append(firsts, i)
		default:
			repeats = append(repeats, i)
		}
	}
	const ts = pdfChartTextSize
	lh := ts + 2
	place := func(i, rows int) {
		ar := c.Arrows[i]
		t := tips[i]
		lines := pdfWrapPlain(ar.Label, fRegular, ts, 150)
		var lw float64
		for _, l := range lines {
			lw = math.Max(lw, pdfStrWidth(l, fRegular, ts))
		}
		bh := lh * float64(len(lines))
		lx := t.x - lw/2
		lx = math.Max(x0-4, math.Min(lx, a.x+a.w-lw)) // clear of the scale
		for row := 0; row < rows; row++ {
			var r pdfRect
			if t.up {
				r = pdfRect{lx - 1, t.y - 3 - bh - lh*float64(row), lw + 2, bh}
				if r.y < a.y {
					return
				}
			} else {
				r = pdfRect{lx - 1, t.y + 3 + lh*float64(row), lw + 2, bh}
				if r.y+r.h > a.y+a.h-scaleH {
					return
				}
			}
			// labels keep a little apart, so two never read as one
			wide := pdfRect{r.x - 4, r.y - 1, r.w + 8, r.h + 2}
			clash := false
			for _, o := range occupied {
				if wide.overlaps(o) {
					clash = true
					break
				}
			}
			if clash {
				continue
			}
			occupied = append(occupied, r)
			if row > 0 {
				// a leader from the label to its arrow
				w.setDraw(pdfColFaint, 0.3)
				if t.up {
					w.pdf.Line(t.x, r.y+r.h, t.x, t.y-1)
				} else {
					w.pdf.Line(t.x, r.y, t.x, t.y+1)
				}
			}
			for k, l := range lines {
				w.text(r.x+1, r.y+ts+lh*float64(k), l, fRegular, ts, pdfColText)
			}
			return
		}
	}
	for _, i := range firsts {
		place(i, 8)
	}
	for _, i := range repeats {
		place(i, 1)
	}
}

// cashflowKey draws which way is which, right-aligned on a chart's title
// line.
func (w *pdfWriter) cashflowKey(x, base float64) {
	cost := "↓ cost"
	x -= pdfStrWidth(cost, fRegular, pdfChartTextSize)
	w.text(x, base, cost, fRegular, pdfChartTextSize, pdfColCost)
	ben := "↑ benefit"
	x -= pdfStrWidth(ben, fRegular, pdfChartTextSize) + 10
	w.text(x, base, ben, fRegular, pdfChartTextSize, pdfColBenefit)
}

func pdfIabs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

func pdfContainsInt(xs []int, x int) bool {
	for _, v := range xs {
		if v == x {
			return true
		}
	}
	return false
}

// ---------------------------------------------------------------------
// Line and bar charts

func (w *pdfWriter) legendHeight(c *Chart) float64 {
	if len(c.Series) < 2 && (len(c.Series) == 0 || c.Series[0].Name == "") {
		return 0
	}
	rows := len(w.legendRows(c, w.righ-w.left))
	return float64(rows)*11 + 4
}

// legendRows places the legend entries in rows across width.
func (w *pdfWriter) legendRows(c *Chart, width float64) [][]int {
	var rows [][]int
	var cur []int
	x := 0.0
	for i, s := range c.Series {
		ew := 22 + pdfStrWidth(pdfClean(s.Name, fRegular), fRegular, pdfChartTextSize) + 14
		if len(cur) > 0 && x+ew > width {
			rows = append(rows, cur)
			cur, x = nil, 0
		}
		cur = append(cur, i)
		x += ew
	}
	if len(cur) > 0 {
		rows = append(rows, cur)
	}
	return rows
}

// pdfNiceStep is a round step (1, 2, 2.5 or 5 times a power of ten) giving
// about n intervals over span.
func pdfNiceStep(span float64, n int) float64 {
	if span <= 0 || math.IsInf(span, 0) || math.IsNaN(span) {
		return 1
	}
	raw := span / float64(n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*mag >= raw {
			return m * mag
		}
	}
	return 10 * mag
}

// pdfAxisLabeler formats tick values of one axis, with one unit and as many
// decimals as the step needs.
type pdfAxisLabeler struct {
	w      *pdfWriter
	format string
	step   float64
	unit   float64
	suffix string
}

func (w *pdfWriter) labeler(format string, lo, hi, step float64) pdfAxisLabeler {
	l := pdfAxisLabeler{w: w, format: format, step: step, unit: 1}
	if format == "money" || format == "number" || format == "" {
		m := math.Max(math.Abs(lo), math.Abs(hi))
		switch {
		case m >= 1e9:
			l.unit, l.suffix = 1e9, "B"
		case m >= 1e6:
			l.unit, l.suffix = 1e6, "M"
		case m >= 1e4:
			l.unit, l.suffix = 1e3, "k"
		}
	}
	return l
}

func pdfDecimalsFor(step float64) int {
	if step <= 0 {
		return 0
	}
	d := 0
	for d < 4 && math.Abs(step*math.Pow(10, float64(d))-math.Round(step*math.Pow(10, float64(d)))) > 1e-6 {
		d++
	}
	return d
}

func (l pdfAxisLabeler) label(v float64) string {
	if math.Abs(v) < l.step*1e-6 {
		v = 0
		if l.format == "money" {
			return l.w.cur.Symbol + "0"
		}
		if l.format == "number" || l.format == "" {
			return "0"
		}
	}
	neg := v < 0
	v = math.Abs(v)
	var s string
	switch l.format {
	case "percent":
		s = strconv.FormatFloat(v*100, 'f', pdfDecimalsFor(l.step*100), 64) + "%"
	case "year":
		s = strconv.FormatFloat(v, 'f', pdfDecimalsFor(l.step), 64)
	default:
		d := pdfDecimalsFor(l.step / l.unit)
		s = strconv.FormatFloat(v/l.unit, 'f', d, 64)
		ip, fp, _ := strings.Cut(s, ".")
		s = group(ip)
		if fp != "" {
			s += "." + fp
		}
		s += l.suffix
		if l.format == "money" {
			s = l.w.cur.Symbol + s
		}
	}
	if neg {
		s = "−" + s
	}
	return s
}

func pdfFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func (w *pdfWriter) xyChart(c *Chart, a pdfRect, bars bool) {
	// Data ranges.
	xlo, xhi := math.Inf(1), math.Inf(-1)
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for _, s := range c.Series {
		for k := range s.X {
			if k >= len(s.Y) || !pdfFinite(s.X[k]) || !pdfFinite(s.Y[k]) {
				continue
			}
			xlo, xhi = math.Min(xlo, s.X[k]), math.Max(xhi, s.X[k])
			ylo, yhi = math.Min(ylo, s.Y[k]), math.Max(yhi, s.Y[k])
		}
	}
	for _, m := range c.Marks {
		if m.HasY && pdfFinite(m.Y) {
			ylo, yhi = math.Min(ylo, m.Y), math.Max(yhi, m.Y)
		}
		if m.HasX && pdfFinite(m.X) && !m.HasY {
			xlo, xhi = math.Min(xlo, m.X), math.Max(xhi, m.X)
		}
	}
	if !pdfFinite(xlo) || !pdfFinite(ylo) {
		w.textCenter(a.x+a.w/2, a.y+a.h/2, "no data to chart", fItalic, pdfChartTextSize, pdfColMuted)
		return
	}
	if bars {
		ylo, yhi = math.Min(ylo, 0), math.Max(yhi, 0)
	} else if ylo > 0 && ylo < (yhi-ylo)*0.35 || yhi < 0 && -yhi < (yhi-ylo)*0.35 {
		// near zero: show zero, where a curve's rate of return lies
		ylo, yhi = math.Min(ylo, 0), math.Max(yhi, 0)
	}
	if yhi == ylo {
		d := math.Max(math.Abs(yhi)*0.1, 1)
		ylo, yhi = ylo-d, yhi+d
	}
	if xhi == xlo {
		xlo, xhi = xlo-1, xhi+1
	}
	ystep := pdfNiceStep(yhi-ylo, 5)
	ylo = math.Floor(ylo/ystep+1e-9) * ystep
	yhi = math.Ceil(yhi/ystep-1e-9) * ystep
	var barW float64
	if bars {
		// room for half a bar at each end
		gapX := math.Inf(1)
		for _, s := range c.Series {
			xs := append([]float64(nil), s.X...)
			sort.Float64s(xs)
			for k := 1; k < len(xs); k++ {
				if d := xs[k] - xs[k-1]; d > 0 {
					gapX = math.Min(gapX, d)
				}
			}
		}
		if !pdfFinite(gapX) {
			gapX = 1
		}
		xlo -= gapX / 2
		xhi += gapX / 2
		barW = gapX
	}
	xstep := pdfNiceStep(xhi-xlo, 8)
	if c.XFormat == "year" && xstep < 1 {
		xstep = 1
	}
	// The ticks: the document's, computed once for every writer, where it
	// has them; else round steps of our own.
	var xticks, yticks []Tick
	if !bars && c.XMax > c.XMin && len(c.XTicks) > 0 {
		xlo, xhi, xticks = c.XMin, c.XMax, c.XTicks
	} else {
		xlab := w.labeler(c.XFormat, xlo, xhi, xstep)
		for v := math.Ceil(xlo/xstep-1e-9) * xstep; v <= xhi+xstep*1e-6; v += xstep {
			xticks = append(xticks, Tick{At: v, Label: xlab.label(v)})
		}
	}
	if c.YMax > c.YMin && len(c.YTicks) > 0 {
		ylo, yhi, yticks = c.YMin, c.YMax, c.YTicks
	} else {
		ylab := w.labeler(c.YFormat, ylo, yhi, ystep)
		for v := ylo; v <= yhi+ystep*1e-6; v += ystep {
			yticks = append(yticks, Tick{At: v, Label: ylab.label(v)})
		}
	}
	// Plot area: y tick labels on the left, x ticks and label below,
	// legend at the foot.
	var yTickW float64
	for _, t := range yticks {
		yTickW = math.Max(yTickW, pdfStrWidth(pdfClean(t.Label, fRegular), fRegular, pdfChartTextSize))
	}
	legendH := w.legendHeight(c)
	top := a.y + 14 // the y label sits above the plot
	if c.YLabel == "" {
		top = a.y + 6
	}
	plot := pdfRect{a.x + yTickW + 8, top, 0, 0}
	plot.w = a.x + a.w - plot.x - 6
	bottom := a.y + a.h - legendH - 14
	if c.XLabel != "" {
		bottom -= 11
	}
	plot.h = bottom - plot.y
	px := func(x float64) float64 { return plot.x + (x-xlo)/(xhi-xlo)*plot.w }
	py := func(y float64) float64 { return plot.y + plot.h - (y-ylo)/(yhi-ylo)*plot.h }
	// Grid and y ticks.
	for _, t := range yticks {
		if t.At < ylo-1e-9*(yhi-ylo) || t.At > yhi+1e-9*(yhi-ylo) {
			continue
		}
		y := py(t.At)
		w.setDraw(pdfColGrid, 0.4)
		w.pdf.Line(plot.x, y, plot.x+plot.w, y)
		w.textRight(plot.x-4, y+pdfChartTextSize*0.35, t.Label, fRegular, pdfChartTextSize, pdfColMuted)
	}
	if ylo < 0 && yhi > 0 {
		w.setDraw(pdfColAxis, 0.6)
		w.pdf.Line(plot.x, py(0), plot.x+plot.w, py(0))
	}
	// X ticks.
	w.setDraw(pdfColAxis, 0.6)
	w.pdf.Line(plot.x, plot.y+plot.h, plot.x+plot.w, plot.y+plot.h)
	w.pdf.Line(plot.x, plot.y, plot.x, plot.y+plot.h)
	lastRight := math.Inf(-1)
	for _, t := range xticks {
		if t.At < xlo-1e-9*(xhi-xlo) || t.At > xhi+1e-9*(xhi-xlo) {
			continue
		}
		x := px(t.At)
		w.setDraw(pdfColAxis, 0.5)
		w.pdf.Line(x, plot.y+plot.h, x, plot.y+plot.h+3)
		s := pdfClean(t.Label, fRegular)
		lw := pdfStrWidth(s, fRegular, pdfChartTextSize)
		if x-lw/2 > lastRight+3 {
			w.textCenter(x, plot.y+plot.h+4+pdfChartTextSize, s, fRegular, pdfChartTextSize, pdfColMuted)
			lastRight = x + lw/2
		}
	}
	if c.XLabel != "" {
		w.textCenter(plot.x+plot.w/2, plot.y+plot.h+16+pdfChartTextSize, c.XLabel, fItalic, pdfChartTextSize, pdfColMuted)
	}
	if c.YLabel != "" {
		w.text(a.x, a.y+pdfChartTextSize+1, c.YLabel, fItalic, pdfChartTextSize, pdfColMuted)
	}
	// The data, clipped to the plot.
	w.pdf.ClipRect(plot.x, plot.y-1, plot.w, plot.h+2, false)
	if bars {
		n := float64(len(c.Series))
		bw := barW * 0.8 / n
		for si, s := range c.Series {
			st := pdfSeriesStyles[si%len(pdfSeriesStyles)]
			w.setFill(st.c)
			for k := range s.X {
				if k >= len(s.Y) || !pdfFinite(s.X[k]) || !pdfFinite(s.Y[k]) {
					continue
				}
				xc := s.X[k] - barW*0.4 + bw*float64(si)
				x0, x1 := px(xc), px(xc+bw)
				y0, y1 := py(0), py(s.Y[k])
				if y1 < y0 {
					y0, y1 = y1, y0
				}
				w.pdf.Rect(x0, y0, math.Max(x1-x0-0.5, 0.5), math.Max(y1-y0, 0.3), "F")
			}
		}
	} else {
		for si, s := range c.Series {
			st := pdfSeriesStyles[si%len(pdfSeriesStyles)]
			w.setDraw(st.c, 1.3)
			w.pdf.SetDashPattern(st.dash, 0)
			var pts []fpdf.PointType
			flush := func() {
				if len(pts) > 1 {
					w.polyline(pts)
				}
				pts = pts[:0]
			}
			for k := range s.X {
				if k >= len(s.Y) || !pdfFinite(s.X[k]) || !pdfFinite(s.Y[k]) {
					flush() // a gap where the curve is undefined
					continue
				}
				pts = append(pts, fpdf.PointType{X: px(s.X[k]), Y: py(s.Y[k])})
			}
			flush()
			w.pdf.SetDashPattern(nil, 0)
		}
	}
	w.pdf.ClipEnd()
	// Marks: reference lines first, then points, labels placed clear of
	// each other.
	// Labels keep clear of the curves: their points are obstacles.
	var taken []pdfRect
	if !bars {
		for _, s := range c.Series {
			for k := range s.X {
				if k < len(s.Y) && pdfFinite(s.X[k]) && pdfFinite(s.Y[k]) {
					taken = append(taken, pdfRect{px(s.X[k]) - 1, py(s.Y[k]) - 1, 2, 2})
				}
				if k > 0 && k < len(s.Y) && pdfFinite(s.Y[k]) && pdfFinite(s.Y[k-1]) && pdfFinite(s.X[k-1]) {
					// a steep segment: points along it as well
					x0, y0, x1, y1 := px(s.X[k-1]), py(s.Y[k-1]), px(s.X[k]), py(s.Y[k])
					steps := int(math.Hypot(x1-x0, y1-y0) / 3)
					for j := 1; j < steps && j < 200; j++ {
						f := float64(j) / float64(steps)
						taken = append(taken, pdfRect{x0 + (x1-x0)*f - 1, y0 + (y1-y0)*f - 1, 2, 2})
					}
				}
			}
		}
	}
	placeLabel := func(s string, x, y float64, prefs [][2]float64) {
		s = pdfClean(s, fRegular)
		lw := pdfStrWidth(s, fRegular, pdfChartTextSize)
		lh := pdfChartTextSize + 2
		for _, p := range prefs {
			r := pdfRect{x - lw/2, y + p[1]*lh - lh/2, lw, lh}
			if p[0] < 0 {
				r.x = x - lw - 4
			} else if p[0] > 0 {
				r.x = x + 4
			}
			if r.x < plot.x+1 || r.x+r.w > plot.x+plot.w-1 || r.y < plot.y || r.y+r.h > plot.y+plot.h {
				continue
			}
			clash := false
			for _, t := range taken {
				if r.overlaps(t) {
					clash = true
					break
				}
			}
			if clash {
				continue
			}
			taken = append(taken, r)
			w.text(r.x, r.y+pdfChartTextSize, s, fRegular, pdfChartTextSize, pdfColText)
			return
		}
	}
	for _, m := range c.Marks {
		switch {
		case m.HasX && !m.HasY && pdfFinite(m.X):
			x := px(m.X)
			taken = append(taken, pdfRect{x - 1.5, plot.y + pdfChartTextSize + 6, 3, plot.h})
			w.setDraw(pdfColMuted, 0.5)
			w.pdf.SetDashPattern([]float64{2, 2}, 0)
			w.pdf.Line(x, plot.y, x, plot.y+plot.h)
			w.pdf.SetDashPattern(nil, 0)
		case m.HasY && !m.HasX && pdfFinite(m.Y):
			y := py(m.Y)
			taken = append(taken, pdfRect{plot.x, y - 1.5, plot.w * 0.7, 3})
			w.setDraw(pdfColMuted, 0.5)
			w.pdf.SetDashPattern([]float64{2, 2}, 0)
			w.pdf.Line(plot.x, y, plot.x+plot.w, y)
			w.pdf.SetDashPattern(nil, 0)
		}
	}
	for _, m := range c.Marks {
		if m.HasX && m.HasY && pdfFinite(m.X) && pdfFinite(m.Y) {
			x, y := px(m.X), py(m.Y)
			col := pdfColText
			if m.Series >= 0 && m.Series < len(c.Series) && m.Kind != "" {
				col = pdfSeriesStyles[m.Series%len(pdfSeriesStyles)].c
			}
			w.setDraw(col, 0.9)
			w.setFill(pdfRgb{255, 255, 255})
			w.pdf.Circle(x, y, 2.4, "FD")
			taken = append(taken, pdfRect{x - 3, y - 3, 6, 6})
		}
	}
	for _, m := range c.Marks {
		if m.Label == "" {
			continue
		}
		switch {
		case m.HasX && m.HasY && pdfFinite(m.X) && pdfFinite(m.Y):
			placeLabel(m.Label, px(m.X), py(m.Y), [][2]float64{{1, -1}, {-1, -1}, {1, 1}, {-1, 1}, {1, -2}, {-1, -2}, {1, 2}, {-1, 2}, {0, -2}, {0, 2}, {1, -3}, {-1, 3}})
		case m.HasX && pdfFinite(m.X):
			x := px(m.X)
			var prefs [][2]float64
			for k := 0; k < 8; k++ {
				prefs = append(prefs, [2]float64{1, float64(k)}, [2]float64{-1, float64(k)})
			}
			placeLabel(m.Label, x, plot.y+6, prefs)
		case m.HasY && pdfFinite(m.Y):
			y := py(m.Y)
			placeLabel(m.Label, plot.x+plot.w-2, y, [][2]float64{{-1, -1}, {-1, 1}, {-1, -2}, {-1, 2}})
		}
	}
	// The legend.
	if legendH > 0 {
		ly := a.y + a.h - legendH + 4
		for _, row := range w.legendRows(c, a.w-plot.x+a.x) {
			x := plot.x
			for _, i := range row {
				st := pdfSeriesStyles[i%len(pdfSeriesStyles)]
				if bars {
					w.setFill(st.c)
					w.pdf.Rect(x, ly+1.5, 14, 6, "F")
				} else {
					w.setDraw(st.c, 1.5)
					w.pdf.SetDashPattern(st.dash, 0)
					w.pdf.Line(x, ly+4.5, x+18, ly+4.5)
					w.pdf.SetDashPattern(nil, 0)
				}
				name := pdfClean(c.Series[i].Name, fRegular)
				w.text(x+22, ly+7.5, name, fRegular, pdfChartTextSize, pdfColText)
				x += 22 + pdfStrWidth(name, fRegular, pdfChartTextSize) + 14
			}
			ly += 11
		}
	}
}

// polyline strokes an open path through pts.
func (w *pdfWriter) polyline(pts []fpdf.PointType) {
	w.pdf.MoveTo(pts[0].X, pts[0].Y)
	for _, p := range pts[1:] {
		w.pdf.LineTo(p.X, p.Y)
	}
	w.pdf.DrawPath("D")
}
