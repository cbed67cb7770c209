package compute

import (
	"math"
	"slices"
)

// Rate of return: the rates r at which the present worth of a cash flow is
// zero, NPV(r) = sum_t flows[t] (1+r)^-t = 0.

const (
	// rateGridIntervals is the number of intervals of the scanning grid of
	// RatesOfReturn, uniform in log(1+r).
	rateGridIntervals = 4000
	// rootRelTol is the relative accuracy to which each root is refined.
	rootRelTol = 1e-12
	// rootMergeTol is the distance, relative to max(1, |r|), under which two
	// roots are taken as one.
	rootMergeTol = 1e-9
	// FlowRateLow and FlowRateHigh bound the rates FlowRates searches:
	// (-99%, 1000%].
	FlowRateLow  = -0.99
	FlowRateHigh = 10.0
)

// RatesOfReturn returns every rate r in (lo, hi] at which f(r) = 0, in
// ascending order.
//
// It scans a grid of rateGridIntervals intervals uniform in log(1+r),
//
//	r_k = exp(log(1+lo) + k (log(1+hi) - log(1+lo)) / N) - 1,  k = 0..N,
//
// for changes of sign of f, and refines each bracketed root with Brent's
// method to 1e-12 relative (Root). A grid point r_k, k > 0, where f is
// exactly zero is a root too. f may return NaN where it is undefined: the
// intervals touching such points are skipped. Roots closer than 1e-9
// (relative to max(1, |r|)) are merged into one.
//
// A root where f touches zero without changing sign between grid points (an
// even-multiplicity root) is not found, nor are two roots within one grid
// interval. If f is zero at every grid point where it is defined, f is taken
// as identically zero and no rate is returned. It needs -1 < lo < hi, and
// returns nil otherwise.
func RatesOfReturn(f func(r float64) float64, lo, hi float64) []float64 {
	return RatesOfReturnGrid(f, lo, hi, rateGridIntervals)
}

// RatesOfReturnGrid is RatesOfReturn with a grid of n intervals, for
// searches over a narrow span (a chart's crossover rates) where the full
// grid is needlessly fine.
func RatesOfReturnGrid(f func(r float64) float64, lo, hi float64, n int) []float64 {
	if !(lo > -1) || !(hi > lo) || math.IsInf(hi, 0) || n < 1 {
		return nil
	}
	a0, a1 := math.Log1p(lo), math.Log1p(hi)
	grid := func(k int) float64 {
		switch k {
		case 0:
			return lo
		case n:
			return hi
		}
		return math.Expm1(a0 + float64(k)*(a1-a0)/float64(n))
	}

	var roots []float64
	allZero := true
	ra := grid(0)
	fa := f(ra)
	if !math.IsNaN(fa) && fa != 0 {
		allZero = false
	}
	for k := 1; k <= n; k++ {
		rb := grid(k)
		fb := f(rb)
		switch {
		case math.IsNaN(fb):
		case fb == 0:
			roots = append(roots, rb)
		default:
			allZero = false
			if !math.IsNaN(fa) && fa != 0 && (fa < 0) != (fb < 0) {
				if r, ok := Root(f, ra, rb); ok {
					roots = append(roots, r)
				}
			}
		}
		ra, fa = rb, fb
	}
	if allZero {
		return nil
	}
	slices.Sort(roots)
	return mergeRoots(roots)
}

// mergeRoots removes from the sorted roots those closer than rootMergeTol
// to the one before them.
func mergeRoots(roots []float64) []float64 {
	if len(roots) < 2 {
		return roots
	}
	out := roots[:1]
	for _, r := range roots[1:] {
		last := out[len(out)-1]
		if r-last <= rootMergeTol*math.Max(1, math.Abs(last)) {
			continue
		}
		out = append(out, r)
	}
	return out
}

