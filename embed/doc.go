// Package embed analyses a measured scalar series — a thermocouple, a
// vibration sensor, a river gauge, a daily count — when no equations are
// known: it reconstructs the dynamics by delay embedding and measures, from
// the data alone, how many variables drive it, how fast nearby states part
// and how far ahead it can be forecast.
//
// The package stands alone: it imports no other plumb package but the
// deterministic elementary functions of internal/detmath.
//
// # Notation
//
//	x        the series, x[0..n-1], sampled every Dt
//	lag      the delay in samples; dim (m) the embedding dimension
//	theiler  the Theiler window: neighbours closer in time than this many
//	         samples are not neighbours
//
// # Methods
//
//	Embed                 delay vectors as a view over the series (Takens 1981)
//	AverageMutualInfo     the delay from the first minimum of the mutual
//	                      information (Fraser & Swinney 1986)
//	Autocorrelate         the autocorrelation's 1/e time and first zero
//	FalseNeighbours       false nearest neighbours (Kennel, Brown &
//	                      Abarbanel 1992), both criteria
//	CaoDimension          Cao's E1 and E2 (Cao 1997)
//	CorrelationDimension  D2 from correlation sums (Grassberger & Procaccia
//	                      1983) with a Theiler window and a scaling-region rule
//	Rosenstein, Kantz     the largest Lyapunov exponent from divergence
//	                      curves (Rosenstein, Collins & De Luca 1993; Kantz 1994)
//	Forecast              the error of analogue forecasts against lead time and
//	                      the lead where it reaches a fraction of the spread
//	ZeroOneTest           the 0-1 test for chaos, correlation form with random
//	                      frequencies and the median K (Gottwald & Melbourne
//	                      2004, 2009)
//	Surrogates            phase-randomised and IAAFT surrogates (Theiler et al.
//	                      1992; Schreiber & Schmitz 1996, gonum's FFT)
//	SurrogateTest         the rank test of a statistic (PredictionError, or any
//	                      other) against surrogates
//
// Analyze runs all of them on one series with the embedding chosen by
// documented rules and returns one Report, with the choices made and notes
// where an assumption fails. ReadColumn reads one column of a CSV file.
//
// Neighbours are found in k-d trees built by gonum's spatial/kdtree and
// searched exactly (ties broken towards the smaller index), so results do
// not depend on the tree's random pivots. Sums run in index order and
// elementary functions come from internal/detmath, so results are
// bit-identical on every architecture, surrogates included: their Fourier
// transform is the package's own, with every product rounded before it is
// added.
//
// What tells chaos from noise: the 0-1 test gives K near 1 for white
// noise as well as for chaos; Cao's E2 (near 1 at every dimension for
// noise), the surrogate test (deterministic structure forecasts better
// than its surrogates) and a linear rise of the divergence curve are the
// checks that separate them.
//
// # Allocation and cost
//
// Each method builds its k-d trees (O(n log n), allocating the tree) and
// a few workspaces once; the neighbour searches inside its loops allocate
// nothing (TestSearchesDoNotAllocate). Methods that visit many points
// spread a bounded number of reference points evenly over the series
// (2000 by default), so their cost grows like n log n, not n². IAAFT
// surrogates cost tens of transforms and sorts each; Analyze runs them on
// at most 4096 values.
//
// # Errors
//
// Sentinels usable with errors.Is: ErrTooShort, ErrConstant, ErrNonFinite,
// ErrNonUniform, ErrEmbedding, ErrSettings, ErrSyntax, ErrColumn. An
// *InputError says where in the input (line and column, or the index of a
// value). Nothing a caller supplies makes the package panic.
//
// # Caution
//
// Every number here is an estimate from finite, noisy data under the
// assumption that the series comes from a stationary deterministic
// system; each result carries the choices that shaped it. A forecast
// horizon from data is a statement about the recorded signal, not a
// safety certificate for the real system; safety-critical use follows the
// field's own codes and licensed review.
package embed
