"""Reporters, chosen by name from one registry. A new format is a new module and a line here.

>>> sorted(REPORTERS)
['csv', 'html', 'jsonl', 'sarif', 'text']
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

from guard.report.base import Reporter, ReportOptions
from guard.report.csv import CsvReporter
from guard.report.html import HtmlReporter
from guard.report.jsonl import JsonlReporter
from guard.report.sarif import SarifReporter
from guard.report.text import TextReporter

__all__ = ["REPORTERS", "ReportOptions", "Reporter", "get_reporter"]

REPORTERS: Mapping[str, type[Reporter]] = MappingProxyType(
    {r.name: r for r in (TextReporter, JsonlReporter, CsvReporter, SarifReporter, HtmlReporter)}
)


def get_reporter(name: str) -> type[Reporter]:
    """The reporter called ``name``; a KeyError naming the known ones otherwise."""
    try:
        return REPORTERS[name]
    except KeyError:
        raise KeyError(f"unknown format {name!r}; known: {', '.join(REPORTERS)}") from None
