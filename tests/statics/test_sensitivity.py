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
