"""Exceptions raised by dxfcheck.

One root class, :class:`DxfcheckError`, with narrow subclasses.  Problems a
user can fix in the drawing are *not* raised one at a time: they are collected
as :class:`dxfcheck.core.findings.Finding` entries.  An exception is raised only
when a stage cannot produce its result at all; it carries the findings that
explain why, so the command line can print every one of them.

Each class also inherits the built-in it stands for, so that code which
knows nothing of dxfcheck still catches it sensibly: a
:class:`DrawingReadError`, :class:`ConfigError`, :class:`MechanismError` or
:class:`SolveError` is a ``ValueError`` (a value given to dxfcheck cannot be
used), an :class:`OutputError` an ``OSError``, a
:class:`LimitError` a ``RuntimeError``, a :class:`VerificationError` an
``AssertionError``.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from dxfcheck.core.findings import Finding

__all__ = [
    "ConfigError",
    "DrawingReadError",
    "DxfcheckError",
    "LimitError",
    "MechanismError",
    "OutputError",
    "SolveError",
    "VerificationError",
]


class DxfcheckError(Exception):
    """Root of every error dxfcheck raises on purpose.

    Attributes
    ----------
    path : str or None
        The file the error is about, if any.
    findings : tuple of Finding
        The coded findings that explain the error (may be empty).
    """

    def __init__(
        self,
        message: str,
        *,
        path: str | None = None,
        findings: Sequence[Finding] = (),
    ) -> None:
        super().__init__(message)
        self.message = message
        self.path = path
        self.findings: tuple[Finding, ...] = tuple(findings)

    def __str__(self) -> str:
        if self.path:
            return f"{self.path}: {self.message}"
        return self.message


class DrawingReadError(DxfcheckError, ValueError):
    """The file is missing, unreadable or not a usable DXF drawing.

    A ``ValueError`` like the other input errors.  The readers' handlers that
    turn ezdxf's ``ValueError`` on damaged data into findings let every
    :class:`DxfcheckError` through first (``tests/read/test_refusals_pass.py``
    holds them to it), so a refusal is never taken for a damaged entity.
    """


class ConfigError(DxfcheckError, ValueError):
    """A project file (``dxfcheck.toml``) or a command-line value is invalid."""


class MechanismError(DxfcheckError, ValueError):
    """The drawing was read, but no mechanism can be built from it."""


class SolveError(DxfcheckError, ValueError):
    """The mechanism was built, but its statics cannot be solved."""


class OutputError(DxfcheckError, OSError):
    """An output (marked-up copy, picture, report file) cannot be written."""


class VerificationError(DxfcheckError, AssertionError):
    """A solution failed one of the checks every solve runs on its own answer
    (:mod:`dxfcheck.statics.verify`): an internal error, never a result."""


class LimitError(DxfcheckError, RuntimeError):
    """A size or time limit was reached; an option raises it."""
