package plumb

import (
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// TightestID is the ID of the tightest float64 run of a flow audit
// (Report.Reference): with an exact reference one more run compared with
// it, otherwise the reference itself.
const TightestID = "tightest"

// rungID is the stable machine name of a rung, the same from run to run
// whatever the span (unlike its Name, which shows a step size or a restart
// time): "tol_1e-06" for a tolerance rung at rtol 1e-6, "method_dp853" or
// "method_rk4" for a method rung, "precision_24bit", "precision_7digit" or
// "precision_float64" for emulated storage, "restart" for a restart, and
// TightestID for the reference run. method is the run's method name (as
// integrate.Method.Name gives it), relTol its tolerance, storage its
// emulated storage.
func rungID(kind integrate.RungKind, method string, relTol float64, storage integrate.Rounding) string {
	switch kind {
	case integrate.KindReference:
		return TightestID
	case integrate.KindTolerance:
		return "tol_" + strconv.FormatFloat(relTol, 'g', -1, 64)
	case integrate.KindMethod:
		return "method_" + methodID(method)
	case integrate.KindPrecision:
		id := "precision_float64"
		switch storage.Kind {
		case integrate.BinaryBits:
			id = "precision_" + strconv.Itoa(storage.N) + "bit"
		case integrate.SignificantDigits:
			id = "precision_" + strconv.Itoa(storage.N) + "digit"
		case integrate.DecimalPlaces:
			id = "precision_" + strconv.Itoa(storage.N) + "place"
		}
		if storage.Stages {
			id += "_stages"
		}
		return id
	case integrate.KindRestart:
		return "restart"
	}
	return slug(kind.String())
}

// rungMethodName is the name of the method a rung's run uses (before any
// emulated storage): its fixed-step method at its step, else its Method,
// DormandPrince54 when none is set.
func rungMethodName(r integrate.Rung) string {
	switch {
	case r.Fixed != nil:
		return r.Fixed(1).Name()
	case r.Method != nil:
		return r.Method.Name()
	}
	return integrate.DormandPrince54.Name()
}

// methodID is the short name of an integrate method, as plumb's --method
// spells it (dp54, dp853, bs32, rk4, euler), or its name reduced to lower
// case letters, digits and underscores.
func methodID(name string) string {
	switch name {
	case integrate.DormandPrince54.Name():
		return "dp54"
	case integrate.DormandPrince853.Name():
		return "dp853"
	case integrate.BogackiShampine32.Name():
		return "bs32"
	case "RK4":
		return "rk4"
	case "Euler":
		return "euler"
	}
	return slug(name)
}

// slug is s in lower case with every run of other characters than ASCII
// letters and digits turned into one underscore, trimmed of underscores.
func slug(s string) string {
	var b strings.Builder
	under := false
	for _, r := range strings.ToLower(s) {
		if (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9') {
			if under && b.Len() > 0 {
				b.WriteByte('_')
			}
			b.WriteRune(r)
			under = false
			continue
		}
		under = true
	}
	if b.Len() == 0 {
		return "rung"
	}
	return b.String()
}

// uniqueIDs makes the IDs of one report distinct, in order: a repeated ID
// gets _2, _3, ... (two method rungs of one method, say), and no ID may
// take taken's.
func uniqueIDs(ids []*string, taken string) {
	seen := map[string]bool{taken: true}
	for _, id := range ids {
		base := *id
		for k := 2; seen[*id]; k++ {
			*id = base + "_" + strconv.Itoa(k)
		}
		seen[*id] = true
	}
}
