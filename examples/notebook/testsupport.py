"""The plumb binary the notebook client's tests run.

$PLUMB_BIN when set (CI builds the binary once and sets it); otherwise the
binary is built from this checkout with `go build` into a temporary folder,
once per test process. Without either, the tests skip with the reason.
"""

import atexit
import os
import shutil
import subprocess
import tempfile
import unittest

_REPO = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
_built = None


def plumb_binary():
    """The path of a plumb binary, or raise unittest.SkipTest saying why not."""
    global _built
    env = os.environ.get("PLUMB_BIN")
    if env:
        if not os.access(env, os.X_OK):
            raise unittest.SkipTest(f"PLUMB_BIN={env} is not an executable file")
        return env
    if _built:
        return _built
    go = shutil.which("go")
    if not go:
        raise unittest.SkipTest("no plumb binary: set PLUMB_BIN or install Go to build one")
    tmp = tempfile.mkdtemp(prefix="plumb-client-test-")
    atexit.register(shutil.rmtree, tmp, True)
    path = os.path.join(tmp, "plumb")
    env = dict(os.environ, CGO_ENABLED="0")
    p = subprocess.run([go, "build", "-o", path, "./cmd/plumb"], cwd=_REPO, env=env,
                       capture_output=True, text=True)
    if p.returncode != 0:
        raise RuntimeError("go build ./cmd/plumb failed:\n" + p.stderr)
    _built = path
    return path
