"""How the cyclic garbage collector runs while pullproof works.

A review builds millions of small objects (tokens, tree nodes, quantities, results) that
reference counting frees on its own: almost none of them form cycles. CPython's cyclic
collector still runs a young-generation pass every 700 net allocations and, as the heap
grows, full passes over everything alive — on a board of 1 000 networks that was about
40 % of a review's CPU time, and on 10 000 networks the middle and full passes still cost
about a fifth. While a command runs, all three thresholds are raised so passes are rare;
cycles are still collected, and the settings are put back afterwards.
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from contextlib import contextmanager

__all__ = ["MIDDLE_THRESHOLD", "OLD_THRESHOLD", "YOUNG_THRESHOLD", "few_collections"]

YOUNG_THRESHOLD = 100_000  # net allocations between young passes (CPython's default: 700)
MIDDLE_THRESHOLD = 50  # young passes between middle passes (default 10)
OLD_THRESHOLD = 1000  # middle passes between full passes (default 10)


@contextmanager
def few_collections() -> Iterator[None]:
    """Run the body with rare cyclic-collector passes; restore the thresholds after."""
    saved = gc.get_threshold()
    gc.set_threshold(YOUNG_THRESHOLD, MIDDLE_THRESHOLD, OLD_THRESHOLD)
    try:
        yield
    finally:
        gc.set_threshold(*saved)
