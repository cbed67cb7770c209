package compute

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"worth/expr"
	"worth/parse"
)

// Options are choices of a computation that do not change its results.
type Options struct {
	// Progress, when set, is called as a risk analysis runs: once before
	// the first trial, after each block of trials, and once at the end.
	// It is called from the goroutine that called ComputeWith, never
	// concurrently.
	Progress func(RiskProgress)
}

// RiskProgress is how far a risk analysis has come: the trials done, and
// the choice most often best so far with its probability's standard error.
type RiskProgress struct {
	Risk        string // the block's id
	Done, Total int    // trials
	Leader      string // id of the choice most often best so far ("do-nothing" possible)
	Probability float64
	SE          float64
}

// Risk is an evaluated risk block: a Monte Carlo simulation of one
// comparison over the assumptions that carry a distribution.
type Risk struct {
	ID         string
	Line       int
	Comparison *Comparison
	Trials     int
	Seed       uint64
	SeedGiven  bool
	// Inputs are the assumptions drawn, in the memo's order.
	Inputs []*RiskInput
	// Outcomes hold each alternative's results, in the comparison's order.
	Outcomes []*RiskOutcome
	// DoNothing is the probability that doing nothing is best, where it
	// is a choice (every alternative earns benefits); nil otherwise.
	DoNothing *Estimate
	// Holds is the probability that the base case's recommendation is
	// best.
	Holds Estimate
	// Difference is the distribution of the present worth of the two
	// leading alternatives' difference; nil with one alternative.
	Difference *RiskDifference
	// Levels are the cumulative probabilities at which the S-curves of
	// Outcomes and Difference are given (1% to 99%).
	Levels     []float64
	RateVaries bool
	// Evaluation counts the compiled quantities by kind.
	Evaluation RiskEvaluation
	Warnings   []string
}

// RiskInput is an assumption drawn in the trials.
type RiskInput struct {
	Name string
	Line int
	Dist *Distribution
	// Base is the value before the ~; Mean and SD are the distribution's.
	Base, Mean, SD float64
}

// Estimate is a simulated figure with its standard error.
type Estimate struct {
	Value, SE float64
}

// RiskOutcome is one alternative's present worth over the trials.
type RiskOutcome struct {
	Alt *Alternative
	// Base is the base case's present worth.
	Base          float64
	PBest         Estimate
	Mean          Estimate
	SD            float64
	P10, P50, P90 Estimate
	Min, Max      float64
	// Curve is the present worth at each of Risk.Levels.
	Curve []float64
}

// RiskDifference is the present worth of A less that of B, trial by
// trial: A and B are the two alternatives most often best (ties by mean).
type RiskDifference struct {
	A, B          string
	Mean          Estimate
	SD            float64
	P10, P50, P90 Estimate
	// Positive is the probability that A's present worth exceeds B's.
	Positive Estimate
	Curve    []float64
}

// RiskEvaluation says how the trials evaluate the present worths: how
// many of the model's quantities are constants, affine or multilinear forms
// in the drawn inputs, or evaluated from their expressions in each trial.
type RiskEvaluation struct {
	Constant, Affine, Multilinear, General int
}

// riskBlockSize is the number of trials that share one random stream;
// blocks are spread over the cores, and results do not depend on how.
const riskBlockSize = 1024

// risks evaluates every risk block of the memo. comps maps each compare
// block's id to its comparison (nil where it failed).
func (e *env) risks(memo *parse.Memo, rep *Report, comps map[string]*Comparison, opt Options) []*Risk {
	var out []*Risk
	var ids []string
	for _, b := range memo.Blocks {
		if c, ok := b.(*parse.Compare); ok && c.ID != "" && !slices.Contains(ids, c.ID) {
			ids = append(ids, c.ID)
		}
	}
	for _, b := range memo.Blocks {
		if src, ok := b.(*parse.Risk); ok && src.ID != "" {
			if r := e.risk(memo, src, rep, comps, ids, opt); r != nil {
				out = append(out, r)
			}
		}
	}
	return out
}

