"""The ``dxfcheck`` command: a thin layer over the library.

Each sub-command checks its options, calls one library function and prints
through :mod:`dxfcheck.output.terminal` (``--json``: :mod:`dxfcheck.output.json`).  Exit codes:

* 0 -- solved (and, for ``check``, no rule failed);
* 1 -- solved, but a rule of ``check`` failed (or warned, with ``--strict``);
* 2 -- the drawing, the project file, the spec or an option cannot be used,
  or the mechanism cannot be built or solved.  One line per problem goes to
  stderr, naming the file, the entity, the layer and the place.
"""

from __future__ import annotations

import argparse
import itertools
import json
import os
import sys
from collections.abc import Callable, Sequence
from dataclasses import replace
from typing import TYPE_CHECKING, Any

from dxfcheck.core.deadline import TimeLimitExceeded
from dxfcheck.core.errors import ConfigError, DxfcheckError, LimitError, VerificationError
from dxfcheck.core.imports import when_imported
from dxfcheck.core.textsafe import one_line

if TYPE_CHECKING:
    from dxfcheck.core.config import Config

__all__ = ["EXIT_CHECK_FAILED", "EXIT_INTERNAL", "EXIT_NOT_BRAKING", "EXIT_OK", "EXIT_UNUSABLE", "main"]

EXIT_OK = 0
EXIT_CHECK_FAILED = 1
EXIT_UNUSABLE = 2
#: ``solve``: solved, but in some direction the drawing does not brake.
EXIT_NOT_BRAKING = 1
#: dxfcheck itself went wrong: a solution failed its own checks, or an
#: unexpected error; no result was reported.
EXIT_INTERNAL = 3

#: Tests set this to see internal errors as exceptions instead of one line.
INTERNAL_ERRORS_RAISE = False

#: Time bound of one command [s]; ``--timeout`` raises it.
DEFAULT_TIMEOUT_S = 300.0
#: Most samples of ``solve --samples`` (the value of
#: :data:`dxfcheck.statics.sampling.MAX_SAMPLES`, kept here so that the options
#: are read without importing numpy; a test keeps the two equal).
MAX_SAMPLES = 1_000_000


#: Largest ``--max-size`` accepted [bytes]: far above any drawing, and a
#: number the size checks can compare with.
MAX_SIZE_LIMIT_BYTES = 100_000_000_000
#: Longest ``--timeout`` accepted [s] (one week): a run bounded in time.
MAX_TIMEOUT_S = 604_800.0


def _max_bytes(args: argparse.Namespace) -> int | None:
    import math

    if args.max_size is None:
        return None
    text = args.max_size.strip().upper().replace(" ", "")
    factor = 1e6
    for suffix, f in (("GB", 1e9), ("MB", 1e6), ("KB", 1e3)):
        if text.endswith(suffix):
            text, factor = text[: -len(suffix)], f
            break
    try:
        value = float(text) * factor
    except ValueError:
        raise ConfigError(f"--max-size: {args.max_size!r} is not a size such as '500MB'") from None
    if not (math.isfinite(value) and 1 <= value <= MAX_SIZE_LIMIT_BYTES):
        raise ConfigError(
            f"--max-size must be a size above 0 and at most {MAX_SIZE_LIMIT_BYTES / 1e9:g} GB, got {args.max_size!r}"
        )
    return int(value)


def _seconds(text: str) -> float:
    """``--timeout``: a finite number of seconds above 0 (argparse type)."""
    import math

    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number of seconds") from None
    if not (math.isfinite(value) and 0 < value <= MAX_TIMEOUT_S):
        raise argparse.ArgumentTypeError(
            f"must be a number of seconds above 0 and at most {MAX_TIMEOUT_S:g} (one week), got {text!r}"
        )
    return value


def _count(option: str, low: int, high: int) -> Any:
    """An argparse type: a whole number from ``low`` to ``high``."""

    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
        if not low <= value <= high:
            raise argparse.ArgumentTypeError(f"must be from {low:,} to {high:,}, got {text}")
        return value

    parse.__name__ = option  # argparse names the option in its message
    return parse


def _time_limit_error(args: argparse.Namespace, exc: TimeLimitExceeded) -> LimitError:
    option = "--timeout"
    where = f" while {exc.stage}" if exc.stage else ""
    return LimitError(
        f"took longer than {exc.seconds:g} s ({option}){where}; stopped with no result. "
        f"Raise {option} if the drawing is that big",
        path=_subject(args) or None,
    )


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # type: ignore[override]
        self.print_usage(sys.stderr)
        sys.stderr.write(f"dxfcheck: error: {message}\n")
        raise SystemExit(EXIT_UNUSABLE)


def _common(s: argparse.ArgumentParser) -> None:
    s.add_argument("drawing", help="the DXF or DWG drawing (it is only read; DWG needs the extra dwg)")
    s.add_argument("--config", default=None, help="project file (default: the nearest dxfcheck.toml)")
    s.add_argument("--units", default=None, help="drawing unit, overriding $INSUNITS (mm, cm, m, inch, ft)")
    s.add_argument("--tolerance", default=None, help="'lies on' tolerance, e.g. '0.05mm' (default: scaled)")
    s.add_argument("--json", action="store_true", help="print one JSON document instead of tables")
    s.add_argument("--max-size", default=None, metavar="MB", help="refuse larger drawings (default 200 MB)")
    s.add_argument(
        "--skeleton-from",
        choices=("auto", "layers", "geometry"),
        default=None,
        help="the skeleton from the role layers, inferred from the geometry, or auto (layers when they hold one)",
    )
    s.add_argument(
        "--timeout",
        type=_seconds,
        default=DEFAULT_TIMEOUT_S,
        metavar="S",
        help=f"give up after this many seconds (default {DEFAULT_TIMEOUT_S:g})",
    )


