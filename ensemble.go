package plumb

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// EnsembleSettings are the settings of Ensemble. Zero fields take the
// defaults given beside them.
type EnsembleSettings struct {
	// Members is the number of perturbed members beside the control (the
	// unperturbed start). Zero means 16. Ignored when Starts is given.
	Members int
	// Delta is the size of the perturbation, in the Distance's units (a
	// difference divided by its scale). Required (> 0) unless Starts is
	// given; it is also the smallest scale of the finite-size exponent.
	Delta float64
	// Spread places the members: SpreadBall (default) or SpreadLine. The
	// report says "given" for members from Starts.
	Spread Spread
	// Along names the perturbed components; nil means the observed ones
	// (Distance.Observe, or all). SpreadLine takes exactly one (nil: the
	// first observed component).
	Along []string
	// Seed makes SpreadBall's directions and the releases' reproducible.
	Seed uint64
	// Starts, when not nil, gives the members' starts (each of length
	// len(States)) instead of Members, Delta and Spread; the control is
	// still the system's start.
	Starts [][]float64
	// Tol is the distance at which a member has parted from the control.
	// Zero means a tenth of the saturation level.
	Tol float64
	// Every is the spacing of the reported times. Zero means span/1000.
	Every float64
	// RelTol and AbsTol are the integrator's tolerances (zero: 1e-10).
	RelTol, AbsTol float64
	// MaxSteps bounds the steps of each run (zero: the integrator's
	// default).
	MaxSteps int
	// Distance chooses the compared components and their scales.
	Distance Distance
	// Ratio is the growth factor r between the scales of the finite-size
	// exponent. Zero means √2 (Aurell et al. 1997 use √2 or 2).
	Ratio float64
	// Releases is the number of pairs released along the control's orbit
	// for the finite-size exponent and the saturation level. Zero means 32;
	// negative means none (then Tol is required).
	Releases int
	// ReleaseEvery is the time between releases along the orbit. Zero
	// means span/4.
	ReleaseEvery float64
	// Workers is the number of goroutines (zero: GOMAXPROCS); results do
	// not depend on it.
	Workers int
	// Lockstep is the number of members integrated together with one step
	// size, each group beside its own copy of the control (whose distance
	// to them it measures); zero means all members in one group. The
	// groups are what a split ensemble (EnsembleShard) hands to its
	// pieces: the results depend on Lockstep, never on the split.
	Lockstep int
}

// EnsembleReport is what Ensemble measured.
type EnsembleReport struct {
	System string   `json:"system"`
	States []string `json:"states"`
	// Members counts the perturbed members (the control not included).
	Members  int            `json:"members"`
	Delta    float64        `json:"delta"`
	Spread   string         `json:"spread_kind"`
	Along    []string       `json:"along"`
	Seed     uint64         `json:"seed"`
	Tol      float64        `json:"tol"`
	T0       float64        `json:"t0"`
	T1       float64        `json:"t1"`
	Method   string         `json:"method"`
	RelTol   float64        `json:"rtol"`
	AbsTol   float64        `json:"atol"`
	Distance DistanceReport `json:"distance"`

	// Times are the reported times; at each, MeanSpread is the
	// root-mean-square distance of the members (control included) from
	// their mean, LargestPair the largest distance between two of them
	// (null for more than 2000 members: the cost grows as their square),
	// Within the fraction of perturbed members within Tol of the control.
	Times       []float64 `json:"times"`
	MeanSpread  []float64 `json:"spread"`
	LargestPair []float64 `json:"largest_pair"`
	Within      []float64 `json:"within"`
	// PartingTimes holds, per perturbed member, the first time its
	// distance from the control reached Tol (interpolated in log distance
	// between samples); null for a member that stayed within Tol.
	PartingTimes []*float64 `json:"parting_times"`
	// Saturation is the mean distance between the release points, states
	// of the control's orbit ReleaseEvery apart: the size two unrelated
	// states have, where separations stop growing. 0 without releases.
	Saturation float64 `json:"saturation"`
	// Extent is the largest distance between two release points: the
	// attractor's (or the visited region's) size as the releases see it.
	Extent float64 `json:"extent"`
	// Scales is the finite-size Lyapunov exponent λ(δ) at the scales
	// δ = Delta·Ratio^n up to Extent, from the releases.
	Scales []ScaleExponent `json:"scales"`
	// SmallScale is ln(δ_b/δ_a)/⟨T⟩ over the scales from Delta up to a
	// hundredth of Saturation (T the pairs' time to grow across them):
	// the exponent of small separations, to set beside the largest
	// Lyapunov exponent; null when fewer than two pairs crossed them.
	SmallScale       *float64 `json:"small_scale_lambda"`
	SmallScaleStdErr *float64 `json:"small_scale_std_err"`
	SmallScaleTo     float64  `json:"small_scale_to"`
	// Predictability is the pairs' mean time to grow from Delta to Tol
	// (Aurell et al.'s predictability time), with its standard error and
	// the number of pairs that did within the span; null when fewer than
	// two.
	Predictability       *float64 `json:"predictability_time"`
	PredictabilityStdErr *float64 `json:"predictability_std_err"`
	PredictabilityPairs  int      `json:"predictability_pairs"`
	// Releases is the number of pairs released; ReleaseEvery their
	// spacing along the orbit; ReleaseDelta their starting separation.
	Releases     int     `json:"releases"`
	ReleaseEvery float64 `json:"release_every"`
	ReleaseDelta float64 `json:"release_delta"`
	Ratio        float64 `json:"ratio"`
	// Lockstep is the number of members integrated together with one step
	// size (the members of the last group may be fewer).
	Lockstep int `json:"lockstep"`

	// Status is "completed", "canceled" or "failed".
	Status string `json:"status"`
	// Caution says what the numbers are a statement about.
	Caution string `json:"caution"`

	// Run holds the members' states at Times (member 0 the control), for
	// pictures and per-member output.
	Run *integrate.BatchSolution `json:"-"`
}

