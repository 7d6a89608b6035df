"""report.html: the reviewer's dashboard, one self-contained page per audit.

The page needs no network: styles and script are inlined from report/templates/, the audit
rows are embedded once as JSON, thumbnails are read from assets/ beside the page. The
overview and the rule list are written here (Python side, charts from report/svg.py); the
figure grid, figure detail and document views are drawn by the page's script from the JSON,
inserting every string that came from a document as text, never as markup.

Beside report.html, write_report also writes the feedback letters (letters/, see
report/letters.py). It links the annotated PDF copies and page thumbnails that
report/annotate.py wrote, when they exist.
"""

from __future__ import annotations

import base64
import hashlib
import json
import re
from collections import Counter, defaultdict
from html import escape
from pathlib import Path
from typing import Any, Iterable
from urllib.parse import urlencode

from corpusaudit import __version__
from corpusaudit.checks.registry import all_rules
from corpusaudit.model import SEVERITIES, SEVERITY_RANK
from corpusaudit.report import write_atomic
from corpusaudit.report.annotate import annotated_path, page_sizes_path, page_thumbnail_path
from corpusaudit.report.letters import write_letters
from corpusaudit.report.svg import Bar, bar_chart

ADVISORY = ("Findings are advice, not verdicts: each one points at a place where a figure may depart from "
            "well-established practice. A person reviews every finding before anything is decided about an "
            "author or a submission.")

TEMPLATES = Path(__file__).with_name("templates")
SEVERITY_MARK = {"error": "\u2715", "warning": "\u25b2", "info": "\u25cf"}
TOP_DOCUMENTS = 15
# A4 portrait in points: the outline drawn for a page whose size was not recorded.
DEFAULT_PAGE_PT = (595.0, 842.0)

# Column order of the embedded rows; the script reads the same names from the JSON.
DOCUMENT_FIELDS = ("document_id", "path", "status", "error", "pages", "figures", "findings", "groups",
                   "page_info", "annotated")
FIGURE_FIELDS = ("figure_id", "document", "page", "index", "x0", "y0", "x1", "y1", "source", "chart_type",
                 "confidence", "width_px", "height_px", "effective_ppi", "caption", "thumbnail", "unmeasured",
                 "low_confidence", "figure_number", "classified_by")
FINDING_FIELDS = ("figure", "rule", "severity", "message", "value", "threshold", "fx0", "fy0", "fx1", "fy1")


def _e(value: object) -> str:
    return escape("" if value is None else str(value), quote=True)


def json_for_script(payload: Any) -> str:
    """JSON that cannot end its <script> element early nor break a JavaScript parser.

    '<' becomes \\u003c (so neither '</script' nor '<!--' can appear), and the line
    separators U+2028 / U+2029 are escaped as well.
    """
    text = json.dumps(payload, ensure_ascii=False, separators=(",", ":"), allow_nan=False)
    return text.replace("<", "\\u003c").replace("\u2028", "\\u2028").replace("\u2029", "\\u2029")


def _number(value: Any) -> float | None:
    if value is None or value == "":
        return None
    try:
        return round(float(value), 2)
    except (TypeError, ValueError):
        return None


