package lyap

import (
	"math"
	"sort"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// KaplanYorke returns the Kaplan–Yorke (Lyapunov) dimension of a spectrum,
//
//	D = j + (lambda_1 + … + lambda_j) / |lambda_(j+1)|,
//
// with the exponents sorted in decreasing order and j the largest index whose
// partial sum lambda_1 + … + lambda_j is >= 0. The input is not modified.
//
// Special cases:
//
//	KaplanYorke(nil or empty) = 0
//	KaplanYorke(e) = NaN if any exponent is NaN
//	KaplanYorke(e) = 0 if lambda_1 < 0 (a stable fixed point or cycle)
//	KaplanYorke(e) = len(e) if every partial sum is >= 0 (no contraction
//	  the spectrum can resolve, e.g. a Hamiltonian flow)
//
// References:
//
//	J. L. Kaplan, J. A. Yorke, Chaotic behavior of multidimensional
//	  difference equations, in: Functional Differential Equations and
//	  Approximation of Fixed Points, Lect. Notes Math. 730, Springer
//	  1979, 204–227.
//	P. Frederickson, J. L. Kaplan, E. D. Yorke, J. A. Yorke, The Liapunov
//	  dimension of strange attractors, J. Differential Equations 49 (1983)
//	  185–207.
func KaplanYorke(exponents []float64) float64 {
	if len(exponents) == 0 {
		return 0
	}
	e := append([]float64(nil), exponents...)
	for _, v := range e {
		if math.IsNaN(v) {
			return math.NaN()
		}
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(e)))
	var sum float64
	for j, v := range e {
		if sum+v < 0 {
			if j == 0 {
				return 0
			}
			return float64(j) + sum/math.Abs(v)
		}
		sum += v
	}
	return float64(len(e))
}

// Entropy returns the sum of the positive exponents, which equals the
// Kolmogorov–Sinai entropy for the natural (SRB) measure by Pesin's identity
// and bounds it from above in general (Ruelle's inequality); its units are
// those of the exponents.
//
// Special cases:
//
//	Entropy(nil or empty) = 0
//	Entropy(e) = NaN if any exponent is NaN
//	Entropy(e) = +Inf if any exponent is +Inf
//
// References:
//
//	Ya. B. Pesin, Characteristic Lyapunov exponents and smooth ergodic
//	  theory, Russian Math. Surveys 32 (1977) 55–114.
//	D. Ruelle, An inequality for the entropy of differentiable maps, Bol.
//	  Soc. Brasil. Mat. 9 (1978) 83–87.
func Entropy(exponents []float64) float64 {
	var s float64
	for _, v := range exponents {
		if math.IsNaN(v) {
			return math.NaN()
		}
		if v > 0 {
			s += v
		}
	}
	return s
}

// LyapunovTime returns 1/lambda, the time (or number of iterations) in which
// a small error grows by the factor e.
//
// Special cases:
//
//	LyapunovTime(lambda <= 0) = +Inf (no exponential growth)
//	LyapunovTime(+Inf) = 0
//	LyapunovTime(NaN) = NaN
func LyapunovTime(lambda float64) float64 {
	switch {
	case math.IsNaN(lambda):
		return math.NaN()
	case lambda <= 0:
		return math.Inf(1)
	}
	return 1 / lambda
}

// Horizon returns the predictability horizon
//
//	T = ln(tol/delta0) / lambda,
//
// the time (or number of iterations) for an initial error delta0 to grow to
// the tolerated error tol at the rate lambda. Better initial data buys time
// only logarithmically. The formula assumes uniform exponential growth;
// individual runs scatter around it because finite-time exponents fluctuate
// (see FiniteTime).
//
// Special cases:
//
//	Horizon(lambda, delta0, tol) = NaN if an argument is NaN, delta0 < 0 or tol <= 0
//	Horizon(lambda, delta0, tol) = 0 if delta0 >= tol (already beyond tolerance)
//	Horizon(lambda <= 0, delta0, tol) = +Inf if delta0 < tol (no exponential growth)
//	Horizon(lambda, 0, tol) = +Inf (an exact start)
//
// # Caution
//
// A horizon is a statement about a model and its numerical solution, not a
// safety certificate for the real system it describes; safety-critical use
// follows the field's own codes and licensed review.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 2.1.
func Horizon(lambda, delta0, tol float64) float64 {
	switch {
	case math.IsNaN(lambda) || math.IsNaN(delta0) || math.IsNaN(tol) || delta0 < 0 || tol <= 0:
		return math.NaN()
	case delta0 >= tol:
		return 0
	case delta0 == 0 || lambda <= 0:
		return math.Inf(1)
	}
	return detmath.Log(tol/delta0) / lambda
}
