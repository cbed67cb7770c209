package parse

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"worth/expr"
)

// Files a memo reads.
//
// An alternative may take cash flows prepared elsewhere from a CSV file:
//
//	cash flows from: data/flows.csv
//
// parse reads no files itself: the caller passes a Resolver that reads the
// file named (and decides which files may be read), and the CSV's rows are
// turned into ordinary money lines of the alternative, positioned in the
// CSV file, so that the compute stage treats them exactly like lines
// written in the memo and reports their errors at the CSV's own lines.

// Resolver reads a file a memo names, the path as written (relative to the
// memo's folder). It returns the name to show in positions (e.g. the path
// joined to the memo's folder) and the file's bytes, or an error that says
// why the file may not or cannot be read.
type Resolver func(path string) (name string, data []byte, err error)

// Options change how a memo is parsed.
type Options struct {
	// Resolve reads the files the memo names; nil: a memo that names a
	// file is an error.
	Resolve Resolver
	// Limits bound the memo (limits.go); zero fields take the defaults.
	Limits Limits
}

// Include is a file a memo read: where it is named, and the name the
// resolver gave it ("" when it could not be read).
type Include struct {
	Path Text   // as written in the memo
	Name string // as returned by the resolver
	Alt  string // the alternative that reads it
}

// The columns a cash-flow CSV may have. year and amount are required.
var csvColumns = []string{"year", "amount", "kind", "note"}

// csvKinds are the values of a kind column.
var csvKinds = map[string]Sign{"cost": Cost, "benefit": Benefit, "disbenefit": Disbenefit, "salvage": Benefit,
	"costs": Cost, "benefits": Benefit, "disbenefits": Disbenefit}

// cashFlowsFrom reads the CSV file named on a "cash flows from:" line of
// alternative a and returns its rows as money lines.
func (p *parser) cashFlowsFrom(a *Alternative, val Text) []*FlowLine {
	path := strings.TrimSpace(val.Src)
	if len(path) >= 2 && (path[0] == '"' || path[0] == '\'') && path[len(path)-1] == path[0] {
		path = path[1 : len(path)-1]
	}
	inc := &Include{Path: Text{Src: path, Pos: val.Pos}, Alt: a.ID}
	p.memo.Includes = append(p.memo.Includes, inc)
	if p.opt.Resolve == nil {
		p.errorf(val.Pos, "cannot read cash flows from %q: this memo is read without access to files", path)
		return nil
	}
	name, data, err := p.opt.Resolve(path)
	if err != nil {
		p.errorf(val.Pos, "cannot read cash flows from %q: %v", path, err)
		return nil
	}
	inc.Name = name
	return p.readCSVFlows(name, data)
}

// readCSVFlows turns a cash-flow CSV into money lines. The first row is a
// header naming the columns: year and amount, and optionally kind (cost,
// benefit, disbenefit or salvage; amounts then positive) and note (a label
// shown with the amount). Without a kind column a negative amount is a
// cost and a positive one a benefit. A row at year 0 that is a cost is the
// first cost (an investment); a salvage row must fall at the end of the
// life (checked with the life, in compute). Lines starting with # are
// comments.
func (p *parser) readCSVFlows(name string, data []byte) []*FlowLine {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if !p.csvIsText(name, data) { // limits.go
		return nil
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.Comment = '#'
	r.TrimLeadingSpace = true
	at := func(line, col int) Pos { return Pos{File: name, Line: line, Col: col} }
	// col maps a column name to its index in each row.
	col := map[string]int{}
	header := false
	var lines []*FlowLine
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			switch {
			case errors.As(err, &pe) && errors.Is(pe.Err, csv.ErrQuote):
				p.errorf(at(pe.StartLine, 1), "cannot read the CSV: a quote opened in this row is never closed")
			case errors.As(err, &pe):
				p.errorf(at(pe.Line, pe.Column), "cannot read the CSV: %v", pe.Err)
			default:
				p.errorf(at(1, 0), "cannot read the CSV: %v", err)
			}
			return nil
		}
		if !header {
			header = true
			if !p.csvHeader(r, rec, col, at) {
				return nil
			}
			continue
		}
		if fl := p.csvRow(r, rec, col, at); fl != nil {
			lines = append(lines, fl)
		}
	}
	if !header {
		p.errorf(at(1, 1), "the CSV is empty; expected a header row \"year,amount\" and a row for each amount")
	}
	return lines
}

