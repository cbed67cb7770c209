package render

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"worth/parse"
)

// besideFiles is a resolver for test memos that read CSV files ("cash
// flows from:"): the files beside the memo (the command line's own rules
// are tested in cmd/worth).
func besideFiles(memo string) parse.Resolver {
	return func(path string) (string, []byte, error) {
		name := filepath.Join(filepath.Dir(memo), path)
		b, err := os.ReadFile(name)
		return name, b, err
	}
}

// TestTraceableFigures: in the HTML of each example, every figure of the
// assumptions, alternatives and results tables carries a title naming its
// source line and a link; every link inside the document lands on an
// element that exists; the appendix lists every assumption and every line
// of every alternative with its line; the HTML holds no script.
func TestTraceableFigures(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join("..", "examples", "*.md"))
	if len(files) == 0 {
		t.Fatal("no examples")
	}
	href := regexp.MustCompile(`href="#([^"]+)"`)
	id := regexp.MustCompile(` id="([^"]+)"`)
	for _, file := range files {
		t.Run(filepath.Base(file), func(t *testing.T) {
			rep := loadReport(t, file)
			doc := BuildDoc(rep, DocOptions{})
			out, err := HTML(doc, HTMLOptions{})
			if err != nil {
				t.Fatal(err)
			}
			html := string(out)
			ids := map[string]bool{}
			for _, m := range id.FindAllStringSubmatch(html, -1) {
				ids[m[1]] = true
			}
			for _, m := range href.FindAllStringSubmatch(html, -1) {
				if !ids[m[1]] {
					t.Errorf("a link to #%s lands nowhere", m[1])
				}
			}
			// Every figure of the computed tables is traced: inputs,
			// alternatives and the results of each comparison.
			results := map[string]bool{}
			for _, c := range rep.Comparisons {
				results["Comparison "+c.ID] = true
			}
			walk(doc.Body, func(n Node) {
				tb, ok := n.(Table)
				if !ok || !(results[tb.Caption] || strings.HasPrefix(tb.Caption, "Alternative: ") || tb.Caption == "Assumptions") {
					return
				}
				col, rows := 1, len(tb.Rows)
				if strings.HasPrefix(tb.Caption, "Alternative: ") {
					col = 2
					for _, a := range rep.Alternatives {
						if tb.Caption == "Alternative: "+a.Name {
							rows = len(a.Items) // its money lines
						}
					}
				}
				for r, row := range tb.Rows[:rows] {
					for c := col; c < len(row); c++ {
						if c > col && !results[tb.Caption] {
							break
						}
						if row[c] == "n/a" {
							continue
						}
						if r >= len(tb.Trace) || c >= len(tb.Trace[r]) || tb.Trace[r][c].Title == "" || tb.Trace[r][c].Href == "" {
							t.Errorf("%s: %q (row %d) carries no trace", tb.Caption, row[c], r+1)
							continue
						}
						if !strings.Contains(tb.Trace[r][c].Title, "line") {
							t.Errorf("%s: the trace of %q names no line: %q", tb.Caption, row[c], tb.Trace[r][c].Title)
						}
					}
				}
			})
			// The appendix lists every input with its line.
			for _, a := range rep.Assumptions {
				if !ids[inputID("", a.Line)] {
					t.Errorf("assumption %s (line %d) is not in the appendix", a.Name, a.Line)
				}
			}
			for _, a := range rep.Alternatives {
				for _, it := range a.Items {
					if !ids[inputID(it.File, it.Line)] {
						t.Errorf("%s: %s (line %d) is not in the appendix", a.ID, it.Label, it.Line)
					}
				}
			}
			if strings.Contains(html, "<script") {
				t.Error("the HTML holds a script")
			}
		})
	}
}
