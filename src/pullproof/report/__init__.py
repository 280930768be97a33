"""Reports: renderers that turn library results into text, JSON and HTML."""

from __future__ import annotations
