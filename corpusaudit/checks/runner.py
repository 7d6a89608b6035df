"""Run every enabled, applicable rule on one figure."""

from __future__ import annotations

import logging
from dataclasses import dataclass

from corpusaudit.checks.registry import CheckContext, all_rules, applies
from corpusaudit.config import Config
from corpusaudit.measure import Measurements
from corpusaudit.model import Draft, Figure, MeasurementUnavailable

log = logging.getLogger(__name__)


@dataclass(frozen=True)
class RuleResult:
    rule: str
    severity: str
    draft: Draft


def check_figure(figure: Figure, config: Config, measurements: Measurements,
                 strict: bool = False) -> tuple[list[RuleResult], list[str]]:
    """Findings of every applicable rule, and the ids of rules that could not measure."""
    results: list[RuleResult] = []
    unmeasured: list[str] = []
    for rule in all_rules():
        settings = config.rules[rule.id]
        if not settings.enabled or not applies(rule, figure):
            continue
        ctx = CheckContext(figure=figure, options=settings.options, measure=measurements.get)
        try:
            outcome = rule.evaluate(ctx)
        except MeasurementUnavailable:
            unmeasured.append(rule.id)
            continue
        except Exception:  # a broken rule must not stop the batch
            if strict:
                raise
            log.exception("rule %s failed on figure %s", rule.id, figure.figure_id)
            unmeasured.append(rule.id)
            continue
        if outcome.unmeasured:
            unmeasured.append(rule.id)
        for draft in outcome.findings:
            results.append(RuleResult(rule.id, draft.severity or settings.severity, draft))
    return results, unmeasured
