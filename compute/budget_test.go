package compute_test

import (
	"fmt"
	"math"
	"math/rand"
	"strings"
	"testing"

	"worth/compute"
)

// bruteForce enumerates every program (one option or none per project,
// an option always for a required one) and returns the greatest total
// worth within limit, and false when nothing fits.
func bruteForce(ps []compute.RationProject, limit float64) (float64, bool) {
	best, found := math.Inf(-1), false
	choice := make([]int, len(ps))
	var rec func(j int, cost, worth float64)
	rec = func(j int, cost, worth float64) {
		if cost > limit*(1+1e-12) {
			return
		}
		if j == len(ps) {
			if worth > best {
				best = worth
			}
			found = true
			return
		}
		if !ps[j].Required {
			choice[j] = -1
			rec(j+1, cost, worth)
		}
		for o := range ps[j].Costs {
			choice[j] = o
			rec(j+1, cost+ps[j].Costs[o], worth+ps[j].Worths[o])
		}
	}
	rec(0, 0, 0)
	return best, found
}

// TestRationAgainstBruteForce: on random small programs, the frontier's
// best program within a limit is worth exactly what brute-force
// enumeration finds, its choices add up to its totals, and it fits.
func TestRationAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	for trial := 0; trial < 400; trial++ {
		n := 1 + rng.Intn(6)
		ps := make([]compute.RationProject, n)
		total := 0.0
		for j := range ps {
			k := 1 + rng.Intn(4)
			ps[j].Required = rng.Intn(5) == 0
			for o := 0; o < k; o++ {
				// Round costs make ties and exact fits common.
				c := float64(10 * (1 + rng.Intn(30)))
				if rng.Intn(8) == 0 {
					c = 0
				}
				ps[j].Costs = append(ps[j].Costs, c)
				ps[j].Worths = append(ps[j].Worths, float64(rng.Intn(400)-120))
				total += c
			}
		}
		front, err := compute.RationFrontier(ps, math.Inf(1))
		if err != nil {
			t.Fatal(err)
		}
		for _, limit := range []float64{0, 10, total * rng.Float64(), total / 2, total} {
			want, wantOK := bruteForce(ps, limit)
			got, ok := front.Best(limit)
			if ok != wantOK {
				t.Fatalf("trial %d, limit %v: feasible %v, brute force %v", trial, limit, ok, wantOK)
			}
			if !ok {
				continue
			}
			if math.Abs(got.Worth-want) > 1e-9 {
				t.Fatalf("trial %d, limit %v: worth %v, brute force %v (%+v)", trial, limit, got.Worth, want, ps)
			}
			cost, worth := 0.0, 0.0
			for j, o := range got.Choice {
				if o < 0 {
					if ps[j].Required {
						t.Fatalf("trial %d: required project %d left out", trial, j)
					}
					continue
				}
				cost += ps[j].Costs[o]
				worth += ps[j].Worths[o]
			}
			if math.Abs(cost-got.Cost) > 1e-9 || math.Abs(worth-got.Worth) > 1e-9 || cost > limit*(1+1e-12) {
				t.Fatalf("trial %d: choices give %v / %v, pick says %v / %v, limit %v", trial, cost, worth, got.Cost, got.Worth, limit)
			}
		}
		// A capped frontier agrees within its cap.
		capped, err := compute.RationFrontier(ps, total/2)
		if err != nil {
			t.Fatal(err)
		}
		a, okA := capped.Best(total / 3)
		b, okB := front.Best(total / 3)
		if okA != okB || okA && math.Abs(a.Worth-b.Worth) > 1e-9 {
			t.Fatalf("trial %d: capped frontier %v, full %v", trial, a.Worth, b.Worth)
		}
	}
}