def _page_info(out_dir: Path, document_id: str, pages_with_figures: Iterable[int]) -> dict[str, list]:
    """Per page with figures: [width_pt, height_pt, thumbnail or ""] when annotate.py recorded them."""
    sizes_file = page_sizes_path(out_dir, document_id)
    if not sizes_file.is_file():
        return {}
    try:
        sizes = json.loads(sizes_file.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    info = {}
    for page in pages_with_figures:
        size = sizes.get(str(page))
        if not size:
            continue
        thumbnail = page_thumbnail_path(out_dir, document_id, page)
        info[str(page)] = [size[0], size[1],
                           thumbnail.relative_to(out_dir).as_posix() if thumbnail.is_file() else ""]
    return info


def _rule_payload(rule_ids: list[str]) -> list[dict]:
    known = {rule.id: rule for rule in all_rules()}
    payload = []
    for rule_id in rule_ids:
        rule = known.get(rule_id)
        if rule is None:  # a finding stored by a rule this version no longer has
            payload.append({"id": rule_id, "severity": "", "applies_to": [], "rationale": "", "fix": "",
                            "options": []})
            continue
        payload.append({"id": rule.id, "severity": rule.severity, "applies_to": list(rule.applies_to),
                        "rationale": rule.rationale, "fix": rule.fix,
                        "options": [{"key": o.key, "default": o.default, "help": o.help, "source": o.source}
                                    for o in rule.options]})
    return payload


def build_payload(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict],
                  manifest_columns: list[str], letters: bool = True) -> dict:
    """The rows as compact arrays (field names in *_fields), references by position."""
    document_index = {d["document_id"]: i for i, d in enumerate(documents)}
    figure_index = {f["figure_id"]: i for i, f in enumerate(figures)}
    rule_ids = sorted({rule.id for rule in all_rules()} | {f["rule"] for f in findings}
                      | {r for f in figures for r in (f.get("unmeasured") or "").split(";") if r})
    rule_index = {r: i for i, r in enumerate(rule_ids)}
    pages_by_document: dict[str, set[int]] = defaultdict(set)
    for figure in figures:
        pages_by_document[figure["document_id"]].add(int(figure["page"] or 1))

    document_rows = [[
        d["document_id"], d["path"], d["status"], d.get("error") or "", d.get("pages") or 0,
        d.get("figures") or 0, d.get("findings") or 0,
        [str((d.get("manifest") or {}).get(c, "") or "") for c in manifest_columns],
        _page_info(out_dir, d["document_id"], pages_by_document.get(d["document_id"], ())),
        int(annotated_path(out_dir, d["document_id"]).is_file()),
    ] for d in documents]
    figure_rows = [[
        f["figure_id"], document_index.get(f["document_id"], -1), int(f["page"] or 1), int(f["index"] or 0),
        _number(f["x0"]), _number(f["y0"]), _number(f["x1"]), _number(f["y1"]), f["source"] or "",
        f["chart_type"] or "", _number(f["confidence"]), int(f["width_px"] or 0), int(f["height_px"] or 0),
        _number(f["effective_ppi"]), f["caption"] or "", f["thumbnail"] or "",
        [rule_index[r] for r in (f.get("unmeasured") or "").split(";") if r],
        int(f.get("low_confidence") or 0), f.get("figure_number") or "", f.get("classified_by") or "",
    ] for f in figures]
    finding_rows = [[
        figure_index.get(f["figure_id"], -1), rule_index[f["rule"]], SEVERITIES.index(f["severity"]),
        f["message"] or "", "" if f["value"] is None else str(f["value"]),
        "" if f["threshold"] is None else str(f["threshold"]),
        _number(f["fx0"]), _number(f["fy0"]), _number(f["fx1"]), _number(f["fy1"]),
    ] for f in findings if f["severity"] in SEVERITIES]
    return {
        "version": __version__, "advisory": ADVISORY, "severities": list(SEVERITIES),
        "groups": list(manifest_columns), "default_page": list(DEFAULT_PAGE_PT), "letters": letters,
        "document_fields": list(DOCUMENT_FIELDS), "figure_fields": list(FIGURE_FIELDS),
        "finding_fields": list(FINDING_FIELDS),
        "rules": _rule_payload(rule_ids), "documents": document_rows, "figures": figure_rows,
        "findings": finding_rows,
    }


# ---------------------------------------------------------------- overview (written here)

def _severity_badge(severity: str, count: int | None = None) -> str:
    text = severity if count is None else f"{count:,} {severity}"
    return f"<span class='sev sev-{_e(severity)}'><span aria-hidden='true'>{SEVERITY_MARK[severity]}</span> {_e(text)}</span>"


def _severity_breakdown(counts: Counter) -> str:
    return ", ".join(f"{counts[s]:,} {s}" for s in SEVERITIES if counts[s])


def _figure_link(params: dict[str, str]) -> str:
    return "#figures" + ("?" + urlencode(params) if params else "")


def _count(n: int, noun: str) -> str:
    return f"{n:,} {noun}{'' if n == 1 else 's'}"


def _group_link(column: str, value: str, with_findings: bool = False) -> str:
    params = {"group": f"{column}={value}"}
    return _figure_link({**params, "sev": "any"} if with_findings else params)


