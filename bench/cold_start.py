"""Cold start to the first painted window, the app against a minimal pyqtgraph window, and
peak memory of the open window; each in a fresh subprocess."""
from __future__ import annotations

import json
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "demo_projects" / "rooftop_air_handler.json"


def _env(recovery_dir: str) -> dict:
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", PYQTGRAPH_QT_LIB="PySide6",
               MOUNTSMITH_RECOVERY_DIR=recovery_dir)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    return env


def _run(args: list[str], env: dict, extra: list[str] = ()) -> tuple[float, subprocess.CompletedProcess]:
    start = time.perf_counter()
    completed = subprocess.run([sys.executable, *extra, "-m", "bench.probes", *args], cwd=ROOT, env=env,
                               capture_output=True, text=True, timeout=120)
    elapsed = time.perf_counter() - start
    if completed.returncode != 0:
        raise RuntimeError(f"probe {args} failed ({completed.returncode}): {completed.stderr[-2000:]}")
    return elapsed, completed


def compile_bytecode() -> None:
    """Write the bytecode of app/, core/ and bench/ as a normal start would.

    With ``PYTHONDONTWRITEBYTECODE`` set (as on this machine) Python never caches the
    project's bytecode, and every start compiled our modules again (about 90 ms, measured),
    while the libraries come with theirs from installation. ``compileall`` writes it
    regardless, so both sides start from cached bytecode, as a user's second start does.
    """
    subprocess.run([sys.executable, "-m", "compileall", "-q", "app", "core", "bench"], cwd=ROOT, check=True,
                   capture_output=True, timeout=120)


def cold_start(repeats: int, recovery_dir: str) -> dict:
    env = _env(recovery_dir)
    compile_bytecode()
    _run(["minimal"], env)        # warm the file cache once for both, then alternate
    _run(["app", str(DEMO)], env)
    app_times, minimal_times = [], []
    for _ in range(repeats):
        minimal_times.append(_run(["minimal"], env)[0])
        app_times.append(_run(["app", str(DEMO)], env)[0])
    app_s, minimal_s = statistics.median(app_times), statistics.median(minimal_times)
    return {"cold_start_s": app_s, "minimal_plot_window_start_s": minimal_s,
            "cold_start_vs_minimal_plot_window": app_s / minimal_s, "cold_start_repeats": repeats}


def slow_imports(recovery_dir: str, top: int = 12) -> list[dict]:
    """Cumulative import time per top-level package of the app's start (python -X importtime)."""
    _, completed = _run(["app", str(DEMO)], _env(recovery_dir), extra=["-X", "importtime"])
    rows = []
    for line in completed.stderr.splitlines():
        if not line.startswith("import time:") or "cumulative" in line:
            continue
        self_us, cumulative_us, name = line.split(":", 1)[1].split("|")
        if name[1:2] == " ":          # nested import (indented): counted in its parent
            continue
        rows.append({"module": name.strip(), "self_ms": int(self_us) / 1e3,
                     "cumulative_ms": int(cumulative_us) / 1e3})
    rows.sort(key=lambda row: -row["cumulative_ms"])
    return rows[:top]


def peak_rss(recovery_dir: str) -> dict:
    _, completed = _run(["rss", str(DEMO)], _env(recovery_dir))
    values = json.loads(completed.stdout.strip().splitlines()[-1])
    return {"peak_rss_mb": values["peak_rss_kb"] / 1024.0, "rss_after_300_steps_mb": values["rss_kb"] / 1024.0}
