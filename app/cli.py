"""The ``mountsmith`` command: opens the window, or does the same work headless.

``mountsmith [FILE]`` opens the design window. Subcommands:

* ``design``   — synthesize mount values from command-line inputs;
* ``evaluate`` — evaluate a project file;
* ``plot``     — export the plots of a project as PNG, no display needed;
* ``report``   — write the design-review sheet of a project as PDF (and PNG pages).

Bad input exits with status 2 and one line naming the field and its allowed
range. Qt is imported only by the commands that draw.
"""
from __future__ import annotations

import argparse
import json
import math
import sys
from pathlib import Path

from core.cautions import CAUTION_LINE
from core.design import DesignInputs, DesignLimits
from core.errors import InputError, MountsmithError, ProjectFileError
from core.evaluate import evaluate_project
from core.excitation import Excitation
from core.project import Project, load_project, save_project
from core.summary import summary_rows
from core.transmissibility import Damping

SUBCOMMANDS = ("design", "evaluate", "plot", "report")

#: Command-line flag for each design field, so messages name what the user typed.
FLAG_OF_FIELD = {
    "machine.mass_kg": "--mass",
    "machine.speed_rpm": "--speed",
    "machine.speed_max_rpm": "--speed-max",
    "mounts.count": "--mounts",
    "damping.damping_ratio": "--damping-ratio",
    "damping.loss_factor": "--loss-factor",
    "damping.dynamic_stiffness_ratio": "--dynamic-stiffness-ratio",
    "tuning.isolation_percent": "--isolation",
    "tuning.frequency_ratio": "--frequency-ratio",
    "excitation.force_n": "--force",
    "excitation.unbalance_g_mm": "--unbalance-gmm",
    "excitation.balance_grade_mm_s": "--balance-grade",
    "excitation.rotor_mass_kg": "--rotor-mass",
}


class _Parser(argparse.ArgumentParser):
    """argparse that reports a usage error as one line and exit status 2."""

    def error(self, message):
        self.exit(2, f"{self.prog}: {message}\n")


def _number(text: str) -> float:
    """A finite float; NaN and infinity are refused by the design's validation."""
    try:
        return float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number: {text!r}") from None


def _build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="mountsmith", description=__doc__.split("\n\n")[0])
    sub = parser.add_subparsers(dest="command", parser_class=_Parser)

    design = sub.add_parser("design", help="mount values from inputs on the command line")
    design.add_argument("--mass", type=_number, required=True, help="machine mass, kg")
    design.add_argument("--speed", type=_number, required=True, help="operating speed (lowest of a range), r/min")
    design.add_argument("--speed-max", type=_number, help="highest operating speed of a range, r/min")
    design.add_argument("--mounts", type=_number, required=True, help="number of mounts (equal load)")
    damping = design.add_mutually_exclusive_group(required=True)
    damping.add_argument("--damping-ratio", type=_number, help="viscous damping ratio ζ")
    damping.add_argument("--loss-factor", type=_number, help="elastomer loss factor η")
    design.add_argument("--dynamic-stiffness-ratio", type=_number, default=1.0,
                        help="dynamic over static stiffness of an elastomer (default 1)")
    tuning = design.add_mutually_exclusive_group(required=True)
    tuning.add_argument("--isolation", type=_number, help="target isolation at the lowest speed, %%")
    tuning.add_argument("--frequency-ratio", type=_number, help="chosen ω/ωn at the lowest speed")
    force = design.add_mutually_exclusive_group()
    force.add_argument("--force", type=_number, help="exciting force amplitude, N (0-to-peak)")
    force.add_argument("--unbalance-gmm", type=_number, help="rotating unbalance, g·mm")
    force.add_argument("--balance-grade", type=_number, help="ISO 21940-11 balance grade G, mm/s")
    design.add_argument("--rotor-mass", type=_number, help="rotor mass for --balance-grade, kg")
    design.add_argument("--name", default="Command-line design", help="project name for --save")
    design.add_argument("--json", action="store_true", help="print one JSON object (SI, unit in each key)")
    design.add_argument("--save", metavar="FILE", help="also save the design as a project file")

    evaluate = sub.add_parser("evaluate", help="evaluate a project file")
    evaluate.add_argument("file")
    evaluate.add_argument("--json", action="store_true", help="print one JSON object (SI, unit in each key)")

    plot = sub.add_parser("plot", help="export the plots of a project as PNG (no display needed)")
    plot.add_argument("file")
    plot.add_argument("--out", required=True, help="PNG file to write")
    plot.add_argument("--width", type=int, default=1800, help="pixels (default 1800)")
    plot.add_argument("--height", type=int, default=1200, help="pixels (default 1200)")

    report = sub.add_parser("report", help="write the design-review sheet as PDF (no display needed)")
    report.add_argument("file")
    report.add_argument("--out", required=True, help="PDF file to write")
    report.add_argument("--png", action="store_true", help="also write a PNG of each page beside the PDF")
    return parser


