package main

import (
	"flag"
	"io"
	"os"

	"worth/parse"
)

// limitUsage is the help text of the --limit flag.
const limitUsage = "raise a limit, `NAME=N` (memo-size, blocks, alternatives, lines, file-size, schedule-years, line-years, risk-values, risk-work; see README.md, Limits); may be repeated"

// addLimitFlag registers --limit on a command's flags.
func addLimitFlag(fs *flag.FlagSet, l *parse.Limits) {
	fs.Var(l, "limit", limitUsage)
}

// readMemo reads a memo file, at most one byte more than the memo-size
// limit: parse reports a memo past the limit, and a huge file (or a
// device that never ends) is never read whole.
func readMemo(path string, lim parse.Limits) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(io.LimitReader(f, int64(lim.WithDefaults().MemoBytes)+1))
}