// TestRationStateLimit: a program too large to solve exactly stops with an
// error that names the limit.
func TestRationStateLimit(t *testing.T) {
	rng := rand.New(rand.NewSource(1))
	// Worth equal to cost: every distinct total is undominated, so the
	// frontier doubles with each project.
	ps := make([]compute.RationProject, 40)
	for j := range ps {
		c := rng.Float64() * 1e6
		ps[j].Costs = []float64{c}
		ps[j].Worths = []float64{c}
	}
	_, err := compute.RationFrontier(ps, math.Inf(1))
	if err == nil || !strings.Contains(err.Error(), fmt.Sprint(compute.MaxBudgetStates)) {
		t.Fatalf("error %v, want one naming %d", err, compute.MaxBudgetStates)
	}
}

// TestBudgetBlock: a budget block chooses the program of greatest total
// present worth within the limit, funds a required cost-only project with
// the alternative that fits, and tells what a larger limit would buy.
func TestBudgetBlock(t *testing.T) {
	src := "---\nrate: 6%\n---\n\n" +
		"```alternative a1\nlife: 10\nfirst cost: 400k\nannual benefit: 80k\n```\n\n" +
		"```alternative a2\nlife: 10\nfirst cost: 700k\nannual benefit: 125k\n```\n\n" +
		"```alternative b1\nlife: 20\nfirst cost: 900k\nannual benefit: 110k\n```\n\n" +
		"```alternative c1\nlife: 15\nfirst cost: 300k\nannual benefit: 45k\n```\n\n" +
		"```alternative r1\nlife: 25\nfirst cost: 250k\nannual cost: 3k\n```\n\n" +
		"```alternative r2\nlife: 25\nfirst cost: 180k\nannual cost: 9k\n```\n\n" +
		"```compare pa\nalternatives: a1, a2\n```\n\n```compare pb\nalternatives: b1\n```\n\n" +
		"```compare pc\nalternatives: c1\n```\n\n```compare roof\nalternatives: r1, r2\n```\n\n" +
		"```budget prog\nprojects: pa, pb, pc, roof\nlimit: 1.5M\nrequired: roof\n```\n"
	rep := mustReport(t, src)
	b := rep.Budgets[0]
	pw := map[string]float64{}
	fc := map[string]float64{}
	for _, c := range rep.Comparisons {
		for _, r := range c.Results {
			pw[r.Alt.ID], fc[r.Alt.ID] = r.PW, r.Alt.FirstCost
		}
	}
	// Brute force over the memo's own figures.
	best, bestSet := math.Inf(-1), ""
	for _, a := range []string{"", "a1", "a2"} {
		for _, bb := range []string{"", "b1"} {
			for _, c := range []string{"", "c1"} {
				for _, r := range []string{"r1", "r2"} {
					cost, worth := 0.0, 0.0
					var set []string
					for _, id := range []string{a, bb, c, r} {
						if id != "" {
							cost += fc[id]
							worth += pw[id]
							set = append(set, id)
						}
					}
					if cost <= 1.5e6 && worth > best {
						best, bestSet = worth, strings.Join(set, ",")
					}
				}
			}
		}
	}
	if got := strings.Join(b.Chosen, ","); got != bestSet || math.Abs(b.TotalPW-best) > 1e-6 {
		t.Errorf("chosen %s (%v), brute force %s (%v)", got, b.TotalPW, bestSet, best)
	}
	if b.TotalFirstCost > b.Limit {
		t.Errorf("over the limit: %v", b.TotalFirstCost)
	}
	if len(b.Growth) != 6 || b.Growth[2].TotalPW != b.TotalPW {
		t.Errorf("growth: %+v", b.Growth)
	}
	for k := 1; k < len(b.Growth); k++ {
		if b.Growth[k].TotalPW < b.Growth[k-1].TotalPW {
			t.Errorf("the best total falls as the limit grows: %+v", b.Growth)
		}
	}
	if b.Next == nil || b.Next.TotalFirstCost <= b.Limit || b.Next.TotalPW <= b.TotalPW {
		t.Errorf("next step: %+v", b.Next)
	}
}