// ensembleCaution is the usual caution on what an ensemble shows.
const ensembleCaution = "a statement about the numerical model, not the real system; safety-critical use follows the field's codes and licensed review"

// maxEnsembleBytes bounds the memory of the members' samples (4 GB).
const maxEnsembleBytes = 4e9

// maxPairMembers is the most members (the control included) whose largest
// pairwise distance is computed: the cost grows as their square.
const maxPairMembers = 2000

// releaseAlign is how far below Delta the releases start (a factor of
// 100: about 4.6/λ1 of alignment with the growing direction before the
// first scale is timed; common practice is to start the pairs below the
// smallest scale of interest).
const releaseAlign = 100

// Ensemble integrates members released around the system's start (or
// given by the caller) together with the control (the start itself) over
// [0, t1] in lockstep (integrate.SolveBatch, Dormand–Prince 5(4)), and
// reports how they part: their spread, the largest distance between two,
// the fraction still within Tol of the control, each member's parting
// time; and, from pairs released along the control's orbit, the
// saturation level, the finite-size Lyapunov exponent λ(δ) from Delta to
// saturation and the predictability time at Tol.
//
// After work began it returns the partial report with the error (the
// context's when canceled).
//
// References:
//
//	E. Aurell, G. Boffetta, A. Crisanti, G. Paladin, A. Vulpiani, Growth of
//	  noninfinitesimal perturbations in turbulence, Phys. Rev. Lett. 77
//	  (1996) 1262; Predictability in the large: an extension of the concept
//	  of Lyapunov exponent, J. Phys. A 30 (1997) 1–26.
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 3.
func Ensemble(ctx context.Context, sys *System, t1 float64, s *EnsembleSettings) (*EnsembleReport, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	es, cfg, rep, err := ensembleSetup(sys, t1, s)
	if err != nil {
		return nil, err
	}
	return ensembleFinish(es, cfg, rep, ensembleSource{
		releases: func() (*EnsembleReleases, string, error) { return ensembleReleases(ctx, sys, t1, es, cfg) },
		group:    func(g int) (*EnsembleGroup, error) { return ensembleGroup(ctx, sys, t1, es, cfg, g) },
	})
}

