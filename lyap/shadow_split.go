package lyap

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// splitDirs holds the stable/unstable split along iterates 0..L: U_i (n×u,
// orthonormal) spans the unstable directions, carried forward as
// J_i U_i = U_(i+1) R_i; W_i (n×u, orthonormal) spans the backward-dominant
// directions of the transposed tangent maps, whose orthogonal complement is
// the stable subspace; Minv_i = (W_iᵀ U_i)⁻¹ projects onto the unstable
// part along the stable one. sin_i is the sine of the angle between the
// two subspaces (for u > 1, 1/‖Minv_i‖_F, a lower bound within √u).
type splitDirs struct {
	L              int
	U, W, R, Minv  []float64
	sin            []float64
	minAngle       float64
	minAt          int
	mbuf, inv, buf []float64
}

// directions computes the split over iterates 0..L of the given orbit. It
// returns a glitch where a tangent map stops stretching a direction or the
// split degenerates.
func (sh *shadower) directions(ctx context.Context, L int) (*Glitch, error) {
	n, u := sh.n, sh.u
	d := &sh.dirs
	*d = splitDirs{L: L, sin: make([]float64, L+1), minAngle: math.Pi / 2}
	if u == 0 {
		for i := range d.sin {
			d.sin[i] = 1
		}
		return nil, nil
	}
	d.U = make([]float64, (L+1)*n*u)
	d.R = make([]float64, L*u*u)
	d.Minv = make([]float64, (L+1)*u*u)
	d.buf = make([]float64, n*u)
	d.mbuf, d.inv = make([]float64, 2*u*u), make([]float64, u*u)
	qr := newQR(n, u)
	seed := func(v []float64) {
		for r := 0; r < n; r++ {
			for c := 0; c < u; c++ {
				v[r*u+c] = 1 / float64(1+r+c)
				if r == c {
					v[r*u+c]++
				}
			}
		}
		qr.factor(v)
	}
	seed(d.U[:n*u])
	if g, err := sh.forward(ctx, L, qr); g != nil || err != nil {
		return g, err
	}
	if u == n {
		d.W = d.U
		return sh.angles(L)
	}
	// The stable subspace's normals backward from the unstable basis at L,
	// then the unstable basis again forward from those normals at 0: each
	// seed is then the best guess at its end (at right angles to the other
	// subspace), so the split is as good at the ends as it can be.
	d.W = make([]float64, (L+1)*n*u)
	copy(d.W[L*n*u:], d.U[L*n*u:])
	for i := L - 1; i >= 0; i-- {
		if i&1023 == 1023 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		sh.jac(i)
		mulTInto(d.buf, sh.jd, d.W[(i+1)*n*u:(i+2)*n*u], n, u)
		if k, v := qr.factor(d.buf); k >= 0 {
			return &Glitch{Index: i, Reason: fmt.Sprintf("the transposed tangent map at iterate %d does not stretch direction %d (stretch %g)", i, k+1, v)}, nil
		}
		copy(d.W[i*n*u:(i+1)*n*u], d.buf)
	}
	copy(d.U[:n*u], d.W[:n*u])
	if g, err := sh.forward(ctx, L, qr); g != nil || err != nil {
		return g, err
	}
	return sh.angles(L)
}

// forward carries the unstable basis from iterate 0 to L.
func (sh *shadower) forward(ctx context.Context, L int, qr *qrWork) (*Glitch, error) {
	n, u, d := sh.n, sh.u, &sh.dirs
	for i := 0; i < L; i++ {
		if i&1023 == 1023 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		sh.jac(i)
		mulInto(d.buf, sh.jd, d.U[i*n*u:(i+1)*n*u], n, u)
		if k, v := qr.factor(d.buf); k >= 0 {
			return &Glitch{Index: i, Reason: fmt.Sprintf("the tangent map at iterate %d does not stretch unstable direction %d (stretch %g)", i, k+1, v)}, nil
		}
		copy(d.U[(i+1)*n*u:(i+2)*n*u], d.buf)
		copy(d.R[i*u*u:(i+1)*u*u], qr.r[:u*u])
	}
	return nil, nil
}

