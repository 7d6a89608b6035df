"""Colour bars read from the paths of vector figures.

Reference renderer: matplotlib draws a colour bar as one filled quad per colour step
(pcolormesh) in PDF output, with the colormap's exact colours; a heatmap drawn with
pcolormesh is a grid of such cells. Colormap colours come from matplotlib's own tables.
"""

from __future__ import annotations

import numpy as np
import pytest
from matplotlib import colormaps

from corpusaudit.checks.cases import Case, vector_figure
from corpusaudit.measure import Measurements


def _heatmap_with_bar(cmap: str, orientation: str = "vertical"):
    def draw(fig):
        ax = fig.add_subplot()
        values = np.random.default_rng(3).random((6, 8))  # invented survey densities
        mesh = ax.pcolormesh(values, cmap=cmap, edgecolors="none")
        fig.colorbar(mesh, ax=ax, orientation=orientation)
    return draw


@pytest.mark.parametrize("orientation", ["vertical", "horizontal"])
def test_a_drawn_colour_bar_is_read_from_its_paths(orientation):
    figure = vector_figure(Case("bar", "heatmap", _heatmap_with_bar("jet", orientation), {}))
    scales = Measurements(figure).get("colour_scales")
    assert len(scales) == 1  # the bar; the heatmap's columns of cells are not bars
    scale = scales[0]
    box_width, box_height = scale.bbox[2] - scale.bbox[0], scale.bbox[3] - scale.bbox[1]
    assert (box_height > 4 * box_width) if orientation == "vertical" else (box_width > 4 * box_height)
    # low to high: the first step is the colormap's low end, the last its high end
    jet = colormaps["jet"]
    assert np.allclose(scale.colours[0], jet(0.0)[:3], atol=0.02)
    assert np.allclose(scale.colours[-1], jet(1.0)[:3], atol=0.02)
    assert scale.profile.is_rainbow


def test_a_perceptual_colour_bar_is_not_rainbow():
    figure = vector_figure(Case("bar", "heatmap", _heatmap_with_bar("viridis"), {}))
    scales = Measurements(figure).get("colour_scales")
    assert len(scales) == 1 and not scales[0].profile.is_rainbow
