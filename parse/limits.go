package parse

import (
	"bytes"
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Limits bound what one memo may ask of the machine, so that a memo passed
// around by hand (or made by a program gone wrong) can never make worth
// hang or run out of memory. A zero field means its default. They are the
// concern of whoever runs worth, not of the memo: a memo cannot raise its
// own limits; `--limit NAME=N` on the command line does (README.md,
// "Limits"). parse checks the first four; compute the last two; the
// command line the size of the files a memo reads.
type Limits struct {
	MemoBytes    int // size of the memo file
	Blocks       int // worth blocks in the memo
	Alternatives int // alternative blocks in the memo
	Lines        int // money lines of one alternative, CSV rows included
	FileBytes    int // size of one file the memo reads (a CSV)
	// ScheduleYears bounds the year-by-year rows of every comparison
	// together: alternatives times (horizon years + 1), a perpetual
	// horizon counting its displayed years. It bounds the size of the
	// reports.
	ScheduleYears int
	// LineYears bounds the work of one comparison: each member's money
	// lines times its years (1,000 on a perpetual horizon, for payback).
	LineYears int
	// RiskValues bounds the present worths a risk block keeps (trials ×
	// alternatives), RiskWork the amounts it evaluates (trials × amounts
	// that depend on a draw).
	RiskValues, RiskWork int
	// WhatIfRows bounds the recomputations of scenarios and sensitivity
	// blocks times the rows of the memo's schedules.
	WhatIfRows int
}

// LimitInfo describes one limit for the --limit flag and the docs.
type LimitInfo struct {
	Name    string // as given to --limit
	Default int
	Bytes   bool // a size: accepts KiB and MiB
	What    string
	field   func(*Limits) *int
}

// LimitTable lists every limit the command line can raise, with its
// default.
var LimitTable = []LimitInfo{
	{"memo-size", 4 << 20, true, "size of the memo file", func(l *Limits) *int { return &l.MemoBytes }},
	{"blocks", 20000, false, "worth blocks in one memo", func(l *Limits) *int { return &l.Blocks }},
	{"alternatives", 10000, false, "alternative blocks in one memo", func(l *Limits) *int { return &l.Alternatives }},
	{"lines", 10000, false, "money lines of one alternative, CSV rows included", func(l *Limits) *int { return &l.Lines }},
	{"file-size", 1 << 20, true, "size of a CSV file a memo reads", func(l *Limits) *int { return &l.FileBytes }},
	{"schedule-years", 1000000, false, "alternatives × (horizon years + 1), every comparison together", func(l *Limits) *int { return &l.ScheduleYears }},
	{"line-years", 500000000, false, "money lines × horizon years of one comparison", func(l *Limits) *int { return &l.LineYears }},
	{"risk-values", 20000000, false, "trials × alternatives of one risk block", func(l *Limits) *int { return &l.RiskValues }},
	{"risk-work", 2000000000, false, "trials × amounts drawn of one risk block", func(l *Limits) *int { return &l.RiskWork }},
	{"what-if-rows", 20000000, false, "recomputations of scenarios and sensitivities × schedule rows", func(l *Limits) *int { return &l.WhatIfRows }},
}

// WithDefaults returns l with every zero field set to its default.
func (l Limits) WithDefaults() Limits {
	for _, li := range LimitTable {
		if p := li.field(&l); *p <= 0 {
			*p = li.Default
		}
	}
	return l
}

// Set reads "NAME=N" (N may end in KiB or MiB for a size, and may use
// thousands separators or k/M) into l. It is the --limit flag's setter.
func (l *Limits) Set(s string) error {
	name, val, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok {
		return fmt.Errorf("expected NAME=N, e.g. alternatives=20000; names: %s", limitNames())
	}
	for _, li := range LimitTable {
		if li.Name != name {
			continue
		}
		n, err := limitValue(strings.TrimSpace(val), li.Bytes)
		if err != nil {
			return fmt.Errorf("%s: %v", name, err)
		}
		*li.field(l) = n
		return nil
	}
	return fmt.Errorf("unknown limit %q; names: %s", name, limitNames())
}

// String lists the limits set, for the flag package.
func (l *Limits) String() string {
	if l == nil {
		return ""
	}
	var parts []string
	for _, li := range LimitTable {
		if v := *li.field(l); v > 0 {
			parts = append(parts, fmt.Sprintf("%s=%d", li.Name, v))
		}
	}
	return strings.Join(parts, ",")
}

func limitNames() string {
	var names []string
	for _, li := range LimitTable {
		names = append(names, li.Name)
	}
	return strings.Join(names, ", ")
}

func limitValue(s string, size bool) (int, error) {
	mult := 1
	if size {
		for _, u := range []struct {
			suffix string
			m      int
		}{{"KiB", 1 << 10}, {"MiB", 1 << 20}, {"GiB", 1 << 30}, {"KB", 1000}, {"MB", 1000000}} {
			if strings.HasSuffix(s, u.suffix) {
				s, mult = strings.TrimSpace(strings.TrimSuffix(s, u.suffix)), u.m
				break
			}
		}
	}
	switch {
	case strings.HasSuffix(s, "k"):
		s, mult = strings.TrimSuffix(s, "k"), mult*1000
	case strings.HasSuffix(s, "M"):
		s, mult = strings.TrimSuffix(s, "M"), mult*1000000
	}
	n, err := strconv.ParseFloat(strings.ReplaceAll(s, ",", ""), 64)
	if err != nil || n < 1 || n*float64(mult) > 1<<50 {
		return 0, fmt.Errorf("expected a positive whole number, got %q", s)
	}
	return int(n * float64(mult)), nil
}

// LimitHint is the end of a limit's error message: how to raise it.
func LimitHint(name string, n int) string {
	return fmt.Sprintf("(raise it with --limit %s=%s)", name, SizeOrCount(name, 2*n))
}

// SizeOrCount writes a limit's value as the --limit flag reads it: 8MiB,
// 10000.
func SizeOrCount(name string, n int) string {
	for _, li := range LimitTable {
		if li.Name == name && li.Bytes {
			if n >= 1<<20 && n%(1<<20) == 0 {
				return fmt.Sprintf("%dMiB", n>>20)
			}
			if n >= 1<<10 && n%(1<<10) == 0 {
				return fmt.Sprintf("%dKiB", n>>10)
			}
			return strconv.Itoa(n)
		}
	}
	return strconv.Itoa(n)
}

// Thousands writes n with thousands separators: 10,000.
func Thousands(n int) string {
	s := strconv.Itoa(n)
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	var b strings.Builder
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	if neg {
		return "-" + b.String()
	}
	return b.String()
}

// checkSource reports a memo that is too large or is not UTF-8 text, at
// the offending byte. It returns false when the memo should not be read
// further (a binary file would only give pages of nonsense errors).
func (p *parser) checkSource(src []byte) bool {
	lim := p.limits
	if len(src) > lim.MemoBytes {
		p.errorf(Pos{File: p.memo.File, Line: 1, Col: 1}, "the memo is larger than %s, the most worth reads %s",
			humanBytes(lim.MemoBytes), LimitHint("memo-size", lim.MemoBytes))
		return false
	}
	if bytes.HasPrefix(src, []byte{0xff, 0xfe}) || bytes.HasPrefix(src, []byte{0xfe, 0xff}) {
		p.errorf(Pos{File: p.memo.File, Line: 1, Col: 1}, "the memo is in UTF-16; save it as UTF-8")
		return false
	}
	if i := bytes.IndexByte(src, 0); i >= 0 {
		p.errorf(p.idx.pos(i), "the memo holds a NUL byte, so it is not a text file; a memo is UTF-8 Markdown")
		return false
	}
	if !utf8.Valid(src) {
		i := 0
		for i < len(src) {
			r, n := utf8.DecodeRune(src[i:])
			if r == utf8.RuneError && n <= 1 {
				break
			}
			i += n
		}
		p.errorf(p.idx.pos(i), "the memo is not valid UTF-8 here (byte 0x%02x); save it as UTF-8", src[i])
		return false
	}
	return true
}

// countBlock counts a worth block against the limits and reports false
// (once, at the first block past a limit) when it is past one.
func (p *parser) countBlock(kind string, pos Pos) bool {
	p.blocks++
	if kind == "alternative" {
		p.alts++
	}
	switch {
	case p.blocks > p.limits.Blocks:
		if !p.overBlocks {
			p.errorf(pos, "the memo has more than %s worth blocks, the most worth reads in one memo %s; the blocks from here on are not read",
				Thousands(p.limits.Blocks), LimitHint("blocks", p.limits.Blocks))
			p.overBlocks = true
		}
		return false
	case kind == "alternative" && p.alts > p.limits.Alternatives:
		if !p.overAlts {
			p.errorf(pos, "the memo has more than %s alternatives, the most worth reads in one memo %s; the alternatives from here on are not read",
				Thousands(p.limits.Alternatives), LimitHint("alternatives", p.limits.Alternatives))
			p.overAlts = true
		}
		return false
	}
	return true
}

// tooManyLines reports an alternative with more money lines than the
// limit, at the first line past it, and keeps the lines within it.
func (p *parser) tooManyLines(a *Alternative) {
	if n := p.limits.Lines; len(a.Lines) > n {
		p.errorf(a.Lines[n].Pos, "alternative %s has more than %s money lines (CSV rows included), the most worth reads for one alternative %s; add up amounts of the same year",
			a.ID, Thousands(n), LimitHint("lines", n))
		a.Lines = a.Lines[:n]
	}
}

// csvIsText reports a CSV file that is not UTF-8 text (an image or a
// spreadsheet saved in its own format), at its first offending byte.
func (p *parser) csvIsText(name string, data []byte) bool {
	at := func(i int) Pos {
		line := 1 + bytes.Count(data[:i], []byte("\n"))
		col := 1 + utf8.RuneCount(data[bytes.LastIndexByte(data[:i], '\n')+1:i])
		return Pos{File: name, Line: line, Col: col}
	}
	if bytes.HasPrefix(data, []byte{0xff, 0xfe}) || bytes.HasPrefix(data, []byte{0xfe, 0xff}) {
		p.errorf(Pos{File: name, Line: 1, Col: 1}, "the CSV is in UTF-16; save it as UTF-8 (comma-separated)")
		return false
	}
	if i := bytes.IndexByte(data, 0); i >= 0 {
		p.errorf(at(i), "the file holds a NUL byte, so it is not a CSV text file (a spreadsheet or an image?); save it as CSV")
		return false
	}
	if !utf8.Valid(data) {
		i := 0
		for i < len(data) {
			r, n := utf8.DecodeRune(data[i:])
			if r == utf8.RuneError && n <= 1 {
				break
			}
			i += n
		}
		p.errorf(at(i), "the CSV is not valid UTF-8 here (byte 0x%02x); save it as UTF-8", data[i])
		return false
	}
	return true
}

// humanBytes writes a size for a reader: 4 MiB, 512 KiB, 700 bytes.
func humanBytes(n int) string {
	switch {
	case n >= 1<<20 && n%(1<<20) == 0:
		return fmt.Sprintf("%d MiB", n>>20)
	case n >= 1<<10 && n%(1<<10) == 0:
		return fmt.Sprintf("%d KiB", n>>10)
	}
	return fmt.Sprintf("%d bytes", n)
}
