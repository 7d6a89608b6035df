"""The rule registry: rules declare themselves with @rule; the runner reads the metadata.

A rule's evaluate(ctx) reads ctx.figure, ctx.options and ctx.measure(name) and returns
an Outcome. It never opens files or prints.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable

from corpusaudit.model import CHART_TYPES, SEVERITIES, SOURCES, Figure, Option, Outcome, Rule

ANY_CHART = ("*",)
RULES: dict[str, Rule] = {}


@dataclass
class CheckContext:
    figure: Figure
    options: dict[str, Any]
    measure: Callable[[str], Any]  # name -> measurement; raises MeasurementUnavailable


def rule(*, id: str, applies_to: tuple[str, ...], severity: str, rationale: str, fix: str,
         problem: str, better: str, limitations: str, options: tuple[Option, ...] = (), sources: tuple[str, ...] = SOURCES,
         requires: tuple[str, ...] = (), status: str = "stable"):
    """Declare a rule. The decorated function is its evaluate(ctx) -> Outcome.

    Every rule documents itself in fixed sections: rationale (why it matters), fix, problem (an
    example that fails), better (the same figure done well) and limitations (what it cannot see).
    """
    if severity not in SEVERITIES:
        raise ValueError(f"{id}: unknown severity {severity!r}")
    unknown = [t for t in applies_to if t != "*" and t not in CHART_TYPES]
    if unknown:
        raise ValueError(f"{id}: unknown chart types {unknown}")

    def register(evaluate: Callable[[CheckContext], Outcome]) -> Callable[[CheckContext], Outcome]:
        if id in RULES:
            raise ValueError(f"rule id {id!r} declared twice")
        RULES[id] = Rule(id=id, applies_to=applies_to, sources=sources, severity=severity,
                         options=options, rationale=" ".join(rationale.split()), fix=" ".join(fix.split()),
                         problem=" ".join(problem.split()), better=" ".join(better.split()),
                         limitations=" ".join(limitations.split()), evaluate=evaluate, requires=requires, status=status)
        return evaluate

    return register


def applies(rule_: Rule, figure: Figure) -> bool:
    if figure.source not in rule_.sources:
        return False
    if rule_.applies_to == ANY_CHART:
        return True
    return figure.chart_type in rule_.applies_to and not figure.low_confidence


def all_rules() -> list[Rule]:
    import corpusaudit.checks  # noqa: F401  (imports every family module, which registers)

    return [RULES[key] for key in sorted(RULES)]
