"""Output: the terminal reports (every ``print_*``), the batch progress bar
and error lines.

One function per table, so that each table's columns stand in one place.
Rich is imported only when a report is drawn, so that ``--json`` runs stay
light.  Texts from the drawing (names, labels, paths) go through
:func:`dxfcheck.core.textsafe.markup` where they are placed in a string
that carries the report's own markup.  This module only formats the
results' numbers, it never computes physics.
"""

from __future__ import annotations

import contextlib
import math
import sys
import time
from collections.abc import Callable, Iterable, Iterator
from typing import IO, TYPE_CHECKING, Any

from dxfcheck.core import progress
from dxfcheck.core.errors import DxfcheckError
from dxfcheck.core.findings import Finding, Severity
from dxfcheck.core.textsafe import markup as _esc
from dxfcheck.core.textsafe import one_line, report_console
from dxfcheck.gate.linings import Lining
from dxfcheck.gate.rules import Judgement, Verdict
from dxfcheck.gate.verdicts import figures
from dxfcheck.mechanism.layers import searched_line
from dxfcheck.output.json import trend_rows
from dxfcheck.output.text import CAUTION
from dxfcheck.revision.compare import Comparison
from dxfcheck.statics import CaseSolution, Solution

if TYPE_CHECKING:
    from rich.table import Table

    from dxfcheck.mechanism import Mechanism
    from dxfcheck.read.drawing import Drawing

__all__ = [
    "REPORT_WIDTH",
    "batch_progress",
    "format_value",
    "print_batch",
    "print_comparisons",
    "print_error",
    "print_findings",
    "print_judgement",
    "print_linings",
    "print_sensitivity",
    "print_skeleton",
    "print_solution",
    "progress_bar",
    "skeleton_line",
]

#: Width of the report when the output is not a terminal [characters].
REPORT_WIDTH = 120
#: Rich style of each finding severity (the words carry the meaning).
SEVERITY_STYLE = {"error": "bold red", "warning": "yellow", "info": "cyan"}
#: Rich style of the verdict line of ``check``.
VERDICT_STYLE = {"pass": "bold green", "warn": "bold yellow", "fail": "bold red"}
#: Rich style of each rule's verdict in the rules table.
RULE_STYLE = {"pass": "green", "warn": "yellow", "fail": "red", "skip": "dim"}
#: Percentiles (and extremes, mean) in the sampling table's columns.
SAMPLE_KEYS = ("min", "p1", "p5", "p50", "mean", "p95", "p99", "max")
#: Batch statuses that count as failures in the progress bar.
BATCH_FAILURES = ("fail", "error", "timeout")
#: Shortest elapsed time used for the batch rate [s] (no division by zero).
MIN_ELAPSED_S = 1e-9


def _console(out: IO[str] | None) -> Any:
    stream = out or sys.stdout
    width = None if stream.isatty() else REPORT_WIDTH
    return report_console(stream, width)  # control characters in drawing texts shown as escapes


def _table(title: str, columns: tuple[str, ...], right: tuple[str, ...] = (), left: tuple[str, ...] = ()) -> Table:
    """A titled table; columns named in ``right`` are right-justified, or,
    when ``left`` is given, every column not named in it."""
    from rich.table import Table

    t = Table(title=title, title_justify="left")
    for col in columns:
        on_right = col not in left if left else col in right
        t.add_column(col, justify="right" if on_right else "left")
    return t


def format_value(x: float | None, unit: str = "", digits: int = 4) -> str:
    """A rule's value, limit or margin: ``digits`` significant digits (more
    for a value and limit that agree to 4: :func:`dxfcheck.gate.verdicts.figures`),
    ``-`` for none, ``∞`` for infinity."""
    if x is None:
        return "-"
    if x == float("inf"):
        return "∞"
    return f"{x:.{digits}g}" + (f" {unit}" if unit else "")


def print_findings(console: Any, findings: tuple[Finding, ...] | list[Finding]) -> None:
    """The findings table (words carry the meaning; colour only helps)."""
    from rich.markup import escape
    from rich.table import Table

    if not findings:
        console.print("Findings: none")
        return
    t = Table(title="Findings", title_justify="left", show_lines=False)
    for col in ("code", "severity", "message", "where"):
        t.add_column(col)
    for f in findings:
        t.add_row(f.code.id, f"[{_severity_style(f.severity)}]{f.severity}[/]", escape(f.message), escape(f.where()))
    console.print(t)


