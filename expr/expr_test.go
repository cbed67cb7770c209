package expr

import (
	"errors"
	"fmt"
	"math"
	"math/rand"
	"strconv"
	"strings"
	"sync"
	"testing"
)

// numArgs checks that args are n (at most 3) numbers.
func numArgs(name string, args []any, n int) (out [3]float64, err error) {
	if len(args) != n {
		return out, fmt.Errorf("%s takes %d arguments, got %d", name, n, len(args))
	}
	for i, a := range args {
		f, ok := a.(float64)
		if !ok {
			return out, fmt.Errorf("%s: argument %d is not a number", name, i+1)
		}
		out[i] = f
	}
	return out, nil
}

var presentWorths = map[string]float64{"steel": -1094310.52, "wedge-wire": -1200000, "screens": 1}

func testOptions() Options {
	return Options{
		Funcs: map[string]Func{
			"pf": func(args ...any) (any, error) {
				a, err := numArgs("pf", args, 2)
				if err != nil {
					return nil, err
				}
				return math.Pow(1+a[0], -a[1]), nil
			},
			"pa": func(args ...any) (any, error) {
				a, err := numArgs("pa", args, 2)
				if err != nil {
					return nil, err
				}
				i, n := a[0], a[1]
				return (1 - math.Pow(1+i, -n)) / i, nil
			},
			"half": func(args ...any) (any, error) {
				a, err := numArgs("half", args, 1)
				if err != nil {
					return nil, err
				}
				return a[0] / 2, nil
			},
			"count": func(args ...any) (any, error) { return len(args), nil },
			"pw": func(args ...any) (any, error) {
				if len(args) != 1 {
					return nil, fmt.Errorf("pw takes one alternative, got %d arguments", len(args))
				}
				id, _ := args[0].(string)
				v, ok := presentWorths[id]
				if !ok {
					return nil, fmt.Errorf("no alternative %q", args[0])
				}
				return v, nil
			},
			"ids": func(args ...any) (any, error) {
				s := make([]string, len(args))
				for i, a := range args {
					s[i] = fmt.Sprintf("%T:%v", a, a)
				}
				return strings.Join(s, "|"), nil
			},
			"best": func(args ...any) (any, error) { return "steel", nil },
			"boom": func(args ...any) (any, error) { panic("kaput") },
		},
		IDArgFuncs: []string{"pw", "ids", "best"},
	}
}

var testVars = map[string]any{
	"a": 3.0, "b": 4.0, "i": 0.07, "n": 10.0, "life": 24, "name": "steel",
	"power_kwh": 120000.0, "power_price": 0.11, "flag": true, "small": float32(0.5),
}

func mustCompile(t testing.TB, src string) *Expr {
	t.Helper()
	e, err := Compile(src, testOptions())
	if err != nil {
		t.Fatalf("Compile(%q): %v", src, err)
	}
	return e
}

func TestParseNumber(t *testing.T) {
	good := []struct {
		src  string
		want float64
	}{
		{"0", 0},
		{"0.11", 0.11},
		{".5", 0.5},
		{"-3", -3},
		{"+3", 3},
		{"  42  ", 42},
		{"1,250,000", 1250000},
		{"1,250,000.50", 1250000.5},
		{"12,500", 12500},
		{"$480,000", 480000},
		{"$480k", 480000},
		{"-$1,094,310", -1094310},
		{"€1,250.5", 1250.5},
		{"£12", 12},
		{"¥900", 900},
		{"480k", 480000},
		{"65k", 65000},
		{"1.2M", 1200000},
		{"2.5M", 2500000},
		{"7%", 0.07},
		{"2.5%", 0.025},
		{"100%", 1},
		{"1e6", 1e6},
		{"2.5e-3", 0.0025},
		{"1E+2", 100},
	}
	for _, c := range good {
		got, ok := ParseNumber(c.src)
		if !ok || got != c.want {
			t.Errorf("ParseNumber(%q) = %v, %v; want %v, true", c.src, got, ok, c.want)
		}
	}
	bad := []string{"", " ", "$", "abc", "1 + 2", "480kg", "7%%", "1,25", "1,2345", "1.2.3", "k", "1k5",
		"5m", "12,500,", "1e", "--3", "$-3", "0x10", "1_000", "7 %", "M1"}
	for _, src := range bad {
		if got, ok := ParseNumber(src); ok {
			t.Errorf("ParseNumber(%q) = %v, true; want false", src, got)
		}
	}
}

