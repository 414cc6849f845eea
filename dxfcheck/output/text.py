"""Wording every output shares."""

from __future__ import annotations

__all__ = ["CAUTION"]

#: Carried by every report.
CAUTION = (
    "Caution: dxfcheck is a design aid. Final design must follow the applicable codes and "
    "standards and be checked by a qualified engineer."
)