// ensembleSetup checks the system and the settings and returns the
// settings with their defaults, the resolved set-up and the report's
// opening fields.
func ensembleSetup(sys *System, t1 float64, s *EnsembleSettings) (*EnsembleSettings, *ensembleConfig, *EnsembleReport, error) {
	if err := sys.check("Ensemble"); err != nil {
		return nil, nil, nil, err
	}
	if sys.kind == KindMap {
		return nil, nil, nil, fmt.Errorf("plumb: Ensemble: %s is a map; ensembles integrate flows: %w", sys.Name, ErrKind)
	}
	es := &EnsembleSettings{}
	if s != nil {
		*es = *s
	}
	cfg, err := resolveEnsemble(sys, t1, es)
	if err != nil {
		return nil, nil, nil, err
	}
	rep := &EnsembleReport{System: sys.Name, States: append([]string(nil), sys.States...), Delta: es.Delta,
		Spread: es.Spread.String(), Seed: es.Seed, T0: 0, T1: t1, Method: integrate.DormandPrince54.Name(),
		RelTol: es.RelTol, AbsTol: es.AbsTol, Distance: newDistanceReport(sys.States, cfg.m.scales, cfg.m.periods),
		Ratio: es.Ratio, Lockstep: cfg.lockstep, Caution: ensembleCaution, Status: integrate.Failed.String()}
	for _, i := range cfg.along {
		rep.Along = append(rep.Along, sys.States[i])
	}
	rep.Members = len(cfg.starts) - 1
	if es.Starts != nil {
		rep.Spread, rep.Along = "given", nil
	}
	return es, cfg, rep, nil
}

// ensembleSource gives the units of an ensemble's work: the releases and
// each lockstep group, computed here (Ensemble) or read from the pieces
// of a split run (MergeEnsemble).
type ensembleSource struct {
	releases func() (*EnsembleReleases, string, error)
	group    func(g int) (*EnsembleGroup, error)
}

// ensembleFinish takes the releases and the groups from src, in order, and
// makes the report: the saturation level and λ(δ), the tolerance, the
// predictability time, the members' curves and parting times.
func ensembleFinish(es *EnsembleSettings, cfg *ensembleConfig, rep *EnsembleReport, src ensembleSource) (*EnsembleReport, error) {
	// Releases along the control's orbit: saturation level and λ(δ).
	if es.Releases > 0 {
		rel, status, err := src.releases()
		if err != nil {
			rep.Status = status
			return rep, err
		}
		applyReleases(es, cfg, rep, rel)
	}
	if es.Tol == 0 {
		es.Tol = rep.Saturation / 10
		if !(es.Tol > 0) {
			return rep, fmt.Errorf("plumb: EnsembleSettings.Tol: no saturation level to take a tenth of (the release points coincide); give Tol: %w", integrate.ErrSettings)
		}
	}
	rep.Tol = es.Tol
	if es.Releases > 0 {
		fillPredictability(rep, cfg)
	}
	var groups []*EnsembleGroup
	var runErr error
	for g := range cfg.groups() {
		grp, err := src.group(g)
		if grp == nil {
			if len(groups) == 0 {
				return rep, err
			}
			runErr = err
			break
		}
		groups = append(groups, grp)
		if err != nil {
			runErr = err
			break
		}
	}
	sol, ctrl := joinGroups(groups)
	rep.Run = sol
	rep.Status = sol.Status.String()
	ensembleCurves(rep, sol, cfg.m, es.Tol, ctrl)
	return rep, runErr
}

// ensembleConfig is the resolved set-up of an ensemble.
type ensembleConfig struct {
	m      ensMetric
	along  []int
	starts [][]float64
	// lockstep is the number of members per lockstep group.
	lockstep int
	// After the releases: the passage times of each pair through levels.
	levels []float64
	pass   [][]float64
	ts     []float64
	seps   [][]float64
}

func (c *ensembleConfig) batchSettings(es *EnsembleSettings, t1 float64) *integrate.BatchSettings {
	return &integrate.BatchSettings{Settings: integrate.Settings{RelTol: es.RelTol, AbsTol: es.AbsTol,
		Every: es.Every, MaxSteps: es.MaxSteps}, Workers: es.Workers}
}

