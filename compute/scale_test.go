package compute

import (
	"fmt"
	"math"
	"math/rand"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"worth/parse"
)

// scaleAlternative writes a random alternative with every line form that
// cycleTerms knows, with and without a life.
func scaleAlternative(rng *rand.Rand, id string) string {
	var b strings.Builder
	life := 0
	if rng.Intn(4) != 0 {
		life = 2 + rng.Intn(40)
		fmt.Fprintf(&b, "life: %d\n", life)
	}
	span := life
	if span == 0 {
		span = 30
	}
	fmt.Fprintf(&b, "first cost: %d\n", 1000+rng.Intn(900000))
	for k := rng.Intn(6); k >= 0; k-- {
		word := []string{"cost", "benefit", "disbenefit"}[rng.Intn(3)]
		amount := 100 + rng.Intn(90000)
		switch rng.Intn(7) {
		case 0:
			fmt.Fprintf(&b, "%s at year %d: %d\n", word, rng.Intn(span+1), amount)
		case 1:
			fmt.Fprintf(&b, "annual %s: %d\n", word, amount)
		case 2:
			fmt.Fprintf(&b, "annual %s from year %d: %d gradient %d\n", word, 1+rng.Intn(span), amount, rng.Intn(900)-300)
		case 3:
			// Escalation below the smallest rate tried on a series that
			// runs forever.
			from, to := 1+rng.Intn(span), ""
			if rng.Intn(2) == 0 {
				to = fmt.Sprintf(" to year %d", from+rng.Intn(span-from+1))
			}
			fmt.Fprintf(&b, "annual %s from year %d%s: %d escalating %.1f%%\n", word, from, to, amount, rng.Float64()*0.9)
		case 4:
			fmt.Fprintf(&b, "%s every %d years: %d\n", word, 1+rng.Intn(max(1, span-1)), amount)
		case 5:
			fmt.Fprintf(&b, "%s every %d years from year %d: %d\n", word, 1+rng.Intn(12), 1+rng.Intn(max(1, span-1)), amount)
		case 6:
			from := 1 + rng.Intn(max(1, span-1))
			fmt.Fprintf(&b, "%s every %d years from year %d to year %d: %d\n", word, 1+rng.Intn(8), from, from+rng.Intn(span-from+1), amount)
		}
	}
	if life > 0 && rng.Intn(2) == 0 {
		fmt.Fprintf(&b, "salvage: %d\n", rng.Intn(50000))
	}
	return "```alternative " + id + "\n" + b.String() + "```\n\n"
}

// TestCycleValueIsTermSum holds the fast perpetual evaluation to the worked
// equation's own sum, bit for bit, on random alternatives of every line
// form and on the examples, at rates from 0.1% to 500%.
func TestCycleValueIsTermSum(t *testing.T) {
	var alts []*Alternative
	rng := rand.New(rand.NewSource(7))
	for m := 0; m < 40; m++ {
		var src strings.Builder
		src.WriteString("---\ntitle: cycle values\nrate: 5%\n---\n\n")
		for k := 0; k < 10; k++ {
			src.WriteString(scaleAlternative(rng, fmt.Sprintf("a%d", k)))
		}
		alts = append(alts, computeMemo(t, src.String()).Alternatives...)
	}
	examples, _ := filepath.Glob("../examples/*.md")
	for _, path := range examples {
		src, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		dir := filepath.Dir(path)
		read := func(p string) (string, []byte, error) {
			data, err := os.ReadFile(filepath.Join(dir, p))
			return filepath.Join(dir, p), data, err
		}
		m, err := parse.ParseWith(path, src, parse.Options{Resolve: read})
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		rep, err := Compute(m)
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		alts = append(alts, rep.Alternatives...)
	}
	if len(alts) < 400 {
		t.Fatalf("only %d alternatives", len(alts))
	}
	for _, a := range alts {
		for _, i := range []float64{0.001, 0.01, 0.035, 0.07, 0.2, 1, 5} {
			want := sumTerms(a.cycleTerms(i, -1))
			got := a.cycleValue(i)
			if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Errorf("%s at %g: cycleValue %v, terms sum to %v", a.ID, i, got, want)
			}
		}
	}
}

// BenchmarkPerpetualPW is one evaluation of an alternative's capitalized
// worth, as a root search on a perpetual horizon makes thousands of.
func BenchmarkPerpetualPW(b *testing.B) {
	rng := rand.New(rand.NewSource(3))
	src := "---\ntitle: one\nrate: 5%\n---\n\n" + scaleAlternative(rng, "a")
	a := computeMemo(b, src).Alternatives[0]
	b.ReportAllocs()
	for b.Loop() {
		a.perpetualPW(0.05)
	}
}
