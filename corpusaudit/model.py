"""Plain dataclasses passed between the pipeline stages.

discover -> Document; extract -> Figure (+ VectorEvidence); classify fills
Figure.chart_type; measure -> Measurements (cached per figure); check -> Finding.
Nothing here does I/O.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable

import numpy as np

CHART_TYPES = (
    "bar", "pie", "line", "area", "scatter", "box", "histogram", "heatmap", "map", "not_chart",
)
SOURCES = ("raster", "vector", "scan", "image")
SEVERITIES = ("error", "warning", "info")
SEVERITY_RANK = {"info": 1, "warning": 2, "error": 3}
DOCUMENT_STATUSES = ("ok", "error", "timeout", "skipped")

BBox = tuple[float, float, float, float]
RGB = tuple[float, float, float]  # each channel in 0..1, sRGB


@dataclass
class Document:
    """One input file (a PDF or an image), identified by the sha256 of its bytes."""

    document_id: str
    path: str  # as given on the command line (archive members: "archive.zip!member")
    sha256: str
    bytes: int
    kind: str  # pdf | png | jpeg | tiff | webp | gif | unknown
    local_path: str = ""  # where the bytes can be read now (temporary for archive members)
    pages: int = 0
    status: str = "ok"
    error: str = ""
    figures: int = 0
    findings: int = 0
    manifest: dict[str, str] = field(default_factory=dict)


@dataclass
class TextSpan:
    """A run of text with one font, as the PDF states it (or as OCR read it)."""

    text: str
    bbox: BBox  # figure pixels, top-left origin
    size_pt: float  # font size at print size
    angle: float  # degrees counter-clockwise from horizontal, 0 = normal reading
    colour: RGB = (0.0, 0.0, 0.0)
    font: str = ""
    # The separately drawn runs this span was joined from, (text, bbox) each, when more than
    # one: neighbouring tick labels that touch are read as one span.
    runs: tuple[tuple[str, BBox], ...] = ()


@dataclass
class PathItem:
    """A drawn path: filled, stroked or both. Geometry in figure pixels."""

    kind: str  # "f" fill, "s" stroke, "fs" both (PyMuPDF's drawing types)
    bbox: BBox
    fill: RGB | None = None
    stroke: RGB | None = None
    width: float = 0.0  # stroke width in figure pixels
    points: list[tuple[float, float]] = field(default_factory=list)  # polyline / polygon vertices
    closed: bool = False
    is_rect: bool = False
    dashes: str = ""
    fill_opacity: float = 1.0
    stroke_opacity: float = 1.0


@dataclass
class VectorEvidence:
    """What a vector figure states exactly: its text and its paths (figure pixel coordinates)."""

    texts: list[TextSpan] = field(default_factory=list)
    paths: list[PathItem] = field(default_factory=list)
    scale: float = 1.0  # figure pixels per PDF point


@dataclass
class Figure:
    """One figure found in a document: where it is, its pixels and its evidence."""

    figure_id: str
    document_id: str
    path: str
    page: int  # 1-based; 1 for an image file
    index: int  # 0-based order on the page
    bbox: BBox  # PDF points, top-left origin; pixels for an image file
    source: str  # raster | vector | scan | image
    width_px: int = 0
    height_px: int = 0
    effective_ppi: float | None = None  # raster only: image pixels per inch at print size
    caption: str = ""
    figure_number: str = ""
    pixels: np.ndarray | None = field(default=None, repr=False)  # HxWx3 uint8 RGB, as rendered
    # A raster's own pixels before placement and resampling (8x8 JPEG blocks survive here).
    native_pixels: np.ndarray | None = field(default=None, repr=False)
    vector: VectorEvidence | None = field(default=None, repr=False)
    image_info: dict[str, Any] = field(default_factory=dict)  # colour space, filter, xref ...
    chart_type: str = ""
    confidence: float | None = None
    low_confidence: bool = False
    classified_by: str = ""  # "model" or "vector" (vector evidence refined the model)
    thumbnail: str = ""  # path relative to the output folder
    unmeasured: list[str] = field(default_factory=list)


@dataclass
class Finding:
    finding_id: str
    figure_id: str
    document_id: str
    path: str
    page: int
    rule: str
    severity: str
    message: str
    value: str = ""
    threshold: str = ""
    region: BBox | None = None  # inside the figure, in figure pixels


@dataclass(frozen=True)
class Option:
    """A rule threshold: its key in the config, default, meaning and where the number comes from."""

    key: str
    default: float | int | str | bool
    help: str
    source: str = "common practice"
    minimum: float | None = None
    maximum: float | None = None


@dataclass(frozen=True)
class Outcome:
    """What a rule's evaluate() returns for one figure."""

    findings: tuple["Draft", ...] = ()
    unmeasured: bool = False  # the rule applied but its measurement was not available
    reason: str = ""


@dataclass(frozen=True)
class Draft:
    """A finding before the runner gives it ids and document context."""

    message: str
    value: str = ""
    threshold: str = ""
    severity: str | None = None  # None: the rule's configured severity
    region: BBox | None = None


@dataclass(frozen=True)
class Rule:
    """A declared check. evaluate(ctx) -> Outcome is pure: no I/O, no printing."""

    id: str
    applies_to: tuple[str, ...]  # chart types; ("*",) for every figure
    sources: tuple[str, ...]  # figure sources it can judge
    severity: str
    options: tuple[Option, ...]
    rationale: str
    fix: str
    evaluate: Callable[..., Outcome]
    problem: str = ""  # an example of a figure that fails the rule
    better: str = ""  # the same figure done well
    limitations: str = ""  # what the measurement cannot see
    requires: tuple[str, ...] = ()  # names of measurements it reads
    status: str = "stable"  # stable | preview


class MeasurementUnavailable(Exception):
    """A measurement could not be made on this figure; rules that need it are unmeasured."""