def _shoe_options(s: argparse.ArgumentParser) -> None:
    s.add_argument(
        "--shoe-model",
        choices=("short", "long", "auto"),
        default=None,
        help="shoe theory (default auto: long-shoe theory above the threshold)",
    )
    s.add_argument(
        "--long-threshold",
        type=float,
        default=None,
        metavar="DEG",
        help="contact angle above which auto takes long-shoe theory (default 60)",
    )


def _add_solve_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck solve``."""
    _common(s)
    s.add_argument("--mu", default=None, help="friction coefficient (default 0.35), or a range 0.30..0.45 to sample")
    s.add_argument("--effort", default=None, help="magnitude of every load, e.g. '1.2kN' (default: the texts)")
    s.add_argument("--direction", choices=("cw", "ccw", "both"), default="both", help="drum direction(s)")
    s.add_argument("--torque", default=None, help="find the effort that gives this braking torque, e.g. '450 N*m'")
    s.add_argument(
        "--samples",
        type=_count("--samples", 1, MAX_SAMPLES),
        default=None,
        help=f"sample μ and the pin positions this many times (at most {MAX_SAMPLES:,})",
    )
    s.add_argument("--pin-tolerance", default="0mm", help="with --samples: each pin within ± this, e.g. 0.2mm")
    s.add_argument("--seed", type=_count("--seed", 0, 2**63 - 1), default=0, help="with --samples: the random seed")
    s.add_argument(
        "--spring-tolerance", type=float, default=0.0, help="with --samples: each spring's force within ± this fraction"
    )
    s.add_argument("--required-torque", default=None, help="with --samples: report P(torque below this)")
    s.add_argument("--svg", default=None, metavar="OUT.svg", help="with --samples: torque against μ as SVG")
    _shoe_options(s)
    _annotate_shortcut(s)


def _add_check_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck check``."""
    _common(s)
    s.add_argument("--mu", default=None, help="nominal friction coefficient (spec key mu)")
    s.add_argument("--mu-min", default=None, help="lowest friction coefficient (spec key mu_min)")
    s.add_argument("--mu-max", default=None, help="highest friction coefficient (spec key mu_max)")
    s.add_argument("--required-torque", default=None, help="duty torque, e.g. '450 N*m' (spec key required_torque)")
    s.add_argument("--effort", default=None, help="magnitude of every load, e.g. '1.2kN' (spec key effort)")
    s.add_argument(
        "--set",
        action="append",
        default=[],
        metavar="KEY=VALUE",
        help="any spec value, e.g. --set pin_shear_allow=50MPa --set pins.S1.pin_length=40mm (repeatable)",
    )
    s.add_argument("--junit", default=None, metavar="FILE", help="also write JUnit XML, one test case per rule")
    s.add_argument("--strict", action="store_true", help="warnings fail the gate too")
    s.add_argument(
        "--record", default=None, metavar="OUT.html", help="also write the calculation record (HTML, self-contained)"
    )
    s.add_argument(
        "--signoff",
        action="append",
        default=[],
        metavar="KEY=VALUE",
        help="a sign-off field of the record: prepared_by, prepared_on, checked_by, checked_on, approved_by, "
        "approved_on (repeatable; left blank otherwise)",
    )
    _shoe_options(s)
    _annotate_shortcut(s)


def _add_annotate_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck annotate``."""
    _common(s)
    s.add_argument(
        "-o", "--output", default=None, metavar="OUT.dxf", help="marked-up copy (default DRAWING-forces.dxf)"
    )
    s.add_argument("--svg", default=None, metavar="OUT.svg", help="also write a picture as SVG")
    s.add_argument("--png", default=None, metavar="OUT.png", help="also write a picture as PNG (extra 'png')")
    s.add_argument("--direction", choices=("cw", "ccw"), default=None, help="drum direction (default: the weaker)")
    s.add_argument("--mu", type=float, default=None, help="lining-drum friction coefficient (default 0.35)")
    s.add_argument("--effort", default=None, help="magnitude of every load, e.g. '1.2kN' (default: the texts)")
    s.add_argument("--force", action="store_true", help="replace existing output files")
    _shoe_options(s)


def _add_skeleton_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck skeleton``."""
    _common(s)
    s.add_argument(
        "-o", "--output", default=None, metavar="OUT.dxf", help="skeleton drawing (default DRAWING-skeleton.dxf)"
    )
    s.add_argument("--over", action="store_true", help="write it over a faded copy of the drawing (default: alone)")
    s.add_argument("--svg", default=None, metavar="OUT.svg", help="also draw the skeleton as SVG")
    s.add_argument("--force", action="store_true", help="replace existing output files")


def _add_compare_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck compare``."""
    s.add_argument("drawings", nargs="+", help="OLD.dxf NEW.dxf [MORE.dxf ...] or a folder (sorted by name)")
    s.add_argument("--config", default=None, help="project file (default: the nearest dxfcheck.toml)")
    s.add_argument("--units", default=None, help="drawing unit, overriding $INSUNITS")
    s.add_argument(
        "--max-torque-drop", default=None, metavar="PCT", help="fail when torque drops more (default 5%%; 'none': off)"
    )
    s.add_argument(
        "--max-force-rise", default=None, metavar="PCT", help="fail when a force rises more (default 10%%; 'none': off)"
    )
    s.add_argument("--set", action="append", default=[], metavar="KEY=VALUE", help="spec value for every revision")
    s.add_argument("--annotate", default=None, metavar="OUT.dxf", help="mark moved pins and grown forces on NEW")
    s.add_argument("--svg", default=None, metavar="OUT.svg", help="plot the trend across revisions")
    s.add_argument("--force", action="store_true", help="replace existing output files")
    s.add_argument("--json", action="store_true", help="print one JSON document instead of tables")
    s.add_argument("--max-size", default=None, metavar="MB", help="refuse larger drawings (default 200 MB)")
    s.add_argument("--timeout", type=_seconds, default=DEFAULT_TIMEOUT_S, metavar="S", help="give up after S seconds")
    s.add_argument("--skeleton-from", choices=("auto", "layers", "geometry"), default=None, help="as for solve")


def _add_linings_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck linings``."""
    s.add_argument("--json", action="store_true", help="print one JSON document instead of a table")
    s.set_defaults(timeout=None)