func TestNumberForms(t *testing.T) {
	cases := []struct {
		src  string
		want float64
	}{
		{"1,250,000", 1250000},
		{"$1,250,000", 1250000},
		{"$480k", 480000},
		{"480k + 12,500", 492500},
		{"1.2M", 1.2e6},
		{"-1.5M", -1.5e6},
		{"7%", 0.07},
		{"2.5% * 100", 2.5},
		{"€1,000 + £1,000 + ¥1,000", 3000},
		{"$.5", 0.5},
		{"1,000.25", 1000.25},
		{"1,000k", 1e6},
		{"1e3", 1000},
		{"12,500 * 3", 37500},
		// a % that does not follow a number directly is the remainder
		{"7 % 3", 1},
		{"a % 2", 1},
		{"(7) % 4", 3},
		{"7% * 10", 0.7},
		{"half(1,250,000)", 625000},
	}
	for _, c := range cases {
		got, err := mustCompile(t, c.src).Number(testVars)
		if err != nil || math.Abs(got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%q = %v, %v; want %v", c.src, got, err, c.want)
		}
	}
}

func TestCommas(t *testing.T) {
	cases := []struct {
		src  string
		want string // what count/ids report: the arguments as read
	}{
		{"count(7%, 10)", "2"},
		{"count(7%,10)", "2"},        // "10" is not three digits
		{"count(7,100)", "1"},        // thousands separator: count(7100)
		{"count(7, 100)", "2"},       // a comma and a space always separate
		{"count(1,250,000)", "1"},    // one number
		{"count(1,250,000, 5)", "2"}, // one number, then another argument
		{"count(0.5,100)", "2"},      // no separators after a decimal point
		{"count(1,2345)", "2"},       // four digits: not a group
		{"count(1,25)", "2"},         // two digits: not a group
		{"count(a,100)", "2"},        // only digits group
		{"count()", "0"},
		{"ids(1,250)", "float64:1250"},
		{"ids(0.07, 10)", "float64:0.07|float64:10"},
	}
	for _, c := range cases {
		v, err := mustCompile(t, c.src).Eval(testVars)
		if err != nil || fmt.Sprint(v) != c.want {
			t.Errorf("%q = %v, %v; want %s", c.src, v, err, c.want)
		}
	}

	// pf(7,100) reads as pf(7100), and the arity error says so.
	_, err := mustCompile(t, "2 * pf(7,100)").Number(nil)
	var xe *Error
	if !errors.As(err, &xe) || xe.Col != 4 ||
		!strings.Contains(xe.Msg, "pf takes 2 arguments, got 1") || !strings.Contains(xe.Msg, `"7,100" is read as one number, 7100`) {
		t.Errorf("pf(7,100): got %#v", err)
	}
}

