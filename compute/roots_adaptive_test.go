package compute

import (
	"math"
	"math/rand"
	"testing"
)

// TestAdaptiveFindsWhatTheGridFinds: on random flows with several changes
// of sign, the adaptive search finds every rate the full grid scan finds
// (and each rate it reports zeroes the present worth).
func TestAdaptiveFindsWhatTheGridFinds(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	for k := 0; k < 400; k++ {
		n := 2 + rng.Intn(60)
		flows := make([]float64, n)
		for i := range flows {
			flows[i] = (rng.Float64() - 0.5) * math.Pow(10, 1+rng.Float64()*4)
			if rng.Intn(4) == 0 {
				flows[i] = 0
			}
		}
		if SignChanges(flows) < 2 {
			continue
		}
		grid := RatesOfReturn(func(r float64) float64 { return NPV(r, flows) }, FlowRateLow, FlowRateHigh)
		got := flowRatesAdaptive(flows, FlowRateLow, FlowRateHigh)
		for _, g := range grid {
			found := false
			for _, r := range got {
				if math.Abs(r-g) <= 1e-9*math.Max(1, math.Abs(g)) {
					found = true
				}
			}
			if !found {
				t.Fatalf("flows %v: the grid finds %v, the adaptive search %v", flows, grid, got)
			}
		}
		for _, r := range got {
			scale := 0.0
			for i, c := range flows {
				scale += math.Abs(c) * math.Pow(1+r, -float64(i))
			}
			if v := NPV(r, flows); math.Abs(v) > 1e-7*scale {
				t.Fatalf("flows %v: rate %v leaves present worth %v", flows, r, v)
			}
		}
	}
}

func BenchmarkFlowRatesSeveralSigns(b *testing.B) {
	flows := make([]float64, 41)
	flows[0] = -1000
	for t := 1; t <= 40; t++ {
		flows[t] = 90
		if t%8 == 0 {
			flows[t] = -300
		}
	}
	for b.Loop() {
		FlowRates(flows)
	}
}

func BenchmarkGridScanSeveralSigns(b *testing.B) {
	flows := make([]float64, 41)
	flows[0] = -1000
	for t := 1; t <= 40; t++ {
		flows[t] = 90
		if t%8 == 0 {
			flows[t] = -300
		}
	}
	for b.Loop() {
		RatesOfReturn(func(r float64) float64 { return NPV(r, flows) }, FlowRateLow, FlowRateHigh)
	}
}