def _add_batch_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck batch``."""
    s.add_argument("paths", nargs="+", help="drawings, folders (searched recursively) or glob patterns")
    s.add_argument(
        "--jobs", type=int, default=None, help="worker processes (default: the CPU cores; at most 4 per core)"
    )
    s.add_argument(
        "--timeout-each",
        type=float,
        default=None,
        metavar="S",
        help="time limit of each drawing; over it the drawing is stopped and reported 'timeout' (default 120)",
    )
    s.add_argument("--max-size", default=None, metavar="MB", help="refuse larger drawings (default 200 MB)")
    s.add_argument("--units", default=None, help="drawing unit for every drawing, overriding $INSUNITS")
    s.add_argument("--tolerance", default=None, help="'lies on' tolerance, e.g. '0.05mm' (default: scaled)")
    s.add_argument("--strict", action="store_true", help="warnings fail the batch too (exit 1)")
    s.add_argument(
        "--follow-symlinks", action="store_true", help="follow symbolic links that lead out of the folders given"
    )
    s.add_argument("--config", default=None, help="project file for every drawing (default: each one's nearest)")
    s.add_argument("--set", action="append", default=[], metavar="KEY=VALUE", help="spec value for every drawing")
    s.add_argument(
        "--skeleton-from",
        choices=("auto", "layers", "geometry"),
        default=None,
        help="as for solve, for every drawing (default: each one's [infer] skeleton_from)",
    )
    s.add_argument(
        "--records",
        default=None,
        metavar="DIR",
        help="write the calculation record of each drawing into DIR, with an index page (index.html)",
    )
    s.add_argument("--no-cache", action="store_true", help="check every drawing again")
    s.add_argument("--cache-dir", default=None, help="cache folder (default ~/.cache/dxfcheck)")
    s.add_argument("--json", action="store_true", help="print the per-drawing results as JSON")
    s.add_argument("--csv", action="store_true", help="print the per-drawing results as CSV")
    s.add_argument(
        "--timeout", type=_seconds, default=None, metavar="S", help="give up after S seconds (default: none)"
    )
    s.add_argument(
        "--scheduler",
        default=None,
        metavar="ADDRESS",
        help="run on a Dask distributed cluster, e.g. tcp://10.0.0.5:8786 (extra 'cluster')",
    )


def _add_hook_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck hook``."""
    s.add_argument("mode", choices=("check", "compare"), help="check: the release gate; compare: against --rev")
    s.add_argument("drawings", nargs="+", help="the DXF files (pre-commit passes the changed ones)")
    s.add_argument("--rev", default="HEAD", help="compare: the committed revision (default HEAD)")
    s.add_argument("--config", default=None, help="project file (default: each drawing's nearest)")
    s.add_argument("--set", action="append", default=[], metavar="KEY=VALUE", help="spec value for every drawing")
    s.add_argument("--strict", action="store_true", help="check: warnings fail too")
    s.add_argument("--max-torque-drop", default=None, metavar="PCT", help="compare: as for compare")
    s.add_argument("--max-force-rise", default=None, metavar="PCT", help="compare: as for compare")
    s.set_defaults(timeout=None)


def _add_schema_options(s: argparse.ArgumentParser) -> None:
    """The options of ``dxfcheck schema``."""
    s.add_argument("name", nargs="?", default=None, help="solve, check, compare, batch, sensitivity or error")
    s.set_defaults(timeout=None)


#: Each sub-command: its line in ``dxfcheck --help`` and the function that
#: adds its options (only the chosen one's are added: a command line builds
#: one sub-command's options, not all of them).
_COMMANDS: dict[str, tuple[str, Callable[[argparse.ArgumentParser], None]]] = {
    "solve": ("solve the pin forces, shoe forces and braking torque of a drawing", _add_solve_options),
    "check": ("solve a drawing and judge it against the brake's spec (release gate)", _add_check_options),
    "annotate": ("write a copy of the drawing with the force vectors on a new layer", _add_annotate_options),
    "skeleton": (
        "write the skeleton dxfcheck reads (inferred or from the layers) on the role layers",
        _add_skeleton_options,
    ),
    "compare": ("compare revisions of a drawing: what the change did to the loads", _add_compare_options),
    "linings": ("list the lining library (lining = NAME in the spec) with its sources", _add_linings_options),
    "batch": ("check every drawing in folders or globs, in parallel, with a cache", _add_batch_options),
    "hook": ("for pre-commit: check each drawing named, or compare it with its committed revision", _add_hook_options),
    "schema": ("print the JSON Schema of a --json document (without NAME: list the names)", _add_schema_options),
}


def _chosen(argv: Sequence[str] | None) -> str | None:
    """The sub-command named on the command line (the first word that is no
    option: the top level has only ``--help`` and ``--version``), or None."""
    words = sys.argv[1:] if argv is None else argv
    return next((w for w in words if not w.startswith("-")), None)


