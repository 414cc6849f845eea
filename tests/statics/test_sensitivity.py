"""Design sensitivity: the vectorised sampler against the scalar solver."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from common import capstan_band, conveyor_block, winch_two_shoe
from schema_check import output_json

import dxfcheck
from dxfcheck import cli
from dxfcheck.pipeline import contact_options
from dxfcheck.statics.contact import Direction
from dxfcheck.statics.sampling import _Parts, sample_design, torque_curve

MODELS = [
    pytest.param(winch_two_shoe, "auto", id="long-pivoted"),
    pytest.param(winch_two_shoe, "short", id="short-pivoted"),
    pytest.param(conveyor_block, "auto", id="short-fixed"),
    pytest.param(conveyor_block, "long", id="long-hinged"),
    pytest.param(capstan_band, "auto", id="band-and-spring"),
]


def _mech(tmp_path, maker):
    path = tmp_path / "d.dxf"
    maker().save(path)
    return dxfcheck.build_mechanism(dxfcheck.read_drawing(path))


@pytest.mark.parametrize(("maker", "model"), MODELS)
def test_vectorised_torque_equals_scalar_solves(tmp_path, maker, model):
    """The parts of the matrix (μ-affine shoe columns, e^(μθ) band columns,
    friction-circle contact) rebuild exactly what the general solve builds."""
    mech = _mech(tmp_path, maker)
    opts = contact_options(model, 60)
    mus = np.array([0.2, 0.31, 0.4, 0.5])
    for d in ("cw", "ccw"):
        vec = torque_curve(mech, mus, d, opts)
        ref = [dxfcheck.solve(mech, float(m), [d], opts).cases[0].torque_Nm for m in mus]
        assert vec == pytest.approx(ref, rel=1e-11)


@pytest.mark.parametrize(("maker", "model"), MODELS[:3])
def test_moved_pins_equal_a_solve_of_the_moved_drawing(tmp_path, maker, model):
    """One sample with every pin moved: the same as solving a mechanism whose
    pins stand there (parts and loads as drawn)."""
    mech = _mech(tmp_path, maker)
    opts = contact_options(model, 60)
    rng = np.random.default_rng(5)
    dpin = rng.uniform(-0.5, 0.5, (1, len(mech.pins), 2))
    mu = np.array([0.37])
    parts = _Parts(mech, Direction.CCW, opts)
    torque, forces = parts.solve(mu, dpin)
    moved = replace(
        mech,
        pins=tuple(
            replace(p, center=(p.center[0] + dpin[0, k, 0], p.center[1] + dpin[0, k, 1]))
            for k, p in enumerate(mech.pins)
        ),
    )
    ref = dxfcheck.solve(moved, 0.37, ["ccw"], opts).cases[0]
    assert torque[0] == pytest.approx(ref.torque_Nm, rel=1e-10)
    assert forces[0] == pytest.approx([p.force_N for p in ref.pins], rel=1e-9)


def test_distribution_and_probability(tmp_path):
    mech = _mech(tmp_path, conveyor_block)
    a = sample_design(mech, (0.3, 0.4), 20000, pin_tolerance_mm=0.1, seed=11)
    b = sample_design(mech, (0.3, 0.4), 20000, pin_tolerance_mm=0.1, seed=11)
    assert a.directions == b.directions  # reproducible from the seed
    d = a.directions[0]
    assert d.torque_Nm["min"] <= d.torque_Nm["p5"] <= d.torque_Nm["p50"] <= d.torque_Nm["p95"] <= d.torque_Nm["max"]
    lo = dxfcheck.solve(mech, 0.3, ["cw"]).cases[0].torque_Nm
    hi = dxfcheck.solve(mech, 0.4, ["cw"]).cases[0].torque_Nm
    assert lo * 0.99 < d.torque_Nm["min"] and d.torque_Nm["max"] < hi * 1.01
    median = d.torque_Nm["p50"]
    c = sample_design(mech, (0.3, 0.4), 20000, pin_tolerance_mm=0.1, seed=12, required_torque_Nm=median)
    assert c.directions[0].p_below_required == pytest.approx(0.5, abs=0.02)


def test_cli_sampling(tmp_path, capsys):
    path = tmp_path / "w.dxf"
    winch_two_shoe().save(path)
    svg = tmp_path / "mu.svg"
    rc = cli.main(
        [
            "solve",
            str(path),
            "--mu",
            "0.30..0.45",
            "--samples",
            "3000",
            "--pin-tolerance",
            "0.2mm",
            "--seed",
            "3",
            "--json",
            "--svg",
            str(svg),
            "--required-torque",
            "2 kN*m",
        ]
    )
    assert rc == 0
    doc = output_json(capsys.readouterr().out)
    assert doc["schema"] == "dxfcheck.statics.sampling/1" and doc["samples"] == 3000
    assert {d["direction"] for d in doc["directions"]} == {"cw", "ccw"}
    assert 0 < doc["directions"][0]["p_below_required"] < 1
    assert "<polyline" in svg.read_text()
    assert cli.main(["solve", str(path), "--mu", "0.3..0.4"]) == 2


# The reduced system (only the moving rows solved per sample) at its edges:
# every pin at a corner of its tolerance square, μ at both ends of the
# range, springs at both ends of theirs, the band's e^(μθ) column, the
# friction-circle columns of short pivoted shoes.  The reference is the
# ordinary solve of the drawing moved and re-sprung by hand (the general
# assembly and solve of dxfcheck.statics.equations, itself checked against
# the handbook cases in the other statics tests).

TOLERANCE_MM = 0.2
CORNERS = np.array([[1.0, 1.0], [1.0, -1.0], [-1.0, 1.0], [-1.0, -1.0]])


def _moved(mech, dpin, factor):
    """The mechanism with every pin moved by ``dpin`` [mm] and every spring's
    force times ``factor`` (parts, loads and reference points as drawn)."""
    return replace(
        mech,
        pins=tuple(
            replace(p, center=(p.center[0] + dpin[k, 0], p.center[1] + dpin[k, 1])) for k, p in enumerate(mech.pins)
        ),
        springs=tuple(replace(sp, force_N=sp.force_N * factor) for sp in mech.springs),
    )


def _edge_samples(mech):
    """μ at both ends of 0.30..0.45, each pin at a corner of its ± 0.2 mm
    square (a different corner per pin and sample), springs at ± 10 %."""
    mus, dpins, factors = [], [], []
    for i, (mu, factor) in enumerate([(0.30, 0.9), (0.45, 1.1), (0.30, 1.1), (0.45, 0.9)]):
        corner = CORNERS[(np.arange(len(mech.pins)) + i) % 4]
        mus.append(mu)
        dpins.append(TOLERANCE_MM * corner)
        factors.append(factor)
    return np.array(mus), np.array(dpins), np.array(factors)


@pytest.mark.parametrize(("maker", "model"), MODELS)
@pytest.mark.parametrize("direction", [Direction.CW, Direction.CCW])
def test_reduced_samples_at_the_edges_equal_solves_of_moved_drawings(tmp_path, maker, model, direction):
    mech = _mech(tmp_path, maker)
    opts = contact_options(model, 60)
    parts = _Parts(mech, direction, opts)
    parts.prepare()
    assert parts.reduced is not None  # the demos' linkages take the reduced path
    assert parts.reduced.null.shape[1] < parts.fixed_k.shape[0]
    mus, dpins, factors = _edge_samples(mech)
    if model == "long":
        # the hinged long shoe's pressure law is taken about its drawn hinge
        # (as before the reduction: the sampler does not move that basis with
        # the pin, a 4e-5 relative difference at 0.2 mm), so μ and springs only
        dpins[:] = 0.0
    springs = np.repeat(factors[:, None], len(mech.springs), axis=1) if mech.springs else None
    torque, forces = parts.solve(mus, dpins, springs)
    for i, mu in enumerate(mus):
        ref = dxfcheck.solve(_moved(mech, dpins[i], factors[i] if mech.springs else 1.0), float(mu), [direction], opts)
        case = ref.cases[0]
        # signed: a torque against the drum's turning is positive in both directions
        assert torque[i] == pytest.approx(case.torque_Nm, rel=1e-10) and torque[i] > 0
        assert forces[i] == pytest.approx([p.force_N for p in case.pins], rel=1e-9)


@pytest.mark.parametrize(("maker", "model"), MODELS)
def test_reduced_and_full_unknowns_agree_signed(tmp_path, maker, model):
    """Every unknown (each pin force's x and y, each shoe's and band's
    force), sign included, is the same from the k × k reduced system as from
    the whole stacked system, on random samples within the tolerances."""
    mech = _mech(tmp_path, maker)
    rng = np.random.default_rng(21)
    n = 300
    mu = rng.uniform(0.1, 0.6, n)
    dpin = rng.uniform(-0.5, 0.5, (n, len(mech.pins), 2))
    springs = rng.uniform(0.8, 1.2, (n, len(mech.springs))) if mech.springs else None
    for d in (Direction.CW, Direction.CCW):
        parts = _Parts(mech, d, contact_options(model, 60))
        parts.prepare()
        full = parts.solve_full(mu, dpin, springs)
        reduced = parts.solve_reduced(mu, dpin, springs)
        scale = np.abs(full).max(axis=1, keepdims=True)
        assert np.abs(reduced - full).max() <= 1e-10 * scale.max()
        assert np.array_equal(np.sign(np.round(reduced / scale, 8)), np.sign(np.round(full / scale, 8)))


def test_full_path_where_the_reduction_does_not_pay(tmp_path, monkeypatch):
    """With the reduction switched off (as for a linkage whose rows nearly
    all move) the sampler solves the whole systems, to the same results."""
    from dxfcheck.statics import sampling

    mech = _mech(tmp_path, winch_two_shoe)
    reduced = sample_design(mech, (0.3, 0.45), 3000, pin_tolerance_mm=0.2, seed=9)
    monkeypatch.setattr(sampling, "REDUCED_SHARE", 0.0)
    parts = _Parts(mech, Direction.CW, contact_options("auto", 60))
    parts.prepare()
    assert parts.reduced is None
    full = sample_design(mech, (0.3, 0.45), 3000, pin_tolerance_mm=0.2, seed=9)
    for a, b in zip(reduced.directions, full.directions, strict=True):
        assert a.governing_pin == b.governing_pin
        for key, value in a.torque_Nm.items():
            assert value == pytest.approx(b.torque_Nm[key], rel=1e-10)
        for key, value in a.max_pin_force_N.items():
            assert value == pytest.approx(b.max_pin_force_N[key], rel=1e-9)
