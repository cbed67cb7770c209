package compute

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// npvScale is the size of the terms of NPV(r, flows): sum |flows[t]| (1+r)^-t,
// the scale against which an NPV of "about zero" is judged.
func npvScale(r float64, flows []float64) float64 {
	s := 0.0
	for t, f := range flows {
		s += math.Abs(f) * math.Pow(1+r, -float64(t))
	}
	return s
}

// checkRootsAre checks that got holds exactly the rates want (ascending), to
// 1e-9 relative, and that the NPV at each found rate is about zero.
func checkRootsAre(t *testing.T, flows, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("FlowRates(%v) = %v, want %v", flows, got, want)
	}
	for k := range want {
		if math.Abs(got[k]-want[k]) > 1e-9*math.Max(1, math.Abs(want[k])) {
			t.Fatalf("FlowRates(%v) = %v, want %v", flows, got, want)
		}
	}
	checkNPVZero(t, flows, got)
}

func checkNPVZero(t *testing.T, flows, rates []float64) {
	t.Helper()
	for _, r := range rates {
		if v, s := NPV(r, flows), npvScale(r, flows); math.Abs(v) > 1e-10*s {
			t.Errorf("NPV(%v) = %g at a found rate, against terms of size %g", r, v, s)
		}
	}
}

func TestRootBrent(t *testing.T) {
	cases := []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
	}{
		{"cos", math.Cos, 0, 2, math.Pi / 2},
		{"cube", func(x float64) float64 { return x*x*x - 2 }, 0, 3, math.Cbrt(2)},
		{"reversed bracket", func(x float64) float64 { return x*x*x - 2 }, 3, 0, math.Cbrt(2)},
		{"flat then steep", func(x float64) float64 { return math.Pow(x, 9) - 1e-9 }, 0, 1, 0.1},
		{"root at a", func(x float64) float64 { return x - 1 }, 1, 2, 1},
		{"root at b", func(x float64) float64 { return x - 2 }, 1, 2, 2},
		{"root at zero", func(x float64) float64 { return math.Sin(x) }, -1, 0.5, 0},
	}
	for _, c := range cases {
		got, ok := Root(c.f, c.a, c.b)
		if !ok || math.Abs(got-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) {
			t.Errorf("Root(%s) = %.17g, %v; want %.17g", c.name, got, ok, c.want)
		}
	}
	if _, ok := Root(math.Cos, 0, 1); ok {
		t.Error("Root(cos, 0, 1): no sign change, want ok = false")
	}
	if _, ok := Root(func(x float64) float64 { return math.Sqrt(x) - 0.5 }, -1, 1); ok {
		t.Error("Root with NaN at an end: want ok = false")
	}
}

func TestRootConventionalFlows(t *testing.T) {
	// Construct flows with a known rate: pick r, draw incomes, and set the
	// first cost to their present worth at r, so that NPV(r) = 0 exactly in
	// exact arithmetic. One change of sign: exactly one rate (Descartes).
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := 0; trial < 500; trial++ {
		r := -0.5 + 3.5*rng.Float64()
		n := 1 + rng.IntN(60)
		flows := make([]float64, n+1)
		pw := 0.0
		for k := 1; k <= n; k++ {
			flows[k] = 1000 * rng.Float64()
			pw += flows[k] * math.Pow(1+r, -float64(k))
		}
		flows[0] = -pw
		if SignChanges(flows) != 1 {
			t.Fatalf("SignChanges(%v) = %d, want 1", flows, SignChanges(flows))
		}
		checkRootsAre(t, flows, FlowRates(flows), []float64{r})
	}
	// A worked case: -1000, then 300 a year for 5 years: (P/A, r, 5) = 10/3
	// at r = 15.2382...%; check the found rate through the factor.
	flows := []float64{-1000, 300, 300, 300, 300, 300}
	got := FlowRates(flows)
	if len(got) != 1 || math.Abs(300*PA(got[0], 5)-1000) > 1e-9 {
		t.Fatalf("FlowRates(%v) = %v; 300 (P/A, r, 5) should be 1000", flows, got)
	}
	if math.Abs(got[0]-0.15238) > 5e-6 {
		t.Errorf("FlowRates(%v) = %v, want 15.238%%", flows, got)
	}
}

