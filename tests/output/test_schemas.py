"""The published JSON Schemas: shipped, printed by ``dxfcheck schema``, met
by every document the commands print, and strict enough to refuse a
document with a wrong type, a missing key or a key of its own.

Checked with the ``jsonschema`` package (draft 2020-12 meta-schema and
validator: JSON Schema Core and Validation, draft 2020-12,
json-schema.org); the rest is the project's own convention (no published
source)."""

from __future__ import annotations

import copy
import json
import subprocess
import sys
import tomllib

import jsonschema
import pytest
from common import ROOT
from schema_check import output_json, validate_document, validator

from dxfcheck.batch import BATCH_SCHEMA
from dxfcheck.core.files import is_dxfcheck_output
from dxfcheck.core.geometry import Affine
from dxfcheck.gate.linings import LININGS
from dxfcheck.output.json import (
    CHECK_SCHEMA,
    COMPARE_SCHEMA,
    LININGS_SCHEMA,
    SENSITIVITY_SCHEMA,
    SKELETON_SCHEMA,
    SOLVE_SCHEMA,
    linings_to_dict,
)
from dxfcheck.output.schemas import DOCUMENTS, SCHEMA_NAMES, load_schema, schema_text

DEMOS = ROOT / "drawings"
WINCH = DEMOS / "winch_two_shoe.dxf"


def run(*args, cwd=None):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, cwd=cwd, timeout=300
    )


def test_every_schema_is_valid_draft_2020_12_and_names_its_document():
    """Each file passes the draft 2020-12 meta-schema; the document's
    versioned name in the schema is the one the code writes, so that a new
    document version needs a new schema."""
    assert set(SCHEMA_NAMES) == {
        "solve",
        "check",
        "compare",
        "batch",
        "sensitivity",
        "linings",
        "skeleton",
        "error",
    }
    written = {
        "solve": SOLVE_SCHEMA,
        "check": CHECK_SCHEMA,
        "compare": COMPARE_SCHEMA,
        "batch": BATCH_SCHEMA,
        "sensitivity": SENSITIVITY_SCHEMA,
        "linings": LININGS_SCHEMA,
        "skeleton": SKELETON_SCHEMA,
    }
    assert written == DOCUMENTS
    for name in SCHEMA_NAMES:
        schema = load_schema(name)
        jsonschema.Draft202012Validator.check_schema(schema)
        assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
        if name in DOCUMENTS:
            assert schema["properties"]["schema"] == {"const": DOCUMENTS[name]}
            version = DOCUMENTS[name].rsplit("/", 1)[1]
            assert schema["$id"].endswith(f":{name}:{version}")


def test_schemas_are_package_data():
    """pyproject ships the schema files with the package (a wheel without
    them would print nothing for ``dxfcheck schema``)."""
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text())
    assert "*.json" in meta["tool"]["setuptools"]["package-data"]["dxfcheck.output.schemas"]


@pytest.mark.parametrize("drawing", ["winch_two_shoe", "conveyor_block", "capstan_band"])
def test_solve_and_check_of_every_demo_meet_their_schemas(drawing):
    path = DEMOS / f"{drawing}.dxf"
    solved = run("solve", path, "--json")
    assert solved.returncode in (0, 1), solved.stderr
    assert output_json(solved.stdout)["schema"] == SOLVE_SCHEMA
    checked = run("check", path, "--json")
    assert checked.returncode in (0, 1), checked.stderr
    assert output_json(checked.stdout)["schema"] == CHECK_SCHEMA


@pytest.mark.parametrize("style", ["centrelines", "outlines", "blocks"])
def test_a_drafted_drawing_meets_the_schema_and_says_how_it_was_read(style):
    """A skeleton inferred from the geometry: the document names the style."""
    solved = run("solve", DEMOS / "drafted" / f"winch_{style}.dxf", "--json")
    assert solved.returncode in (0, 1), solved.stderr
    doc = output_json(solved.stdout)
    assert doc["skeleton"] == f"geometry ({'centre lines' if style == 'centrelines' else style})"


def test_compare_batch_and_sensitivity_meet_their_schemas(tmp_path):
    moved = tmp_path / "winch-B.dxf"
    from common import winch_two_shoe

    winch_two_shoe().save(moved, transform=Affine.translation(300, 40) @ Affine.rotation(15))
    compared = run("compare", WINCH, moved, "--json")
    assert compared.returncode in (0, 1), compared.stderr
    assert output_json(compared.stdout)["schema"] == COMPARE_SCHEMA
    batch = run("batch", DEMOS, "--json", "--no-cache", "--jobs", "1")
    assert batch.returncode in (0, 1), batch.stderr
    drawings = [p for p in (ROOT / "drawings").rglob("*.dxf") if not is_dxfcheck_output(p)]  # drafted/ too; not outputs
    assert len(output_json(batch.stdout)["results"]) == len(drawings)
    sampled = run("solve", WINCH, "--mu", "0.3..0.4", "--samples", "200", "--pin-tolerance", "0.2mm", "--json")
    assert sampled.returncode == 0, sampled.stderr
    assert output_json(sampled.stdout)["schema"] == SENSITIVITY_SCHEMA
    linings = run("linings", "--json")
    assert linings.returncode == 0, linings.stderr
    assert len(output_json(linings.stdout)["linings"]) == len(LININGS)