def _parser(argv: Sequence[str] | None = None) -> argparse.ArgumentParser:
    """The command line's parser; with ``argv``, only the sub-command it
    names gets its options (every one when it names none it knows)."""
    from dxfcheck.core.version import __version__

    p = _Parser(prog="dxfcheck", description="Check the statics of drum-brake linkages drawn in DXF (or DWG).")
    p.add_argument("--version", action="version", version=f"dxfcheck {__version__}")
    sub = p.add_subparsers(dest="command", required=True, parser_class=_Parser)
    chosen = _chosen(argv)
    everyone = chosen not in _COMMANDS
    for name, (summary, add_options) in _COMMANDS.items():
        s = sub.add_parser(name, help=summary)
        if everyone or name == chosen:
            add_options(s)
    return p


def _config(args: argparse.Namespace) -> Config:
    """The drawing's configuration with ``--skeleton-from`` applied."""
    from dxfcheck.pipeline import resolve_config

    return _with_skeleton_from(resolve_config(args.drawing, args.config), args)


def _with_skeleton_from(cfg: Config, args: argparse.Namespace) -> Config:
    """``cfg`` with ``--skeleton-from`` (when given) over ``[infer] skeleton_from``."""
    if getattr(args, "skeleton_from", None):
        return replace(cfg, infer=replace(cfg.infer, skeleton_from=args.skeleton_from))
    return cfg


def _annotate_shortcut(s: argparse.ArgumentParser) -> None:
    s.add_argument("--annotate", default=None, metavar="OUT.dxf", help="also write the marked-up copy")
    s.add_argument("--force", action="store_true", help="replace an existing --annotate output")


def _quantity(text: str, option: str, dimension: str, default_unit: str | None = None) -> float:
    """A quantity option's value [internal unit], read and checked for its
    range (:func:`dxfcheck.gate.spec.check_quantity`); the message names the
    option."""
    from dxfcheck.core.units import UnitError, parse_quantity
    from dxfcheck.gate.spec import check_quantity

    try:
        value = parse_quantity(text, dimension, default_unit=default_unit).value
    except UnitError as exc:
        raise ConfigError(f"{option}: {exc}") from exc
    return check_quantity(dimension, value, option)


def _number(value: float, option: str, key: str) -> float:
    """A number option checked against the range of its spec key."""
    from dxfcheck.gate.spec import check_number

    return check_number(key, value, option)


def _tolerance(args: argparse.Namespace) -> float | None:
    if not args.tolerance:
        return None
    tol = _quantity(args.tolerance, "--tolerance", "length", "mm")
    if tol <= 0:
        raise ConfigError("--tolerance must be positive")
    return tol


def _shoe_kwargs(args: argparse.Namespace) -> dict[str, Any]:
    from dxfcheck.statics.contact import LONG_SHOE_THRESHOLD_DEG

    threshold = args.long_threshold
    return {
        "shoe_model": args.shoe_model or "auto",
        "long_threshold_deg": LONG_SHOE_THRESHOLD_DEG
        if threshold is None
        else _number(threshold, "--long-threshold", "long_shoe_threshold"),
    }


def _effort_mu(args: argparse.Namespace) -> tuple[float | None, float]:
    from dxfcheck.pipeline import DEFAULT_MU

    effort = _quantity(args.effort, "--effort", "force") if args.effort else None
    return effort, DEFAULT_MU if args.mu is None else _number(args.mu, "--mu", "mu")


def _mu_arg(text: str | None) -> tuple[float | None, tuple[float, float] | None]:
    if text is None:
        return None, None
    try:
        values = [float(x) for x in text.split("..", 1)]
    except ValueError:
        raise ConfigError(f"--mu: {text!r} is not a number or a range such as 0.30..0.45") from None
    # a number out of range is said as such (the ConfigError of _number), not as "not a number"
    checked = [_number(v, "--mu", "mu") for v in values]
    return (None, (checked[0], checked[1])) if len(checked) == 2 else (checked[0], None)


def _sensitivity(args: argparse.Namespace, mu_range: tuple[float, float]) -> int:
    from dxfcheck.core.files import write_atomic
    from dxfcheck.output.json import sensitivity_to_dict, write_json
    from dxfcheck.output.terminal import print_sensitivity
    from dxfcheck.pipeline import sensitivity
    from dxfcheck.revision.compare import history_svg

    tol = _quantity(args.pin_tolerance, "--pin-tolerance", "length", "mm")
    req = _quantity(args.required_torque, "--required-torque", "torque") if args.required_torque else None
    effort = _quantity(args.effort, "--effort", "force") if args.effort else None
    if args.svg:
        from dxfcheck.core.files import check_target

        check_target(args.svg, force=False, protect=(args.drawing,), text=True)
    report_to = _report_stream(args, args.svg)
    directions = ("cw", "ccw") if args.direction == "both" else (args.direction,)
    res = sensitivity(
        args.drawing,
        mu_range=mu_range,
        samples=args.samples,
        pin_tolerance_mm=tol,
        seed=args.seed,
        directions=directions,
        config=_config(args),
        units=args.units,
        tolerance_mm=_tolerance(args),
        effort_N=effort,
        required_torque_Nm=req,
        max_bytes=_max_bytes(args),
        spring_tolerance=args.spring_tolerance,
        **_shoe_kwargs(args),
    )
    if args.svg:
        pts = {d: c[::4] for d, c in res.curve.items()}
        labels = [f"{m:.3g}" for m, _ in next(iter(pts.values()))]
        series = {f"torque {d}": [t for _, t in c] for d, c in pts.items()}
        write_atomic(args.svg, history_svg(labels, series, "N·m"), protect=(args.drawing,))
    if args.json:
        write_json(sensitivity_to_dict(res, args.drawing))
    else:
        print_sensitivity(res, args.drawing, out=report_to)
    return EXIT_OK


