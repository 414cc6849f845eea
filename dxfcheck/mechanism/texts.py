"""The force a load's or spring's text gives, and the findings on texts
that give none."""

from __future__ import annotations

from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.records import record
from dxfcheck.core.units import AmbiguousTextError, UnitError, quantity_in_text
from dxfcheck.mechanism.topology import finding
from dxfcheck.read.drawing import TextGeom

__all__ = ["Magnitudes", "TextForce", "no_magnitude", "text_finding", "text_force"]


@record(frozen=True)
class Magnitudes:
    """The caller's forces: ``effort_N`` [N] replaces every load's and
    spring's text; ``default_N`` [N] stands in where a text gives none."""

    effort_N: float | None = None
    default_N: float | None = None

    @property
    def given(self) -> bool:
        """Whether the caller gives a magnitude at all."""
        return self.effort_N is not None or self.default_N is not None

    @property
    def texts_used(self) -> bool:
        """Whether the drawing's force texts are used (no ``--effort``)."""
        return self.effort_N is None


def text_finding(code: Code, msg: str, t: TextGeom, used: bool) -> Finding:
    """A finding on a text; an ambiguous text is an error only when its value
    is used (not replaced by ``--effort``)."""
    demote = code is Code.TEXT_AMBIGUOUS and not used
    return finding(code, msg, [t.source], t.position, severity=Severity.WARNING if demote else None)


@record(frozen=True)
class TextForce:
    """What a load's or spring's text gave: the force [N], or why not (and
    the finding that says so)."""

    force_N: float | None
    why_not: str | None = None
    ambiguous: bool = False
    finding: Finding | None = None


def text_force(who: str, t: TextGeom, *, used: bool, glued: str = "") -> TextForce:
    """The force a load's or spring's text gives, or a finding that quotes
    the text: M222 when it could be read two ways, M216 when it holds no
    force or a signed one (the line gives the direction)."""
    try:
        q = quantity_in_text(t.text, "force", glued=glued)
    except AmbiguousTextError as exc:
        f = text_finding(Code.TEXT_AMBIGUOUS, f"{who}: {exc}", t, used)
        return TextForce(None, str(exc), ambiguous=True, finding=f)
    except UnitError as exc:
        return TextForce(None, str(exc), finding=text_finding(Code.TEXT_UNREAD, f"{who}: {exc}", t, used))
    if q.value < 0:
        why = (
            f"{t.text!r} gives a negative force {q.text!r}; the line gives the direction: "
            "write the magnitude without a sign and draw the line the way the force acts"
        )
        return TextForce(None, why, finding=text_finding(Code.TEXT_UNREAD, f"{who}: {why}", t, used))
    return TextForce(q.value)


def no_magnitude(who: str, read: TextForce | None, example: str) -> str:
    """The M209 message, with why a text that was there gave no force."""
    if read is None:
        return f"{who} has no magnitude; put a text such as {example!r} beside it or pass --effort"
    return f"{who} has no magnitude: {read.why_not}; or pass --effort"
