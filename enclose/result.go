package enclose

// Result is an enclosure of a trajectory: at every step a box proven to
// hold the exact solution of the formulas (with their float64
// parameters) through every point of the start box.
type Result struct {
	// Method names the wrapping: "Lohner (QR)" or "direct box".
	Method string `json:"method"`
	// Order is the Taylor order p (flows; 0 for maps).
	Order int `json:"order,omitempty"`
	// Tol is the accepted width, Horizon the proven horizon: the last
	// step time (a map: iterate) up to which the width stayed below Tol
	// at every step. It is the start when the start box is already too
	// wide.
	Tol     float64 `json:"tol"`
	Horizon float64 `json:"horizon"`
	// Steps holds the start and every step's end.
	Steps []Step `json:"steps"`
	// Failure says where and why the enclosure stopped before the end;
	// nil when it reached the end.
	Failure *Failure `json:"failure"`
	// Shrunk counts the trial steps shortened because the Picard test
	// failed (flows).
	Shrunk int `json:"shrunk,omitempty"`
}

// Step is the enclosure at one time: every component of the exact
// solution lies in [Lo[i], Hi[i]].
type Step struct {
	// T is the time (a map: the iterate).
	T float64 `json:"t"`
	// Lo and Hi are the box's lower and upper ends.
	Lo []float64 `json:"lo"`
	Hi []float64 `json:"hi"`
	// Width is the largest Hi[i]-Lo[i], rounded up.
	Width float64 `json:"width"`
}

// Failure kinds.
const (
	// FailWidth: the width passed Settings.GiveUp (or is no longer finite).
	FailWidth = "width"
	// FailPicard: the Picard test found no a-priori enclosure even at the
	// smallest step tried.
	FailPicard = "picard"
	// FailStepUnderflow: the step fell below the resolution of the time.
	FailStepUnderflow = "step_underflow"
	// FailKink: a kink or jump of the formulas can be reached in the box
	// (ErrKink).
	FailKink = "kink"
	// FailDomain: a formula is undefined somewhere in the box (ErrDomain).
	FailDomain = "domain"
	// FailBudget: Settings.MaxSteps were taken.
	FailBudget = "step_budget"
	// FailCanceled: the context ended the run.
	FailCanceled = "canceled"
)

// Failure is where an enclosure stopped and why.
type Failure struct {
	// T is the last time (iterate) enclosed.
	T float64 `json:"t"`
	// Kind is one of the Fail constants.
	Kind string `json:"kind"`
	// Reason says what happened, in words.
	Reason string `json:"reason"`
}

// WidthAt returns the first step time at which the width reached w, and
// false when it never did.
func (r *Result) WidthAt(w float64) (float64, bool) {
	if r == nil {
		return 0, false
	}
	for _, s := range r.Steps {
		if !(s.Width < w) {
			return s.T, true
		}
	}
	return 0, false
}
