"""The collector setting every command runs under: raised while it runs, restored after."""

from __future__ import annotations

import gc

import pytest

from pullproof.heap import MIDDLE_THRESHOLD, OLD_THRESHOLD, YOUNG_THRESHOLD, few_collections


def test_thresholds_are_raised_inside_and_restored_after_even_on_error() -> None:
    before = gc.get_threshold()
    with pytest.raises(RuntimeError), few_collections():
        assert gc.get_threshold() == (YOUNG_THRESHOLD, MIDDLE_THRESHOLD, OLD_THRESHOLD)
        raise RuntimeError
    assert gc.get_threshold() == before


def test_cycles_are_still_collected() -> None:
    # common practice: raising thresholds delays the cyclic collector, it never disables it
    with few_collections():
        assert gc.isenabled()
        a: list[object] = []
        a.append(a)
        del a
        assert gc.collect() >= 1