def _design_from_args(args) -> DesignInputs:
    if args.damping_ratio is not None:
        damping = Damping("viscous", args.damping_ratio)
    else:
        damping = Damping("hysteretic", args.loss_factor)
    if args.rotor_mass is not None and args.balance_grade is None:
        raise InputError("--rotor-mass", "goes with --balance-grade")
    if args.force is not None:
        excitation = Excitation("force", force_n=args.force)
    elif args.unbalance_gmm is not None:
        excitation = Excitation("unbalance", unbalance_g_mm=args.unbalance_gmm)
    elif args.balance_grade is not None:
        if args.rotor_mass is None:
            raise InputError("--rotor-mass", "is needed with --balance-grade (rotor mass > 0 kg)")
        excitation = Excitation("balance_grade", balance_grade_mm_s=args.balance_grade,
                                rotor_mass_kg=args.rotor_mass)
    else:
        excitation = Excitation()
    mounts = args.mounts
    if math.isfinite(mounts) and mounts == int(mounts):
        mounts = int(mounts)
    design = DesignInputs(
        mass_kg=args.mass, speed_rpm=args.speed, speed_max_rpm=args.speed_max, mount_count=mounts,
        damping=damping, dynamic_stiffness_ratio=args.dynamic_stiffness_ratio,
        tuning="isolation" if args.isolation is not None else "frequency_ratio",
        isolation_percent=args.isolation if args.isolation is not None else 90.0,
        frequency_ratio=args.frequency_ratio if args.frequency_ratio is not None else 3.0,
        excitation=excitation, limits=DesignLimits())
    return design.validate()


def format_table(values: dict) -> str:
    """An aligned, human-readable table of an evaluation (the same numbers as --json)."""
    rows = summary_rows(values)
    width = max(len(label) for label, _ in rows)
    lines = [f"{label:<{width}}  {text}" for label, text in rows]
    if values.get("warnings"):
        lines.append("")
        lines.extend(f"warning: {text}" for text in values["warnings"])
    lines.append("")
    lines.append(f"caution: {CAUTION_LINE}")
    return "\n".join(lines)


def _print_values(values: dict, as_json: bool) -> None:
    if as_json:
        print(json.dumps(values, indent=2, ensure_ascii=False, allow_nan=False))
    else:
        print(format_table(values))


def _fail(message: str) -> int:
    print(f"mountsmith: {message}", file=sys.stderr)
    return 2


def _flag_message(error: InputError) -> str:
    flag = FLAG_OF_FIELD.get(error.field)
    if flag is None:
        return str(error)
    shown = "" if error.value is None else f" (got {error.value!r})"
    return f"{flag}: {error.reason}{shown}"


def _display_available() -> bool:
    """Whether a window can be shown: a display on Linux, always elsewhere, or a chosen Qt platform."""
    import os
    if not sys.platform.startswith("linux") or os.environ.get("QT_QPA_PLATFORM"):
        return True
    return bool(os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY"))


def _no_display(path: str | None) -> int:
    """Without a display, say so and print the evaluation of the project instead of failing."""
    print("mountsmith: no display to open the window on (DISPLAY is not set); printing the evaluation "
          "instead. Use 'mountsmith plot FILE --out PNG' for the plots.", file=sys.stderr)
    if path is None:
        return 0
    try:
        _print_values(evaluate_project(load_project(path)), as_json=False)
    except MountsmithError as error:
        return _fail(f"{path}: {error}" if not isinstance(error, ProjectFileError) else str(error))
    return 0


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``mountsmith`` command; returns the exit status."""
    argv = list(sys.argv[1:] if argv is None else argv)
    if not argv or (argv[0] not in SUBCOMMANDS and argv[0] not in ("-h", "--help")):
        if len(argv) > 1:
            return _fail(f"expected at most one project file, got {len(argv)} arguments")
        if argv and not Path(argv[0]).is_file():
            return _fail(f"{argv[0]}: no such file")
        if not _display_available():
            return _no_display(argv[0] if argv else None)
        from app.main_window import run
        return run(argv[0] if argv else None)
    args = _build_parser().parse_args(argv)
    try:
        if args.command == "design":
            design = _design_from_args(args)
            project = Project(name=args.name, design=design)
            values = evaluate_project(project)
            if args.save:
                save_project(project, args.save)
            _print_values(values, args.json)
            return 0
        if args.command == "evaluate":
            _print_values(evaluate_project(load_project(args.file)), args.json)
            return 0
        if args.command == "plot":
            from app.export import plot_command
            return plot_command(args.file, args.out, args.width, args.height)
        if args.command == "report":
            from app.review_sheet import report_command
            return report_command(args.file, args.out, png=args.png)
    except ProjectFileError as error:
        return _fail(str(error))
    except (InputError, MountsmithError) as error:
        if args.command == "design":
            return _fail(_flag_message(error))
        return _fail(f"{args.file}: {error}")
    return 2


def run_command() -> int:
    """Console entry: :func:`main`, quiet when the reader of our output goes away (``| head``)."""
    try:
        return main()
    except BrokenPipeError:
        import os
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0


if __name__ == "__main__":
    sys.exit(run_command())
