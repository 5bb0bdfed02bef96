"""What can go wrong in an import, as classes carrying their fields (no message parsing).

A refused cell is a CellProblem: a builder.problems.Problem whose line is the spreadsheet row
(as a spreadsheet program numbers it) and whose col is the 1-based column, printed
``FILE:row:column: field: message``; `header` names the column. A file that cannot be read at
all, or a bad map, raises builder.problems.InputError like every other command's input.
"""
from __future__ import annotations

from dataclasses import dataclass

from builder.problems import InputError, Problem


@dataclass(frozen=True, slots=True)
class CellProblem(Problem):
    """One refused cell (or a whole row when col is 0): row = line, column = col."""

    header: str = ""  # the column's heading in the sheet; "" when no column is to blame

    @property
    def row(self) -> int:
        return self.line

    @property
    def column(self) -> int:
        return self.col


class CellError(ValueError):
    """Raised by a cell parser: why one cell is refused (the caller adds row and column)."""

    def __init__(self, message: str):
        super().__init__(message)
        self.message = message


class MissingExtra(InputError):
    """An optional dependency is not installed; `package` comes with `pip install 'fitment-builder[extra]'`."""

    def __init__(self, path: str, package: str, extra: str, purpose: str):
        self.package = package
        self.extra = extra
        super().__init__([Problem(path, 0, 0, "file",
                                  f"{purpose} needs the {package} package, which is not installed; "
                                  f"install it with: pip install 'fitment-builder[{extra}]'")])
