"""Legend boxes: a framed region holding text and colour swatches, kept out of the data."""

from __future__ import annotations

from corpusaudit.measure import measurement
from corpusaudit.measure.shapes import bbox_area, contains, is_neutral, is_vector
from corpusaudit.model import BBox, Figure


@measurement("legend_boxes")
def legend_boxes(figure: Figure, measurements) -> list[BBox]:
    """Vector: closed neutral frames holding text and at least one other drawn mark (the
    swatches of a legend). Rasters: none are claimed (swatches are told apart by layout)."""
    if not is_vector(figure):
        return []
    width, height = figure.width_px or 1, figure.height_px or 1
    if figure.pixels is not None:
        height, width = figure.pixels.shape[:2]
    boxes: list[BBox] = []
    for path in figure.vector.paths:
        if "f" not in path.kind or not is_neutral(path.fill) or bbox_area(path.bbox) > 0.4 * width * height:
            continue
        if not any(contains(path.bbox, span.bbox, tolerance=1.0) for span in figure.vector.texts):
            continue
        if any(other is not path and contains(path.bbox, other.bbox) and bbox_area(other.bbox) < 0.5 * bbox_area(path.bbox)
               for other in figure.vector.paths):
            boxes.append(path.bbox)
    return boxes


def in_any(box: BBox, frames: list[BBox]) -> bool:
    return any(contains(frame, box, tolerance=1.0) for frame in frames)
