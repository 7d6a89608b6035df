"""Appearance of a figure: its categorical palette, continuous colour scales, text (size,
colour, contrast against what lies behind it) and lossy-compression evidence.

Vector figures state their colours and text exactly (figure.vector); rasters are read from
pixels (colour clustering, colour-bar detection, OCR). Every figure has rendered pixels, so
colour scales are found in pixels for both. The colour science and image-quality maths are
in measure/colour.py and measure/quality.py; this module only decides what to feed them.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import cv2
import numpy as np

from corpusaudit.measure import colour, glyphs, measurement, quality
from corpusaudit.measure.shapes import polygon_area, polyline_length, require_pixels, union_box
from corpusaudit.model import RGB, BBox, Figure, MeasurementUnavailable, PathItem

MAX_CATEGORICAL = 12  # more distinct chromatic colours than this: a continuous scale, not categories
GREY_CHROMA = 8.0  # C* below this is neutral: axes, grid, text, frames (colour.extract_palette's limit)
BACKGROUND_SHARE = 0.4  # a fill covering this share of the figure is a background panel
MIN_SCALE_STEPS = 8  # fewer distinct colours do not describe a continuous scale

_BOLD = re.compile(r"bold|black|heavy|semibold|demi", re.IGNORECASE)


# ------------------------------------------------------------------ value types


@dataclass(frozen=True)
class CategoricalColour:
    """One colour that marks a category: displayed sRGB (0..1), weight share, where it is drawn."""

    rgb: RGB
    share: float
    region: BBox | None  # figure pixels

    @property
    def hex(self) -> str:
        return "#" + "".join(f"{round(c * 255):02x}" for c in self.rgb)


@dataclass(frozen=True)
class Palette:
    """colours: the categorical (chromatic) colours, heaviest first; empty when continuous.
    continuous: more than MAX_CATEGORICAL distinct chromatic colours (a colour map).
    distinct: distinct chromatic colours seen (0 when a colour scale explains the colours)."""

    colours: tuple[CategoricalColour, ...]
    continuous: bool
    distinct: int


@dataclass(frozen=True)
class FoundScale:
    """A continuous colour scale: a colour bar, or the fills of a heatmap or map."""

    kind: str  # "colour bar" | "fills"
    bbox: BBox  # figure pixels
    colours: np.ndarray  # Nx3 sRGB 0..1, in order along the scale
    profile: colour.ScaleProfile


@dataclass(frozen=True)
class TextLine:
    """A piece of text: a vector span, or a raster line found from its glyphs (its text then
    names it by place, see _glyph_label). size_pt is None without a print size."""

    text: str
    bbox: BBox  # figure pixels
    size_pt: float | None
    colour: RGB | None  # stated (vector), or the measured stroke-core colour (glyphs)
    bold: bool
    source: str  # "vector" | "glyphs"
    em_px: float  # font size in figure pixels (stated, or estimated from the ink height)
    glyphs: int = 0  # raster: glyphs (connected marks) in the line; its text is not read


@dataclass(frozen=True)
class TextContrast:
    """WCAG 2.x contrast of one piece of text against its local background."""

    text: str
    bbox: BBox
    ratio: float
    foreground: RGB
    background: RGB
    size_pt: float | None
    bold: bool
    source: str = "vector"  # "vector" | "glyphs" (text then names the line by place)


@dataclass(frozen=True)
class Compression:
    """report: pixel evidence (None when no pixels of the raster's own could be read).
    declared: the filter or file format the source names ("DCTDecode", "JPEG", "FlateDecode"...).
    declared_lossy: True/False when the declared coding says so, None when unknown.
    native: the report was made on the raster's own pixels (JPEG's 8x8 grid intact)."""

    report: quality.ArtefactReport | None
    declared: str
    declared_lossy: bool | None
    native: bool


# ------------------------------------------------------------------ helpers


def _is_vector(figure: Figure) -> bool:
    return figure.source == "vector" and figure.vector is not None


def _displayed(rgb: RGB | np.ndarray, opacity: float | np.ndarray, background: np.ndarray) -> np.ndarray:
    """Translucent fills as seen over the figure background (sRGB blend, as PDF viewers do)."""
    return opacity * np.asarray(rgb) + (1.0 - opacity) * background


def _pixels_like(pixels: np.ndarray, rgb: np.ndarray, tolerance: int = 24) -> np.ndarray:
    """Pixels within tolerance of rgb on every channel (cv2.inRange: one pass, no int16 copy)."""
    target = np.round(np.asarray(rgb) * 255.0).astype(int)
    low = np.clip(target - tolerance, 0, 255).astype(np.uint8)
    high = np.clip(target + tolerance, 0, 255).astype(np.uint8)
    return cv2.inRange(np.ascontiguousarray(pixels), low, high).astype(bool)


EDGE_PX = 2  # rendered clips with fractional edges blend their outer pixel rows with the page


def _inner(pixels: np.ndarray) -> np.ndarray:
    """The pixels without their outermost rows and columns, whose blend with the page around
    a fractional clip would otherwise pass for the background of the whole figure."""
    if min(pixels.shape[:2]) <= 4 * EDGE_PX:
        return pixels
    return np.ascontiguousarray(pixels[EDGE_PX:-EDGE_PX, EDGE_PX:-EDGE_PX])


def _shift(box, offset: int) -> BBox:
    return tuple(float(v) + offset for v in box)


def _mask_box(mask: np.ndarray) -> BBox | None:
    rows, cols = np.flatnonzero(mask.any(axis=1)), np.flatnonzero(mask.any(axis=0))
    if not len(rows):
        return None
    return (float(cols[0]), float(rows[0]), float(cols[-1] + 1), float(rows[-1] + 1))


# ------------------------------------------------------------------ colour scales


def _trim_frame_ends(colours: np.ndarray, max_trim: int = 3) -> np.ndarray:
    """Drop up to max_trim samples at either end that sit past a jump far larger than the
    scale's typical step: the bar's frame, or its blend with the bar's last colour."""
    if len(colours) < 4 * max_trim:
        return colours
    steps = np.linalg.norm(np.diff(colour.srgb_to_lab(colours), axis=0), axis=1)
    limit = max(6.0 * float(np.median(steps)), 15.0)
    start, end = 0, len(colours)
    for k in range(max_trim):
        if steps[k] > limit:
            start = k + 1
        if steps[-1 - k] > limit:
            end = len(colours) - 1 - k
    return colours[start:end]


