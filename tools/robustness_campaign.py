#!/usr/bin/env python3
"""Robustness campaign: attack the ``latdyn`` command line and classify every outcome.

A development tool (issue 17), not part of the test suite.  Every attempt runs
``python -m latdyn ...`` as a subprocess with a timeout and a memory limit, in
a sandbox folder of its own::

    <sandbox>/home/                 HOME of the run
    <sandbox>/d1/d2/d3/in/          the input files (aircraft, criteria, records)
    <sandbox>/d1/d2/d3/out/         the output folder (everything a run may write)
    <sandbox>/d1/d2/d3/work/        the working folder

The whole sandbox is fingerprinted before and after, so that a file written
outside ``out/`` (a name such as ``../../escape`` lands in ``d1``), a changed or
deleted input, a temporary left behind and a half-written output are seen.

Categories (as in issue 17): ``mutated`` aircraft files through every command,
``numeric`` (valid but numerically nasty aircraft; ``find_modes`` roots compared
with ``numpy.linalg.eig``), ``cli`` (abusive command lines), ``faults``
(read-only or full file system, missing folder, a device as output, full and
closed standard output, SIGTERM/SIGINT during writing), ``determinism``
(same inputs twice, ``LC_ALL=C``/``PYTHONUTF8=0``) and ``security`` (hostile
names, ``--force`` on folders that are not reports).

Every attempt is classified as ``ok``, ``refusal`` (exit 2 and exactly one
line on stderr naming a file or an option) or ``FAILURE`` with one or more
kinds (traceback, multi-line stderr, refusal naming nothing, unexpected exit
status, NaN/Infinity in an output, invalid JSON, wrong root, file outside the
output folder, temporary left behind, half-written output, data loss, control
character on the terminal, hang).  The run is deterministic for a given
``--seed``; ``--quick`` runs a small sample of each category.

Usage::

    nice -n 10 python tools/robustness_campaign.py --quick
    nice -n 10 python tools/robustness_campaign.py --scale 4 --json campaign.json
"""

from __future__ import annotations

import argparse
import collections
import contextlib
import hashlib
import itertools
import json
import math
import os
import pathlib
import random
import re
import resource
import shutil
import signal
import stat
import subprocess
import sys
import tempfile
import time
import warnings
import tomllib

ROOT = pathlib.Path(__file__).resolve().parents[1]
PYTHON = sys.executable
BASE_AIRCRAFT = ROOT / "aircraft" / "kestrel-k40.toml"
VARIANT_AIRCRAFT = ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml"
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"
CRITERIA = ROOT / "latdyn" / "criteria" / "mil-f-8785c.toml"
MEMORY_LIMIT = 3 * 2**30  # bytes of address space per run
NONFINITE = re.compile(r"(?<![A-Za-z_])[-+]?(nan|inf|infinity)(?![A-Za-z_])", re.IGNORECASE)
CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f]")
TEMPORARY = re.compile(r"^\..*(\.latdyn-(partial|old)\.|\.[a-z0-9_]{8}(\.[A-Za-z0-9]+)?$)")
TEXT_SUFFIXES = {".csv", ".md", ".json", ".html", ".toml", ".txt"}
FIGURE_ENDS = {".png": b"IEND\xaeB`\x82", ".svg": b"</svg>\n", ".pdf": b"%%EOF\n"}


# ----------------------------------------------------------------------------------------------
# TOML writing (the campaign's own: the standard library reads TOML but does not write it)

def _toml_string(text):
    """A TOML basic string holding ``text`` (latdyn's own writer of names into TOML)."""
    from latdyn.text import toml_string

    return toml_string(text)


def toml_value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return _toml_string(value)
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{" + ", ".join(f"{_key(k)} = {toml_value(v)}" for k, v in value.items()) + "}"
    raise TypeError(type(value))


def _key(key):
    return key if re.fullmatch(r"[A-Za-z0-9_-]+", key) else _toml_string(key)


def _is_table_array(value):
    return isinstance(value, list) and value and all(isinstance(v, dict) for v in value)


def toml_text(tree, prefix=()):
    """TOML text of a tree: scalars and arrays inline, tables as [headers], arrays of tables as [[headers]]."""
    lines = []
    for key, value in tree.items():
        if not isinstance(value, dict) and not _is_table_array(value):
            lines.append(f"{_key(key)} = {toml_value(value)}")
    for key, value in tree.items():
        path = (*prefix, key)
        if isinstance(value, dict):
            lines.append(f"\n[{'.'.join(_key(k) for k in path)}]")
            lines.append(toml_text(value, path))
        elif _is_table_array(value):
            for entry in value:
                lines.append(f"\n[[{'.'.join(_key(k) for k in path)}]]")
                lines.append(toml_text(entry, path))
    return "\n".join(line for line in lines if line != "")


def base_tree():
    with open(BASE_AIRCRAFT, "rb") as handle:
        return tomllib.load(handle)


def leaves(tree, prefix=()):
    """Paths (tuples of keys and list indices) of every scalar or list-of-scalars leaf."""
    items = tree.items() if isinstance(tree, dict) else enumerate(tree)
    for key, value in items:
        path = (*prefix, key)
        if isinstance(value, dict) or _is_table_array(value):
            yield from leaves(value, path)
        else:
            yield path


def get_path(tree, path):
    for key in path:
        tree = tree[key]
    return tree


def set_path(tree, path, value):
    get_path(tree, path[:-1])[path[-1]] = value


def delete_path(tree, path):
    container = get_path(tree, path[:-1])
    del container[path[-1]]


# ----------------------------------------------------------------------------------------------
# Sandbox, fingerprints and classification

class Sandbox:
    """The folders of one attempt (see the module docstring)."""

    def __init__(self, root):
        self.root = pathlib.Path(root)
        self.home = self.root / "home"
        self.top = self.root / "d1" / "d2" / "d3"
        self.inputs = self.top / "in"
        self.out = self.top / "out"
        self.work = self.top / "work"
        for folder in (self.home, self.inputs, self.out, self.work):
            folder.mkdir(parents=True, exist_ok=True)

    def write(self, name, content):
        path = self.inputs / name
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")
        return path


def fingerprint(root):
    """{relative path: (kind, digest)} of everything under root (symbolic links not followed)."""
    found = {}
    for folder, dirs, files in os.walk(root):
        for name in dirs + files:
            path = os.path.join(folder, name)
            relative = os.path.relpath(path, root)
            try:
                info = os.lstat(path)
            except OSError:
                continue
            if stat.S_ISLNK(info.st_mode):
                found[relative] = ("link", os.readlink(path))
            elif stat.S_ISDIR(info.st_mode):
                found[relative] = ("dir", None)
            elif stat.S_ISREG(info.st_mode):
                with open(path, "rb") as handle:
                    found[relative] = ("file", hashlib.sha256(handle.read()).hexdigest())
            else:
                found[relative] = ("special", stat.S_IFMT(info.st_mode))
        dirs[:] = [d for d in dirs if not os.path.islink(os.path.join(folder, d))]
    return found


def normalise(text, limit=110):
    """A failure's detail with the run-specific parts (paths, numbers, quoted text) taken out."""
    text = re.sub(r"/[^\s:'\"]*", "PATH", text)
    text = re.sub(r"'[^']*'|\"[^\"]*\"", "'…'", text)
    text = re.sub(r"[-+]?\d[\d.e+-]*", "N", text)
    return text.strip()[:limit]


class Attempt:
    """One command line to run and how to judge it."""

    def __init__(self, category, label, argv, sandbox, *, env=None, cwd=None, timeout=60,
                 replaceable=(), allowed_outside=(), stdin=None, stdout=None, expect_failure_exit=(),
                 formats_json=False, post=None, names=()):
        self.category, self.label, self.argv, self.sandbox = category, label, argv, sandbox
        self.env, self.cwd, self.timeout = env or {}, cwd, timeout
        self.replaceable = tuple(replaceable)          # existing paths a success may replace
        self.allowed_outside = tuple(allowed_outside)  # paths outside out/ that may be written
        self.stdout = stdout
        self.expect_exit = tuple(expect_failure_exit)  # extra exit statuses that are fine (signals)
        self.formats_json = formats_json
        self.post = post                               # extra check: f(attempt, result) -> [(kind, detail)]
        self.names = tuple(names)                      # hostile strings whose raw form must not leak


class Result:
    def __init__(self, status, stdout, stderr, seconds, hung=False):
        self.status, self.stdout, self.stderr, self.seconds, self.hung = status, stdout, stderr, seconds, hung


def _limit_memory():
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))
    os.setpgrp()


def child_env(sandbox, extra=None):
    env = {key: value for key, value in os.environ.items()
           if key in ("PATH", "MPLCONFIGDIR", "TMPDIR", "SYSTEMROOT")}
    env.update({"PYTHONPATH": str(ROOT), "HOME": str(sandbox.home), "LC_ALL": "C.UTF-8",
                "PYTHONHASHSEED": "0", "MPLBACKEND": "Agg",
                # the report's generation time fixed (reproducible-builds.org), so that runs compare
                "SOURCE_DATE_EPOCH": "1796169600"})
    env.update(extra or {})
    return {k: v for k, v in env.items() if v is not None}


def run(attempt, action=None):
    """Run an attempt; ``action(process)`` (a signal sender) runs while it works."""
    sandbox = attempt.sandbox
    command = [PYTHON, "-m", "latdyn", *attempt.argv]
    start = time.monotonic()
    stdout = subprocess.PIPE if attempt.stdout is None else attempt.stdout
    closed = None
    if getattr(attempt, "close_stdout", False):  # a pipe whose reader has gone (as `| head -c0`)
        reader, closed = os.pipe()
        os.close(reader)
        stdout = closed
    process = subprocess.Popen(command, cwd=attempt.cwd or sandbox.work, env=child_env(sandbox, attempt.env),
                               stdin=subprocess.DEVNULL, stdout=stdout, stderr=subprocess.PIPE,
                               preexec_fn=_limit_memory)
    if closed is not None:
        os.close(closed)
    if action is not None:
        action(process)
    try:
        out, err = process.communicate(timeout=attempt.timeout)
        hung = False
    except subprocess.TimeoutExpired:
        with contextlib.suppress(ProcessLookupError):
            os.killpg(process.pid, signal.SIGKILL)
        out, err = process.communicate()
        hung = True
    return Result(process.returncode, (out or b"").decode("utf-8", "replace"),
                  (err or b"").decode("utf-8", "replace"), time.monotonic() - start, hung)


