#!/usr/bin/env python3
"""convection.py: a second student's simulation of the lab's convection loop.

The loop is modelled by the Lorenz equations (E. N. Lorenz, Deterministic
nonperiodic flow, J. Atmos. Sci. 20 (1963) 130-141) with sigma=10, rho=28,
beta=8/3, started from the logged state (-5, -6, 22) (invented numbers).

Standard library only. The integrator is the Bogacki-Shampine 3(2) embedded
Runge-Kutta pair (P. Bogacki and L. F. Shampine, Appl. Math. Lett. 2 (1989)
321-325) from its published tableau, advancing with the third-order
solution; the error is measured in the root-mean-square norm weighted by
atol + rtol*max(|y|, |y_new|) and the step becomes
h*min(5, max(0.2, 0.9*err^(-1/3))). Steps are shortened to land on the
output times k*dt.

Usage:
  convection.py --rtol X --atol X --out FILE [--perturb EPS] [--float32]
                [--t1 T] [--dt D]

Writes CSV "t,x,y,z" to FILE with repr() numbers, which read back to the
same doubles. Exit status 2 on bad usage, 1 when the integration fails.
"""
import argparse
import math
import struct
import sys

SIGMA, RHO, BETA = 10.0, 28.0, 8.0 / 3.0


def field(y):
    x, v, z = y
    return [SIGMA * (v - x), x * (RHO - z) - v, x * v - BETA * z]


def single(v):
    """Round a double to the nearest float32 and back."""
    return struct.unpack("f", struct.pack("f", v))[0]


def positive(flag, allow_zero=False):
    def parse(s):
        try:
            v = float(s)
        except ValueError:
            raise argparse.ArgumentTypeError("bad value %r" % s)
        if not math.isfinite(v) or v < 0 or (v == 0 and not allow_zero):
            raise argparse.ArgumentTypeError("bad value %r" % s)
        return v
    return parse


def finite(s):
    try:
        v = float(s)
    except ValueError:
        raise argparse.ArgumentTypeError("bad value %r" % s)
    if not math.isfinite(v):
        raise argparse.ArgumentTypeError("bad value %r" % s)
    return v


def main(argv):
    p = argparse.ArgumentParser(prog="convection.py")
    p.add_argument("--rtol", type=positive("--rtol"), required=True)
    p.add_argument("--atol", type=positive("--atol", allow_zero=True), required=True)
    p.add_argument("--out", required=True)
    p.add_argument("--perturb", type=finite, default=0.0)
    p.add_argument("--float32", action="store_true")
    p.add_argument("--t1", type=positive("--t1"), default=10.0)
    p.add_argument("--dt", type=positive("--dt"), default=0.01)
    a = p.parse_args(argv)  # exits with status 2 on bad usage

    store = single if a.float32 else (lambda v: v)
    y = [store(v * (1.0 + a.perturb)) for v in (-5.0, -6.0, 22.0)]
    t, h = 0.0, 1e-3
    k1 = field(y)
    nout = int(math.floor(a.t1 / a.dt + 1e-9))
    rows = ["t,x,y,z", "%r,%r,%r,%r" % (t, y[0], y[1], y[2])]
    steps = 0
    for k in range(1, nout + 1):
        tout = k * a.dt
        while t < tout:
            steps += 1
            if steps > 10_000_000:
                print("convection.py: step budget exhausted at t=%g" % t, file=sys.stderr)
                return 1
            hs, left = h, tout - t
            clipped = hs >= left
            if clipped:
                hs = left
            k2 = field([y[i] + hs * (0.5 * k1[i]) for i in range(3)])
            k3 = field([y[i] + hs * (0.75 * k2[i]) for i in range(3)])
            yn = [y[i] + hs * (2.0 / 9.0 * k1[i] + 1.0 / 3.0 * k2[i] + 4.0 / 9.0 * k3[i]) for i in range(3)]
            k4 = field(yn)
            err = 0.0
            for i in range(3):
                e = hs * ((2.0 / 9.0 - 7.0 / 24.0) * k1[i] + (1.0 / 3.0 - 0.25) * k2[i]
                          + (4.0 / 9.0 - 1.0 / 3.0) * k3[i] - 0.125 * k4[i])
                sc = a.atol + a.rtol * max(abs(y[i]), abs(yn[i]))
                err += (e / sc) ** 2
            err = math.sqrt(err / 3)
            if not math.isfinite(err):
                print("convection.py: the state is not finite at t=%g" % t, file=sys.stderr)
                return 1
            fac = 0.9 * err ** (-1.0 / 3.0) if err > 0 else 5.0
            fac = min(5.0, max(0.2, fac))
            if err <= 1:
                t = tout if clipped else t + hs
                y = [store(v) for v in yn]
                k1 = field(y) if a.float32 else k4
                if not clipped or hs * fac < h:
                    h = hs * fac
            else:
                h = hs * fac
        rows.append("%r,%r,%r,%r" % (tout, y[0], y[1], y[2]))
    try:
        with open(a.out, "w") as f:
            f.write("\n".join(rows) + "\n")
    except OSError as e:
        print("convection.py: --out: %s" % e, file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
