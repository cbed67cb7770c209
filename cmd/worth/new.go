package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"
	"unicode"

	"worth/expr"
	"worth/scaffold"
)

// newMemo is "worth new FILE.md [--kind NAME]": write a starter memo that
// builds as is. It never overwrites a file.
func newMemo(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("new", flag.ContinueOnError)
	fs.SetOutput(stderr)
	kind := fs.String("kind", scaffold.Kinds[0].Name, "the starter `NAME`: "+strings.Join(scaffold.Names(), ", "))
	title := fs.String("title", "", "the memo's `TITLE` (default: from the file name)")
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: worth new [--kind NAME] [--title TITLE] FILE.md\n\n"+
			"Writes a starter memo that builds as is, to edit into your own. An existing\nfile is never overwritten. The starters:\n\n")
		for _, k := range scaffold.Kinds {
			fmt.Fprintf(fs.Output(), "  %-13s %s\n", k.Name, k.Summary)
		}
		fmt.Fprintf(fs.Output(), "\nOptions:\n")
		fs.PrintDefaults()
	}
	pos, code, ok := positional(fs, args, stderr, 1, "worth new: give exactly one file name for the new memo, e.g. worth new pump-station.md")
	if !ok {
		return code
	}
	path := pos[0]
	known := false
	for _, k := range scaffold.Names() {
		known = known || k == *kind
	}
	if !known {
		msg := fmt.Sprintf("worth new: no starter memo of kind %q; the kinds are %s", *kind, strings.Join(scaffold.Names(), ", "))
		if s := expr.Closest(*kind, scaffold.Names()); s != "" {
			msg += fmt.Sprintf("; did you mean %q?", s)
		}
		fmt.Fprintln(stderr, msg)
		return 2
	}
	if !strings.EqualFold(filepath.Ext(path), ".md") {
		fmt.Fprintf(stderr, "worth new: %s: a memo's file name ends in .md\n", path)
		return 2
	}
	t := *title
	if t == "" {
		t = titleFromFile(path)
	}
	src, err := scaffold.Memo(*kind, t, time.Now().Format("2006-01-02"))
	if err != nil {
		fmt.Fprintf(stderr, "worth new: %v\n", err)
		return 2
	}
	// O_EXCL: never overwrite, even a file created a moment ago.
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		if errors.Is(err, os.ErrExist) {
			fmt.Fprintf(stderr, "worth new: %s already exists; it is left as it is (choose another name)\n", path)
		} else {
			fmt.Fprintf(stderr, "worth new: %v\n", err)
		}
		return 2
	}
	if _, err := f.Write(src); err != nil {
		f.Close()
		os.Remove(path)
		fmt.Fprintf(stderr, "worth new: %v\n", err)
		return 2
	}
	if err := f.Close(); err != nil {
		os.Remove(path)
		fmt.Fprintf(stderr, "worth new: %v\n", err)
		return 2
	}
	fmt.Fprintf(stdout, "wrote %s (a %s starter); edit it and run: worth watch %s\n", path, *kind, path)
	return 0
}

// titleFromFile makes a title from a file name: "pump-station_2.md" gives
// "Pump station 2".
func titleFromFile(path string) string {
	base := strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	words := strings.FieldsFunc(base, func(r rune) bool { return r == '-' || r == '_' || r == '.' || unicode.IsSpace(r) })
	if len(words) == 0 {
		return "Decision memo"
	}
	s := strings.Join(words, " ")
	r := []rune(s)
	r[0] = unicode.ToUpper(r[0])
	return string(r)
}
