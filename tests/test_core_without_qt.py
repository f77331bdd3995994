"""The core never needs Qt: import every core module where PySide6, shiboken6 and pyqtgraph are blocked."""
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).parent.parent

BLOCKER = r"""
import importlib, importlib.abc, pkgutil, sys
class Block(importlib.abc.MetaPathFinder):
    def find_spec(self, name, path=None, target=None):
        if name.split('.')[0] in ('PySide6', 'shiboken6', 'pyqtgraph', 'PyQt5', 'PyQt6', 'PySide2'):
            raise ImportError('blocked for this check: ' + name)
        return None
sys.meta_path.insert(0, Block())
import core
names = sorted(m.name for m in pkgutil.iter_modules(core.__path__))
for name in names:
    importlib.import_module('core.' + name)
import app.cli
code = app.cli.main(['evaluate', 'demo_projects/rooftop_air_handler.json', '--json'])
assert code == 0, code
print('imported', len(names))
"""


def test_every_core_module_imports_without_qt():
    completed = subprocess.run([sys.executable, "-c", BLOCKER], cwd=ROOT, capture_output=True, text=True,
                               timeout=120)
    assert completed.returncode == 0, completed.stderr
    count = int(completed.stdout.strip().splitlines()[-1].split()[1])
    assert count >= 6
