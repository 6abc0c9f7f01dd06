package lyap

import "sort"

// descending returns the permutation that sorts e in decreasing order:
// e[perm[0]] >= e[perm[1]] >= ... Equal values keep their order, and NaN
// goes last. The QR iteration delivers the exponents largest first only up
// to fluctuations: two exponents near zero (the flow direction and a
// neutral one, as in a Hamiltonian) can come out swapped.
func descending(e []float64) []int {
	perm := make([]int, len(e))
	for i := range perm {
		perm[i] = i
	}
	sort.SliceStable(perm, func(a, b int) bool {
		x, y := e[perm[a]], e[perm[b]]
		if x != x { // NaN sorts after everything
			return false
		}
		return y != y || x > y
	})
	return perm
}

// sorted reports whether perm is the identity.
func sorted(perm []int) bool {
	for i, p := range perm {
		if p != i {
			return false
		}
	}
	return true
}

// permute reorders v in place so that v[i] becomes the old v[perm[i]]; tmp,
// grown if short, is scratch space. A nil or short v is left alone.
func permute(v []float64, perm []int, tmp []float64) []float64 {
	if len(v) != len(perm) {
		return tmp
	}
	tmp = append(tmp[:0], v...)
	for i, p := range perm {
		v[i] = tmp[p]
	}
	return tmp
}

// sortSpectrum puts the exponents of sp in decreasing order, with their
// standard errors and every running estimate of the history (exponents and
// standard errors) permuted alike, so that column i means the same exponent
// everywhere.
func sortSpectrum(sp *Spectrum) {
	perm := descending(sp.Exponents)
	if sorted(perm) {
		return
	}
	tmp := permute(sp.Exponents, perm, nil)
	tmp = permute(sp.StdErr, perm, tmp)
	for _, p := range sp.History {
		tmp = permute(p.Exponents, perm, tmp)
		tmp = permute(p.StdErr, perm, tmp)
	}
}

// permuteColumns reorders the columns of the n×k row-major matrix v in
// place so that column j becomes the old column perm[j]; tmp is scratch.
func permuteColumns(v []float64, n, k int, perm []int, tmp []float64) []float64 {
	for i := 0; i < n; i++ {
		tmp = permute(v[i*k:(i+1)*k], perm, tmp)
	}
	return tmp
}