def _strict_json(text):
    def refuse(word):
        raise ValueError(f"non-finite number {word}")
    return json.loads(text, parse_constant=refuse)


def _check_file(path):
    """Failures of one written file (exit 0)."""
    suffix = path.suffix.lower()
    data = path.read_bytes()
    if not data:
        return [("half-written output", f"empty {suffix} file")]
    if suffix in FIGURE_ENDS:
        if not data.rstrip(b"\n").endswith(FIGURE_ENDS[suffix].rstrip(b"\n")):
            return [("half-written output", f"{suffix} file without its end")]
        return []
    if suffix not in TEXT_SUFFIXES:
        return []
    text = data.decode("utf-8", "replace")
    failures = []
    if "\ufffd" in text and b"\xef\xbf\xbd" not in data:
        failures.append(("output not UTF-8", suffix))
    if suffix == ".json":
        try:
            _strict_json(text)
        except ValueError as error:
            failures.append(("NaN/Infinity in output" if "non-finite" in str(error) else "invalid JSON",
                             f"{path.name}: {normalise(str(error), 60)}"))
    elif NONFINITE.search(re.sub(r"base64,[A-Za-z0-9+/=]+", "", text)):
        failures.append(("NaN/Infinity in output", f"{suffix} file {normalise(path.name, 40)}"))
    return failures


def _announced(result, sandbox):
    """What a run said it wrote (its ``wrote PATH`` lines on standard output), relative to the sandbox
    root; a report's ``index.html`` stands for its whole folder."""
    paths = []
    for line in result.stdout.splitlines():
        if not line.startswith("wrote "):
            continue
        path = pathlib.Path(line[len("wrote "):].strip())
        path = path if path.is_absolute() else sandbox.work / path
        relative = os.path.relpath(path, sandbox.root)
        paths.append(os.path.dirname(relative) + os.sep if relative.endswith("index.html") else relative)
    return paths


def _finished_before_the_signal(attempt, result, written):
    """A run killed by the signal after it had written and announced every output (the signal landed
    while the interpreter was shutting down): complete, not half-written."""
    if not written or result.status >= 0 or 128 - result.status not in attempt.expect_exit:
        return False
    announced = _announced(result, attempt.sandbox)
    return all(any(path == a or (a.endswith(os.sep) and path.startswith(a)) for a in announced)
               for path in written)


def classify(attempt, result, before, after):
    """The failure kinds of one attempt (an empty list: ok or a clean refusal)."""
    failures = []
    sandbox = attempt.sandbox
    status = result.status
    if result.hung:
        return [("hang", " ".join(attempt.argv[:1]))]
    stderr_lines = [line for line in result.stderr.splitlines() if line.strip()]
    if "Traceback (most recent call last)" in result.stderr:
        last = next((line for line in reversed(stderr_lines) if re.match(r"^\w[\w.]*(Error|Exception|Warning|Interrupt)?\b.*:", line)
                     or re.match(r"^\w+(Error|Exception)$", line)), stderr_lines[-1] if stderr_lines else "")
        failures.append(("traceback", normalise(last)))
    elif status == 2:
        if len(stderr_lines) != 1:
            last = stderr_lines[-1] if stderr_lines else "(empty)"
            if result.stderr.startswith("usage:"):  # argparse: the usage, then the error
                last = "argparse usage then " + re.sub(r"argument \S+|arguments: .*|'.*", "X", last.split("error: ", 1)[-1])
            failures.append(("multi-line stderr on refusal", normalise(last)))
        else:
            line = stderr_lines[0]
            names = [p.name for p in sandbox.inputs.iterdir()] + [
                "command line", "--", " -o", "standard output", "argument", "criteria", str(sandbox.top), "/dev/"]
            names += [f"latdyn: {word}:" for word in attempt.argv or () if word]  # names a file given as typed
            if not any(name and name in line for name in names):
                failures.append(("refusal names neither file nor option", normalise(line)))
    elif status in (0, 1):
        stray = [line for line in stderr_lines if not line.startswith(("latdyn", "wrote "))]
        if stray:
            failures.append(("stray stderr", normalise(stray[0])))
    elif status not in attempt.expect_exit and not (status < 0 and 128 - status in attempt.expect_exit):
        # (a negative status: killed by the signal itself, after its handler was gone at exit; the
        # file-system check below tells a complete run from a half-written one)
        failures.append(("unexpected exit status", str(status)))
    for stream, text in (("stdout", result.stdout), ("stderr", result.stderr)):
        if CONTROL.search(text.replace("\r", "")):
            failures.append(("control character on the terminal", stream))
    if status in (0, 1) and attempt.formats_json and result.stdout.strip():
        try:
            _strict_json(result.stdout)
        except ValueError as error:
            failures.append(("NaN/Infinity in output" if "non-finite" in str(error) else "invalid JSON",
                             f"stdout {attempt.label.split('|')[-1].split()[0]}"))
    elif status in (0, 1) and NONFINITE.search(result.stdout):
        failures.append(("NaN/Infinity in output", f"stdout {attempt.label.split('|')[-1].split()[0] if '|' in attempt.label else ''}"))
    # the file system
    out_prefix = os.path.relpath(sandbox.out, sandbox.root) + os.sep
    inputs_prefix = os.path.relpath(sandbox.inputs, sandbox.root) + os.sep
    replaceable = tuple(os.path.relpath(p, sandbox.root) for p in attempt.replaceable)
    allowed = tuple(os.path.relpath(p, sandbox.root) for p in attempt.allowed_outside)
    new_files = []
    for path, mark in before.items():
        if path.startswith(replaceable) or path.startswith(("home" + os.sep + ".cache", "home" + os.sep + ".config")):
            continue
        what = "input" if path.startswith(inputs_prefix) else "existing " + mark[0]
        if path not in after:
            failures.append(("data loss", f"{what} removed"))
        elif after[path] != mark:
            failures.append(("data loss", f"{what} {'replaced by a ' + after[path][0] if after[path][0] != mark[0] else 'changed'}"))
    for path, mark in after.items():
        if path in before and before[path] == mark:
            continue
        name = os.path.basename(path)
        if TEMPORARY.match(name):
            failures.append(("temporary left behind", normalise(name, 40)))
            continue
        if path.startswith(("home" + os.sep + ".cache", "home" + os.sep + ".config")):
            continue
        if not path.startswith(out_prefix) and not path.startswith(replaceable + allowed) and path not in before \
                and path != "listing":
            failures.append(("file written outside the output folder", normalise(path, 60)))
        if mark[0] == "file":
            new_files.append(path)
    if status not in (0, 1):
        written = [p for p in new_files if p.startswith(out_prefix)]
        # two writers of one path: the files are the winner's (its own check looks at them)
        if written and not getattr(attempt, "shared_output", False) \
                and not _finished_before_the_signal(attempt, result, written):
            failures.append(("half-written output", f"exit {status} left {len(written)} file(s)"))
    else:
        for path in new_files:
            failures.extend(_check_file(sandbox.root / path))
            if path.endswith(".md") and any("<script>" in n for n in attempt.names):
                if "<script>" in (sandbox.root / path).read_text("utf-8", "replace"):
                    failures.append(("markup from a name unescaped", "<script> in Markdown"))
            if path.endswith(".csv"):
                text = (sandbox.root / path).read_text("utf-8", "replace")
                if re.search(r"(^|,)\"?=cmd", text, re.MULTILINE):
                    failures.append(("formula injection in CSV", "=cmd"))
    for name in attempt.names:
        if "\x1b" in name and "\x1b" in result.stdout + result.stderr:
            failures.append(("control character on the terminal", "ESC from a name"))
    if attempt.post:
        failures.extend(attempt.post(attempt, result))
    return failures


# ----------------------------------------------------------------------------------------------
# The attempts of each category


def commands_for(path, sandbox, rng, heavy):
    """(label, argv, formats_json) for one aircraft file through the commands; heavy ones when asked."""
    p = str(path)
    out = sandbox.out
    cheap = [
        ("modes", ["modes", p, "--json", "--shapes"], True),
        ("assess", ["assess", p, "--format", "json"], True),
        ("steady", ["steady", p, "--format", "json"], True),
        ("sensitivity", ["sensitivity", p, "--format", "json"], True),
        ("respond", ["respond", p, "--format", "json", "--csv", str(out / "r.csv")], True),
        ("respond-tf", ["respond", p, "--transfer-functions", "--format", "json"], True),
        ("sweep", ["sweep", p, "--vary", "Cn_beta=0.05:0.2:5", "--format", "json"], True),
        ("uncertainty", ["uncertainty", p, "--samples", "400", "--seed", "3", "--vary", "Cn_beta=±10%",
                         "--format", "json"], True),
        ("turbulence", ["turbulence", p, "--sigma-v", "1", "--scale-length", "530", "--format", "json"], True),
        ("compare", ["compare", str(BASE_AIRCRAFT), p, "--format", "json"], True),
        ("estimate", ["estimate", p, "--format", "json"], True),
        ("modes-table", ["modes", p], False),
    ]
    expensive = [
        ("report", ["report", p, "-o", str(out / "rep")], False),
        ("assess-plots", ["assess", p, "-o", str(out)], False),
        ("respond-plot", ["respond", p, "--plot", str(out / "r.png"), "--bode", str(out / "b.svg")], False),
        ("sweep-plot", ["sweep", p, "--vary", "mass=5000:9000:4", "-o", str(out / "s.png")], False),
        ("identify", ["identify", p, "--condition", "cruise", "--data", str(sandbox.inputs / "record.csv"),
                      "--method", "equation-error", "--format", "json", "-o", str(out / "id.toml")], True),
        ("turbulence-csv", ["turbulence", p, "--sigma-v", "1", "--scale-length", "530", "--csv",
                            str(out / "t.csv"), "--duration", "20"], False),
    ]
    chosen = rng.sample(cheap, k=min(len(cheap), 6))
    if heavy:
        chosen.append(rng.choice(expensive))
    return chosen


