package maps

// Family is a map that depends on parameters: it returns the map at the
// parameter values p (as many as the family was made with; plumb's
// System.Family makes one for every system of kind map). The scans and the
// route to chaos call it once per parameter value, possibly from several
// goroutines at once, so it must be safe for concurrent use and each Map it
// returns must be the caller's own.
type Family func(p []float64) (*Map, error)
