package compute

import (
	"fmt"
	"math"
	"sort"

	"worth/parse"
)

// Budget is an evaluated budget block: the set of projects, at most one
// alternative from each listed comparison (or none), that maximizes total
// present worth within a limit on total first cost.
type Budget struct {
	ID    string
	Line  int
	Limit float64
	// Projects are the comparisons listed, in order, each with the
	// alternative chosen (or none).
	Projects []*BudgetProject
	// Chosen holds the ids of the chosen alternatives, in project order.
	Chosen         []string
	TotalFirstCost float64
	TotalPW        float64
	// Feasible is false when the required projects alone exceed the limit.
	Feasible bool
	// Growth is the best program at several limits around the limit
	// (50% to 200%), to show what more money would buy.
	Growth []BudgetStep
	// Next is the program at the smallest larger limit that adds present
	// worth, nil when nothing more is worth buying.
	Next   *BudgetStep
	Source *parse.Budget
}

// BudgetProject is one comparison of a budget and what it contributes.
type BudgetProject struct {
	Comparison *Comparison
	Required   bool
	Options    []BudgetOption
	// Choice indexes Options; -1 when the project contributes nothing.
	Choice int
}

// Chosen is the project's chosen option, nil for none.
func (p *BudgetProject) Chosen() *BudgetOption {
	if p.Choice < 0 {
		return nil
	}
	return &p.Options[p.Choice]
}

// BudgetOption is one alternative a project may contribute: its first
// cost and its present worth in its comparison.
type BudgetOption struct {
	ID        string
	Name      string
	FirstCost float64
	PW        float64
}

// BudgetStep is the best program within one limit.
type BudgetStep struct {
	Limit          float64
	Feasible       bool
	Chosen         []string // alternative ids, in project order
	TotalFirstCost float64
	TotalPW        float64
}

// MaxBudgetProjects bounds the projects of one budget.
const MaxBudgetProjects = 60

// MaxBudgetStates bounds the undominated partial programs the exact search
// keeps; a program that needs more is too large to solve exactly here.
const MaxBudgetStates = 500000

// budgetGrowth are the fractions of the limit the growth table shows.
var budgetGrowth = []float64{0.5, 0.75, 1, 1.25, 1.5, 2}

// budget checks a budget block and returns the work that solves it.
func (e *env) budget(src *parse.Budget, rep *Report, comps map[string]*Comparison) func() {
	ok := true
	limit := 0.0
	if !src.Limit.IsZero() {
		v, good := e.number(src.Limit, "limit")
		if good && v <= 0 {
			e.errs.Add(src.Limit.Pos, "a budget's limit must be a positive total first cost, got %s", trimFloat(v))
			good = false
		}
		ok = ok && good
		limit = v
	} else {
		ok = false
	}
	if len(src.Projects) > MaxBudgetProjects {
		e.errs.Add(src.Projects[MaxBudgetProjects].Pos, "budget %s lists %d projects; at most %d can be solved exactly here, so split the program into several budgets", src.ID, len(src.Projects), MaxBudgetProjects)
		ok = false
	}
	b := &Budget{ID: src.ID, Line: src.Pos.Line, Limit: limit, Source: src}
	index := map[string]int{}
	owner := map[string]string{} // alternative id -> comparison id
	for _, r := range src.Projects {
		if _, dup := index[r.ID]; dup {
			e.errs.Add(r.Pos, "%s is listed twice in budget %s", r.ID, src.ID)
			ok = false
			continue
		}
		index[r.ID] = len(b.Projects)
		c, good := e.analysisComparison(&r, "budget", src.ID, r.Pos, rep, comps)
		if !good {
			ok = false
			b.Projects = append(b.Projects, nil)
			continue
		}
		p := &BudgetProject{Comparison: c, Choice: -1}
		for _, res := range c.Results {
			if prev, shared := owner[res.Alt.ID]; shared {
				e.errs.Add(r.Pos, "alternative %s is in both compare %s and compare %s; the projects of a budget must be independent", res.Alt.ID, prev, c.ID)
				ok = false
			}
			owner[res.Alt.ID] = c.ID
			p.Options = append(p.Options, BudgetOption{ID: res.Alt.ID, Name: res.Alt.Name, FirstCost: res.Alt.FirstCost, PW: res.PW})
		}
		b.Projects = append(b.Projects, p)
	}
	for _, r := range src.Required {
		k, listed := index[r.ID]
		if !listed {
			e.errs.Add(r.Pos, "required project %s is not among the projects of budget %s", r.ID, src.ID)
			ok = false
			continue
		}
		if p := b.Projects[k]; p != nil {
			p.Required = true
		}
	}
	if !ok {
		return nil
	}
	rep.Budgets = append(rep.Budgets, b)
	return func() {
		progs := make([]RationProject, len(b.Projects))
		for k, p := range b.Projects {
			progs[k] = RationProject{Required: p.Required}
			for _, o := range p.Options {
				progs[k].Costs = append(progs[k].Costs, o.FirstCost)
				progs[k].Worths = append(progs[k].Worths, o.PW)
			}
		}
		// The whole frontier where it is small enough (so that the next
		// step up is known however far it is), else up to the growth
		// table's largest limit.
		front, err := RationFrontier(progs, math.Inf(1))
		if err != nil {
			front, err = RationFrontier(progs, budgetGrowth[len(budgetGrowth)-1]*limit)
		}
		if err != nil {
			e.errs.Add(src.Pos, "budget %s: %s", src.ID, err)
			return
		}
		step := func(l float64) BudgetStep {
			s := BudgetStep{Limit: l}
			if pick, ok := front.Best(l); ok {
				s.Feasible = true
				s.TotalFirstCost, s.TotalPW = pick.Cost, pick.Worth
				for k, o := range pick.Choice {
					if o >= 0 {
						s.Chosen = append(s.Chosen, b.Projects[k].Options[o].ID)
					}
				}
			}
			return s
		}
		pick, feasible := front.Best(limit)
		b.Feasible = feasible
		if feasible {
			b.TotalFirstCost, b.TotalPW = pick.Cost, pick.Worth
			for k, o := range pick.Choice {
				b.Projects[k].Choice = o
				if o >= 0 {
					b.Chosen = append(b.Chosen, b.Projects[k].Options[o].ID)
				}
			}
		}
		for _, f := range budgetGrowth {
			b.Growth = append(b.Growth, step(f*limit))
		}
		// The next program up: the cheapest undominated one above the
		// limit (every program of the frontier is worth more than the
		// cheaper ones).
		if next, ok := front.Next(limit); ok {
			s := step(next.Cost)
			b.Next = &s
		}
	}
}

