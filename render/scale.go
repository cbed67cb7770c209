package render

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/go-pdf/fpdf"

	"worth/compute"
)

// Comparisons of many alternatives (issue 7, speed at scale). A results
// table with a column per alternative cannot be read past a handful of
// them (a tender of 1,000 offers made 1,000 columns), and a chart of 1,000
// curves with a legend of 1,000 names shows nothing. Beyond manySeries
// alternatives:
//
//   - the results table is turned: one row an alternative, in the order of
//     present worth (best first), with its rank, and the measures as
//     columns; the recommended alternative's row is set in bold. HTML, PDF
//     and Markdown alike.
//   - the present-worth-versus-rate and payback charts draw the leaders
//     only: the manySeries alternatives of highest present worth (the
//     recommendation and the runner-up always among them), with a note
//     saying so; the results table lists every one.
//
// Up to manySeries alternatives nothing changes.

// byAlternative reports whether a comparison's results table is laid out
// one row an alternative.
func byAlternative(c *compute.Comparison) bool { return len(c.Results) > manySeries }

// rankedResults returns the indexes into c.Results in the order of
// c.Ranking (best first by present worth).
func rankedResults(c *compute.Comparison) []int {
	at := make(map[string]int, len(c.Results))
	for k, r := range c.Results {
		at[r.Alt.ID] = k
	}
	order := make([]int, 0, len(c.Results))
	seen := make([]bool, len(c.Results))
	for _, id := range c.Ranking {
		if k, ok := at[id]; ok && !seen[k] {
			order = append(order, k)
			seen[k] = true
		}
	}
	for k := range c.Results {
		if !seen[k] {
			order = append(order, k)
		}
	}
	return order
}

// rankWords says what the rows of a turned results table are ordered by.
func rankWords(c *compute.Comparison) string {
	word := "present worth"
	if c.Horizon.Perpetual() {
		word = "capitalized worth"
	}
	if c.CostOnly {
		word = "present cost"
		if c.Horizon.Perpetual() {
			word = "capitalized cost"
		}
		return fmt.Sprintf("One row an alternative, in order of %s, least first.", word)
	}
	return fmt.Sprintf("One row an alternative, in order of %s, best first.", word)
}

// turnResults lays a results table out one row an alternative: header
// "Rank", "Alternative" and the measures; rows in the order of present
// worth. rows are the table as ResultsTable makes it (a row a measure: its
// label, then a cell per alternative in c.Results order). order gives, for
// each new row, the index of its alternative in c.Results.
func turnResults(c *compute.Comparison, rows [][]string) (header []string, out [][]string, order []int) {
	header = []string{"Rank", "Alternative"}
	for _, row := range rows {
		header = append(header, row[0])
	}
	order = rankedResults(c)
	out = make([][]string, len(order))
	for n, k := range order {
		cells := make([]string, 0, 2+len(rows))
		cells = append(cells, strconv.Itoa(n+1), c.Results[k].Alt.Name)
		for _, row := range rows {
			cell := ""
			if k+1 < len(row) {
				cell = row[k+1]
			}
			cells = append(cells, cell)
		}
		out[n] = cells
	}
	return header, out, order
}

// resultsTable turns a comparison's results table (built and traced by
// compare) one row an alternative where it has more than manySeries
// alternatives, carrying each figure's trace with it; else it returns t as
// it is.
func (b *builder) resultsTable(t Table, c *compute.Comparison) Table {
	if !byAlternative(c) {
		return t
	}
	header, rows, order := turnResults(c, t.Rows)
	out := Table{
		Caption: t.Caption,
		Header:  header,
		Rows:    rows,
		Align:   []byte{'r', 'l'},
		Note:    t.Note + " " + rankWords(c),
		Source:  t.Source,
	}
	for range t.Rows {
		out.Align = append(out.Align, 'r')
	}
	out.BoldRows = make([]bool, len(rows))
	out.Trace = make([][]Trace, len(rows))
	for n, k := range order {
		out.BoldRows[n] = c.Results[k].Alt.ID == c.Recommended
		tr := make([]Trace, len(header))
		for m := range t.Rows {
			if m < len(t.Trace) && k+1 < len(t.Trace[m]) {
				tr[2+m] = t.Trace[m][k+1]
			}
		}
		out.Trace[n] = tr
	}
	return out
}

