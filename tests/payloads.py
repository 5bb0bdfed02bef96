"""Hostile inputs shared by the hostile-input tests (no tests here)."""
from __future__ import annotations


def laughs(levels: int = 9, width: int = 10) -> bytes:
    """Nine levels of ten aliases each: 10**9 values once expanded (CWE-776)."""
    text = "a: &a [" + ",".join(["lol"] * width) + "]\n"
    for level in range(1, levels):
        name, previous = chr(ord("a") + level), chr(ord("a") + level - 1)
        text += f"{name}: &{name} [" + ",".join([f"*{previous}"] * width) + "]\n"
    return text.encode()