def _severity_style(sev: Severity) -> str:
    return SEVERITY_STYLE[str(sev)]


# --- solve: the header, then per direction one function per table ------------


def print_skeleton(mech: Mechanism, written: list[str], out: IO[str] | None = None) -> None:
    """What ``dxfcheck skeleton`` read and wrote, with the findings."""
    console = _console(out)
    d = mech.drawing
    console.print(f"[bold]dxfcheck skeleton[/]  {_esc(d.path)}")
    console.print(skeleton_line(d), markup=False)
    console.print(searched_line(d), markup=False)
    console.print(
        f"{len(mech.parts)} parts, {len(mech.pins)} pins ({sum(p.grounded for p in mech.pins)} pivots), "
        f"{len(mech.shoes)} shoes, {len(mech.bands)} bands, {len(mech.loads)} loads"
    )
    print_findings(console, mech.findings)
    for w in written:
        if w != "-":
            console.print(f"wrote {_esc(w)}")
    console.print(CAUTION, markup=False)


def skeleton_line(d: Drawing) -> str:
    """The header's line saying where the skeleton came from."""
    if d.skeleton_source == "layers":
        return "skeleton: from the role layers"
    return f"skeleton: inferred from the {d.skeleton_source}; check it with `dxfcheck skeleton DRAWING -o OUT.dxf`"


def _print_inferred(console: Any, sol: Solution, notes: tuple[str, ...]) -> None:
    """The drawing, its units, the layers searched and what was inferred."""
    mech = sol.mechanism
    d = mech.drawing
    console.print(f"[bold]dxfcheck solve[/]  {_esc(d.path)}")
    console.print(
        f"units: {d.units} (from {d.units_source}); tolerance {mech.tolerance_mm:.3g} mm; "
        f"drum radius {mech.drum.radius_mm:.6g} mm"
        if mech.drum
        else f"units: {d.units}"
    )
    console.print(skeleton_line(d), markup=False)
    console.print(searched_line(d), markup=False)
    console.print(
        f"inferred: {mech.family}: {len(mech.parts)} parts, {len(mech.pins)} pins "
        f"({sum(p.grounded for p in mech.pins)} pivots), {len(mech.shoes)} shoes, {len(mech.bands)} bands, "
        f"{len(mech.springs)} springs, {len(mech.loads)} loads"
    )
    for s in mech.shoes:
        console.print(
            f"  shoe {_esc(s.name)}: {s.mounting} on {_esc(s.pin or s.part)}, lining {s.contact_angle_deg:.1f}°"
            + (" (internal)" if s.internal else "")
        )
    for n in notes:
        console.print(n)


def _print_case_heading(console: Any, c: CaseSolution) -> None:
    """The direction's line: μ, braking torque, self-locking μ, residual;
    why it does not brake; the short-shoe torque beside a long-shoe one."""
    from rich.markup import escape

    crit = f"{c.critical_mu:.4g}" if c.critical_mu is not None else "none below 1"
    torque = (
        f"braking torque [bold]{c.torque_Nm:.1f} N·m[/]"
        if c.brakes
        else "[bold red]does not brake[/] (see the errors below)"
    )
    console.print(
        f"[bold]drum {c.direction}[/]  μ = {c.mu:g}   {torque}   self-locking μ: {crit}   residual {c.residual:.1e}"
    )
    if not c.brakes:
        console.print(f"  no braking torque is reported for drum {c.direction}: {escape(c.why_not_braking or '')}")
    if c.short_shoe_torque_Nm is not None:
        console.print(
            f"  beside it, short-shoe theory on every shoe: {c.short_shoe_torque_Nm:.1f} N·m "
            "(the torque above uses long-shoe theory where the shoes table says long)"
        )


def _shoe_table(c: CaseSolution) -> Table:
    t = _table(
        "shoes (N, F: resultants of the normal and friction forces; F lining: friction summed over the "
        "lining, × r = torque; peak p·b: peak pressure × lining width; μ': equivalent μ, a cross-check)",
        ("shoe", "model", "N N", "F N", "F lining N", "torque N·m", "peak p·b N/mm", "at °", "μ'"),
        left=("shoe", "model"),
    )
    for sr in c.shoes:
        t.add_row(
            _esc(sr.name),
            sr.model,
            f"{sr.normal_N:.1f}",
            f"{sr.friction_resultant_N:.1f}",
            f"{sr.friction_lining_N:.1f}",
            f"{sr.torque_Nm:.2f}",
            f"{sr.peak_line_load_N_per_mm:.2f}",
            f"{sr.peak_at_deg:.1f}",
            f"{sr.mu_equivalent:.4f}",
        )
    return t