// RationProject is one project of a capital-rationing problem: the first
// cost and worth of each alternative it may contribute; a required project
// must contribute one, another may contribute none.
type RationProject struct {
	Costs, Worths []float64
	Required      bool
}

// RationPick is one program: the option chosen in each project (-1 for
// none), its total cost and total worth.
type RationPick struct {
	Choice []int
	Cost   float64
	Worth  float64
}

// Frontier is the set of undominated programs up to a cost: in order of
// cost, each worth strictly more than every cheaper one. The best program
// within any limit up to that cost is the last one that fits.
type Frontier struct {
	picks []RationPick
}

// Best is the program of greatest total worth whose total cost is within
// limit (ties to the cheaper), and false when none fits.
func (f *Frontier) Best(limit float64) (RationPick, bool) {
	k := sort.Search(len(f.picks), func(i int) bool { return f.picks[i].Cost > limit*(1+1e-12) })
	if k == 0 {
		return RationPick{}, false
	}
	return f.picks[k-1], true
}

// Next is the cheapest program dearer than limit that is worth more than
// the best within it.
func (f *Frontier) Next(limit float64) (RationPick, bool) {
	k := sort.Search(len(f.picks), func(i int) bool { return f.picks[i].Cost > limit*(1+1e-12) })
	if k < len(f.picks) {
		return f.picks[k], true
	}
	return RationPick{}, false
}

// Picks returns the frontier's programs in order of cost.
func (f *Frontier) Picks() []RationPick { return f.picks }

// RationFrontier solves a multiple-choice knapsack exactly: it builds, one
// project at a time, every undominated partial program (no other is both
// no dearer and worth at least as much), dropping programs dearer than
// maxCost. The best program within any limit up to maxCost is then the
// frontier's last that fits. The frontier never holds more programs than
// there are distinct costs, and the search stops with an error past
// MaxBudgetStates of them.
func RationFrontier(projects []RationProject, maxCost float64) (*Frontier, error) {
	type state struct {
		cost, worth float64
		parent      int // index into the previous layer
		option      int // -1 none
	}
	layers := make([][]state, 0, len(projects)+1)
	cur := []state{{parent: -1, option: -1}}
	layers = append(layers, cur)
	for j, p := range projects {
		var next []state
		for si, s := range cur {
			if !p.Required {
				next = append(next, state{s.cost, s.worth, si, -1})
			}
			for o := range p.Costs {
				c := s.cost + p.Costs[o]
				st := state{c, s.worth + p.Worths[o], si, o}
				if c > maxCost*(1+1e-12) {
					continue
				}
				next = append(next, st)
			}
		}
		next = undominated(next, func(s state) (float64, float64) { return s.cost, s.worth })
		if len(next) > MaxBudgetStates {
			return nil, fmt.Errorf("more than %d undominated combinations after %d projects; too many to solve exactly here, so split the program into several budgets", MaxBudgetStates, j+1)
		}
		cur = next
		layers = append(layers, cur)
	}
	trace := func(k int) RationPick {
		last := len(layers) - 1
		pick := RationPick{Choice: make([]int, len(projects)), Cost: layers[last][k].cost, Worth: layers[last][k].worth}
		for l := last; l > 0; l-- {
			s := layers[l][k]
			pick.Choice[l-1] = s.option
			k = s.parent
		}
		return pick
	}
	f := &Frontier{}
	for k := range cur {
		f.picks = append(f.picks, trace(k))
	}
	return f, nil
}

// undominated sorts programs by cost (then by worth, best first) and keeps
// those worth strictly more than every cheaper one.
func undominated[T any](xs []T, key func(T) (cost, worth float64)) []T {
	sort.SliceStable(xs, func(a, b int) bool {
		ca, wa := key(xs[a])
		cb, wb := key(xs[b])
		if ca != cb {
			return ca < cb
		}
		return wa > wb
	})
	out := xs[:0]
	best := math.Inf(-1)
	for _, x := range xs {
		_, w := key(x)
		if w > best {
			out = append(out, x)
			best = w
		}
	}
	return out
}
