package expr

// Tier names for the benchmarks of package expr_test (export_test.go
// is compiled only with the tests).
const (
	TierAuto    = tierAuto
	TierTape    = tierTape
	TierFused   = tierFused
	TierClosure = tierClosure
)

// ForceTier makes FieldFunc use tier k from now on (TierAuto: its own
// choice); it returns the previous setting.
func ForceTier(k FieldTierForBench) FieldTierForBench {
	old := forceTier
	forceTier = k
	return old
}

// FieldTierForBench is the type of the tier names.
type FieldTierForBench = fieldTier