// angles fills Minv and the sines of the split's angles and finds the
// smallest.
func (sh *shadower) angles(L int) (*Glitch, error) {
	n, u, d := sh.n, sh.u, &sh.dirs
	for i := 0; i <= L; i++ {
		m := d.mbuf[:u*u]
		Ui, Wi := d.U[i*n*u:(i+1)*n*u], d.W[i*n*u:(i+1)*n*u]
		for r := 0; r < u; r++ {
			for c := 0; c < u; c++ {
				var s float64
				for j := 0; j < n; j++ {
					s += float64(Wi[j*u+r] * Ui[j*u+c])
				}
				m[r*u+c] = s
			}
		}
		mi := d.Minv[i*u*u : (i+1)*u*u]
		if !invertSmall(m, mi, d.mbuf[u*u:], u) {
			return &Glitch{Index: i, Reason: fmt.Sprintf("the stable and unstable directions coincide at iterate %d", i)}, nil
		}
		sn := 1.0
		if u < n {
			var f float64
			for _, v := range mi {
				f += float64(v * v)
			}
			sn = math.Min(1, 1/math.Sqrt(f))
		}
		d.sin[i] = sn
		ang := detmath.Atan2(sn, math.Sqrt(math.Max(0, float64(1-float64(sn*sn)))))
		if ang < d.minAngle {
			d.minAngle, d.minAt = ang, i
		}
	}
	if d.minAngle < sh.cfg.MinAngle {
		return &Glitch{Index: d.minAt, Angle: d.minAngle,
			Reason: fmt.Sprintf("the stable and unstable directions are %.3g rad apart at iterate %d (below %.3g): a near-tangency", d.minAngle, d.minAt, sh.cfg.MinAngle)}, nil
	}
	return nil, nil
}

// invertSmall writes the inverse of the u×u matrix m into inv by
// Gauss-Jordan elimination with partial pivoting (work: u×u scratch); false
// if m is singular to working precision.
func invertSmall(m, inv, work []float64, u int) bool {
	a := work[:u*u]
	copy(a, m)
	for i := range inv[:u*u] {
		inv[i] = 0
	}
	for i := 0; i < u; i++ {
		inv[i*u+i] = 1
	}
	scale := 0.0
	for _, v := range a {
		scale = math.Max(scale, math.Abs(v))
	}
	for c := 0; c < u; c++ {
		p := c
		for r := c + 1; r < u; r++ {
			if math.Abs(a[r*u+c]) > math.Abs(a[p*u+c]) {
				p = r
			}
		}
		if !(math.Abs(a[p*u+c]) > 1e-300+float64(scale*0x1p-52)) {
			return false
		}
		if p != c {
			for j := 0; j < u; j++ {
				a[p*u+j], a[c*u+j] = a[c*u+j], a[p*u+j]
				inv[p*u+j], inv[c*u+j] = inv[c*u+j], inv[p*u+j]
			}
		}
		piv := a[c*u+c]
		for j := 0; j < u; j++ {
			a[c*u+j] /= piv
			inv[c*u+j] /= piv
		}
		for r := 0; r < u; r++ {
			if r == c || a[r*u+c] == 0 {
				continue
			}
			f := a[r*u+c]
			for j := 0; j < u; j++ {
				a[r*u+j] -= float64(f * a[c*u+j])
				inv[r*u+j] -= float64(f * inv[c*u+j])
			}
		}
	}
	return true
}

// unstableCoords writes Minv_i W_iᵀ v (the unstable coordinates of v along
// the stable subspace) into dst (length u).
func (d *splitDirs) unstableCoords(i, n, u int, v, dst, tmp []float64) {
	Wi, mi := d.W[i*n*u:(i+1)*n*u], d.Minv[i*u*u:(i+1)*u*u]
	for r := 0; r < u; r++ {
		var s float64
		for j := 0; j < n; j++ {
			s += float64(Wi[j*u+r] * v[j])
		}
		tmp[r] = s
	}
	for r := 0; r < u; r++ {
		var s float64
		for c := 0; c < u; c++ {
			s += float64(mi[r*u+c] * tmp[c])
		}
		dst[r] = s
	}
}

// correct computes the corrections c_0..c_L from the one-step errors in
// sh.e: stable part forward, unstable part backward.
func (sh *shadower) correct(L int) {
	n, u, d := sh.n, sh.u, &sh.dirs
	c := sh.c[:(L+1)*n]
	clear(c[:n])
	tmp := sh.a[u : 2*u]
	// Unstable coordinates of every one-step error.
	for i := 1; i <= L; i++ {
		if u > 0 {
			d.unstableCoords(i, n, u, sh.e[i*n:(i+1)*n], sh.al[i*u:(i+1)*u], tmp)
		}
	}
	// Stable part forward: s_(i+1) = P_s (J_i s_i + e_(i+1)).
	for i := 0; i < L; i++ {
		next := c[(i+1)*n : (i+2)*n]
		if u == n {
			clear(next)
			continue
		}
		sh.jac(i)
		mulInto(next, sh.jd, c[i*n:(i+1)*n], n, 1)
		for k := 0; k < n; k++ {
			next[k] += sh.e[(i+1)*n+k]
		}
		if u > 0 {
			al := sh.a[:u]
			d.unstableCoords(i+1, n, u, next, al, tmp)
			U := d.U[(i+1)*n*u : (i+2)*n*u]
			for k := 0; k < n; k++ {
				var s float64
				for j := 0; j < u; j++ {
					s += float64(U[k*u+j] * al[j])
				}
				next[k] -= s
			}
		}
	}
	if u == 0 {
		return
	}
	// Unstable part backward: a_i = R_i⁻¹ (a_(i+1) − alpha_(i+1)), a_L = 0.
	a := sh.a[:u]
	clear(a)
	for i := L - 1; i >= 0; i-- {
		R := d.R[i*u*u : (i+1)*u*u]
		for r := 0; r < u; r++ {
			tmp[r] = a[r] - sh.al[(i+1)*u+r]
		}
		for r := u - 1; r >= 0; r-- {
			s := tmp[r]
			for j := r + 1; j < u; j++ {
				s -= float64(R[r*u+j] * a[j])
			}
			a[r] = s / R[r*u+r]
		}
		U := d.U[i*n*u : (i+1)*n*u]
		for k := 0; k < n; k++ {
			var s float64
			for j := 0; j < u; j++ {
				s += float64(U[k*u+j] * a[j])
			}
			c[i*n+k] += s
		}
	}
}