def _solve(args: argparse.Namespace) -> int:
    from dxfcheck.output.solve_json import solution_to_dict, write_json
    from dxfcheck.pipeline import DEFAULT_MU, analyse

    mu_value, mu_range = _mu_arg(args.mu)
    if args.samples is not None:
        if mu_range is None:
            m = 0.35 if mu_value is None else mu_value
            mu_range = (m, m)
        return _sensitivity(args, mu_range)
    if mu_range is not None:
        raise ConfigError("a μ range needs --samples")
    args.mu = mu_value
    effort, mu = _effort_mu(args)
    torque = _quantity(args.torque, "--torque", "torque") if args.torque else None
    directions = ("cw", "ccw") if args.direction == "both" else (args.direction,)
    cfg = _config(args)
    sol = analyse(
        args.drawing,
        mu=mu,
        effort_N=effort,
        directions=directions,
        config=cfg,
        units=args.units,
        tolerance_mm=_tolerance(args),
        max_bytes=_max_bytes(args),
        torque_Nm=torque,
        **_shoe_kwargs(args),
    )
    if args.annotate:
        from dxfcheck.output.annotate import annotate

        annotate(sol, out=args.annotate, config=cfg, force=args.force)
    if args.json:
        write_json(solution_to_dict(sol))
    else:
        from dxfcheck.output.terminal import print_solution  # the tables only when printed

        notes = () if args.mu is not None else (f"μ = {DEFAULT_MU} assumed (no --mu given)",)
        print_solution(sol, notes=notes)
    # solved, but in some direction the drawing is no brake (a shoe pulls, a band pushes, it self-locks)
    return EXIT_OK if all(c.brakes for c in sol.cases) else EXIT_NOT_BRAKING


def _check(args: argparse.Namespace) -> int:
    from dxfcheck.core.files import Target, check_targets, write_atomic
    from dxfcheck.gate.rules import Verdict
    from dxfcheck.gate.spec import parse_assignment
    from dxfcheck.output.json import judgement_to_dict, write_json
    from dxfcheck.output.junit import junit_xml
    from dxfcheck.output.terminal import print_judgement
    from dxfcheck.pipeline import check

    overrides = [parse_assignment(s) for s in args.set]
    for key, value in (
        ("mu", args.mu),
        ("mu_min", args.mu_min),
        ("mu_max", args.mu_max),
        ("required_torque", args.required_torque),
        ("effort", args.effort),
        ("shoe_model", args.shoe_model),
        ("long_shoe_threshold", None if args.long_threshold is None else str(args.long_threshold)),
    ):
        if value is not None:
            overrides.append((key, value))
    signoff = _signoff(args.signoff)
    check_targets(
        [Target(args.annotate, args.force), Target(args.junit, True, text=True), Target(args.record, args.force)],
        protect=(args.drawing,),
    )
    report_to = _report_stream(args, args.junit)
    cfg = _config(args)
    j = check(
        args.drawing,
        config=cfg,
        overrides=overrides,
        units=args.units,
        tolerance_mm=_tolerance(args),
        max_bytes=_max_bytes(args),
    )
    if args.annotate:
        from dxfcheck.output.annotate import annotate

        annotate(j.nominal, out=args.annotate, judgement=j, config=cfg, force=args.force)
    if args.junit:
        write_atomic(args.junit, junit_xml(j, strict=args.strict), protect=(args.drawing,))
    if args.record:
        from dxfcheck.output.record import write_record

        write_record(j, args.record, signoff=signoff, force=args.force)
    if args.json:
        write_json(judgement_to_dict(j))
    else:
        print_judgement(j, out=report_to, strict=args.strict)
    failed = j.verdict is Verdict.FAIL or (args.strict and j.verdict is Verdict.WARN)
    return EXIT_CHECK_FAILED if failed else EXIT_OK


def _signoff(items: Sequence[str]) -> Any:
    """The record's sign-off fields from ``--signoff KEY=VALUE``."""
    import dataclasses

    from dxfcheck.output.record import Signoff

    keys = [f.name for f in dataclasses.fields(Signoff)]
    given: dict[str, str] = {}
    for item in items:
        key, sep, value = item.partition("=")
        if not sep or key.strip() not in keys:
            raise ConfigError(f"--signoff {one_line(item)!r}: give KEY=VALUE with KEY one of {', '.join(keys)}")
        given[key.strip()] = value.strip()
    return Signoff(**given)


def _annotate(args: argparse.Namespace) -> int:
    from pathlib import Path

    from dxfcheck.output.annotate import annotate
    from dxfcheck.pipeline import analyse

    effort, mu = _effort_mu(args)
    cfg = _config(args)
    out = args.output
    p_in = Path(args.drawing)
    if out is None:
        p = p_in
        suffix = ".dxf" if p.suffix.lower() in ("", ".dwg") else p.suffix  # a DWG's copy is DXF
        out = str(p.with_name(f"{p.stem}-forces{suffix}"))
    sol = analyse(
        args.drawing,
        mu=mu,
        effort_N=effort,
        config=cfg,
        units=args.units,
        tolerance_mm=_tolerance(args),
        max_bytes=_max_bytes(args),
        **_shoe_kwargs(args),
    )
    written = annotate(sol, out=out, svg=args.svg, png=args.png, direction=args.direction, config=cfg, force=args.force)
    notes = sys.stderr if _report_stream(args, args.svg) else sys.stdout  # the SVG itself may be on stdout
    as_dxf = " (as DXF: the marked-up copy of a DWG drawing is DXF)" if p_in.suffix.lower() == ".dwg" else ""
    for w in written:
        if str(w) != "-":
            notes.write(f"wrote {w}{as_dxf if str(w).lower().endswith('.dxf') else ''}\n")
    return EXIT_OK