// flowsWithRoots returns cash flows whose NPV has exactly the given rates of
// return (and the complex pair (1+r) = p ± q i when q != 0): NPV(r) times
// (1+r)^m is the polynomial sign * prod (x - (1+r_j)) in x = 1+r, flows[t]
// its coefficient of x^(m-t).
func flowsWithRoots(sign float64, rates []float64, p, q float64) []float64 {
	poly := []float64{sign} // coefficients, highest power first
	mul := func(factor []float64) {
		out := make([]float64, len(poly)+len(factor)-1)
		for a, ca := range poly {
			for b, cb := range factor {
				out[a+b] += ca * cb
			}
		}
		poly = out
	}
	for _, r := range rates {
		mul([]float64{1, -(1 + r)})
	}
	if q != 0 {
		mul([]float64{1, -2 * p, p*p + q*q})
	}
	return poly
}

func TestRootTwoSignChanges(t *testing.T) {
	// -100, 230, -132: NPV (1+r)^2 = -100 (x - 1.1)(x - 1.2): 10% and 20%.
	flows := []float64{-100, 230, -132}
	if SignChanges(flows) != 2 {
		t.Fatalf("SignChanges(%v) = %d, want 2", flows, SignChanges(flows))
	}
	checkRootsAre(t, flows, FlowRates(flows), []float64{0.1, 0.2})

	// Several known rates at once, from the polynomial they make.
	rng := rand.New(rand.NewPCG(13, 14))
	for trial := 0; trial < 300; trial++ {
		k := 1 + rng.IntN(4)
		var rates []float64
		for len(rates) < k {
			// Rates spread in log(1+r) over (-90%, 900%], kept apart.
			r := math.Expm1(math.Log(0.1) + math.Log(100)*rng.Float64())
			if !slices.ContainsFunc(rates, func(s float64) bool { return math.Abs(math.Log1p(s)-math.Log1p(r)) < 0.05 }) {
				rates = append(rates, r)
			}
		}
		slices.Sort(rates)
		sign := -1.0
		if rng.IntN(2) == 0 {
			sign = 1
		}
		q := 0.0
		if rng.IntN(2) == 0 {
			q = 0.05 + rng.Float64() // a complex pair: no extra real rate
		}
		flows := flowsWithRoots(sign*100, rates, 0.5+2*rng.Float64(), q)
		if sc := SignChanges(flows); sc < k || (sc-k)%2 != 0 {
			t.Fatalf("SignChanges(%v) = %d with %d positive roots: Descartes' rule broken", flows, sc, k)
		}
		checkRootsAre(t, flows, FlowRates(flows), rates)
	}
}

func TestRootNoRate(t *testing.T) {
	for _, flows := range [][]float64{
		{-100, -50, -20},       // all costs
		{100, 50, 20},          // all benefits
		{0, 0, 0},              // nothing at all
		{},                     // no flows
		{-100},                 // a cost and nothing back
		{-100, 0.5},            // the rate, -99.5%, is below -99%
		{-100, 5000},           // the rate, 4900%, is above 1000%
		{-100, 300, -250},      // two sign changes, complex rates
		{-100, 0, 0, 0, -1, 0}, // costs and zeros
	} {
		if got := FlowRates(flows); len(got) != 0 {
			t.Errorf("FlowRates(%v) = %v, want none", flows, got)
		}
	}
}

func TestRootHighRates(t *testing.T) {
	// Rates up to 1000%: -100 now and 100 (1+r) a year later has the rate r.
	for _, r := range []float64{1, 2.5, 4, 6.75, 9, 9.99} {
		flows := []float64{-100, 100 * (1 + r)}
		checkRootsAre(t, flows, FlowRates(flows), []float64{r})
	}
	// 1000% itself, the top of the interval, which is included.
	flows := []float64{-100, 1100}
	checkRootsAre(t, flows, FlowRates(flows), []float64{10})
	// A long flow paying back many times over.
	flows = make([]float64, 30)
	flows[0] = -1
	for k := 1; k < len(flows); k++ {
		flows[k] = 8
	}
	got := FlowRates(flows)
	if len(got) != 1 || got[0] < 7.9 || got[0] > 8 {
		t.Fatalf("FlowRates(-1, 8 x 29) = %v, want one rate just under 800%% (nearly a perpetuity, A/P = i)", got)
	}
	checkNPVZero(t, flows, got)
	// -1 + 8 (P/A, r, 29) = 0 through the factor.
	if v := -1 + 8*PA(got[0], 29); math.Abs(v) > 1e-12 {
		t.Errorf("-1 + 8 (P/A, %v, 29) = %g, want 0", got[0], v)
	}
}

