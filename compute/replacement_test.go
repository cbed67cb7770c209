package compute_test

// Replacement studies: the equivalent annual cost of every life, the
// economic service life and the year to replace, against brute force
// written here from the definitions.

import (
	"fmt"
	"math"
	"math/rand"
	"strings"
	"testing"
)

// repAsset is a generated asset of a replacement study: a first cost (the
// defender's market value today), yearly costs growing by a gradient or
// escalating, an overhaul every K years, and market values by age.
type repAsset struct {
	first   float64
	cost    float64
	grad    float64
	esc     float64
	hasEsc  bool
	every   int
	overh   float64
	market  []float64 // after 0, 1, ... years
	life    int
	text    string
	mvLine  string
	salvage float64
}

// costAt is the cost of year t of keeping the asset k years: the yearly
// cost, and the overhaul every K years strictly before year k.
func (a *repAsset) costAt(t, k int) float64 {
	c := a.cost + a.grad*float64(t-1)
	if a.hasEsc {
		c = a.cost * math.Pow(1+a.esc, float64(t-1))
	}
	if a.every > 0 && t%a.every == 0 && t < k {
		c += a.overh
	}
	return c
}

// eac is the equivalent annual cost of keeping the asset k years, summed
// year by year: (first cost + sum cost_t (1+i)^-t - MV_k (1+i)^-k) (A/P).
func (a *repAsset) eac(i float64, k int) float64 {
	pw := a.first - a.market[k]*math.Pow(1+i, -float64(k))
	for t := 1; t <= k; t++ {
		pw += a.costAt(t, k) * math.Pow(1+i, -float64(t))
	}
	return pw * capRecovery(i, k)
}

func randomRepAsset(rng *rand.Rand, id string, defender bool) *repAsset {
	a := &repAsset{life: 3 + rng.Intn(14)}
	a.first = float64(20+rng.Intn(200)) * 1000
	a.cost = float64(2+rng.Intn(30)) * 1000
	if rng.Intn(2) == 0 {
		a.grad = float64(rng.Intn(40)) * 100
	} else {
		a.esc, a.hasEsc = float64(rng.Intn(200))/1000, true
	}
	if rng.Intn(2) == 0 {
		a.every = 2 + rng.Intn(min(4, a.life-2))
		a.overh = float64(1+rng.Intn(20)) * 1000
	}
	var b strings.Builder
	fmt.Fprintf(&b, "```alternative %s\nlife: %d\n", id, a.life)
	if !defender || rng.Intn(2) == 0 {
		fmt.Fprintf(&b, "first cost: %v\n", a.first)
	}
	if a.hasEsc {
		fmt.Fprintf(&b, "annual cost: %v escalating %v%%\n", a.cost, a.esc*100)
	} else {
		fmt.Fprintf(&b, "annual cost: %v gradient %v\n", a.cost, a.grad)
	}
	if a.every > 0 {
		fmt.Fprintf(&b, "cost every %d years: %v\n", a.every, a.overh)
	}
	// Market values: declining, a list, or (challenger) the straight-line
	// default between first cost and salvage.
	start := a.first * (0.3 + 0.6*rng.Float64())
	if !defender {
		start = a.first
	}
	switch k := rng.Intn(3); {
	case k == 0 || (defender && k == 2):
		r := float64(5+rng.Intn(30)) / 100
		for y := 0; y <= a.life; y++ {
			a.market = append(a.market, start*math.Pow(1-r, float64(y)))
		}
		a.mvLine = fmt.Sprintf("%v declining %v%%", start, r*100)
	case k == 1:
		var vals []string
		v := math.Round(start)
		n := a.life
		if rng.Intn(2) == 0 {
			n = 2 + rng.Intn(a.life) // a list shorter than the life limits it
		}
		for y := 0; y <= n && y <= a.life; y++ {
			a.market = append(a.market, v)
			vals = append(vals, fmt.Sprintf("%v", v))
			v = math.Round(v * (0.6 + 0.35*rng.Float64()))
		}
		a.mvLine = strings.Join(vals, ", ")
	default:
		a.salvage = math.Round(a.first * 0.1 * rng.Float64())
		fmt.Fprintf(&b, "salvage: %v\n", a.salvage)
		for y := 0; y <= a.life; y++ {
			a.market = append(a.market, a.first-(a.first-a.salvage)*float64(y)/float64(a.life))
		}
	}
	if defender {
		a.first = a.market[0] // the market value today is its first cost
	}
	b.WriteString("```\n\n")
	a.text = b.String()
	return a
}

