"""Feedback for authors: one letter per document, as plain HTML and as Markdown.

letters/<document_id>.html and letters/<document_id>.md list the document's figures with
findings, page by page, each finding with what was measured and a suggested fix, then why
each kind of point matters, and the note that findings are advice for a person to review.
"""

from __future__ import annotations

import re
from collections import defaultdict
from dataclasses import dataclass
from html import escape
from pathlib import Path

from corpusaudit import __version__
from corpusaudit.checks.registry import all_rules
from corpusaudit.model import SEVERITY_RANK, Rule

ADVICE = ("These points come from automated checks against well-established chart practice. They are advice, "
          "not verdicts: a person has reviewed or will review each one, and nothing about you or your "
          "submission is decided by them alone. Where a point does not fit your figure, it can be ignored.")
CAPTION_CHARS = 160
# Inline markup characters; every line we write starts with our own text, so block markers
# (#, -, 1.) inside document strings cannot start a block.
_MARKDOWN_SPECIAL = re.compile(r"([\\`*_\[\]|~])")


@dataclass
class _Point:
    severity: str
    rule: str
    message: str
    value: str
    threshold: str
    fix: str


@dataclass
class _FigureEntry:
    label: str
    caption: str
    chart_type: str
    points: list[_Point]
    unmeasured: list[str]


def _one_line(text: str | None, limit: int | None = None) -> str:
    flat = " ".join((text or "").split())
    return flat if limit is None or len(flat) <= limit else flat[:limit - 1] + "\u2026"


def figure_label(figure: dict) -> str:
    if figure.get("figure_number"):
        return f"Figure {figure['figure_number']}"
    return f"Unnumbered figure {int(figure.get('index') or 0) + 1}, page {figure['page']}"


def _rules() -> dict[str, Rule]:
    return {rule.id: rule for rule in all_rules()}


def _entries(figures: list[dict], findings: list[dict], rules: dict[str, Rule]) -> dict[int, list[_FigureEntry]]:
    by_figure: dict[str, list[dict]] = defaultdict(list)
    for finding in findings:
        by_figure[finding["figure_id"]].append(finding)
    pages: dict[int, list[_FigureEntry]] = defaultdict(list)
    for figure in sorted(figures, key=lambda f: (int(f["page"] or 1), int(f["index"] or 0))):
        flagged = sorted(by_figure.get(figure["figure_id"], ()), key=lambda f: (-SEVERITY_RANK[f["severity"]], f["rule"]))
        if not flagged:
            continue
        points = [_Point(f["severity"], f["rule"], _one_line(f["message"]).rstrip("."), _one_line(str(f["value"] or "")),
                         _one_line(str(f["threshold"] or "")), rules[f["rule"]].fix if f["rule"] in rules else "") for f in flagged]
        pages[int(figure["page"] or 1)].append(_FigureEntry(
            label=figure_label(figure), caption=_one_line(figure.get("caption"), CAPTION_CHARS),
            chart_type=figure.get("chart_type") or "", points=points,
            unmeasured=[r for r in (figure.get("unmeasured") or "").split(";") if r]))
    return dict(sorted(pages.items()))


def _status_line(document: dict, figure_count: int, point_count: int) -> str:
    if document["status"] != "ok":
        return (f"The file could not be read ({document['status']}: {_one_line(document.get('error'))}), "
                "so its figures were not checked. Please check that it opens and send it again.")
    if not point_count:
        return f"The checks found nothing to point out in its {figure_count} figure(s)."
    return (f"The checks found {point_count} point(s) in {figure_count} figure(s), listed page by page below, "
            "each with a suggested fix.")


def _md(text: str) -> str:
    """Markdown text that renders as written: punctuation escaped, no raw HTML."""
    return _MARKDOWN_SPECIAL.sub(r"\\\1", text).replace("<", "&lt;").replace(">", "&gt;")


def letter_markdown(document: dict, figures: list[dict], findings: list[dict],
                     rules: dict[str, Rule] | None = None) -> str:
    rules = _rules() if rules is None else rules
    pages = _entries(figures, findings, rules)
    rationale = {rule_id: rule.rationale for rule_id, rule in rules.items()}
    lines = [f"# Feedback on the figures of {_md(document['path'])}", "",
             _md(_status_line(document, len(figures), len(findings))), "", f"> {_md(ADVICE)}", ""]
    used: list[str] = []
    for page, entries in pages.items():
        lines += [f"## Page {page}", ""]
        for entry in entries:
            kind = f" ({_md(entry.chart_type)})" if entry.chart_type else ""
            lines.append(f"### {_md(entry.label)}{kind}")
            lines.append("")
            if entry.caption:
                lines += [f"*{_md(entry.caption)}*", ""]
            for point in entry.points:
                used += [point.rule] if point.rule not in used else []
                measured = (f" Measured: {_md(point.value)}" + (f" (threshold {_md(point.threshold)})."
                                                                  if point.threshold else ".")) if point.value else ""
                lines.append(f"- **{point.severity.capitalize()}**, `{point.rule}`: {_md(point.message)}.{measured}")
                if point.fix:
                    lines.append(f"  Suggested fix: {_md(point.fix)}")
            if entry.unmeasured:
                lines.append(f"- Not checked automatically (please look by eye): "
                             f"{', '.join(f'`{r}`' for r in entry.unmeasured)}")
            lines.append("")
    if any(rationale.get(rule) for rule in used):
        lines += ["## Why these points matter", ""]
        lines += [f"- `{rule}`: {_md(rationale[rule])}" for rule in used if rationale.get(rule)]
        lines.append("")
    lines.append(f"Prepared with corpusaudit {__version__}.")
    return "\n".join(lines) + "\n"