func TestOperators(t *testing.T) {
	cases := []struct {
		src  string
		want any
	}{
		{"a * b + pf(0.07, 10)", 12 + math.Pow(1.07, -10)},
		{"(1+i)^n", math.Pow(1.07, 10)},
		{"(1 + i) ** n", math.Pow(1.07, 10)},
		{"2^3^2", 512.0},    // right-associative
		{"-2^2", -4.0},      // minus binds looser than power
		{"2^-1", 0.5},       // signed exponent
		{"-a^2", -9.0},      // same with a variable
		{"(-a)^2", 9.0},     // parentheses win
		{"a*-b", -12.0},     // a sign right after an operator
		{"a - -b", 7.0},     // double minus
		{"- -a", 3.0},       // double sign
		{"+a", 3.0},         // unary plus
		{"1 - 2 - 3", -4.0}, // left-associative
		{"100 - 10 - 5 - 1", 84.0},
		{"8 / 4 / 2", 1.0},
		{"a / b * 2", 1.5},
		{"2 + 3 * 4 ^ 2", 50.0},
		{"power_kwh * power_price", 13200.0},
		{"life * 2", 48.0}, // integers from the caller become float64
		{"small", 0.5},     // and so do float32s
		{"a < b", true},
		{"a >= b || a == 3", true},
		{"a > 1 && b < 1", false},
		{"!(a > b)", true},
		{"!flag", false},
		{"1 + 1 == 2", true},
		{"name == \"steel\"", true},
		{"name != 'steel'", false},
		{"'abc' < 'abd'", true},
		{"a > b ? 1 : 2", 2.0},
		{"a < b ? 1 : 2", 1.0},
		{"a > 5 ? 1 : a > 2 ? 2 : 3", 2.0}, // nests to the right
		{"(a < b ? a : b) * 10", 30.0},
		{"half(half(a * 4))", 3.0},
		{"pa(i, n) * 1,000", (1 - math.Pow(1.07, -10)) / 0.07 * 1000},
		{"true", true},
		{"\"text\"", "text"},
		{"'it\\'s'", "it's"},
		{"\"€ & ü\"", "€ & ü"},
		{"3 * 2", 6.0},
	}
	for _, c := range cases {
		got, err := mustCompile(t, c.src).Eval(testVars)
		if err != nil {
			t.Errorf("%q: %v", c.src, err)
			continue
		}
		if f, ok := c.want.(float64); ok {
			g, isF := got.(float64)
			if !isF || math.Abs(g-f) > 1e-12*math.Max(1, math.Abs(f)) {
				t.Errorf("%q = %#v; want %v", c.src, got, f)
			}
			continue
		}
		if got != c.want {
			t.Errorf("%q = %#v; want %#v", c.src, got, c.want)
		}
	}
}

func TestIDArgs(t *testing.T) {
	cases := []struct {
		src  string
		want any
	}{
		{"pw(steel)", -1094310.52},
		{`pw("wedge-wire")`, -1200000.0},
		{`pw('wedge-wire')`, -1200000.0},
		{"pw(steel) > -1.5M", true},
		{"pw(steel) > -1.5M && pw(steel) < 0", true},
		{`best(screens) == "steel"`, true},
		{`best() == "steel"`, true},
		{"ids(steel, screens)", "string:steel|string:screens"},
		{"ids(_x1, a2_b)", "string:_x1|string:a2_b"},
		{`ids(steel, "wedge-wire")`, "string:steel|string:wedge-wire"},
		{"ids(a + 1)", "float64:4"},     // not a bare identifier: a variable
		{"ids(half(a))", "float64:1.5"}, // a call stays a call
		{"ids(steel, 7%)", "string:steel|float64:0.07"},
		{"count(steel)", 1.0}, // count is not an id function: steel is a variable
	}
	for _, c := range cases {
		vars := map[string]any{"a": 3.0, "steel": 1.0}
		got, err := mustCompile(t, c.src).Eval(vars)
		if err != nil || got != c.want {
			t.Errorf("%q = %#v, %v; want %#v", c.src, got, err, c.want)
		}
	}
	e := mustCompile(t, "ids(steel, a * 2) + pw(steel)")
	if v := e.Vars(); len(v) != 1 || v[0] != (Ref{"a", 11}) {
		t.Errorf("Vars() = %v; ids must not be variables", v)
	}
}