// try shadows the first L steps of the given orbit. On success it fills
// res and returns nil; otherwise the glitch that stopped it.
func (sh *shadower) try(ctx context.Context, L int, res *Shadow) (*Glitch, error) {
	n, u := sh.n, sh.u
	g, err := sh.directions(ctx, L)
	if err != nil || g != nil {
		sh.angleOf(g)
		return g, err
	}
	sh.q = make([]DoubleDouble, (L+1)*n)
	for i := range sh.q {
		sh.q[i] = dd.From(sh.p0[i])
	}
	sh.c = make([]float64, (L+1)*n)
	sh.al = make([]float64, (L+1)*u)
	sh.a = make([]float64, 2*u)
	_, at, rel, err := sh.stepErrors(ctx, sh.q, L)
	if err != nil {
		return nil, err
	}
	passes, dist, distAt := 0, 0.0, 0
	for rel > ShadowTarget {
		if passes == sh.cfg.Passes {
			return sh.glitchAt(at, fmt.Sprintf("the refinement did not reach one-step errors of %.3g in %d passes (%.3g relative)", ShadowTarget, passes, rel)), nil
		}
		passes++
		sh.correct(L)
		far, farAt := 0.0, 0
		for i := 0; i <= L; i++ {
			var ss float64
			for k := 0; k < n; k++ {
				j := i*n + k
				sh.q[j] = sh.wrapState(dd.Add(sh.q[j], dd.From(sh.c[j])), k)
				dv := sh.wrapDiff(dd.Sub(sh.q[j], dd.From(sh.p0[j])).Float64(), k)
				ss += float64(dv * dv)
			}
			if dist := math.Sqrt(ss); !(dist <= far) {
				far, farAt = dist, i
			}
		}
		if !(far <= sh.cfg.MaxDistance) {
			return sh.glitchAt(farAt, fmt.Sprintf("the corrections grow to %.3g at iterate %d, beyond %.3g where the linearised split holds", far, farAt, sh.cfg.MaxDistance)), nil
		}
		var newRel float64
		_, at, newRel, err = sh.stepErrors(ctx, sh.q, L)
		if err != nil {
			return nil, err
		}
		if newRel > ShadowTarget && !(newRel <= rel/2) {
			return sh.glitchAt(at, fmt.Sprintf("the refinement stalled at one-step error %.3g (relative) at iterate %d", newRel, at)), nil
		}
		rel = newRel
		dist, distAt = far, farAt
	}
	after, _, _, err := sh.stepErrors(ctx, sh.q, L)
	if err != nil {
		return nil, err
	}
	res.Distance, res.DistanceAt = dist, distAt
	res.StepErrorAfter = after
	res.Passes = passes
	res.MinAngle, res.MinAngleAt = sh.dirs.minAngle, sh.dirs.minAt
	var worst float64
	for _, b := range sh.before[1 : L+1] {
		worst = math.Max(worst, b)
	}
	if worst > 0 {
		res.Amplification = res.Distance / worst
	}
	res.Refined = sh.q
	return nil, nil
}

// glitchAt is a glitch at iterate i with the split's angle there.
func (sh *shadower) glitchAt(i int, why string) *Glitch {
	g := &Glitch{Index: i, Reason: why}
	sh.angleOf(g)
	return g
}

func (sh *shadower) angleOf(g *Glitch) {
	if g == nil || g.Angle != 0 || g.Index >= len(sh.dirs.sin) {
		return
	}
	sn := sh.dirs.sin[g.Index]
	g.Angle = detmath.Atan2(sn, math.Sqrt(math.Max(0, float64(1-float64(sn*sn)))))
	g.Time = float64(g.Index)
}
