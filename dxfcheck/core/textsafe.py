"""Texts from a drawing are data, never control.

Labels, layer names, load texts and file names reach the terminal, the JUnit
XML, the SVG and the error lines.  A control character in them (an ESC
sequence, a bell, a bidirectional override) must not drive the terminal, and
must not make an XML document ill-formed; a bracket must not be read as rich
markup.  This module makes such text safe for each destination, and lets the
report degrade its own symbols (μ, °, ·, Ø, ✓) to ASCII where the output's
encoding cannot show them.

* :func:`printable` -- control characters shown as visible escapes (``\\x1b``);
* :func:`one_line` -- the same, with line breaks escaped too (error lines);
* :func:`markup` -- printable and escaped for rich markup;
* :func:`xml_text` -- characters XML 1.0 forbids shown as visible escapes
  (the XML writer still escapes ``<``, ``&`` and quotes);
* :func:`report_console` -- a rich console that shows control characters
  in every string as escapes (data inside markup still goes through
  :func:`markup`);
* :func:`degrade_stream` -- an encoding error handler that writes ASCII
  stand-ins for the symbols a stream's encoding cannot show.
"""

from __future__ import annotations

import codecs
import functools
import re
import unicodedata
from typing import IO, Any

__all__ = [
    "ASCII_FALLBACK",
    "ERROR_HANDLER",
    "degrade_stream",
    "markup",
    "one_line",
    "printable",
    "report_console",
    "xml_text",
]

#: C0 controls but line feed, DEL, the C1 controls (0x9b is an 8-bit CSI that
#: terminals obey), and the bidirectional overrides and isolates that reorder
#: what a terminal shows.
_CONTROL = re.compile("[\x00-\x09\x0b-\x1f\x7f-\x9f\u200e\u200f\u202a-\u202e\u2066-\u2069]")
_CONTROL_OR_NEWLINE = re.compile("[\x00-\x1f\x7f-\x9f\u200e\u200f\u202a-\u202e\u2066-\u2069]")
#: Characters XML 1.0 does not allow (§2.2 Char), plus the C1 controls and
#: ESC, shown as escapes so that a reader sees them.
_NOT_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\ud800-\udfff\ufffe\uffff]")


def _visible(m: re.Match[str]) -> str:
    code = ord(m.group())
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def printable(text: str) -> str:
    """``text`` with every control character but the line feed shown as a
    visible escape: ``"\\x1b[31mO1"`` prints as ``\\x1b[31mO1``."""
    return _CONTROL.sub(_visible, text)


def one_line(text: str) -> str:
    """:func:`printable`, with line breaks escaped too (one line per problem)."""
    return _CONTROL_OR_NEWLINE.sub(_visible, text)


def markup(text: str) -> str:
    """``text`` made printable and escaped for rich markup, for data placed
    inside a string that carries the report's own markup."""
    from rich.markup import escape

    return escape(printable(text))


def xml_text(text: str) -> str:
    """``text`` with the characters XML 1.0 forbids (and other controls) as
    visible escapes.  ``<``, ``&`` and quotes are left to the XML writer
    (:mod:`xml.etree` and :func:`xml.sax.saxutils.escape` escape them), so
    this may also be applied to a finished XML document."""
    return _NOT_XML.sub(_visible, text)


@functools.cache
def _console_class() -> Any:
    from rich.console import Console

    class DataConsole(Console):
        """Every string is made printable before rich reads it."""

        def render_str(self, text: str, *args: Any, **kwargs: Any) -> Any:
            return super().render_str(printable(text), *args, **kwargs)

    return DataConsole


def report_console(stream: IO[str], width: int | None) -> Any:
    """A rich console on ``stream`` for reports that show drawing texts.

    Control characters in every string it prints (table cells and titles
    too) are shown as escapes before rich reads the string, so no label can
    drive the terminal; emoji codes and highlighting are off (``:warning:``
    in a label prints as written).  Rich markup stays on for the report's
    own styles: data placed in a string goes through :func:`markup` (or
    ``rich.markup.escape``), so that a label such as ``[/]`` or ``[red]``
    prints as written."""
    cls = _console_class()
    return cls(file=stream, highlight=False, soft_wrap=False, width=width, emoji=False)


#: ASCII stand-ins for the symbols the reports use, where the output's
#: encoding cannot show them.
ASCII_FALLBACK = {
    "μ": "mu",
    "µ": "mu",
    "°": " deg",
    "·": "*",
    "Ø": "D",
    "ø": "D",
    "✓": "ok",
    "✗": "x",
    "∞": "inf",
    "±": "+/-",
    "×": "x",
    "−": "-",
    "–": "-",
    "—": "-",
    "≤": "<=",
    "≥": ">=",
    "≈": "~",
    "→": "->",
    "←": "<-",
    "…": "...",
    "‘": "'",
    "’": "'",
    "“": '"',
    "”": '"',
    "ψ": "psi",
    "θ": "theta",
    "φ": "phi",
    "Σ": "sum",
    "²": "^2",
    "³": "^3",
    "⁴": "^4",
}

#: Name of the codec error handler :func:`degrade_stream` installs.
ERROR_HANDLER = "dxfcheck.ascii"


def _ascii_for(ch: str) -> str:
    if ch in ASCII_FALLBACK:
        return ASCII_FALLBACK[ch]
    plain = unicodedata.normalize("NFKD", ch).encode("ascii", "ignore").decode("ascii")
    if plain:
        return plain
    code = ord(ch)
    return f"\\u{code:04x}" if code < 0x10000 else f"\\U{code:08x}"


def _degrade(exc: UnicodeError) -> tuple[str, int]:
    if not isinstance(exc, UnicodeEncodeError):
        raise exc
    return "".join(_ascii_for(ch) for ch in exc.object[exc.start : exc.end]), exc.end


codecs.register_error(ERROR_HANDLER, _degrade)


def degrade_stream(stream: Any) -> None:
    """Let ``stream`` (a text stream) write ASCII stand-ins for the
    characters its encoding cannot show (``μ`` as ``mu``, ``°`` as ``deg``,
    others as ``\\uXXXX``), instead of failing.  A UTF-8 stream is left as it
    is; so is a stream that cannot be reconfigured."""
    encoding = str(getattr(stream, "encoding", None) or "").lower().replace("-", "").replace("_", "")
    if not encoding or encoding.startswith("utf"):
        return
    reconfigure = getattr(stream, "reconfigure", None)
    if reconfigure is None:
        return
    try:
        reconfigure(errors=ERROR_HANDLER)
    except (ValueError, OSError, TypeError):  # a detached or closed stream: left as it is
        return
