package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"worth/parse"
	"worth/render"
)

// limitUsage is the help text of the --limit flag.
const limitUsage = "raise a limit, `NAME=N` (memo-size, blocks, alternatives, lines, file-size, schedule-years, line-years, risk-values, risk-work, what-if-rows; see README.md, Limits); may be repeated"

// addLimitFlag registers --limit on a command's flags.
func addLimitFlag(fs *flag.FlagSet, l *parse.Limits) {
	fs.Var(l, "limit", limitUsage)
}

// readMemo reads a memo file, at most one byte more than the memo-size
// limit: parse reports a memo past the limit, and a huge file (or a
// device that never ends) is never read whole.
func readMemo(path string, lim parse.Limits) ([]byte, error) {
	// A pipe would block and a device may never end: only a regular file
	// is read.
	if st, err := os.Stat(path); err == nil && !st.Mode().IsRegular() {
		return nil, fmt.Errorf("%s is not a regular file (a folder, pipe, device or socket); a memo is a Markdown file", path)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(io.LimitReader(f, int64(lim.WithDefaults().MemoBytes)+1))
}

// checkLogo reports, at the front matter's logo line, a logo that a PDF
// among fmts could not use: a path that leaves the memo's folder, a
// symbolic link, a file too large or not a PNG or JPEG image.
func checkLogo(memo *parse.Memo, fmts []string) error {
	logo := memo.Front.Logo
	if strings.TrimSpace(logo.Value.Src) == "" || !slices.Contains(fmts, "pdf") {
		return nil
	}
	if err := render.CheckLogo(filepath.Dir(memo.File), strings.TrimSpace(logo.Value.Src)); err != nil {
		var list parse.ErrorList
		list.Add(logo.Value.Pos, "%v", err)
		return list
	}
	return nil
}
