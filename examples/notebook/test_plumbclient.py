"""Tests of the notebook client against the real plumb binary (standard library only).

Run: python3 -m unittest discover -s examples/notebook -v
(PLUMB_BIN names the binary; without it one is built with go build.)

Features that other parts of plumb may not have yet (--progress lines, JSON
error documents) are checked where the binary's help lists them and skipped
otherwise, saying so.
"""

import json
import math
import os
import struct
import subprocess
import tempfile
import unittest

import plumbclient as pc
from testsupport import plumb_binary

# The Hénon map's Jacobian has determinant -b everywhere, so the sum of its
# two Lyapunov exponents is ln|b| exactly (Hénon 1976; exact identity). The
# estimate sums ln|R_ii| of the QR steps, whose product is the product of the
# determinants: it departs from ln b only by rounding, about 1e-16 per
# iterate over 2000 iterates, far inside this bound.
HENON_SUM_TOL = 1e-9

# The logistic map's 2-cycle at r in (3, 1+sqrt 6) is
# x = ((r+1) +- sqrt((r-3)(r+1))) / (2r), with multiplier 4 + 2r - r^2
# (solving f(f(x)) = x; exact identity, May 1976). After 1000 discarded
# iterates at multiplier 0.16 (r = 3.2) or 0.31 (r = 3.3) the orbit sits on
# the cycle to the last bits; the bound allows a few ulps of the formula's
# own rounding.
CYCLE_TOL = 1e-12

# The mean plumb series reports is a float64 sum of 600 values of order 1
# divided by 600; its rounding error is at most about n * 2^-53 relative
# (common practice, the standard bound of recursive summation), 7e-14.
MEAN_TOL = 1e-13


def bits(x):
    """The IEEE 754 bits of a float, so that -0.0 and 0.0 differ."""
    return struct.unpack("<Q", struct.pack("<d", x))[0]


class FlagArgsTest(unittest.TestCase):
    """Keyword arguments become the flags the module's doc promises."""

    def test_table(self):
        cases = [
            ({"horizon": 20}, [], ["--horizon=20"]),
            ({"restart_at": 12.5}, [], ["--restart-at=12.5"]),
            ({"exact": False, "relative": True}, [], ["--exact=false", "--relative"]),
            ({"set": {"rho": 30, "sigma": 10.5}}, [], ["--set=rho=30", "--set=sigma=10.5"]),
            ({"cross_state": ["x=0", "z=27"]}, ["cross-state"], ["--cross-state=x=0", "--cross-state=z=27"]),
            ({"observe": ["x", "z"]}, ["cross-state"], ["--observe=x,z"]),
            ({"skipped": None, "t0": -5.0}, [], ["--t0=-5.0"]),
            ({"rtol": 1e-10}, [], ["--rtol=1e-10"]),
        ]
        for flags, repeatable, want in cases:
            with self.subTest(flags=flags):
                self.assertEqual(pc.flag_args(flags, set(repeatable)), want)

    def test_floats_round_trip(self):
        # Exact identity: the text read back is the same float64.
        for x in [0.1, 1 / 3, 2 / 3, 5e-324, 1.7976931348623157e308, -0.0, 28.0, 8 / 3, 1e-10]:
            with self.subTest(x=x):
                self.assertEqual(bits(float(pc._number(x))), bits(x))


