"""The README's promises: two set-up commands, CI runs the test one, cautions present."""
from pathlib import Path

ROOT = Path(__file__).parent.parent


def _readme_commands() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    setup = text.split("## Set up and run", 1)[1].split("\n## ", 1)[0]
    blocks = setup.split("```")[1::2]
    return [block.strip() for block in blocks]


def test_readme_has_exactly_two_setup_commands():
    commands = _readme_commands()
    assert len(commands) == 2
    assert "mountsmith demo_projects/" in commands[0]
    assert "pytest" in commands[1]


def test_ci_runs_the_readme_test_command_and_nothing_else():
    lines = [line for line in (ROOT / ".ci/run").read_text().splitlines()
             if line.strip() and not line.startswith("#")]
    commands = [line for line in lines if not line.startswith(("set ", "cd "))]
    assert commands == [_readme_commands()[1]]


def test_readme_shows_the_cautions():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    for phrase in ("preliminary", "supplier", "seismic", "local building codes", "licensed engineer"):
        assert phrase in text.lower()
