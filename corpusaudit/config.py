"""Configuration from a TOML file. Unknown sections, rule ids or keys are errors that name them."""

from __future__ import annotations

import dataclasses
import hashlib
import json
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from corpusaudit.checks.registry import all_rules
from corpusaudit.extract import ExtractConfig
from corpusaudit.model import SEVERITIES, Rule


class ConfigError(ValueError):
    pass


@dataclass(frozen=True)
class RuleSettings:
    enabled: bool
    severity: str
    options: dict[str, Any]


@dataclass(frozen=True)
class ClassifySettings:
    low_confidence: float = 0.5  # below this best probability a label is marked low-confidence


@dataclass(frozen=True)
class Config:
    rules: dict[str, RuleSettings]
    extract: ExtractConfig = field(default_factory=ExtractConfig)
    classify: ClassifySettings = field(default_factory=ClassifySettings)

    def digest(self) -> str:
        """Stable hash of everything that changes results: the incremental cache key."""
        payload = {
            "rules": {key: dataclasses.asdict(value) for key, value in sorted(self.rules.items())},
            "extract": {k: v for k, v in dataclasses.asdict(self.extract).items() if k != "passwords"},
            "classify": dataclasses.asdict(self.classify),
        }
        return hashlib.sha256(json.dumps(payload, sort_keys=True, default=str).encode()).hexdigest()[:16]


def _rule_settings(rule: Rule, table: dict[str, Any]) -> RuleSettings:
    options = {option.key: option.default for option in rule.options}
    known = set(options) | {"enabled", "severity"}
    unknown = sorted(set(table) - known)
    if unknown:
        raise ConfigError(f"[rules.{rule.id}]: unknown key(s) {', '.join(unknown)}; "
                          f"known: {', '.join(sorted(known))}")
    severity = table.get("severity", rule.severity)
    if severity not in SEVERITIES:
        raise ConfigError(f"[rules.{rule.id}]: severity must be one of {', '.join(SEVERITIES)}, not {severity!r}")
    enabled = table.get("enabled", True)
    if not isinstance(enabled, bool):
        raise ConfigError(f"[rules.{rule.id}]: enabled must be true or false")
    for option in rule.options:
        if option.key not in table:
            continue
        value = table[option.key]
        if isinstance(option.default, (int, float)) and not isinstance(option.default, bool):
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise ConfigError(f"[rules.{rule.id}]: {option.key} must be a number, not {value!r}")
            if (option.minimum is not None and value < option.minimum) or (
                    option.maximum is not None and value > option.maximum):
                raise ConfigError(f"[rules.{rule.id}]: {option.key}={value} outside "
                                  f"[{option.minimum}, {option.maximum}]")
        elif type(value) is not type(option.default):
            raise ConfigError(f"[rules.{rule.id}]: {option.key} must be {type(option.default).__name__}")
        options[option.key] = value
    return RuleSettings(enabled=enabled, severity=severity, options=options)


def _dataclass_from_table(cls, table: dict[str, Any], section: str):
    fields = {f.name: f for f in dataclasses.fields(cls)}
    unknown = sorted(set(table) - set(fields))
    if unknown:
        raise ConfigError(f"[{section}]: unknown key(s) {', '.join(unknown)}; known: {', '.join(sorted(fields))}")
    values = {}
    for key, value in table.items():
        default = fields[key].default
        if isinstance(default, tuple):
            value = tuple(value)
        elif isinstance(default, float) and isinstance(value, int) and not isinstance(value, bool):
            value = float(value)
        if type(value) is not type(default):
            raise ConfigError(f"[{section}]: {key} must be {type(default).__name__}, not {value!r}")
        values[key] = value
    return cls(**values)


def build_config(data: dict[str, Any], overrides: dict[str, Any] | None = None) -> Config:
    unknown_sections = sorted(set(data) - {"rules", "extract", "classify"})
    if unknown_sections:
        raise ConfigError(f"unknown section(s) {', '.join(unknown_sections)}; known: rules, extract, classify")
    rules = {rule.id: rule for rule in all_rules()}
    rule_tables = data.get("rules", {})
    unknown_rules = sorted(set(rule_tables) - set(rules))
    if unknown_rules:
        raise ConfigError(f"unknown rule id(s) {', '.join(unknown_rules)}; see `corpusaudit rules`")
    settings = {rule_id: _rule_settings(rule, rule_tables.get(rule_id, {})) for rule_id, rule in rules.items()}
    extract_table = dict(data.get("extract", {}))
    extract_table.update(overrides or {})
    return Config(rules=settings,
                  extract=_dataclass_from_table(ExtractConfig, extract_table, "extract"),
                  classify=_dataclass_from_table(ClassifySettings, data.get("classify", {}), "classify"))


def load_config(path: str | Path | None, overrides: dict[str, Any] | None = None) -> Config:
    if path is None:
        return build_config({}, overrides)
    try:
        data = tomllib.loads(Path(path).read_text(encoding="utf-8"))
    except OSError as exc:
        raise ConfigError(f"cannot read config {path}: {exc.strerror or exc}") from exc
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"config {path} is not valid TOML: {exc}") from exc
    return build_config(data, overrides)
