"""The fitment reference (builder.history.reference): which finished builds share a row, and
the row's figures. Every grouping and figure is worked by hand: bores within 0.002 in are
one bore (1 in = 0.0254 m exactly, NIST SP 811, appendix B), the median of an odd count is
its middle value, the least margin the smallest. Every code and id is invented.
"""
from __future__ import annotations

import dataclasses

import pytest

from builder.history.reference import combinations
from history_factories import INCH, make_build, make_sizing


def finished(build_id: str, status: str, effort: float, margin: float,
             slave_bore_in: float = 0.875):
    """A finished QX-5 build and a sizing with this margin."""
    build = make_build(build_id, status=status, effort=effort, slave_bore=slave_bore_in * INCH)
    return build, dataclasses.replace(make_sizing(build_id), margin=margin)


def test_a_row_gives_the_median_effort_and_the_least_margin_of_its_builds():
    pairs = [finished("QX-001", "verified", 150.0, 0.12),
             finished("QX-002", "verified", 110.0, 0.07, slave_bore_in=0.874),  # 0.001 in off
             finished("QX-003", "rejected", 120.0, 0.20),
             finished("QX-004", "measured", 90.0, 0.01),  # not a reference status
             finished("QX-005", "verified", 130.0, 0.30, slave_bore_in=0.880),  # 0.005 in off
             # 0.0021 in off: a piston area only 0.48 % larger, yet not the same bore
             finished("QX-006", "verified", 140.0, 0.25, slave_bore_in=0.8771)]
    rows = combinations(pairs)[("QX-5", "rearward")]
    assert [[b.id for b in row.builds] for row in rows][1:] == [["QX-006"], ["QX-005"]]
    shared = rows[0]
    assert sorted(b.id for b in shared.builds) == ["QX-001", "QX-002", "QX-003"]
    assert shared.median_measured_effort == pytest.approx(120.0)  # middle of 110, 120, 150
    assert shared.least_margin == pytest.approx(0.07)
    assert (shared.verified, shared.rejected) == (2, 1)
    assert rows[2].least_margin == pytest.approx(0.30)
