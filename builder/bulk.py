"""Working through many records at once: the cyclic garbage collector paused meanwhile.

Loading or sizing a shop makes many small objects that all stay alive; CPython's collector
would walk them again and again (about 15 % of a 1,000-build load and size, measured with
tests/perf/bench.py). Nothing made there is cyclic garbage worth collecting early, and the
collector runs as usual once the work is done.
"""
from __future__ import annotations

import gc
from collections.abc import Iterator
from contextlib import contextmanager


@contextmanager
def collector_paused() -> Iterator[None]:
    """Pause automatic garbage collection for the block (nested blocks are fine)."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()
