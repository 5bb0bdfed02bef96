"""Failures found after loading (a pedal that cannot push its master), placed in the record
file and worded, so every command reports them as `path:line:col: field: message`."""
from __future__ import annotations

from typing import TYPE_CHECKING

from builder.presentation import geometry_message
from builder.problems import Problem
from builder.records import locate

if TYPE_CHECKING:
    from builder.engine import GeometryError
    from builder.model import Build


def unsizable_problems(failures: list[tuple[Build, GeometryError]]) -> list[Problem]:
    """One located problem per build whose pedal cannot push its master."""
    problems = []
    for build, error in failures:
        line, col = locate(build.path, "pedal.layout") if build.path else (0, 0)
        problems.append(Problem(build.path or build.id, line, col, "pedal.layout",
                                geometry_message(error)))
    return problems
