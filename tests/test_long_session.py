"""A long session in a subprocess: 20 000 slider moves with saves in between.

The window runs offscreen on a copy of a demo project. Every move changes the damping or the
frequency-ratio slider and redraws plots and results at once (the event loop, and so painting,
runs every 50 moves); every 500 moves the project is saved. The child reports its resident
memory (VmRSS from /proc/self/status) along the way. Checks: exit status 0 (a PySide6 release
with broken reference counting aborts well before this), memory growth after warm-up within a
generous bound, every save readable and equal to the window's design, the curves still finite.
"""
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).parent.parent
DEMO = ROOT / "demo_projects" / "rooftop_air_handler.json"
MOVES = 20_000
#: Allowed growth of resident memory from move 2000 to the end (MB): generous, a leak of
#: a few kB per move over 18 000 moves would pass it.
GROWTH_BOUND_MB = 60.0

CHILD = r"""
import json, os, sys
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
sys.path.insert(0, sys.argv[1])
from PySide6 import QtWidgets
app = QtWidgets.QApplication([])
import numpy as np
from app.main_window import MainWindow
from core.project import load_project

def rss_mb(field="VmRSS"):
    with open("/proc/self/status") as handle:
        for line in handle:
            if line.startswith(field + ":"):
                return int(line.split()[1]) / 1024.0

path, moves = sys.argv[2], int(sys.argv[3])
window = MainWindow()
window.resize(1200, 800)
window.show()
assert window.open_file(path)
app.processEvents()
damping, ratio = window.operating.damping_slider, window.operating.ratio_slider
samples, saves = [], 0
for move in range(1, moves + 1):
    slider = damping if move % 3 else ratio
    span = slider.maximum()
    slider.setValue((move * 7919) % (span + 1))      # jumps all over the range
    window.refresh_now()
    if move % 50 == 0:
        app.processEvents()                           # paint now and then, as a user would see it
    if move % 500 == 0:
        window.model.save()
        saves += 1
        assert load_project(path) == window.model.project
    if move % 2000 == 0:
        samples.append((move, rss_mb()))
x, y = window.plots.design_magnitude.getOriginalDataset()
assert np.all(np.isfinite(y)) and len(y) > 100
print(json.dumps({"samples": samples, "saves": saves, "peak_mb": rss_mb("VmHWM")}))
sys.stdout.flush()
window.model.save()
window.close()
"""


@pytest.mark.slow
def test_twenty_thousand_slider_moves_with_saves(tmp_path):
    project = tmp_path / "long-session.msproj.json"
    project.write_bytes(DEMO.read_bytes())
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", MOUNTSMITH_RECOVERY_DIR=str(tmp_path / "recovery"))
    completed = subprocess.run([sys.executable, "-c", CHILD, str(ROOT), str(project), str(MOVES)], cwd=tmp_path,
                               env=env, capture_output=True, text=True, timeout=300)
    assert completed.returncode == 0, completed.stderr[-3000:]
    report = json.loads(completed.stdout.strip().splitlines()[-1])
    samples = report["samples"]
    assert [move for move, _ in samples] == list(range(2000, MOVES + 1, 2000))
    warm, end = samples[0][1], samples[-1][1]
    print(f"\nlong session: {MOVES} moves, {report['saves']} saves; RSS {warm:.1f} MB after 2000 moves, "
          f"{end:.1f} MB at the end (growth {end - warm:+.1f} MB), peak {report['peak_mb']:.1f} MB; "
          f"samples {[round(mb, 1) for _, mb in samples]}")
    assert report["saves"] == MOVES // 500
    assert end - warm < GROWTH_BOUND_MB
    # The last save is the window's design, readable by the normal loader.
    from core.project import load_project
    assert load_project(project).design != load_project(DEMO).design
