"""Measure: shared measurements of a figure, computed once on demand and cached.

A measurement is a function (figure, measurements) -> value, registered by name with
@measurement. It raises MeasurementUnavailable with a reason when the figure does not
allow it (no text recognition, no plot area found...). Checks ask for measurements by
name through Measurements.get, so what several checks share is computed once.
"""

from __future__ import annotations

from typing import Any, Callable

from corpusaudit.model import Figure, MeasurementUnavailable

MEASUREMENTS: dict[str, Callable[[Figure, "Measurements"], Any]] = {}


def measurement(name: str):
    def register(function: Callable[[Figure, "Measurements"], Any]):
        if name in MEASUREMENTS:
            raise ValueError(f"measurement {name!r} declared twice")
        MEASUREMENTS[name] = function
        return function

    return register


class Measurements:
    """Lazy, cached measurements of one figure."""

    def __init__(self, figure: Figure, settings: dict[str, Any] | None = None):
        self.figure = figure
        self.settings = settings or {}
        self._values: dict[str, Any] = {}
        self._failures: dict[str, str] = {}

    def get(self, name: str) -> Any:
        if name in self._values:
            return self._values[name]
        if name in self._failures:
            raise MeasurementUnavailable(self._failures[name])
        try:
            function = MEASUREMENTS[name]
        except KeyError:
            raise KeyError(f"no measurement named {name!r}") from None
        try:
            value = function(self.figure, self)
        except MeasurementUnavailable as exc:
            self._failures[name] = str(exc)
            raise
        self._values[name] = value
        return value
from corpusaudit.measure import axes, bars, boxes, depth, legend, lines, pie, scatter, shapes, text  # noqa: E402,F401
from corpusaudit.measure import appearance, keys  # noqa: E402,F401