def _mutants(rng, count):
    """(label, files{name: text or bytes}, main name) of mutated aircraft files."""
    tree0 = base_tree()
    base_text = BASE_AIRCRAFT.read_text(encoding="utf-8")
    paths = list(leaves(tree0))
    numbers = [p for p in paths if isinstance(get_path(tree0, p), (int, float)) and not isinstance(get_path(tree0, p), bool)]
    texts = [p for p in paths if isinstance(get_path(tree0, p), str)]
    replacements = {
        "nan": float("nan"), "inf": float("inf"), "-inf": float("-inf"), "1e308": 1e308, "-1e308": -1e308,
        "1e200": 1e200, "1e-200": 1e-200, "5e-324": 5e-324, "0": 0.0, "-0": -0.0, "negated": None,
        "1e6x": None, "1e-6x": None, "1e12x": None, "1e-12x": None, "int-huge": 10**30, "true": True,
        "string-number": "1.0", "string-unit": "12 kg", "empty-string": "", "list": [1.0, 2.0],
        "inline-table": {"value": 1.0}, "string-nan": "NaN", "date-like": "2024-01-01",
    }
    text_values = {"number": 3, "float": 2.5, "list": ["a"], "empty": "", "blank": "   ", "bool": False,
                   "table": {"a": 1}, "newline": "line one\nline two", "nul": "a\x00b", "long": "x" * 5000,
                   "nan-word": "nan"}

    def tree_mutant(kind):
        tree = base_tree()
        if kind == "number":
            path = rng.choice(numbers)
            name, value = rng.choice(list(replacements.items()))
            old = get_path(tree, path)
            if name == "negated":
                value = -old
            elif name.endswith("x"):
                value = old * float(name[:-1])
            set_path(tree, path, value)
            return f"{'.'.join(map(str, path))}={name}", tree
        if kind == "text":
            path = rng.choice(texts)
            name, value = rng.choice(list(text_values.items()))
            set_path(tree, path, value)
            return f"{'.'.join(map(str, path))}={name}", tree
        if kind == "delete":
            path = rng.choice(paths)
            delete_path(tree, path)
            return f"delete {'.'.join(map(str, path))}", tree
        if kind == "retype-key":
            path = rng.choice(paths)
            container = get_path(tree, path[:-1])
            value = container.pop(path[-1])
            key = str(path[-1])
            new = rng.choice([key.upper(), key + "_", key[:-1] or "k", key.replace("_", "-"), " " + key, key + "\u200b"])
            container[new] = value
            return f"rename {'.'.join(map(str, path))}", tree
        if kind == "unknown-key":
            table = get_path(tree, rng.choice(paths)[:-1])
            table[rng.choice(["colour", "Cn_betta", "mass2", "extends_", "units"])] = 1.0
            return "unknown key", tree
        if kind == "structure":
            choice = rng.choice(["condition-table", "no-conditions", "empty-condition", "duplicate-condition",
                                 "derivatives-list", "mass-scalar", "engine-table", "controls-string"])
            if choice == "condition-table":
                tree["condition"] = tree["condition"][0]
            elif choice == "no-conditions":
                tree["condition"] = []
            elif choice == "empty-condition":
                tree["condition"].append({})
            elif choice == "duplicate-condition":
                tree["condition"].append(dict(tree["condition"][0]))
            elif choice == "derivatives-list":
                tree["condition"][0]["derivatives"] = [1, 2]
            elif choice == "mass-scalar":
                tree["mass"] = 6800.0
            elif choice == "engine-table":
                tree["engine"] = tree["engine"][0]
            else:
                tree["controls"] = "full"
            return f"structure {choice}", tree
        raise ValueError(kind)

    def text_mutant():
        choice = rng.choice(["truncate", "delete-char", "insert-char", "duplicate-line", "bom", "utf16",
                             "nul", "latin1", "crlf", "empty", "comment-only", "binary", "huge", "unclosed"])
        text = base_text
        lines = text.splitlines(keepends=True)
        if choice == "truncate":
            return choice, text[: rng.randrange(len(text))]
        if choice == "delete-char":
            i = rng.randrange(len(text))
            return choice, text[:i] + text[i + 1:]
        if choice == "insert-char":
            i = rng.randrange(len(text))
            return choice, text[:i] + rng.choice(["[", "]", '"', "=", "{", "\\", "\n=\n", "'''"]) + text[i:]
        if choice == "duplicate-line":
            candidates = [i for i, line in enumerate(lines) if "=" in line]
            i = rng.choice(candidates)
            return choice, "".join(lines[: i + 1] + [lines[i]] + lines[i + 1:])
        if choice == "bom":
            return choice, "\ufeff" + text
        if choice == "utf16":
            return choice, text.encode("utf-16")
        if choice == "nul":
            i = rng.randrange(len(text))
            return choice, (text[:i] + "\x00" + text[i:]).encode()
        if choice == "latin1":
            return choice, text.replace("Kestrel", "Kestrel \xe9").encode("latin-1", "replace")
        if choice == "crlf":
            return choice, text.replace("\n", "\r\n")
        if choice == "empty":
            return choice, ""
        if choice == "comment-only":
            return choice, "# nothing here\n"
        if choice == "binary":
            return choice, bytes(rng.randrange(256) for _ in range(512))
        if choice == "huge":
            return choice, text + "# " + "x" * 80 + "\n" * 1
        return choice, text + '\nname = """never closed\n'

    def extends_mutant():
        choice = rng.choice(["self", "cycle", "missing", "directory", "fifo", "dev-zero", "number", "empty",
                             "chain-40", "absolute-ok", "dev-null", "url"])
        base = BASE_AIRCRAFT.read_text(encoding="utf-8")
        variant = 'name = "variant"\n[mass]\nmass = 7000.0\n'
        if choice == "self":
            return choice, {"main.toml": 'extends = "main.toml"\n' + variant}
        if choice == "cycle":
            return choice, {"main.toml": 'extends = "b.toml"\n' + variant, "b.toml": 'extends = "main.toml"\n' + variant}
        if choice == "missing":
            return choice, {"main.toml": 'extends = "nowhere.toml"\n' + variant}
        if choice == "directory":
            return choice, {"main.toml": 'extends = "sub"\n' + variant, "sub/": None}
        if choice == "fifo":
            return choice, {"main.toml": 'extends = "pipe.toml"\n' + variant, "pipe.toml": "FIFO"}
        if choice == "dev-zero":
            return choice, {"main.toml": 'extends = "/dev/zero"\n' + variant}
        if choice == "dev-null":
            return choice, {"main.toml": 'extends = "/dev/null"\n' + variant}
        if choice == "number":
            return choice, {"main.toml": "extends = 42\n" + variant}
        if choice == "empty":
            return choice, {"main.toml": 'extends = ""\n' + variant}
        if choice == "url":
            return choice, {"main.toml": 'extends = "http://example.invalid/a.toml"\n' + variant}
        if choice == "absolute-ok":
            return choice, {"main.toml": f"extends = {_toml_string(str(BASE_AIRCRAFT))}\n" + variant}
        files = {"main.toml": 'extends = "c1.toml"\n' + variant, "c40.toml": base}
        for i in range(1, 40):
            files[f"c{i}.toml"] = f'extends = "c{i + 1}.toml"\n'
        return choice, files

    kinds = ["number"] * 5 + ["text"] * 2 + ["delete"] * 2 + ["retype-key", "unknown-key", "structure"] + \
        ["text-level"] * 2 + ["extends"]
    for index in range(count):
        kind = rng.choice(kinds)
        if kind == "text-level":
            label, text = text_mutant()
            yield f"text {label}", {"main.toml": text}
        elif kind == "extends":
            label, files = extends_mutant()
            yield f"extends {label}", files
        else:
            label, tree = tree_mutant(kind)
            yield label, {"main.toml": toml_text(tree) + "\n"}


def _place(sandbox, files):
    for name, content in files.items():
        path = sandbox.inputs / name
        if name.endswith("/"):
            path.mkdir()
        elif content == "FIFO":
            os.mkfifo(path)
        else:
            sandbox.write(name, content)
    shutil.copy(RECORD, sandbox.inputs / "record.csv")
    return sandbox.inputs / "main.toml"


NUMBER_TEXT = re.compile(r"(?<![\w.])-?\d+\.?\d*(?:[eE][-+]?\d+)?(?![\w.])")
NASTY_NUMBERS = ["nan", "inf", "-inf", "1e308", "-1e308", "1e-320", "0", "-0.0", "1e200", "-1e200", '"1.0"',
                 "true", "[]", "{}", '""', "1e6", "-1", "99999999999999999999999999"]
NASTY_CSV = ["nan", "inf", "-inf", "1e308", "", "x", "1,2", "0", "-0", "1e-320", "\x00", "=cmd", '"5"', "1e400"]