LETTER_STYLE = ("body{font-family:Georgia,'DejaVu Serif',serif;max-width:42rem;margin:2rem auto;padding:0 1rem;"
                "color:#1b1f24;background:#fff;line-height:1.5}h1{font-size:1.4rem}h2{font-size:1.15rem;"
                "border-bottom:1px solid #c9d1d9;margin-top:2rem}h3{font-size:1rem}"
                ".note{border-left:4px solid #4a5159;background:#f3f5f7;padding:.5rem 1rem}"
                ".muted{color:#4a5159}code{font-size:.9em}")


def letter_html(document: dict, figures: list[dict], findings: list[dict],
                 rules: dict[str, Rule] | None = None) -> str:
    rules = _rules() if rules is None else rules
    pages = _entries(figures, findings, rules)
    rationale = {rule_id: rule.rationale for rule_id, rule in rules.items()}
    e = lambda text: escape(str(text), quote=True)  # noqa: E731
    body = [f"<h1>Feedback on the figures of {e(document['path'])}</h1>",
            f"<p>{e(_status_line(document, len(figures), len(findings)))}</p>",
            f"<p class='note' role='note'>{e(ADVICE)}</p>"]
    used: list[str] = []
    for page, entries in pages.items():
        body.append(f"<h2>Page {page}</h2>")
        for entry in entries:
            kind = f" <span class='muted'>({e(entry.chart_type)})</span>" if entry.chart_type else ""
            body.append(f"<h3>{e(entry.label)}{kind}</h3>")
            if entry.caption:
                body.append(f"<p><em>{e(entry.caption)}</em></p>")
            items = []
            for point in entry.points:
                used += [point.rule] if point.rule not in used else []
                measured = ""
                if point.value:
                    measured = f" Measured: {e(point.value)}" + (f" (threshold {e(point.threshold)})." if point.threshold else ".")
                fix = f"<br>Suggested fix: {e(point.fix)}" if point.fix else ""
                items.append(f"<li><strong>{e(point.severity.capitalize())}</strong>, <code>{e(point.rule)}</code>: "
                             f"{e(point.message)}.{measured}{fix}</li>")
            if entry.unmeasured:
                items.append("<li>Not checked automatically (please look by eye): "
                             + ", ".join(f"<code>{e(r)}</code>" for r in entry.unmeasured) + "</li>")
            body.append("<ul>" + "".join(items) + "</ul>")
    if any(rationale.get(rule) for rule in used):
        body.append("<h2>Why these points matter</h2><ul>"
                    + "".join(f"<li><code>{e(rule)}</code>: {e(rationale[rule])}</li>" for rule in used
                              if rationale.get(rule))
                    + "</ul>")
    body.append(f"<p class='muted'>Prepared with corpusaudit {e(__version__)}.</p>")
    return ("<!DOCTYPE html>\n<html lang='en'><head><meta charset='utf-8'>"
            "<meta http-equiv='Content-Security-Policy' content=\"default-src 'none'; style-src 'unsafe-inline'\">"
            f"<title>Feedback on the figures of {e(document['path'])}</title><style>{LETTER_STYLE}</style></head>"
            "<body><main>" + "".join(body) + "</main></body></html>\n")


def letter_paths(out_dir: Path, document_id: str) -> tuple[Path, Path]:
    folder = out_dir / "letters"
    return folder / f"{document_id}.html", folder / f"{document_id}.md"


def write_letters(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict]) -> list[Path]:
    """letters/<document_id>.html and .md for every document; returns the paths written."""
    figures_of: dict[str, list[dict]] = defaultdict(list)
    findings_of: dict[str, list[dict]] = defaultdict(list)
    for figure in figures:
        figures_of[figure["document_id"]].append(figure)
    for finding in findings:
        findings_of[finding["document_id"]].append(finding)
    (out_dir / "letters").mkdir(parents=True, exist_ok=True)
    written = []
    rules = _rules()
    for document in documents:
        html_path, markdown_path = letter_paths(out_dir, document["document_id"])
        own_figures, own_findings = figures_of[document["document_id"]], findings_of[document["document_id"]]
        # Plain writes: one open per letter (thousands of them); report.html itself is written atomically.
        html_path.write_text(letter_html(document, own_figures, own_findings, rules), encoding="utf-8")
        markdown_path.write_text(letter_markdown(document, own_figures, own_findings, rules), encoding="utf-8")
        written += [html_path, markdown_path]
    return written
