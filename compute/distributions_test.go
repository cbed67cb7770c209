package compute

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestDistributionMoments draws each distribution many times and checks the
// sample mean and variance against the analytic ones, within five standard
// errors of each estimate (the standard error of a sample variance is
// √((m4 - s⁴)/N), from the sample's fourth central moment m4).
//
// The analytic moments are checked themselves by a second route where one
// exists: the PERT variance (μ - min)(max - μ)/7 against the variance of
// (max - min) Beta(α, β), which is (max - min)² αβ / ((α+β)² (α+β+1))
// (the beta distribution's variance, from memory); the lognormal's mean and
// sd against exp(μ + σ²/2) and mean √(e^σ² - 1) (from memory).
func TestDistributionMoments(t *testing.T) {
	cases := []struct {
		kind             string
		params           []float64
		wantMean, wantSD float64 // written out by hand from the formulas (0: skip)
	}{
		// Triangular mean (a+b+c)/3, variance (a²+b²+c²-ab-ac-bc)/18:
		// common practice. (2 + 3 + 10)/3 = 5; (4+9+100-6-20-30)/18 = 57/18.
		{"triangular", []float64{2, 3, 10}, 5, math.Sqrt(57.0 / 18)},
		{"triangular", []float64{0.09, 0.11, 0.15}, (0.09 + 0.11 + 0.15) / 3, 0},
		{"triangular", []float64{5, 5, 6}, 16.0 / 3, 0}, // mode at the minimum
		// Uniform mean (a+b)/2, variance (b-a)²/12: common practice.
		{"uniform", []float64{-4, 8}, 2, math.Sqrt(144.0 / 12)},
		{"normal", []float64{65000, 8000}, 65000, 8000},
		// PERT with λ = 4: mean (min + 4 mode + max)/6 (common practice):
		// (30 + 160 + 60)/6 = 41.667; variance (μ-min)(max-μ)/7.
		{"pert", []float64{30, 40, 60}, 250.0 / 6, math.Sqrt((250.0/6 - 30) * (60 - 250.0/6) / 7)},
		{"pert", []float64{0, 0, 1}, 1.0 / 6, 0},
		// Lognormal given by its own mean and sd.
		{"lognormal", []float64{100000, 20000}, 100000, 20000},
		{"lognormal", []float64{0.05, 0.04}, 0.05, 0.04},
	}
	const n = 400000
	for _, tc := range cases {
		s := newSampler(&Distribution{Kind: tc.kind, Params: tc.params})
		if tc.wantMean != 0 && math.Abs(s.Mean()-tc.wantMean) > 1e-12*math.Abs(tc.wantMean) {
			t.Errorf("%s%v: analytic mean %v, want %v", tc.kind, tc.params, s.Mean(), tc.wantMean)
		}
		if tc.wantSD != 0 && math.Abs(math.Sqrt(s.Variance())-tc.wantSD) > 1e-12*tc.wantSD {
			t.Errorf("%s%v: analytic sd %v, want %v", tc.kind, tc.params, math.Sqrt(s.Variance()), tc.wantSD)
		}
		switch tc.kind {
		case "pert":
			a, c := tc.params[0], tc.params[2]
			al, be := s.p, s.q
			v := (c - a) * (c - a) * al * be / ((al + be) * (al + be) * (al + be + 1))
			if math.Abs(v-s.Variance()) > 1e-12*v {
				t.Errorf("pert%v: variance %v, beta route %v", tc.params, s.Variance(), v)
			}
			if m := a + (c-a)*al/(al+be); math.Abs(m-s.Mean()) > 1e-12*math.Abs(s.Mean())+1e-15 {
				t.Errorf("pert%v: mean %v, beta route %v", tc.params, s.Mean(), m)
			}
		case "lognormal":
			if m := math.Exp(s.p + s.q*s.q/2); math.Abs(m-tc.params[0]) > 1e-12*tc.params[0] {
				t.Errorf("lognormal%v: exp(μ+σ²/2) = %v", tc.params, m)
			}
			if sd := tc.params[0] * math.Sqrt(math.Expm1(s.q*s.q)); math.Abs(sd-tc.params[1]) > 1e-12*tc.params[1] {
				t.Errorf("lognormal%v: sd by the log route %v", tc.params, sd)
			}
		}
		r := rand.New(rand.NewPCG(1, 2))
		xs := make([]float64, n)
		lo, hi := s.bounds()
		for k := range xs {
			xs[k] = s.draw(r)
			if s.bounded() && (xs[k] < lo || xs[k] > hi) {
				t.Fatalf("%s%v: draw %v outside [%v, %v]", tc.kind, tc.params, xs[k], lo, hi)
			}
			if tc.kind == "lognormal" && xs[k] <= 0 {
				t.Fatalf("lognormal draw %v", xs[k])
			}
		}
		mean, sd := moments(xs)
		if d := math.Abs(mean.Value - s.Mean()); d > 5*mean.SE {
			t.Errorf("%s%v: sample mean %v, analytic %v (%.1f standard errors)", tc.kind, tc.params, mean.Value, s.Mean(), d/mean.SE)
		}
		m4 := 0.0
		for _, x := range xs {
			d := x - mean.Value
			m4 += d * d * d * d
		}
		m4 /= n
		seVar := math.Sqrt((m4 - sd*sd*sd*sd) / n)
		if d := math.Abs(sd*sd - s.Variance()); d > 5*seVar {
			t.Errorf("%s%v: sample variance %v, analytic %v (%.1f standard errors)", tc.kind, tc.params, sd*sd, s.Variance(), d/seVar)
		}
		if tc.kind == "lognormal" {
			// The median of a lognormal is e^μ = mean / √(1 + sd²/mean²).
			slices.Sort(xs)
			med := percentile(xs, 0.5)
			want := tc.params[0] / math.Sqrt(1+tc.params[1]*tc.params[1]/(tc.params[0]*tc.params[0]))
			if d := math.Abs(med.Value - want); d > 5*med.SE {
				t.Errorf("lognormal%v: median %v, want %v (%.1f standard errors)", tc.params, med.Value, want, d/med.SE)
			}
		}
	}
}