def _distinct_steps(colours: np.ndarray) -> int:
    """Distinct 8-bit colours of a scale: a strip of a few repeated colours is no colour bar."""
    return len(np.unique(np.round(np.asarray(colours) * 255.0).astype(np.int32), axis=0))


def _fill_scale(pixels: np.ndarray, offset: int) -> FoundScale | None:
    colours = colour.continuous_fill_scale(pixels)
    if len(colours) < MIN_SCALE_STEPS:
        return None
    bins = np.unique(colour.colour_bins(np.round(colours * 255.0).astype(np.uint8)))
    region = _mask_box(np.isin(colour.colour_bins(pixels), bins))
    if region is None:
        return None
    return FoundScale("fills", _shift(region, offset), colours, colour.analyse_scale(colours))


BAR_JOIN_PX = 1.5  # steps of a drawn colour bar meet within this (snapping and antialiasing seams)


def _stacked_runs(rects: list[PathItem], along: int) -> list[list[PathItem]]:
    """Rects of one column (along=1: same x extent, stacked in y) or one row (along=0), in
    runs of rects that touch end to end."""
    across = 1 - along
    columns: dict[tuple[int, int], list[PathItem]] = {}
    for rect in rects:
        columns.setdefault((round(rect.bbox[across]), round(rect.bbox[across + 2])), []).append(rect)
    runs = []
    for members in columns.values():
        members.sort(key=lambda r: r.bbox[along])
        run = [members[0]]
        for rect in members[1:]:
            if abs(rect.bbox[along] - run[-1].bbox[along + 2]) <= BAR_JOIN_PX:
                run.append(rect)
            else:
                runs.append(run)
                run = [rect]
        runs.append(run)
    return runs


