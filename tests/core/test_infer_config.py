"""The ``[infer]`` table of the project file (the project's own format; no
published source): read, applied under a sidecar, and refused with the key
and the file named when wrong."""

from __future__ import annotations

import pytest

from dxfcheck.core.config import InferSettings, config_for_drawing, load_config
from dxfcheck.core.errors import ConfigError


def test_infer_table_is_read(tmp_path):
    p = tmp_path / "dxfcheck.toml"
    p.write_text('[infer]\nskeleton_from = "geometry"\nframe_layers = ["base", "Frame"]\ncentre_layers = "axes"\n')
    cfg = load_config(p)
    assert cfg.infer == InferSettings(skeleton_from="geometry", frame_layers=("BASE", "FRAME"), centre_layers=("AXES",))


def test_sidecar_replaces_the_projects_infer_keys(tmp_path):
    (tmp_path / "dxfcheck.toml").write_text('[infer]\nframe_layers = ["BASE"]\nignore_layers = ["DIM"]\n')
    drawing = tmp_path / "brake.dxf"
    drawing.write_text("0\nEOF\n")
    (tmp_path / "brake.toml").write_text('[infer]\nframe_layers = ["BRACKET"]\n')
    cfg = config_for_drawing(drawing, tmp_path / "dxfcheck.toml")
    assert cfg.infer.frame_layers == ("BRACKET",) and cfg.infer.ignore_layers == ("DIM",)


@pytest.mark.parametrize(
    ("text", "says"),
    [
        ('[infer]\nskeleton_from = "maybe"\n', "skeleton_from must be one of auto, layers, geometry"),
        ("[infer]\nframe_layer = []\n", "unknown key 'frame_layer'"),
        ("[infer]\nframe_layers = [1]\n", "frame_layers must be a list of names"),
        ('infer = "geometry"\n', "[infer] must be a table"),
    ],
)
def test_wrong_infer_tables_are_refused(tmp_path, text, says):
    p = tmp_path / "dxfcheck.toml"
    p.write_text(text)
    with pytest.raises(ConfigError) as exc:
        load_config(p)
    assert says in str(exc.value) and str(p) in str(exc.value)