def _springs_text(c: CaseSolution) -> str:
    return ", ".join(f"{_esc(s.name)} {s.force_N:.1f} N {s.state}" for s in c.springs)


def _effort_line(c: CaseSolution, effort_scale: float) -> str:
    """The efforts (loads and springs) that give the asked-for torque."""
    efforts = ", ".join(f"{_esc(ld.name)} {ld.force_N:.1f} N" for ld in c.loads)
    springs = _springs_text(c)
    return (
        f"effort for {c.torque_Nm:.1f} N·m: {', '.join(x for x in (efforts, springs) if x)} "
        f"(the drawing's efforts × {effort_scale:.6g})"
    )


def _band_table(c: CaseSolution) -> Table:
    t = _table(
        "bands (T1/T2 = e^(μθ))",
        ("band", "kind", "wrap °", "tight N", "slack N", "torque N·m", "peak p·b N/mm"),
        left=("band", "kind"),
    )
    for b in c.bands:
        t.add_row(
            _esc(b.name),
            b.kind,
            f"{b.wrap_deg:.1f}",
            f"{b.tight_N:.1f} ({_esc(b.tight_pin)})",
            f"{b.slack_N:.1f} ({_esc(b.slack_pin)})",
            f"{b.torque_Nm:.2f}",
            f"{b.peak_line_load_N_per_mm:.2f}",
        )
    return t


def _pin_table(c: CaseSolution) -> Table:
    t = _table(
        "pins (force on the first part listed)",
        ("pin", "x mm", "y mm", "Fx N", "Fy N", "|F| N", "joins"),
        left=("pin", "joins"),
    )
    for p in c.pins:
        t.add_row(
            _esc(p.name) + (" (pivot)" if p.grounded else ""),
            f"{p.x_mm:.1f}",
            f"{p.y_mm:.1f}",
            f"{p.fx_N:.1f}",
            f"{p.fy_N:.1f}",
            f"{p.max_force_N:.1f}",
            _esc(", ".join(p.parts)),
        )
    return t


def _member_table(c: CaseSolution) -> Table:
    t = _table("two-force members", ("member", "between", "axial N", "state"), right=("axial N",))
    for m in c.members:
        t.add_row(_esc(m.name), _esc(" - ".join(m.ends)), f"{abs(m.axial_N):.1f}", m.state)
    return t


def _print_case(console: Any, c: CaseSolution) -> None:
    """One solved direction: heading, shoes, efforts, bands, springs, pins, members."""
    _print_case_heading(console, c)
    if c.shoes:
        console.print(_shoe_table(c))
    if c.effort_scale is not None:
        console.print(_effort_line(c, c.effort_scale))
    if c.bands:
        console.print(_band_table(c))
    if c.springs and c.effort_scale is None:
        console.print("springs: " + _springs_text(c))
    if c.guides:
        console.print(
            "guides (the part's push on the rod, across it): "
            + ", ".join(
                f"{_esc(g.name)} {_esc(g.rod)} through {_esc(g.part)} {math.hypot(*g.force_N):.1f} N" for g in c.guides
            )
        )
    console.print(_pin_table(c))
    if c.members:
        console.print(_member_table(c))


def print_solution(sol: Solution, out: IO[str] | None = None, *, notes: tuple[str, ...] = ()) -> None:
    """The terminal report of ``dxfcheck solve``."""
    console = _console(out)
    _print_inferred(console, sol, notes)
    for c in sol.cases:
        console.print()
        _print_case(console, c)
    console.print()
    print_findings(console, sol.findings)
    console.print()
    console.print(CAUTION)


def print_error(exc: DxfcheckError, err: IO[str] | None = None) -> None:
    """One line per problem on stderr, each naming file, entity, layer and
    place."""
    err = err or sys.stderr
    path = one_line(exc.path or "")  # drawing texts and names: control characters shown as escapes
    prefix = f"dxfcheck: {path}: " if path else "dxfcheck: "
    err.write(f"{prefix}error: {one_line(exc.message)}\n")
    for f in exc.findings:
        err.write(f"{prefix}{one_line(f.line())}\n")


# --- check -------------------------------------------------------------------