def _vector_colour_bars(figure: Figure) -> list[FoundScale]:
    """Colour bars drawn as paths: a single column (or row) of filled rects touching end to
    end whose colours walk in order, at least 4 times as long as wide and MIN_SCALE_STEPS
    colours. Columns with a neighbour of the same extent are heatmap cells, not a bar."""
    rects = [p for p in figure.vector.paths if "f" in p.kind and p.is_rect and p.fill is not None
             and p.fill_opacity > 0.5 and p.bbox[2] - p.bbox[0] >= 2 and p.bbox[3] - p.bbox[1] >= 1]
    scales = []
    for along in (1, 0):  # vertical bars, then horizontal ones
        runs = [run for run in _stacked_runs(rects, along) if len(run) >= MIN_SCALE_STEPS]
        boxes = [union_box([r.bbox for r in run]) for run in runs]
        for run, box in zip(runs, boxes):
            length, breadth = box[along + 2] - box[along], box[3 - along] - box[1 - along]
            beside = any(abs(other[along] - box[along]) <= BAR_JOIN_PX and abs(other[along + 2] - box[along + 2]) <= BAR_JOIN_PX
                         and (abs(other[1 - along] - box[3 - along]) <= BAR_JOIN_PX or abs(other[3 - along] - box[1 - along]) <= BAR_JOIN_PX)
                         for other in boxes if other is not box)
            if length < 4 * breadth or length < 24 or beside:
                continue
            colours = np.array([r.fill for r in run], dtype=float)
            if along == 1:
                colours = colours[::-1]  # bottom to top, as for rasters
            if _distinct_steps(colours) < MIN_SCALE_STEPS or not colour.ordered_like_a_path(colour.srgb_to_lab(colours)):
                continue
            scales.append(FoundScale("colour bar", tuple(float(v) for v in box), colours, colour.analyse_scale(colours)))
    return scales


@measurement("colour_scales")
def colour_scales(figure: Figure, measurements) -> list[FoundScale]:
    """Colour bars, largest first: drawn as paths in a vector figure (its exact colours),
    else found in the rendered pixels; for heatmaps and maps without a colour bar, the
    ordered fill colours instead.
    Raises MeasurementUnavailable for a heatmap or map whose scale cannot be read."""
    if figure.vector is not None:
        drawn = _vector_colour_bars(figure)
        if drawn:
            return sorted(drawn, key=lambda s: -(s.bbox[2] - s.bbox[0]) * (s.bbox[3] - s.bbox[1]))
    pixels = require_pixels(figure)
    inner = _inner(pixels)
    offset = (pixels.shape[0] - inner.shape[0]) // 2
    scales = []
    for found in colour.find_colour_scales(inner):
        if not np.isfinite(found.colours).all():  # a strip with an empty step (seen on photographs)
            continue
        colours = _trim_frame_ends(found.colours)
        if _distinct_steps(colours) >= MIN_SCALE_STEPS:
            scales.append(FoundScale("colour bar", _shift(found.bbox, offset), colours, colour.analyse_scale(colours)))
    if not scales and figure.chart_type in ("heatmap", "map") and not figure.low_confidence:
        fills = _fill_scale(inner, offset)
        if fills is None:
            raise MeasurementUnavailable("no colour bar and too few fill colours to read the colour scale")
        scales.append(fills)
    return scales


# ------------------------------------------------------------------ palette


