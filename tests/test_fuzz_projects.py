"""Damaged and hostile project files: only the documented error ever comes out.

Hypothesis mutates the demo project files — fields removed or renamed, types swapped,
extreme numbers, NaN/Infinity literals, deep nesting, code-like text, truncation, random
bytes — and feeds each result to ``core.project.load_project`` and to ``mountsmith
evaluate`` (in-process through ``app.cli.main`` for volume, a few real subprocesses too).

For every case: the outcome is a Project or a ProjectFileError (the command: exit 0 with
finite numbers, or exit 2 with one line ``mountsmith: ...``), the file's bytes are unchanged,
no file appears beside it, and each case finishes within a bound (a hang fails the test).
"""
import contextlib
import copy
import io
import json
import math
import os
import re
import signal
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from app import cli
from core.errors import ProjectFileError
from core.project import MAX_FILE_BYTES, Project, load_project, project_to_text

ROOT = Path(__file__).parent.parent
DEMO_FILES = sorted((ROOT / "demo_projects").glob("*.json"))
DEMO_DATA = [json.loads(path.read_text(encoding="utf-8")) for path in DEMO_FILES]
#: Seconds one case may take before it counts as a hang (generous: 2 shared cores).
CASE_BOUND_S = 20.0



def fuzz(examples: int) -> settings:
    """Hypothesis settings for a fuzz run: reproducible, no deadline (the hang bound is ``bounded``)."""
    return settings(max_examples=examples, deadline=None, database=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                           HealthCheck.function_scoped_fixture])

CODE_LIKE = ["__import__('os').system('touch PWNED')", "${HOME}", "$(touch PWNED)", "`touch PWNED`",
             "{{7*7}}", "%s%s%n", "'; DROP TABLE projects; --", "\x00", "\u202e", "../../etc/passwd",
             "eval(compile('1','x','exec'))", "!!python/object/apply:os.system ['touch PWNED']"]
EXTREME_NUMBERS = [0, -0.0, 1, -1, 0.5, 1e-3, 1e-4, 64, 65, 1e6, 1e7, 1e7 * (1 + 1e-15), 50.0, 50.000001, 99.99,
                   100, 2.0, 2.0000001, 5e-324, 1e-300, 1e300, 1.7976931348623157e308, -1.7976931348623157e308,
                   2**53 + 1, 2**63, 2**64 + 1, 10**400, -10**400, math.nan, math.inf, -math.inf]


class Hang(Exception):
    """A case ran past CASE_BOUND_S."""


@contextlib.contextmanager
def bounded(seconds=CASE_BOUND_S):
    """Raise Hang in the main thread if the block runs longer than ``seconds``."""
    def expire(signum, frame):
        raise Hang(f"case ran longer than {seconds} s")
    previous = signal.signal(signal.SIGALRM, expire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def _refuse_constant(name):
    raise AssertionError(f"{name} in the command's JSON output")


NON_FINITE_WORD = re.compile(r"\b(nan|inf|infinity)\b", re.IGNORECASE)


def check_command(path: Path, as_json: bool) -> int:
    """Run ``mountsmith evaluate`` in-process; assert the documented outcome; return the exit status."""
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            status = cli.main(["evaluate", str(path)] + (["--json"] if as_json else []))
        except SystemExit as leave:   # argparse: still must be status 2 and one line
            status = leave.code
    stdout, stderr = out.getvalue(), err.getvalue()
    assert status in (0, 2), (status, stderr)
    if status == 2:
        lines = stderr.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("mountsmith: "), stderr
        assert "Traceback" not in stderr and stdout == ""
    else:
        assert stderr == ""
        if as_json:
            values = json.loads(stdout, parse_constant=_refuse_constant)
            for key, value in values.items():
                if isinstance(value, float):
                    assert math.isfinite(value), key
        else:
            assert not NON_FINITE_WORD.search(stdout), stdout
    return status


def check_file(folder: Path, content: bytes, as_json: bool = False) -> str:
    """Write ``content``, load it and evaluate it; return "loaded" or "refused"."""
    path = folder / "case.msproj.json"
    path.write_bytes(content)
    with bounded():
        try:
            project = load_project(path)
            outcome = "loaded"
            assert isinstance(project, Project)
        except ProjectFileError as error:
            outcome = "refused"
            assert str(error).startswith(str(path)) and "\n" not in str(error)
        status = check_command(path, as_json)
    if outcome == "refused":
        assert status == 2
    assert path.read_bytes() == content, "the input file was changed"
    assert [p.name for p in folder.iterdir()] == ["case.msproj.json"], "a file appeared beside the input"
    return outcome


@pytest.fixture(scope="module")
def folder():
    with tempfile.TemporaryDirectory(prefix="mountsmith-fuzz-") as name:
        yield Path(name)


# ------------------------------------------------------------------ strategies

def _paths(node, prefix=()):
    """Every key path into a JSON tree."""
    if isinstance(node, dict):
        for key, value in node.items():
            yield prefix + (key,)
            yield from _paths(value, prefix + (key,))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            yield prefix + (index,)
            yield from _paths(value, prefix + (index,))


DEMO_PATHS = [list(_paths(data)) for data in DEMO_DATA]

leaves = st.one_of(
    st.none(), st.booleans(), st.sampled_from(EXTREME_NUMBERS), st.integers(),
    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=30), st.sampled_from(CODE_LIKE),
    st.sampled_from(["viscous", "hysteretic", "isolation", "frequency_ratio", "equal", "per_mount", "cg_offset",
                     "none", "force", "unbalance", "balance_grade", "SI", "US", "db", "ratio", "hz", "rpm",
                     "mountsmith-project"]))
