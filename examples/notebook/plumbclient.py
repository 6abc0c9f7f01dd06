"""Call the plumb binary from Python and get its results as dicts and lists.

Standard library only (subprocess, json); NumPy is imported only to read
--format npy results, and only where it is installed.

    import plumbclient as pc
    report = pc.trust(model="lorenz", horizon=20, tol=0.5)
    print(report["trusted_until"], report["limited_by"])

Every command is a function (trust, solve, spectrum, scan, ensemble, series,
cycles, models, version) of a default client, or a method of a Client made
with the binary of your choice. Keyword arguments become flags:

    horizon=20              --horizon=20
    restart_at=12.5         --restart-at=12.5       (underscores become dashes)
    exact=False             --exact=false           (True gives the bare flag)
    set={"rho": 30}         --set=rho=30            (a dict: one NAME=VALUE flag each)
    cross_state=["x=0"]     --cross-state=x=0       (a list: the flag repeated where
    observe=["x", "z"]      --observe=x,z            plumb's help says repeatable,
                                                     else joined by commas)
    anything=None           (left out)

Floats are passed in the shortest form that reads back to the same bits.

format="json" (the default) returns the result object as a dict; "jsonl"
a list of dicts; "csv" a list of dicts, one per row, with numbers as
floats; "npy" a NumPy array; "table" the text. A run that fails raises
PlumbError carrying plumb's message, the flag it names, the exit status
and, when the run stopped part way, the partial result (error.result).
progress=callable receives each --progress lines record as a dict.
out=PATH (where plumb has --out) has plumb write the result whole into PATH;
the client reads it back from there, and only when this run wrote it.

Results describe the numerical model, not the real system it stands for:
a trust horizon is not a safety certificate, and safety-critical use
follows the field's own codes and licensed review.
"""

import io
import json
import os
import re
import shutil
import signal
import subprocess
import sys
import tempfile
import threading

__all__ = [
    "Client", "PlumbError", "default_client",
    "trust", "solve", "spectrum", "scan", "ensemble", "series", "cycles",
    "models", "version",
]

# The fields of plumb's JSON error document (--format json) that PlumbError
# carries as attributes.
_ERROR_FIELDS = ("command", "status", "flag", "file", "field", "line", "column", "hint")

_FLAG_IN_TEXT = re.compile(r"(?<![\w-])(--[a-z][a-z0-9-]*)")


class PlumbError(Exception):
    """plumb refused the input or its run failed.

    Attributes: message (plumb's message), exit_status (2: bad usage or
    input; 1: the computation failed or was canceled), flag (the flag the
    message names first, as typed, or None), command, status, file, field,
    line, column, hint (from plumb's JSON error document where it wrote
    one; None otherwise), result (the partial result of a run that stopped
    part way, in the format asked for, or None) and stderr (plumb's stderr
    text, progress records left out).
    """

    def __init__(self, message, exit_status, flag=None, result=None, stderr="", **fields):
        super().__init__(message)
        self.message = message
        self.exit_status = exit_status
        self.flag = flag
        self.result = result
        self.stderr = stderr
        for name in _ERROR_FIELDS:
            if name != "flag":
                setattr(self, name, fields.get(name))

    def __str__(self):
        where = f" ({self.flag})" if self.flag else ""
        return f"plumb exited with status {self.exit_status}{where}: {self.message}"


def plumb_error(command, exit_status, stdout_doc, stderr_text, result=None):
    """Build the PlumbError of a run that exited with exit_status.

    The one place that reads plumb's errors. stdout_doc is the JSON object
    plumb wrote on stdout (with --format json) or None. Where it is plumb's
    error document (it has exit_status) its fields are taken as they are;
    a result whose status is canceled or failed gives its error and is kept
    as the partial result; otherwise the message is the last stderr line
    "plumb COMMAND: ...", and the flag the first --name in it.
    """
    fields = {}
    message = None
    if isinstance(stdout_doc, dict):
        if "exit_status" in stdout_doc:
            fields = {k: stdout_doc.get(k) for k in _ERROR_FIELDS}
            message = stdout_doc.get("error")
        elif stdout_doc.get("status") in ("canceled", "failed"):
            message = stdout_doc.get("error")
            fields["status"] = stdout_doc.get("status")
            if result is None:
                result = stdout_doc
    prefix = f"plumb {command}: " if command else "plumb: "
    lines = [ln for ln in stderr_text.splitlines() if ln.strip()]
    if message is None:
        # plumb writes its error last (after the wall time and any
        # warnings), followed only by a hint and a pointer to the help.
        for ln in reversed(lines):
            if ln.startswith(prefix):
                message = ln[len(prefix):]
                break
    if message is None:
        message = lines[-1] if lines else f"plumb {command} exited with status {exit_status} and no message"
    if fields.get("hint") is None:
        for ln in lines:
            if ln.startswith("hint: "):
                fields["hint"] = ln[len("hint: "):]
                break
    flag = fields.pop("flag", None)
    if flag is None:
        m = _FLAG_IN_TEXT.search(message)
        flag = m.group(1) if m else None
    fields.setdefault("command", command)
    return PlumbError(message, exit_status, flag=flag, result=result, stderr=stderr_text, **fields)