def _theory_lines(j: Judgement) -> list[str]:
    """Which shoe theory the gate used, and the short-shoe torque beside a
    long-shoe one (at ``mu_min``, where the torque rule is judged)."""
    low = j.solutions[j.mu_min]
    if not low.cases or not low.cases[0].shoes:
        return []
    opts = low.options
    models = ", ".join(f"{s.name} {s.model}" for s in low.cases[0].shoes)
    how = f"{opts.model}" + (f", long above {opts.long_threshold_deg:g}°" if str(opts.model) == "auto" else "")
    out = [f"shoe theory ({how}): {models}; the rules use it"]
    short = [c for c in low.cases if c.short_shoe_torque_Nm is not None]
    if short:
        beside = ", ".join(f"{c.direction} {c.short_shoe_torque_Nm:.1f} N·m (chosen {c.torque_Nm:.1f})" for c in short)
        out.append(f"short-shoe theory at μ = {j.mu_min:g} would give: {beside}")
    return out


def _print_verdict(console: Any, j: Judgement, strict: bool) -> None:
    """The verdict line with the counts, μ and its range, the layers searched
    and the shoe theory."""
    counts = j.counts()
    verdict = j.verdict
    if strict and verdict is Verdict.WARN:
        verdict = Verdict.FAIL
    style = VERDICT_STYLE[str(verdict)]
    console.print(
        f"[{style}]{str(verdict).upper()}[/]  {_esc(j.mechanism.drawing.path)}: "
        f"{counts['pass']} passed, {counts['fail']} failed, {counts['warn']} warnings, {counts['skip']} skipped"
        + (" (strict: warnings fail)" if strict else "")
    )
    console.print(f"μ = {j.mu:g} (range {j.mu_min:g} to {j.mu_max:g})")
    console.print(skeleton_line(j.mechanism.drawing), markup=False)
    console.print(searched_line(j.mechanism.drawing), markup=False)
    for line in _theory_lines(j):
        console.print(line, markup=False)


def _rules_table(j: Judgement) -> Table:
    t = _table("rules", ("verdict", "rule", "value", "limit", "margin", "note"), right=("value", "limit", "margin"))
    for r in j.rules:
        n = figures(r.value, r.limit)
        t.add_row(
            f"[{RULE_STYLE[str(r.verdict)]}]{r.verdict}[/]",
            _esc(r.title),
            format_value(r.value, r.unit, n),
            format_value(r.limit, r.unit, n),
            format_value(r.margin),
            _esc(r.message or str(r.inputs.get("case", ""))),
        )
    return t


def _spec_table(j: Judgement) -> Table:
    t = _table("spec values and where they came from", ("key", "value", "source"))
    for v in j.spec.all_values():
        t.add_row(_esc(v.key), _esc(v.text), _esc(v.source))
    return t


def print_judgement(j: Judgement, out: IO[str] | None = None, *, strict: bool = False) -> None:
    """The terminal report of ``dxfcheck check``: verdict line, rules,
    findings, spec sources, caution."""
    console = _console(out)
    _print_verdict(console, j, strict)
    console.print(_rules_table(j))
    print_findings(console, j.nominal.findings)
    console.print(_spec_table(j))
    console.print()
    console.print(CAUTION)


#: Decimals of a μ range in the lining listing, and the relative round-off
#: below which a bound counts as on its printed decimal (0.35·0.85 is
#: 0.29749999999999999 in binary and shows as 0.2975).
RANGE_DECIMALS, RANGE_ROUND_OFF = 4, 1e-9


def _outward_range(low: float, high: float) -> str:
    """``low-high`` rounded outward to :data:`RANGE_DECIMALS` decimals: the
    range shown is never narrower than the one used (0.2975-0.4025, not
    0.297-0.402)."""
    scale = 10.0**RANGE_DECIMALS
    lo = math.floor(low * scale * (1 + RANGE_ROUND_OFF)) / scale
    hi = math.ceil(high * scale * (1 - RANGE_ROUND_OFF)) / scale
    return f"{lo:.{RANGE_DECIMALS}f}".rstrip("0").rstrip(".") + "-" + f"{hi:.{RANGE_DECIMALS}f}".rstrip("0").rstrip(".")


