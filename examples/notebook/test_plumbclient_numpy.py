"""The .npy results of plumb read with NumPy, bit for bit.

Skipped, saying why, where NumPy is not installed or where the binary's
help does not list --format npy for a command. Every comparison is an
exact identity: plumb writes the same float64 values as shortest
round-trip decimals (JSON, CSV) and as raw little-endian bits (.npy), so
the bits must agree, -0.0 included.
"""

import json
import subprocess
import unittest

import plumbclient as pc
from testsupport import plumb_binary

try:
    import numpy as np
except ImportError:  # the tests below skip
    np = None


def as_bits(a):
    """The uint64 bits of a float64 array."""
    return np.ascontiguousarray(a, dtype="<f8").view("<u8")


@unittest.skipIf(np is None, "NumPy is not installed for this python")
class NpyTest(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.bin = plumb_binary()
        cls.c = pc.Client(cls.bin)

    def need(self, command):
        if "npy" not in self.c.formats(command):
            self.skipTest(f"plumb {command} has no --format npy here")

    def test_solve_npy_equals_json(self):
        self.need("solve")
        flags = dict(t1=3, dt=0.01, set={"rho": 28, "sigma": 10.5}, start={"x": 0.1})
        arr = self.c.solve(format="npy", **flags)
        js = self.c.solve(**flags)
        want = np.array([[s["t"], *s["y"]] for s in js["samples"]], dtype="<f8")
        self.assertEqual(arr.dtype, np.dtype("<f8"))
        self.assertEqual(arr.shape, want.shape)
        self.assertTrue(np.array_equal(as_bits(arr), as_bits(want)),
                        "the .npy bits equal the JSON's shortest decimals read back")

    def test_solve_npy_on_stdout(self):
        # Without --out plumb writes the array on stdout (a pipe): the same
        # bits as the client's result (through a file where --out exists).
        self.need("solve")
        p = subprocess.run([self.bin, "solve", "--format=npy", "--t1=1", "--dt=0.05"],
                           capture_output=True, check=True)
        import io
        piped = np.load(io.BytesIO(p.stdout), allow_pickle=False)
        got = self.c.solve(format="npy", t1=1, dt=0.05)
        self.assertTrue(np.array_equal(as_bits(piped), as_bits(got)))
        self.assertEqual(got.shape[0], 21)  # t = 0, 0.05, ..., 1: 21 grid points (exact count)

    def test_solve_npy_into_your_own_file(self):
        self.need("solve")
        if "out" not in self.c.flags("solve"):
            self.skipTest("plumb solve has no --out here")
        import os
        import tempfile
        with tempfile.TemporaryDirectory() as d:
            path = os.path.join(d, "loop.npy")
            got = self.c.solve(format="npy", t1=1, dt=0.05, out=path)
            self.assertTrue(np.array_equal(as_bits(got), as_bits(np.load(path))))
            self.assertTrue(np.array_equal(as_bits(got), as_bits(self.c.solve(format="npy", t1=1, dt=0.05))))

    def test_scan_npy_equals_csv(self):
        self.need("scan")
        flags = dict(across=["r=3.4:4:25"], keep=40, discard=300)
        arr = self.c.scan(format="npy", **flags)
        rows = self.c.scan(format="csv", **flags)
        self.assertEqual(arr.shape[0], len(rows))
        cols = list(rows[0].keys())
        self.assertEqual(arr.shape[1], len(cols))
        want = np.array([[r[k] for k in cols] for r in rows], dtype="<f8")
        # The CSV spells a non-finite exponent as text; compare those as NaN/Inf.
        self.assertTrue(np.array_equal(as_bits(arr[np.isfinite(want)]), as_bits(want[np.isfinite(want)])))

    def test_ensemble_npy(self):
        self.need("ensemble")
        arr = self.c.ensemble(format="npy", t1=2, members=4, releases=0, tol=1)
        self.assertEqual(arr.dtype, np.dtype("<f8"))
        self.assertEqual(arr.ndim, 2)
        self.assertGreater(arr.shape[0], 0)

    def test_failed_solve_keeps_rows(self):
        self.need("solve")
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.solve(format="npy", t1=100, dt=0.01, max_steps=50)
        e = cm.exception
        self.assertEqual(e.exit_status, 1)
        self.assertIn("step budget", e.message)
        if e.result is not None:  # the rows computed before the failure
            js = json.loads(subprocess.run([self.bin, "solve", "--format=json", "--t1=100", "--dt=0.01",
                                            "--max-steps=50"], capture_output=True).stdout)
            done = np.array([[s["t"], *s["y"]] for s in js["samples"]], dtype="<f8")
            finite = e.result[np.isfinite(e.result[:, 0])]
            self.assertTrue(np.array_equal(as_bits(finite), as_bits(done)))


if __name__ == "__main__":
    unittest.main()