// chartResults are the alternatives a comparison's charts draw: every one
// up to manySeries, else the manySeries of highest present worth, the
// recommended alternative and the runner-up always among them, best first.
func chartResults(c *compute.Comparison) []*compute.Result {
	if len(c.Results) <= manySeries {
		return c.Results
	}
	order := rankedResults(c)
	var out []*compute.Result
	must := 0
	for _, k := range order {
		if leading(c, c.Results[k].Alt.ID) {
			must++
		}
	}
	for _, k := range order {
		r := c.Results[k]
		lead := leading(c, r.Alt.ID)
		if lead {
			must--
		}
		// Keep room for the leaders still to come.
		if lead || len(out)+must < manySeries {
			out = append(out, r)
		}
		if len(out) == manySeries {
			break
		}
	}
	return out
}

// chartCurves is c.Curves() for the alternatives the charts draw.
func chartCurves(c *compute.Comparison) ([]compute.Curve, []compute.Crossover) {
	if len(c.Results) <= manySeries {
		return c.Curves()
	}
	var ids []string
	for _, r := range chartResults(c) {
		ids = append(ids, r.Alt.ID)
	}
	return c.CurvesOf(ids)
}

// leadersNote is the note under a chart that draws the leaders only ("" when
// it draws every alternative).
func leadersNote(c *compute.Comparison) string {
	if len(c.Results) <= manySeries {
		return ""
	}
	word := "highest present worth"
	if c.CostOnly {
		word = "lowest present cost"
	}
	return fmt.Sprintf("Only the %s alternatives of %s, of the %s compared, are drawn; the results table lists them all.", smallNumber(manySeries), word, group(strconv.Itoa(len(c.Results))))
}

// smallNumber writes a count below ten in words, as prose does.
func smallNumber(n int) string {
	if n >= 0 && n < 10 {
		return [...]string{"no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine"}[n]
	}
	return strconv.Itoa(n)
}

// noteLeaders says under a chart of a comparison of many alternatives, and
// in its text alternative, that it draws the leaders only.
func noteLeaders(ch *Chart, c *compute.Comparison) {
	if n := leadersNote(c); n != "" {
		ch.Notes = append(ch.Notes, n)
		ch.Alt += " " + n
	}
}

// mdResultsTable writes a comparison's results table in Markdown: as
// built (a row a measure) up to manySeries alternatives, else one row an
// alternative in the order of present worth, followed by a line that says
// so.
func mdResultsTable(b *strings.Builder, c *compute.Comparison, header []string, cells [][]string, right []bool) {
	if !byAlternative(c) {
		table(b, header, cells, right)
		return
	}
	header, rows, _ := turnResults(c, cells)
	right = []bool{true, false}
	for range cells {
		right = append(right, true)
	}
	table(b, header, rows, right)
	fmt.Fprintf(b, "\n%s\n", rankWords(c))
}

// pdfOutput closes the PDF and returns its bytes. fpdf writes the whole
// file from its own buffer in one Write; the bytes are taken as they are
// rather than copied into a second buffer (for 1,000 alternatives, an 11
// MB copy at the moment every page is still held), since fpdf writes
// nothing more to its buffer after Output.
func pdfOutput(p *fpdf.Fpdf) ([]byte, error) {
	var out takeBytes
	if err := p.Output(&out); err != nil {
		return nil, fmt.Errorf("pdf: %v", err)
	}
	return out.b, nil
}

// takeBytes is a writer that keeps what it is given: the first slice as
// it is, later ones appended.
type takeBytes struct{ b []byte }

func (t *takeBytes) Write(p []byte) (int, error) {
	if t.b == nil {
		t.b = p
	} else {
		t.b = append(t.b[:len(t.b):len(t.b)], p...) // a copy, never into fpdf's buffer
	}
	return len(p), nil
}

// traceBytes estimates what a table's traces add to its HTML: each traced
// cell's title and link, and the "Source: ..." title of the other figures
// of a table with a source (cellTrace). The HTML writer sizes its buffers
// with it (sizeHint, tableHTML): without it they fell short by a third for
// a memo of many alternatives, whose schedules are traced cell by cell,
// and grew by copying.
func traceBytes(t Table) int {
	n := 0
	for r, row := range t.Rows {
		for i, c := range row {
			switch {
			case r < len(t.Trace) && i < len(t.Trace[r]) && t.Trace[r][i].Title != "":
				// ` title="…"`, and `<a class="trace" href="…">…</a>`
				tr := t.Trace[r][i]
				n += len(tr.Title) + 9
				if tr.Href != "" {
					n += len(tr.Href) + 28
				}
			case t.Source != "" && i < len(t.Align) && t.Align[i] == 'r' && c != "":
				n += len(t.Source) + 17 // ` title="Source: …"`
			}
		}
		if r < len(t.RowIDs) {
			n += len(t.RowIDs[r]) + 8
		}
	}
	return n
}