func (e *env) risk(memo *parse.Memo, src *parse.Risk, rep *Report, comps map[string]*Comparison, ids []string, opt Options) *Risk {
	// The comparison.
	var c *Comparison
	switch {
	case src.Compare != nil:
		cc, ok := comps[src.Compare.ID]
		if !ok {
			msg := fmt.Sprintf("unknown comparison %q", src.Compare.ID)
			if s := expr.Closest(src.Compare.ID, ids); s != "" {
				msg += fmt.Sprintf("; did you mean %q?", s)
			}
			e.errs.Add(src.Compare.Pos, "%s", msg)
			return nil
		}
		c = cc
	case len(ids) == 0:
		e.errs.Add(src.Pos, "risk %s has no comparison to simulate; add a compare block", src.ID)
		return nil
	case len(ids) > 1:
		e.errs.Add(src.Pos, "risk %s: the memo has %d comparisons (%s); name the one to simulate with \"compare: ID\"", src.ID, len(ids), strings.Join(ids, ", "))
		return nil
	default:
		c = comps[ids[0]]
	}
	// The drawn inputs.
	byName := map[string]*Assumption{}
	var names []string
	for _, a := range rep.Assumptions {
		byName[a.Name] = a
		names = append(names, a.Name)
	}
	sort.Strings(names)
	use := map[string]bool{}
	ok := true
	if src.Vary != nil {
		for _, ref := range src.Vary {
			a, found := byName[ref.ID]
			switch {
			case use[ref.ID]:
				e.errs.Add(ref.Pos, "%s is listed twice", ref.ID)
				ok = false
			case !found && slices.Contains(e.names, ref.ID):
				ok = false // its own error is reported already
			case !found:
				msg := fmt.Sprintf("unknown assumption %q", ref.ID)
				if s := expr.Closest(ref.ID, names); s != "" {
					msg += fmt.Sprintf("; did you mean %q?", s)
				}
				e.errs.Add(ref.Pos, "%s", msg)
				ok = false
			case a.Dist == nil:
				e.errs.Add(ref.Pos, "%s has no distribution to draw from; give it one in its assume block, e.g. %s = %s ~ triangular(low, likely, high)", ref.ID, ref.ID, a.Expr)
				ok = false
			}
			use[ref.ID] = true
		}
	}
	srcItems := map[string]*parse.Assumption{}
	for _, b := range memo.Blocks {
		if a, isAssume := b.(*parse.Assume); isAssume {
			for _, it := range a.Items {
				if _, dup := srcItems[it.Name]; !dup {
					srcItems[it.Name] = it
				}
			}
		}
	}
	var inputs []*riskInput
	anyDist := false
	for _, a := range rep.Assumptions {
		if a.Dist == nil {
			continue
		}
		anyDist = true
		if src.Vary != nil && !use[a.Name] {
			continue
		}
		inputs = append(inputs, &riskInput{Name: a.Name, Line: a.Line, Base: a.Value, Dist: a.Dist, s: newSampler(a.Dist)})
	}
	if !anyDist && len(*e.errs) == 0 {
		e.errs.Add(src.Pos, "risk %s has nothing to draw: no assumption has a distribution; add one with ~, e.g. power_price = 0.11 ~ triangular(0.09, 0.11, 0.15)", src.ID)
		return nil
	}
	if !ok || c == nil || len(*e.errs) > 0 || len(inputs) == 0 {
		return nil
	}
	// A distribution's parameters are fixed numbers: they may not depend
	// on another drawn assumption.
	rc := newRiskCompiler(e, memo, inputs)
	for _, in := range inputs {
		it := srcItems[in.Name]
		if it == nil || it.Dist == nil {
			continue
		}
		for _, arg := range it.Dist.Args {
			if x := rc.exprOf(arg); x != nil {
				if deps := rc.depsOf(x); len(deps) > 0 {
					var ns []string
					for _, k := range deps {
						ns = append(ns, inputs[k].Name)
					}
					e.errs.Add(arg.Pos, "the parameters of %s's distribution depend on %s, which risk %s draws too; give the parameters fixed values (draws are independent)", in.Name, strings.Join(ns, ", "), src.ID)
					ok = false
				}
			}
		}
	}
	if !ok {
		return nil
	}
	m, merrs := compileModel(rc, memo, c)
	for _, me := range merrs {
		e.errs.Add(me.pos, "%s", me.msg)
	}
	if m == nil {
		return nil
	}
	r := &Risk{ID: src.ID, Line: src.Pos.Line, Comparison: c, Trials: src.Trials, Seed: src.Seed, SeedGiven: src.SeedSet,
		RateVaries: m.rateVaries, Warnings: m.warnings}
	for _, q := range m.quantities() {
		switch q.kind {
		case qConst:
			r.Evaluation.Constant++
		case qAffine:
			r.Evaluation.Affine++
		case qMulti:
			r.Evaluation.Multilinear++
		default:
			r.Evaluation.General++
		}
	}
	if r.Evaluation.Affine+r.Evaluation.Multilinear+r.Evaluation.General == 0 {
		var ns []string
		for _, in := range inputs {
			ns = append(ns, in.Name)
		}
		e.errs.Add(src.Pos, "risk %s: no present worth in compare %s depends on %s, so there is nothing to simulate; give a distribution to an assumption that its alternatives or its rate use", src.ID, c.ID, strings.Join(ns, ", "))
		return nil
	}
	for _, in := range inputs {
		r.Inputs = append(r.Inputs, &RiskInput{Name: in.Name, Line: in.Line, Dist: in.Dist, Base: in.Base, Mean: in.s.Mean(), SD: in.s.SD()})
	}
	var progress func(done int, counts []int)
	if opt.Progress != nil {
		progress = func(done int, counts []int) {
			lead := 0
			for k := range counts {
				if counts[k] > counts[lead] {
					lead = k
				}
			}
			p := RiskProgress{Risk: src.ID, Done: done, Total: src.Trials}
			if done > 0 {
				p.Leader = m.choiceID(lead)
				p.Probability = float64(counts[lead]) / float64(done)
				p.SE = math.Sqrt(p.Probability * (1 - p.Probability) / float64(done))
			}
			opt.Progress(p)
		}
	}
	if !e.checkRisk(src, c, len(m.quantities())) {
		return nil // past a limit (limits.go)
	}
	res, err := m.run(src.Trials, src.Seed, progress)
	if err != nil {
		e.errs.Add(src.Pos, "risk %s: %v; bound the distributions (triangular, pert, uniform) or move their ranges so that every draw is valid", src.ID, err)
		return nil
	}
	m.summarize(r, res)
	return r
}