def _skeleton(args: argparse.Namespace) -> int:
    from pathlib import Path

    from dxfcheck.core.findings import has_errors
    from dxfcheck.output.skeleton_dxf import write_skeleton
    from dxfcheck.output.terminal import print_skeleton
    from dxfcheck.pipeline import read_mechanism

    cfg = _config(args)
    out = args.output
    if out is None:
        p = Path(args.drawing)
        out = str(p.with_name(f"{p.stem}-skeleton{p.suffix or '.dxf'}"))
    mech = read_mechanism(
        args.drawing, config=cfg, units=args.units, tolerance_mm=_tolerance(args), max_bytes=_max_bytes(args)
    )
    written = write_skeleton(mech, out, config=cfg, over=args.over, svg=args.svg, force=args.force)
    if args.json:
        from dxfcheck.output.solve_json import skeleton_to_dict, write_json

        write_json(skeleton_to_dict(mech, written))
    else:
        print_skeleton(mech, written, out=sys.stderr if args.svg == "-" else sys.stdout)
    return EXIT_OK if not has_errors(list(mech.findings)) else EXIT_UNUSABLE


def _subject(args: argparse.Namespace) -> str:
    many = getattr(args, "drawings", None) or getattr(args, "paths", None) or []
    return str(getattr(args, "drawing", None) or " ".join(many))


def _revisions(items: Sequence[str]) -> list[str]:
    """The drawings to compare: files as named, folders' ``*.dxf`` and
    ``*.dwg`` in name order.  dxfcheck's own outputs (the marker, whatever their name) are
    skipped in a folder, with a note, and refused when named."""
    from pathlib import Path

    from dxfcheck.core.files import is_dxfcheck_output

    out: list[str] = []
    for item in items:
        p = Path(item)
        if p.is_dir():
            for x in sorted(str(x) for pattern in ("*.dxf", "*.dwg") for x in p.glob(pattern)):
                if is_dxfcheck_output(x):
                    sys.stderr.write(f"dxfcheck: {x}: skipped: a marked-up copy dxfcheck wrote, not a revision\n")
                else:
                    out.append(x)
        elif is_dxfcheck_output(item):
            raise ConfigError("is a marked-up copy dxfcheck wrote; compare the drawings themselves", path=item)
        else:
            out.append(item)
    return out


def _report_stream(args: argparse.Namespace, *targets: str | None) -> Any:
    """Where the terminal report goes: None (standard output), or standard
    error when an output is written to standard output (``-``); with
    ``--json`` that is refused (two documents on one stream)."""
    if "-" not in targets:
        return None
    if getattr(args, "json", False):
        raise ConfigError("--json and an output to '-' would both go to standard output; name a file for one of them")
    return sys.stderr


def _compare(args: argparse.Namespace) -> int:
    from dxfcheck.core import progress
    from dxfcheck.core.files import Target, check_targets, write_atomic
    from dxfcheck.gate.spec import parse_assignment
    from dxfcheck.output.annotate import mark_revision
    from dxfcheck.output.json import comparisons_to_dict, write_json
    from dxfcheck.output.terminal import print_comparisons
    from dxfcheck.pipeline import check, resolve_config
    from dxfcheck.revision.compare import (
        compare_judgements,
        parse_fraction,
        resolve_thresholds,
        trend_svg,
    )

    names = _revisions(args.drawings)
    if len(names) < 2:
        raise ConfigError("compare needs at least two drawings (or a folder holding them)")
    check_targets([Target(args.annotate, args.force), Target(args.svg, args.force, text=True)], protect=tuple(names))
    report_to = _report_stream(args, args.svg)
    for text, option in ((args.max_torque_drop, "--max-torque-drop"), (args.max_force_rise, "--max-force-rise")):
        if text is not None:
            parse_fraction(text, option)  # refused before any drawing is read
    overrides = [parse_assignment(s) for s in args.set]
    judgements = []
    with progress.task("checking revisions", len(names)) as bar:
        for name in names:
            cfg = _with_skeleton_from(resolve_config(name, args.config), args)
            judgements.append(
                check(name, config=cfg, overrides=overrides, units=args.units, max_bytes=_max_bytes(args))
            )
            bar.advance()
    spec = judgements[-1].spec
    thresholds = resolve_thresholds(args.max_torque_drop, args.max_force_rise, spec)
    comps = [compare_judgements(a, b, thresholds) for a, b in itertools.pairwise(judgements)]
    if args.annotate:
        mark_revision(comps[-1], args.annotate, resolve_config(names[-1], args.config), force=args.force)
    if args.svg:
        write_atomic(args.svg, trend_svg(comps), force=args.force, protect=tuple(names))
    if args.json:
        write_json(comparisons_to_dict(comps, names))
    else:
        print_comparisons(comps, out=report_to)
    return EXIT_CHECK_FAILED if any(c.failed for c in comps) else EXIT_OK


def _batch_options(args: argparse.Namespace) -> Any:
    from dxfcheck.batch import CheckOptions
    from dxfcheck.gate.spec import parse_assignment

    return CheckOptions(
        config=args.config,
        overrides=tuple(parse_assignment(s) for s in args.set),
        units=args.units,
        tolerance_mm=_tolerance(args),
        max_bytes=_max_bytes(args),
        records_dir=_records_dir(args.records),
        skeleton_from=args.skeleton_from,
    )


