"""The machine a benchmark ran on: CPU, cores, Python, package versions."""
from __future__ import annotations

import importlib.metadata
import os
import platform
import sys

PACKAGES = ("numpy", "scipy", "PySide6", "PySide6-Essentials", "pyqtgraph", "matplotlib", "control")


def cpu_model() -> str:
    try:
        with open("/proc/cpuinfo", encoding="utf-8") as handle:
            for line in handle:
                if line.startswith("model name"):
                    return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or platform.machine()


def machine() -> dict:
    versions = {}
    for name in PACKAGES:
        try:
            versions[name] = importlib.metadata.version(name)
        except importlib.metadata.PackageNotFoundError:
            continue
    try:
        load = [round(value, 2) for value in os.getloadavg()]
    except OSError:
        load = None
    return {"cpu": cpu_model(), "cores": os.cpu_count(), "platform": platform.platform(),
            "python": sys.version.split()[0], "packages": versions,
            "qt_platform": os.environ.get("QT_QPA_PLATFORM", "offscreen"),
            "load_average_1_5_15_min": load}


def memory_kb(field: str = "VmHWM") -> int | None:
    """A memory figure of this process from /proc/self/status (kB): VmHWM is the peak RSS."""
    try:
        with open("/proc/self/status", encoding="utf-8") as handle:
            for line in handle:
                if line.startswith(field + ":"):
                    return int(line.split()[1])
    except OSError:
        pass
    return None