def _tiles(documents: list[dict], figures: list[dict], findings: list[dict]) -> str:
    severities = Counter(f["severity"] for f in findings)
    flagged = len({f["figure_id"] for f in findings})
    unreadable = sum(1 for d in documents if d["status"] != "ok")
    low = sum(1 for f in figures if f.get("low_confidence"))
    share = f"{flagged / len(figures):.0%}" if figures else "0%"
    tiles = [
        ("Documents", f"{len(documents):,}",
         f"{unreadable:,} could not be read" if unreadable else "all read", "#documents"),
        ("Figures", f"{len(figures):,}", f"{flagged:,} with findings ({share})", _figure_link({"sev": "any"})),
    ]
    for severity in SEVERITIES:
        tiles.append((severity.capitalize(), f"{severities[severity]:,}",
                      _count(len({f["figure_id"] for f in findings if f["severity"] == severity}), "figure"),
                      _figure_link({"sev": severity})))
    tiles.append(("Unsure chart type", f"{low:,}", "low-confidence labels", _figure_link({"conf": "low"})))
    return "<ul class='tiles'>" + "".join(
        f"<li class='tile{' tile-' + name.lower() if name.lower() in SEVERITIES else ''}'><a href='{_e(link)}'>"
        f"<span class='tile-name'>{(SEVERITY_MARK[name.lower()] + ' ') if name.lower() in SEVERITIES else ''}"
        f"{_e(name)}</span><span class='tile-value'>{value}</span><span class='tile-note'>{_e(note)}</span></a></li>"
        for name, value, note, link in tiles) + "</ul>"


def _chart_panel(heading: str, svg: str, note: str = "") -> str:
    extra = f"<p class='muted'>{_e(note)}</p>" if note else ""
    return f"<figure class='panel chart-panel'><figcaption><h3>{_e(heading)}</h3></figcaption>{svg}{extra}</figure>"


def overview_charts(documents: list[dict], figures: list[dict], findings: list[dict]) -> list[tuple[str, str]]:
    """(heading, svg) of each summary chart; the headings serve as the charts' captions."""
    charts = []
    by_rule: dict[str, Counter] = defaultdict(Counter)
    for finding in findings:
        by_rule[finding["rule"]][finding["severity"]] += 1
    if by_rule:
        bars = [Bar(rule, sum(c.values()), _figure_link({"rule": rule}),
                    f"{sum(c.values()):,} ({_severity_breakdown(c)})") for rule, c in by_rule.items()]
        charts.append(("Findings by rule", bar_chart("Findings by rule", bars, "findings")))
        severities = Counter(f["severity"] for f in findings)
        bars = [Bar(s, severities[s], _figure_link({"sev": s})) for s in SEVERITIES if severities[s]]
        charts.append(("Findings by severity", bar_chart("Findings by severity", bars, "findings")))
    types = Counter(f["chart_type"] or "unlabelled" for f in figures)
    if types:
        bars = [Bar(t, n, _figure_link({"type": t})) for t, n in types.items()]
        charts.append(("Figures by chart type", bar_chart("Figures by chart type", bars, "figures")))
    return charts


def _document_ranking(documents: list[dict], findings: list[dict]) -> str:
    per_document: dict[str, Counter] = defaultdict(Counter)
    for finding in findings:
        per_document[finding["document_id"]][finding["severity"]] += 1
    ranked = sorted((d for d in documents if per_document.get(d["document_id"])),
                    key=lambda d: (-sum(SEVERITY_RANK[s] * 1000 ** SEVERITY_RANK[s] * n
                                        for s, n in per_document[d["document_id"]].items()),
                                   -(d.get("findings") or 0), d["path"]))
    if not ranked:
        return "<p>No document has findings.</p>"
    rows = []
    for doc in ranked[:TOP_DOCUMENTS]:
        counts = per_document[doc["document_id"]]
        figures = doc.get("figures") or 0
        rate = f"{sum(counts.values()) / figures:.2f}" if figures else ""
        rows.append(
            f"<tr><th scope='row'><a href='#document/{_e(doc['document_id'])}'>{_e(doc['path'])}</a></th>"
            f"<td class='num'>{figures:,}</td><td class='num'>{sum(counts.values()):,}</td>"
            + "".join(f"<td class='num'>{counts[s]:,}</td>" for s in SEVERITIES)
            + f"<td class='num'>{rate}</td></tr>")
    more = (f"<p><a href='#documents'>All {len(ranked):,} documents with findings</a></p>"
            if len(ranked) > TOP_DOCUMENTS else "")
    return ("<div class='table-wrap'><table><caption>Documents ranked by severity, then by number of findings"
            "</caption><thead><tr><th scope='col'>Document</th><th scope='col' class='num'>Figures</th>"
            "<th scope='col' class='num'>Findings</th>"
            + "".join(f"<th scope='col' class='num'>{_severity_badge(s)}</th>" for s in SEVERITIES)
            + "<th scope='col' class='num'>Per figure</th></tr></thead><tbody>"
            + "".join(rows) + f"</tbody></table></div>{more}")