def _records_dir(folder: str | None) -> str | None:
    """The folder for ``batch --records`` (made if missing), absolute."""
    import os

    if folder is None:
        return None
    if os.path.exists(folder) and not os.path.isdir(folder):
        raise ConfigError(f"--records {one_line(folder)}: not a folder")
    os.makedirs(folder, exist_ok=True)
    return os.path.abspath(folder)


def _batch(args: argparse.Namespace) -> int:
    from dxfcheck.batch import DEFAULT_TIMEOUT_EACH_S, check_inputs, find_drawings, results_csv, results_json, run_batch
    from dxfcheck.output.json import write_json
    from dxfcheck.output.terminal import batch_progress, print_batch

    options = _batch_options(args)
    timeout_each = DEFAULT_TIMEOUT_EACH_S if args.timeout_each is None else args.timeout_each
    check_inputs(options, jobs=args.jobs, timeout_each_s=timeout_each)  # before the folders are searched
    found = find_drawings(args.paths, follow_symlinks=args.follow_symlinks)
    for s in found.skipped:
        sys.stderr.write(f"dxfcheck: {s.path}: skipped: {s.reason}\n")
    if not found.drawings:
        raise ConfigError(f"no drawings found in {' '.join(args.paths)}" + (" (some skipped)" if found.skipped else ""))
    paths = list(found.drawings)
    quiet = args.json or args.csv
    with batch_progress(len(paths), enabled=not quiet) as on_result:
        if args.scheduler:
            from dxfcheck.batch import run_on_cluster

            result = run_on_cluster(
                paths,
                args.scheduler,
                options=options,
                use_cache=not args.no_cache,
                cache_dir=args.cache_dir,
                on_result=on_result,
            )
        else:
            result = run_batch(
                paths,
                jobs=args.jobs,
                options=options,
                use_cache=not args.no_cache,
                cache_dir=args.cache_dir,
                on_result=on_result,
                timeout_each_s=timeout_each,
            )
    result.skipped = found.skipped
    if options.records_dir is not None:
        from dxfcheck.output.record import write_index

        write_index(result.results, options.records_dir)
    for note in result.notes:
        sys.stderr.write(f"dxfcheck: note: {note}\n")
    if result.interrupted:
        sys.stderr.write(f"dxfcheck: interrupted by {result.signal}: {len(result.results)} of {len(paths)} checked\n")
    if args.json:
        write_json(results_json(result))
    elif args.csv:
        sys.stdout.write(results_csv(result))
    else:
        print_batch(result)
    return _batch_exit(result, strict=args.strict)


def _linings(args: argparse.Namespace) -> int:
    from dxfcheck.gate.linings import LININGS
    from dxfcheck.output.json import linings_to_dict, write_json
    from dxfcheck.output.terminal import print_linings

    if args.json:
        write_json(linings_to_dict(LININGS.values()))
    else:
        print_linings(LININGS.values())
    return EXIT_OK


def _hook_argv(args: argparse.Namespace, drawing: str, rev_dir: Any) -> list[str] | None:
    """The command line one drawing of the hook runs, or None (a new drawing
    has no committed revision to compare with)."""
    from pathlib import Path

    from dxfcheck.core.config import find_config
    from dxfcheck.revision.committed import committed_copy

    extra = [x for s in args.set for x in ("--set", s)]
    if args.mode == "check":
        config = ["--config", args.config] if args.config else []
        return ["check", drawing, *config, *extra, *(["--strict"] if args.strict else [])]
    old = committed_copy(Path(drawing), args.rev, Path(rev_dir))
    if old is None:
        sys.stdout.write(f"dxfcheck: {drawing}: new, not in {args.rev}: nothing to compare\n")
        return None
    project = args.config or find_config(Path(drawing))  # the copy lies outside the project: name its file
    config = ["--config", str(project)] if project else []
    for option, value in (("--max-torque-drop", args.max_torque_drop), ("--max-force-rise", args.max_force_rise)):
        config += [option, value] if value is not None else []
    return ["compare", str(old), drawing, *config, *extra]


def _hook(args: argparse.Namespace) -> int:
    """Each drawing in turn (a check, or a compare with its committed
    revision); the exit code is the worst of theirs."""
    import tempfile

    worst = EXIT_OK
    for drawing in args.drawings:
        with tempfile.TemporaryDirectory(prefix="dxfcheck-hook-") as rev_dir:
            argv = _hook_argv(args, drawing, rev_dir)
            if argv is not None:
                sys.stdout.flush()
                worst = max(worst, _main(argv))
    return worst


def _schema(args: argparse.Namespace) -> int:
    from dxfcheck.output.schemas import DOCUMENTS, SCHEMA_NAMES, schema_text

    if args.name is None:
        for name in SCHEMA_NAMES:
            sys.stdout.write(f"{name:<12} {DOCUMENTS.get(name, 'the refusal document of solve, check, compare')}\n")
        return EXIT_OK
    try:
        sys.stdout.write(schema_text(args.name))
    except KeyError:
        raise ConfigError(f"schema: no schema named {args.name!r} (names: {', '.join(SCHEMA_NAMES)})") from None
    return EXIT_OK


def _batch_exit(result: Any, *, strict: bool) -> int:
    import signal

    counts = result.counts()
    if result.interrupted:
        return 128 + int(getattr(signal, result.signal or "SIGINT", signal.SIGINT))
    if counts["error"] or counts["timeout"]:
        return EXIT_UNUSABLE
    return EXIT_CHECK_FAILED if counts["fail"] or (strict and counts["warn"]) else EXIT_OK