@pytest.mark.parametrize("command", ["solve", "check"])
def test_refusals_meet_the_error_schema(tmp_path, command):
    """A refusal prints the error document under the command's name; the
    command's schema accepts it, and so does the error schema."""
    r = run(command, tmp_path / "missing.dxf", "--json")
    assert r.returncode == 2
    doc = output_json(r.stdout)
    assert doc["error"]["kind"] == "unusable"
    validate_document(doc, "error")


def _demo_docs():
    solved = output_json(run("solve", WINCH, "--json").stdout)
    checked = output_json(run("check", WINCH, "--json").stdout)
    return solved, checked


MUTATIONS = {
    "missing caution": lambda d: d.pop("caution"),
    "torque as text": lambda d: d["cases"][0].__setitem__("torque_Nm", "2139.7"),
    "pin without fx_N": lambda d: d["cases"][0]["pins"][0].pop("fx_N"),
    "unknown top-level key": lambda d: d.__setitem__("torque", 1.0),
    "unknown shoe key": lambda d: d["cases"][0]["shoes"][0].__setitem__("pressure_MPa", 0.5),
    "direction not a drum direction": lambda d: d["cases"][0].__setitem__("direction", "up"),
    "finding code out of pattern": lambda d: d["findings"].append(
        {"code": "X1", "name": "x", "severity": "warning", "message": "", "handles": [], "layers": [], "at": None}
    ),
    "point of three numbers": lambda d: d["cases"][0]["shoes"][0].__setitem__("force_N", [1.0, 2.0, 3.0]),
    "schema of another document": lambda d: d.__setitem__("schema", "dxfcheck.solve/1"),
    "drawing hash not hex": lambda d: d.__setitem__("drawing_sha256", "ad71" * 15 + "03eZ"),
    "run time without its zone": lambda d: d.__setitem__("run_at", "2026-12-02T06:45:54"),
    "missing run time": lambda d: d.pop("run_at"),
    "case without parts": lambda d: d["cases"][0].pop("parts"),
    "drum load of three numbers": lambda d: d["cases"][0].__setitem__("drum_load_N", [1.0, 2.0, 3.0]),
    "unknown station key": lambda d: d["cases"][0]["parts"][0]["stations"][0].__setitem__("force_N", 1.0),
    "station segment as text": lambda d: d["cases"][0]["parts"][0]["stations"][0].__setitem__("segment", "0"),
    "station without its segment's start": lambda d: d["cases"][0]["parts"][0]["stations"][0].pop("start_mm"),
    "station end of three numbers": lambda d: d["cases"][0]["parts"][0]["stations"][0].__setitem__(
        "end_mm", [1.0, 2.0, 3.0]
    ),
}

#: Mutations of the gate's keys (the check document only).
CHECK_MUTATIONS = {
    "rule without formula": lambda d: d["rules"][0].pop("formula"),
    "substituted values not text": lambda d: d["rules"][0].__setitem__("substituted", 2.0),
    "unknown rule key": lambda d: d["rules"][0].__setitem__("formula_tex", ""),
    "missing keys not named": lambda d: d["rules"][0]["inputs"].__setitem__("missing", ""),
}


@pytest.fixture(scope="module")
def demo_docs():
    return _demo_docs()


@pytest.mark.parametrize("mutation", sorted(MUTATIONS))
def test_a_mutated_document_fails(demo_docs, mutation):
    """The schemas refuse a wrong type, a missing required key and a key
    they do not list: the unchanged documents pass, each mutation fails."""
    for doc, name in zip(demo_docs, ("solve", "check"), strict=True):
        validate_document(doc, name)
        bad = copy.deepcopy(doc)
        MUTATIONS[mutation](bad)
        with pytest.raises(jsonschema.ValidationError):
            validate_document(bad, name)


@pytest.mark.parametrize("mutation", sorted(CHECK_MUTATIONS))
def test_a_mutated_check_document_fails(demo_docs, mutation):
    _, checked = demo_docs
    assert checked["rules"] and checked["rules"][0]["formula"]
    bad = copy.deepcopy(checked)
    CHECK_MUTATIONS[mutation](bad)
    with pytest.raises(jsonschema.ValidationError):
        validate_document(bad, "check")


LINING_MUTATIONS = {
    "unknown row key": lambda d: d["linings"][0].__setitem__("colour", "grey"),
    "row without its source": lambda d: d["linings"][0].pop("source"),
    "practice value the library never sets": lambda d: d["linings"][0]["practice"].__setitem__("mu", "guess"),
    "pressure range of one number": lambda d: d["linings"][0].__setitem__("working_pressure_MPa", [0.7]),
    "missing caution": lambda d: d.pop("caution"),
}


