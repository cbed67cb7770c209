package compute

import "math"

// Compound-interest factors, discrete end-of-period compounding, in the
// trade's (X/Y, i, n) notation: (P/A, i, n) is the present worth at year 0 of
// one unit paid at the end of each of years 1..n at the rate i per year.
//
// The number of periods n is a float64 so that n = math.Inf(1) stands for a
// perpetuity. Every factor is computed through math.Log1p and math.Expm1 so
// that it stays accurate near i = 0, and takes its exact limit at i = 0.
//
// A rate i <= -1 (or NaN) has no meaning as an interest rate, since 1+i would
// not be positive: every factor returns NaN for it.

// badRate reports whether i is not usable as a rate of interest.
func badRate(i float64) bool { return math.IsNaN(i) || i <= -1 }

// growth returns n log(1+i), the logarithm of (F/P, i, n), taking 0 for
// i = 0 even when n is infinite.
func growth(i, n float64) float64 {
	if i == 0 {
		return 0
	}
	return n * math.Log1p(i)
}

// FP returns the single-payment compound-amount factor
//
//	(F/P, i, n) = (1+i)^n
//
// For n = +Inf it is +Inf for i > 0, 1 for i = 0 and 0 for -1 < i < 0.
// It returns NaN for i <= -1.
func FP(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	return math.Exp(growth(i, n))
}

// PF returns the single-payment present-worth factor
//
//	(P/F, i, n) = (1+i)^-n
//
// For n = +Inf it is 0 for i > 0, 1 for i = 0 and +Inf for -1 < i < 0.
// It returns NaN for i <= -1.
func PF(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	return math.Exp(-growth(i, n))
}

// PA returns the uniform-series present-worth factor
//
//	(P/A, i, n) = ((1+i)^n - 1) / (i (1+i)^n) = (1 - (1+i)^-n) / i
//
// computed as -expm1(-n log1p(i)) / i. At i = 0 it is n; for a perpetuity
// (n = +Inf) it is 1/i for i > 0 and +Inf for i <= 0.
// It returns NaN for i <= -1.
func PA(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	if i == 0 {
		return n
	}
	if math.IsInf(n, 1) {
		if i > 0 {
			return 1 / i
		}
		return math.Inf(1)
	}
	return -math.Expm1(-n*math.Log1p(i)) / i
}

// AP returns the capital-recovery factor
//
//	(A/P, i, n) = i (1+i)^n / ((1+i)^n - 1) = 1 / (P/A, i, n)
//
// At i = 0 it is 1/n; for a perpetuity it is i for i > 0 and 0 for i <= 0.
// It returns NaN for i <= -1.
func AP(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	if math.IsInf(n, 1) {
		if i > 0 {
			return i
		}
		return 0
	}
	return 1 / PA(i, n)
}

// FA returns the uniform-series compound-amount factor
//
//	(F/A, i, n) = ((1+i)^n - 1) / i
//
// computed as expm1(n log1p(i)) / i. At i = 0 it is n; for n = +Inf it is
// +Inf for i >= 0 and -1/i for -1 < i < 0.
// It returns NaN for i <= -1.
func FA(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	if i == 0 {
		return n
	}
	return math.Expm1(n*math.Log1p(i)) / i
}

// AF returns the sinking-fund factor
//
//	(A/F, i, n) = i / ((1+i)^n - 1) = 1 / (F/A, i, n)
//
// At i = 0 it is 1/n; for n = +Inf it is 0 for i >= 0.
// It returns NaN for i <= -1.
func AF(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	return 1 / FA(i, n)
}

// expm1mx returns e^x - 1 - x without cancellation for small |x|.
func expm1mx(x float64) float64 {
	if math.Abs(x) >= 1 {
		return math.Expm1(x) - x
	}
	// Taylor series sum_{k>=2} x^k / k!; |x| < 1 needs at most 20 terms.
	term := x * x / 2
	sum := term
	for k := 3; k < 30; k++ {
		term *= x / float64(k)
		sum += term
		if math.Abs(term) <= 1e-17*math.Abs(sum) {
			break
		}
	}
	return sum
}