// FlowRates returns every rate of return of the cash flows (flows[t] at the
// end of year t) in (-99%, 1000%], ascending: the rates r at which
//
//	NPV(r, flows) = sum_t flows[t] (1+r)^-t = 0
//
// found by RatesOfReturn. Flows that are all zero have none.
func FlowRates(flows []float64) []float64 {
	return FlowRatesIn(flows, FlowRateLow, FlowRateHigh)
}

// FlowRatesIn is FlowRates over the rates in (lo, hi].
func FlowRatesIn(flows []float64, lo, hi float64) []float64 {
	f := func(r float64) float64 { return NPV(r, flows) }
	// Fix (speed, see bench_test.go): flows with one change of sign have
	// exactly one rate (SignChanges), so a binary search over the scanning
	// grid finds the interval the full scan would, in a dozen evaluations
	// instead of rateGridIntervals.
	if SignChanges(flows) == 1 {
		if roots, ok := oneRate(f, lo, hi); ok {
			return roots
		}
	}
	return flowRatesAdaptive(flows, lo, hi)
}

// flowRatesAdaptive finds every rate of flows in (lo, hi] by subdividing
// instead of scanning the whole fine grid. In u = log(1+r) the present
// worth is f(u) = sum_t c_t e^(-t u), whose slope on [ua, ub] is bounded by
//
//	L = sum_t t |c_t| e^(-t ua)
//
// so an interval of width w where max(|f(ua)|, |f(ub)|) > L w holds no
// root and is skipped. Other intervals are halved down to the width of
// RatesOfReturn's grid (rateGridIntervals), where a change of sign is
// refined by Root. It finds what that grid scan finds, at a fraction of
// the evaluations when the present worth keeps away from zero over most of
// the range, and never needs many more than the grid.
func flowRatesAdaptive(flows []float64, lo, hi float64) []float64 {
	if !(lo > -1) || !(hi > lo) || math.IsInf(hi, 0) {
		return nil
	}
	weighted := make([]float64, len(flows))
	allZero := true
	for t, c := range flows {
		weighted[t] = float64(t) * math.Abs(c)
		allZero = allZero && c == 0
	}
	if allZero {
		return nil
	}
	f := func(u float64) float64 { return NPV(math.Expm1(u), flows) }
	slope := func(u float64) float64 { return NPV(math.Expm1(u), weighted) }
	a0, a1 := math.Log1p(lo), math.Log1p(hi)
	fine := (a1 - a0) / rateGridIntervals
	finite := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	var roots []float64
	var scan func(ua, ub, fa, fb float64)
	scan = func(ua, ub, fa, fb float64) {
		w := ub - ua
		if finite(fa) && finite(fb) && fa != 0 && fb != 0 {
			if (fa < 0) != (fb < 0) && w <= fine {
				if r, ok := Root(func(r float64) float64 { return NPV(r, flows) }, math.Expm1(ua), math.Expm1(ub)); ok {
					roots = append(roots, r)
				}
				return
			}
			if (fa < 0) == (fb < 0) {
				if L := slope(ua); finite(L) && math.Max(math.Abs(fa), math.Abs(fb)) > L*w {
					return
				}
			}
		}
		if w <= fine {
			return // the grid's resolution: no change of sign here
		}
		um := ua + w/2
		fm := f(um)
		if fm == 0 {
			roots = append(roots, math.Expm1(um))
		}
		scan(ua, um, fa, fm)
		scan(um, ub, fm, fb)
	}
	const coarse = 64
	ua, fa := a0, f(a0)
	for k := 1; k <= coarse; k++ {
		ub := a0 + float64(k)*(a1-a0)/coarse
		if k == coarse {
			ub = a1
		}
		fb := f(ub)
		if fb == 0 {
			roots = append(roots, math.Expm1(ub))
		}
		scan(ua, ub, fa, fb)
		ua, fa = ub, fb
	}
	slices.Sort(roots)
	return mergeRoots(roots)
}