json_values = st.recursive(leaves, lambda inner: st.lists(inner, max_size=5)
                           | st.dictionaries(st.text(max_size=10), inner, max_size=5), max_leaves=12)


@st.composite
def mutated_projects(draw):
    """A demo project with one to five structural mutations, as file bytes."""
    which = draw(st.integers(0, len(DEMO_DATA) - 1))
    data = copy.deepcopy(DEMO_DATA[which])
    for _ in range(draw(st.integers(1, 5))):
        paths = list(_paths(data))
        if not paths:
            break
        path = draw(st.sampled_from(paths))
        parent = data
        for key in path[:-1]:
            parent = parent[key]
        key = path[-1]
        operation = draw(st.sampled_from(["delete", "replace", "replace", "number", "number", "nest", "rename",
                                          "grow"]))
        if operation == "delete":
            del parent[key]
        elif operation == "replace":
            parent[key] = draw(json_values)
        elif operation == "number":
            parent[key] = draw(st.sampled_from(EXTREME_NUMBERS) | st.floats(allow_nan=True, allow_infinity=True))
        elif operation == "nest":
            value = parent[key]
            for _ in range(draw(st.integers(1, 60))):
                value = draw(st.sampled_from([[value], {"x": value}]))
            parent[key] = value
        elif operation == "rename" and isinstance(parent, dict):
            parent[draw(st.text(max_size=12))] = parent.pop(key)
        elif operation == "grow":
            parent[key] = draw(st.sampled_from([[1.0] * 1001, "x" * 100_001, list(range(64)),
                                                {str(i): i for i in range(200)}]))
    text = json.dumps(data, allow_nan=True, indent=draw(st.sampled_from([None, 2])))
    return text.encode("utf-8")


@st.composite
def damaged_bytes(draw):
    """Demo file bytes truncated, overwritten, with bytes inserted or deleted."""
    content = bytearray(DEMO_FILES[draw(st.integers(0, len(DEMO_FILES) - 1))].read_bytes())
    for _ in range(draw(st.integers(1, 4))):
        operation = draw(st.sampled_from(["truncate", "insert", "overwrite", "delete", "literal"]))
        at = draw(st.integers(0, len(content)))
        if operation == "truncate":
            del content[at:]
        elif operation == "insert":
            content[at:at] = draw(st.binary(min_size=1, max_size=16))
        elif operation == "overwrite":
            chunk = draw(st.binary(min_size=1, max_size=8))
            content[at:at + len(chunk)] = chunk
        elif operation == "delete":
            del content[at:at + draw(st.integers(1, 40))]
        else:
            literal = draw(st.sampled_from([b"NaN", b"Infinity", b"-Infinity", b"1e999", b"-1e999", b"null",
                                            b"[", b"{", b'"', b"\\u0000", b"\xff\xfe", b"9" * 5000]))
            content[at:at] = literal
    return bytes(content)


# ------------------------------------------------------------------ hypothesis runs

@fuzz(2500)
@given(content=mutated_projects(), as_json=st.booleans())
def test_structurally_mutated_projects(folder, content, as_json):
    check_file(folder, content, as_json)


@fuzz(2000)
@given(content=damaged_bytes(), as_json=st.booleans())
def test_byte_damaged_projects(folder, content, as_json):
    check_file(folder, content, as_json)


@fuzz(600)
@given(content=st.binary(max_size=4000) | st.text(max_size=2000).map(lambda t: t.encode("utf-8")))
def test_random_bytes_and_text(folder, content):
    assert check_file(folder, content) == "refused"


@fuzz(500)
@given(value=st.sampled_from(EXTREME_NUMBERS) | st.floats(allow_nan=True, allow_infinity=True) | st.integers(),
       field=st.sampled_from([path for path in DEMO_PATHS[0] if path[0] in ("design", "view")]))
def test_one_extreme_number_in_any_field(folder, value, field):
    data = copy.deepcopy(DEMO_DATA[0])
    parent = data
    for key in field[:-1]:
        parent = parent[key]
    parent[field[-1]] = value
    outcome = check_file(folder, json.dumps(data, allow_nan=True).encode())
    if isinstance(value, float) and not math.isfinite(value):
        assert outcome == "refused"   # NaN and infinity never load (JSON has no such numbers)