def text_mutation(text, rng, csv=False):
    """One mutation of a text file (a number replaced, a line deleted or duplicated, a cut)."""
    lines = text.splitlines(keepends=True)
    choice = rng.choice(["number", "number", "number", "delete-line", "duplicate-line", "truncate", "swap-lines"])
    if choice == "number":
        spans = [m.span() for m in NUMBER_TEXT.finditer(text) if not text[max(0, m.start() - 1)] == "#"]
        if spans:
            start, end = rng.choice(spans)
            token = rng.choice(NASTY_CSV if csv else NASTY_NUMBERS)
            return f"number->{token}", text[:start] + token + text[end:]
        choice = "delete-line"
    if choice == "delete-line":
        i = rng.randrange(len(lines))
        return "delete-line", "".join(lines[:i] + lines[i + 1:])
    if choice == "duplicate-line":
        i = rng.randrange(len(lines))
        return "duplicate-line", "".join(lines[:i + 1] + [lines[i]] + lines[i + 1:])
    if choice == "swap-lines" and len(lines) > 2:
        i = rng.randrange(len(lines) - 1)
        lines[i], lines[i + 1] = lines[i + 1], lines[i]
        return "swap-lines", "".join(lines)
    return "truncate", text[: rng.randrange(1, len(text))]


INPUT_CSV = "time,aileron,rudder\n0,0,0\n1,0,2\n2,0,-2\n3,1,0\n4,0,0\n"
DOCUMENT = 'title = "Lateral study"\nnumber = "NRA-1"\nrevision = "A"\ndate = 2026-12-02\nprepared = "A. Person"\n'
UNCERTAINTY = "\n[uncertainty.Cn_beta]\nrelative = 0.1\n\n[uncertainty.Cl_p]\nabsolute = 0.05\ndistribution = \"uniform\"\n"


def other_mutants(rng, count):
    """(label, files, argv template) of mutated criteria files, CSV inputs, flight records, document files,
    variant files, [uncertainty] tables and files with several mutations at once."""
    criteria = CRITERIA.read_text(encoding="utf-8")
    record = RECORD.read_text(encoding="utf-8")
    base = BASE_AIRCRAFT.read_text(encoding="utf-8")
    variant = VARIANT_AIRCRAFT.read_text(encoding="utf-8").replace("kestrel-k40.toml", "base.toml")
    for index in range(count):
        family = ["criteria", "input-csv", "record", "document", "variant", "uncertainty", "multiple"][index % 7]
        if family == "criteria":
            label, text = text_mutation(criteria, rng)
            files = {"main.toml": base, "crit.toml": text}
            argv = rng.choice([["assess", "IN/main.toml", "--criteria", "INPUTS/crit.toml", "--format", "json"],
                               ["sweep", "IN/main.toml", "--vary", "Cn_r=-0.2:-0.05:4", "--criteria", "INPUTS/crit.toml",
                                "--format", "json"],
                               ["uncertainty", "IN/main.toml", "--samples", "300", "--seed", "1", "--criteria",
                                "INPUTS/crit.toml", "--format", "json"],
                               ["compare", "IN/main.toml", "IN/main.toml", "--criteria", "INPUTS/crit.toml", "--format", "json"]])
        elif family == "input-csv":
            label, text = text_mutation(INPUT_CSV, rng, csv=True)
            files = {"main.toml": base, "input.csv": text}
            argv = ["respond", "IN/main.toml", "--input", "INPUTS/input.csv", "--format", "json", "--csv", "OUT/r.csv"]
        elif family == "record":
            label, text = text_mutation(record, rng, csv=True)
            files = {"main.toml": base, "flight.csv": text}
            argv = ["identify", "IN/main.toml", "--condition", "cruise", "--data", "INPUTS/flight.csv", "--method",
                    rng.choice(["equation-error", "output-error"]), "--format", "json", "-o", "OUT/id.toml"]
        elif family == "document":
            label, text = text_mutation(DOCUMENT, rng)
            one = base_tree()
            one["condition"] = one["condition"][:1]
            files = {"main.toml": toml_text(one) + "\n", "doc.toml": text}
            argv = ["report", "IN/main.toml", "--document", "INPUTS/doc.toml", "-o", "OUT/rep"]
        elif family == "variant":
            label, text = text_mutation(variant, rng)
            files = {"base.toml": base, "main.toml": text}
            argv = rng.choice([["compare", "INPUTS/base.toml", "IN/main.toml", "--format", "json"],
                               ["modes", "IN/main.toml", "--json"], ["assess", "IN/main.toml", "--format", "json"]])
        elif family == "uncertainty":
            label, text = text_mutation(base + UNCERTAINTY, rng)
            files = {"main.toml": text}
            argv = ["uncertainty", "IN/main.toml", "--samples", "500", "--seed", "4", "--format", "json"]
        else:
            text = base
            labels = []
            for _ in range(rng.randint(2, 4)):
                label, text = text_mutation(text, rng)
                labels.append(label)
            label = "+".join(labels)
            files = {"main.toml": text}
            argv = rng.choice([["modes", "IN/main.toml", "--json"], ["assess", "IN/main.toml", "--format", "json"],
                               ["steady", "IN/main.toml", "--format", "json"],
                               ["respond", "IN/main.toml", "--format", "json", "--condition", "all"],
                               ["sensitivity", "IN/main.toml", "--format", "json"]])
        yield f"{family} {label}", files, argv


def mutated(campaign, count):
    rng = random.Random(campaign.seed * 1000 + 1)
    for index, (label, files) in enumerate(_mutants(rng, count)):
        for command, argv, is_json in commands_for("IN/main.toml", _Fake(), rng, heavy=index % 4 == 0):
            def build(sandbox, files=files, argv=argv, is_json=is_json, command=command, label=label):
                path = _place(sandbox, files)
                argv = [str(path) if a == "IN/main.toml" else a.replace("OUT", str(sandbox.out)).replace(
                    "INPUTS", str(sandbox.inputs)) for a in argv]
                return Attempt("mutated", f"{label} | {command}", argv, sandbox, formats_json=is_json, timeout=90)
            campaign.attempt(build)
    for label, files, argv in other_mutants(rng, count * 2):
        def build(sandbox, files=files, argv=argv, label=label):
            path = _place(sandbox, files)
            argv = [str(path) if a == "IN/main.toml" else a.replace("OUT", str(sandbox.out)).replace(
                "INPUTS", str(sandbox.inputs)) for a in argv]
            return Attempt("mutated", f"{label} | {argv[0]}", argv, sandbox, formats_json="json" in argv, timeout=120)
        campaign.attempt(build)


class _Fake:
    """Placeholder sandbox for building argument templates before the real one exists."""
    out = pathlib.PurePosixPath("OUT")
    inputs = pathlib.PurePosixPath("INPUTS")


# --- numerically nasty but valid aircraft --------------------------------------------------------

DIMENSIONAL = {"Y_v": -0.357, "L_beta": -12.4, "L_p": -2.54, "L_r": -0.184, "N_beta": 10.4, "N_p": 0.0129,
               "N_r": -0.576, "L_da": 35.2, "L_dr": 5.87, "N_da": 1.59, "N_dr": -5.81, "Y_da": -15.2892,
               "Y_dr": 76.446}  # NASA CR-2144, rocket-powered research airplane at M 0.5 (body axes, primed, US)


def _dimensional_aircraft(values, speed=558.0, alpha=4.0, name="numeric case"):
    lines = [f"name = {_toml_string(name)}", 'units = "US"', "", "[[condition]]", 'name = "case"',
             "altitude = 0.0", f"speed = {speed!r}", f"alpha_deg = {alpha!r}", "[condition.dimensional]",
             'axes = "body"', "primed = true"]
    lines += [f"{key} = {value!r}" for key, value in values.items()]
    return "\n".join(lines) + "\n"


def _coefficient_aircraft(changes):
    tree = base_tree()
    tree["condition"] = [tree["condition"][1]]
    for path, value in changes.items():
        set_path(tree, path, value)
    return toml_text(tree) + "\n"


def _numeric_cases(rng, count):
    cases = []
    for k in range(1, 14):  # Ixz^2 -> Ixx Izz
        ixx, izz = 32000.0, 61000.0
        cases.append((f"Ixz^2 = Ixx Izz (1 - 1e-{k})",
                      _coefficient_aircraft({("mass", "Ixz"): math.sqrt(ixx * izz * (1 - 10.0 ** -k))})))
    for k in range(-1, 7):  # speeds -> 0 (file units ft/s)
        cases.append((f"speed 1e-{k} ft/s", _dimensional_aircraft(DIMENSIONAL, speed=10.0 ** -k)))
    for k in range(0, 7):
        cases.append((f"coefficient model speed 1e-{k} m/s", _coefficient_aircraft({("condition", 0, "speed"): 10.0 ** -k})))
    for key in ("L_p", "N_r", "L_beta", "N_beta", "Y_v", "L_r", "N_p"):
        for k in (-8, -4, 4, 6, 8):
            values = dict(DIMENSIONAL)
            values[key] = DIMENSIONAL[key] * 10.0 ** k
            cases.append((f"{key} x 1e{k}", _dimensional_aircraft(values)))
    while len(cases) < count:
        values = {key: math.copysign(10.0 ** rng.uniform(-8, 5.9), rng.choice([-1, 1]) if key not in ("L_p", "N_r") else -1)
                  for key in DIMENSIONAL}
        cases.append(("entries over 16 orders", _dimensional_aircraft(values, speed=10.0 ** rng.uniform(-2, 3))))
    return cases[:count] if count < len(cases) else cases


def _reference_roots(path):
    """numpy.linalg.eig of the model's state matrix (built by the library), with the balanced norm."""
    sys.path.insert(0, str(ROOT))
    import numpy as np
    import scipy.linalg

    from latdyn.aircraft import load_aircraft
    from latdyn.augmentation import condition_model

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        aircraft = load_aircraft(path)
    condition = aircraft.conditions[0]
    A = np.asarray(condition_model(aircraft, condition).A, dtype=float)[:4, :4]
    balanced, _ = scipy.linalg.matrix_balance(A)
    return np.linalg.eigvals(A), float(np.linalg.norm(balanced, 2))


