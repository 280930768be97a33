"""Shared test paths: the project's fixtures and the real-world corpus next to the repo."""

from __future__ import annotations

import sys
from pathlib import Path

TESTS = Path(__file__).resolve().parent
REPO = TESTS.parent
FIXTURES = REPO / "fixtures"
CONNECTIVITY = FIXTURES / "connectivity"
REALWORLD = REPO / ".." / "shared" / "realworld"

# tests/builder.py is imported as a plain module by the tests
if str(TESTS) not in sys.path:
    sys.path.insert(0, str(TESTS))