def _unreadable(documents: list[dict]) -> str:
    failed = [d for d in documents if d["status"] != "ok"]
    if not failed:
        return ""
    rows = "".join(f"<tr><th scope='row'><a href='#document/{_e(d['document_id'])}'>{_e(d['path'])}</a></th>"
                   f"<td>{_e(d['status'])}</td><td>{_e(d.get('error'))}</td></tr>" for d in failed[:50])
    more = f"<p class='muted'>and {len(failed) - 50:,} more in Documents.</p>" if len(failed) > 50 else ""
    return ("<section class='panel attention' aria-labelledby='unreadable-h'><h3 id='unreadable-h'>"
            f"Files that could not be audited ({len(failed):,})</h3><p>Their figures are not in this report.</p>"
            "<div class='table-wrap'><table><thead><tr><th scope='col'>File</th><th scope='col'>Status</th>"
            f"<th scope='col'>Problem</th></tr></thead><tbody>{rows}</tbody></table></div>{more}</section>")


def group_summary(column: str, documents: list[dict], figures: list[dict], findings: list[dict]) -> list[dict]:
    """Per value of a manifest column: documents, figures, flagged figures, findings and the rates."""
    value_of = {d["document_id"]: str((d.get("manifest") or {}).get(column, "") or "") for d in documents}
    rows: dict[str, dict] = defaultdict(lambda: {"documents": 0, "figures": 0, "flagged": set(), "findings": 0})
    for doc in documents:
        rows[value_of[doc["document_id"]]]["documents"] += 1
    for figure in figures:
        rows[value_of.get(figure["document_id"], "")]["figures"] += 1
    for finding in findings:
        row = rows[value_of.get(finding["document_id"], "")]
        row["findings"] += 1
        row["flagged"].add(finding["figure_id"])
    summary = []
    for value, row in rows.items():
        figures_n = row["figures"]
        summary.append({"value": value, "documents": row["documents"], "figures": figures_n,
                        "flagged": len(row["flagged"]), "findings": row["findings"],
                        "per_figure": row["findings"] / figures_n if figures_n else 0.0,
                        "flagged_share": len(row["flagged"]) / figures_n if figures_n else 0.0})
    return sorted(summary, key=lambda r: (-r["per_figure"], r["value"]))


def _groups(manifest_columns: list[str], documents: list[dict], figures: list[dict], findings: list[dict]) -> str:
    sections = []
    for column in manifest_columns:
        summary = group_summary(column, documents, figures, findings)
        if not summary:
            continue
        bars = [Bar(r["value"] or "(none)", round(r["per_figure"], 2),
                    _group_link(column, r["value"], with_findings=True),
                    f"{r['per_figure']:.2f} ({r['findings']:,} / {r['figures']:,})")
                for r in summary if r["figures"]]
        heading = f"Findings per figure by {column}"
        chart = bar_chart(heading, bars, "findings per figure", integer=False) if bars else ""
        rows = "".join(
            f"<tr><th scope='row'><a href='{_e(_group_link(column, r['value']))}'>"
            f"{_e(r['value'] or '(none)')}</a></th><td class='num'>{r['documents']:,}</td>"
            f"<td class='num'>{r['figures']:,}</td><td class='num'>{r['flagged']:,}</td>"
            f"<td class='num'>{r['flagged_share']:.0%}</td><td class='num'>{r['findings']:,}</td>"
            f"<td class='num'>{r['per_figure']:.2f}</td></tr>" for r in summary)
        table = ("<div class='table-wrap'><table><thead><tr>"
                 f"<th scope='col'>{_e(column)}</th><th scope='col' class='num'>Documents</th>"
                 "<th scope='col' class='num'>Figures</th><th scope='col' class='num'>With findings</th>"
                 "<th scope='col' class='num'>Share</th><th scope='col' class='num'>Findings</th>"
                 f"<th scope='col' class='num'>Per figure</th></tr></thead><tbody>{rows}</tbody></table></div>")
        sections.append(f"<section class='panel group-panel' aria-label='{_e(heading)}'>"
                        f"<figure class='chart-panel'><figcaption><h3>{_e(heading)}</h3></figcaption>{chart}"
                        "</figure>" + table + "</section>")
    if not sections:
        return ""
    return ("<section aria-labelledby='groups-h'><h2 id='groups-h'>By group</h2><p class='muted'>Rates "
            "(findings per figure, share of figures with findings) let groups of different sizes be compared."
            "</p>" + "".join(sections) + "</section>")


