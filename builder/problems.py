"""Located input problems: every bad input becomes one of these, never a traceback."""
from __future__ import annotations

from dataclasses import dataclass, field as _field

PLACEHOLDER = "placeholder"  # Problem.code of a template value left in a record


@dataclass(frozen=True, slots=True)
class Problem:
    """One thing wrong with an input file, located for a person to fix.

    Printed as ``path:line:col: field: message``; line and col are 1-based,
    0 when the position is unknown (for instance a missing file). `code`, when set, says
    what kind of problem it is for a caller that treats some kinds apart (PLACEHOLDER); it
    is not part of the printed line and two problems differing only in it are equal.
    """

    path: str
    line: int
    col: int
    field: str
    message: str
    code: str | None = _field(default=None, compare=False)

    def __str__(self) -> str:
        return f"{self.path}:{self.line}:{self.col}: {self.field}: {self.message}"


class InputError(Exception):
    """Raised with every problem found, so a command can print them all at once."""

    def __init__(self, problems: list[Problem]):
        super().__init__("\n".join(str(p) for p in problems))
        self.problems = list(problems)


# Unicode bidirectional controls (UAX #9): embeddings and overrides U+202A-202E, isolates
# U+2066-2069, marks U+200E, U+200F and U+061C. Obeyed, they reorder what a terminal shows.
BIDI_CONTROLS = frozenset(map(chr, [*range(0x202A, 0x202F), *range(0x2066, 0x206A), 0x200E, 0x200F, 0x061C]))


def terminal_safe(text: str | None) -> str:
    """Record text for a terminal: control characters (escape sequences) and bidirectional
    controls shown as \\xNN or \\uNNNN, not obeyed."""
    if text is None:
        return ""
    return "".join(
        ch if (ch in "\n\t" or (ord(ch) >= 32 and ord(ch) != 127 and not 0x80 <= ord(ch) < 0xA0))
        and ch not in BIDI_CONTROLS
        else f"\\x{ord(ch):02x}" if ord(ch) < 0x100 else f"\\u{ord(ch):04x}"
        for ch in text
    )


def nearest(word: str, choices, n: int = 3, cutoff: float = 0.5) -> list[str]:
    """Up to `n` of `choices` that look like `word`, best first: for "did you mean" hints on
    unknown ids, keys and codes. A choice that differs only by case or by a digit typed as a
    look-alike letter (O for 0, l for 1, Z for 2...) comes first; then difflib's ratio of at
    least `cutoff`."""
    import difflib  # only when something is unknown

    choices = list(choices)
    folded = _fold(word)
    alike = [choice for choice in choices if _fold(choice) == folded]
    close = difflib.get_close_matches(word, choices, n=n, cutoff=cutoff)
    return list(dict.fromkeys(alike + close))[:n]


_LOOK_ALIKE = str.maketrans({"O": "0", "I": "1", "L": "1", "Z": "2", "S": "5", "G": "6", "B": "8"})


def _fold(text: str) -> str:
    return text.upper().translate(_LOOK_ALIKE)
