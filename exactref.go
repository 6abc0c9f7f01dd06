package plumb

// ExactReference describes the reference every run of an audit was
// compared with: a flow's multiprecision Taylor run, or a map's orbit in
// double-double arithmetic (Method "the map iterated", Digits 32).
type ExactReference struct {
	Method     string `json:"method"`
	Arithmetic string `json:"arithmetic"`
	// Digits is the working precision in decimal digits, Order the Taylor
	// order, Steps the Taylor steps.
	Digits int `json:"digits"`
	Order  int `json:"order"`
	Steps  int `json:"steps"`
	// Lambda is the largest exponent that set Digits.
	Lambda float64 `json:"lambda"`
	// AccurateUntil is the time until which the reference is accurate to
	// a thousandth of the tolerance: the end of the span, or, for a long
	// audit of a chaotic system, a time after every run had departed from
	// it, from which it was continued in the arithmetic Continued at
	// ContinuedDigits digits (see System.Trust).
	AccurateUntil   float64 `json:"accurate_until"`
	Continued       string  `json:"continued,omitempty"`
	ContinuedDigits int     `json:"continued_digits,omitempty"`
	// KinkRestarts counts the series restarted on a kink of the field (a
	// zero of the argument of abs, a tie of min or max, ...; see
	// integrate.KinkSeries).
	KinkRestarts int `json:"kink_restarts"`
	// SetAside, when not empty, says why this reference was not used: the
	// field has a kink the Taylor series cannot pass (integrate.ErrKink),
	// and every run was compared with the float64 reference run instead.
	SetAside string `json:"set_aside,omitempty"`
}