def _roots_check(path):
    def check(attempt, result):
        if result.status != 0:
            return []
        import numpy as np

        try:
            document = json.loads(result.stdout)
            roots = [complex(*pair) for c in document["conditions"] for mode in c["modes"]
                     for pair in mode.get("eigenvalues") or []]
        except (ValueError, KeyError, TypeError):
            return []
        try:
            reference, norm = _reference_roots(path)
        except Exception as error:  # noqa: BLE001 - the library refusing is the command's business
            return []
        if len(roots) != len(reference):
            return [("wrong root", f"{len(roots)} roots instead of {len(reference)}")]
        if _compare_roots(roots, list(reference), norm) > 1.0:
            return [("wrong root", "find_modes differs from numpy.linalg.eig")]
        return []
    return check


def _compare_roots(roots, reference, norm):
    """The worst mismatch of two root sets, in units of the tolerance (> 1: a wrong root)."""
    if len(roots) != len(reference):
        return math.inf
    return min(max(abs(r - q) / (1e-6 * abs(q) + 1e-9 * norm + 1e-300) for r, q in zip(perm, reference))
               for perm in itertools.permutations(roots))


def _point_roots(point):
    """The four roots of a sweep point from its figures (Dutch roll pair, roll and spiral), or None."""
    frequency, damping = point.get("dutch_roll_frequency"), point.get("dutch_roll_damping")
    roll, spiral = point.get("roll_root"), point.get("spiral_root")
    if None in (frequency, damping, roll, spiral) or abs(damping) >= 1:
        return None
    real, imaginary = -damping * frequency, frequency * math.sqrt(1 - damping * damping)
    return [complex(real, imaginary), complex(real, -imaginary), complex(roll), complex(spiral)]


def _sweep_roots_check(text, key, values):
    """The batched solver of a sweep against numpy.linalg.eig at every point (the file rebuilt with the
    point's value)."""
    def check(attempt, result):
        if result.status != 0:
            return []
        try:
            points = json.loads(result.stdout)["conditions"][0]["points"]
        except (ValueError, KeyError, IndexError, TypeError):
            return []
        failures = []
        for point, value in zip(points, values):
            roots = _point_roots(point)
            if roots is None:
                continue
            path = attempt.sandbox.inputs / "point.toml"
            path.write_text(re.sub(rf"^{key} = .*$", f"{key} = {value!r}", text, flags=re.MULTILINE))
            try:
                reference, norm = _reference_roots(path)
            except Exception:  # noqa: BLE001 - a point the loader refuses
                continue
            if _compare_roots(roots, list(reference), norm) > 1e3:  # figures carry a few more roundings
                failures.append(("wrong root", "sweep (batched solver) differs from numpy.linalg.eig"))
                break
        return failures
    return check


def numeric(campaign, count):
    rng = random.Random(campaign.seed * 1000 + 2)
    for index, (label, text) in enumerate(_numeric_cases(rng, count)):
        def build(sandbox, text=text, label=label):
            path = sandbox.write("main.toml", text)
            return Attempt("numeric", f"{label} | modes", ["modes", str(path), "--json"], sandbox,
                           formats_json=True, post=_roots_check(path))
        campaign.attempt(build)
        if "\nL_p = " in text and index % 2 == 0:  # a dimensional model: sweep one of its entries
            key = rng.choice(["L_p", "N_r", "L_beta", "N_beta", "N_p", "L_r"])
            value = float(re.search(rf"^{key} = (.*)$", text, re.MULTILINE).group(1))
            values = [value * f for f in (0.5, 0.875, 1.25, 1.625, 2.0)]

            def build3(sandbox, text=text, label=label, key=key, values=values):
                path = sandbox.write("main.toml", text)
                return Attempt("numeric", f"{label} | sweep {key}", ["sweep", str(path), "--vary",
                               f"{key}={values[0]!r}:{values[-1]!r}:{len(values)}", "--format", "json"], sandbox,
                               formats_json=True, post=_sweep_roots_check(text, key, values))
            campaign.attempt(build3)
        if index % 3 == 0:
            other = rng.choice([["assess", "--format", "json"], ["respond", "--format", "json"],
                                ["sensitivity", "--format", "json"], ["steady", "--format", "json"],
                                ["turbulence", "--sigma-v", "1", "--scale-length", "530", "--format", "json"]])

            def build2(sandbox, text=text, label=label, other=other):
                path = sandbox.write("main.toml", text)
                return Attempt("numeric", f"{label} | {other[0]}", [other[0], str(path), *other[1:]], sandbox,
                               formats_json=True)
            campaign.attempt(build2)


# --- abusive command lines --------------------------------------------------------------------

OPTIONS = {
    "modes": {"--condition": ["cruise", "", "nope", "all"], "--format": ["json", "csv", "xml", ""], "--json": None,
              "--units": ["US", "SI", "si", ""], "--shapes": None},
    "assess": {"--criteria": ["mil-f-8785c", "14cfr23-181", "nonesuch", "", ",", "mil-f-8785c,14cfr25-181"],
               "--format": ["json", "markdown", "csv"], "--condition": ["approach", "x"],
               "--flight-phase": ["approach=combat", "cruise=", "=x", "x", "approach=PA", "climb=combat"],
               "-o": ["OUT", "OUT/missing", "", "INPUTS/main.toml"], "--fail-below": ["1", "2", "4", "0", "x", "-1"]},
    "respond": {"--condition": ["cruise", "all", "x"], "--input": ["aileron-step", "rudder-step", "none", "bogus", "",
                                                                   "INPUTS/record.csv", "INPUTS/main.toml"],
                "--amplitude-deg": ["5", "0", "-5", "1e300", "nan", "x", "inf"],
                "--half-period": ["1", "0", "-1", "1e9", "nan"], "--start": ["0", "-1", "1e9", "nan"],
                "--duration": ["10", "0", "-5", "1e7", "inf", "1e-9"], "--dt": ["0.01", "0", "-0.1", "1e-7", "100", "nan"],
                "--spiral": None, "--beta0-deg": ["1", "nan", "1e308", "91"], "--phi0-deg": ["5", "inf"],
                "--p0-deg-s": ["1", "-1e300"], "--r0-deg-s": ["1", "x"],
                "-o": ["OUT/a.png", "OUT/a.csv", "OUT/a.docx", "OUT", "", "INPUTS/main.toml"],
                "--csv": ["OUT/a.csv", "OUT/a.png", "OUT/missing/a.csv"], "--plot": ["OUT/p.svg", "OUT/p"],
                "--bode": ["OUT/b.png", "OUT/b.xyz"], "--transfer-functions": None,
                "--format": ["json", "csv", "table", "markdown"], "--units": ["US"]},
    "sweep": {"--vary": ["Cn_beta=0.05:0.2:5", "mass=5000:9000:3", "Cn_beta=0.2:0.05:3", "Cn_beta=0:1:1",
                         "Cn_beta=0:1:0", "Cn_beta=0:1:-3", "Cn_beta=0:1:100000000", "mass=-1:1:3", "speed=0:100:3",
                         "density=-1:1:3", "alpha_deg=80:95:3", "Ixz=0:1e9:3", "bogus=0:1:3", "Cn_beta", "Cn_beta=a:b:c",
                         "Cn_beta=nan:1:3", "Cn_beta=0:inf:3", "=0:1:2", "Cn_beta=1e300:1e308:3",
                         "fin.area_ratio=-1:1:3", "altitude=-10000:100000:3", "Cn_r=-1e200:1e200:3"],
              "--condition": ["cruise", "x"], "--roll-performance": None, "--criteria": ["14cfr25-181", "x"],
              "--format": ["json", "csv"], "-o": ["OUT/s.png", "OUT/s.txt", "INPUTS/main.toml"]},
    "sensitivity": {"--condition": ["cruise", "x"], "--format": ["json", "csv", "markdown"], "--top": ["3", "0", "-1", "x", "99999999999"],
                    "--units": ["US", "SI"]},
    "uncertainty": {"--samples": ["200", "0", "-5", "1", "x", "2", "1e3"], "--seed": ["1", "-1", "x", "99999999999999999999999"],
                    "--vary": ["Cn_beta=±10%", "Cn_beta=+-0.01,uniform", "Cn_beta=±1e308", "mass=±200%", "Ixz=±1e9",
                               "Cn_r=±1e308", "bogus=±1%", "Cn_beta=10%", "Cn_beta=±-5%", "Cn_beta=±nan", "Cn_beta=±10%,weird"],
                    "--condition": ["cruise"], "--roll-performance": None, "--format": ["json", "csv"],
                    "-o": ["OUT/u.png", "OUT/u.pdf", "OUT/missing/u.png"]},
    "steady": {"--condition": ["approach", "x"], "--sideslip-deg": ["10", "0", "-90", "89.9", "90", "nan", "1e300"],
               "--bank-deg": ["5", "90", "-89", "inf"], "--roll-fraction": ["0.75", "0", "1.5", "-1", "nan"],
               "--format": ["json", "csv"], "--plot": ["OUT/st.png", "OUT/st.bad"]},
    "turbulence": {"--sigma-v": ["1", "0", "-1", "1e300", "nan"], "--scale-length": ["530", "0", "-5", "inf"],
                   "--sigma-w": ["1", "-1"], "--scale-length-w": ["100", "0"], "--no-rotary": None,
                   "--condition": ["cruise", "x"], "--format": ["json", "csv"], "-o": ["OUT/t.png", "OUT/t"],
                   "--csv": ["OUT/t.csv"], "--duration": ["10", "0", "-1", "1e9"], "--dt": ["0.02", "0", "1e-9", "5"],
                   "--seed": ["1", "-1", "x"]},
    "compare": {"--criteria": ["mil-f-8785c", "x"], "--format": ["json", "csv"], "--fail-below": ["1", "3", "9"],
                "--units": ["US"]},
    "estimate": {"--condition": ["cruise"], "--format": ["json"], "-o": ["OUT/e.toml", "INPUTS/main.toml", "OUT/e.txt"]},
}
REQUIRED = {"sweep": ["--vary"], "turbulence": ["--sigma-v", "--scale-length"], "uncertainty": ["--vary"]}
SINGLE_FILE = {"sweep", "sensitivity", "uncertainty", "turbulence"}


