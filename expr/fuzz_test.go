package expr

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// The fuzz targets of the expression layer:
//
//	go test ./expr -run XXX -fuzz FuzzCompile -fuzztime 10m
//	go test ./expr -run XXX -fuzz FuzzParseNumber -fuzztime 10m
//
// FuzzCompile (in expr_test.go) compiles arbitrary text and evaluates it
// with arbitrary variable values (checkEval); FuzzParseNumber reads
// arbitrary text as a number and writes arbitrary float64 values in every
// number form the memo language has, reading them back (checkNumberForms).

// checkEval evaluates a compiled expression with the given values of the
// variables a, b, abc, k and M (numbers), n (an integer), c (text) and flag
// (a condition), and holds Eval and Number to their promises: no panic,
// every error an *Error with a column inside the source, Eval's value a
// float64, bool or string, and Number's value finite.
func checkEval(t *testing.T, e *Expr, a, b float64, c string, flag bool) {
	t.Helper()
	src := e.Source()
	for _, r := range append(e.Vars(), e.Calls()...) {
		if r.Col < 0 || r.Col > len(src) || !strings.HasPrefix(src[r.Col:], r.Name) {
			t.Fatalf("%q: %q at %d is not where the name is", src, r.Name, r.Col)
		}
	}
	vars := map[string]any{"a": a, "b": b, "abc": a * b, "k": a / 1000, "M": b * 1e6, "n": int64(b), "c": c, "flag": flag}
	checkErr := func(what string, err error) {
		t.Helper()
		var xe *Error
		if !errors.As(err, &xe) || xe.Col < 0 || xe.Col > len(src) || xe.Msg == "" {
			t.Fatalf("%s(%q) with %v: error %#v; want an *Error with a column in the source and a message", what, src, vars, err)
		}
	}
	v, err := e.Eval(vars)
	if err != nil {
		checkErr("Eval", err)
	} else {
		switch v.(type) {
		case float64, bool, string:
		default:
			t.Fatalf("Eval(%q) with %v = %v (%T); want a float64, bool or string", src, vars, v, v)
		}
	}
	x, err := e.Number(vars)
	if err != nil {
		checkErr("Number", err)
		return
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		t.Fatalf("Number(%q) with %v = %v without an error", src, vars, x)
	}
	if f, ok := v.(float64); !ok || f != x {
		t.Fatalf("Number(%q) = %v but Eval = %v", src, x, v)
	}
}

// FuzzParseNumber: ParseNumber never panics, reads only finite values,
// reads what an expression reads; and every float64 written in a number
// form of the language (grouped, with a currency symbol, with k, M or %,
// with an exponent, rounded as a report prints it) reads back as itself
// within the rounding of the form.
func FuzzParseNumber(f *testing.F) {
	for _, s := range []string{"0", "0.11", ".5", "-3", "+3", "1,250,000", "1,250,000.50", "$480,000", "-$1,094,310", "€1,250.5",
		"£12", "¥900", "480k", "1.2M", "7%", "2.5%", "1e6", "2.5e-3", "1E+2", "1e400", "1e-400", "0.000000001%",
		"1,25", "480kg", "$-3", "1,000k", "99999999999999999999999999999999", "1,234,567,890,123,456,789"} {
		f.Add(s, 1234567.891)
	}
	for _, v := range []float64{0, -0.0, 1, -1, 0.07, 0.5, 999.5, 1000, 1e3 - 1e-9, 1234.5678, 1e15, 1e21, 1e300, -1e308,
		math.MaxFloat64, math.SmallestNonzeroFloat64, 5e-324, 2.2250738585072014e-308, 0.1 + 0.2} {
		f.Add("7%", v)
	}
	f.Fuzz(func(t *testing.T, s string, v float64) {
		checkParseNumber(t, s)
		checkNumberForms(t, v)
	})
}

// checkParseNumber: a number read is finite, and is what the same text
// compiled as an expression gives.
func checkParseNumber(t *testing.T, s string) {
	t.Helper()
	x, ok := ParseNumber(s)
	if !ok {
		if x != 0 {
			t.Fatalf("ParseNumber(%q) = %v, false; want 0 with false", s, x)
		}
		return
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		t.Fatalf("ParseNumber(%q) = %v", s, x)
	}
	e, err := Compile(s, Options{})
	if err != nil {
		t.Fatalf("ParseNumber(%q) = %v, but as an expression: %v", s, x, err)
	}
	y, err := e.Number(nil)
	if err != nil || y != x {
		t.Fatalf("ParseNumber(%q) = %v, but as an expression %v, %v", s, x, y, err)
	}
}

