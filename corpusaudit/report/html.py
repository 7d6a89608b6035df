"""report.html: a self-contained page (no network) listing documents, figures and findings.

Every string that comes from a document (file names, captions, messages quoting text)
goes through html.escape before it reaches the page.
"""

from __future__ import annotations

from collections import Counter
from html import escape
from pathlib import Path

from corpusaudit import __version__
from corpusaudit.report import write_atomic

ADVISORY = ("Findings are advice, not verdicts: each one points at a place where a figure may depart from "
            "well-established practice. A person reviews every finding before anything is decided about an "
            "author or a submission.")

STYLE = """
body{font-family:system-ui,sans-serif;margin:0 auto;max-width:1200px;padding:1rem;color:#1a1a1a;background:#fff}
h1{font-size:1.5rem}h2{font-size:1.2rem;margin-top:2rem}
.note{background:#f3f3f3;border-left:4px solid #555;padding:.6rem 1rem}
table{border-collapse:collapse;width:100%;font-size:.9rem}th,td{border-bottom:1px solid #ccc;padding:.3rem .5rem;text-align:left;vertical-align:top}
.cards{display:grid;grid-template-columns:repeat(auto-fill,minmax(260px,1fr));gap:1rem}
.card{border:1px solid #bbb;border-radius:4px;padding:.5rem}.card img{max-width:100%;height:auto;display:block;margin:auto}
.sev-error{color:#a50000;font-weight:bold}.sev-warning{color:#7a4a00;font-weight:bold}.sev-info{color:#1f4e79}
.status-error,.status-timeout{color:#a50000;font-weight:bold}.status-skipped{color:#555}
"""


def _e(value: object) -> str:
    return escape("" if value is None else str(value), quote=True)


def _document_table(documents: list[dict]) -> str:
    rows = "".join(
        f"<tr><td>{_e(d['path'])}</td><td class='status-{_e(d['status'])}'>{_e(d['status'])}</td>"
        f"<td>{_e(d['pages'])}</td><td>{_e(d['figures'])}</td><td>{_e(d['findings'])}</td><td>{_e(d['error'])}</td></tr>"
        for d in sorted(documents, key=lambda d: (-(d["findings"] or 0), d["path"])))
    return ("<table><thead><tr><th scope='col'>Document</th><th scope='col'>Status</th><th scope='col'>Pages</th>"
            "<th scope='col'>Figures</th><th scope='col'>Findings</th><th scope='col'>Problem</th></tr></thead>"
            f"<tbody>{rows}</tbody></table>")


def _figure_card(figure: dict, findings: list[dict]) -> str:
    kind = figure["chart_type"] or "unlabelled"
    if figure["chart_type"] and figure["confidence"] is not None:
        kind += f" ({figure['confidence']:.2f}{', low confidence' if figure.get('low_confidence') else ''})"
    items = "".join(
        f"<li><span class='sev-{_e(f['severity'])}'>{_e(f['severity'])}</span> {_e(f['rule'])}: {_e(f['message'])}</li>"
        for f in findings) or "<li>No findings.</li>"
    alt = f"{kind} figure, {len(findings)} finding(s)"
    image = (f"<img src='{_e(figure['thumbnail'])}' alt='{_e(alt)}' loading='lazy'>" if figure["thumbnail"] else "")
    unmeasured = (f"<p>Could not measure: {_e(figure['unmeasured'].replace(';', ', '))}</p>"
                  if figure["unmeasured"] else "")
    caption = f"<p><em>{_e(figure['caption'])}</em></p>" if figure["caption"] else ""
    return (f"<article class='card' id='{_e(figure['figure_id'])}'>{image}"
            f"<p><strong>{_e(figure['path'])}</strong>, page {_e(figure['page'])} · {_e(figure['source'])} · {_e(kind)}</p>"
            f"{caption}<ul>{items}</ul>{unmeasured}</article>")


def render_report(documents: list[dict], figures: list[dict], findings: list[dict],
                  manifest_columns: list[str]) -> str:
    by_figure: dict[str, list[dict]] = {}
    for finding in findings:
        by_figure.setdefault(finding["figure_id"], []).append(finding)
    statuses = Counter(d["status"] for d in documents)
    severities = Counter(f["severity"] for f in findings)
    rules = Counter(f["rule"] for f in findings)
    rule_rows = "".join(f"<tr><td>{_e(rule)}</td><td>{count}</td></tr>" for rule, count in rules.most_common())
    cards = "".join(_figure_card(fig, by_figure.get(fig["figure_id"], [])) for fig in figures)
    summary = (f"{len(documents)} documents ({', '.join(f'{n} {s}' for s, n in sorted(statuses.items()))}); "
               f"{len(figures)} figures; {len(findings)} findings "
               f"({', '.join(f'{severities[s]} {s}' for s in ('error', 'warning', 'info') if severities[s])})")
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src 'self' data:; style-src 'unsafe-inline'">
<title>corpusaudit report</title><style>{STYLE}</style></head>
<body><main>
<h1>corpusaudit report</h1>
<p class="note" role="note">{_e(ADVISORY)}</p>
<p>{_e(summary)}</p>
<h2>Findings by rule</h2>
<table><thead><tr><th scope="col">Rule</th><th scope="col">Findings</th></tr></thead><tbody>{rule_rows}</tbody></table>
<h2>Documents</h2>{_document_table(documents)}
<h2>Figures</h2><div class="cards">{cards}</div>
<footer><p>corpusaudit {_e(__version__)}</p></footer>
</main></body></html>
"""


def write_report(out_dir: Path, documents: list[dict], figures: list[dict], findings: list[dict],
                 manifest_columns: list[str]) -> Path:
    path = out_dir / "report.html"
    write_atomic(path, render_report(documents, figures, findings, manifest_columns))
    return path