def _number(x):
    """The text of a number that reads back to the same bits."""
    if isinstance(x, bool):
        return "true" if x else "false"
    if isinstance(x, int):
        return str(x)
    if isinstance(x, float):
        return repr(x)
    if hasattr(x, "dtype") and getattr(x.dtype, "kind", "") == "f":
        return repr(float(x))
    if hasattr(x, "dtype") and getattr(x.dtype, "kind", "") in "iu":
        return str(int(x))
    return str(x)


def flag_args(flags, repeatable=()):
    """Turn keyword arguments into plumb's flags, in the order given.

    repeatable names the flags (without dashes) that plumb takes once per
    value; a list for any other flag is joined by commas.
    """
    args = []
    for key, value in flags.items():
        if value is None:
            continue
        name = key.replace("_", "-")
        flag = "--" + name
        if value is True:
            args.append(flag)
        elif value is False:
            args.append(flag + "=false")
        elif isinstance(value, dict):
            for k, v in value.items():
                args.append(f"{flag}={k}={_number(v)}")
        elif isinstance(value, (list, tuple)):
            if name in repeatable:
                args.extend(f"{flag}={_number(v)}" for v in value)
            else:
                args.append(flag + "=" + ",".join(_number(v) for v in value))
        else:
            args.append(f"{flag}={_number(value)}")
    return args


def _parse_help(text):
    """The flags (name -> repeatable) and the formats a command's help lists."""
    flags = {}
    current = None
    for line in text.splitlines():
        m = re.match(r"^  --([a-z][a-z0-9-]*)\b", line)
        if m:
            current = m.group(1)
            flags[current] = line
        elif current and line.startswith("   "):
            flags[current] += " " + line.strip()
        else:
            current = None
    repeatable = {name for name, block in flags.items() if "(repeatable" in block}
    formats = []
    block = flags.get("format", "")
    m = re.search(r"output FORMAT: ([a-z, ]+?)\s*(\(|$)", block)
    if m:
        formats = [f.strip() for f in m.group(1).split(",") if f.strip()]
    return set(flags), repeatable, formats


def _csv_rows(text):
    """CSV text as a list of dicts, numbers as floats; '#' lines skipped."""
    import csv
    lines = [ln for ln in text.splitlines() if ln and not ln.startswith("#")]
    rows = []
    for rec in csv.DictReader(lines):
        row = {}
        for k, v in rec.items():
            try:
                row[k] = float(v)
            except (TypeError, ValueError):
                row[k] = v
        rows.append(row)
    return rows


def _jsonl(text):
    return [json.loads(ln) for ln in text.splitlines() if ln.strip()]