// TestQuantiles: the quantile functions invert the distribution functions
// written out by hand (common practice), and percentiles of a sample of a
// uniform distribution land where they should.
func TestQuantiles(t *testing.T) {
	tri := newSampler(&Distribution{Kind: "triangular", Params: []float64{2, 3, 10}})
	// CDF of the triangular: (x-a)²/((c-a)(b-a)) below the mode.
	for _, x := range []float64{2.5, 3, 6, 9.5} {
		var u float64
		if x <= 3 {
			u = (x - 2) * (x - 2) / (8 * 1)
		} else {
			u = 1 - (10-x)*(10-x)/(8*7)
		}
		if got := tri.quantile(u); math.Abs(got-x) > 1e-12 {
			t.Errorf("triangular quantile(%v) = %v, want %v", u, got, x)
		}
	}
	nrm := newSampler(&Distribution{Kind: "normal", Params: []float64{10, 2}})
	// z at 90% is 1.2815516 (standard normal tables, from memory).
	if got := nrm.quantile(0.9); math.Abs(got-(10+2*1.2815516)) > 1e-6 {
		t.Errorf("normal quantile(0.9) = %v", got)
	}
	xs := make([]float64, 100001)
	for k := range xs {
		xs[k] = float64(k) / 100000
	}
	for _, p := range []float64{0.1, 0.5, 0.9} {
		e := percentile(xs, p)
		if math.Abs(e.Value-p) > 1e-12 {
			t.Errorf("percentile %v of 0..1: %v", p, e.Value)
		}
		// The order-statistic standard error of a uniform's quantile is
		// √(p(1-p)/N) (the density is 1).
		if want := math.Sqrt(p * (1 - p) / 100001); math.Abs(e.SE-want) > 0.01*want {
			t.Errorf("percentile %v: standard error %v, want %v", p, e.SE, want)
		}
	}
}