class ClientTest(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.bin = plumb_binary()
        cls.c = pc.Client(cls.bin)

    def test_help_is_parsed(self):
        flags = self.c.flags("solve")
        for name in ["t1", "dt", "cross-state", "set", "format", "model"]:
            self.assertIn(name, flags)
        self.assertTrue({"table", "json", "csv"} <= set(self.c.formats("solve")), self.c.formats("solve"))
        _, repeatable, _ = pc._parse_help(self.c.help("solve"))
        self.assertIn("cross-state", repeatable)
        self.assertIn("set", repeatable)
        self.assertNotIn("t1", repeatable)

    def test_version(self):
        v = self.c.version()
        self.assertEqual(v["command"], "version")
        self.assertEqual(v["status"], "completed")
        self.assertIsNone(v["error"])

    def test_solve_json_is_plumbs_output(self):
        got = self.c.solve(t1=0.03, dt=0.01)
        # The same run, its stdout read by json directly: the client adds nothing.
        p = subprocess.run([self.bin, "solve", "--format=json", "--t1=0.03", "--dt=0.01"],
                           capture_output=True, check=True)
        self.assertEqual(got, json.loads(p.stdout))
        self.assertEqual(got["status"], "completed")
        starts = [s["start"] for s in got["system"]["states"]]
        self.assertEqual(got["samples"][0]["y"], starts)  # exact: the first sample is the start
        self.assertEqual(got["final"], got["samples"][-1]["y"])  # exact: t1 is on the grid

    def test_solve_csv_matches_json(self):
        # The same float64 values written as shortest decimals (JSON) and as
        # CSV: both read back to the same bits (exact identity).
        js = self.c.solve(t1=0.2, dt=0.01, set={"rho": 30})
        rows = self.c.solve(t1=0.2, dt=0.01, set={"rho": 30}, format="csv")
        self.assertEqual(len(rows), len(js["samples"]))
        names = [s["name"] for s in js["system"]["states"]]
        for row, s in zip(rows, js["samples"]):
            self.assertEqual(bits(row["t"]), bits(s["t"]))
            for name, y in zip(names, s["y"]):
                self.assertEqual(bits(row[name]), bits(y))
        self.assertEqual(js["system"]["parameters"][1]["value"], 30)

    def test_trust(self):
        rep = self.c.trust(horizon=5)
        self.assertEqual(rep["command"], "trust")
        self.assertEqual(rep["status"], "completed")
        self.assertIsNone(rep["error"])
        self.assertGreater(rep["trusted_until"], 0)
        self.assertLessEqual(rep["trusted_until"], 5)
        self.assertIn("caution", rep)
        self.assertTrue(rep["rungs"])

    def test_spectrum_henon_sum(self):
        sp = self.c.spectrum(model="henon", iterations=2000, discard=100)
        self.assertEqual(sp["status"], "completed")
        self.assertEqual(len(sp["exponents"]), 2)
        self.assertAlmostEqual(sum(sp["exponents"]), math.log(0.3), delta=HENON_SUM_TOL,
                               msg="Hénon 1976: lambda1 + lambda2 = ln b (exact identity)")

    def test_scan_two_cycle(self):
        sc = self.c.scan(across=["r=3.2:3.3:2"], keep=50, discard=1000)
        self.assertEqual(sc["status"], "completed")
        self.assertEqual(len(sc["rows"]), 2)
        for row in sc["rows"]:
            r = row["params"][0]
            root = math.sqrt((r - 3) * (r + 1))
            want = sorted([((r + 1) - root) / (2 * r), ((r + 1) + root) / (2 * r)])
            self.assertEqual(row["period"], 2)
            for got, w in zip(sorted(row["values"]), want):
                self.assertAlmostEqual(got, w, delta=CYCLE_TOL, msg=f"2-cycle at r={r} (May 1976)")
            self.assertAlmostEqual(row["exponent"], math.log(abs(4 + 2 * r - r * r)) / 2, delta=CYCLE_TOL,
                                   msg=f"exponent of the 2-cycle at r={r}: ln|f'(x1) f'(x2)|/2")

    def test_scan_jsonl(self):
        if "jsonl" not in self.c.formats("scan"):
            self.skipTest("plumb scan has no --format jsonl here")
        lines = self.c.scan(across=["r=3.2:3.3:2"], keep=50, discard=1000, format="jsonl")
        self.assertEqual(lines[-1].get("status"), "completed")
        self.assertEqual(lines[0]["command"], "scan")

    def test_ensemble(self):
        en = self.c.ensemble(t1=2, members=4, releases=0, tol=1)
        self.assertEqual(en["status"], "completed")
        rep = en["ensemble"]
        self.assertEqual(rep["members"], 4)
        self.assertEqual(len(rep["times"]), len(rep["spread"]))

    def test_series_from_a_list(self):
        # An invented signal: a logistic-map sequence at r = 3.9.
        x, data = 0.3, []
        for _ in range(600):
            x = 3.9 * x * (1 - x)
            data.append(x)
        rep = self.c.series(data, surrogates=0)
        self.assertEqual(rep["status"], "completed")
        self.assertEqual(rep["source"], "stdin")
        self.assertEqual(rep["series"]["n"], 600)
        self.assertAlmostEqual(rep["series"]["mean"], math.fsum(data) / 600, delta=MEAN_TOL,
                               msg="mean against math.fsum (correctly rounded sum)")

    def test_series_from_a_file(self):
        with tempfile.TemporaryDirectory() as d:
            path = os.path.join(d, "signal.csv")
            with open(path, "w") as f:
                f.write("t,level\n")
                x = 0.2
                for i in range(300):
                    x = 3.95 * x * (1 - x)
                    f.write(f"{i},{x!r}\n")
            rep = self.c.series(path, column="level", surrogates=0)
            self.assertEqual(rep["series"]["n"], 300)

    def test_bad_flag(self):
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.solve(bogus=1)
        e = cm.exception
        self.assertEqual(e.exit_status, 2)
        self.assertEqual(e.flag, "--bogus")
        self.assertIn("bogus", e.message)
        self.assertEqual(e.command, "solve")

    def test_bad_value(self):
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.solve(t1="abc")
        self.assertEqual(cm.exception.exit_status, 2)
        self.assertEqual(cm.exception.flag, "--t1")
        self.assertIn("abc", cm.exception.message)

    def test_unknown_model(self):
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.trust(model="no-such-model")
        self.assertEqual(cm.exception.exit_status, 2)
        self.assertEqual(cm.exception.flag, "--model")

    def test_bad_system_file(self):
        with tempfile.TemporaryDirectory() as d:
            path = os.path.join(d, "loop.json")
            with open(path, "w") as f:
                f.write('{"name": "loop", "kind": "flow", "states": [')
            with self.assertRaises(pc.PlumbError) as cm:
                self.c.solve(file=path)
        e = cm.exception
        self.assertEqual(e.exit_status, 2)
        self.assertEqual(e.flag, "--file")
        self.assertIn("line 1", e.message)
        if e.file is not None:  # plumb's JSON error document names the place
            self.assertEqual(e.line, 1)

    def test_failed_run_keeps_partial_result(self):
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.solve(t1=100, max_steps=50)
        e = cm.exception
        self.assertEqual(e.exit_status, 1)
        self.assertIn("step budget", e.message)
        self.assertEqual(e.status, "failed")
        self.assertIsNotNone(e.result)
        self.assertEqual(e.result["status"], "failed")
        self.assertTrue(e.result["samples"], "the samples computed before the failure are kept")
        self.assertLess(e.result["end"], 100)

    def test_your_own_out_file(self):
        if "out" not in self.c.flags("solve"):
            self.skipTest("plumb solve has no --out here")
        with tempfile.TemporaryDirectory() as d:
            path = os.path.join(d, "loop.json")
            got = self.c.solve(t1=0.03, out=path)
            with open(path) as f:
                self.assertEqual(got, json.load(f))
            self.assertEqual(got["status"], "completed")
            # A refused run leaves the file as it was; the client must not
            # hand the older result back as this run's.
            with self.assertRaises(pc.PlumbError) as cm:
                self.c.solve(t1=0.03, out=path, format="csv", rtol=-1)
            self.assertEqual(cm.exception.exit_status, 2)
            self.assertIsNone(cm.exception.result)
            with open(path) as f:
                self.assertEqual(json.load(f), got)

    def test_format_refused_before_running(self):
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.solve(format="xml")
        self.assertEqual(cm.exception.flag, "--format")
        self.assertEqual(cm.exception.exit_status, 2)

    def test_progress_lines(self):
        if "progress" not in self.c.flags("solve"):
            self.skipTest("plumb solve has no --progress here")
        records = []
        out = self.c.solve(t1=5, dt=0.01, progress=records.append)
        self.assertEqual(out["status"], "completed")
        self.assertGreaterEqual(len(records), 2, records)
        self.assertEqual(records[0]["event"], "start")
        self.assertEqual(records[-1]["event"], "end")
        self.assertEqual(records[-1]["status"], "completed")
        fractions = [r["fraction"] for r in records if r.get("fraction") is not None]
        self.assertEqual(fractions, sorted(fractions))
        self.assertTrue(all(0 <= f <= 1 for f in fractions), fractions)
        self.assertNotIn('{"', self.c.last_stderr, "progress records are not left in stderr")

    def test_progress_callable_that_raises(self):
        if "progress" not in self.c.flags("solve"):
            self.skipTest("plumb solve has no --progress here")

        class Stop(Exception):
            pass

        def stop(record):
            raise Stop(record["stage"])
        with self.assertRaises(Stop):
            self.c.solve(t1=2000, dt=0.01, progress=stop)

    def test_interrupt_reaches_plumb(self):
        # A cell interrupted in a notebook raises KeyboardInterrupt in the
        # client; here the progress callable raises it. The client passes
        # Ctrl-C to plumb, waits for it to end, and raises it on.
        if "progress" not in self.c.flags("solve"):
            self.skipTest("plumb solve has no --progress here")

        def interrupt(record):
            if record["event"] == "progress":
                raise KeyboardInterrupt
        with self.assertRaises(KeyboardInterrupt):
            self.c.solve(t1=5000, dt=0.01, progress=interrupt)

    def test_progress_refused_without_the_flag(self):
        if "progress" in self.c.flags("solve"):
            self.skipTest("plumb solve has --progress here (test_progress_lines runs)")
        with self.assertRaises(pc.PlumbError) as cm:
            self.c.solve(t1=1, progress=lambda r: None)
        self.assertEqual(cm.exception.flag, "--progress")


class ErrorParsingTest(unittest.TestCase):
    """plumb_error, the one function that reads plumb's errors, on both shapes."""

    def test_error_document(self):
        doc = {"plumb_version": "x", "arch": "amd64", "command": "solve", "status": "refused",
               "error": "--file loop.json: line 3, column 7: unknown field", "exit_status": 2,
               "flag": "--file", "file": "loop.json", "field": "equations", "line": 3, "column": 7,
               "hint": None}
        e = pc.plumb_error("solve", 2, doc, "plumb solve: --file loop.json: ...\n")
        self.assertEqual((e.message, e.exit_status, e.flag, e.file, e.field, e.line, e.column),
                         (doc["error"], 2, "--file", "loop.json", "equations", 3, 7))
        self.assertIsNone(e.result)

    def test_plain_text(self):
        e = pc.plumb_error("trust", 2, None,
                           "plumb trust: invalid value \"x\" for flag --tol: \"x\" is not a number\n"
                           "run 'plumb help trust' for usage\n")
        self.assertEqual(e.flag, "--tol")
        self.assertEqual(e.message, "invalid value \"x\" for flag --tol: \"x\" is not a number")
        self.assertIsNone(e.file)

    def test_plain_text_after_the_wall_time(self):
        e = pc.plumb_error("solve", 1, None,
                           "plumb solve: 15 samples, 0 crossings, 50 steps in 403µs\n"
                           "plumb solve: the partial result is in run.npy.partial\n"
                           "plumb solve: integrating failed at t=0.14: step budget exhausted\n"
                           "hint: raise --max-steps\n")
        self.assertEqual(e.message, "integrating failed at t=0.14: step budget exhausted")
        self.assertEqual(e.hint, "raise --max-steps")
        self.assertIsNone(e.flag)

    def test_partial_result(self):
        doc = {"command": "solve", "status": "canceled", "error": "canceled at t=3", "samples": []}
        e = pc.plumb_error("solve", 1, doc, "plumb solve: canceled at t=3\nhint: rerun\n")
        self.assertIs(e.result, doc)
        self.assertEqual(e.status, "canceled")
        self.assertEqual(e.hint, "rerun")
        self.assertIsNone(e.flag)


if __name__ == "__main__":
    unittest.main()
