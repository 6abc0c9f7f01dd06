package plumb

import (
	"fmt"
	"strconv"
	"strings"
)

// Shard is one piece of a computation split into Count pieces: Index runs
// from 1 to Count ("2/4" is the second of four). The zero Shard is the
// whole computation.
//
// The split is into contiguous blocks: piece i takes units
// [lo, hi) of the total, the first total%Count pieces one unit more than
// the others. Contiguous blocks keep each shard's output one slice of the
// unsharded output, so that joining them is concatenation in shard order,
// and the units plumb splits (the parameter points of a scan, the lockstep
// groups of an ensemble, the runs of a ladder) cost about the same each,
// so that blocks balance as well as a round-robin deal would.
type Shard struct {
	Index, Count int
}

// Whole reports whether s is the whole computation (not split).
func (s Shard) Whole() bool { return s.Count == 0 }

// String is "i/n", or "" for the whole computation.
func (s Shard) String() string {
	if s.Whole() {
		return ""
	}
	return strconv.Itoa(s.Index) + "/" + strconv.Itoa(s.Count)
}

// Validate checks 1 <= Index <= Count (or the zero Shard).
func (s Shard) Validate() error {
	if s.Whole() && s.Index == 0 {
		return nil
	}
	if s.Count < 1 || s.Count > maxShards || s.Index < 1 || s.Index > s.Count {
		return fmt.Errorf("plumb: shard %d/%d: want i/n with 1 <= i <= n <= %d: %w", s.Index, s.Count, maxShards, ErrShard)
	}
	return nil
}

// maxShards bounds the number of pieces (a Slurm array or an indexed Job
// of more pieces than this is a configuration slip, not a plan).
const maxShards = 1 << 20

// Range returns the units [lo, hi) of total that s takes: all of them for
// the whole computation. hi == lo when there are fewer units than pieces
// and s gets none.
func (s Shard) Range(total int) (lo, hi int) {
	if s.Whole() || total <= 0 {
		return 0, max(total, 0)
	}
	i := s.Index - 1
	q, r := total/s.Count, total%s.Count
	lo = i*q + min(i, r)
	hi = lo + q
	if i < r {
		hi++
	}
	return lo, hi
}

// ParseShard parses "i/n" (1 <= i <= n). Errors wrap ErrShard and say what
// was wrong.
func ParseShard(text string) (Shard, error) {
	a, b, ok := strings.Cut(strings.TrimSpace(text), "/")
	if !ok {
		return Shard{}, fmt.Errorf("plumb: shard %q: want i/n, e.g. 2/4 (the second of four): %w", text, ErrShard)
	}
	i, err1 := strconv.Atoi(strings.TrimSpace(a))
	n, err2 := strconv.Atoi(strings.TrimSpace(b))
	if err1 != nil || err2 != nil {
		return Shard{}, fmt.Errorf("plumb: shard %q: i and n must be whole numbers: %w", text, ErrShard)
	}
	s := Shard{Index: i, Count: n}
	if s.Whole() {
		// The zero Shard is the whole run, which "i/n" never names.
		return Shard{}, fmt.Errorf("plumb: shard %q: want i/n with 1 <= i <= n: %w", text, ErrShard)
	}
	if err := s.Validate(); err != nil {
		return Shard{}, err
	}
	return s, nil
}

// The environment variables ShardFromEnv reads. Slurm exports the first
// four to each task of an array job (sbatch --array); Kubernetes exports
// JOB_COMPLETION_INDEX to each pod of an indexed Job (completionMode:
// Indexed) but not the number of completions, which the Job's manifest
// passes in ShardCountEnv.
const (
	SlurmTaskIDEnv    = "SLURM_ARRAY_TASK_ID"
	SlurmTaskMinEnv   = "SLURM_ARRAY_TASK_MIN"
	SlurmTaskMaxEnv   = "SLURM_ARRAY_TASK_MAX"
	SlurmTaskCountEnv = "SLURM_ARRAY_TASK_COUNT"
	SlurmTaskStepEnv  = "SLURM_ARRAY_TASK_STEP"
	KubeIndexEnv      = "JOB_COMPLETION_INDEX"
	// ShardCountEnv is plumb's own variable: the number of pieces, for
	// schedulers that export only the index (a Kubernetes indexed Job:
	// set it to the Job's spec.completions).
	ShardCountEnv = "PLUMB_SHARD_COUNT"
)

