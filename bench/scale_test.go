package bench

// Speed at scale (issue 7): parse, compute and write as JSON, HTML and PDF
// the generated memos of 10, 100, 1,000 and 5,000 offers. Targets: 1,000
// offers to HTML in under 3 s and to JSON under 1 s, the cost growing
// linearly (the ns/alt metric stays about level from one size to the
// next), and the 1,000-offer memo built in under 200 MB (measured on the
// binary with /usr/bin/time -v, and by TestPeakMemory in cmd/worth). Run
// with
//
//	go test ./bench -run XXX -bench . -benchtime 3x

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"worth/compute"
	"worth/parse"
	"worth/render"
)

// sizes are the memo sizes measured, in alternatives.
var sizes = []int{10, 100, 1000, 5000}

var (
	memoOnce sync.Map // n -> []byte
)

func memo(n int) []byte {
	if v, ok := memoOnce.Load(n); ok {
		return v.([]byte)
	}
	src := Memo(n)
	memoOnce.Store(n, src)
	return src
}

// parseCompute parses and computes the memo of n offers.
func parseCompute(tb testing.TB, n int) *compute.Report {
	tb.Helper()
	m, err := parse.Parse(fmt.Sprintf("offers-%d.md", n), memo(n))
	if err != nil {
		tb.Fatal(err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		tb.Fatal(err)
	}
	return rep
}

// stages are the benchmarked pipelines: each starts from the memo's bytes
// and ends with the output bytes, as `worth build` does.
var stages = []struct {
	name string
	run  func(tb testing.TB, n int) int
}{
	{"ParseCompute", func(tb testing.TB, n int) int {
		rep := parseCompute(tb, n)
		return len(rep.Comparisons)
	}},
	{"JSON", func(tb testing.TB, n int) int {
		out, err := render.JSON(parseCompute(tb, n))
		if err != nil {
			tb.Fatal(err)
		}
		return len(out)
	}},
	{"HTML", func(tb testing.TB, n int) int {
		doc := render.BuildDoc(parseCompute(tb, n), render.DocOptions{})
		out, err := render.HTML(doc, render.HTMLOptions{})
		if err != nil {
			tb.Fatal(err)
		}
		return len(out)
	}},
	{"PDF", func(tb testing.TB, n int) int {
		doc := render.BuildDoc(parseCompute(tb, n), render.DocOptions{})
		out, err := render.PDF(doc, render.PDFOptions{})
		if err != nil {
			tb.Fatal(err)
		}
		return len(out)
	}},
}

// BenchmarkScale runs every stage at every size and reports the time per
// alternative (ns/alt), which stays about level when the cost is linear.
func BenchmarkScale(b *testing.B) {
	for _, st := range stages {
		for _, n := range sizes {
			b.Run(fmt.Sprintf("%s/alts=%d", st.name, n), func(b *testing.B) {
				memo(n)
				b.ReportAllocs()
				size := 0
				for b.Loop() {
					size = st.run(b, n)
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/alt")
				if st.name != "ParseCompute" {
					b.ReportMetric(float64(size)/float64(n), "bytes/alt")
				}
			})
		}
	}
}

// BenchmarkBuildDoc is the document builder alone (HTML and PDF share it)
// on a computed report.
func BenchmarkBuildDoc(b *testing.B) {
	for _, n := range sizes {
		b.Run(fmt.Sprintf("alts=%d", n), func(b *testing.B) {
			rep := parseCompute(b, n)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				render.BuildDoc(rep, render.DocOptions{})
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/alt")
		})
	}
}

// TestMemos checks that the generated memos are valid and mean what they
// say: every offer is compared, the horizon is the study period, the
// shortlist has its three offers, and every expectation holds.
func TestMemos(t *testing.T) {
	for _, n := range []int{10, 100} {
		rep := parseCompute(t, n)
		if len(rep.Alternatives) != n || len(rep.Comparisons) != 2 {
			t.Fatalf("n=%d: %d alternatives, %d comparisons", n, len(rep.Alternatives), len(rep.Comparisons))
		}
		c := rep.Comparisons[0]
		if len(c.Results) != n || c.Horizon.Years != 30 {
			t.Errorf("n=%d: tender compares %d over %d years, want %d over 30", n, len(c.Results), c.Horizon.Years, n)
		}
		if s := rep.Comparisons[1]; len(s.Results) != 3 || len(s.Steps) == 0 {
			t.Errorf("n=%d: shortlist has %d results and %d steps", n, len(s.Results), len(s.Steps))
		}
		for _, e := range rep.Expectations {
			if !e.Passed {
				t.Errorf("n=%d: expectation %q failed (%s)", n, e.Text, e.Detail)
			}
		}
		if len(rep.Inline) != 4 {
			t.Errorf("n=%d: %d inline values, want 4", n, len(rep.Inline))
		}
		forms := map[string]bool{}
		for _, line := range strings.Split(string(memo(n)), "\n") {
			for _, f := range []string{"escalating", "gradient", "from year", "every", "at year", "disbenefit", "salvage", "residual", "$"} {
				if strings.Contains(line, f) {
					forms[f] = true
				}
			}
		}
		if n == 100 && len(forms) != 9 {
			t.Errorf("n=%d: the memo uses only the line forms %v", n, forms)
		}
	}
}

var memosDir = flag.String("memos", "", "write the generated memos to `DIR` (TestWriteMemos)")

// TestWriteMemos writes the generated memos to the folder named by -memos,
// to build them with the binary (for /usr/bin/time -v).
func TestWriteMemos(t *testing.T) {
	if *memosDir == "" {
		t.Skip("no -memos DIR")
	}
	for _, n := range sizes {
		path := filepath.Join(*memosDir, fmt.Sprintf("offers-%d.md", n))
		if err := os.WriteFile(path, memo(n), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