// log1pmx returns log(1+i) - i without cancellation for small |i|.
func log1pmx(i float64) float64 {
	if math.Abs(i) >= 0.125 {
		return math.Log1p(i) - i
	}
	// Series sum_{k>=2} (-1)^(k+1) i^k / k; |i| < 1/8 needs at most 20 terms.
	p := -i * i // (-1)^(k+1) i^k for k = 2
	sum := p / 2
	for k := 3; k < 40; k++ {
		p *= -i
		term := p / float64(k)
		sum += term
		if math.Abs(term) <= 1e-17*math.Abs(sum) {
			break
		}
	}
	return sum
}

// PG returns the arithmetic-gradient present-worth factor, the present worth
// of 0, 1, 2, ..., n-1 paid at the end of years 1..n:
//
//	(P/G, i, n) = ((1+i)^n - i n - 1) / (i^2 (1+i)^n)
//	            = (1 - e^-x - n i e^-x) / i^2,   x = n log(1+i)
//
// Where |x| < 1 the numerator (1+i)^n - i n - 1 is computed as
// (e^x - 1 - x) + n (log(1+i) - i), each part by its series, so that the
// factor keeps full precision near i = 0, where it tends to n(n-1)/2; else
// the second form is used. For a perpetuity it is 1/i^2 for i > 0 and +Inf
// for i <= 0. It returns NaN for i <= -1.
func PG(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	if math.IsInf(n, 1) {
		if i > 0 {
			return 1 / (i * i)
		}
		return math.Inf(1)
	}
	if i == 0 || n == 1 {
		return n * (n - 1) / 2 // (P/G, i, 1) = 0 whatever i
	}
	x := n * math.Log1p(i)
	if math.Abs(x) < 1 {
		num := expm1mx(x) + n*log1pmx(i)
		return num * math.Exp(-x) / (i * i)
	}
	d := math.Exp(-x)
	return (-math.Expm1(-x) - n*i*d) / (i * i)
}

// AG returns the arithmetic-gradient uniform-series factor
//
//	(A/G, i, n) = 1/i - n / ((1+i)^n - 1) = (P/G, i, n) (A/P, i, n)
//
// computed as the product on the right, which does not cancel near i = 0,
// where it tends to (n-1)/2. For a perpetuity it is 1/i for i > 0 and +Inf
// for i <= 0. It needs n > 0, and returns NaN for i <= -1.
func AG(i, n float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	if math.IsInf(n, 1) {
		if i > 0 {
			return 1 / i
		}
		return math.Inf(1)
	}
	if i == 0 {
		return (n - 1) / 2
	}
	return PG(i, n) * AP(i, n)
}

// PGeo returns the geometric-gradient present-worth factor, the present
// worth of 1, (1+g), (1+g)^2, ..., (1+g)^(n-1) paid at the end of years 1..n:
//
//	(P/A, g, i, n) = (1 - ((1+g)/(1+i))^n) / (i - g)
//
// With u = (g-i)/(1+i) it equals (F/A, u, n) / (1+i), the form used here,
// which does not cancel as g approaches i and tends to n/(1+i) at g = i.
// For a perpetuity it is 1/(i-g) when g < i and +Inf when g >= i.
// It returns NaN for i <= -1 or g <= -1.
func PGeo(g, i, n float64) float64 {
	if badRate(i) || badRate(g) {
		return math.NaN()
	}
	if math.IsInf(n, 1) {
		if g < i {
			return 1 / (i - g)
		}
		return math.Inf(1)
	}
	if g == i {
		return n / (1 + i)
	}
	u := (g - i) / (1 + i)
	return FA(u, n) / (1 + i)
}

// NPV returns the present worth at the rate i of the cash flows, flows[t]
// falling at the end of year t (flows[0] at year 0, undiscounted):
//
//	NPV(i) = sum_t flows[t] (1+i)^-t
//
// evaluated in Horner form with v = 1/(1+i):
// flows[0] + v (flows[1] + v (flows[2] + ...)). It is 0 for no flows and
// NaN for i <= -1.
func NPV(i float64, flows []float64) float64 {
	if badRate(i) {
		return math.NaN()
	}
	v := 1 / (1 + i)
	sum := 0.0
	for t := len(flows) - 1; t >= 0; t-- {
		sum = sum*v + flows[t]
	}
	return sum
}
