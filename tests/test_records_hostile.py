"""Hostile or broken record files: each becomes a located problem, never a traceback.

Outside references: the YAML 1.1 spec (anchors and aliases, section 3.2.2.2; tags such as
!!python/object are application-specific and refused by PyYAML's safe loader), RFC 3629
(0xFF never appears in UTF-8), and the "billion laughs" entity-expansion attack (CWE-776).
"""
from __future__ import annotations

import os
from pathlib import Path

import pytest

from builder.records import validate_paths
from payloads import laughs  # the CWE-776 expansion, shared with the command-line tests


def _problems(tmp_path: Path, content: bytes, name: str = "QA-0101.yaml"):
    builds = tmp_path / "records" / "builds"
    builds.mkdir(parents=True, exist_ok=True)
    path = builds / name
    path.write_bytes(content)
    problems = validate_paths(tmp_path / "records", [path])
    assert problems and all(p.path == str(path) for p in problems), problems
    return problems


CASES = [
    ("empty", b"", (1, 1), "empty file"),
    ("blank", b"  \n\n", (1, 1), "empty file"),
    ("comment only", b"# nothing\n", (1, 1), "no YAML document"),
    ("not utf-8", b"id: QA-0101\nnotes: caf\xff\n", (2, 11), "not UTF-8"),
    ("list", b"- a\n- b\n", (1, 1), "expected a mapping; found a list"),
    ("scalar", b"just words\n", (1, 1), "expected a mapping"),
    ("tab indent", b"id: QA-0101\n\tstatus: draft\n", (2, 1), "tab"),
    ("unclosed", b"id: [QA-0101\n", (2, 1), "YAML"),
    ("two documents", b"id: A\n---\nid: B\n", (2, 1), "single document"),
    ("python tag", b'id: !!python/object/apply:os.system ["true"]\n', (1, 5), "could not determine a constructor"),
    ("alias bomb", laughs(), None, "expands to more than 10000 values"),
    ("many aliases", ("a: &a x\nb: [" + ",".join(["*a"] * 100) + "]\n").encode(), None, "more than 64 aliases"),
    ("self alias", b"a: &a [*a]\n", (1, 4), "contains it"),
    ("deep flow", b"[" * 100_000 + b"]" * 100_000, (1, 65), "nesting is deeper than 64"),
    ("deep compact", ("- " * 50_000 + "x\n").encode(), (1, 129), "nesting is deeper than 64"),
    ("too big", b"# " + b"x" * (256 * 1024) + b"\n", (0, 0), "limited to 262144 bytes"),
    ("unhashable key", b"? [a, b]\n: c\n", (1, 3), "unhashable"),
    ("path-like id", b"id: ../../etc/passwd\n", (1, 5), "not in the expected form"),
    ("null byte", b"id: QA-0101\x00\n", (1, 12), "YAML"),
]


@pytest.mark.parametrize("content, position, message", [case[1:] for case in CASES], ids=[c[0] for c in CASES])
def test_hostile_file_is_a_located_problem(tmp_path, content, position, message):
    problem = next(p for p in _problems(tmp_path, content) if message in p.message)
    if position is not None:
        assert (problem.line, problem.col) == position


def test_fifo_is_not_read(tmp_path):
    builds = tmp_path / "records" / "builds"
    builds.mkdir(parents=True)
    os.mkfifo(builds / "QA-0102.yaml")
    (problem,) = validate_paths(tmp_path / "records", [builds / "QA-0102.yaml"])
    assert problem.message == "not a regular file"


def test_ids_repeated_in_another_subfolder(tmp_path):
    builds = tmp_path / "records" / "builds"
    for folder in ("2024", "2025"):
        (builds / folder).mkdir(parents=True)
        (builds / folder / "QA-0101.yaml").write_text("id: QA-0101\n")
    problems = validate_paths(tmp_path / "records", [])
    duplicate = [p for p in problems if "already used" in p.message]
    assert len(duplicate) == 1 and duplicate[0].field == "id" and duplicate[0].line == 1
