package main

import (
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"

	"worth/compute"
	"worth/render"
)

// Memory at scale (issue 7). worth builds each report in memory; for a
// memo of 1,000 alternatives the PDF writer holds some 60 MB of page
// content and the HTML report is 30 MB. Four things keep the peak under
// 200 MB (TestPeakMemory):
//
//   - build stages each output in a temporary file beside its target as
//     soon as it is rendered, and lets it go, instead of holding every
//     output until the last is made (renderEach); the files are renamed
//     into place when all succeeded, so a failure still changes nothing;
//   - the document model is let go before the last writer that draws it
//     compresses its pages (renderEach, render.PDF);
//   - for a large report, the collector runs at GOGC=50 unless GOGC is
//     set, so the heap peaks at about one and a half times the live data
//     instead of twice, and a soft memory limit follows the size of the
//     document (boundMemory). A small memo never reaches a collection
//     (init below).

// memoryFloor is the least soft memory limit boundMemory sets.
const memoryFloor = 160 << 20

// A build is a short-lived process: until the report is known to be
// large, the collector runs only under the soft memory limit of
// memoryFloor (GOGC=off), which spares a small memo every collection (a
// 40-alternative memo to HTML: 21 ms instead of 28) and makes it run as
// often as needed should the memo turn out large; boundMemory then sets
// the pace for a large one. Either setting is left alone when GOGC or
// GOMEMLIMIT is set.
func init() {
	if os.Getenv("GOGC") == "" {
		debug.SetGCPercent(-1)
	}
	if os.Getenv("GOMEMLIMIT") == "" {
		debug.SetMemoryLimit(memoryFloor)
	}
}

// smallHeap is the live heap, once the report and document are built,
// below which memory is no concern and boundMemory changes nothing.
const smallHeap = 32 << 20

// boundMemory sets the collector's soft memory limit, once the report and
// its document are built, to three times what they take (and at least
// memoryFloor), unless GOMEMLIMIT is set. The writers then hold their
// output (the PDF's pages, the HTML) on top of that: about twice the
// document for the PDF. With the limit the heap stays near what is live
// instead of running up to GOGC's goal while fpdf compresses each page
// (about a megabyte of garbage a page). The limit follows the memo's
// size, so a large memo is never held far below what it needs; it pays
// some collection time instead (a PDF of 5,000 alternatives takes about
// 15% more CPU, in a third of the memory).
func boundMemory() {
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	if ms.HeapAlloc < smallHeap {
		return
	}
	if os.Getenv("GOGC") == "" {
		debug.SetGCPercent(50)
	}
	if os.Getenv("GOMEMLIMIT") != "" {
		return
	}
	runtime.GC()
	runtime.ReadMemStats(&ms)
	debug.SetMemoryLimit(max(memoryFloor, 3*int64(ms.HeapAlloc)))
}

// renderEach writes the report in each format asked for and hands each
// output to put as soon as it is made; the first error stops it. The HTML
// and PDF writers share one document model, built once and dropped before
// the last of them runs, so that it can be collected while that writer
// finishes.
func renderEach(rep *compute.Report, fmts []string, opt buildOptions, put func(i int, data []byte) error) error {
	var doc *render.Doc
	last := -1
	for i, f := range fmts {
		if f == "html" || f == "pdf" {
			last = i
		}
	}
	for i, f := range fmts {
		var out []byte
		var err error
		switch f {
		case "md":
			out = render.Markdown(rep)
		case "json":
			out, err = render.JSON(rep)
		case "csv":
			out = render.CSV(rep)
		case "html", "pdf":
			if doc == nil {
				doc = render.BuildDoc(rep, render.DocOptions{AllowHTML: opt.allowHTML, AppendixOnly: opt.appendixOnly})
				boundMemory()
			}
			d := doc
			if i == last {
				doc = nil
			}
			if f == "html" {
				out, err = render.HTML(d, render.HTMLOptions{TemplateDir: opt.templateDir})
			} else {
				out, err = render.PDF(d, render.PDFOptions{BaseDir: filepath.Dir(rep.Memo.File)})
			}
		}
		if err != nil {
			return err
		}
		if err := put(i, out); err != nil {
			return err
		}
	}
	return nil
}

// staged are outputs written to temporary files beside their targets,
// to be renamed into place together.
type staged struct {
	tmp, path []string
}

// add writes data to a temporary file in path's folder.
func (s *staged) add(path string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return err
	}
	name := tmp.Name()
	s.tmp, s.path = append(s.tmp, name), append(s.path, path)
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	return os.Chmod(name, 0o644)
}

// commit renames every staged file into place, in order; on a failure the
// files not yet renamed are removed.
func (s *staged) commit() error {
	for k, name := range s.tmp {
		if err := os.Rename(name, s.path[k]); err != nil {
			s.tmp = s.tmp[k:]
			s.discard()
			return err
		}
	}
	s.tmp = nil
	return nil
}

// discard removes the staged files.
func (s *staged) discard() {
	for _, name := range s.tmp {
		os.Remove(name)
	}
	s.tmp = nil
}

// writeOutputs renders every target and writes it: to standard output for
// "-", else staged and renamed into place when all are made.
func writeOutputs(rep *compute.Report, paths, fmts []string, opt buildOptions, stdout io.Writer) error {
	var st staged
	err := renderEach(rep, fmts, opt, func(i int, data []byte) error {
		if paths[i] == "-" {
			_, err := stdout.Write(data)
			return err
		}
		return st.add(paths[i], data)
	})
	if err != nil {
		st.discard()
		return err
	}
	return st.commit()
}