// groupDigits writes the integer digits s with a comma between groups of
// three: 1250000 -> 1,250,000.
func groupDigits(s string) string {
	var b strings.Builder
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	return b.String()
}

// grouped writes |v| with the given decimals (-1: as many as it takes to
// read back exactly) and thousands separators.
func grouped(v float64, decimals int) string {
	s := strconv.FormatFloat(math.Abs(v), 'f', decimals, 64)
	i, frac, _ := strings.Cut(s, ".")
	if frac != "" {
		return groupDigits(i) + "." + frac
	}
	return groupDigits(i)
}

// signed puts a minus before a negative amount (before the currency
// symbol, as a report writes it: -$1,094,310).
func signed(v float64, s string) string {
	if v < 0 {
		return "-" + s
	}
	return s
}

// checkNumberForms writes v in each number form and reads it back.
func checkNumberForms(t *testing.T, v float64) {
	t.Helper()
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return
	}
	type form struct {
		text string
		tol  float64 // how far the value read may be from v
	}
	// ulps is a tolerance of a few units in the last place of v, for a
	// form that scales v (k, M, %) before writing it: the scaled value and
	// the value read are each rounded once.
	ulps := func(n float64) float64 { return n * math.Abs(v) * 0x1p-52 }
	forms := []form{
		{signed(v, strconv.FormatFloat(math.Abs(v), 'f', -1, 64)), 0},
		{signed(v, strconv.FormatFloat(math.Abs(v), 'e', -1, 64)), 0},
		{signed(v, strconv.FormatFloat(math.Abs(v), 'E', -1, 64)), 0},
		{signed(v, grouped(v, -1)), 0},
		{signed(v, "$"+grouped(v, -1)), 0},
		{signed(v, "€"+grouped(v, -1)), 0},
		// as a report prints amounts and figures: whole units, cents,
		// four decimals
		{signed(v, "£"+grouped(v, 0)), 0.5 + ulps(1)},
		{signed(v, "¥"+grouped(v, 2)), 0.005 + ulps(1)},
		{signed(v, grouped(v, 4)), 0.00005 + ulps(1)},
	}
	// k, M and %: the value scaled, written as exactly as it reads back,
	// with the suffix. The value read must be the decimal written times
	// the suffix's power of ten, correctly rounded (want); and that is v
	// within the rounding of the scaling (dividing may lose digits of a
	// number near the smallest float64, and the shortest decimal of the
	// scaled value is within half its last place).
	for _, sfx := range []struct {
		s     string
		scale float64
		exp   string
	}{{"k", 1e3, "e3"}, {"M", 1e6, "e6"}, {"%", 1e-2, "e-2"}} {
		w := math.Abs(v / sfx.scale)
		if math.IsInf(w, 0) {
			continue // a % of a number near the largest float64
		}
		digits := strconv.FormatFloat(w, 'f', -1, 64)
		want, err := strconv.ParseFloat(digits+sfx.exp, 64)
		if v < 0 {
			want = -want
		}
		for _, text := range []string{signed(v, digits+sfx.s), signed(v, "$"+grouped(w, -1)+sfx.s)} {
			got, ok := ParseNumber(text)
			switch {
			case err != nil && ok:
				t.Fatalf("%q reads as %v; it is beyond the largest float64", text, got)
			case err != nil:
				// Out of range at the very top of float64: not read, as
				// it should be.
			case !ok:
				t.Fatalf("%v written %q does not read as a number", v, text)
			case got != want:
				t.Fatalf("%q reads as %v, want %v", text, got, want)
			case math.Abs(want-v) > ulps(4)+math.Abs(w*sfx.scale-math.Abs(v))+sfx.scale*0x1p-1074:
				t.Fatalf("%v written %q reads as %v (off by %g)", v, text, got, got-v)
			}
		}
	}
	for _, fm := range forms {
		got, ok := ParseNumber(fm.text)
		if !ok {
			t.Fatalf("%v written %q does not read as a number", v, fm.text)
		}
		if math.Abs(got-v) > fm.tol || math.Signbit(got) != math.Signbit(v) && got != 0 {
			t.Fatalf("%v written %q reads as %v (off by %g, tolerance %g)", v, fm.text, got, got-v, fm.tol)
		}
	}
}
