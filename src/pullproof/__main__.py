"""Run the command line: ``python -m pullproof``."""

from __future__ import annotations

import sys

from .cli import main

sys.exit(main())