func TestRatesOfReturnGeneral(t *testing.T) {
	// NaN where f is undefined: those intervals are skipped.
	f := func(r float64) float64 {
		if r < 0 {
			return math.NaN()
		}
		return (r - 0.5) * (r - 2)
	}
	if got := RatesOfReturn(f, -0.9, 5); len(got) != 2 || math.Abs(got[0]-0.5) > 1e-12 || math.Abs(got[1]-2) > 2e-12 {
		t.Errorf("RatesOfReturn with NaN below 0 = %v, want [0.5 2]", got)
	}
	// An exact zero at a grid point without a change of sign: hi itself.
	g := func(r float64) float64 { return r - 3 }
	if got := RatesOfReturn(g, -0.5, 3); len(got) != 1 || got[0] != 3 {
		t.Errorf("RatesOfReturn(r-3, -0.5, 3] = %v, want [3]", got)
	}
	// lo is excluded.
	if got := RatesOfReturn(g, 3, 5); len(got) != 0 {
		t.Errorf("RatesOfReturn(r-3, (3, 5]) = %v, want none", got)
	}
	// Identically zero: no rate.
	if got := RatesOfReturn(func(float64) float64 { return 0 }, -0.5, 1); got != nil {
		t.Errorf("RatesOfReturn(0) = %v, want nil", got)
	}
	// Bad intervals.
	for _, b := range [][2]float64{{-1, 1}, {-2, 1}, {1, 1}, {2, 1}, {0, math.Inf(1)}, {math.NaN(), 1}} {
		if got := RatesOfReturn(g, b[0], b[1]); got != nil {
			t.Errorf("RatesOfReturn on (%v, %v] = %v, want nil", b[0], b[1], got)
		}
	}
	// A root near zero, found to an absolute accuracy.
	h := func(r float64) float64 { return math.Expm1(r - 1e-14) }
	if got := RatesOfReturn(h, -0.5, 1); len(got) != 1 || math.Abs(got[0]-1e-14) > 1e-17 {
		t.Errorf("RatesOfReturn(expm1(r - 1e-14)) = %v, want [1e-14]", got)
	}
	// Flows summing to zero have the rate 0.
	flows := []float64{-300, 100, 100, 100}
	if got := FlowRates(flows); len(got) != 1 || math.Abs(got[0]) > 1e-15 {
		t.Errorf("FlowRates(%v) = %v, want [0]", flows, got)
	}
}

func TestRootMerge(t *testing.T) {
	got := mergeRoots([]float64{0.1, 0.1 + 1e-12, 0.1 + 5e-10, 0.2, 50, 50 + 4e-8})
	want := []float64{0.1, 0.2, 50}
	if !slices.Equal(got, want) {
		t.Errorf("mergeRoots = %v, want %v", got, want)
	}
	got = mergeRoots([]float64{0.1, 0.1 + 2e-9})
	if len(got) != 2 {
		t.Errorf("mergeRoots kept %v, want both roots 2e-9 apart", got)
	}
}

func TestRateSignChanges(t *testing.T) {
	for _, c := range []struct {
		flows []float64
		want  int
	}{
		{nil, 0},
		{[]float64{0, 0}, 0},
		{[]float64{-100, 30, 30, 30}, 1},
		{[]float64{-100, 0, 0, 130}, 1},
		{[]float64{-100, 230, -132}, 2},
		{[]float64{-100, 0, 230, 0, 0, -132}, 2},
		{[]float64{100, -1, 1, -1, 1}, 4},
		{[]float64{-5, -5, -5}, 0},
		{[]float64{0, 7, 0, -7}, 1},
	} {
		if got := SignChanges(c.flows); got != c.want {
			t.Errorf("SignChanges(%v) = %d, want %d", c.flows, got, c.want)
		}
	}
}

func BenchmarkFlowRates(b *testing.B) {
	flows := make([]float64, 51)
	flows[0] = -1e6
	for k := 1; k < len(flows); k++ {
		flows[k] = 90000 + 1000*float64(k)
	}
	flows[25] -= 400000 // a mid-life overhaul
	for b.Loop() {
		if len(FlowRates(flows)) == 0 {
			b.Fatal("no rate")
		}
	}
}

func BenchmarkRoot(b *testing.B) {
	f := func(x float64) float64 { return x*x*x - 2 }
	for b.Loop() {
		if _, ok := Root(f, 0, 3); !ok {
			b.Fatal("no root")
		}
	}
}
