package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"worth/compute"
	"worth/parse"
)

// maxIncludeBytes bounds a file a memo reads ("cash flows from:"): 1 MiB
// holds tens of thousands of rows, far more than any life-cycle schedule.
const maxIncludeBytes = 1 << 20

// loadOptions are the flags that change how a memo is read.
type loadOptions struct {
	// allowOutside lets a memo read files outside its own folder.
	allowOutside bool
	// limits are the bounds raised with --limit (limits.go).
	limits parse.Limits
}

// memoFiles reads the files a memo names, relative to the memo's folder,
// and remembers which it read (the watch command watches them too).
type memoFiles struct {
	dir          string // the memo's folder, as given ("." for none)
	allowOutside bool
	maxBytes     int // the file-size limit
	// open reads a file by its path (joined to dir); nil: the file system.
	open func(path string) ([]byte, error)
	// read lists the files read, by the names used in positions.
	read []string
}

// resolve is a parse.Resolver: it refuses a path that leaves the memo's
// folder (unless allowed), and files over maxIncludeBytes.
func (m *memoFiles) resolve(path string) (string, []byte, error) {
	if path == "" {
		return "", nil, errors.New("no file is named")
	}
	name := path
	if !filepath.IsAbs(path) {
		name = filepath.Join(m.dir, filepath.FromSlash(path))
	}
	if !m.allowOutside {
		if err := inside(m.dir, name, m.open == nil); err != nil {
			return "", nil, err
		}
	}
	m.read = append(m.read, name)
	if m.open != nil {
		data, err := m.open(name)
		if err != nil {
			return name, nil, err
		}
		if len(data) > m.maxBytes {
			return name, nil, tooBig(int64(len(data)), m.maxBytes)
		}
		return name, data, nil
	}
	// Fix (hostile input): a named pipe or a device would block or never
	// end; only regular files (and folders, reported below) are opened.
	if st, err := os.Stat(name); err == nil && !st.Mode().IsRegular() && !st.IsDir() {
		return name, nil, fmt.Errorf("%s is not a regular file (a pipe, device or socket); a memo reads CSV files", name)
	}
	f, err := os.Open(name)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return name, nil, fmt.Errorf("no such file %s", name)
		}
		return name, nil, err
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.IsDir() {
		return name, nil, fmt.Errorf("%s is a folder, not a CSV file", name)
	}
	data, err := io.ReadAll(io.LimitReader(f, int64(m.maxBytes)+1))
	if err != nil {
		return name, nil, err
	}
	if len(data) > m.maxBytes {
		st, _ := f.Stat()
		n := int64(len(data))
		if st != nil {
			n = st.Size()
		}
		return name, nil, tooBig(n, m.maxBytes)
	}
	return name, data, nil
}

func tooBig(n int64, max int) error {
	return fmt.Errorf("the file is %s; a file a memo reads may be at most %s (split it, or summarize the flows by year) %s", byteSize(n), byteSize(int64(max)), parse.LimitHint("file-size", max))
}

// byteSize writes a size for a reader: 1.0 MiB, 340 KiB, 12 bytes.
func byteSize(n int64) string {
	switch {
	case n >= 1<<20:
		return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%d KiB", n>>10)
	}
	return fmt.Sprintf("%d bytes", n)
}

// inside reports an error when path is not inside dir: lexically (no ..
// that climbs out, no absolute path elsewhere) and, when onDisk, after
// following symbolic links.
func inside(dir, path string, onDisk bool) error {
	outside := fmt.Errorf("%s is outside the memo's folder (%s); a memo reads only files in its own folder, unless --allow-outside is given", filepath.ToSlash(path), filepath.ToSlash(absOr(dir)))
	if !within(absOr(dir), absOr(path)) {
		return outside
	}
	if onDisk {
		d, err1 := filepath.EvalSymlinks(dir)
		p, err2 := filepath.EvalSymlinks(path)
		if err1 == nil && err2 == nil && !within(absOr(d), absOr(p)) {
			return outside
		}
	}
	return nil
}

// within reports whether path is dir or below it (both absolute, clean).
func within(dir, path string) bool {
	rel, err := filepath.Rel(dir, path)
	if err != nil {
		return false
	}
	return rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) && !filepath.IsAbs(rel)
}

func absOr(p string) string {
	if a, err := filepath.Abs(p); err == nil {
		return a
	}
	return filepath.Clean(p)
}

// loaded is a memo read, parsed and computed.
type loaded struct {
	memo *parse.Memo
	rep  *compute.Report
	// files are the files the memo read besides itself.
	files []string
}

// loadSource parses and computes a memo whose source is src (name is used
// in positions and locates the memo's folder). open, when set, reads the
// files it names instead of the file system (a memo read from git). Every
// error of the memo is returned at once, as a parse.ErrorList.
func loadSource(name string, src []byte, opt loadOptions, open func(string) ([]byte, error)) (*loaded, error) {
	lim := opt.limits.WithDefaults()
	files := &memoFiles{dir: filepath.Dir(name), allowOutside: opt.allowOutside, open: open, maxBytes: lim.FileBytes}
	// Compute even when parsing found errors, so that every error of the
	// memo is reported at once.
	memo, perr := parse.ParseWith(name, src, parse.Options{Resolve: files.resolve, Limits: lim})
	// A long risk analysis draws a progress bar on a terminal.
	rep, cerr := compute.ComputeWith(memo, compute.Options{Progress: progressBar(os.Stderr)})
	l := &loaded{memo: memo, rep: rep, files: files.read}
	var all parse.ErrorList
	for _, err := range []error{perr, cerr} {
		var list parse.ErrorList
		if errors.As(err, &list) {
			all = append(all, list...)
		} else if err != nil {
			return l, err
		}
	}
	if err := all.Err(); err != nil {
		return l, err
	}
	return l, nil
}

// loadWith reads a memo file, parses and computes it.
func loadWith(path string, opt loadOptions) (*compute.Report, error) {
	src, err := readMemo(path, opt.limits) // limits.go
	if err != nil {
		return nil, err
	}
	l, err := loadSource(path, src, opt, nil)
	if err != nil {
		return nil, err
	}
	return l.rep, nil
}

// readsFile reports whether the memo reads the file at path (so that an
// output, e.g. MEMO.csv, never overwrites an input of the same name).
func readsFile(memo *parse.Memo, path string) bool {
	if memo == nil || path == "-" {
		return false
	}
	for _, in := range memo.Includes {
		if in.Name != "" && absOr(in.Name) == absOr(path) {
			return true
		}
	}
	return false
}