// choiceID names index k of the counts: an alternative, or doing nothing
// (the last).
func (m *fastModel) choiceID(k int) string {
	if k >= len(m.alts) {
		return DoNothing
	}
	return m.alts[k].alt.ID
}

// runResult is what the trials produced: each alternative's present worth
// per trial, and how often each choice was best (doing nothing last).
type runResult struct {
	pw     [][]float64
	counts []int
}

// blockDone reports one block of trials.
type blockDone struct {
	counts  []int
	trials  int
	errs    int
	errAt   int // the first failed trial, -1 for none
	errMsg  string
	errDraw []float64
}

// streamSeed is the j-th output of the SplitMix64 sequence that starts at
// seed (Steele, Lea and Flood 2014): a well-mixed 64-bit value for any j.
func streamSeed(seed, j uint64) uint64 {
	z := seed + j*0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// blockRand is the random stream of block b: a PCG generator seeded from
// the memo's seed and the block's index, so that every block draws the same
// numbers whichever core runs it.
func blockRand(seed uint64, b int) *rand.Rand {
	return rand.New(rand.NewPCG(streamSeed(seed, 2*uint64(b)+1), streamSeed(seed, 2*uint64(b)+2)))
}

// run draws the trials over all cores. Trial t belongs to block
// t / riskBlockSize and takes its draws from that block's stream, so the
// results are the same on any number of cores.
func (m *fastModel) run(trials int, seed uint64, progress func(done int, counts []int)) (*runResult, error) {
	nalt := len(m.alts)
	res := &runResult{pw: make([][]float64, nalt), counts: make([]int, nalt+1)}
	for a := range res.pw {
		res.pw[a] = make([]float64, trials)
	}
	blocks := (trials + riskBlockSize - 1) / riskBlockSize
	workers := min(runtime.GOMAXPROCS(0), blocks)
	var next atomic.Int64
	done := make(chan blockDone, blocks)
	var wg sync.WaitGroup
	base := m.baseVars()
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			s := m.newScratch(base)
			x := make([]float64, len(m.inputs))
			pw := make([]float64, nalt)
			for {
				b := int(next.Add(1) - 1)
				if b >= blocks {
					return
				}
				r := blockRand(seed, b)
				bd := blockDone{counts: make([]int, nalt+1), errAt: -1}
				for t := b * riskBlockSize; t < min((b+1)*riskBlockSize, trials); t++ {
					for k, in := range m.inputs {
						x[k] = in.s.draw(r)
					}
					bd.trials++
					i, err := m.presentWorths(x, s, pw)
					if err != nil {
						if bd.errAt < 0 {
							bd.errAt, bd.errMsg, bd.errDraw = t, err.Error(), slices.Clone(x)
						}
						bd.errs++
						continue
					}
					for a, v := range pw {
						res.pw[a][t] = v
					}
					k := m.best(pw, i, x, s)
					if k < 0 {
						k = nalt
					}
					bd.counts[k]++
				}
				done <- bd
			}
		}()
	}
	if progress != nil {
		progress(0, res.counts)
	}
	finished, nerr, errAt := 0, 0, -1
	var errMsg string
	var errDraw []float64
	for b := 0; b < blocks; b++ {
		bd := <-done
		finished += bd.trials
		for k, n := range bd.counts {
			res.counts[k] += n
		}
		if bd.errs > 0 {
			nerr += bd.errs
			if errAt < 0 || bd.errAt < errAt {
				errAt, errMsg, errDraw = bd.errAt, bd.errMsg, bd.errDraw
			}
		}
		if progress != nil {
			progress(finished, res.counts)
		}
	}
	wg.Wait()
	if nerr > 0 {
		var drawn []string
		for k, in := range m.inputs {
			drawn = append(drawn, in.Name+" = "+trimFloat(errDraw[k]))
		}
		return nil, fmt.Errorf("%d of %d trials have no valid present worth; the first, trial %d (%s): %s", nerr, trials, errAt+1, strings.Join(drawn, ", "), errMsg)
	}
	return res, nil
}