def _vector_palette(figure: Figure) -> tuple[np.ndarray, np.ndarray, list[BBox]]:
    """Displayed colours of filled and stroked paths, weighted by area and by length x width."""
    height, width = figure.pixels.shape[:2] if figure.pixels is not None else (figure.height_px, figure.width_px)
    figure_area = max(1.0, float(width) * float(height))
    background = np.asarray(colour.estimate_background(_inner(figure.pixels))) if figure.pixels is not None \
        else np.ones(3)
    colours, opacities, weights, boxes = [], [], [], []

    def add(rgb: RGB, opacity: float, weight: float, path: PathItem) -> None:
        if weight > 0 and opacity > 0.05:
            colours.append(rgb)
            opacities.append(opacity)
            weights.append(weight)
            boxes.append(path.bbox)

    for path in figure.vector.paths:
        box_area = max(0.0, path.bbox[2] - path.bbox[0]) * max(0.0, path.bbox[3] - path.bbox[1])
        if path.fill is not None and box_area < BACKGROUND_SHARE * figure_area:
            area = polygon_area(path.points) if len(path.points) >= 3 else box_area
            add(path.fill, path.fill_opacity, area, path)
        if path.stroke is not None:
            add(path.stroke, path.stroke_opacity, polyline_length(path.points) * max(path.width, 1.0), path)
    displayed = _displayed(np.asarray(colours, dtype=float).reshape(-1, 3),
                           np.asarray(opacities, dtype=float)[:, None], background)
    return displayed, np.asarray(weights, dtype=float), boxes


@measurement("palette")
def palette(figure: Figure, measurements) -> Palette:
    """The categorical colours of a figure (chromatic only: greys are axes, text and frames).

    Vector: path fills (by area) and strokes (by length x width), translucent ones blended
    over the background, whole-figure panels left out. Raster: the colour clusters of
    colour.extract_palette. A figure with a colour scale (a colour bar; heatmaps and maps),
    or with more than MAX_CATEGORICAL distinct colours, has a continuous palette and no
    categories.
    """
    pixels = require_pixels(figure)
    scales = measurements.get("colour_scales")
    if scales or figure.chart_type in ("heatmap", "map"):
        # Colours that encode a continuous quantity (a colour bar explains them) are no categories.
        return Palette(colours=(), continuous=True, distinct=0)
    if _is_vector(figure) and figure.vector.paths:
        rgb, weights, boxes = _vector_palette(figure)
        found = colour.palette_from_colours(rgb, weights, merge_de=2.0, max_colours=64, grey_chroma=GREY_CHROMA) \
            if len(rgb) else []
        chromatic = [c for c in found if not c.is_grey]
        lab = colour.srgb_to_lab(np.clip(rgb, 0, 1)) if len(rgb) else np.zeros((0, 3))
        regions = []
        for entry in chromatic:
            near = colour.delta_e_ciede2000(lab, np.asarray(entry.lab)) < 2.0
            regions.append(union_box([box for box, hit in zip(boxes, near) if hit]))
    else:
        mask = np.zeros(pixels.shape[:2], dtype=bool)
        mask[EDGE_PX:-EDGE_PX, EDGE_PX:-EDGE_PX] = True
        found = colour.extract_palette(pixels, mask=mask, max_colours=MAX_CATEGORICAL + 1, grey_chroma=GREY_CHROMA)
        chromatic = [c for c in found if not c.is_grey]
        regions = [_mask_box(_pixels_like(pixels, np.asarray(c.rgb)) & mask) for c in chromatic]
    if len(chromatic) > MAX_CATEGORICAL:
        return Palette(colours=(), continuous=True, distinct=len(chromatic))
    entries = tuple(CategoricalColour(rgb=c.rgb, share=c.share, region=region) for c, region in zip(chromatic, regions))
    return Palette(colours=entries, continuous=False, distinct=len(chromatic))


# ------------------------------------------------------------------ text


def pixels_per_point(figure: Figure) -> float | None:
    """Figure pixels per printed point; None for an image file (it has no print size)."""
    if figure.source == "image":
        return None
    if _is_vector(figure):
        return figure.vector.scale
    width_pt = figure.bbox[2] - figure.bbox[0]
    width_px = figure.pixels.shape[1] if figure.pixels is not None else figure.width_px
    if width_pt <= 0 or not width_px:
        return None
    return width_px / width_pt