func TestRefs(t *testing.T) {
	cases := []struct {
		src   string
		vars  []Ref
		calls []Ref
	}{
		{"a * b + pf(0.07, 10)", []Ref{{"a", 0}, {"b", 4}}, []Ref{{"pf", 8}}},
		{"$1,250,000 + x", []Ref{{"x", 13}}, nil},
		{"€12 * price", []Ref{{"price", 8}}, nil}, // € is three bytes
		{"  power_kwh*power_price", []Ref{{"power_kwh", 2}, {"power_price", 12}}, nil},
		{`"a b" == c && pw(steel) > d`, []Ref{{"c", 9}, {"d", 26}}, []Ref{{"pw", 14}}},
		{"half(half(x)) + half(x)", []Ref{{"x", 10}, {"x", 21}}, []Ref{{"half", 0}, {"half", 5}, {"half", 16}}},
		{"größe + 1", []Ref{{"größe", 0}}, nil},
	}
	for _, c := range cases {
		e := mustCompile(t, c.src)
		if fmt.Sprint(e.Vars()) != fmt.Sprint(c.vars) || fmt.Sprint(e.Calls()) != fmt.Sprint(c.calls) {
			t.Errorf("%q: Vars %v Calls %v; want %v %v", c.src, e.Vars(), e.Calls(), c.vars, c.calls)
		}
		for _, r := range append(e.Vars(), e.Calls()...) {
			if !strings.HasPrefix(c.src[r.Col:], r.Name) {
				t.Errorf("%q: %q at %d points at %q", c.src, r.Name, r.Col, c.src[r.Col:])
			}
		}
		if e.Source() != c.src {
			t.Errorf("Source() = %q", e.Source())
		}
	}
}