def print_linings(linings: Iterable[Lining], out: IO[str] | None = None) -> None:
    """The lining library of ``dxfcheck linings``: one row per lining, then
    the sources each row cites."""
    console = _console(out)
    t = _table(
        "lining library (lining = NAME in the spec); pressures in MPa, pV in MPa·m/s, temperatures in °C",
        ("name", "material", "μ", "μ range", "p work", "p max", "pV max", "T operating", "T max"),
        left=("name", "material"),
    )
    t.columns[0].no_wrap = True
    cited: dict[str, None] = {}
    for ln in linings:
        low, high = ln.working_pressure_MPa
        t.add_row(
            ln.name,
            ln.material,
            f"{ln.mu:g}",
            _outward_range(ln.mu_min, ln.mu_max),
            f"{low:g}-{high:g}",
            f"{ln.pressure_max_MPa:g}",
            f"{ln.pv_max_MPa_m_s:g}",
            f"{ln.operating_temperature_max_C:g}",
            f"{ln.temperature_max_C:g}",
        )
        cited.update(dict.fromkeys([f"source: {ln.source}"] + [f"{k}: {v}" for k, v in ln.practice.items()]))
    console.print(t)
    for line in cited:
        console.print(_esc(line))
    console.print()
    console.print(CAUTION)


# --- compare -----------------------------------------------------------------


def _cell(v: object) -> str:
    if isinstance(v, float):
        return f"{v:.5g}"
    return "-" if v is None else str(v)


def _relative(rel: float | None) -> str:
    """A relative change as a signed percentage (``∞`` from zero)."""
    if rel is None:
        return "-"
    return "∞" if not math.isfinite(rel) else f"{100 * rel:+.2f}%"


def _changes_table(c: Comparison) -> Table:
    t = _table(
        "changes (threshold crossings and verdict changes first)",
        ("flag", "what", "name", "dir", "old", "new", "change", "rel"),
        right=("old", "new", "change", "rel"),
    )
    for x in c.changes:
        t.add_row(
            "CROSSED" if x.crossed else "",
            x.kind,
            _esc(x.name),
            x.direction,
            _esc(_cell(x.old)),
            _esc(_cell(x.new)),
            "-" if x.abs_change is None else f"{x.abs_change:+.5g} {x.unit}",
            _relative(x.rel_change),
        )
    return t


def _print_step(console: Any, c: Comparison) -> None:
    """One revision step: the two drawings, how they were matched, the changes."""
    console.print()
    console.print(f"[bold]{_esc(c.old.mechanism.drawing.path)}[/] -> [bold]{_esc(c.new.mechanism.drawing.path)}[/]")
    mo, mn = c.old.mechanism, c.new.mechanism
    console.print(
        f"rigid motion found from {c.motion_source}; {len(c.pin_map)} of {len(mo.pins)} pins "
        f"({len(mn.pins)} in the newer) and {len(c.part_map)} of {len(mo.parts)} parts matched"
    )
    console.print(_changes_table(c))


def _trend_table(trend: list[dict[str, Any]]) -> Table:
    cols = tuple(trend[0])
    t = _table("trend", cols, right=())
    for row in trend:
        t.add_row(*[f"{row[k]:.5g}" if isinstance(row[k], float) else _esc(str(row[k])) for k in cols])
    return t


def print_comparisons(comps: list[Any], out: IO[str] | None = None) -> None:
    """The terminal report of ``dxfcheck compare``."""
    console = _console(out)
    failed = any(c.failed for c in comps)
    console.print(
        f"[{'bold red' if failed else 'bold green'}]{'FAIL' if failed else 'OK'}[/]  "
        f"{len(comps)} revision step{'s' if len(comps) != 1 else ''}"
        + (": a threshold is crossed or a verdict went from pass to fail" if failed else "")
    )
    if comps:
        console.print(comps[0].thresholds.describe())
    for c in comps:
        _print_step(console, c)
    trend = trend_rows(comps)
    if len(trend) > 2:
        console.print(_trend_table(trend))
    console.print()
    console.print(CAUTION)


# --- batch and sampling ------------------------------------------------------


@contextlib.contextmanager
def batch_progress(total: int, *, enabled: bool = True) -> Iterator[Callable[[Any], None]]:
    """A rich progress bar on stderr for a batch: drawings done, failures so
    far, rate and time left.  Yields the per-result callback."""
    if not enabled:
        yield lambda _r: None
        return
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

    failures = {"n": 0}
    started = time.perf_counter()
    with Progress(
        TextColumn("checking"),
        BarColumn(),
        MofNCompleteColumn(),
        TextColumn("{task.fields[failures]} failed"),
        TextColumn("{task.fields[rate]}"),
        TimeRemainingColumn(),
        console=Console(file=sys.stderr),
        transient=False,
    ) as progress:
        task = progress.add_task("batch", total=total, failures=0, rate="")

        def on_result(r: Any) -> None:
            if r.status in BATCH_FAILURES:
                failures["n"] += 1
            done = progress.tasks[0].completed + 1
            rate = done / max(time.perf_counter() - started, MIN_ELAPSED_S)
            progress.update(task, advance=1, failures=failures["n"], rate=f"{rate:.1f}/s")

        yield on_result


