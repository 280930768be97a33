"""Shared test paths: the project's fixtures and the real-world corpus next to the repo."""

from __future__ import annotations

import shutil
import sys
from pathlib import Path

import pytest

TESTS = Path(__file__).resolve().parent
REPO = TESTS.parent
FIXTURES = REPO / "fixtures"
CONNECTIVITY = FIXTURES / "connectivity"
REALWORLD = REPO / ".." / "shared" / "realworld"

# tests/builder.py is imported as a plain module by the tests
if str(TESTS) not in sys.path:
    sys.path.insert(0, str(TESTS))


@pytest.fixture
def project(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """A copy of the demo project; the test runs inside it so messages use short names."""
    shutil.copytree(FIXTURES / "demo", tmp_path / "p")
    monkeypatch.chdir(tmp_path / "p")
    return tmp_path / "p"
