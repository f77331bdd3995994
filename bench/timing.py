"""Small timing helpers: repeat a call, report per-call seconds."""
from __future__ import annotations

import statistics
import time


def per_call_seconds(function, repeats: int = 7, min_time_s: float = 0.05) -> float:
    """Median over ``repeats`` of the mean time per call, each repeat lasting at least ``min_time_s``."""
    function()
    loops = 1
    while True:
        start = time.perf_counter()
        for _ in range(loops):
            function()
        elapsed = time.perf_counter() - start
        if elapsed >= min_time_s:
            break
        loops *= 2
    samples = [elapsed / loops]
    for _ in range(repeats - 1):
        start = time.perf_counter()
        for _ in range(loops):
            function()
        samples.append((time.perf_counter() - start) / loops)
    return statistics.median(samples)


def percentile(values, fraction: float) -> float:
    """Linear-interpolated percentile of ``values`` (fraction from 0 to 1)."""
    ordered = sorted(values)
    position = (len(ordered) - 1) * fraction
    low = int(position)
    high = min(low + 1, len(ordered) - 1)
    return ordered[low] + (ordered[high] - ordered[low]) * (position - low)
