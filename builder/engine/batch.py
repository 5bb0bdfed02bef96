"""Sizing many builds at once: the figures of those that size, the reasons of those that do not."""
from __future__ import annotations

from collections.abc import Iterable

from builder.bulk import collector_paused
from builder.engine.linkage import GeometryError
from builder.engine.result import Sizing
from builder.engine.size import pedal_linkage, size_build
from builder.model import Build, ShopRules


def size_all(builds: Iterable[Build], rules: ShopRules
             ) -> tuple[dict[str, Sizing], list[tuple[Build, GeometryError]]]:
    """Sizings by build id (without the plotted effort series), and each build whose pedal
    cannot push its master with the engine's reason."""
    sizings: dict[str, Sizing] = {}
    failures: list[tuple[Build, GeometryError]] = []
    with collector_paused():
        for build in builds:
            try:
                sizings[build.id] = size_build(build, rules, with_curve=False)
            except GeometryError as error:
                failures.append((build, error))
    return sizings, failures


def pedal_refusals(builds: Iterable[Build]) -> list[tuple[Build, GeometryError]]:
    """Each build whose pedal cannot push its master, with the engine's reason: the same
    list size_all gives (a pedal that cannot be made is the only refusal sizing has),
    without working the rest of the chain."""
    failures: list[tuple[Build, GeometryError]] = []
    with collector_paused():
        for build in builds:
            try:
                pedal_linkage(build.pedal)
            except GeometryError as error:
                failures.append((build, error))
    return failures