def render_overview(documents: list[dict], figures: list[dict], findings: list[dict],
                    manifest_columns: list[str]) -> str:
    charts = overview_charts(documents, figures, findings)
    chart_html = "".join(_chart_panel(heading, svg) for heading, svg in charts)
    return ("<section aria-labelledby='glance-h'><h2 id='glance-h' class='visually-hidden'>At a glance</h2>"
            f"{_tiles(documents, figures, findings)}</section>{_unreadable(documents)}"
            "<div class='overview-grid'><section class='panel' aria-labelledby='rank-h'><h2 id='rank-h'>"
            f"Where to start</h2>{_document_ranking(documents, findings)}</section>"
            f"<section class='charts' aria-label='Summary charts'>{chart_html}</section></div>"
            + _groups(manifest_columns, documents, figures, findings))


def render_rules() -> str:
    items = []
    for rule in all_rules():
        applies = "any chart" if rule.applies_to == ("*",) else ", ".join(rule.applies_to)
        options = "".join(f"<li><code>{_e(o.key)} = {_e(o.default)}</code>: {_e(o.help)} "
                          f"<span class='muted'>(source: {_e(o.source)})</span></li>" for o in rule.options)
        items.append(
            f"<article class='panel rule' id='rule-{_e(rule.id)}'><h3><code>{_e(rule.id)}</code> "
            f"{_severity_badge(rule.severity)}{' <span class=tag>preview</span>' if rule.status != 'stable' else ''}"
            f"</h3><p class='muted'>Applies to {_e(applies)}; sources: {_e(', '.join(rule.sources))}.</p>"
            f"<p><strong>Why it matters.</strong> {_e(rule.rationale)}</p>"
            f"<p><strong>Suggested fix.</strong> {_e(rule.fix)}</p>"
            f"<p><strong>Fails:</strong> {_e(rule.problem)} <strong>Better:</strong> {_e(rule.better)}</p>"
            f"<p class='muted'><strong>Limits.</strong> {_e(rule.limitations)}</p>"
            + (f"<p><strong>Thresholds</strong></p><ul>{options}</ul>" if options else "")
            + f"<p><a href='{_e(_figure_link({'rule': rule.id}))}'>Figures with this finding</a></p></article>")
    return "".join(items)


# ---------------------------------------------------------------- page assembly

def _template(name: str) -> str:
    return (TEMPLATES / name).read_text(encoding="utf-8")


def _script_hash(script: str) -> str:
    return "sha256-" + base64.b64encode(hashlib.sha256(script.encode("utf-8")).digest()).decode("ascii")


def render_report(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict],
                  manifest_columns: list[str], letters: bool = True) -> str:
    script = _template("dashboard.js")
    payload = build_payload(out_dir, documents, figures, findings, manifest_columns, letters)
    parts = {
        # Only this page's own script may run: a hash, not 'unsafe-inline', so that markup
        # slipped into the page (an onerror attribute, a stray <script>) stays inert.
        "csp": f"default-src 'none'; script-src '{_script_hash(script)}'; style-src 'unsafe-inline'; "
               "img-src 'self' data:; base-uri 'none'; form-action 'none'",
        "style": _template("dashboard.css"),
        "script": script,
        "version": _e(__version__),
        "advisory": _e(ADVISORY),
        "summary": _e(f"{len(documents):,} documents, {len(figures):,} figures, {len(findings):,} findings"),
        "overview": render_overview(documents, figures, findings, manifest_columns),
        "rules": render_rules(),
        "data": json_for_script(payload),
    }
    # One pass: text put in by one placeholder is never scanned for another.
    return re.sub(r"\{\{(\w+)\}\}", lambda m: parts[m.group(1)], _template("dashboard.html"))


def write_report(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict],
                 manifest_columns: list[str], *, letters: bool = True) -> Path:
    """Write report.html and (unless letters=False) the feedback letters, letters/<document_id>.html and .md."""
    if letters:
        write_letters(out_dir, documents, figures, findings)
    path = out_dir / "report.html"
    write_atomic(path, render_report(out_dir, documents, figures, findings, manifest_columns, letters))
    return path