def _alphanumeric(text: str) -> int:
    return sum(ch.isalnum() for ch in text)


@measurement("glyph_lines")
def glyph_lines(figure: Figure, measurements) -> list[glyphs.GlyphLine]:
    """Raster text lines found from their glyphs (measure/glyphs.py), no text recognition.
    Photographs and other continuous-tone images hold no chart text: none is looked for."""
    pixels = require_pixels(figure)
    if not quality.is_line_art(pixels):
        return []
    return glyphs.find_text_lines(pixels)


def _glyph_label(line: glyphs.GlyphLine) -> str:
    """How a glyph line is named in messages: it has no text, so by kind, size and place."""
    turn = {0: "", 90: "rotated ", -90: "rotated "}[line.angle]
    return f"{turn}text of {line.glyphs} glyph(s) at x={line.bbox[0]:.0f}, y={line.bbox[1]:.0f}"


@measurement("text_lines")
def text_lines(figure: Figure, measurements) -> list[TextLine]:
    """The figure's text. Vector: every span with its stated size and colour. Raster: the
    lines of glyph_lines; size in points from the cap height (or x-height) and the
    figure's pixels per point, None for image files.
    Raises MeasurementUnavailable when a raster has no pixels."""
    if _is_vector(figure):
        scale = figure.vector.scale
        return [TextLine(span.text, span.bbox, span.size_pt, span.colour, bool(_BOLD.search(span.font or "")), "vector",
                         span.size_pt * scale)
                for span in figure.vector.texts if _alphanumeric(span.text) > 0 and span.size_pt > 0]
    per_point = pixels_per_point(figure)
    lines = []
    for line in measurements.get("glyph_lines"):
        size = None if per_point is None else round(line.em_px / per_point, 2)
        lines.append(TextLine(_glyph_label(line), line.bbox, size, line.ink, False, "glyphs", line.em_px,
                              line.glyphs))
    return lines


def _box_patch(pixels: np.ndarray, box: BBox, margin: int) -> np.ndarray:
    h, w = pixels.shape[:2]
    x0, y0 = max(0, int(np.floor(box[0])) - margin), max(0, int(np.floor(box[1])) - margin)
    x1, y1 = min(w, int(np.ceil(box[2])) + margin), min(h, int(np.ceil(box[3])) + margin)
    return pixels[y0:y1, x0:x1]


def _modal_colour(patch: np.ndarray, mask: np.ndarray | None) -> np.ndarray:
    """The most common exact colour inside the most common 5-bit bin of the masked pixels of a
    patch (all when None), 0..1: the bin makes it robust to JPEG noise, the exact mode keeps
    anti-aliased edge pixels from tinting it. Both are read from histograms; a histogram of
    the bin's levels counts its colours in their sorted order, so ties go to the lowest."""
    low, _ = colour.modal_bin(patch, mask)
    span = colour.BIN_LEVELS
    exact = cv2.calcHist([patch], [0, 1, 2], mask, [span] * 3, [level for v in low for level in (v, v + span)])
    offset = np.unravel_index(int(np.argmax(exact)), exact.shape)
    return (np.array(low) + offset) / 255.0


# Each 8-bit level as a 0..1 value, as pixels are compared with a stated colour.
_LEVELS = np.arange(256) / 255.0
INK_DISTANCE = 0.12  # a pixel farther than this from the stated text colour on some channel is not ink