class _RichListener:
    """The tasks of :mod:`dxfcheck.core.progress` as rich bars on a stream.

    The display runs only while a task does: it starts with the first task
    and stops (its bars erased) when the last one ends, so a report printed
    afterwards, on either stream, never meets a live display; and it leaves
    ``sys.stdout`` and ``sys.stderr`` as they are (no redirection)."""

    def __init__(self, stream: IO[str]) -> None:
        from rich.console import Console
        from rich.progress import BarColumn, Progress, TaskProgressColumn, TextColumn, TimeRemainingColumn

        self._bar = Progress(
            TextColumn("{task.description}"),
            BarColumn(),
            TaskProgressColumn(),
            TimeRemainingColumn(),
            console=Console(file=stream),
            transient=True,
            redirect_stdout=False,
            redirect_stderr=False,
        )
        self._running = 0

    def start(self, label: str, total: float) -> object:
        if self._running == 0:
            self._bar.start()
        self._running += 1
        return self._bar.add_task(_esc(label), total=total)

    def update(self, key: object, done: float) -> None:
        self._bar.update(key, completed=done)  # type: ignore[arg-type]

    def stop(self, key: object) -> None:
        self._bar.remove_task(key)  # type: ignore[arg-type]
        self._running -= 1
        if self._running == 0:
            self._bar.stop()


@contextlib.contextmanager
def progress_bar(*, enabled: bool = True, stream: IO[str] | None = None) -> Iterator[None]:
    """Show the long work of the block (reading a big drawing, sampling, the
    revisions of a compare) as rich progress bars on standard error, only
    when that is a terminal and ``enabled``; each bar goes when its task
    ends (nothing is left in the report)."""
    stream = stream or sys.stderr
    if not enabled or not stream.isatty():
        yield
        return
    with progress.listening(_RichListener(stream)):
        yield


def print_batch(batch: Any, out: IO[str] | None = None) -> None:
    """The summary table of ``dxfcheck batch``."""
    console = _console(out)
    console.print(f"{batch.worst().upper()}  {batch.summary()}")
    t = _table(
        "drawings",
        ("status", "drawing", "torque cw N·m", "torque ccw N·m", "failed rules / error", "s"),
        right=("torque cw N·m", "torque ccw N·m", "s"),
    )
    for r in batch.results:
        t.add_row(
            r.status,
            _esc(r.drawing),
            "-" if r.torque_cw_Nm is None else f"{r.torque_cw_Nm:.1f}",
            "-" if r.torque_ccw_Nm is None else f"{r.torque_ccw_Nm:.1f}",
            _esc(r.message if r.status in ("error", "timeout") else ", ".join(r.failed_rules)),
            "cached" if r.cached else f"{r.seconds:.2f}",
        )
    console.print(t)
    console.print(CAUTION)


def print_sensitivity(res: Any, drawing: str, out: IO[str] | None = None) -> None:
    """The terminal report of ``solve --samples``: the distributions of the
    torque and the governing pin force per direction."""
    console = _console(out)
    console.print(
        f"[bold]dxfcheck sensitivity[/]  {_esc(drawing)}: {res.samples} samples, μ {res.mu_range[0]:g} to "
        f"{res.mu_range[1]:g}, pins ± {res.pin_tolerance_mm:g} mm"
        + (f", springs ± {100 * res.spring_tolerance:g} %" if res.spring_tolerance else "")
        + f", seed {res.seed} ({res.seconds:.2f} s)"
    )
    t = _table("distributions", ("quantity", *SAMPLE_KEYS), right=SAMPLE_KEYS)
    for d in res.directions:
        t.add_row(f"torque {d.direction} N·m", *[f"{d.torque_Nm[k]:.1f}" for k in SAMPLE_KEYS])
        t.add_row(f"pin {_esc(d.governing_pin)} {d.direction} N", *[f"{d.max_pin_force_N[k]:.1f}" for k in SAMPLE_KEYS])
    console.print(t)
    for d in res.directions:
        if d.p_below_required is not None:
            console.print(f"{d.direction}: P(torque < {res.required_torque_Nm:.1f} N·m) = {d.p_below_required:.4f}")
    console.print(CAUTION)