// TestEconomicServiceLife: for random defenders and challengers the
// equivalent annual cost of every life, the economic service life (the
// least EAC, found here by trying every life), the recommendation and the
// year to replace (the K that minimizes keeping the defender K years and
// then serving with challengers at their least EAC forever, tried for
// every K) agree with brute force.
func TestEconomicServiceLife(t *testing.T) {
	for seed := int64(1); seed <= 300; seed++ {
		rng := rand.New(rand.NewSource(seed))
		i := float64(3+rng.Intn(12)) / 100
		d := randomRepAsset(rng, "old", true)
		c := randomRepAsset(rng, "new", false)
		var b strings.Builder
		fmt.Fprintf(&b, "---\ntitle: Replace\nrate: %v%%\n---\n\n%s%s```replacement r\ndefender: old\nchallenger: new\nmarket value: %s\n", i*100, d.text, c.text, d.mvLine)
		if c.mvLine != "" {
			fmt.Fprintf(&b, "challenger market value: %s\n", c.mvLine)
		}
		b.WriteString("```\n")
		src := b.String()
		rep := computeMemo(t, src)
		if len(rep.Replacements) != 1 {
			t.Fatalf("seed %d: %d replacement results\n%s", seed, len(rep.Replacements), src)
		}
		rp := rep.Replacements[0]
		best := func(a *repAsset, got []float64, name string) (int, float64) {
			n := len(a.market) - 1
			if len(got) != n {
				t.Errorf("seed %d, %s: %d lives tried, want %d\n%s", seed, name, len(got), n, src)
				return 0, 0
			}
			k0, e0 := 0, math.Inf(1)
			for k := 1; k <= n; k++ {
				e := a.eac(i, k)
				if math.Abs(got[k-1]-e) > 1e-6*math.Max(1, e) {
					t.Errorf("seed %d, %s kept %d years: EAC %.6f, brute force %.6f\n%s", seed, name, k, got[k-1], e, src)
				}
				if k0 == 0 || e < e0-1e-9*math.Abs(e0) {
					k0, e0 = k, e
				}
			}
			return k0, e0
		}
		var gd, gc []float64
		for _, l := range rp.Defender.Lives {
			gd = append(gd, -l.AW)
		}
		for _, l := range rp.Challenger.Lives {
			gc = append(gc, -l.AW)
		}
		kd, ed := best(d, gd, "defender")
		kc, ec := best(c, gc, "challenger")
		if rp.Defender.Economic != kd || rp.Challenger.Economic != kc {
			t.Errorf("seed %d: economic lives %d and %d, brute force %d and %d\n%s", seed, rp.Defender.Economic, rp.Challenger.Economic, kd, kc, src)
		}
		if rp.Defender.FirstCost != d.market[0] {
			t.Errorf("seed %d: the defender's first cost is %v, not its market value today %v", seed, rp.Defender.FirstCost, d.market[0])
		}
		// The year to replace by brute force over every K.
		cost := func(K int) float64 {
			if K == 0 {
				return ec / i
			}
			return d.eac(i, K)/capRecovery(i, K) + math.Pow(1+i, -float64(K))*ec/i
		}
		K, cK := 0, cost(0)
		for k := 1; k < len(d.market); k++ {
			if cost(k) < cK-1e-9*math.Abs(cK) {
				K, cK = k, cost(k)
			}
		}
		keep := ed <= ec
		if rp.Keep != keep || (K > 0) != keep {
			t.Errorf("seed %d: keep %v; brute force: least EACs %.2f and %.2f, best K %d\n%s", seed, rp.Keep, ed, ec, K, src)
		}
		if keep && rp.ReplaceAfter != K {
			t.Errorf("seed %d: replace after %d years, brute force %d\n%s", seed, rp.ReplaceAfter, K, src)
		}
	}
}
