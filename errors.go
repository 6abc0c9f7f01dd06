package plumb

import "errors"

// The package's errors, usable with errors.Is; the error types that wrap
// them (*FileError, *MembersFileError, *RunsError, *DistanceError) say
// where.
var (
	// ErrHorizon reports a requested horizon that is not a positive, finite
	// time (Trust, TrustProblem, TrustRuns).
	ErrHorizon = errors.New("invalid horizon")
	// ErrTolerance reports a divergence tolerance that is not positive and
	// finite.
	ErrTolerance = errors.New("invalid tolerance")
	// ErrUnknown reports an unknown model or parameter name.
	ErrUnknown = errors.New("unknown name")
	// ErrKind reports a request that does not fit the system's kind, such
	// as the vector field of a map.
	ErrKind = errors.New("wrong kind of system")
	// ErrNoSystem reports a method called on a nil *System, or on a zero
	// System or evaluator not made by Model, LoadSystem or the System's
	// methods. Such a System's getters return zero values and its Problem
	// has a nil F, which the integrators refuse with
	// integrate.ErrSettings.
	ErrNoSystem = errors.New("no system")
	// ErrSystemFile reports a system file that cannot be used; every
	// *FileError matches it with errors.Is.
	ErrSystemFile = errors.New("invalid system file")
	// ErrMembersFile reports a members file that cannot be read; the
	// *MembersFileError that wraps it says where.
	ErrMembersFile = errors.New("bad members file")
	// ErrRuns reports a set of runs that cannot be audited (TrustRuns): no
	// reference or two, no run besides it, a run without data, a column
	// missing from a run, spans that do not overlap. The *RunsError
	// wrapping it names the run.
	ErrRuns = errors.New("unusable runs")
	// ErrProgram reports that the reference run of a Program failed
	// (exited non-zero, timed out, wrote nothing readable): with nothing
	// to compare with, the audit cannot be made.
	ErrProgram = errors.New("program failed")
	// ErrShard reports a shard that cannot be used: a bad "i/n", an
	// environment that names no task or an irregular one, shard files that
	// are missing, repeated, incomplete or made with other settings.
	ErrShard = errors.New("unusable shard")
)
