package ival

import (
	"math/big"
	"sync"
)

// Rigorous enclosures of π and ln 2 at any precision, computed once per
// needed precision by series with explicit remainder bounds in benc
// arithmetic, and cached at the largest precision asked so far (an
// enclosure at more bits, rounded outward to fewer, is still an enclosure).
//
//	π/4  = atan(1/2) + atan(1/3)          (Euler's formula)
//	atan(1/n) = Σ_{k>=0} (-1)^k / ((2k+1) n^(2k+1)); the series alternates
//	       with decreasing terms, so the remainder after N terms is at most
//	       the first omitted term, 1/((2N+1) n^(2N+1)).
//	ln 2 = Σ_{k>=1} 1/(k 2^k)             (the series of -ln(1 - 1/2));
//	       the remainder after N terms is at most Σ_{k>N} 1/((N+1) 2^k)
//	       = 1/((N+1) 2^N).

var constCache struct {
	sync.Mutex
	pi, ln2 benc
	prec    uint
}

// atanInvEnc encloses atan(1/n) for an integer n >= 2 with an absolute
// error below 2^-p.
func atanInvEnc(n int64, p uint) benc {
	one := bint(1, p)
	nn := bint(n, p)
	nsq := bint(n*n, p)
	pow := nn // n^(2k+1)
	sum := bint(0, p)
	for k := int64(0); ; k++ {
		term := one.quo(pow, p).divInt(2*k+1, p)
		if term.hi.MantExp(nil) < -int(p)-2 {
			// term encloses the first omitted term: remainder bound.
			return sum.pad(term.hi, p)
		}
		if k%2 == 0 {
			sum = sum.add(term, p)
		} else {
			sum = sum.sub(term, p)
		}
		pow = pow.mul(nsq, p)
	}
}

// ln2Enc encloses ln 2 with an absolute error below 2^-p.
func ln2Enc(p uint) benc {
	one := bint(1, p)
	sum := bint(0, p)
	for k := int64(1); ; k++ {
		term := one.divInt(k, p).ldexp(-int(k))
		sum = sum.add(term, p)
		if k > int64(p)+2 {
			// remainder 1/((k+1) 2^k) <= 2^-k
			return sum.pad(new(big.Float).SetMantExp(big.NewFloat(1), -int(k)), p)
		}
	}
}

// fillConsts makes sure the cache holds enclosures at p bits at least.
func fillConsts(p uint) {
	if constCache.prec >= p {
		return
	}
	w := p + 16
	pi4 := atanInvEnc(2, w).add(atanInvEnc(3, w), w)
	constCache.pi = pi4.ldexp(2)
	constCache.ln2 = ln2Enc(w)
	constCache.prec = p
}

// piEnc returns an enclosure of π at p bits.
func piEnc(p uint) benc {
	constCache.Lock()
	defer constCache.Unlock()
	fillConsts(p)
	return benc{bLo(p).Set(constCache.pi.lo), bHi(p).Set(constCache.pi.hi)}
}

// ln2Const returns an enclosure of ln 2 at p bits.
func ln2Const(p uint) benc {
	constCache.Lock()
	defer constCache.Unlock()
	fillConsts(p)
	return benc{bLo(p).Set(constCache.ln2.lo), bHi(p).Set(constCache.ln2.hi)}
}
