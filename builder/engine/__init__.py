"""Sizing engine: pure functions on SI floats (no pint, YAML or mkdocs)."""
from builder.engine.linkage import GeometryError
from builder.engine.result import Figure, Flag, Linkage, LinkagePose, Sizing
from builder.engine.size import size_build

__all__ = ["Figure", "Flag", "GeometryError", "Linkage", "LinkagePose", "Sizing", "size_build"]
