"""The chart-rule benchmark's cases draw the same chart every time: a case's vector and raster
figures show the same data, and results do not depend on which cases were drawn before."""

from __future__ import annotations

from corpusaudit.checks import cases


def test_each_case_draws_the_same_chart_twice():
    drawn = {}
    for case in cases.generate(60, 20240517):
        drawn.setdefault(case.name.split("-")[0], case)  # one case of each family
    assert len(drawn) >= 6
    for case in drawn.values():
        assert cases._draw(case, "png", 40) == cases._draw(case, "png", 40), case.name
