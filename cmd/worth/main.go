// Command worth evaluates engineering-economy decision memos written in
// Markdown and renders them as reports. See README.md for the memo language
// and the commands.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"worth/compute"
	"worth/parse"
)

const usage = `worth evaluates decision memos: Markdown with fenced cash-flow blocks.

Usage:
  worth build [-o FILE] [--format FORMAT] [options] MEMO.md
  worth check MEMO.md...
  worth new [--kind NAME] FILE.md
  worth diff [-o NOTE] OLD.md NEW.md
  worth watch [--port N] MEMO.md

Commands:
  build   compute the memo and write its report
  check   compute the memo(s) and run every expect block; write nothing
  new     write a starter memo that builds as is
  diff    report what changed between two versions of a memo (either may be REV:PATH)
  watch   rebuild on every save and serve a live preview on 127.0.0.1

Run "worth COMMAND --help" for a command's options.
`

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run is main without the process: it returns the exit code.
func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	switch args[0] {
	case "build":
		return build(args[1:], stdout, stderr)
	case "check":
		return check(args[1:], stdout, stderr)
	case "new":
		return newMemo(args[1:], stdout, stderr)
	case "diff":
		return diff(args[1:], stdout, stderr)
	case "watch":
		return watch(args[1:], stdout, stderr)
	case "-h", "--help", "help":
		fmt.Fprint(stdout, usage)
		return 0
	}
	fmt.Fprintf(stderr, "worth: unknown command %q\n\n%s", args[0], usage)
	return 2
}

// positional parses the flags (before or after the arguments) and checks
// the number of positional arguments: n exactly, or at least one when n is
// -1. When ok is false the command ends with code (0 after --help, 2 on a
// usage error, which is reported with missing and the usage).
func positional(fs *flag.FlagSet, args []string, stderr io.Writer, n int, missing string) (pos []string, code int, ok bool) {
	pos, err := parseInterspersed(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil, 0, false
		}
		return nil, 2, false
	}
	if (n >= 0 && len(pos) != n) || (n < 0 && len(pos) == 0) {
		fmt.Fprintln(stderr, missing)
		fs.Usage()
		return nil, 2, false
	}
	return pos, 0, true
}

