"""colormap-rainbow and palette-cvd on vector and raster charts drawn with matplotlib.

References: matplotlib's shipped colour maps (the version is printed in the test ids' module
docstring check below) for the rainbow decision; scikit-image's rgb2lab (CIE 1976 L*, D65)
for the reported lightness profile; colour-science's Machado et al. (2009) matrices for the
confusable pair; Okabe & Ito (2008), "Color Universal Design", for a palette that must pass.
"""

from __future__ import annotations

import re

import matplotlib
import numpy as np
import pytest

from benchmarks.colour_cases import ColourCase, raster_figure, vector_figure
from tests.conftest import run_rule as run

MPL_VERSION = matplotlib.__version__  # decisions below were checked with matplotlib 3.11.2
RAINBOW_MAPS = ("jet", "hsv", "rainbow")
ORDERED_MAPS = ("viridis", "cividis", "Greys", "Blues")
TAB10_ORANGE, TAB10_GREEN = "#ff7f0e", "#2ca02c"  # matplotlib's tab10 C1 and C2
OKABE_ITO = ("#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2", "#D55E00", "#CC79A7")  # Okabe & Ito 2008




def heatmap_case(cmap: str, colour_bar: bool = True, chart_type: str = "heatmap") -> ColourCase:
    field = np.add.outer(np.linspace(0, 1, 12), np.linspace(0, 1, 16)) / 2

    def draw(fig):
        ax = fig.add_subplot()
        image = ax.pcolormesh(field, cmap=cmap)
        if colour_bar:
            fig.colorbar(image, ax=ax)

    return ColourCase(f"heatmap-{cmap}", chart_type, draw, {})


def bars_case(colours: tuple[str, ...], chart_type: str = "bar") -> ColourCase:
    def draw(fig):
        ax = fig.add_subplot()
        for k, colour in enumerate(colours):
            ax.bar([k], [3 + k % 3], color=colour, label=f"Group {k + 1}")
        ax.legend()

    return ColourCase("bars", chart_type, draw, {})


def render(case: ColourCase, kind: str):
    return vector_figure(case) if kind == "vector" else raster_figure(case, ppi=150)


# ------------------------------------------------------------------ colormap-rainbow


@pytest.mark.parametrize("kind", ["vector", "raster"])
@pytest.mark.parametrize("cmap", RAINBOW_MAPS + ORDERED_MAPS)
def test_rainbow_decision_on_matplotlib_colour_bars(cmap, kind):
    figure = render(heatmap_case(cmap), kind)
    findings, unmeasured = run(figure, "colormap-rainbow")
    assert not unmeasured
    assert bool(findings) == (cmap in RAINBOW_MAPS), (MPL_VERSION, [f.draft.message for f in findings])
    if findings:
        x0, y0, x1, y1 = findings[0].draft.region
        assert y1 - y0 > 4 * (x1 - x0), "region is the (vertical) colour bar"
        assert x0 > 0.6 * figure.pixels.shape[1], "the colour bar sits right of the heatmap"


def test_reported_lightness_profile_matches_scikit_image():
    from matplotlib import colormaps
    from skimage.color import rgb2lab

    findings, _ = run(vector_figure(heatmap_case("jet")), "colormap-rainbow")
    reported = [float(v) for v in re.findall(r"\d+", findings[0].draft.value)]
    assert len(reported) == 7
    # scikit-image, CIE 1976 L* of jet at 7 evenly spaced positions (D65, sRGB). The bar is
    # sampled once per distinct colour step, not per pixel, so positions shift a little.
    expected = rgb2lab(colormaps["jet"](np.linspace(0, 1, 7))[None, :, :3])[0, :, 0]
    assert np.allclose(reported, expected, atol=6.0), (reported, expected.round())


def test_heatmap_fills_without_a_colour_bar():
    assert run(vector_figure(heatmap_case("jet", colour_bar=False)), "colormap-rainbow")[0]
    assert run(vector_figure(heatmap_case("viridis", colour_bar=False)), "colormap-rainbow") == ([], False)