// baseVars is the assumptions' values of the base case (a worker copies it
// for the quantities evaluated from their expressions).
func (m *fastModel) baseVars() map[string]any { return m.base }

// riskLevels are the cumulative probabilities of the S-curves: 1% to 99%.
func riskLevels() []float64 {
	out := make([]float64, 99)
	for k := range out {
		out[k] = float64(k+1) / 100
	}
	return out
}

// quantile is the p-quantile of sorted values, interpolated between order
// statistics at rank h = (N-1) p.
func quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	h := float64(n-1) * p
	lo := int(math.Floor(h))
	if lo < 0 {
		return sorted[0]
	}
	if lo >= n-1 {
		return sorted[n-1]
	}
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}

// percentile estimates the p-quantile of sorted values with its standard
// error from the order statistics: the rank of the sample quantile varies
// as a binomial count with standard deviation √(N p (1-p)), so half the
// distance between the values that many ranks below and above it is the
// standard error (a distribution-free estimate).
func percentile(sorted []float64, p float64) Estimate {
	n := float64(len(sorted))
	d := math.Sqrt(n*p*(1-p)) / (n - 1)
	lo, hi := quantile(sorted, math.Max(0, p-d)), quantile(sorted, math.Min(1, p+d))
	return Estimate{Value: quantile(sorted, p), SE: (hi - lo) / 2}
}