// parseInterspersed parses flags that may come before or after the
// positional arguments, and returns the positional ones.
func parseInterspersed(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if rest[0] == "-" && len(pos) == 0 {
			pos = append(pos, rest[0])
			args = rest[1:]
			continue
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// load reads, parses and computes one memo.
func load(path string) (*compute.Report, error) {
	return loadWith(path, loadOptions{})
}

// buildOptions are the build flags that shape the output.
type buildOptions struct {
	templateDir  string
	allowHTML    bool
	appendixOnly bool
}

// formats are the output formats by name.
var formats = map[string]bool{"md": true, "json": true, "html": true, "pdf": true, "csv": true}

// renderAll writes the report in each format asked for and returns every
// output (renderEach, scale.go, hands each over as it is made).
func renderAll(rep *compute.Report, fmts []string, opt buildOptions) ([][]byte, error) {
	out := make([][]byte, len(fmts))
	err := renderEach(rep, fmts, opt, func(i int, data []byte) error {
		out[i] = data
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

func build(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("build", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("o", "", "write one file `FILE` (format from its extension: .html, .pdf, .md, .json, .csv); - writes to standard output")
	format := fs.String("format", "", "output `FORMAT`: html, pdf, md, json or csv (every alternative's year-by-year schedule) (default: from the -o extension)")
	var opt buildOptions
	fs.StringVar(&opt.templateDir, "template", "", "HTML templates folder `DIR` of the organization's own (files named as the built-in ones)")
	fs.BoolVar(&opt.allowHTML, "allow-html", false, "let raw HTML in the memo's prose through to the HTML report (script links stay blocked)")
	fs.BoolVar(&opt.appendixOnly, "appendix-only", false, "write only the calculation appendix (HTML or PDF), to attach to a proposal")
	var lo loadOptions
	fs.BoolVar(&lo.allowOutside, "allow-outside", false, "let the memo read files (cash flows from: FILE.csv) outside its own folder")
	addLimitFlag(fs, &lo.limits)
	since := fs.String("changes-since", "", "add a section on what changed since git revision `REV` of the memo (inputs and results, as worth diff)")
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: worth build [-o FILE] [--format FORMAT] [options] MEMO.md\n\n"+
			"Computes the memo and writes its report. Without -o, writes MEMO.html and\nMEMO.pdf beside the memo (with --format, MEMO.FORMAT; Markdown as MEMO.report.md).\nA memo with an error writes nothing and leaves earlier output untouched.\n\nOptions:\n")
		fs.PrintDefaults()
	}
	pos, code, ok := positional(fs, args, stderr, 1, "worth build: give exactly one memo file")
	if !ok {
		return code
	}
	memoPath := pos[0]
	// Decide the outputs before computing, so a bad option fails fast.
	type target struct{ path, format string }
	var targets []target
	switch {
	case *out != "":
		fm := *format
		if fm == "" {
			if *out == "-" {
				fm = "md"
			} else {
				fm = strings.TrimPrefix(strings.ToLower(filepath.Ext(*out)), ".")
			}
		}
		if !formats[fm] {
			fmt.Fprintf(stderr, "worth build: unknown output format %q; expected html, pdf, md, json or csv (use --format or a file name ending in one of them)\n", fm)
			return 2
		}
		targets = append(targets, target{*out, fm})
	case *format != "":
		if !formats[*format] {
			fmt.Fprintf(stderr, "worth build: unknown output format %q; expected html, pdf, md, json or csv\n", *format)
			return 2
		}
		targets = append(targets, target{besideMemo(memoPath, *format), *format})
	default:
		targets = append(targets, target{besideMemo(memoPath, "html"), "html"}, target{besideMemo(memoPath, "pdf"), "pdf"})
	}
	if opt.appendixOnly {
		for _, t := range targets {
			if t.format != "html" && t.format != "pdf" {
				fmt.Fprintf(stderr, "worth build: --appendix-only makes an HTML or PDF appendix, not %s\n", t.format)
				return 2
			}
		}
	}
	if opt.templateDir != "" {
		if st, err := os.Stat(opt.templateDir); err != nil || !st.IsDir() {
			fmt.Fprintf(stderr, "worth build: --template %s is not a folder\n", opt.templateDir)
			return 2
		}
	}
	rep, err := loadWith(memoPath, lo)
	if err != nil {
		printErr(stderr, err)
		return 2
	}
	if *since != "" {
		if rep.Revision, err = changesSince(*since, memoPath, rep, lo); err != nil {
			printErr(stderr, err)
			return 2
		}
	}
	for _, t := range targets {
		if readsFile(rep.Memo, t.path) {
			fmt.Fprintf(stderr, "worth build: %s is a file the memo reads; write the output elsewhere with -o FILE\n", t.path)
			return 2
		}
	}
	// Render everything, each output staged beside its target as it is
	// made; rename into place only when all succeeded (scale.go).
	fmts, paths := make([]string, len(targets)), make([]string, len(targets))
	for i, t := range targets {
		fmts[i], paths[i] = t.format, t.path
	}
	// A PDF's logo is checked first, so that its error names the front
	// matter's line (limits.go).
	if err := checkLogo(rep.Memo, fmts); err != nil {
		printErr(stderr, err)
		return 2
	}
	if err := writeOutputs(rep, paths, fmts, opt, stdout); err != nil {
		fmt.Fprintf(stderr, "worth build: %v\n", err)
		return 2
	}
	for _, x := range rep.Expectations {
		if !x.Passed {
			fmt.Fprintf(stderr, "%s:%d:%d: warning: expectation does not hold: %s\n", memoPath, x.Line, x.Col, x.Text)
		}
	}
	return 0
}

// besideMemo names an output file next to the memo: memo.report.md for
// Markdown (so the memo itself is never overwritten), memo.json, ...
func besideMemo(memo, format string) string {
	base := strings.TrimSuffix(memo, filepath.Ext(memo))
	if format == "md" {
		return base + ".report.md"
	}
	return base + "." + format
}

// writeAtomic writes data to a temporary file in the same folder and
// renames it over path, so a reader never sees a partial file and a failure
// leaves the earlier file untouched.
func writeAtomic(path string, data []byte) error {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return err
	}
	name := tmp.Name()
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(name)
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return err
	}
	if err := os.Chmod(name, 0o644); err != nil {
		os.Remove(name)
		return err
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return err
	}
	return nil
}

func printErr(w io.Writer, err error) {
	var list parse.ErrorList
	if errors.As(err, &list) {
		for _, e := range list {
			fmt.Fprintln(w, e.Error())
		}
		return
	}
	fmt.Fprintf(w, "worth: %v\n", err)
}

func check(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("check", flag.ContinueOnError)
	fs.SetOutput(stderr)
	quiet := fs.Bool("q", false, "print nothing when every expectation holds")
	var lo loadOptions
	fs.BoolVar(&lo.allowOutside, "allow-outside", false, "let a memo read files (cash flows from: FILE.csv) outside its own folder")
	addLimitFlag(fs, &lo.limits)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: worth check [-q] MEMO.md...\n\n"+
			"Parses and computes each memo and runs every expect block, writing no files.\n"+
			"Exit status: 0 when every expectation holds, 1 when one fails, 2 on an error in a memo.\n\nOptions:\n")
		fs.PrintDefaults()
	}
	pos, code, ok := positional(fs, args, stderr, -1, "worth check: give one or more memo files")
	if !ok {
		return code
	}
	for _, path := range pos {
		rep, err := loadWith(path, lo)
		if err != nil {
			printErr(stderr, err)
			code = 2
			continue
		}
		failed := 0
		for _, x := range rep.Expectations {
			if !x.Passed {
				failed++
				msg := x.Text
				if x.Detail != "" {
					msg += " (" + x.Detail + ")"
				}
				fmt.Fprintf(stdout, "%s:%d:%d: expectation fails: %s\n", path, x.Line, x.Col, msg)
			}
		}
		if failed > 0 {
			if code == 0 {
				code = 1
			}
			continue
		}
		if !*quiet {
			n := len(rep.Expectations)
			verb := "hold"
			if n == 1 {
				verb = "holds"
			}
			fmt.Fprintf(stdout, "%s: ok, %d expectation%s %s\n", path, n, plural(n), verb)
		}
	}
	return code
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}