// oneRate returns the rate in (lo, hi] of f, which has exactly one root in
// (-1, +Inf) where it changes sign: a binary search for the change of sign
// over the grid of RatesOfReturn, then Root on that interval. ok is false,
// for the caller to scan instead, when f is NaN at a point or Root fails.
func oneRate(f func(r float64) float64, lo, hi float64) ([]float64, bool) {
	const n = rateGridIntervals
	a0, a1 := math.Log1p(lo), math.Log1p(hi)
	grid := func(k int) float64 { return math.Expm1(a0 + float64(k)*(a1-a0)/n) }
	ka, kb := 0, n
	fa, fb := f(lo), f(hi)
	switch {
	case math.IsNaN(fa) || math.IsNaN(fb):
		return nil, false
	case fb == 0:
		return []float64{hi}, true
	case fa == 0 || (fa < 0) == (fb < 0):
		return nil, true // the one root is at or below lo, or above hi
	}
	for kb-ka > 1 {
		k := (ka + kb) / 2
		r := grid(k)
		fk := f(r)
		switch {
		case math.IsNaN(fk):
			return nil, false
		case fk == 0:
			return []float64{r}, true
		case (fk < 0) == (fa < 0):
			ka, fa = k, fk
		default:
			kb = k
		}
	}
	ra, rb := lo, hi
	if ka > 0 {
		ra = grid(ka)
	}
	if kb < n {
		rb = grid(kb)
	}
	r, ok := Root(f, ra, rb)
	if !ok {
		return nil, false
	}
	return []float64{r}, true
}

// SignChanges returns the number of changes of sign in flows, zeros
// ignored. By Descartes' rule of signs, applied to NPV as a polynomial in
// 1/(1+r), the cash flows have at most that many rates of return in
// (-1, +Inf), and the count differs from it by an even number; one change
// of sign (a conventional investment or loan) means exactly one rate.
func SignChanges(flows []float64) int {
	count, last := 0, 0.0
	for _, f := range flows {
		if f == 0 || math.IsNaN(f) {
			continue
		}
		if last != 0 && (f < 0) != (last < 0) {
			count++
		}
		last = f
	}
	return count
}

// Root returns a root of f in [a, b], where f(a) and f(b) have opposite
// signs (or one of them is zero), found by Brent's method: inverse quadratic
// interpolation or the secant step where they make good progress, bisection
// where they do not, so that the bracket always shrinks. It stops when the
// bracket is within 1e-12 relative (and 4 ulp; 1e-18 absolute for roots
// within 1e-6 of zero) or f is exactly zero.
// ok is false when [a, b] does not bracket a root, when f is NaN at a point
// it evaluates, or when the iteration does not converge in 200 steps.
func Root(f func(float64) float64, a, b float64) (root float64, ok bool) {
	fa, fb := f(a), f(b)
	switch {
	case math.IsNaN(fa) || math.IsNaN(fb):
		return math.NaN(), false
	case fa == 0:
		return a, true
	case fb == 0:
		return b, true
	case (fa < 0) == (fb < 0):
		return math.NaN(), false
	}
	// b is the best estimate, a the previous one, c the other end of the
	// bracket [b, c].
	c, fc := a, fa
	d := b - a
	e := d
	for iter := 0; iter < 200; iter++ {
		if (fb < 0) == (fc < 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		// Half the accepted bracket: 1e-12 relative, 1e-18 absolute near 0.
		tol := 2*2.220446049250313e-16*math.Abs(b) + 0.5*math.Max(rootRelTol*math.Abs(b), 1e-18)
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol || fb == 0 {
			return b, true
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			// Interpolate: secant when a == c, inverse quadratic otherwise.
			var p, q float64
			s := fb / fa
			if a == c {
				p = 2 * m * s
				q = 1 - s
			} else {
				q0 := fa / fc
				r := fb / fc
				p = s * (2*m*q0*(q0-r) - (b-a)*(r-1))
				q = (q0 - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if 2*p < math.Min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d, e = m, m
			}
		} else {
			d, e = m, m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else if m > 0 {
			b += tol
		} else {
			b -= tol
		}
		fb = f(b)
		if math.IsNaN(fb) {
			return math.NaN(), false
		}
	}
	return math.NaN(), false
}