// resolveEnsemble validates es (filling defaults in place) and makes the
// members' starts.
func resolveEnsemble(sys *System, t1 float64, es *EnsembleSettings) (*ensembleConfig, error) {
	bad := func(field string, v any, why string) error {
		return fmt.Errorf("plumb: EnsembleSettings.%s = %v: %s: %w", field, v, why, integrate.ErrSettings)
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if !finite(t1) || !(t1 > 0) {
		return nil, fmt.Errorf("plumb: Ensemble: t1 = %v: must be positive and finite: %w", t1, integrate.ErrSpan)
	}
	scales, err := es.Distance.PerComponent(sys.States)
	if err != nil {
		return nil, err
	}
	cfg := &ensembleConfig{m: ensMetric{scales: scales, periods: sys.Periods()}}
	n := len(sys.States)
	switch {
	case es.Members < 0:
		return nil, bad("Members", es.Members, "must be >= 0")
	case es.Members == 0:
		es.Members = 16
	}
	if es.Members > 1_000_000 {
		return nil, bad("Members", es.Members, "more than 1000000")
	}
	if !finite(es.Delta) || es.Delta < 0 || (es.Delta == 0 && es.Starts == nil) {
		return nil, bad("Delta", es.Delta, "must be positive and finite")
	}
	if es.Spread != SpreadBall && es.Spread != SpreadLine {
		return nil, bad("Spread", int(es.Spread), "unknown spread")
	}
	if !finite(es.Tol) || es.Tol < 0 {
		return nil, bad("Tol", es.Tol, "must be >= 0 and finite")
	}
	if !finite(es.Every) || es.Every < 0 || es.Every > t1 {
		return nil, bad("Every", es.Every, fmt.Sprintf("must be in [0, %g]", t1))
	}
	if es.Every == 0 {
		es.Every = t1 / 1000
	}
	if t1/es.Every > 1e6 {
		return nil, bad("Every", es.Every, "gives more than 1e6 reported times")
	}
	for _, v := range []struct {
		name string
		p    *float64
	}{{"RelTol", &es.RelTol}, {"AbsTol", &es.AbsTol}} {
		if !finite(*v.p) || *v.p < 0 {
			return nil, bad(v.name, *v.p, "must be >= 0 and finite")
		}
		if *v.p == 0 {
			*v.p = 1e-10
		}
	}
	if es.Ratio == 0 {
		es.Ratio = math.Sqrt2
	}
	if !finite(es.Ratio) || es.Ratio <= 1 || es.Ratio > 100 {
		return nil, bad("Ratio", es.Ratio, "must be in (1, 100]")
	}
	if es.Releases == 0 {
		es.Releases = 32
	}
	if es.Releases > 10000 {
		return nil, bad("Releases", es.Releases, "more than 10000")
	}
	if es.Releases < 0 && es.Tol == 0 {
		return nil, bad("Tol", es.Tol, "required when there are no releases to measure the saturation level")
	}
	if !finite(es.ReleaseEvery) || es.ReleaseEvery < 0 {
		return nil, bad("ReleaseEvery", es.ReleaseEvery, "must be >= 0 and finite")
	}
	if es.ReleaseEvery == 0 {
		es.ReleaseEvery = t1 / 4
	}
	if es.Workers < 0 {
		return nil, bad("Workers", es.Workers, "must be >= 0")
	}
	if es.Lockstep < 0 {
		return nil, bad("Lockstep", es.Lockstep, "must be >= 0")
	}
	names := es.Along
	if names == nil {
		names = es.Distance.Observe
	}
	if names == nil {
		names = sys.States
	}
	if es.Spread == SpreadLine && es.Along == nil {
		names = names[:1]
	}
	cfg.along, err = componentIndex("Along", names, sys.States)
	if err != nil {
		return nil, err
	}
	if len(cfg.along) == 0 {
		return nil, bad("Along", es.Along, "no component to perturb")
	}
	if es.Spread == SpreadLine && len(cfg.along) != 1 {
		return nil, bad("Along", es.Along, "a line spread takes exactly one component")
	}
	start := sys.Start()
	if es.Starts != nil {
		cfg.starts = [][]float64{start}
		for k, y := range es.Starts {
			if len(y) != n {
				return nil, fmt.Errorf("plumb: EnsembleSettings.Starts[%d] has %d components, the system has %d: %w", k, len(y), n, integrate.ErrDimension)
			}
			for i, v := range y {
				if !finite(v) {
					return nil, fmt.Errorf("plumb: EnsembleSettings.Starts[%d] component %s = %v: %w", k, sys.States[i], v, integrate.ErrNonFinite)
				}
			}
			cfg.starts = append(cfg.starts, append([]float64(nil), y...))
		}
		if len(es.Starts) == 0 {
			return nil, bad("Starts", "[]", "no members")
		}
	} else {
		cfg.starts = perturbedStarts(start, es.Members, es.Delta, es.Spread, cfg.along, es.Seed, cfg.m)
	}
	cfg.lockstep = len(cfg.starts) - 1
	if es.Lockstep > 0 && es.Lockstep < cfg.lockstep {
		cfg.lockstep = es.Lockstep
	}
	// The members' samples are kept: bound their memory.
	if bytes := (t1/es.Every + 2) * float64(len(cfg.starts)*n) * 8; bytes > maxEnsembleBytes {
		return nil, bad("Every", es.Every, fmt.Sprintf("with %d members of %d components the samples would take %.3g GB (at most %g): report fewer times or run fewer members",
			len(cfg.starts), n, bytes/1e9, maxEnsembleBytes/1e9))
	}
	return cfg, nil
}

// ensembleCurves fills the curves and parting times from the members'
// samples. ctrl, when not nil, gives the state of member k's own copy of
// the control at sample j (members integrated in several lockstep
// groups); nil takes member 0 of each sample.
func ensembleCurves(rep *EnsembleReport, sol *integrate.BatchSolution, m ensMetric, tol float64, ctrl func(j, k int) []float64) {
	n, mem := sol.Dim, sol.Members
	dev := make([]float64, mem*n) // differences from the control, wrapped and scaled
	obs := make([]bool, n)
	for i := range obs {
		_, obs[i] = m.diff(i, 0, 0)
	}
	dist := make([][]float64, mem-1)
	for j, smp := range sol.Samples {
		rep.Times = append(rep.Times, smp.T)
		c := smp.Y[:n]
		for k := 0; k < mem; k++ {
			if ctrl != nil {
				c = ctrl(j, k)
			}
			for i := 0; i < n; i++ {
				d, _ := m.diff(i, smp.Y[k*n+i], c[i])
				dev[k*n+i] = d
			}
		}
		// Spread about the mean of the deviations.
		var ss float64
		for i := 0; i < n; i++ {
			if !obs[i] {
				continue
			}
			var mean float64
			for k := 0; k < mem; k++ {
				mean += dev[k*n+i]
			}
			mean /= float64(mem)
			for k := 0; k < mem; k++ {
				d := dev[k*n+i] - mean
				ss += float64(d * d)
			}
		}
		rep.MeanSpread = append(rep.MeanSpread, math.Sqrt(ss/float64(mem)))
		if mem <= maxPairMembers {
			rep.LargestPair = append(rep.LargestPair, largestPair(dev, mem, n, obs, m))
		}
		within := 0
		for k := 1; k < mem; k++ {
			var s float64
			for i := 0; i < n; i++ {
				if obs[i] {
					s += float64(dev[k*n+i] * dev[k*n+i])
				}
			}
			d := math.Sqrt(s)
			if j == 0 {
				dist[k-1] = make([]float64, 0, len(sol.Samples))
			}
			dist[k-1] = append(dist[k-1], d)
			if d <= tol {
				within++
			}
		}
		frac := 1.0
		if mem > 1 {
			frac = float64(within) / float64(mem-1)
		}
		rep.Within = append(rep.Within, frac)
	}
	rep.PartingTimes = make([]*float64, mem-1)
	for k, d := range dist {
		if t, _, ok := firstPassage(rep.Times, d, tol, 0); ok && d[0] < tol {
			rep.PartingTimes[k] = &t
		} else if ok {
			t0 := rep.Times[0]
			rep.PartingTimes[k] = &t0
		}
	}
}

// largestPair returns the largest distance between two of the mem
// members whose wrapped, scaled differences from the control are dev.
func largestPair(dev []float64, mem, n int, obs []bool, m ensMetric) float64 {
	var largest float64
	for a := 0; a < mem; a++ {
		for b := a + 1; b < mem; b++ {
			var s float64
			for i := 0; i < n; i++ {
				if obs[i] {
					d := dev[a*n+i] - dev[b*n+i]
					if pi := periodOf(m, i); pi > 0 {
						d = math.Remainder(d, pi)
					}
					s += float64(d * d)
				}
			}
			largest = math.Max(largest, s)
		}
	}
	return math.Sqrt(largest)
}

// periodOf returns the period of component i in scaled units (0: none).
func periodOf(m ensMetric, i int) float64 {
	if i < len(m.periods) && m.periods[i] > 0 {
		return m.periods[i] / m.scale(i)
	}
	return 0
}
