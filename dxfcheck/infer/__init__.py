"""Infer the skeleton of a drafted drawing (no role layers) from its
geometry: :func:`skeleton_drawing`."""

from dxfcheck.infer.skeleton import has_role_skeleton, skeleton_drawing

__all__ = ["has_role_skeleton", "skeleton_drawing"]
