"""The headless commands, run as a user would: a subprocess of ``python -m app.cli``.

Reference numbers come from hand formulas (REFERENCES §1–§3), not from the program.
"""
import json
import math
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).parent.parent
DEMO_FILES = sorted((ROOT / "demo_projects").glob("*.json"))


def run(*args, check_status=None):
    completed = subprocess.run([sys.executable, "-m", "app.cli", *args], cwd=ROOT, capture_output=True,
                               text=True, timeout=120)
    if check_status is not None:
        assert completed.returncode == check_status, completed.stderr
    return completed


def test_design_json_matches_hand_calculation(tmp_path):
    # 100 kg, 3000 r/min, G 6.3 with a 100 kg rotor → F = 197.9 N (ISO 21940-11, REFERENCES §3).
    # ζ = 0.1, 90 % isolation: r from the closed form of |T| = 0.1 (Vigran eq. 2.33).
    saved = tmp_path / "cli.json"
    out = run("design", "--mass", "100", "--speed", "3000", "--mounts", "4", "--damping-ratio", "0.1",
              "--isolation", "90", "--balance-grade", "6.3", "--rotor-mass", "100", "--json", "--save", str(saved),
              check_status=0)
    values = json.loads(out.stdout)
    tau, z2 = 0.1, 0.04
    b = z2 * tau**2 - 2 * tau**2 - z2
    x = (-b + math.sqrt(b * b - 4 * tau**2 * (tau**2 - 1))) / (2 * tau**2)
    omega = 100 * math.pi
    fn = omega / math.sqrt(x) / (2 * math.pi)
    assert values["frequency_ratio"] == pytest.approx(math.sqrt(x), rel=1e-9)
    assert values["natural_frequency_hz"] == pytest.approx(fn, rel=1e-9)
    assert values["natural_frequency_rpm"] == pytest.approx(fn * 60, rel=1e-9)
    assert values["static_deflection_mm"] == pytest.approx((15.761 / fn) ** 2, rel=1e-4)  # common practice
    assert values["transmissibility"] == pytest.approx(0.1, rel=1e-9)
    assert values["isolation_percent"] == pytest.approx(90, rel=1e-9)
    assert values["isolation_db"] == pytest.approx(20, rel=1e-9)
    assert values["phase_deg"] < 0
    assert values["stiffness_per_mount_n_per_m"] == pytest.approx([100 * (2 * math.pi * fn) ** 2 / 4] * 4)
    assert values["load_per_mount_n"] == pytest.approx([100 * 9.80665 / 4] * 4)
    assert values["excitation_force_n"] == pytest.approx(197.9, rel=5e-4)
    assert values["transmitted_force_n"] == pytest.approx(19.79, rel=5e-4)
    for key in ("damping_total_n_s_per_m", "damping_per_mount_n_s_per_m", "peak_transmissibility",
                "peak_frequency_ratio", "worst_transmissibility", "warnings", "machine_displacement_mm",
                "machine_velocity_mm_s"):
        assert key in values
    evaluated = json.loads(run("evaluate", str(saved), "--json", check_status=0).stdout)
    assert evaluated["natural_frequency_hz"] == values["natural_frequency_hz"]


def test_design_human_table_has_units_and_caution():
    out = run("design", "--mass", "250", "--speed", "1500", "--mounts", "4", "--loss-factor", "0.1",
              "--dynamic-stiffness-ratio", "1.4", "--frequency-ratio", "4", check_status=0).stdout
    assert "Hz" in out and "N/mm" in out and "mm" in out and "equivalent viscous" in out
    assert "licensed engineer" in out


@pytest.mark.parametrize("path", DEMO_FILES, ids=lambda p: p.name)
def test_evaluate_every_demo_project(path):
    before = path.read_bytes()
    values = json.loads(run("evaluate", str(path), "--json", check_status=0).stdout)
    assert 0 < values["transmissibility"] < 1
    assert path.read_bytes() == before
    assert "caution" in run("evaluate", str(path), check_status=0).stdout


@pytest.mark.parametrize("args, flag", [
    (["--mass", "-1"], "--mass"),
    (["--mass", "0"], "--mass"),
    (["--mass", "nan"], "--mass"),
    (["--speed", "inf"], "--speed"),
    (["--frequency-ratio", "0"], "--frequency-ratio"),
    (["--frequency-ratio", "-2"], "--frequency-ratio"),
    (["--damping-ratio", "-0.1"], "--damping-ratio"),
    (["--isolation", "100"], "--isolation"),
    (["--isolation", "99.9", "--damping-ratio", "1"], "--isolation"),
    (["--speed-max", "100"], "--speed-max"),
    (["--mounts", "2.5"], "--mounts"),
    (["--mass", "heavy"], "--mass"),
])
def test_bad_input_exits_2_with_one_line(args, flag):
    base = {"--mass": "100", "--speed": "1500", "--mounts": "4", "--damping-ratio": "0.05"}
    tuning = [] if {"--isolation", "--frequency-ratio"} & set(args) else ["--isolation", "90"]
    merged = dict(base)
    for key, value in zip(args[::2], args[1::2]):
        merged[key] = value
    argv = ["design", *[item for pair in merged.items() for item in pair], *tuning]
    out = run(*argv)
    assert out.returncode == 2
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1, out.stderr
    assert flag in lines[0]
    assert "Traceback" not in out.stderr


def test_evaluate_bad_and_missing_files(tmp_path):
    missing = run("evaluate", str(tmp_path / "nope.json"))
    assert missing.returncode == 2 and "no such file" in missing.stderr
    broken = tmp_path / "broken.json"
    broken.write_text('{"format": "mountsmith-project", "schema_version": 1, "design": {"machine": 3}}')
    out = run("evaluate", str(broken))
    assert out.returncode == 2
    assert "design.machine" in out.stderr and str(broken) in out.stderr
    assert len(out.stderr.strip().splitlines()) == 1