def _cli_argv(rng, command):
    spec = OPTIONS[command]
    names = list(spec)
    chosen = rng.sample(names, k=rng.randint(0, min(4, len(names))))
    for required in REQUIRED.get(command, []):
        if required not in chosen and rng.random() < 0.9:
            chosen.append(required)
    words = []
    abuse = []
    for name in chosen:
        values = spec[name]
        repeat = 2 if rng.random() < 0.15 else 1
        for _ in range(repeat):
            if values is None:
                words.append([name])
                continue
            value = rng.choice(values)
            roll = rng.random()
            if roll < 0.05:
                words.append([name])  # missing value
                abuse.append("missing value")
            elif roll < 0.1:
                words.append([f"{name}={value}"] if name.startswith("--") else [name + value])
            else:
                words.append([name, value])
    if rng.random() < 0.1:
        words.append([rng.choice(["--bogus", "-x", "--", "---", "--format=", "-"])])
        abuse.append("unknown")
    if command == "uncertainty" and not any(w[0] == "--samples" for w in words):
        words.append(["--samples", "300"])
    if command == "uncertainty" and not any(w[0] == "--seed" for w in words):
        words.append(["--seed", "2"])
    files = ["FILE"] if command in SINGLE_FILE else (["BASE", "FILE"] if command == "compare" else
                                                     rng.choice([["FILE"], ["FILE", "FILE2"], ["FILE"]]))
    if rng.random() < 0.05:
        files = rng.choice([[], ["", "FILE"], ["FILE", "FILE", "FILE"], ["INPUTS/missing.toml"], ["INPUTS"]])
    for f in files:
        words.insert(rng.randint(0, len(words)), [f])
    return [command] + [w for group in words for w in group]


def cli(campaign, count):
    rng = random.Random(campaign.seed * 1000 + 3)
    commands = list(OPTIONS)
    for index in range(count):
        command = commands[index % len(commands)]
        template = _cli_argv(rng, command)

        def build(sandbox, template=template):
            main = sandbox.write("main.toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            second = sandbox.write("second.toml", VARIANT_AIRCRAFT.read_text(encoding="utf-8").replace(
                "kestrel-k40.toml", "main.toml"))
            shutil.copy(RECORD, sandbox.inputs / "record.csv")
            subs = {"FILE": str(main), "FILE2": str(second), "BASE": str(main)}
            argv = [subs.get(a, a.replace("OUT", str(sandbox.out)).replace("INPUTS", str(sandbox.inputs)))
                    for a in template]
            is_json = "json" in argv and "csv" not in argv
            return Attempt("cli", " ".join(template)[:160], argv, sandbox, formats_json=is_json, timeout=90)
        campaign.attempt(build)


# --- faults ---------------------------------------------------------------------------------------

def _unshare_available():
    try:
        return subprocess.run(["unshare", "-rm", "true"], capture_output=True, timeout=10).returncode == 0
    except (OSError, subprocess.TimeoutExpired):
        return False


def _mounted(sandbox, options, argv_template, listing_name):
    """A shell line running latdyn with out/mnt a tmpfs mounted with ``options`` in a private namespace."""
    mount = sandbox.out / "mnt"
    mount.mkdir()
    argv = [a.replace("MNT", str(mount)) for a in argv_template]
    inner = (f"mount -t tmpfs -o {options} none {mount} && "
             + ("" if "ro" in options.split(",") else "")
             + " ".join(map(_shell_quote, [PYTHON, "-m", "latdyn", *argv]))
             + f"; status=$?; find {mount} -mindepth 1 > {_shell_quote(str(sandbox.root / listing_name))}; exit $status")
    return ["unshare", "-rm", "sh", "-c", inner]


def _shell_quote(word):
    return "'" + word.replace("'", "'\\''") + "'"


def _report_complete(folder):
    manifest = folder / ".latdyn-report.json"
    if not manifest.is_file():
        return False
    try:
        files = json.loads(manifest.read_text())["files"]
    except (ValueError, KeyError):
        return False
    return all((folder / name).is_file() and (folder / name).stat().st_size > 0 for name in files)


