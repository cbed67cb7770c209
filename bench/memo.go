// Package bench holds the speed-at-scale benchmarks of worth: generated
// memos of 10, 100, 1,000 and 5,000 alternatives, parsed, computed and
// written as JSON, HTML and PDF (scale_test.go). The memos are invented: a
// county's tender for the pumping units of its drainage stations, each
// offer an alternative with the mix of line forms a real offer would have.
//
// Run the benchmarks with
//
//	go test ./bench -run XXX -bench . -benchtime 3x
//
// and write the memos out (to build them with the binary, e.g. under
// /usr/bin/time -v) with
//
//	go test ./bench -run TestWriteMemos -memos DIR
package bench

import (
	"fmt"
	"math/rand"
	"strings"
)

// Memo writes a memo of n offers: an assume block, the offers in groups of
// ten under a heading with a sentence of prose each, a comparison of every
// offer over a 30-year study period by present worth with five measures
// and a base, a shortlist of the first three offers decided by incremental
// rate of return over a perpetual horizon, a schedule and a diagram block,
// inline values and an expect block. Offers are drawn from a seeded
// generator, so the same n gives the same memo.
func Memo(n int) []byte {
	rng := rand.New(rand.NewSource(int64(1000 + n)))
	var b strings.Builder
	fmt.Fprintf(&b, `---
title: Drainage stations — %d pumping-unit offers
to: Fenwater County Drainage Board
from: Pumping Engineering
date: 2027-09-02
currency: USD
rate: 5.5%%
project: FDB-27-%03d
---

## Why so many offers

The county's framework tender for the pumping units of its drainage
stations drew %d priced offers. Each is a complete unit with its motor,
drive and controls; they differ in first cost, in the energy they save
against today's units, in upkeep and in how often they are overhauled.
The board asked to see every offer over a 30-year study period at 5.5%%.

`+"```assume\n"+`energy_price  = 0.16          # $ per kWh
saved_base    = 240,000       # kWh a year a good unit saves
crew_day      = 2,850         # overhaul crew and crane, per day
flood_day     = 18k           # cost to the public of a day's outage
`+"```\n\n", n, n%1000, n)
	for k := 0; k < n; k++ {
		if k%10 == 0 {
			fmt.Fprintf(&b, "## Offers %d to %d\n\n", k+1, min(k+10, n))
			fmt.Fprintf(&b, "These offers come from bidder %c; their overhaul intervals run from %d to %d years.\n\n", 'A'+rune(k/10%26), 3+k%3, 6+k%5)
		}
		offer(&b, rng, k)
	}
	fmt.Fprintf(&b, `## The comparison

`+"```compare tender\n"+`horizon: study period 30
decide by: present worth
show: present worth, annual worth, irr, benefit-cost, payback
base: u%04d
`+"```\n\n"+`The best offer is **`+"`= best(tender)`"+`**. The first offer is worth
`+"`= pw(u0001, tender)`"+` and the second `+"`= pw(u0002, tender)`"+`; the first
offer returns `+"`= irr(u0001, tender)`"+`.

`+"```compare shortlist\n"+`alternatives: u0001, u0002, u0003
horizon: perpetual
decide by: incremental rate of return
`+"```\n\n"+"```schedule u0001\ncompare: tender\n```\n\n"+"```diagram u0002\n```\n\n"+
		"## What must stay true\n\n```expect\nbest(tender) != \"\"\npw(u0001, tender) > -10M\n```\n", 1)
	return []byte(b.String())
}

// offer writes one alternative with an assortment of line forms.
func offer(b *strings.Builder, rng *rand.Rand, k int) {
	kinds := []string{"split-case", "vertical turbine", "axial-flow", "submersible", "mixed-flow", "screw"}
	life := 10 + rng.Intn(31)
	fmt.Fprintf(b, "```alternative u%04d\nname: Offer %d — %s unit\nlife: %d\n", k+1, k+1, kinds[rng.Intn(len(kinds))], life)
	if rng.Intn(2) == 0 {
		fmt.Fprintf(b, "first cost: %dk\n", 150+rng.Intn(450))
	} else {
		fmt.Fprintf(b, "first cost: $%d,%03d\n", 150+rng.Intn(450), rng.Intn(1000))
	}
	fmt.Fprintf(b, "annual benefit: saved_base * %.2f * energy_price escalating %.1f%%\n", 0.6+rng.Float64()*0.8, 1+rng.Float64()*2)
	fmt.Fprintf(b, "annual cost: %d,%03d gradient %d\n", 4+rng.Intn(14), rng.Intn(1000), 50+rng.Intn(200))
	if rng.Intn(3) == 0 {
		fmt.Fprintf(b, "annual cost from year 1 to year %d: %d   # commissioning support\n", 1+rng.Intn(3), 1500+rng.Intn(4000))
	}
	every := 3 + rng.Intn(6)
	if every >= life {
		every = life - 1
	}
	fmt.Fprintf(b, "cost every %d years: %d * crew_day   # overhaul\n", every, 2+rng.Intn(5))
	if rng.Intn(2) == 0 {
		fmt.Fprintf(b, "cost at year %d: %dk   # drive replacement\n", life/2, 12+rng.Intn(30))
	}
	if rng.Intn(4) == 0 {
		fmt.Fprintf(b, "annual disbenefit from year %d: %.2f * flood_day\n", 1+rng.Intn(life), 0.1+rng.Float64())
	}
	if rng.Intn(5) == 0 {
		fmt.Fprintf(b, "benefit at year %d: %dk   # grant on commissioning\n", 1+rng.Intn(2), 10+rng.Intn(40))
	}
	fmt.Fprintf(b, "salvage: %dk\n", 2+rng.Intn(30))
	if rng.Intn(6) == 0 {
		fmt.Fprintf(b, "residual: %dk\n", 20+rng.Intn(80))
	}
	b.WriteString("```\n\n")
}
