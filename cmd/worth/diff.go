package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"

	"worth/compute"
	"worth/parse"
	"worth/render"
)

// A memo version on the command line is a file, or REV:PATH read through
// git (git show REV:PATH, run in the memo's folder, so PATH is relative to
// the current folder like any file name).

// revisionOf splits "REV:PATH" when arg is not an existing file.
func revisionOf(arg string) (rev, path string, ok bool) {
	if _, err := os.Stat(arg); err == nil {
		return "", arg, false
	}
	i := strings.Index(arg, ":")
	if i <= 0 || i == len(arg)-1 {
		return "", arg, false
	}
	// A Windows drive letter (C:\...) is not a revision.
	if i == 1 && len(arg) > 2 && (arg[2] == '\\' || arg[2] == '/') {
		return "", arg, false
	}
	return arg[:i], arg[i+1:], true
}

// gitShow reads PATH as it was at revision rev, running git in PATH's
// folder so that the memo's own repository answers.
func gitShow(rev, path string) ([]byte, error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	cmd := exec.Command("git", "-C", dir, "show", rev+":./"+filepath.ToSlash(base))
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		msg := strings.TrimSpace(errb.String())
		if msg == "" {
			msg = err.Error()
		}
		msg = strings.TrimPrefix(msg, "fatal: ")
		return nil, fmt.Errorf("git show %s:%s: %s", rev, path, msg)
	}
	return out.Bytes(), nil
}

// loadVersion reads, parses and computes one version of a memo: a file, or
// REV:PATH through git (the CSV files it names are read at the same
// revision).
func loadVersion(arg string, opt loadOptions) (*loaded, error) {
	rev, path, isRev := revisionOf(arg)
	if !isRev {
		src, err := readMemo(path, opt.limits) // limits.go
		if err != nil {
			return nil, err
		}
		return loadSource(path, src, opt, nil)
	}
	src, err := gitShow(rev, path)
	if err != nil {
		return nil, err
	}
	return loadRevision(rev, path, src, opt)
}

// loadRevision computes a memo's source read at revision rev: positions
// read REV:PATH, and the files it names are read at the same revision.
func loadRevision(rev, path string, src []byte, opt loadOptions) (*loaded, error) {
	files := func(name string) ([]byte, error) { return gitShow(rev, name) }
	l, err := loadSource(path, src, opt, files)
	// Errors name the version they were found in.
	prefixErrors(err, rev+":")
	return l, err
}

// prefixErrors puts a prefix before the file of every position of a
// memo's errors ("HEAD~1:" before "memo.md:12:3").
func prefixErrors(err error, prefix string) {
	var list parse.ErrorList
	if errors.As(err, &list) {
		for _, e := range list {
			if e.Pos.File != "" {
				e.Pos.File = prefix + e.Pos.File
			}
		}
	}
}

func diff(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("diff", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("o", "", "also write the revision note to `FILE` (format from its extension: .md, .html, .pdf); - writes Markdown to standard output")
	format := fs.String("format", "", "the note's `FORMAT`: md, html or pdf (default: from the -o extension)")
	var lo loadOptions
	fs.BoolVar(&lo.allowOutside, "allow-outside", false, "let a memo read files (cash flows from: FILE.csv) outside its own folder")
	addLimitFlag(fs, &lo.limits)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: worth diff [-o FILE] OLD.md NEW.md\n\n"+
			"Reports what changed between two versions of a memo: every input line that\n"+
			"changed (block, line, name, old and new value), and how every result moved,\n"+
			"flagging a changed recommendation. Either version may be REV:PATH, read with\n"+
			"git from the memo's repository (e.g. worth diff HEAD~1:memo.md memo.md).\n"+
			"With -o, also writes the revision note as Markdown, HTML or PDF.\n\nOptions:\n")
		fs.PrintDefaults()
	}
	pos, code, ok := positional(fs, args, stderr, 2, "worth diff: give two versions of a memo: OLD.md NEW.md (either may be REV:PATH)")
	if !ok {
		return code
	}
	fm := *format
	if *out != "" && fm == "" {
		fm = strings.TrimPrefix(strings.ToLower(filepath.Ext(*out)), ".")
		if *out == "-" {
			fm = "md"
		}
	}
	if fm != "" && fm != "md" && fm != "html" && fm != "pdf" {
		fmt.Fprintf(stderr, "worth diff: unknown format %q for the revision note; expected md, html or pdf\n", fm)
		return 2
	}
	if fm != "" && *out == "" {
		fmt.Fprintln(stderr, "worth diff: --format needs -o FILE")
		return 2
	}
	var versions [2]*loaded
	failed := false
	for i, arg := range pos {
		l, err := loadVersion(arg, lo)
		if err != nil {
			printErr(stderr, err)
			failed = true
			continue
		}
		versions[i] = l
	}
	if failed {
		return 2
	}
	rev := compute.Diff(versions[0].rep, versions[1].rep)
	rev.Old, rev.New = pos[0], pos[1]
	newRep := versions[1].rep
	if *out != "-" {
		fmt.Fprint(stdout, render.RevisionText(rev, render.NewFormat(newRep, false)))
	}
	if *out == "" {
		return 0
	}
	var data []byte
	var err error
	switch fm {
	case "md":
		data = render.RevisionMarkdown(rev, newRep)
	case "html":
		data, err = render.HTML(render.RevisionDoc(rev, newRep), render.HTMLOptions{})
	case "pdf":
		data, err = render.PDF(render.RevisionDoc(rev, newRep), render.PDFOptions{})
	}
	if err != nil {
		fmt.Fprintf(stderr, "worth diff: %v\n", err)
		return 2
	}
	if *out == "-" {
		stdout.Write(data)
		return 0
	}
	if err := writeAtomic(*out, data); err != nil {
		fmt.Fprintf(stderr, "worth diff: %v\n", err)
		return 2
	}
	return 0
}

// changesSince computes the revision of a memo since rev (read with git)
// for "worth build --changes-since REV".
func changesSince(rev, memoPath string, rep *compute.Report, opt loadOptions) (*compute.Revision, error) {
	src, err := gitShow(rev, memoPath)
	if err != nil {
		return nil, err
	}
	old, err := loadRevision(rev, memoPath, src, opt)
	if err != nil {
		return nil, err
	}
	r := compute.Diff(old.rep, rep)
	r.Old, r.New = rev+":"+filepath.ToSlash(memoPath), filepath.ToSlash(memoPath)
	return r, nil
}
