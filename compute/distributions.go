package compute

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// The uncertainty distributions of the memo language, as a risk analysis
// draws them. Parameters are those written after `~`:
//
//	triangular(min, mode, max)  density rising linearly from min to mode and
//	                            falling to max;
//	                            mean (min + mode + max) / 3,
//	                            variance (a² + b² + c² - ab - ac - bc) / 18
//	uniform(min, max)           mean (min + max) / 2, variance (max - min)² / 12
//	normal(mean, sd)            mean, sd² (unbounded: a draw may fall anywhere)
//	pert(min, mode, max)        min + (max - min) Beta(α, β) with the usual
//	                            λ = 4: α = 1 + 4 (mode - min) / (max - min),
//	                            β = 1 + 4 (max - mode) / (max - min);
//	                            mean μ = (min + 4 mode + max) / 6,
//	                            variance (μ - min)(max - μ) / 7
//	lognormal(mean, sd)         the mean and sd of the variable itself (not of
//	                            its logarithm): σ² = ln(1 + sd²/mean²),
//	                            μ = ln(mean) - σ²/2, X = exp(μ + σ Z);
//	                            mean and sd as written, always positive.

// sampler draws one distribution. It is a value: copy it freely.
type sampler struct {
	kind    string
	a, b, c float64 // the parameters as written (c unused for two-parameter kinds)
	// Derived: triangular: the CDF at the mode; pert: α and β; lognormal:
	// μ and σ of the logarithm.
	p, q float64
}

// newSampler prepares a validated distribution for drawing.
func newSampler(d *Distribution) sampler {
	s := sampler{kind: d.Kind, a: d.Params[0], b: d.Params[1]}
	if len(d.Params) > 2 {
		s.c = d.Params[2]
	}
	switch d.Kind {
	case "triangular":
		s.p = (s.b - s.a) / (s.c - s.a)
	case "pert":
		w := s.c - s.a
		s.p = 1 + 4*(s.b-s.a)/w
		s.q = 1 + 4*(s.c-s.b)/w
	case "lognormal":
		sigma2 := math.Log1p((s.b / s.a) * (s.b / s.a))
		s.q = math.Sqrt(sigma2)
		s.p = math.Log(s.a) - sigma2/2
	}
	return s
}

// draw returns one value.
func (s *sampler) draw(r *rand.Rand) float64 {
	switch s.kind {
	case "triangular":
		return s.quantile(r.Float64())
	case "uniform":
		return s.a + (s.b-s.a)*r.Float64()
	case "normal":
		return s.a + s.b*r.NormFloat64()
	case "pert":
		x := gammaDraw(r, s.p)
		y := gammaDraw(r, s.q)
		return s.a + (s.c-s.a)*x/(x+y)
	case "lognormal":
		return math.Exp(s.p + s.q*r.NormFloat64())
	}
	return math.NaN()
}

// gammaDraw draws Gamma(shape, 1) for shape >= 1 by the method of
// Marsaglia and Tsang (2000): d = shape - 1/3, c = 1/sqrt(9d); accept
// d v with v = (1 + c x)³, x standard normal, when
// ln u < x²/2 + d (1 - v + ln v).
func gammaDraw(r *rand.Rand, shape float64) float64 {
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		x2 := x * x
		if u < 1-0.0331*x2*x2 {
			return d * v
		}
		if math.Log(u) < 0.5*x2+d*(1-v+math.Log(v)) {
			return d * v
		}
	}
}

// Mean is the distribution's mean.
func (s *sampler) Mean() float64 {
	switch s.kind {
	case "triangular":
		return (s.a + s.b + s.c) / 3
	case "uniform":
		return (s.a + s.b) / 2
	case "normal", "lognormal":
		return s.a
	case "pert":
		return (s.a + 4*s.b + s.c) / 6
	}
	return math.NaN()
}

// Variance is the distribution's variance.
func (s *sampler) Variance() float64 {
	a, b, c := s.a, s.b, s.c
	switch s.kind {
	case "triangular":
		return (a*a + b*b + c*c - a*b - a*c - b*c) / 18
	case "uniform":
		return (b - a) * (b - a) / 12
	case "normal", "lognormal":
		return b * b
	case "pert":
		m := s.Mean()
		return (m - a) * (c - m) / 7
	}
	return math.NaN()
}

// SD is the distribution's standard deviation.
func (s *sampler) SD() float64 {
	sd := math.Sqrt(s.Variance())
	if !math.IsInf(sd, 0) && !math.IsNaN(sd) {
		return sd
	}
	// Fix (fuzzing, FuzzPipeline): the variance of triangular(1, 100,
	// 1e300) overflows though its root does not; the root is then taken of
	// the variance of the parameters divided by the largest of them.
	if s.kind == "normal" || s.kind == "lognormal" {
		return math.Abs(s.b) // the parameter is the standard deviation
	}
	scale := max(math.Abs(s.a), math.Abs(s.b), math.Abs(s.c))
	t := sampler{kind: s.kind, a: s.a / scale, b: s.b / scale, c: s.c / scale}
	return math.Sqrt(t.Variance()) * scale
}

// quantile is the value below which a fraction u of draws fall, exact for
// every kind but pert, for which it is the triangular distribution's on the
// same (min, mode, max): the engine uses it only to choose points inside
// the range of a distribution.
func (s *sampler) quantile(u float64) float64 {
	switch s.kind {
	case "triangular", "pert":
		a, b, c := s.a, s.b, s.c
		f := (b - a) / (c - a)
		// Fix (fuzzing, FuzzPipeline): over a range wider than about
		// 1e154 the product under the root overflowed, and
		// triangular(1, 100, 1e300) drew -Inf; the root is then taken of
		// each factor.
		if u < f {
			if p := u * (c - a) * (b - a); !math.IsInf(p, 0) {
				return a + math.Sqrt(p)
			}
			return a + math.Sqrt(u*(c-a))*math.Sqrt(b-a)
		}
		if p := (1 - u) * (c - a) * (c - b); !math.IsInf(p, 0) {
			return c - math.Sqrt(p)
		}
		return c - math.Sqrt((1-u)*(c-a))*math.Sqrt(c-b)
	case "uniform":
		return s.a + (s.b-s.a)*u
	case "normal":
		return s.a + s.b*math.Sqrt2*math.Erfinv(2*u-1)
	case "lognormal":
		return math.Exp(s.p + s.q*math.Sqrt2*math.Erfinv(2*u-1))
	}
	return math.NaN()
}

// bounds is the range of draws: the distribution's support where it is
// bounded, else its 0.1st and 99.9th percentiles.
func (s *sampler) bounds() (lo, hi float64) {
	switch s.kind {
	case "triangular", "pert":
		return s.a, s.c
	case "uniform":
		return s.a, s.b
	}
	return s.quantile(0.001), s.quantile(0.999)
}

// bounded reports whether every draw falls within bounds().
func (s *sampler) bounded() bool { return s.kind != "normal" && s.kind != "lognormal" }

// String writes the distribution as the memo does.
func (s *sampler) String() string {
	if s.kind == "triangular" || s.kind == "pert" {
		return fmt.Sprintf("%s(%g, %g, %g)", s.kind, s.a, s.b, s.c)
	}
	return fmt.Sprintf("%s(%g, %g)", s.kind, s.a, s.b)
}