@pytest.mark.parametrize("mutation", sorted(LINING_MUTATIONS))
def test_a_mutated_linings_document_fails(mutation):
    doc = json.loads(json.dumps(linings_to_dict(LININGS.values())))
    validate_document(doc, "linings")
    bad = copy.deepcopy(doc)
    LINING_MUTATIONS[mutation](bad)
    with pytest.raises(jsonschema.ValidationError):
        validate_document(bad, "linings")


def test_check_document_is_no_solve_document(demo_docs):
    """check/2 adds keys to solve/2: each schema refuses the other's document."""
    solved, checked = demo_docs
    assert list(validator("solve").iter_errors(checked))
    assert list(validator("check").iter_errors(solved))
    missing_rules = {k: v for k, v in checked.items() if k != "rules"}
    with pytest.raises(jsonschema.ValidationError, match="rules"):
        validate_document(missing_rules, "check")


def test_schema_command_lists_and_prints():
    listed = run("schema")
    assert listed.returncode == 0
    assert [line.split()[0] for line in listed.stdout.splitlines()] == list(SCHEMA_NAMES)
    for name in SCHEMA_NAMES:
        printed = run("schema", name)
        assert printed.returncode == 0 and printed.stdout == schema_text(name)
        assert json.loads(printed.stdout)["$id"].startswith("urn:dxfcheck:schema:")
    assert run("schema", "dxfcheck.check/2").stdout == schema_text("check")
    unknown = run("schema", "drawing")
    assert unknown.returncode == 2 and "no schema named 'drawing'" in unknown.stderr


def _skeleton_doc(drawing, out, *more):
    r = run("skeleton", drawing, "-o", out, "--json", *more)
    return r.returncode, output_json(r.stdout)


@pytest.mark.parametrize("style", ["centrelines", "outlines", "blocks"])
def test_skeleton_documents_of_drafted_drawings_meet_their_schema(tmp_path, style):
    """``skeleton --json`` on a drafted drawing: inferred, the inference
    described, the files written listed in order (drawing, then SVG)."""
    out, svg = tmp_path / "out.dxf", tmp_path / "out.svg"
    code, doc = _skeleton_doc(DEMOS / "drafted" / f"winch_{style}.dxf", out, "--svg", svg)
    assert code == 0
    assert doc["schema"] == SKELETON_SCHEMA and doc["written"] == [str(out), str(svg)]
    assert doc["skeleton"] == f"geometry ({doc['inference']['style']})"


def test_skeleton_documents_from_layers_and_of_a_broken_mechanism_meet_the_schema(tmp_path):
    """From the role layers the document has no inference; a mechanism that
    cannot be built (a lever with no load: M212) still gets its document,
    with the error among its findings, and exit 2."""
    code, doc = _skeleton_doc(WINCH, tmp_path / "winch.dxf")
    assert code == 0 and doc["skeleton"] == "layers" and doc["inference"] is None
    from dxfcheck.output.sketch import Sketch

    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(-200, -100, 20, label="O")
    sk.link((-200, -100), (-200, 200))
    sk.link((-200, 0), (-150, 0))
    sk.shoe(0, 0, 150, 160, 200)
    sk.save(tmp_path / "no_load.dxf")
    code, doc = _skeleton_doc(tmp_path / "no_load.dxf", tmp_path / "no_load-out.dxf")
    assert code == 2 and "error" not in doc
    assert "M212" in {f["code"] for f in doc["findings"] if f["severity"] == "error"}


SKELETON_MUTATIONS = {
    "unknown top-level key": lambda d: d.__setitem__("cases", []),
    "missing caution": lambda d: d.pop("caution"),
    "missing inference": lambda d: d.pop("inference"),
    "nothing written": lambda d: d.__setitem__("written", []),
    "written path not text": lambda d: d["written"].__setitem__(0, 1),
    "source out of pattern": lambda d: d.__setitem__("skeleton", "geometry (sketch)"),
    "inference style unknown": lambda d: d["inference"].__setitem__("style", "hand"),
    "inference count negative": lambda d: d["inference"]["found"].__setitem__("pin", -1),
    "pin without pivot": lambda d: d["mechanism"]["pins"][0].pop("pivot"),
    "unknown part key": lambda d: d["mechanism"]["parts"][0].__setitem__("mass_kg", 3.0),
    "finding code out of pattern": lambda d: d["findings"][0].__setitem__("code", "X1"),
    "schema of another document": lambda d: d.__setitem__("schema", "dxfcheck.solve/2"),
}


@pytest.fixture(scope="module")
def skeleton_doc(tmp_path_factory):
    out = tmp_path_factory.mktemp("skeleton") / "out.dxf"
    return _skeleton_doc(DEMOS / "drafted" / "winch_outlines.dxf", out)[1]


@pytest.mark.parametrize("mutation", sorted(SKELETON_MUTATIONS))
def test_a_mutated_skeleton_document_fails(skeleton_doc, mutation):
    validate_document(skeleton_doc, "skeleton")
    assert skeleton_doc["inference"] and skeleton_doc["findings"] and skeleton_doc["mechanism"]["pins"]
    bad = copy.deepcopy(skeleton_doc)
    SKELETON_MUTATIONS[mutation](bad)
    with pytest.raises(jsonschema.ValidationError):
        validate_document(bad, "skeleton")
