"""Infer the skeleton of a drafted drawing (no role layers) from its
geometry: :func:`dxfcheck.infer.skeleton.skeleton_drawing`;
:func:`dxfcheck.infer.choice.infers_skeleton` says whether a drawing needs
it.  The package itself imports nothing, so that a drawing on the role
layers never loads the inference."""

__all__: list[str] = []