class Client:
    """Runs one plumb binary.

    binary: the path of the plumb binary (default: $PLUMB_BIN, else plumb
    on the PATH). cwd and env: where and with what environment it runs.
    After each call, last_stderr holds plumb's stderr text (warnings and
    the wall time; progress records left out).
    """

    def __init__(self, binary=None, cwd=None, env=None):
        binary = binary or os.environ.get("PLUMB_BIN") or shutil.which("plumb")
        if not binary:
            raise FileNotFoundError("no plumb binary: pass binary=..., set PLUMB_BIN, or put plumb on the PATH")
        self.binary = binary
        self.cwd = cwd
        self.env = env
        self.last_stderr = ""
        self._help = {}

    def help(self, command):
        """The text of 'plumb help COMMAND'."""
        if command not in self._help:
            p = subprocess.run([self.binary, "help", command], capture_output=True, text=True,
                               cwd=self.cwd, env=self.env)
            if p.returncode != 0:
                raise plumb_error(command, p.returncode, None, p.stderr)
            self._help[command] = p.stdout
        return self._help[command]

    def flags(self, command):
        """The names (without dashes) of the flags COMMAND takes."""
        return _parse_help(self.help(command))[0]

    def formats(self, command):
        """The --format values COMMAND accepts."""
        return _parse_help(self.help(command))[2]

    def run(self, command, *positional, format="json", progress=None, stdin=None, **flags):
        """Run 'plumb COMMAND --format FORMAT FLAGS... POSITIONAL...'.

        Returns the result read as format says (see the module's doc) or
        raises PlumbError. stdin (str or bytes) is passed on plumb's stdin.
        progress, a callable, receives each progress record (a dict) as
        plumb writes it, where plumb has --progress; without it, a
        progress callable raises PlumbError naming --progress.
        """
        names, repeatable, formats = _parse_help(self.help(command))
        if format is not None and formats and format not in formats:
            raise PlumbError(f"--format {format}: plumb {command} writes {', '.join(formats)}", 2,
                             flag="--format", command=command)
        args = [self.binary, command]
        if format is not None:
            args.append(f"--format={format}")
        if progress is not None:
            if "progress" not in names:
                raise PlumbError(f"--progress: this plumb ({self.binary}) has no --progress for {command}",
                                 2, flag="--progress", command=command)
            args.append("--progress=lines")
        args += flag_args(flags, repeatable)
        tmpdir = None
        out_path = None
        if flags.get("out") is not None:
            # Your own --out file: the result is read back from it, when
            # this run wrote it (a refused run leaves an older file as it was).
            out_path = os.fspath(flags["out"])
        elif format == "npy" and "out" in names:
            # A file, not a pipe: the row count is then exact, and a run
            # that stops part way leaves its rows in FILE.partial.
            tmpdir = tempfile.mkdtemp(prefix="plumb-")
            out_path = os.path.join(tmpdir, "result.npy")
            args.append(f"--out={out_path}")
        before = (_stamp(out_path), _stamp(out_path + ".partial")) if out_path else None
        if positional:
            if any(str(p).startswith("-") and str(p) != "-" for p in positional):
                args.append("--")
            args += [str(p) for p in positional]
        try:
            code, out, err = self._exec(args, stdin, progress)
            self.last_stderr = err
            written = partial_path = None
            if out_path:
                if _stamp(out_path) not in (None, before[0]):
                    written = out_path
                if _stamp(out_path + ".partial") not in (None, before[1]):
                    partial_path = out_path + ".partial"
                if written and format != "npy" and not out.strip():
                    with open(written, "rb") as f:
                        out = f.read()
            return self._result(command, format, code, out, err, written, partial_path)
        finally:
            if tmpdir:
                shutil.rmtree(tmpdir, ignore_errors=True)

    def _exec(self, args, stdin, progress):
        """Run args; return (exit status, stdout bytes, stderr text)."""
        proc = subprocess.Popen(args, stdin=subprocess.PIPE if stdin is not None else subprocess.DEVNULL,
                                stdout=subprocess.PIPE, stderr=subprocess.PIPE, cwd=self.cwd, env=self.env)
        chunks = []
        reader = threading.Thread(target=lambda: chunks.append(proc.stdout.read()), daemon=True)
        reader.start()
        writer = None
        if stdin is not None:
            data = stdin.encode() if isinstance(stdin, str) else bytes(stdin)

            def feed():
                try:
                    proc.stdin.write(data)
                except BrokenPipeError:
                    pass
                finally:
                    try:
                        proc.stdin.close()
                    except BrokenPipeError:
                        pass
            writer = threading.Thread(target=feed, daemon=True)
            writer.start()
        kept = []
        try:
            for raw in proc.stderr:
                line = raw.decode("utf-8", "replace")
                if line.startswith("{"):
                    try:
                        record = json.loads(line)
                    except ValueError:
                        record = None
                    if isinstance(record, dict):
                        if progress is not None:
                            progress(record)
                        continue
                kept.append(line)
            code = proc.wait()
        except BaseException as e:
            # Ctrl-C in a notebook: let plumb stop as on a terminal, writing
            # what it completed, then pass the interrupt on. Anything else
            # (a progress callable that raised) ends the run at once.
            if isinstance(e, KeyboardInterrupt):
                proc.send_signal(signal.SIGINT if sys.platform != "win32" else signal.SIGTERM)
                try:
                    proc.wait(timeout=10)
                except subprocess.TimeoutExpired:
                    pass
            if proc.poll() is None:
                proc.kill()
            proc.wait()
            raise
        finally:
            reader.join()
            if writer:
                writer.join()
            for f in (proc.stdout, proc.stderr, proc.stdin):
                if f is not None:
                    try:
                        f.close()
                    except OSError:
                        pass
        return code, b"".join(chunks), "".join(kept)

    def _result(self, command, format, code, out, err, out_path, partial_path):
        """Read the output in its format, or raise PlumbError.

        out_path is the --out file this run wrote (None: none), and
        partial_path the FILE.partial it left, where a binary result of a
        run that stopped part way goes.
        """
        text = None
        doc = None
        if format != "npy":
            text = out.decode("utf-8", "replace")
            if format == "json":
                try:
                    doc = json.loads(text)
                except ValueError:
                    doc = None
        if code == 0:
            if format == "json":
                if doc is None:
                    raise PlumbError("plumb wrote no JSON object on stdout", 1, command=command, stderr=err)
                return doc
            if format == "jsonl":
                return _jsonl(text)
            if format == "csv":
                return _csv_rows(text)
            if format == "npy":
                return _load_npy(out_path, out)
            return text if text is not None else out
        partial = None
        try:
            if format == "jsonl" and text:
                partial = _jsonl(text)
                if partial and isinstance(partial[-1], dict) and partial[-1].get("status") in ("canceled", "failed"):
                    doc = partial[-1]
            elif format == "csv" and text:
                partial = _csv_rows(text)
            elif format == "npy":
                if partial_path:
                    partial = _load_npy(partial_path, b"")
                elif out:
                    partial = _load_npy(None, out)
            elif format not in ("json", "jsonl", "csv") and text:
                partial = text
        except (ValueError, ImportError):
            partial = None
        raise plumb_error(command, code, doc, err, result=partial)

    def trust(self, **flags):
        """plumb trust: how far ahead a run can be trusted, and why."""
        return self.run("trust", **flags)

    def solve(self, **flags):
        """plumb solve: a trajectory (format="npy" for an array)."""
        return self.run("solve", **flags)

    def spectrum(self, **flags):
        """plumb spectrum: Lyapunov exponents and derived measures."""
        return self.run("spectrum", **flags)

    def scan(self, **flags):
        """plumb scan: an orbit diagram and exponent of a map across parameters."""
        return self.run("scan", **flags)

    def ensemble(self, **flags):
        """plumb ensemble: members released a tiny distance apart."""
        return self.run("ensemble", **flags)

    def series(self, data, **flags):
        """plumb series on a measured signal.

        data is a file path (CSV or .npy) or a sequence of numbers (a list,
        a NumPy vector), passed on stdin as a one-column CSV.
        """
        if isinstance(data, (str, os.PathLike)):
            return self.run("series", os.fspath(data), **flags)
        rows = "\n".join(_number(v) for v in data)
        return self.run("series", "-", stdin="value\n" + rows + "\n", **flags)

    def cycles(self, **flags):
        """plumb cycles: the cycles of a period of a map."""
        return self.run("cycles", **flags)

    def models(self, **flags):
        """plumb models: the built-in systems."""
        return self.run("models", **flags)

    def version(self):
        """plumb version, as a dict."""
        return self.run("version")


