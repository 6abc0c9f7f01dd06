package expr

// fieldTier names a float64 evaluation tier of FieldFunc. Only benchmarks
// force one (forceTier); the tiers give the same bits, so forcing changes
// speed alone.
type fieldTier int

const (
	tierAuto    fieldTier = iota // FieldFunc's own choice
	tierTape                     // the plain instruction tape (Float64.run)
	tierFused                    // the fused byte-indexed tape (Field)
	tierClosure                  // the closures of fieldPlan, never the inline switch
)

// forceTier, when not tierAuto, makes FieldFunc use that tier. It is set
// only by benchmarks in this package's tests, before any evaluator is made.
var forceTier fieldTier

// tapeField is Field on the plain instruction tape even where a fused tape
// exists.
func (e *Float64) tapeField(t float64, y, dydt []float64) {
	r := e.r
	n := min(len(y), e.p.nvar-1)
	if n < 0 {
		return
	}
	r[0] = t
	copy(r[1:1+n], y[:n])
	e.run()
	outs := e.p.outs
	if len(dydt) < len(outs) {
		outs = outs[:len(dydt)]
	}
	for i, o := range outs {
		dydt[i] = r[o]
	}
}
