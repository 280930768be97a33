"""What pullproof agrees to read: size limits, the project folder, and bounds on content.

Hostile or broken input must end in a one-line error, never in a hang or in memory
exhaustion. Every limit is a named constant here so the README's "Robustness" section
and the code say the same thing. The sizes are checked before a file is parsed.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "DEFAULT_MAX_FILE_BYTES",
    "DEFAULT_MAX_TOTAL_BYTES",
    "MAX_BUS_MEMBERS",
    "MAX_COORDINATE_MM",
    "MAX_EXPANDED_ITEMS",
    "MAX_INSTANCES",
    "MAX_SHEET_DEPTH",
    "MAX_TEXT_FILE_BYTES",
    "MAX_TOKENS_PER_FILE",
    "MAX_TOKENS_TOTAL",
    "MAX_WIRE_DIRECTIONS",
    "InputPolicy",
    "TokenBudget",
]

MB = 1_000_000

# Real schematic sheets are well under 5 MB each; reading takes a few seconds per MB.
DEFAULT_MAX_FILE_BYTES = 10 * MB
DEFAULT_MAX_TOTAL_BYTES = 25 * MB
# Rules files and part libraries are a few kB.
MAX_TEXT_FILE_BYTES = 1 * MB
# A sheet is at most a few metres wide (A0 is 1189 mm); ±10 m leaves room for any drawing
# and keeps every micrometre coordinate, sum and product far inside float and int ranges.
MAX_COORDINATE_MM = 10_000
# A vector label A[0..N] of more members than any real bus (a 1024-bit bus is rare).
MAX_BUS_MEMBERS = 4096
# Sheet instances in the whole tree, and the items connectivity handles per instance
# (placed symbols with their pins and instance paths, labels, sheet pins, wires, junctions)
# summed over every instance: a sheet used many times multiplies its items. Real designs
# hold about 3 500 per MB of schematic text, times the instances of each sheet.
MAX_INSTANCES = 10_000
# Distinct directions of wires (and of buses) in one file. Every point that may lie on a
# wire is looked up once per direction; real files use horizontal, vertical and 45°, and
# a few other angles at most.
MAX_WIRE_DIRECTIONS = 64
MAX_SHEET_DEPTH = 50  # sheets within sheets; real designs nest a handful deep
MAX_EXPANDED_ITEMS = 1_000_000
# Lists and words in one file: real files hold 150 000 to 210 000 per MB (up to 2.1 million
# at the size limit); a file of nothing but "(a)" holds 750 000 per MB, each three times as
# costly to read as a word of real text.
MAX_TOKENS_PER_FILE = 3_000_000
# … and in all files of one review: a project of real text at the total size limit holds
# about 5 million.
MAX_TOKENS_TOTAL = 6_000_000
# Raising a size limit raises these in proportion (the defaults are these ratios times the
# default sizes), so a larger limit admits a larger board of real text, not a denser file.
TOKENS_PER_FILE_BYTE = MAX_TOKENS_PER_FILE / DEFAULT_MAX_FILE_BYTES
TOKENS_PER_TOTAL_BYTE = MAX_TOKENS_TOTAL / DEFAULT_MAX_TOTAL_BYTES


@dataclass(frozen=True)
class InputPolicy:
    """Which files a review may read: size limits and whether sheets may lie outside.

    ``allow_outside`` lets a sheet reference be absolute or lead out of the root
    schematic's folder (``--allow-outside``); by default such a reference is refused.
    """

    max_file_bytes: int = DEFAULT_MAX_FILE_BYTES
    max_total_bytes: int = DEFAULT_MAX_TOTAL_BYTES
    allow_outside: bool = False

    def __post_init__(self) -> None:
        if self.max_file_bytes <= 0 or self.max_total_bytes <= 0:
            raise ValueError("size limits must be positive")

    def tokens(self) -> TokenBudget:
        """The lists and words a review under this policy may read (at least the defaults)."""
        return TokenBudget(
            max(MAX_TOKENS_TOTAL, int(TOKENS_PER_TOTAL_BYTE * self.max_total_bytes)),
            max(MAX_TOKENS_PER_FILE, int(TOKENS_PER_FILE_BYTE * self.max_file_bytes)),
        )


class TokenBudget:
    """The lists and words one review may still read: per file, and across all its files."""

    def __init__(self, total: int = MAX_TOKENS_TOTAL, per_file: int = MAX_TOKENS_PER_FILE) -> None:
        self.total = total
        self.per_file = per_file
        self.left = total

    def for_file(self) -> int:
        """How many the next file may hold."""
        return min(self.per_file, self.left)

    def spend(self, count: int) -> None:
        self.left -= count