def _json_error(args: argparse.Namespace, exc: DxfcheckError, *, internal: bool = False) -> None:
    """With ``--json``, a refusal still prints one JSON document on stdout."""
    if not getattr(args, "json", False) or args.command not in ("solve", "check", "compare"):
        return
    from dxfcheck.output.solve_json import CHECK_SCHEMA, COMPARE_SCHEMA, SOLVE_SCHEMA, error_document

    schema = {"check": CHECK_SCHEMA, "compare": COMPARE_SCHEMA}.get(args.command, SOLVE_SCHEMA)
    drawing = str(args.drawing) if getattr(args, "drawing", None) else None
    print(json.dumps(error_document(exc, schema, drawing, internal=internal), indent=2, allow_nan=False))


#: The BLAS libraries numpy's wheels and distributions link, and the
#: variable each reads its thread count from when it is loaded.
BLAS_THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")


def _one_blas_thread() -> None:
    """Let numpy's BLAS run on one thread in this process and the workers it starts.

    dxfcheck's matrices have tens of rows: a BLAS thread pool only costs
    (starting it is a third of numpy's import in CPU time, and ``batch
    --jobs N`` would start N pools on N cores).  A value the user set is
    kept; once numpy is loaded, nothing is changed."""
    if "numpy" in sys.modules:
        return
    for name in BLAS_THREAD_VARIABLES:
        os.environ.setdefault(name, "1")


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code.

    numpy's BLAS runs on one thread unless the user says otherwise
    (:func:`_one_blas_thread`).

    Standard output and error are guarded (:func:`dxfcheck.core.files.guarded_streams`):
    symbols their encoding cannot show are written as ASCII stand-ins; a
    closed pipe (``| head -1``) ends the output quietly and the run still
    returns its own exit code; a write that fails otherwise (a full disk, a
    closed descriptor) is exit 2 with a line naming the stream."""
    _one_blas_thread()
    from dxfcheck.core.files import guarded_streams

    with guarded_streams() as stdout:
        code = _main(argv)
        try:
            stdout.flush()  # a full disk shows here, not at the interpreter's exit
        except DxfcheckError as exc:
            from dxfcheck.output.terminal import print_error

            print_error(exc)
            return EXIT_UNUSABLE
        return code


def _route_library_logs() -> None:
    """ezdxf's log records outside reading (reading makes them findings) as
    ``dxfcheck: note: ezdxf: ...`` lines on the standard error of the
    moment.  The route is laid when ezdxf is first imported (at once when
    it is loaded already): a command that never loads ezdxf, such as
    ``solve --json`` on a drawing the fast reader reads, never loads
    ``logging`` either."""
    when_imported("ezdxf", _lay_library_route)


def _lay_library_route() -> None:
    import logging

    class _LibraryNote(logging.Handler):
        def emit(self, record: logging.LogRecord) -> None:
            try:
                text = " ".join(record.getMessage().split())
            except (TypeError, ValueError):
                text = str(record.msg)
            sys.stderr.write(f"dxfcheck: note: ezdxf: {text}\n")

    logger = logging.getLogger("ezdxf")
    if not any(type(h).__name__ == "_LibraryNote" for h in logger.handlers):
        logger.addHandler(_LibraryNote(logging.WARNING))
        logger.propagate = False


def _progress(args: argparse.Namespace) -> Any:
    """Progress bars on a terminal's stderr for the long work of solve,
    check, annotate and compare (batch has its own; none with --json)."""
    from contextlib import nullcontext

    if args.command not in ("solve", "check", "annotate", "compare") or getattr(args, "json", False):
        return nullcontext()
    from dxfcheck.output.terminal import progress_bar

    return progress_bar()


def _print_error(exc: DxfcheckError) -> None:
    """One error line (:func:`dxfcheck.output.terminal.print_error`, loaded
    only when there is an error to print)."""
    from dxfcheck.output.terminal import print_error as print_line

    print_line(exc)


def _main(argv: Sequence[str] | None) -> int:
    args = _parser(argv).parse_args(argv)
    _route_library_logs()
    commands = {
        "solve": _solve,
        "check": _check,
        "annotate": _annotate,
        "skeleton": _skeleton,
        "compare": _compare,
        "batch": _batch,
        "linings": _linings,
        "schema": _schema,
        "hook": _hook,
    }
    from dxfcheck.core import deadline

    try:
        with deadline.limit(args.timeout), _progress(args):
            return commands[args.command](args)
    except TimeLimitExceeded as exc:  # never caught as a reading problem: it is no Exception
        limit_error = _time_limit_error(args, exc)
        _print_error(limit_error)
        _json_error(args, limit_error)
        return EXIT_UNUSABLE
    except VerificationError as exc:
        if INTERNAL_ERRORS_RAISE:
            raise
        sys.stderr.write(
            one_line(f"dxfcheck: {exc.path or _subject(args)}: internal error: {exc.message}; please report it") + "\n"
        )
        _json_error(args, exc, internal=True)
        return EXIT_INTERNAL
    except DxfcheckError as exc:
        _print_error(exc)
        _json_error(args, exc)
        return EXIT_UNUSABLE
    except KeyboardInterrupt:
        sys.stderr.write("dxfcheck: interrupted\n")
        return 130
    except RecursionError:
        sys.stderr.write(f"dxfcheck: {_subject(args)}: error: the drawing nests too deeply to read\n")
        return EXIT_UNUSABLE
    except MemoryError:
        sys.stderr.write(f"dxfcheck: {_subject(args)}: error: out of memory reading the drawing; try --max-size\n")
        return EXIT_UNUSABLE
    except Exception as exc:  # never a traceback for the user: one line, and a request to report it
        if INTERNAL_ERRORS_RAISE:
            raise
        sys.stderr.write(
            one_line(
                f"dxfcheck: {_subject(args)}: internal error ({type(exc).__name__}: {exc}); please report it with the "
                "drawing"
            )
            + "\n"
        )
        return EXIT_INTERNAL