def test_mutation_found_both_outcomes(folder):
    # Guards the strategies: they must produce loadable and refused files, or the run proves little.
    outcomes = {check_file(folder, content) for content in [
        DEMO_FILES[0].read_bytes(), DEMO_FILES[0].read_bytes()[:-20],
        DEMO_FILES[1].read_bytes().replace(b'"mass_kg": ', b'"mass_kg": -')]}
    assert outcomes == {"loaded", "refused"}


# ------------------------------------------------------------------ explicit hostile cases

def _demo_with(**top) -> dict:
    data = copy.deepcopy(DEMO_DATA[0])
    data.update(top)
    return data


@pytest.mark.parametrize("content, reason", [
    (b" " * (MAX_FILE_BYTES + 1), "MB"),
    (json.dumps(_demo_with(notes="n" * (MAX_FILE_BYTES - 10_000))).encode(), "at most 100000"),
    (b"[" * 200_000 + b"]" * 200_000, "nested too deeply"),
    (b'{"format": "mountsmith-project", "schema_version": 1, "design": ' + b'{"a":' * 50_000 + b"1"
     + b"}" * 50_001, "nested too deeply"),
    (b'{"format": "mountsmith-project", "schema_version": 1, "design": {"machine": {"mass_kg": '
     + b"9" * 5000 + b"}}}", "not valid JSON"),
    (DEMO_FILES[0].read_bytes().decode().encode("utf-16"), "not UTF-8"),
])
def test_huge_deep_and_odd_files_are_refused_quickly(folder, content, reason):
    path = folder / "case.msproj.json"
    path.write_bytes(content)
    with bounded(), pytest.raises(ProjectFileError, match=reason):
        load_project(path)
    assert check_file(folder, content) == "refused"


def test_code_like_text_loads_as_plain_text_and_runs_nothing(folder, tmp_path):
    # Project files are data: json parsing only, no eval, no templates, no YAML tags.
    marker = tmp_path / "PWNED"
    hostile = f"__import__('os').system('touch {marker}') $(touch {marker}) `touch {marker}` {{{{7*7}}}} %s%n"
    data = _demo_with(name=hostile, notes="\n".join(CODE_LIKE + [hostile]))
    content = json.dumps(data, ensure_ascii=False).encode()
    path = folder / "case.msproj.json"
    path.write_bytes(content)
    project = load_project(path)
    assert project.name == hostile
    assert project.notes.endswith(hostile)
    assert check_file(folder, content, as_json=True) == "loaded"
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert cli.main(["evaluate", str(path), "--json"]) == 0
    assert json.loads(out.getvalue())["name"] == hostile   # shown back as text, unchanged
    assert not marker.exists()
    assert json.loads(project_to_text(project))["name"] == hostile


@pytest.mark.parametrize("name", ["-starts-with-dash.json", "spaces and ünïcode ✓.json", "$(touch PWNED).json",
                                  "semi;colon&amp|pipe.json", "quote'\"back`tick.json"])
def test_odd_file_names_are_plain_paths(tmp_path, name):
    tmp_path = tmp_path / "files"
    tmp_path.mkdir()
    path = tmp_path / name
    path.write_bytes(DEMO_FILES[0].read_bytes())
    completed = subprocess.run([sys.executable, "-m", "app.cli", "evaluate", str(path), "--json"], cwd=tmp_path,
                               capture_output=True, text=True, timeout=120,
                               env=dict(os.environ, PYTHONPATH=str(ROOT)))
    assert completed.returncode == 0, completed.stderr
    assert json.loads(completed.stdout)["name"] == DEMO_DATA[0]["name"]
    assert sorted(p.name for p in tmp_path.iterdir()) == [name]   # nothing created, nothing touched


def test_pipes_devices_and_folders_are_refused_without_blocking(tmp_path):
    fifo = tmp_path / "pipe.json"
    os.mkfifo(fifo)   # reading a pipe with no writer would block forever
    loop = tmp_path / "loop.json"
    os.symlink(loop, loop)
    for path, reason in [(fifo, "not a regular file"), (Path("/dev/zero"), "not a regular file"),
                         (tmp_path, "folder"), (tmp_path / "missing.json", "no such file"),
                         (loop, "cannot be read"), (tmp_path / ("n" * 5000), "cannot be read")]:
        with bounded(10), pytest.raises(ProjectFileError, match=reason):
            load_project(path)
        with bounded(10):
            assert check_command(path, as_json=False) == 2


@fuzz(6)
@given(content=mutated_projects() | damaged_bytes())
def test_real_command_subprocess_on_mutated_files(folder, content):
    path = folder / "case.msproj.json"
    path.write_bytes(content)
    completed = subprocess.run([sys.executable, "-m", "app.cli", "evaluate", str(path)], cwd=ROOT,
                               capture_output=True, text=True, timeout=120)
    assert completed.returncode in (0, 2), completed.stderr
    if completed.returncode == 2:
        assert len(completed.stderr.strip().splitlines()) == 1, completed.stderr
        assert completed.stderr.startswith("mountsmith: ")
    else:
        assert completed.stderr == "" and "caution" in completed.stdout
    assert path.read_bytes() == content