def faults(campaign, count):
    rng = random.Random(campaign.seed * 1000 + 4)
    setups = []
    # a device as the output (a character device made inside the sandbox: never /dev itself)
    for option_argv in (["respond", "FILE", "--csv", "OUT/full.csv"], ["respond", "FILE", "--plot", "OUT/full.csv"],
                        ["modes", "FILE"]):
        setups.append(("device output", option_argv))
    setups += [("missing folder", ["respond", "FILE", "--csv", "OUT/missing/r.csv"]),
               ("missing folder", ["report", "FILE", "-o", "OUT/missing/sub/rep"]),
               ("missing folder", ["assess", "FILE", "-o", "OUT/missing"]),
               ("missing folder", ["sweep", "FILE", "--vary", "Cn_beta=0.1:0.2:3", "-o", "OUT/missing/s.png"]),
               ("full stdout", ["modes", "FILE", "--json"]), ("full stdout", ["assess", "FILE"]),
               ("full stdout", ["uncertainty", "FILE", "--samples", "300", "--seed", "1", "--vary", "Cn_r=±20%", "--format", "csv"]),
               ("closed stdout", ["modes", "FILE", "--json"]), ("closed stdout", ["respond", "FILE", "--format", "csv"]),
               ("closed stdout", ["sweep", "FILE", "--vary", "Cn_beta=0.05:0.2:40", "--format", "csv"])]
    if campaign.unshare:
        for options in ("ro,size=1m", "size=16k", "size=200k"):
            setups += [(f"tmpfs {options}", ["respond", "FILE", "--csv", "MNT/r.csv"]),
                       (f"tmpfs {options}", ["report", "FILE", "-o", "MNT/rep"]),
                       (f"tmpfs {options}", ["assess", "FILE", "-o", "MNT"]),
                       (f"tmpfs {options}", ["turbulence", "FILE", "--sigma-v", "1", "--scale-length", "500",
                                             "--csv", "MNT/t.csv"])]
    for kind, template in setups:
        def build(sandbox, kind=kind, template=template):
            main = sandbox.write("main.toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            argv = [str(main) if a == "FILE" else a.replace("OUT", str(sandbox.out)) for a in template]
            attempt = Attempt("faults", f"{kind} | {' '.join(template)}", argv, sandbox, timeout=120,
                              expect_failure_exit=(141,))
            if kind == "device output":
                device = sandbox.out / "full.csv"
                try:
                    os.mknod(device, stat.S_IFCHR | 0o666, os.makedev(1, 7))
                except PermissionError:
                    os.mkfifo(device)
                if template[0] == "modes":
                    attempt.argv = argv + ["--json"]
                    attempt.stdout = open(device, "wb")  # noqa: SIM115 - a /dev/full twin
                    attempt.label = "device output | modes > full"
            elif kind == "closed stdout":
                attempt.close_stdout = True
            elif kind == "full stdout":
                attempt.stdout = open("/dev/full", "wb")  # noqa: SIM115 - read only by the child
            elif kind.startswith("tmpfs"):
                attempt.argv = None
                attempt.shell = _mounted(sandbox, kind.split()[1], argv, "listing")
            return attempt
        campaign.attempt(build, special=kind)
    # signals during writing
    moments = [0.4, 1.0, 2.0, 3.5, 5.0, 8.0]
    commands = [["report", "FILE", "-o", "OUT/rep"], ["report", "FILE", "-o", "OUT/old", "--force"],
                ["respond", "FILE", "--condition", "all", "--plot", "OUT/r.png", "--csv", "OUT/r.csv"],
                ["sweep", "FILE", "--vary", "Cn_beta=0.05:0.2:30", "--vary", "Cn_r=-0.2:-0.05:30", "-o", "OUT/s.png"],
                ["uncertainty", "FILE", "--samples", "20000", "--seed", "1", "--vary", "Cn_r=±20%", "-o", "OUT/u.png"]]
    _concurrent_writers(campaign, max(3, count // 4))
    for index in range(count):
        template = commands[index % len(commands)]
        moment = moments[(index // len(commands)) % len(moments)] * rng.uniform(0.8, 1.2)
        number = signal.SIGTERM if index % 2 == 0 else signal.SIGINT

        def build(sandbox, template=template, moment=moment, number=number):
            main = sandbox.write("main.toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            argv = [str(main) if a == "FILE" else a.replace("OUT", str(sandbox.out)) for a in template]
            attempt = Attempt("faults", f"{number.name} at {moment:.1f} s | {template[0]}{' --force' if '--force' in template else ''}",
                              argv, sandbox, timeout=180, expect_failure_exit=(128 + number,),
                              replaceable=[sandbox.out / "old"] if "--force" in template else ())
            if "--force" in template:
                old = campaign.old_report(sandbox.out / "old")
                attempt.post = _signal_check(sandbox.out / "old", old)

            def action(process, moment=moment, number=number):
                time.sleep(moment)
                with contextlib.suppress(ProcessLookupError):
                    os.kill(process.pid, number)
            attempt.action = action
            return attempt
        campaign.attempt(build)


def _concurrent_writers(campaign, count):
    """Two runs writing one new path at once: one wins, the other exits 2 with one line; the result is whole."""
    commands = [["report", "FILE", "-o", "OUT/rep"], ["report", "FILE", "-o", "OUT/rep", "--force"],
                ["respond", "FILE", "--csv", "OUT/r.csv", "--plot", "OUT/r.png"]]
    for index in range(count):
        template = commands[index % len(commands)]

        def build(sandbox, template=template):
            main = sandbox.write("main.toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            argv = [str(main) if a == "FILE" else a.replace("OUT", str(sandbox.out)) for a in template]
            attempt = Attempt("faults", f"two writers | {' '.join(template)}", argv, sandbox, timeout=240)
            attempt.shared_output = True
            other = {}

            def action(process, argv=argv, sandbox=sandbox):
                second = subprocess.Popen([PYTHON, "-m", "latdyn", *argv], cwd=sandbox.work, env=child_env(sandbox),
                                          stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                                          preexec_fn=_limit_memory)
                try:
                    _, err = second.communicate(timeout=240)
                except subprocess.TimeoutExpired:
                    second.kill()
                    _, err = second.communicate()
                other.update(status=second.returncode, stderr=err.decode("utf-8", "replace"))

            def check(attempt, result, other=other, sandbox=sandbox, template=template):
                failures = []
                statuses = sorted([result.status, other.get("status")], key=str)
                if other.get("status") not in (0, 2) or "Traceback" in other.get("stderr", ""):
                    failures.append(("traceback" if "Traceback" in other.get("stderr", "") else "unexpected exit status",
                                     f"second writer {other.get('status')}"))
                elif other.get("status") == 2 and other["stderr"].count("\n") != 1:
                    failures.append(("multi-line stderr on refusal", "second writer"))
                if template[0] == "report":
                    if "--force" not in template and statuses != [0, 2]:
                        failures.append(("both concurrent writers succeeded" if statuses == [0, 0] else
                                         "unexpected exit status", f"{statuses}"))
                    if not _report_complete(sandbox.out / "rep"):
                        failures.append(("half-written output", "report of concurrent writers"))
                return failures
            attempt.action = action
            attempt.post = check
            return attempt
        campaign.attempt(build)


def _signal_check(folder, old_print):
    def check(attempt, result):
        if not folder.exists():
            return [("data loss", "old report gone after a signal")]
        if fingerprint(folder) == old_print:
            return []
        if _report_complete(folder):
            return []
        return [("half-written output", "report neither old nor complete")]
    return check


# --- determinism and locale ---------------------------------------------------------------------

NON_ASCII_NAME = "Kestrel K-40 \u00e9tude \u2014 \u00c5ngstr\u00f6m \u4e2d \U0001f6e9"


def determinism(campaign, count):
    runs = [["modes", "FILE", "--json"], ["modes", "FILE"], ["assess", "FILE", "--format", "markdown"],
            ["assess", "FILE", "-o", "OUT/plots"],
            ["respond", "FILE", "--csv", "OUT/r.csv", "--plot", "OUT/r.svg"],
            ["uncertainty", "FILE", "--samples", "2000", "--seed", "7", "--vary", "Cn_r=±20%", "--format", "json", "-o", "OUT/u.png"],
            ["turbulence", "FILE", "--sigma-v", "1", "--scale-length", "530", "--csv", "OUT/t.csv"],
            ["sweep", "FILE", "--vary", "Cn_beta=0.05:0.2:7", "--format", "csv", "-o", "OUT/s.png"],
            ["steady", "FILE", "--format", "csv", "--plot", "OUT/st.png"],
            ["report", "FILE", "-o", "OUT/rep"]]
    locales = [("utf-8", {}), ("C", {"LC_ALL": "C", "LANG": "C", "PYTHONUTF8": "0", "PYTHONCOERCECLOCALE": "0"}),
               ("POSIX ascii io", {"LC_ALL": "POSIX", "PYTHONIOENCODING": "ascii", "PYTHONUTF8": "0",
                                   "PYTHONCOERCECLOCALE": "0"})]
    for index in range(count):
        template = runs[index % len(runs)]
        name, env = locales[(index // len(runs)) % len(locales)]
        ascii_name = index % 2 == 0

        def build(sandbox, template=template, env=env, name=name, ascii_name=ascii_name):
            text = BASE_AIRCRAFT.read_text(encoding="utf-8")
            if not ascii_name:
                text = text.replace("Kestrel K-40 commuter (Northmoor Regional Air)", NON_ASCII_NAME)
            main = sandbox.write("main.toml", text)
            argv = [str(main) if a == "FILE" else a.replace("OUT", str(sandbox.out)) for a in template]
            if "OUT/plots" in template:
                (sandbox.out / "plots").mkdir()
            attempt = Attempt("determinism", f"{name} {'ascii' if ascii_name else 'non-ascii'} name | {' '.join(template)}",
                              argv, sandbox, env=env, timeout=180, formats_json="--json" in template or "json" in template,
                              names=(NON_ASCII_NAME,))
            attempt.repeat = True
            return attempt
        campaign.attempt(build)


# --- security -----------------------------------------------------------------------------------

HOSTILE = ["a/b", "../../escape", "..", "x\x00y", "A" * 300, "$\\frac{$", "$\\undefinedmacro$",
           "<script>alert(1)</script>", "=cmd|' /C calc'!A0", "\x1b[31mred\x1b[0m\x1b]0;title\x07", "line\nbreak",
           "/etc/passwd", "_hidden", "-rf", "\u202etxt.exe", "CON"]


def security(campaign, count):
    rng = random.Random(campaign.seed * 1000 + 6)
    writers = [["report", "FILE", "-o", "OUT/rep", "--criteria", "CRIT"],
               ["assess", "FILE", "-o", "OUT", "--criteria", "CRIT", "--format", "csv"],
               ["respond", "FILE", "--condition", "all", "--csv", "OUT/r.csv", "--plot", "OUT/r.png", "--bode", "OUT/b.png"],
               ["sweep", "FILE", "--vary", "Cn_beta=0.05:0.2:4", "-o", "OUT/s.png", "--criteria", "CRIT"],
               ["uncertainty", "FILE", "--samples", "300", "--seed", "1", "--vary", "Cn_r=±20%", "-o", "OUT/u.png", "--criteria", "CRIT"],
               ["turbulence", "FILE", "--sigma-v", "1", "--scale-length", "530", "-o", "OUT/t.png", "--csv", "OUT/t.csv"],
               ["steady", "FILE", "--plot", "OUT/st.png", "--format", "csv"],
               ["modes", "FILE"], ["assess", "FILE", "--format", "csv", "--criteria", "CRIT"],
               ["compare", "BASE", "FILE", "--format", "markdown"]]
    where = ["aircraft", "condition", "criteria", "description"]
    attempts = []
    for index in range(count):
        hostile = HOSTILE[index % len(HOSTILE)]
        place = where[(index // len(HOSTILE)) % len(where)]
        template = writers[rng.randrange(len(writers))]
        attempts.append((hostile, place, template))
    for hostile, place, template in attempts:
        def build(sandbox, hostile=hostile, place=place, template=template):
            tree = base_tree()
            if place == "aircraft":
                tree["name"] = hostile
            elif place == "condition":
                tree["condition"][0]["name"] = hostile
            elif place == "description":
                tree["condition"][0]["description"] = hostile
                tree["description"] = hostile
            main = sandbox.write("main.toml", toml_text(tree) + "\n")
            criteria = CRITERIA.read_text(encoding="utf-8")
            if place == "criteria":
                criteria = re.sub(r'^name = ".*"$', "name = " + _toml_string(hostile).replace("\\", "\\\\"), criteria,
                                  count=1, flags=re.MULTILINE)
            crit = sandbox.write("crit.toml", criteria)
            argv = [{"FILE": str(main), "CRIT": str(crit), "BASE": str(BASE_AIRCRAFT)}.get(a, a.replace("OUT", str(sandbox.out)))
                    for a in template]
            return Attempt("security", f"{place} {hostile[:20]!r} | {template[0]}", argv, sandbox, timeout=180,
                           names=(hostile,))
        campaign.attempt(build)
    # hostile file names: the default report folder (reports/<file name>) and figure names from them
    for stem in ["..", " ", "-o", "$\\frac{$", "x\x1b[31m", "a\nb", "<script>", "=cmd", "é" * 100, ".hidden"]:
        def build(sandbox, stem=stem):
            main = sandbox.write(stem + ".toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            argv = rng.choice([["report", "--", str(main)], ["assess", str(main), "-o", str(sandbox.out)],
                               ["respond", str(main), "--plot", str(sandbox.out / "r.png")]])
            return Attempt("security", f"file name {stem[:20]!r} | {argv[0]}", argv, sandbox, timeout=240,
                           names=(stem,), allowed_outside=(sandbox.work / "reports",))
        campaign.attempt(build)
    # --force on folders that are not reports
    force_cases = ["thesis", "inputs", "dot", "dotdot", "home", "empty", "file", "link-to-inputs", "report-ok",
                   "report-no-force", "empty-string", "inputs-subfolder", "identify-inputs"]
    for case in force_cases:
        def build(sandbox, case=case):
            main = sandbox.write("main.toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            shutil.copy(RECORD, sandbox.inputs / "record.csv")
            cwd = sandbox.work
            replaceable = ()
            target = sandbox.out / "target"
            if case == "thesis":
                target.mkdir()
                (target / "thesis.tex").write_text("years of work\n")
            elif case == "inputs":
                target = sandbox.inputs
            elif case == "inputs-subfolder":
                target = sandbox.top
            elif case == "dot":
                (cwd / "notes.txt").write_text("keep me\n")
                target = pathlib.Path(".")
            elif case == "dotdot":
                target = pathlib.Path("..")
            elif case == "home":
                (sandbox.home / "diary.txt").write_text("keep me\n")
                target = sandbox.home
            elif case == "empty":
                target.mkdir()
            elif case == "file":
                target.write_text("a file\n")
            elif case == "link-to-inputs":
                target.symlink_to(sandbox.inputs)
            elif case in ("report-ok", "report-no-force"):
                campaign.old_report(target)
                replaceable = (target,) if case == "report-ok" else ()
            elif case == "empty-string":
                target = pathlib.Path("")
            argv = ["report", str(main), "-o", str(target), "--force"]
            if case == "report-no-force":
                argv.remove("--force")
            if case == "identify-inputs":
                argv = ["identify", str(main), "--condition", "cruise", "--data", str(sandbox.inputs / "record.csv"),
                        "--method", "equation-error", "--report", str(sandbox.inputs), "--force"]
            if case == "empty-string":
                argv[3] = ""
            attempt = Attempt("security", f"--force on {case}", argv, sandbox, cwd=cwd, timeout=240,
                              replaceable=replaceable)
            if case == "report-ok":
                attempt.post = lambda a, r, target=target: ([] if r.status != 0 or _report_complete(target)
                                                            else [("half-written output", "forced report incomplete")])
            return attempt
        campaign.attempt(build)


# ----------------------------------------------------------------------------------------------
# The campaign

class Campaign:
    def __init__(self, seed, scratch, verbose=False):
        self.seed = seed
        self.scratch = pathlib.Path(scratch)
        self.records = []
        self.verbose = verbose
        self.unshare = _unshare_available()
        self._old = None

    def old_report(self, destination):
        """A complete report folder at destination (made once, copied after); its fingerprint."""
        if self._old is None:
            sandbox = Sandbox(tempfile.mkdtemp(dir=self.scratch))
            main = sandbox.write("main.toml", BASE_AIRCRAFT.read_text(encoding="utf-8"))
            tree = base_tree()
            tree["condition"] = tree["condition"][:1]
            sandbox.write("one.toml", toml_text(tree) + "\n")
            result = run(Attempt("setup", "old report", ["report", str(sandbox.inputs / "one.toml"), "-o",
                                                         str(sandbox.out / "old")], sandbox, timeout=300))
            if result.status != 0:
                raise RuntimeError("could not write the reference report: " + result.stderr)
            self._old = sandbox.out / "old"
            del main
        shutil.copytree(self._old, destination, symlinks=True)
        return fingerprint(destination)

    def attempt(self, build, special=None):
        folder = tempfile.mkdtemp(prefix="attempt.", dir=self.scratch)
        sandbox = Sandbox(folder)
        try:
            attempt = build(sandbox)
        except OSError as error:
            self.records.append({"category": "setup", "label": str(error), "outcome": "skipped", "failures": []})
            shutil.rmtree(folder, ignore_errors=True)
            return
        before = fingerprint(sandbox.root)
        if getattr(attempt, "shell", None):
            result = _run_shell(attempt)
        else:
            result = run(attempt, getattr(attempt, "action", None))
        if hasattr(attempt.stdout, "close"):
            attempt.stdout.close()
        after = fingerprint(sandbox.root)
        failures = classify(attempt, result, before, after)
        if getattr(attempt, "shell", None):
            failures.extend(_listing_failures(sandbox, result))
        if getattr(attempt, "repeat", False) and not failures:
            failures.extend(self._repeat(attempt, result, after))
        outcome = "FAILURE" if failures else ("refusal" if result.status == 2 else "ok")
        record = {"category": attempt.category, "label": attempt.label, "argv": attempt.argv or attempt.shell,
                  "status": result.status, "seconds": round(result.seconds, 2), "outcome": outcome,
                  "failures": [list(f) for f in dict.fromkeys(failures)],
                  "stderr": result.stderr[-600:] if failures else result.stderr[-200:]}
        self.records.append(record)
        if self.verbose or failures:
            print(f"[{len(self.records):4d}] {attempt.category:11s} {outcome:8s} {result.status!s:>4} "
                  f"{result.seconds:5.1f}s {attempt.label[:90]!r}" + "".join(f"\n        {k}: {d}" for k, d in
                                                                            record["failures"]), flush=True)
        shutil.rmtree(folder, ignore_errors=True)

    def _repeat(self, attempt, first, first_files):
        """The same run again in a fresh copy of the sandbox: identical stdout and files."""
        sandbox = attempt.sandbox
        out_prefix = os.path.relpath(sandbox.out, sandbox.root)
        saved = {p: m for p, m in first_files.items() if p.startswith(out_prefix)}
        shutil.rmtree(sandbox.out)
        sandbox.out.mkdir()
        if "plots" in " ".join(attempt.argv):
            (sandbox.out / "plots").mkdir()
        second = run(attempt)
        again = {p: m for p, m in fingerprint(sandbox.root).items() if p.startswith(out_prefix)}
        failures = []
        if second.stdout != first.stdout or second.status != first.status:
            failures.append(("not deterministic", f"stdout of {attempt.argv[0]}"))
        differing = sorted(p for p in set(saved) | set(again) if saved.get(p) != again.get(p))
        if differing:
            failures.append(("not deterministic", f"{len(differing)} output file(s) e.g. {os.path.splitext(differing[0])[1]}"))
        # the same outputs under the UTF-8 locale
        if attempt.env:
            shutil.rmtree(sandbox.out)
            sandbox.out.mkdir()
            if "plots" in " ".join(attempt.argv):
                (sandbox.out / "plots").mkdir()
            env, attempt.env = attempt.env, {}
            third = run(attempt)
            attempt.env = env
            utf8 = {p: m for p, m in fingerprint(sandbox.root).items() if p.startswith(out_prefix)}
            if utf8 != again:
                failures.append(("outputs depend on the locale", f"{attempt.argv[0]} files"))
            if third.stdout != first.stdout:
                failures.append(("outputs depend on the locale", f"{attempt.argv[0]} stdout"))
        return failures

    def summary(self):
        per_category = collections.defaultdict(collections.Counter)
        kinds = collections.Counter()
        kind_examples = {}
        for record in self.records:
            per_category[record["category"]][record["outcome"]] += 1
            for kind, detail in record["failures"]:
                kinds[(kind, detail)] += 1
                kind_examples.setdefault((kind, detail), record["label"])
        return per_category, kinds, kind_examples


def _run_shell(attempt):
    start = time.monotonic()
    try:
        done = subprocess.run(attempt.shell, cwd=attempt.sandbox.work, env=child_env(attempt.sandbox),
                              capture_output=True, timeout=attempt.timeout, stdin=subprocess.DEVNULL)
        return Result(done.returncode, done.stdout.decode("utf-8", "replace"), done.stderr.decode("utf-8", "replace"),
                      time.monotonic() - start)
    except subprocess.TimeoutExpired as expired:
        return Result(None, "", str(expired), time.monotonic() - start, hung=True)


def _listing_failures(sandbox, result):
    listing = sandbox.root / "listing"
    if not listing.exists():
        return [("fault set-up failed", "no listing")]
    names = [line for line in listing.read_text().splitlines() if line]
    temporaries = [n for n in names if TEMPORARY.match(os.path.basename(n))]
    failures = [("temporary left behind", "on a full or read-only file system")] if temporaries else []
    if result.status not in (0, 1) and [n for n in names if n not in temporaries]:
        failures.append(("half-written output", f"exit {result.status} on a full or read-only file system"))
    return failures


CATEGORIES = {"mutated": mutated, "numeric": numeric, "cli": cli, "faults": faults, "determinism": determinism,
              "security": security}
QUICK = {"mutated": 12, "numeric": 20, "cli": 30, "faults": 5, "determinism": 6, "security": 10}
FULL = {"mutated": 60, "numeric": 120, "cli": 150, "faults": 20, "determinism": 30, "security": 48}


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seed", type=int, default=17)
    parser.add_argument("--quick", action="store_true", help="a small sample of every category")
    parser.add_argument("--scale", type=float, default=1.0, help="multiply the full campaign's counts")
    parser.add_argument("--only", action="append", choices=sorted(CATEGORIES), help="run only these categories")
    parser.add_argument("--json", help="write every attempt's record to this file")
    parser.add_argument("--verbose", action="store_true")
    args = parser.parse_args(argv)
    counts = QUICK if args.quick else {k: max(1, round(v * args.scale)) for k, v in FULL.items()}
    os.environ.setdefault("MPLCONFIGDIR", str(pathlib.Path(tempfile.gettempdir()) / "latdyn-campaign-mpl"))
    pathlib.Path(os.environ["MPLCONFIGDIR"]).mkdir(exist_ok=True)
    scratch = tempfile.mkdtemp(prefix="latdyn-campaign.")
    campaign = Campaign(args.seed, scratch, args.verbose)
    start = time.monotonic()
    try:
        for name in args.only or CATEGORIES:
            before = len(campaign.records)
            CATEGORIES[name](campaign, counts[name])
            print(f"-- {name}: {len(campaign.records) - before} attempts, {time.monotonic() - start:.0f} s so far",
                  flush=True)
    finally:
        shutil.rmtree(scratch, ignore_errors=True)
    per_category, kinds, examples = campaign.summary()
    print("\nattempts per category")
    for name, counter in per_category.items():
        print(f"  {name:12s} {sum(counter.values()):5d}  ok {counter['ok']:5d}  refusal {counter['refusal']:5d}"
              f"  FAILURE {counter['FAILURE']:4d}  skipped {counter['skipped']}")
    total_failures = sum(c["FAILURE"] for c in per_category.values())
    print(f"  total        {len(campaign.records):5d}  failures {total_failures}, distinct kinds {len(kinds)},"
          f" {time.monotonic() - start:.0f} s")
    by_kind = collections.Counter()
    for (kind, _), n in kinds.items():
        by_kind[kind] += n
    print("\nfailures per kind")
    for kind, n in by_kind.most_common():
        print(f"  {n:4d}  {kind}")
    print("\ndistinct failures (kind: detail — first example)")
    for (kind, detail), n in kinds.most_common():
        print(f"  {n:4d}  {kind}: {detail}  — {examples[(kind, detail)][:100]!r}")
    if args.json:
        with open(args.json, "w", encoding="utf-8") as handle:
            json.dump({"seed": args.seed, "counts": counts, "records": campaign.records}, handle, indent=1)
    return 1 if total_failures else 0


if __name__ == "__main__":
    sys.exit(main())