def test_colour_bar_makes_any_chart_judged_and_bars_pass():
    # A colour bar on a chart the classifier calls 'bar' is still judged.
    assert run(vector_figure(heatmap_case("hsv", chart_type="bar")), "colormap-rainbow")[0]
    assert run(vector_figure(bars_case(OKABE_ITO[:3])), "colormap-rainbow") == ([], False)


def test_heatmap_without_any_readable_scale_is_unmeasured():
    def draw(fig):
        ax = fig.add_subplot()
        ax.imshow(np.eye(6), cmap="Greys")  # two colours only: no scale to judge

    assert run(vector_figure(ColourCase("two-tone", "heatmap", draw, {})), "colormap-rainbow") == ([], True)


def test_config_changes_the_rainbow_outcome():
    figure = vector_figure(heatmap_case("jet"))
    assert run(figure, "colormap-rainbow")[0]
    # jet sweeps ~270 deg of hue: a 300 deg limit lets it pass; disabling removes the rule.
    assert run(figure, "colormap-rainbow", {"rules": {"colormap-rainbow": {"min_hue_span_deg": 300}}})[0] == []
    assert run(figure, "colormap-rainbow", {"rules": {"colormap-rainbow": {"enabled": False}}})[0] == []
    assert run(figure, "colormap-rainbow", {"rules": {"colormap-rainbow": {"severity": "error"}}})[0][0].severity \
        == "error"


# ------------------------------------------------------------------ palette-cvd


def test_orange_and_green_converge_under_protanopia_in_colour_science():
    """The fixture's premise, checked with an independent implementation of Machado et al."""
    import colour as colour_science

    matrix = colour_science.blindness.matrix_cvd_Machado2009("Protanomaly", 1.0)
    pair = np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in (TAB10_ORANGE, TAB10_GREEN)]) / 255.0
    linear = colour_science.models.eotf_sRGB(pair)
    simulated = colour_science.models.eotf_inverse_sRGB(np.clip(linear @ matrix.T, 0, 1))
    lab = colour_science.XYZ_to_Lab(colour_science.sRGB_to_XYZ(simulated, apply_cctf_decoding=True))
    assert colour_science.delta_E(lab[0], lab[1], method="CIE 2000") < 3.0


@pytest.mark.parametrize("kind", ["vector", "raster"])
def test_confusable_pair_is_named_with_its_deficiency(kind):
    findings, unmeasured = run(render(bars_case(("#1f77b4", TAB10_ORANGE, TAB10_GREEN)), kind), "palette-cvd")
    assert not unmeasured and len(findings) == 1
    message = findings[0].draft.message
    assert "protanopia" in message
    hexes = set(re.findall(r"#[0-9a-f]{6}", message))
    assert len(hexes) == 2
    if kind == "vector":  # vector colours are exact
        assert hexes == {TAB10_ORANGE, TAB10_GREEN}
    assert float(findings[0].draft.value) < 8.0 and findings[0].draft.threshold == "8"
    assert findings[0].draft.region is not None


@pytest.mark.parametrize("kind", ["vector", "raster"])
def test_okabe_ito_palette_passes(kind):
    assert run(render(bars_case(OKABE_ITO), kind), "palette-cvd") == ([], False)


def test_continuous_colours_are_not_categories():
    assert run(vector_figure(heatmap_case("jet")), "palette-cvd") == ([], False)


def test_config_changes_the_palette_outcome():
    figure = vector_figure(bars_case((TAB10_ORANGE, TAB10_GREEN)))
    assert run(figure, "palette-cvd")[0]
    # Severity 0 simulates normal vision (the identity matrix of Machado et al.): nothing converges.
    assert run(figure, "palette-cvd", {"rules": {"palette-cvd": {"cvd_severity": 0.0}}})[0] == []
    # A threshold below the simulated distance (1.3 dE00 under protanopia) passes the pair.
    assert run(figure, "palette-cvd", {"rules": {"palette-cvd": {"min_de00": 1.0}}})[0] == []
