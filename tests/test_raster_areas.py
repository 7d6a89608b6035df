"""Raster area layers: translucent areas drawn from a common baseline and stacked bands,
counted from pixels whose geometry is known exactly.

References: the alpha compositing 'over' operator, C = alpha * L + (1 - alpha) * B
(Porter and Duff, 1984), used to draw the translucent layers here; matplotlib's
fill_between and stackplot as a second renderer. The line-series-count threshold (more
than 5 series) is common practice (no source), as in the rule's default.
"""

from __future__ import annotations

import cv2
import numpy as np
import pytest

from corpusaudit.checks.cases import Case, raster_figure
from corpusaudit.checks.runner import check_figure
from corpusaudit.config import build_config
from corpusaudit.measure import Measurements
from corpusaudit.measure.lines import _layers_by_runs, _raster_areas

# opaque colours of invented layers (sRGB), distinct hues
COLOURS = np.array([(31, 119, 180), (255, 127, 14), (44, 160, 44), (214, 39, 40), (148, 103, 189),
                    (140, 86, 75), (227, 119, 194)], float)
WIDTH, HEIGHT, BORDER = 640, 420, 10
PLOT = (BORDER, BORDER, WIDTH - BORDER, HEIGHT - BORDER)


def _tops(count: int) -> np.ndarray:
    """Row of each layer's top edge per column: layers 45 px apart, gently waving, so every
    top is apart from the others in every column."""
    x = np.arange(WIDTH)
    return np.array([60 + 45 * k + 12 * np.sin(x / 70.0 + k) for k in range(count)])


def _translucent(count: int, alpha: float = 0.4, tallest_first: bool = True) -> np.ndarray:
    """Layers filled from a common baseline (row 380) up to their tops, composited over a
    white panel in drawing order with the 'over' operator."""
    image = np.full((HEIGHT, WIDTH, 3), 255.0)
    rows = np.arange(HEIGHT)[:, None]
    tops = _tops(count)
    order = range(count) if tallest_first else reversed(range(count))
    for k in order:
        inside = (rows >= tops[k][None, :]) & (rows < 380)
        image[inside] = alpha * COLOURS[k] + (1 - alpha) * image[inside]
    return np.round(image).astype(np.uint8)


def _stacked(count: int) -> np.ndarray:
    """Opaque bands, each sitting on the one below (a moving baseline)."""
    image = np.full((HEIGHT, WIDTH, 3), 255, np.uint8)
    rows = np.arange(HEIGHT)[:, None]
    tops = _tops(count)
    for k in range(count):
        lower = tops[k + 1] if k + 1 < count else np.full(WIDTH, 380.0)
        image[(rows >= tops[k][None, :]) & (rows < lower[None, :])] = COLOURS[k]
    return image


def _jpeg(image: np.ndarray, quality: int) -> np.ndarray:
    ok, encoded = cv2.imencode(".jpg", image[:, :, ::-1], [cv2.IMWRITE_JPEG_QUALITY, quality])
    return cv2.imdecode(encoded, cv2.IMREAD_COLOR)[:, :, ::-1].copy()


@pytest.mark.parametrize("count", [1, 2, 4, 6, 7])
def test_translucent_layers_are_counted(count):
    layers = _raster_areas(_translucent(count), PLOT)
    assert layers.count == count
    assert not layers.stacked


@pytest.mark.parametrize("quality", [80, 90])
def test_translucent_layers_survive_jpeg_and_grid_lines(quality):
    image = _translucent(6)
    image[:, ::80] = (176, 176, 176)  # one-pixel grid lines drawn over the areas
    image[::70, :] = (176, 176, 176)
    assert _raster_areas(_jpeg(image, quality), PLOT).count == 6


def test_layers_under_many_translucent_ones_are_a_lower_bound():
    # drawn shortest first, the lowest top shows through five later layers: its edge
    # keeps 0.4 * 0.6 ** 5 (3 %) of its contrast, which may be lost; no layer is invented
    count = _raster_areas(_translucent(6, tallest_first=False), PLOT).count
    assert 4 <= count <= 6


def test_an_opaque_area_is_one_layer():
    image = _translucent(1, alpha=1.0)
    assert _raster_areas(image, PLOT).count == 1
    # the panel shows above the area and below its baseline: the area is no interruption of it
    inner = np.ascontiguousarray(image[BORDER + 3:HEIGHT - BORDER - 2, BORDER + 3:WIDTH - BORDER - 2])
    assert _layers_by_runs(inner, np.array([255.0, 255.0, 255.0])) == 1


@pytest.mark.parametrize("count", [2, 5])
def test_stacked_bands_are_stacked_and_counted(count):
    layers = _raster_areas(_stacked(count), PLOT)
    assert layers.stacked
    assert layers.count == count


def test_flat_panel_has_no_layers():
    panel = np.full((HEIGHT, WIDTH, 3), 240, np.uint8)
    assert _layers_by_runs(panel, np.array([240.0, 240.0, 240.0])) == 0


def _areas(count: int):
    def draw(fig):
        ax = fig.add_subplot()
        x = np.arange(20.0)
        for k in range(count):
            ax.fill_between(x, 0, 2 + 1.5 * k + np.sin(x / 3 + k), color=f"C{k}", alpha=0.4, linewidth=0)
    return Case("known", "area", draw, {})


@pytest.mark.parametrize("count, warns", [(3, False), (6, True)])
def test_matplotlib_translucent_areas_and_the_series_rule(count, warns):
    figure = raster_figure(_areas(count))
    measurements = Measurements(figure)
    assert measurements.get("areas").count == count
    results, unmeasured = check_figure(figure, build_config({}), measurements)
    assert ("line-series-count" in {r.rule for r in results}) == warns
    assert "line-series-count" not in unmeasured
