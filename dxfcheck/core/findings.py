"""Coded findings: problems a user can fix in the drawing.

Every stage of the pipeline appends :class:`Finding` entries instead of
raising at the first problem, so that one run tells the designer everything
that is wrong with a drawing.  Each code is stable and documented in the
README; its number tells the stage that reports it:

* ``D1xx`` reading the drawing (:mod:`dxfcheck.read.drawing`),
* ``M2xx`` building the mechanism (:mod:`dxfcheck.mechanism`),
* ``S3xx`` solving the statics (:mod:`dxfcheck.statics`).
"""

from __future__ import annotations

import enum
from dataclasses import field

from dxfcheck.core.records import record

__all__ = ["Code", "Finding", "Severity", "has_errors"]


class Severity(enum.StrEnum):
    """How much a finding matters.

    ``error`` stops the stage that found it from producing a trustworthy
    result; ``warning`` leaves a result that needs a human look; ``info``
    records an assumption.
    """

    ERROR = "error"
    WARNING = "warning"
    INFO = "info"


class Code(enum.Enum):
    """Finding codes: ``(code, severity, short name)``."""

    # --- reading -------------------------------------------------------
    UNITS_ASSUMED = ("D101", Severity.WARNING, "units-assumed")
    UNSUPPORTED_ENTITY = ("D102", Severity.WARNING, "unsupported-entity")
    DISTORTED_CIRCLE = ("D103", Severity.WARNING, "distorted-circle")
    OUT_OF_PLANE = ("D104", Severity.WARNING, "out-of-plane")
    BAD_COORDINATE = ("D105", Severity.ERROR, "bad-coordinate")
    DEGENERATE_ENTITY = ("D106", Severity.WARNING, "degenerate-entity")
    CURVED_LINK = ("D107", Severity.WARNING, "curved-link")
    DUPLICATE_ENTITY = ("D108", Severity.WARNING, "duplicate-entity")
    REPAIRED = ("D109", Severity.WARNING, "repaired")
    UNITS_IMPLAUSIBLE = ("D110", Severity.WARNING, "units-implausible")
    PROPORTION_IMPLAUSIBLE = ("D111", Severity.WARNING, "proportion-implausible")
    AFTER_EOF = ("D112", Severity.WARNING, "after-eof")
    BLOCK_RECURSIVE = ("D113", Severity.ERROR, "block-recursive")
    READER_MESSAGE = ("D114", Severity.WARNING, "reader-message")
    DWG_OLD_VERSION = ("D120", Severity.WARNING, "dwg-old-version")
    DWG_HEADER_UNREAD = ("D121", Severity.WARNING, "dwg-header-unread")
    DWG_NOT_CARRIED = ("D122", Severity.WARNING, "dwg-not-carried")
    # --- topology ------------------------------------------------------
    NO_DRUM = ("M201", Severity.ERROR, "no-drum")
    MANY_DRUMS = ("M202", Severity.ERROR, "many-drums")
    OPEN_END = ("M203", Severity.WARNING, "open-end")
    LONELY_PIN = ("M204", Severity.WARNING, "lonely-pin")
    ORPHAN_PIN = ("M205", Severity.ERROR, "orphan-pin")
    SHOE_OFF_DRUM = ("M206", Severity.ERROR, "shoe-off-drum")
    SHOE_UNATTACHED = ("M207", Severity.ERROR, "shoe-unattached")
    LOAD_OFF_PART = ("M208", Severity.ERROR, "load-off-part")
    LOAD_NO_MAGNITUDE = ("M209", Severity.ERROR, "load-no-magnitude")
    LOAD_AT_PIVOT = ("M210", Severity.WARNING, "load-at-pivot")
    NO_SHOE = ("M211", Severity.ERROR, "no-shoe")
    NO_LOAD = ("M212", Severity.ERROR, "no-load")
    LABEL_UNUSED = ("M213", Severity.INFO, "label-unused")
    LABEL_CLASH = ("M214", Severity.WARNING, "label-clash")
    SHOE_MANY_PARTS = ("M215", Severity.ERROR, "shoe-many-parts")
    TEXT_UNREAD = ("M216", Severity.WARNING, "text-unread")
    SPRING_END_OFF = ("M217", Severity.ERROR, "spring-end-off")
    SPRING_NO_SENSE = ("M218", Severity.ERROR, "spring-no-sense")
    BAND_OFF_DRUM = ("M219", Severity.ERROR, "band-off-drum")
    BAND_OPEN = ("M220", Severity.ERROR, "band-open")
    BAND_END_OFF = ("M221", Severity.ERROR, "band-end-off")
    TEXT_AMBIGUOUS = ("M222", Severity.ERROR, "text-ambiguous")
    LAYER_NEAR_MISS = ("M223", Severity.WARNING, "layer-near-miss")
    SHOE_MAYBE_PIVOTED = ("M224", Severity.WARNING, "shoe-maybe-pivoted")
    # --- skeleton inferred from the geometry (dxfcheck.infer) -----------
    SKELETON_INFERRED = ("M230", Severity.WARNING, "skeleton-inferred")
    DRUM_AMBIGUOUS = ("M231", Severity.WARNING, "drum-ambiguous")
    NO_LINING_CIRCLE = ("M232", Severity.WARNING, "no-lining-circle")
    PIVOT_GUESSED = ("M233", Severity.WARNING, "pivot-guessed")
    HOLE_UNUSED = ("M234", Severity.INFO, "hole-unused")
    HOLE_SIZES_DIFFER = ("M235", Severity.INFO, "hole-sizes-differ")
    HOLE_ONE_PART = ("M236", Severity.WARNING, "hole-one-part")
    NO_PART_GEOMETRY = ("M237", Severity.ERROR, "no-part-geometry")
    TWO_FORCE_OR_LEVER = ("M238", Severity.WARNING, "two-force-or-lever")
    # --- statics -------------------------------------------------------
    FREE_MOTION = ("S301", Severity.ERROR, "free-motion")
    REDUNDANT = ("S302", Severity.ERROR, "redundant")
    SHOE_LIFTS = ("S303", Severity.ERROR, "shoe-lifts")
    SELF_LOCKING = ("S304", Severity.ERROR, "self-locking")
    CONTACT_OFF_LINING = ("S305", Severity.WARNING, "contact-off-lining")
    ILL_CONDITIONED = ("S306", Severity.WARNING, "ill-conditioned")
    RESIDUAL = ("S307", Severity.ERROR, "residual")
    NO_CONTACT_LINE = ("S308", Severity.ERROR, "no-contact-line")
    PARTIAL_CONTACT = ("S309", Severity.WARNING, "partial-contact")
    SHORT_FALLBACK = ("S310", Severity.INFO, "short-shoe-fallback")
    BAND_SLACK = ("S311", Severity.ERROR, "band-slack")
    RESULT_IMPLAUSIBLE = ("S312", Severity.WARNING, "result-implausible")
    CONTACT_UNSETTLED = ("S313", Severity.ERROR, "contact-unsettled")

    @property
    def id(self) -> str:
        """The stable code, e.g. ``"M203"``."""
        return self.value[0]

    @property
    def severity(self) -> Severity:
        """The default severity of the code."""
        return self.value[1]

    @property
    def slug(self) -> str:
        """A short readable name, e.g. ``"open-end"``."""
        return self.value[2]


