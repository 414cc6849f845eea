"""The ``dxfcheck`` command: a thin layer over the library.

Exit codes:

* 0 -- solved (and, for checks, every rule passed);
* 1 -- solved, but a check failed (reserved for ``dxfcheck check``);
* 2 -- the drawing, the project file or an option cannot be used, or the
  mechanism cannot be built or solved.  One line per problem goes to stderr.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence

from dxfcheck.errors import ConfigError, DxfcheckError

__all__ = ["EXIT_CHECK_FAILED", "EXIT_OK", "EXIT_UNUSABLE", "main"]

EXIT_OK = 0
EXIT_CHECK_FAILED = 1
EXIT_UNUSABLE = 2


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # type: ignore[override]
        self.print_usage(sys.stderr)
        sys.stderr.write(f"dxfcheck: error: {message}\n")
        raise SystemExit(EXIT_UNUSABLE)


def _parser() -> argparse.ArgumentParser:
    from dxfcheck import __version__

    p = _Parser(prog="dxfcheck", description="Check the statics of drum-brake linkages drawn in DXF.")
    p.add_argument("--version", action="version", version=f"dxfcheck {__version__}")
    sub = p.add_subparsers(dest="command", required=True, parser_class=_Parser)
    s = sub.add_parser("solve", help="solve the pin forces, shoe forces and braking torque of a drawing")
    s.add_argument("drawing", help="the DXF drawing (it is only read)")
    s.add_argument("--mu", type=float, default=None, help="lining-drum friction coefficient (default 0.35)")
    s.add_argument("--effort", default=None, help="magnitude of every load, e.g. '1.2kN' (default: the texts)")
    s.add_argument("--direction", choices=("cw", "ccw", "both"), default="both", help="drum direction(s)")
    s.add_argument("--config", default=None, help="project file (default: the nearest dxfcheck.toml)")
    s.add_argument("--units", default=None, help="drawing unit, overriding $INSUNITS (mm, cm, m, inch, ft)")
    s.add_argument(
        "--tolerance", default=None, help="'lies on' tolerance, e.g. '0.05mm' (default: scaled to the drawing)"
    )
    s.add_argument("--json", action="store_true", help="print one JSON document instead of tables")
    return p


def _solve(args: argparse.Namespace) -> int:
    from dxfcheck.analysis import DEFAULT_MU, analyse
    from dxfcheck.report import print_solution, solution_to_dict, write_json
    from dxfcheck.units import UnitError, parse_quantity

    try:
        effort = parse_quantity(args.effort, "force").value if args.effort else None
        tol = parse_quantity(args.tolerance, "length", default_unit="mm").value if args.tolerance else None
    except UnitError as exc:
        raise ConfigError(str(exc)) from exc
    if args.mu is not None and not (0.0 <= args.mu < 10.0):
        raise ConfigError(f"--mu must be between 0 and 10, got {args.mu}")
    if tol is not None and tol <= 0:
        raise ConfigError("--tolerance must be positive")
    mu = DEFAULT_MU if args.mu is None else args.mu
    directions = ("cw", "ccw") if args.direction == "both" else (args.direction,)
    sol = analyse(
        args.drawing,
        mu=mu,
        effort_N=effort,
        directions=directions,
        config=args.config,
        units=args.units,
        tolerance_mm=tol,
    )
    if args.json:
        write_json(solution_to_dict(sol))
    else:
        notes = () if args.mu is not None else (f"μ = {DEFAULT_MU} assumed (no --mu given)",)
        print_solution(sol, notes=notes)
    return EXIT_OK


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    from dxfcheck.report import print_error

    args = _parser().parse_args(argv)
    try:
        if args.command == "solve":
            return _solve(args)
    except DxfcheckError as exc:
        print_error(exc)
        return EXIT_UNUSABLE
    except KeyboardInterrupt:
        sys.stderr.write("dxfcheck: interrupted\n")
        return 130
    return EXIT_UNUSABLE
