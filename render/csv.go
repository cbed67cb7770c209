package render

import (
	"bytes"
	"encoding/csv"
	"path/filepath"
	"strconv"
	"strings"

	"worth/compute"
)

// CSVHeader is the header row of the CSV export.
var CSVHeader = []string{
	"comparison", "rate", "horizon", "alternative", "name", "year",
	"costs", "benefits", "net", "discounted", "cumulative", "cumulative_discounted",
	"first_costs", "other_costs", "disbenefits", "other_benefits", "salvage_and_residual", "events",
}

// CSV writes every alternative's year-by-year schedule under each
// comparison as one CSV table, for spreadsheets: one row per comparison,
// alternative and year. Amounts are signed (costs negative, benefits and
// recovered value positive) and unrounded, as in the JSON output; costs is
// the sum of first costs, other costs and disbenefits, benefits the sum of
// benefits and salvage or residual value, and net = costs + benefits. The
// category columns split them again. On a perpetual horizon the rows are
// the first life cycle (the horizon column says so). rate is the effective
// annual rate as a fraction.
func CSV(rep *compute.Report) []byte {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(CSVHeader)
	for _, c := range rep.Comparisons {
		horizon := csvHorizon(c)
		for _, r := range c.Results {
			h := horizon
			if r.FlowsNote != "" {
				h += "; " + r.FlowsNote
			}
			for _, y := range r.Flows {
				inv := y.ByCategory[compute.Investment]
				op := y.ByCategory[compute.Operating]
				dis := y.ByCategory[compute.Disbenefits]
				ben := y.ByCategory[compute.Benefits]
				rec := y.ByCategory[compute.Recovery]
				_ = w.Write([]string{
					c.ID, csvNum(c.Rate.Effective), h, r.Alt.ID, r.Alt.Name, strconv.Itoa(y.Year),
					csvNum(-(inv + op + dis)), csvNum(ben + rec), csvNum(y.Net), csvNum(y.Discounted), csvNum(y.Cumulative), csvNum(y.CumDiscounted),
					csvNum(-inv), csvNum(-op), csvNum(-dis), csvNum(ben), csvNum(rec), strings.Join(y.Notes, "; "),
				})
			}
		}
	}
	w.Flush()
	return buf.Bytes()
}

// csvHorizon names a comparison's horizon in words a spreadsheet reader
// can filter on: "perpetual", "study period 25", "repeat lives 60".
func csvHorizon(c *compute.Comparison) string {
	if c.Horizon.Perpetual() {
		return "perpetual"
	}
	return c.Horizon.Kind + " " + strconv.Itoa(c.Horizon.Years)
}

// csvNum writes a number as the shortest decimal that reads back to it, with
// no negative zero.
func csvNum(x float64) string {
	if x == 0 {
		return "0"
	}
	return strconv.FormatFloat(x, 'f', -1, 64)
}

// ItemLine is where an alternative's line comes from, for the inputs
// tables: its line in the memo ("23"), or the CSV file and line of a row
// read with "cash flows from:" ("retrofit.csv:5").
func ItemLine(it *compute.Item) string {
	if it.File != "" {
		return filepath.Base(it.File) + ":" + strconv.Itoa(it.Line)
	}
	return strconv.Itoa(it.Line)
}