def _vector_contrast(line: TextLine, pixels: np.ndarray) -> TextContrast | None:
    """Stated text colour against the modal rendered colour around it that is not the ink."""
    patch = _box_patch(pixels, line.bbox, margin=2)
    size = patch.shape[0] * patch.shape[1]
    if size < 4:
        return None
    ink = np.asarray(line.colour)
    # Distance from the ink falls and then rises along the levels of a channel, so the levels
    # near it form one range per channel: one inRange pass over the box instead of a float
    # copy of its pixels. A channel with no level near the ink gets an empty range.
    near_levels = [np.flatnonzero(~(np.abs(_LEVELS - value) > INK_DISTANCE)) for value in ink]
    low = tuple(int(levels[0]) if len(levels) else 1 for levels in near_levels)
    high = tuple(int(levels[-1]) if len(levels) else 0 for levels in near_levels)
    away = cv2.inRange(patch, low, high) == 0
    # Text drawn in the background colour leaves nothing else in its box: ratio 1, rightly.
    background = _modal_colour(patch, away.view(np.uint8) if np.count_nonzero(away) >= 0.2 * size else None)
    ratio = float(colour.contrast_ratio(ink, background))
    return TextContrast(line.text, line.bbox, ratio, tuple(float(v) for v in ink),
                        tuple(float(v) for v in background), line.size_pt, line.bold)


# Raster text whose font is smaller than this (px per em) is not judged for contrast: its
# stems (0.091 em in DejaVu Sans, measured with Pillow) are under 1.3 px wide, so no pixel is
# wholly ink and the contrast reads too low (on generated charts: by 10-25% at 10-14 px,
# within a few per cent from 14 px; benchmarks/colour_quality.py).
MIN_CONTRAST_EM_PX = 14.0


def _raster_contrast(line: glyphs.GlyphLine, size_pt: float | None) -> TextContrast | None:
    """A glyph line's stroke-core colour against its surround (glyphs.find_text_lines)."""
    if line.em_px < MIN_CONTRAST_EM_PX:
        return None
    ratio = float(colour.contrast_ratio(np.asarray(line.ink), np.asarray(line.background)))
    return TextContrast(_glyph_label(line), line.bbox, ratio, line.ink, line.background, size_pt, False, "glyphs")


@measurement("text_contrast")
def text_contrast(figure: Figure, measurements) -> list[TextContrast]:
    """WCAG contrast of every piece of text (see text_lines) against its local background."""
    pixels = require_pixels(figure)
    if not _is_vector(figure):
        sizes = [line.size_pt for line in measurements.get("text_lines")]
        found = (_raster_contrast(line, size) for line, size in zip(measurements.get("glyph_lines"), sizes))
        return [item for item in found if item is not None]
    found = []
    for line in measurements.get("text_lines"):
        if line.colour is None:
            continue
        result = _vector_contrast(line, pixels)
        if result is not None:
            found.append(result)
    return found


# ------------------------------------------------------------------ compression

_LOSSY_CODINGS = ("DCT", "JPX", "JPEG", "JPG", "MPO", "WEBP-LOSSY")
_LOSSLESS_CODINGS = ("FLATE", "LZW", "RUNLENGTH", "CCITT", "PNG", "TIFF", "GIF", "BMP")


def _declared_coding(info: dict) -> tuple[str, bool | None]:
    declared = str(info.get("filter") or info.get("format") or "")
    upper = declared.upper()
    if any(code in upper for code in _LOSSY_CODINGS):
        return declared, True
    if any(code in upper for code in _LOSSLESS_CODINGS):
        return declared, False
    return declared, None


@measurement("compression")
def compression(figure: Figure, measurements) -> Compression:
    """Lossy-coding evidence of a raster: quality.compression_artefacts on its own pixels
    (figure.native_pixels; an image file's pixels are its own), else on the rendered pixels
    when the source declares a lossy coding (ringing survives resampling, block edges do not).
    Raises MeasurementUnavailable when neither pixels nor a declared coding tell."""
    declared, declared_lossy = _declared_coding(figure.image_info)
    native = figure.native_pixels if figure.native_pixels is not None else (
        figure.pixels if figure.source == "image" else None)
    if native is not None:
        return Compression(quality.compression_artefacts(native), declared, declared_lossy, native=True)
    if declared_lossy and figure.pixels is not None:
        return Compression(quality.compression_artefacts(figure.pixels), declared, declared_lossy, native=False)
    if declared_lossy is False:
        return Compression(None, declared, declared_lossy, native=False)
    raise MeasurementUnavailable("neither the raster's own pixels nor its coding are known")