@record(frozen=True)
class Finding:
    """One problem found in a drawing.

    Attributes
    ----------
    code : Code
        What kind of problem it is.
    message : str
        A sentence that says what is wrong and what to do.
    handles : tuple of str
        DXF handles of the entities involved (for entities inside blocks,
        ``"H@I"`` where I is the handle of the INSERT that placed it).
    layers : tuple of str
        The layers of those entities.
    at : tuple of float or None
        Where it is, in drawing coordinates converted to [mm].
    severity : Severity
        Defaults to the code's severity.
    """

    code: Code
    message: str
    handles: tuple[str, ...] = ()
    layers: tuple[str, ...] = ()
    at: tuple[float, float] | None = None
    severity: Severity = field(default=Severity.INFO)

    def __post_init__(self) -> None:
        if self.severity is Severity.INFO and self.code.severity is not Severity.INFO:
            object.__setattr__(self, "severity", self.code.severity)

    def where(self) -> str:
        """The entity and place as one phrase, for one-line messages."""
        parts: list[str] = []
        if self.handles:
            parts.append("entity " + ", ".join(self.handles))
        if self.layers:
            parts.append("layer " + ", ".join(dict.fromkeys(self.layers)))
        if self.at is not None:
            parts.append(f"at ({self.at[0]:.6g}, {self.at[1]:.6g}) mm")
        return "; ".join(parts)

    def line(self) -> str:
        """One line: ``CODE severity: message [where]``."""
        where = self.where()
        tail = f" [{where}]" if where else ""
        return f"{self.code.id} {self.severity}: {self.message}{tail}"

    def as_dict(self) -> dict[str, object]:
        """The JSON form (see the README's schema)."""
        return {
            "code": self.code.id,
            "name": self.code.slug,
            "severity": str(self.severity),
            "message": self.message,
            "handles": list(self.handles),
            "layers": list(self.layers),
            "at": None if self.at is None else [self.at[0], self.at[1]],
        }


def has_errors(findings: tuple[Finding, ...] | list[Finding]) -> bool:
    """True when any finding has severity ``error``."""
    return any(f.severity is Severity.ERROR for f in findings)
