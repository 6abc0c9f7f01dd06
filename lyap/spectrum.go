package lyap

// Units of the exponents, as stated in Spectrum.Units.
const (
	UnitsFlow = "1/time"      // natural log per unit time of the flow
	UnitsMap  = "1/iteration" // natural log per map iteration
)

// Names of the sanity checks carried in Spectrum.Checks.
const (
	// CheckTrace is |sum of exponents − mean trace of the Jacobian| along
	// the averaging run (flows, full spectrum): Liouville's formula makes
	// them equal.
	CheckTrace = "trace_sum"
	// CheckLogDet is |sum of exponents − mean ln|det J|| along the averaging
	// run (maps, full spectrum).
	CheckLogDet = "log_det_sum"
	// CheckZero is the distance from 0 of the exponent nearest zero, for a
	// flow whose trajectory is not at a fixed point (full spectrum): the
	// direction of the flow itself neither grows nor shrinks on average.
	// It assumes an autonomous vector field.
	CheckZero = "zero_exponent"
	// CheckPairing is max_i |lambda_i + lambda_(n+1−i)| for a Hamiltonian
	// flow or symplectic map (full spectrum), whose exponents pair up.
	CheckPairing = "pairing"
)

// Spectrum is an estimate of Lyapunov exponents with their uncertainty, the
// run that produced it and its sanity checks. Exponents are sorted in
// decreasing order (the QR iteration gives that order only up to
// fluctuations; StdErr and History are permuted alike) and use
// the natural logarithm, per unit time for flows and per iteration for maps
// (see Units).
type Spectrum struct {
	// Exponents are the estimates, total log-stretch over the averaging run
	// divided by its length.
	Exponents []float64 `json:"exponents"`
	// StdErr are their standard errors from batch means over the completed
	// blocks. Nil when fewer than two blocks were completed (a run that
	// failed or was canceled early).
	StdErr []float64 `json:"std_err"`
	// Units is UnitsFlow or UnitsMap.
	Units string `json:"units"`
	// Kind is "flow" or "map".
	Kind string `json:"kind"`
	// Dim is the state dimension n of the system; len(Exponents) is the
	// number k <= n of exponents estimated. The derived measures use it
	// to tell a full spectrum from a partial one (see KaplanYorke).
	Dim int `json:"dim"`
	// Method names the integration method ("" for maps); Jacobian says how
	// tangent vectors were propagated: "exact", "finite-difference", or
	// "two-trajectory" for Largest.
	Method   string `json:"method,omitempty"`
	Jacobian string `json:"jacobian"`

	// Start is the time (or iteration) at which averaging began, after the
	// transient; Duration the length averaged (time or iterations).
	Start    float64 `json:"start"`
	Duration float64 `json:"duration"`
	// Transient is the length discarded before Start.
	Transient float64 `json:"transient"`
	// Blocks is the number of completed batch-means blocks, BlockLength
	// their nominal length.
	Blocks      int     `json:"blocks"`
	BlockLength float64 `json:"block_length"`
	// Target echoes Settings.Target; Converged reports that every standard
	// error reached it with at least MinBlocks blocks.
	Target    float64 `json:"target,omitempty"`
	Converged bool    `json:"converged"`

	// MeanInterval is the mean time (or iterations) between
	// re-orthonormalisations during averaging.
	MeanInterval float64 `json:"mean_interval"`

	// Checks are the sanity residuals that apply to this run.
	Checks []Check `json:"checks"`
	// History is the running estimate at the end of every completed block,
	// for a convergence plot.
	History []Point `json:"history"`
	// Final is the state at the end of the run.
	Final []float64 `json:"final"`
	// Stats counts the work.
	Stats Stats `json:"stats"`
}

// Check is one sanity residual of a spectrum: a quantity that is zero in
// exact arithmetic for the system's class.
type Check struct {
	// Name is one of CheckTrace, CheckLogDet, CheckZero, CheckPairing.
	Name string `json:"name"`
	// Residual is the absolute deviation from zero, in the spectrum's units.
	Residual float64 `json:"residual"`
	// StdErr is the standard error of Residual where the residual is a
	// statistical estimate (CheckZero, CheckPairing), 0 where it is an
	// identity broken only by truncation and rounding (CheckTrace,
	// CheckLogDet).
	StdErr float64 `json:"std_err"`
}

// Point is the running estimate after a completed block.
type Point struct {
	// T is the time (or iteration) at the end of the block.
	T float64 `json:"t"`
	// Blocks is the number of completed blocks so far.
	Blocks int `json:"blocks"`
	// Exponents is the running estimate, StdErr its standard errors (nil
	// after the first block).
	Exponents []float64 `json:"exponents"`
	StdErr    []float64 `json:"std_err"`
}

// Stats counts the work of an estimate. Counts only, so results are
// deterministic.
type Stats struct {
	// Steps is the number of accepted integration steps (flows) or map
	// iterations.
	Steps int `json:"steps"`
	// Rejected is the number of rejected integration steps.
	Rejected int `json:"rejected"`
	// Evaluations counts calls of the vector field or map.
	Evaluations int `json:"evaluations"`
	// Jacobians counts Jacobian evaluations (exact or finite-difference).
	Jacobians int `json:"jacobians"`
	// QR counts re-orthonormalisations (renormalisations for Largest).
	QR int `json:"qr"`
	// Stiff reports that the explicit pair's stiffness test fired on the
	// integration (state and tangent vectors together): the step size
	// was held by stability, not accuracy, which makes the run slow, not
	// wrong. StiffAt is the time it first fired (flows only).
	Stiff   bool    `json:"stiff,omitempty"`
	StiffAt float64 `json:"stiff_at,omitempty"`
}

// Check returns the named check and whether the spectrum carries it.
func (s *Spectrum) Check(name string) (Check, bool) {
	for _, c := range s.Checks {
		if c.Name == name {
			return c, true
		}
	}
	return Check{}, false
}
