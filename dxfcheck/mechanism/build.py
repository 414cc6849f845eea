"""Infer the mechanism (parts, pins, shoes, loads) from drawing geometry.

The second stage of the pipeline.  :func:`build_mechanism` runs one step per
kind of thing, each in its own module, applying the topology rules stated in
the README:

* :mod:`~dxfcheck.mechanism.topology`: centreline pieces whose end lies on
  another piece (end to end, or on a segment's interior) at a point that
  holds no pin form one rigid part; pieces that merely cross do not join;
* :mod:`~dxfcheck.mechanism.naming`: a label names the nearest pin, part or
  shoe;
* :mod:`~dxfcheck.mechanism.pins`: a pin or pivot attaches to every part
  whose centreline passes through its centre; a pivot also attaches to the
  frame;
* :mod:`~dxfcheck.mechanism.loads`: a load acts on the part whose centreline
  passes through the start of its line, along the line, with the magnitude
  of the nearest text on the load layer (or the one given by the caller);
* :mod:`~dxfcheck.mechanism.springs` and :mod:`~dxfcheck.mechanism.bands`;
* :mod:`~dxfcheck.mechanism.shoes`: a shoe is the part whose centreline ends
  on a SHOE arc; it is *pivoted* when that part touches the rest of the
  linkage only through one pin and carries no load, otherwise it is *fixed*
  to its lever.

Every problem the user can fix in the drawing becomes a :class:`Finding`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.mechanism.bands import build_bands
from dxfcheck.mechanism.guides import build_guides
from dxfcheck.mechanism.layers import layer_findings, missing_role_note, searched
from dxfcheck.mechanism.loads import build_loads
from dxfcheck.mechanism.model import Drum, Load, Mechanism, Part, Pin, Spring
from dxfcheck.mechanism.naming import Namer, Target, read_labels
from dxfcheck.mechanism.pins import build_pins
from dxfcheck.mechanism.shoes import ShoeParts, build_shoes
from dxfcheck.mechanism.springs import build_springs
from dxfcheck.mechanism.texts import Magnitudes
from dxfcheck.mechanism.topology import LIES_ON_RTOL, Topology, default_tolerance, finding, rigid_parts
from dxfcheck.read.drawing import Drawing

__all__ = ["LIES_ON_RTOL", "build_mechanism", "default_tolerance"]


def _drum(drawing: Drawing, tol: float) -> tuple[Drum | None, tuple[Finding, ...]]:
    """The drum (the first drum circle), NO_DRUM when there is none and
    MANY_DRUMS when there are several."""
    drums = drawing.circles_of(Role.DRUM)
    if not drums:
        msg = (
            f"no drum circle found on the {searched(drawing, Role.DRUM)}; draw the drum's braking surface"
            + missing_role_note(drawing, Role.DRUM, tol)
        )
        return None, (finding(Code.NO_DRUM, msg),)
    d0 = drums[0]
    drum = Drum(d0.center, d0.radius_mm, d0.source)
    if len(drums) == 1:
        return drum, ()
    msg = f"{len(drums)} drum circles; one drum per drawing"
    return drum, (finding(Code.MANY_DRUMS, msg, [d.source for d in drums], d0.center),)


def _part_pins(part_names: Sequence[str], pins: Sequence[Pin]) -> dict[str, tuple[str, ...]]:
    """The names of the pins on each part, in pin order."""
    out: dict[str, list[str]] = {n: [] for n in part_names}
    for p in pins:
        for pn in p.parts:
            out[pn].append(p.name)
    return {n: tuple(v) for n, v in out.items()}


def _loaded(loads: Sequence[Load], springs: Sequence[Spring]) -> frozenset[str | None]:
    """The parts a load or a spring acts on."""
    return frozenset({ld.part for ld in loads} | {p for sp in springs for p in sp.parts if p})


def _parts(topo: Topology, part_names: Sequence[str], part_pins: dict[str, tuple[str, ...]]) -> tuple[Part, ...]:
    """The rigid parts with their names, segments and pins."""
    return tuple(
        Part(name, topo.part_segments(gi), part_pins[name], topo.part_sources(gi)) for gi, name in enumerate(part_names)
    )


def build_mechanism(
    drawing: Drawing,
    *,
    tolerance_mm: float | None = None,
    effort_N: float | None = None,
    default_magnitude_N: float | None = None,
) -> Mechanism:
    """Build the mechanism a drawing shows.

    Parameters
    ----------
    drawing : Drawing
        Output of :func:`dxfcheck.read.drawing.read_drawing`.
    tolerance_mm : float, optional
        "Lies on" tolerance [mm]; default :func:`default_tolerance`.
    effort_N : float, optional
        Magnitude [N] for every load and spring, overriding the drawing's
        texts.
    default_magnitude_N : float, optional
        Magnitude [N] for loads and springs whose text gives none (the
        inverse question scales them anyway).

    Returns
    -------
    Mechanism
        With the findings; a mechanism with error findings cannot be solved.
    """
    tol = tolerance_mm if tolerance_mm is not None else default_tolerance(drawing)
    forces = Magnitudes(effort_N, default_magnitude_N)
    drum, f_drum = _drum(drawing, tol)
    topo, f_parts = rigid_parts(drawing, tol)
    labels, f_labels = read_labels(drawing, topo)
    namer = Namer(labels)
    part_names = tuple(namer.name_of(Target.PART, gi, "part") for gi in range(len(topo.groups)))
    pins, pin_names, f_pins = build_pins(drawing, topo, namer, part_names)
    loads, f_loads = build_loads(drawing, topo, part_names, pins, forces)
    springs, f_springs = build_springs(drawing, topo, part_names, forces)
    bands, f_bands = build_bands(drawing, drum, pins, pin_names, topo)
    part_pins = _part_pins(part_names, pins)
    on_parts = ShoeParts(part_names, part_pins, _loaded(loads, springs))
    shoes, f_shoes = build_shoes(drawing, drum, topo, on_parts, namer, has_bands=bool(bands))
    parts = _parts(topo, part_names, part_pins)
    mech = Mechanism(
        drawing=drawing,
        tolerance_mm=tol,
        length_scale_mm=drawing.extent_mm(),
        drum=drum,
        pins=pins,
        parts=parts,
        shoes=shoes,
        loads=loads,
        findings=(*drawing.findings, *f_drum, *f_parts, *f_labels, *f_pins, *f_loads, *f_springs, *f_bands, *f_shoes),
        springs=springs,
        bands=bands,
        labelled_names=namer.labelled_names,
        guides=build_guides(springs, parts, pins, tol),
    )
    return replace(mech, findings=(*mech.findings, *layer_findings(mech)))  # layers that look like a role's
