package compute

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Regression tests of what the pipeline fuzz target (cmd/worth,
// FuzzPipeline) found in compute. The whole memos are also seeds of that
// target.

// TestWideDistributions: a distribution whose range is near the largest
// float64 draws finite values, and its standard deviation is finite
// (triangular(1, 100, 1e300) drew -Inf, and its variance overflowed).
func TestWideDistributions(t *testing.T) {
	cases := []struct {
		kind   string
		params []float64
	}{
		{"triangular", []float64{1, 100, 1e300}},
		{"triangular", []float64{-1e300, 0, 1e300}},
		{"triangular", []float64{1e200, 1e300, 1e300}},
		{"pert", []float64{1, 100, 1e300}},
		{"uniform", []float64{-1e300, 1e300}},
		{"normal", []float64{0, 1e300}},
	}
	r := rand.New(rand.NewPCG(1, 2))
	for _, c := range cases {
		s := newSampler(&Distribution{Kind: c.kind, Params: c.params})
		lo, hi := c.params[0], c.params[len(c.params)-1]
		for _, u := range []float64{0, 1e-9, 0.25, 0.5, 0.75, 1 - 1e-9} {
			if u == 0 && c.kind == "normal" {
				continue // -Inf: the normal distribution is unbounded
			}
			q := s.quantile(u)
			if math.IsInf(q, 0) || math.IsNaN(q) || c.kind != "normal" && (q < lo || q > hi) {
				t.Errorf("%s%v: quantile(%v) = %v", c.kind, c.params, u, q)
			}
		}
		for range 1000 {
			if x := s.draw(r); math.IsInf(x, 0) || math.IsNaN(x) {
				t.Fatalf("%s%v drew %v", c.kind, c.params, x)
			}
		}
		sd := s.SD()
		if math.IsInf(sd, 0) || math.IsNaN(sd) || sd <= 0 {
			t.Errorf("%s%v: SD = %v", c.kind, c.params, sd)
		}
	}
	// The standard deviation of triangular(a, b, c) is
	// sqrt((a² + b² + c² − ab − ac − bc) / 18) (the triangular
	// distribution's variance, recalled from memory); for (0, 0, c) that is
	// c / sqrt(18).
	s := newSampler(&Distribution{Kind: "triangular", Params: []float64{0, 0, 1e300}})
	if got, want := s.SD(), 1e300/math.Sqrt(18); math.Abs(got-want) > 1e-12*want {
		t.Errorf("SD of triangular(0, 0, 1e300) = %v, want %v", got, want)
	}
}

// TestMomentsOverflow: the mean and standard deviation of trial present
// worths near the largest float64 are finite (their sums overflowed).
func TestMomentsOverflow(t *testing.T) {
	xs := []float64{1e308, -1e308, 1e308, -1e308, 1.7e308}
	mean, sd := moments(xs)
	// By hand: the mean is 1.7e308 / 5 = 3.4e307; the squared deviations
	// sum to 4 (1e308 ∓ 3.4e307)² ... computed here in units of 1e307.
	var ss float64
	for _, x := range []float64{100, -100, 100, -100, 170} {
		ss += (x - 34) * (x - 34)
	}
	wantSD := math.Sqrt(ss/4) * 1e307
	if math.Abs(mean.Value-3.4e307) > 1e-12*3.4e307 || math.Abs(sd-wantSD) > 1e-12*wantSD {
		t.Errorf("moments = %v, %v; want 3.4e307, %v", mean.Value, sd, wantSD)
	}
	if math.IsInf(mean.SE, 0) || math.IsNaN(mean.SE) {
		t.Errorf("standard error %v", mean.SE)
	}
	// Ordinary values are summed as before.
	mean, sd = moments([]float64{1, 2, 3, 4})
	if mean.Value != 2.5 || math.Abs(sd-math.Sqrt(5.0/3)) > 1e-15 {
		t.Errorf("moments(1, 2, 3, 4) = %v, %v; want 2.5, %v", mean.Value, sd, math.Sqrt(5.0/3))
	}
}