// csvHeader reads the header row into col, reporting what is wrong.
func (p *parser) csvHeader(r *csv.Reader, rec []string, col map[string]int, at func(line, col int) Pos) bool {
	ok := true
	for i, h := range rec {
		name := strings.ToLower(strings.TrimSpace(h))
		line, c := r.FieldPos(i)
		switch {
		case name == "":
			p.errorf(at(line, c), "column %d of the header has no name; expected year, amount and optionally kind and note", i+1)
			ok = false
		case !contains(csvColumns, name):
			msg := fmt.Sprintf("unknown column %q in the header; expected year, amount and optionally kind and note", strings.TrimSpace(h))
			if _, isNum := expr.ParseNumber(name); isNum {
				msg = fmt.Sprintf("the first row must be a header naming the columns, e.g. \"year,amount\"; got %q", strings.Join(rec, ","))
				p.errorf(at(line, 1), "%s", msg)
				return false
			}
			if s := expr.Closest(name, csvColumns); s != "" {
				msg += fmt.Sprintf("; did you mean %q?", s)
			}
			if strings.ContainsAny(h, ";\t") {
				msg += "; columns are separated by commas"
			}
			p.errorf(at(line, c), "%s", msg)
			ok = false
		default:
			if _, dup := col[name]; dup {
				p.errorf(at(line, c), "column %q is named twice in the header", name)
				ok = false
			}
			col[name] = i
		}
	}
	if !ok {
		return false
	}
	line, _ := r.FieldPos(0)
	for _, need := range []string{"year", "amount"} {
		if _, has := col[need]; !has {
			p.errorf(at(line, 1), "the header has no %s column; expected e.g. \"year,amount\" (costs negative) or \"year,amount,kind\"", need)
			ok = false
		}
	}
	return ok
}

// csvRow turns one row into a money line, or reports why it cannot.
func (p *parser) csvRow(r *csv.Reader, rec []string, col map[string]int, at func(line, col int) Pos) *FlowLine {
	line, _ := r.FieldPos(0)
	cell := func(name string) (Text, bool) {
		i, ok := col[name]
		if !ok {
			return Text{}, false
		}
		if i >= len(rec) {
			return Text{Pos: at(line, 1)}, true
		}
		l, c := r.FieldPos(i)
		return Text{Src: strings.TrimSpace(rec[i]), Pos: at(l, c)}, true
	}
	yr, _ := cell("year")
	amt, _ := cell("amount")
	kind, hasKind := cell("kind")
	note, _ := cell("note")
	ok := true
	if yr.Src == "" {
		p.errorf(yr.Pos, "the year is missing")
		ok = false
	} else if y, good := expr.ParseNumber(yr.Src); !good || y != math.Trunc(y) || y < 0 {
		p.errorf(yr.Pos, "the year must be a whole number of years from 0, got %q", yr.Src)
		ok = false
	}
	var sign Sign
	salvage := false
	if hasKind {
		k := strings.ToLower(kind.Src)
		s, known := csvKinds[k]
		switch {
		case kind.Src == "":
			p.errorf(kind.Pos, "the kind is missing; expected cost, benefit, disbenefit or salvage")
			ok = false
		case !known:
			msg := fmt.Sprintf("unknown kind %q; expected cost, benefit, disbenefit or salvage", kind.Src)
			if c := expr.Closest(k, []string{"cost", "benefit", "disbenefit", "salvage"}); c != "" {
				msg += fmt.Sprintf("; did you mean %q?", c)
			}
			p.errorf(kind.Pos, "%s", msg)
			ok = false
		}
		sign, salvage = s, k == "salvage"
	}
	if amt.Src == "" {
		p.errorf(amt.Pos, "the amount is missing")
		return nil
	}
	// An accounting negative, (1,200), is a minus sign.
	src, neg := amt.Src, false
	if strings.HasPrefix(src, "(") && strings.HasSuffix(src, ")") {
		src, neg = src[1:len(src)-1], true
	} else if strings.HasPrefix(src, "-") {
		src, neg = strings.TrimSpace(src[1:]), true
	}
	v, good := expr.ParseNumber(src)
	if !good || strings.HasPrefix(src, "-") || strings.HasPrefix(src, "+") && neg {
		p.errorf(amt.Pos, "the amount must be a number, e.g. -12500 or 12,500, got %q", amt.Src)
		return nil
	}
	if hasKind && neg {
		p.errorf(amt.Pos, "with a kind column, amounts are written as positive numbers and the kind says which way the money goes, got %s", amt.Src)
		return nil
	}
	if !ok {
		return nil
	}
	if !hasKind {
		if v == 0 {
			return nil
		}
		sign = Benefit
		if neg {
			sign = Cost
		}
	}
	// The amount's text without its sign, positioned where it starts.
	off := strings.Index(amt.Src, src)
	amount := Text{Src: strings.TrimPrefix(src, "+"), Pos: amt.Pos.Shift(len([]rune(amt.Src[:off])))}
	year := yr
	fl := &FlowLine{Line: line, Pos: at(line, 1), Sign: sign, Amount: amount}
	switch {
	case salvage:
		fl.Kind, fl.At = Salvage, &year
		fl.Label = "salvage at year " + yr.Src
	case sign == Cost && isZeroYear(yr.Src):
		fl.Kind = FirstCost
		fl.Label = "first cost"
	default:
		fl.Kind, fl.At = Once, &year
		fl.Label = sign.String() + " at year " + yr.Src
	}
	if note.Src != "" {
		fl.Label += " (" + note.Src + ")"
	}
	return fl
}

func isZeroYear(s string) bool {
	v, ok := expr.ParseNumber(s)
	return ok && v == 0
}