def _stamp(path):
    """What tells a file rewritten (renamed into place) from an old one; None if absent."""
    try:
        st = os.stat(path)
    except OSError:
        return None
    return (st.st_ino, st.st_mtime_ns, st.st_size)


def _load_npy(path, data):
    try:
        import numpy
    except ImportError as e:
        raise ImportError("reading --format npy needs NumPy; use format='csv' or 'json' without it") from e
    if path is not None:
        return numpy.load(path, allow_pickle=False)
    return numpy.load(io.BytesIO(data), allow_pickle=False)


_default = None


def default_client():
    """The client the module's functions use ($PLUMB_BIN or plumb on the PATH)."""
    global _default
    if _default is None:
        _default = Client()
    return _default


def trust(**flags):
    """plumb trust with the default client; see Client.run."""
    return default_client().trust(**flags)


def solve(**flags):
    """plumb solve with the default client; see Client.run."""
    return default_client().solve(**flags)


def spectrum(**flags):
    """plumb spectrum with the default client; see Client.run."""
    return default_client().spectrum(**flags)


def scan(**flags):
    """plumb scan with the default client; see Client.run."""
    return default_client().scan(**flags)


def ensemble(**flags):
    """plumb ensemble with the default client; see Client.run."""
    return default_client().ensemble(**flags)


def series(data, **flags):
    """plumb series with the default client; see Client.series."""
    return default_client().series(data, **flags)


def cycles(**flags):
    """plumb cycles with the default client; see Client.run."""
    return default_client().cycles(**flags)


def models(**flags):
    """plumb models with the default client; see Client.run."""
    return default_client().models(**flags)


def version():
    """plumb version with the default client."""
    return default_client().version()
