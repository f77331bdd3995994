"""``python -m bench [--quick] [--out FILE]``: measure, print a table, write bench/results.json."""
from __future__ import annotations

import argparse
import json
import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")

from bench import cold_start, core_speed, live_update  # noqa: E402
from bench.machine import machine  # noqa: E402

RESULTS = Path(__file__).resolve().parent / "results.json"

#: (key, label, unit, target text, passes(value) or None)
ROWS = (
    ("live_update_median_ms", "live update, slider to both plots painted: median", "ms", "< 6",
     lambda v: v < 6.0),
    ("live_update_p95_ms", "live update: 95th percentile", "ms", "< 12", lambda v: v < 12.0),
    ("matplotlib_agg_median_ms", "same curves redrawn by matplotlib Agg: median", "ms", "", None),
    ("live_update_speedup_vs_matplotlib", "live update speed-up over matplotlib", "×", "≥ 10",
     lambda v: v >= 10.0),
    ("plots_static_repaint_ms", "plots repaint with nothing changed (diagnosis)", "ms", "", None),
    ("live_update_ratio_slider_median_ms", "live update, ratio slider: median", "ms", "", None),
    ("core_response_us", "core frequency_response, 2000 points", "µs", "", None),
    ("python_control_response_us", "python-control frequency_response, same system", "µs", "", None),
    ("bare_numpy_response_us", "bare numpy expression, complex form", "µs", "", None),
    ("bare_numpy_real_response_us", "bare numpy expression, real form", "µs", "", None),
    ("core_speedup_vs_python_control", "core speed-up over python-control", "×", "≥ 4", lambda v: v >= 4.0),
    ("core_time_vs_numpy_floor", "core time over the faster bare form (floor)", "×", "≤ 1.5",
     lambda v: v <= 1.5),
    ("cold_start_s", "cold start to first painted window (demo project)", "s", "", None),
    ("minimal_plot_window_start_s", "minimal pyqtgraph window, one curve", "s", "", None),
    ("cold_start_vs_minimal_plot_window", "cold start over minimal window", "×", "< 1.5", lambda v: v < 1.5),
    ("peak_rss_mb", "peak RSS, open window on a demo project", "MB", "< 250", lambda v: v < 250.0),
    ("design_map_300_ms", "design map 300 × 300", "ms", "", None),
    ("design_map_growth_per_doubling", "  growth when both axes double (4× points)", "×", "", None),
    ("rigid_body_modes_4_mounts_us", "six-DOF modes, 4 mounts", "µs", "", None),
    ("rigid_body_growth_per_doubling", "  growth when the mounts double", "×", "", None),
    ("runup_30s_ms", "30 s run-up simulation", "ms", "", None),
    ("runup_growth_per_doubling", "  growth when the run doubles to 60 s", "×", "", None),
)


def _table(results: dict) -> str:
    lines = [f"{'figure':<52} {'value':>10}  {'unit':<4} {'target':<7} met"]
    lines.append("-" * len(lines[0]))
    for key, label, unit, target, passes in ROWS:
        if key not in results:
            continue
        value = results[key]
        verdict = "" if passes is None else ("yes" if passes(value) else "NO")
        lines.append(f"{label:<52} {value:>10.4g}  {unit:<4} {target:<7} {verdict}")
    for key in sorted(results):
        if key.endswith("_note"):
            lines.append(f"note: {results[key]}")
    return "\n".join(lines)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(prog="python -m bench", description=__doc__)
    parser.add_argument("--quick", action="store_true", help="fewer repeats (under a minute)")
    parser.add_argument("--out", type=Path, default=RESULTS, help=f"results file (default {RESULTS})")
    args = parser.parse_args(argv)
    quick = args.quick
    started = time.time()
    results: dict = {"quick": quick}
    with tempfile.TemporaryDirectory(prefix="mountsmith-bench-") as recovery:
        print("core: frequency response, design map, modes, run-up ...", flush=True)
        repeats = 3 if quick else 9
        results.update(core_speed.frequency_response_speed(repeats))
        results.update(core_speed.design_map_speed(3 if quick else 5))
        results.update(core_speed.rigid_body_speed(repeats))
        results.update(core_speed.passage_speed(3 if quick else 5))
        print("cold start and memory (subprocesses) ...", flush=True)
        results.update(cold_start.cold_start(3 if quick else 7, recovery))
        results["slow_imports"] = cold_start.slow_imports(recovery)
        results.update(cold_start.peak_rss(recovery))
        print("live update: window against matplotlib ...", flush=True)
        results.update(live_update.live_update(500 if quick else 1000, 40 if quick else 200))
    results["elapsed_s"] = time.time() - started
    results["machine"] = machine()
    results["measured_at_utc"] = time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())
    args.out.write_text(json.dumps(results, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
    print()
    print(_table(results))
    print()
    print("slowest top-level imports at start (python -X importtime, cumulative):")
    for row in results["slow_imports"][:6]:
        print(f"  {row['module']:<28} {row['cumulative_ms']:8.1f} ms")
    info = results["machine"]
    print(f"\nmachine: {info['cpu']}, {info['cores']} cores, Python {info['python']}, "
          + ", ".join(f"{k} {v}" for k, v in info["packages"].items())
          + f"; load average {info['load_average_1_5_15_min']} (other work shares these cores)")
    print(f"written {args.out} in {results['elapsed_s']:.0f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