// moments are the mean with its standard error s/√N and the standard
// deviation s of the values, summed in trial order.
func moments(xs []float64) (Estimate, float64) {
	n := float64(len(xs))
	mean, sd := meanSD(xs, 1)
	if math.IsInf(mean, 0) || math.IsInf(sd, 0) || math.IsNaN(sd) {
		// Fix (fuzzing, FuzzPipeline): present worths near 1e300 (an
		// input drawn from triangular(1, 100, 1e300)) overflowed the sums,
		// and an infinite standard deviation reached the report, which
		// then could not be written as JSON. The sums are then taken of
		// the values divided by the largest of them.
		scale := 0.0
		for _, x := range xs {
			scale = max(scale, math.Abs(x))
		}
		mean, sd = meanSD(xs, scale)
		mean, sd = mean*scale, sd*scale
	}
	return Estimate{Value: mean, SE: sd / math.Sqrt(n)}, sd
}

// meanSD is the mean and the standard deviation of the values divided by
// scale.
func meanSD(xs []float64, scale float64) (mean, sd float64) {
	n := float64(len(xs))
	sum := 0.0
	for _, x := range xs {
		sum += x / scale
	}
	mean = sum / n
	ss := 0.0
	for _, x := range xs {
		ss += (x/scale - mean) * (x/scale - mean)
	}
	return mean, math.Sqrt(ss / (n - 1))
}

// proportion is a count out of n with its binomial standard error.
func proportion(count, n int) Estimate {
	p := float64(count) / float64(n)
	return Estimate{Value: p, SE: math.Sqrt(p * (1 - p) / float64(n))}
}

// distribution fills the percentiles and the S-curve of values (sorted
// in place).
func distribution(xs []float64, levels []float64) (p10, p50, p90 Estimate, curve []float64) {
	slices.Sort(xs)
	curve = make([]float64, len(levels))
	for k, p := range levels {
		curve[k] = quantile(xs, p)
	}
	return percentile(xs, 0.1), percentile(xs, 0.5), percentile(xs, 0.9), curve
}

// summarize turns the trials into the report's figures.
func (m *fastModel) summarize(r *Risk, res *runResult) {
	n := r.Trials
	r.Levels = riskLevels()
	nalt := len(m.alts)
	r.Outcomes = make([]*RiskOutcome, nalt)
	var wg sync.WaitGroup
	for a, fa := range m.alts {
		o := &RiskOutcome{Alt: fa.alt, PBest: proportion(res.counts[a], n)}
		for _, cr := range m.comp.Results {
			if cr.Alt == fa.alt {
				o.Base = cr.PW
			}
		}
		o.Mean, o.SD = moments(res.pw[a])
		r.Outcomes[a] = o
		wg.Add(1)
		go func(o *RiskOutcome, xs []float64) {
			defer wg.Done()
			xs = slices.Clone(xs)
			o.P10, o.P50, o.P90, o.Curve = distribution(xs, r.Levels)
			o.Min, o.Max = xs[0], xs[len(xs)-1]
		}(o, res.pw[a])
	}
	if m.allBenefits {
		p := proportion(res.counts[nalt], n)
		r.DoNothing = &p
	}
	for k := 0; k <= nalt; k++ {
		if m.choiceID(k) == m.comp.Recommended {
			r.Holds = proportion(res.counts[k], n)
		}
	}
	if nalt >= 2 {
		order := make([]int, nalt)
		for a := range order {
			order[a] = a
		}
		sort.SliceStable(order, func(i, j int) bool {
			ci, cj := res.counts[order[i]], res.counts[order[j]]
			if ci != cj {
				return ci > cj
			}
			return r.Outcomes[order[i]].Mean.Value > r.Outcomes[order[j]].Mean.Value
		})
		a, b := order[0], order[1]
		diff := make([]float64, n)
		pos := 0
		for t := range diff {
			diff[t] = res.pw[a][t] - res.pw[b][t]
			if diff[t] > 0 {
				pos++
			}
		}
		d := &RiskDifference{A: m.alts[a].alt.ID, B: m.alts[b].alt.ID, Positive: proportion(pos, n)}
		d.Mean, d.SD = moments(diff)
		d.P10, d.P50, d.P90, d.Curve = distribution(diff, r.Levels)
		r.Difference = d
	}
	wg.Wait()
}