// ShardFromEnv finds the shard of a Slurm array task or a Kubernetes
// indexed Job's pod from the environment, read through lookup (os.LookupEnv
// in a program). It returns the shard and where it came from, worded for a
// log line ("SLURM_ARRAY_TASK_ID=1 of SLURM_ARRAY_TASK_MIN=0..
// SLURM_ARRAY_TASK_MAX=3"). Errors (ErrShard): neither scheduler's
// variables, both at once, a value that is not a whole number, a Slurm
// array whose task IDs are not evenly spaced (--array=1,3,7), an index
// outside the count, or an indexed Job without ShardCountEnv.
//
// Slurm: the index is (SLURM_ARRAY_TASK_ID - SLURM_ARRAY_TASK_MIN) /
// SLURM_ARRAY_TASK_STEP (step 1 when unset), so --array=0-3 and
// --array=1-4 both give the shards 1/4 to 4/4; the count is
// SLURM_ARRAY_TASK_COUNT, or (MAX - MIN)/STEP + 1 when it is unset, and
// the two must agree when both are known. Kubernetes: the shard is
// JOB_COMPLETION_INDEX + 1 of PLUMB_SHARD_COUNT.
func ShardFromEnv(lookup func(string) (string, bool)) (Shard, string, error) {
	bad := func(format string, a ...any) (Shard, string, error) {
		return Shard{}, "", fmt.Errorf("plumb: "+format+": %w", append(a, ErrShard)...)
	}
	num := func(name string) (int, bool, error) {
		v, ok := lookup(name)
		if !ok || strings.TrimSpace(v) == "" {
			return 0, false, nil
		}
		n, err := strconv.Atoi(strings.TrimSpace(v))
		if err != nil {
			return 0, true, fmt.Errorf("plumb: %s=%q is not a whole number: %w", name, v, ErrShard)
		}
		return n, true, nil
	}
	id, haveSlurm, err := num(SlurmTaskIDEnv)
	if err != nil {
		return Shard{}, "", err
	}
	kube, haveKube, err := num(KubeIndexEnv)
	if err != nil {
		return Shard{}, "", err
	}
	switch {
	case haveSlurm && haveKube:
		return bad("both %s and %s are set: the environment of two schedulers; give --shard i/n", SlurmTaskIDEnv, KubeIndexEnv)
	case !haveSlurm && !haveKube:
		return bad("neither %s (a Slurm array job) nor %s (a Kubernetes indexed Job) is set", SlurmTaskIDEnv, KubeIndexEnv)
	case haveKube:
		n, ok, err := num(ShardCountEnv)
		if err != nil {
			return Shard{}, "", err
		}
		if !ok {
			return bad("%s=%d but %s is not set: Kubernetes does not export the number of completions; set %s to the Job's spec.completions", KubeIndexEnv, kube, ShardCountEnv, ShardCountEnv)
		}
		s := Shard{Index: kube + 1, Count: n}
		if err := s.Validate(); err != nil {
			return bad("%s=%d of %s=%d: the index must lie in 0..%d", KubeIndexEnv, kube, ShardCountEnv, n, n-1)
		}
		return s, fmt.Sprintf("%s=%d, %s=%d", KubeIndexEnv, kube, ShardCountEnv, n), nil
	}
	lo, haveMin, err := num(SlurmTaskMinEnv)
	if err != nil {
		return Shard{}, "", err
	}
	hi, haveMax, err := num(SlurmTaskMaxEnv)
	if err != nil {
		return Shard{}, "", err
	}
	cnt, haveCount, err := num(SlurmTaskCountEnv)
	if err != nil {
		return Shard{}, "", err
	}
	step, haveStep, err := num(SlurmTaskStepEnv)
	if err != nil {
		return Shard{}, "", err
	}
	if !haveStep {
		step = 1
	}
	if !haveMin {
		return bad("%s=%d but %s is not set (not an array task?)", SlurmTaskIDEnv, id, SlurmTaskMinEnv)
	}
	if step < 1 {
		return bad("%s=%d: want a step of at least 1", SlurmTaskStepEnv, step)
	}
	if (id-lo)%step != 0 || id < lo {
		return bad("%s=%d is not %s=%d plus a multiple of %s=%d: the array's task IDs are irregular; give --shard i/n", SlurmTaskIDEnv, id, SlurmTaskMinEnv, lo, SlurmTaskStepEnv, step)
	}
	span := -1
	if haveMax {
		if hi < lo {
			return bad("%s=%d is below %s=%d", SlurmTaskMaxEnv, hi, SlurmTaskMinEnv, lo)
		}
		span = (hi-lo)/step + 1
	}
	switch {
	case haveCount && span >= 0 && cnt != span:
		return bad("%s=%d but %s..%s = %d..%d in steps of %d hold %d tasks: the array's task IDs are irregular (a list such as --array=1,3,7); give --shard i/n",
			SlurmTaskCountEnv, cnt, SlurmTaskMinEnv, SlurmTaskMaxEnv, lo, hi, step, span)
	case !haveCount && span < 0:
		return bad("%s=%d but neither %s nor %s is set", SlurmTaskIDEnv, id, SlurmTaskCountEnv, SlurmTaskMaxEnv)
	case !haveCount:
		cnt = span
	}
	s := Shard{Index: (id-lo)/step + 1, Count: cnt}
	if err := s.Validate(); err != nil {
		return bad("%s=%d with %s=%d gives task %d of %d", SlurmTaskIDEnv, id, SlurmTaskMinEnv, lo, (id-lo)/step+1, cnt)
	}
	from := fmt.Sprintf("%s=%d, %s=%d", SlurmTaskIDEnv, id, SlurmTaskMinEnv, lo)
	if haveCount {
		from += fmt.Sprintf(", %s=%d", SlurmTaskCountEnv, cnt)
	} else {
		from += fmt.Sprintf(", %s=%d", SlurmTaskMaxEnv, hi)
	}
	if haveStep && step != 1 {
		from += fmt.Sprintf(", %s=%d", SlurmTaskStepEnv, step)
	}
	return s, from, nil
}
