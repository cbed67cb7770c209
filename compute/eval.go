package compute

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"unicode/utf8"

	"worth/expr"
	"worth/parse"
)

// env evaluates expressions of one memo: the assumptions as variables, the
// factor functions always, and the result functions where results exist.
type env struct {
	file  string
	errs  *parse.ErrorList
	vars  map[string]any
	names []string
	opts  expr.Options
	// results answers result functions; nil until the comparisons are done.
	results *resultFuncs
	cache   map[string]*expr.Expr
	// frontRateFailed is set when the front matter's rate could not be
	// read (already reported), so comparisons do not report it missing.
	frontRateFailed bool
	// overrides, when set, fix assumptions' values and the rate (Recompute).
	overrides *Overrides
	// tax holds the memo's tax rate, inflation and money basis
	// (aftertax.go).
	tax *taxSettings
	// na is the measure that did not apply in the evaluation under way
	// (see notApplicableIn).
	na *notApplicable
	// limits are the memo's bounds and scheduleYears the rows of the
	// comparisons so far (limits.go).
	limits        parse.Limits
	scheduleYears int
}

// factorFuncs are the compound-interest factors callable in expressions,
// in the trade's notation: pf(i, n) is (P/F, i, n), and so on.
var factorFuncs = map[string]func(i, n float64) float64{
	"pf": PF, "fp": FP, "pa": PA, "ap": AP, "fa": FA, "af": AF, "pg": PG, "ag": AG,
}

// resultNames are the functions that read computed results.
var resultNames = []string{"pw", "aw", "fw", "irr", "bc", "payback", "best"}

func newEnv(file string, errs *parse.ErrorList) *env {
	e := &env{file: file, errs: errs, vars: map[string]any{}, cache: map[string]*expr.Expr{}}
	funcs := map[string]expr.Func{}
	for name, f := range factorFuncs {
		name, f := name, f
		funcs[name] = func(args ...any) (any, error) {
			x, err := numArgs(name, args, 2, "(i, n)")
			if err != nil {
				return nil, err
			}
			if x[0] <= -1 {
				return nil, fmt.Errorf("%s: the rate must be above -100%%", name)
			}
			return f(x[0], x[1]), nil
		}
	}
	funcs["pgeo"] = func(args ...any) (any, error) {
		x, err := numArgs("pgeo", args, 3, "(g, i, n)")
		if err != nil {
			return nil, err
		}
		// Fix (limits): as for the other factors; it gave NaN.
		if x[1] <= -1 || x[0] <= -1 {
			return nil, fmt.Errorf("pgeo: the rate and the growth must be above -100%%")
		}
		return PGeo(x[0], x[1], x[2]), nil
	}
	for _, name := range resultNames {
		name := name
		funcs[name] = func(args ...any) (any, error) {
			if e.results == nil {
				return nil, fmt.Errorf("%s() reads a computed result and can be used only in expect blocks and inline values", name)
			}
			v, err := e.results.call(name, args)
			var na notApplicable
			if errors.As(err, &na) {
				e.na = &na
			}
			return v, err
		}
	}
	e.opts = expr.Options{Funcs: funcs, IDArgFuncs: resultNames}
	return e
}

func numArgs(name string, args []any, n int, sig string) ([]float64, error) {
	if len(args) != n {
		return nil, fmt.Errorf("%s%s takes %d values, got %d", name, sig, n, len(args))
	}
	out := make([]float64, n)
	for i, a := range args {
		f, ok := a.(float64)
		if !ok {
			return nil, fmt.Errorf("%s%s takes numbers, got %v", name, sig, a)
		}
		out[i] = f
	}
	return out, nil
}

// posIn returns the position of byte offset col inside t.
func posIn(t parse.Text, col int) parse.Pos {
	if col < 0 || col > len(t.Src) {
		col = 0
	}
	return t.Pos.Shift(utf8.RuneCountInString(t.Src[:col]))
}

// compile compiles t, reporting errors at their position. allowResults says
// whether result functions may be called.
func (e *env) compile(t parse.Text, allowResults bool) *expr.Expr {
	return e.compileFor(t, allowResults, "")
}

