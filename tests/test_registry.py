"""The rule registry against the contract: the rule ids of design.md, declared metadata, `rules` output."""

from __future__ import annotations

import importlib

from corpusaudit.checks import FAMILY_MODULES
from corpusaudit.checks.registry import all_rules
from corpusaudit.cli import main
from corpusaudit.model import CHART_TYPES, SEVERITIES

# design.md, "Rule ids (keep them: benchmarks and users' scripts rely on them)".
CONTRACT_IDS = {
    "pie-slice-count", "pie-similar-slices", "pie-order", "pie-total", "bar-baseline", "tick-label-rotation",
    "bar-order", "bar-stack-depth", "line-series-count", "line-on-categories", "line-uneven-axis",
    "line-marker-gaps", "area-stacked", "scatter-overplotting", "scatter-edge-points", "box-order",
    "colormap-rainbow", "palette-cvd", "text-contrast", "text-size", "raster-resolution", "raster-compression",
    "caption-missing", "chart-3d", "line-direct-labels",
}


def test_every_contract_rule_is_declared_once_with_its_metadata():
    rules = all_rules()
    ids = [rule.id for rule in rules]
    assert len(ids) == len(set(ids))
    assert set(ids) == CONTRACT_IDS
    for rule in rules:
        assert rule.severity in SEVERITIES
        assert rule.applies_to == ("*",) or set(rule.applies_to) <= set(CHART_TYPES)
        assert len(rule.rationale) > 40 and len(rule.fix) > 20, rule.id
        # style.md: every rule documents a failing example, a better one and its limits.
        assert len(rule.problem) > 30 and len(rule.better) > 30 and len(rule.limitations) > 30, rule.id
        assert rule.problem != rule.better, rule.id
        for option in rule.options:
            assert option.help and option.source, (rule.id, option.key)


def test_every_family_module_contributes_a_rule():
    owners = {rule.evaluate.__module__ for rule in all_rules()}
    for name in FAMILY_MODULES:
        module = importlib.import_module(f"corpusaudit.checks.{name}")
        assert module.__name__ in owners, name


def test_rules_command_prints_the_registry(capsys):
    assert main(["rules"]) == 0
    printed = capsys.readouterr().out
    for rule in all_rules():
        assert f"{rule.id}  [{rule.severity}]" in printed
        for option in rule.options:
            assert f"{option.key} = {option.default}" in printed
        assert rule.problem in printed and rule.limitations in printed