func TestCompileErrors(t *testing.T) {
	cases := []struct {
		src string
		col int
		msg string
	}{
		{"", 0, "empty expression"},
		{"   ", 0, "empty expression"},
		{"1 +", 2, `ends too early: expected a value after "+"`},
		{"a * (b +", 4, `"(" is never closed`},
		{"((", 1, `"(" is never closed`},
		{"(a + b", 0, `"(" is never closed`},
		{"a + b)", 5, `unexpected ")"`},
		{"()", 1, `expected a value between "(" and ")"`},
		{"a b", 2, `expected an operator before "b"`},
		{"2(a + b)", 1, `expected an operator before "("`},
		{"(a b)", 3, `expected an operator or ")" before "b"`},
		{`"abc`, 0, "unterminated string"},
		{`'abc"`, 0, "unterminated string"},
		{`pw("steel\`, 3, "unterminated string"},
		{`a + \`, 4, "unexpected backslash"},
		{`1 +\`, 3, "unexpected backslash"},
		{"480kg", 3, `unexpected "kg" right after the number "480"`},
		{"5m", 1, `unexpected "m"`},
		{"7%3", 2, `unexpected "3" right after the number "7%"`},
		{"1.2.3", 0, `malformed number "1.2.3"`},
		{"$ 5", 0, `expected a number after "$"`},
		{"prix_€ * 2", 5, `expected a number after "€"`},
		{"a = b", 2, "use == to compare"},
		{"a & b", 2, "use &&"},
		{"a @ b", 2, `unexpected character '@'`},
		{"3 × 4", 2, "use * to multiply"},
		{"[a]", 0, "group with ( and )"},
		{"a # note", 2, "comment"},
		{"pq(steel)", 0, `unknown function "pq"; did you mean "pw"?`},
		{"zzzzzz(1)", 0, `unknown function "zzzzzz"`},
		{"pf", 0, "pf is a function; call it with parentheses"},
		{"pf(7%, )", 7, `expected a value between "," and ")"`},
		{"pf(7% 10)", 6, `expected an operator, "," or ")" before "10"`},
		{"pf(,1)", 3, `expected a value between "(" and ","`},
		{"1,25", 1, `thousands separator takes groups of exactly three digits`},
		{"a, b", 1, `unexpected "," outside the parentheses`},
		{"1 < 2 < 3", 6, "comparisons cannot be chained"},
		{"a ? b", 5, `expected ":" (write condition ? value if true : value if false)`},
		{"a ? b c", 6, `expected ":" before "c"`},
		{"a : b", 2, `unexpected ":" without a "?"`},
		{"a %", 2, "remainder operator"},
		{"7 %", 2, "remainder operator"},
		{"5k%", 2, "only one of the suffixes"},
		{"* 3", 0, `expected a value before "*"`},
		{"a + * b", 4, `expected a value between "+" and "*"`},
		{"pw(wedge-wire)", 3, `an id holding "-" must be quoted: pw("wedge-wire")`},
		{"ids(steel, screen-2)", 11, `must be quoted: ids("screen-2")`},
		{"a\xff", 1, "not UTF-8"},
		{"1e999999", 0, "out of range"},
	}
	for _, c := range cases {
		e, err := Compile(c.src, testOptions())
		var xe *Error
		if !errors.As(err, &xe) {
			t.Errorf("Compile(%q) = %v, %v; want *Error", c.src, e, err)
			continue
		}
		if xe.Col != c.col || !strings.Contains(xe.Msg, c.msg) {
			t.Errorf("Compile(%q): col %d %q; want col %d containing %q", c.src, xe.Col, xe.Msg, c.col, c.msg)
		}
	}
}

func TestEvalErrors(t *testing.T) {
	cases := []struct {
		src    string
		col    int
		msg    string
		number bool // use Number rather than Eval
	}{
		{"a + pwer_price", 4, `unknown name "pwer_price"; did you mean "power_price"?`, false},
		{"2 * qqqqqqq", 4, `unknown name "qqqqqqq"`, false},
		{"a + name * 2", 9, `"*" needs numbers, got 'steel'`, false},
		{"a ^ name", 2, `"^" needs numbers, got 'steel'`, false},
		{"-name", 0, `"-" needs numbers, got 'steel'`, false},
		{"a && flag", 2, `"&&" needs true/false conditions, got '3'`, false},
		{"a ? 1 : 2", 2, `the condition before "?" must be true or false`, false},
		{"a < name", 2, `"<" compares two numbers or two strings`, false},
		{"1 + pw(copper)", 4, `pw: no alternative "copper"`, false},
		{"half(1, 2)", 0, "half takes 1 arguments, got 2", false},
		{"a + boom()", 4, "boom failed: kaput", false},
		{"a > b", 0, "true/false condition", true},
		{"name", 0, `the text "steel"`, true},
		// Division, remainder and power report a result that is not
		// finite at the operator (checked.go).
		{"a / 0", 2, "division by zero", true},
		{"0 / 0", 2, "division by zero", true},
		{"a % 0", 2, "division by zero", true},
		{"0 ^ -1", 2, "0 to a negative power", true},
		{"(-8) ^ (1/3)", 5, "a negative number to a fractional power ((-8)^0.3333)", true},
		{"10 ^ 400", 3, "past the largest number", true},
		{"a / (2 - 2) > 1", 2, "division by zero", false},
		{"1e308 * 10", 0, "infinite", true},
	}
	for _, c := range cases {
		e := mustCompile(t, c.src)
		var err error
		if c.number {
			_, err = e.Number(testVars)
		} else {
			_, err = e.Eval(testVars)
		}
		var xe *Error
		if !errors.As(err, &xe) {
			t.Errorf("%q: got %v; want *Error", c.src, err)
			continue
		}
		if xe.Col != c.col || !strings.Contains(xe.Msg, c.msg) {
			t.Errorf("%q: col %d %q; want col %d containing %q", c.src, xe.Col, xe.Msg, c.col, c.msg)
		}
	}
	// nil variables: every name is unknown, nothing panics
	if _, err := mustCompile(t, "x + 1").Eval(nil); err == nil || !strings.Contains(err.Error(), `unknown name "x"`) {
		t.Errorf("Eval(nil) = %v", err)
	}
}

// TestNoPanic feeds malformed and random input through Compile and Eval.
func TestNoPanic(t *testing.T) {
	inputs := []string{`\`, `a\`, `"\`, `'\`, `((`, `))`, `1 +`, `"abc`, `(`, `)`, `,`, `%`, `^`, `?`, `:`, `!`,
		`pf(`, `pf(,`, `pf)`, `$`, `€`, `1,`, `1,0`, `.`, `..5`, `1e`, `1e+`, "\x00", "\xff\xfe", `[`, `]`,
		`a ? : b`, `? 1 : 2`, `pw(-)`, `pw(a-)`, `ids(a-b-`, `1 ?? 2`, `a =~ b`, `a in (1, 2)`, `~a`, `a || `}
	rng := rand.New(rand.NewSource(1))
	alphabet := []byte("0123456789.,$%kM()+-*/^<>=!&|?:\"'\\ abcpfw_\xff\xe2\x82\xac")
	for range 3000 {
		b := make([]byte, rng.Intn(14))
		for j := range b {
			if rng.Intn(4) == 0 {
				b[j] = byte(rng.Intn(256))
			} else {
				b[j] = alphabet[rng.Intn(len(alphabet))]
			}
		}
		inputs = append(inputs, string(b))
	}
	for _, src := range inputs {
		checkNoPanic(t, src)
	}
}

func checkNoPanic(t *testing.T, src string) {
	t.Helper()
	defer func() {
		if r := recover(); r != nil {
			t.Fatalf("%q: panic %v", src, r)
		}
	}()
	ParseNumber(src)
	e, err := Compile(src, testOptions())
	if err != nil {
		var xe *Error
		if !errors.As(err, &xe) || xe.Col < 0 || xe.Col > len(src) || xe.Msg == "" {
			t.Fatalf("Compile(%q) = %#v", src, err)
		}
		return
	}
	vars := map[string]any{"a": 1.0, "b": 2.0, "c": "x", "abc": 3.0, "k": 0.5, "M": 2.0}
	if _, err := e.Number(vars); err != nil {
		var xe *Error
		if !errors.As(err, &xe) {
			t.Fatalf("Number(%q) = %#v; want *Error", src, err)
		}
	}
}

func TestClosest(t *testing.T) {
	funcs := []string{"af", "ag", "ap", "aw", "bc", "best", "fa", "fp", "fw", "irr", "pa", "payback", "pf", "pg", "pgeo", "pw"}
	cases := []struct {
		name       string
		candidates []string
		want       string
	}{
		{"pq", funcs, "pw"}, // q is next to w
		{"pd", funcs, "pf"}, // d is next to f
		{"bets", funcs, "best"},
		{"PW", funcs, "pw"},
		{"paybak", funcs, "payback"},
		{"irrr", funcs, "irr"},
		{"xyzzy", funcs, ""},
		{"power_prise", []string{"power_kwh", "power_price", "crew_rate"}, "power_price"},
		{"overhual", []string{"overhaul", "over"}, "overhaul"},
		{"rate", []string{"crew_rate"}, ""}, // 5 edits: too far
		{"maintenance_cst", []string{"maintenance_cost"}, "maintenance_cost"},
		{"x", nil, ""},
	}
	for _, c := range cases {
		if got := Closest(c.name, c.candidates); got != c.want {
			t.Errorf("Closest(%q) = %q; want %q", c.name, got, c.want)
		}
	}
}

func TestConcurrentEval(t *testing.T) {
	e := mustCompile(t, "a * b + pf(i, n)")
	want := 12 + math.Pow(1.07, -10)
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Go(func() {
			vars := map[string]any{"a": 3.0, "b": 4.0 + float64(g), "i": 0.07, "n": 10.0}
			for range 1000 {
				v, err := e.Number(vars)
				if err != nil || math.Abs(v-(want+3*float64(g))) > 1e-9 {
					t.Errorf("goroutine %d: %v, %v", g, v, err)
					return
				}
			}
		})
	}
	wg.Wait()
}

// FuzzCompile compiles arbitrary text, then evaluates it with arbitrary
// values of the variables (checkEval, in fuzz_test.go).
func FuzzCompile(f *testing.F) {
	for _, s := range []string{
		"a * b + pf(0.07, 10)", "$1,250,000", "480k + 1.2M * 7%", "pw(steel) > -1.5M",
		`best(screens) == "steel"`, `pw("wedge-wire")`, "(1+i)^n", "pf(7,100)", "1 +", `a\`,
		`"abc`, "((", "a > b ? 1 : 2", "€12,500.50 % 7",
		"a / b", "a ^ b", "(-a) ^ 0.5", "pf(a, b) * pa(a, n)", "c + a", "flag ? c : a", "abc % b", "-k * M ^ n", "!flag && a < b",
	} {
		f.Add(s, 3.0, 4.0, "x", true)
	}
	for _, v := range [][2]float64{{0, 0}, {-1, 0.5}, {1e308, 10}, {math.Inf(1), 1}, {math.NaN(), -2}, {5e-324, -1e308}} {
		f.Add("a / b + a * b - a ^ b + pa(a, b)", v[0], v[1], "", false)
	}
	f.Fuzz(func(t *testing.T, src string, a, b float64, c string, flag bool) {
		checkNoPanic(t, src)
		if e, err := Compile(src, testOptions()); err == nil {
			checkEval(t, e, a, b, c, flag)
		}
	})
}

func BenchmarkEval(b *testing.B) {
	e := mustCompile(b, "a * b + pf(0.07, 10)")
	vars := map[string]any{"a": 3.0, "b": 4.0}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := e.Number(vars); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkEvalConstant(b *testing.B) {
	e := mustCompile(b, "$480,000")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := e.Number(nil); err != nil {
			b.Fatal(err)
		}
	}
}

// TestPrecedenceRandom builds random arithmetic trees, writes them with only
// the parentheses the documented precedence requires, and checks that the
// compiled expression (evaluated by govaluate, with variables) and its
// constant-folded twin (with the numbers written in) both give the tree's value.
func TestPrecedenceRandom(t *testing.T) {
	type tree struct {
		op          string // "" for a leaf, "neg" for unary minus
		left, right *tree
		leaf        int
	}
	vals := []float64{1.5, 2, 0.5, 3}
	prec := func(n *tree) int {
		switch n.op {
		case "+", "-":
			return 1
		case "*", "/", "%":
			return 2
		case "neg":
			return 3
		case "^":
			return 4
		}
		return 5
	}
	var eval func(n *tree) float64
	eval = func(n *tree) float64 {
		switch n.op {
		case "":
			return vals[n.leaf]
		case "neg":
			return -eval(n.left)
		}
		op := n.op
		if op == "^" {
			op = "**"
		}
		v, _ := fold(op, eval(n.left), eval(n.right))
		return v
	}
	// nonFinite reports whether a step of n is not a finite number.
	var nonFinite func(n *tree) bool
	nonFinite = func(n *tree) bool {
		if n.op == "" {
			return false
		}
		v := eval(n)
		return math.IsNaN(v) || math.IsInf(v, 0) || nonFinite(n.left) || n.right != nil && nonFinite(n.right)
	}
	var write func(n *tree, leaf func(int) string) string
	write = func(n *tree, leaf func(int) string) string {
		wrap := func(c *tree, need bool) string {
			if need {
				return "(" + write(c, leaf) + ")"
			}
			return write(c, leaf)
		}
		switch n.op {
		case "":
			return leaf(n.leaf)
		case "neg":
			return "-" + wrap(n.left, prec(n.left) < 3)
		case "^":
			return wrap(n.left, prec(n.left) <= 4) + "^" + wrap(n.right, prec(n.right) < 3)
		}
		p := prec(n)
		return wrap(n.left, prec(n.left) < p) + " " + n.op + " " + wrap(n.right, prec(n.right) <= p)
	}
	rng := rand.New(rand.NewSource(7))
	var gen func(depth int) *tree
	gen = func(depth int) *tree {
		if depth == 0 || rng.Intn(4) == 0 {
			return &tree{leaf: rng.Intn(len(vals))}
		}
		ops := []string{"+", "-", "*", "/", "%", "^", "neg"}
		op := ops[rng.Intn(len(ops))]
		if op == "neg" {
			return &tree{op: op, left: gen(depth - 1)}
		}
		return &tree{op: op, left: gen(depth - 1), right: gen(depth - 1)}
	}
	vars := map[string]any{"v0": vals[0], "v1": vals[1], "v2": vals[2], "v3": vals[3]}
	for range 2000 {
		n := gen(4)
		want := eval(n)
		for _, src := range []string{
			write(n, func(i int) string { return fmt.Sprintf("v%d", i) }),
			write(n, func(i int) string { return strconv.FormatFloat(vals[i], 'f', -1, 64) }),
		} {
			got, err := mustCompile(t, src).Eval(vars)
			if err != nil && nonFinite(n) {
				continue // reported at the operator (checked.go)
			}
			g, _ := got.(float64)
			if err != nil || !(g == want || math.IsNaN(g) && math.IsNaN(want) || math.Abs(g-want) <= 1e-9*math.Abs(want)) {
				t.Fatalf("%q = %v, %v; want %v", src, got, err, want)
			}
		}
	}
}