// compileFor is compile with the name of the value being read, which
// prefixes a syntax error ("rate: ...").
func (e *env) compileFor(t parse.Text, allowResults bool, what string) *expr.Expr {
	x, ok := e.cache[t.Src]
	if !ok {
		var err error
		x, err = expr.Compile(t.Src, e.opts)
		if err != nil {
			if what != "" {
				var xe *expr.Error
				if errors.As(err, &xe) {
					err = &expr.Error{Col: xe.Col, Msg: fmt.Sprintf("cannot read %s %q: %s", what, t.Src, xe.Msg)}
				}
			}
			e.exprError(t, err)
			return nil
		}
		e.cache[t.Src] = x
	}
	bad := false
	if !allowResults {
		for _, c := range x.Calls() {
			for _, r := range resultNames {
				if c.Name == r {
					e.errs.Add(posIn(t, c.Col), "%s() reads a computed result and can be used only in expect blocks and inline values", r)
					bad = true
				}
			}
		}
	}
	for _, v := range x.Vars() {
		if _, ok := e.vars[v.Name]; !ok {
			// Fix (fuzzing, FuzzPipeline): a name whose own assumption
			// failed (1/0, a cycle) was reported as unknown, "did you mean"
			// itself; its error is reported where it is defined.
			if _, defined := slices.BinarySearch(e.names, v.Name); !defined {
				e.unknownName(t, v)
			}
			bad = true
		}
	}
	if bad {
		return nil
	}
	return x
}

func (e *env) unknownName(t parse.Text, v expr.Ref) {
	msg := fmt.Sprintf("unknown name %q", v.Name)
	if s := expr.Closest(v.Name, e.names); s != "" {
		msg += fmt.Sprintf("; did you mean %q?", s)
	} else if len(e.names) == 0 {
		msg += "; define it in an assume block (name = value)"
	} else {
		msg += "; define it in an assume block"
	}
	e.errs.Add(posIn(t, v.Col), "%s", msg)
}

func (e *env) exprError(t parse.Text, err error) {
	var xe *expr.Error
	if errors.As(err, &xe) {
		e.errs.Add(posIn(t, xe.Col), "%s", xe.Msg)
		return
	}
	e.errs.Add(t.Pos, "%s", err.Error())
}

// number evaluates t to a finite number; what names the value in errors.
func (e *env) number(t parse.Text, what string) (float64, bool) {
	x := e.compile(t, false)
	if x == nil {
		return 0, false
	}
	v, err := x.Number(e.vars)
	if err != nil {
		e.exprError(t, fmt.Errorf("%s: %w", what, err))
		return 0, false
	}
	return v, true
}

// year evaluates t to a whole number of years >= min.
func (e *env) year(t parse.Text, what string, min int) (int, bool) {
	v, ok := e.number(t, what)
	if !ok {
		return 0, false
	}
	if v != math.Trunc(v) || v < float64(min) {
		e.errs.Add(t.Pos, "%s must be a whole number of years of at least %d, got %s", what, min, trimFloat(v))
		return 0, false
	}
	// Fix (limits): a year past the bound said "at least 1", as if it were
	// too small.
	if v > MaxYear {
		e.errs.Add(t.Pos, "%s is %s years, past the %s years worth accepts", what, trimFloat(v), parse.Thousands(MaxYear))
		return 0, false
	}
	return int(v), true
}

func trimFloat(v float64) string {
	return strings.TrimSuffix(strings.TrimRight(fmt.Sprintf("%.6f", v), "0"), ".")
}

