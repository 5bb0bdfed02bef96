"""Where the packaged schemas and site defaults are: the checkout's top-level folders when
running from a checkout (editable install), else the copies installed inside the package."""
from __future__ import annotations

from pathlib import Path

_PACKAGE = Path(__file__).resolve().parent


def data_dir(name: str) -> Path:
    """The folder `schema` or `site_src`, from the checkout if present, else the package."""
    checkout = _PACKAGE.parent / name
    if checkout.is_dir():
        return checkout
    return _PACKAGE / f"_{name}"