// assumptions evaluates every assume line in dependency order, so a name
// may use names defined anywhere in the memo; a cycle is an error.
func (e *env) assumptions(memo *parse.Memo) []*Assumption {
	var items []*parse.Assumption
	for _, b := range memo.Blocks {
		if a, ok := b.(*parse.Assume); ok {
			items = append(items, a.Items...)
		}
	}
	byName := map[string]*parse.Assumption{}
	for _, it := range items {
		byName[it.Name] = it
		e.names = append(e.names, it.Name)
		if _, isFunc := e.opts.Funcs[it.Name]; isFunc {
			e.errs.Add(it.NamePos, "%s is the name of a function; choose another name", it.Name)
		}
	}
	sort.Strings(e.names)
	out := map[string]*Assumption{}
	state := map[string]int{} // 1 visiting, 2 done
	var visit func(it *parse.Assumption, stack []string) bool
	visit = func(it *parse.Assumption, stack []string) bool {
		switch state[it.Name] {
		case 2:
			_, ok := out[it.Name]
			return ok
		case 1:
			e.errs.Add(it.NamePos, "%s is defined in terms of itself: %s", it.Name, strings.Join(append(stack, it.Name), " -> "))
			return false
		}
		state[it.Name] = 1
		if e.overrides != nil {
			if v, ok := e.overrides.Values[it.Name]; ok {
				e.vars[it.Name] = v
				out[it.Name] = &Assumption{Name: it.Name, Value: v, Expr: it.Expr.Src, Line: it.Line}
				state[it.Name] = 2
				return true
			}
		}
		x, err := expr.Compile(it.Expr.Src, e.opts)
		ok := true
		if err != nil {
			e.exprError(it.Expr, err)
			ok = false
		} else {
			for _, c := range x.Calls() {
				for _, r := range resultNames {
					if c.Name == r {
						e.errs.Add(posIn(it.Expr, c.Col), "%s() reads a computed result and can be used only in expect blocks and inline values", r)
						ok = false
					}
				}
			}
			for _, v := range x.Vars() {
				dep, defined := byName[v.Name]
				if !defined {
					e.unknownName(it.Expr, v)
					ok = false
					continue
				}
				if !visit(dep, append(stack, it.Name)) {
					ok = false
				}
			}
		}
		if ok {
			v, err := x.Number(e.vars)
			if err != nil {
				e.exprError(it.Expr, fmt.Errorf("%s: %w", it.Name, err))
				ok = false
			} else {
				e.vars[it.Name] = v
				out[it.Name] = &Assumption{Name: it.Name, Value: v, Expr: it.Expr.Src, Line: it.Line}
			}
		}
		state[it.Name] = 2
		return ok
	}
	for _, it := range items {
		visit(it, nil)
	}
	var list []*Assumption
	for _, it := range items {
		a, ok := out[it.Name]
		if !ok {
			continue
		}
		if it.Dist != nil {
			d := &Distribution{Kind: it.Dist.Kind}
			good := true
			for _, arg := range it.Dist.Args {
				v, ok := e.number(arg, it.Dist.Kind+" parameter")
				good = good && ok
				d.Params = append(d.Params, v)
			}
			if good && e.checkDistribution(it.Dist, d) {
				a.Dist = d
			}
		}
		list = append(list, a)
	}
	return list
}

// checkDistribution validates a distribution's parameters.
func (e *env) checkDistribution(src *parse.Distribution, d *Distribution) bool {
	p := d.Params
	switch d.Kind {
	case "triangular", "pert":
		if !(p[0] <= p[1] && p[1] <= p[2]) || p[0] == p[2] {
			e.errs.Add(src.Pos, "%s(min, mode, max) needs min <= mode <= max and min < max, got %s, %s, %s", d.Kind, trimFloat(p[0]), trimFloat(p[1]), trimFloat(p[2]))
			return false
		}
	case "uniform":
		if !(p[0] < p[1]) {
			e.errs.Add(src.Pos, "uniform(min, max) needs min < max, got %s, %s", trimFloat(p[0]), trimFloat(p[1]))
			return false
		}
	case "normal", "lognormal":
		if p[1] <= 0 {
			e.errs.Add(src.Pos, "%s(mean, sd) needs a positive standard deviation, got %s", d.Kind, trimFloat(p[1]))
			return false
		}
		if d.Kind == "lognormal" && p[0] <= 0 {
			e.errs.Add(src.Pos, "lognormal(mean, sd) needs a positive mean, got %s", trimFloat(p[0]))
			return false
		}
	}
	return true
}

// notApplicableIn returns the measure that did not apply in an evaluation
// that failed with err, or nil. Fix (tests): the expression layer turns a
// function's error into its own *expr.Error, which loses the
// notApplicable type, so the result functions also record it in e.na.
func (e *env) notApplicableIn(err error) *notApplicable {
	var na notApplicable
	if errors.As(err, &na) {
		return &na
	}
	return e.na
}
