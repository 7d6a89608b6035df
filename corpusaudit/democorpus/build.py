"""Assemble the sample corpus: PDF reports of an invented institute, loose figure files and truth.

Every figure is a ChartSpec placed either as vector (the matplotlib PDF page shown as a form
XObject, so its paths and text stay vector) or as raster (PNG/JPEG pixels placed as an image).
truth.json records, per figure, where it lies, how it was placed and which rules it should
trigger; sample_corpus/README.md documents the format.

All output is byte-reproducible: matplotlib writes no dates, PIL no timestamps, and PyMuPDF
saves with fixed metadata and without a random /ID (no_new_id).
"""

from __future__ import annotations

import csv
import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pymupdf

from corpusaudit.democorpus import scenario
from corpusaudit.democorpus.charts import (
    ChartSpec,
    drawn,
    encode_raster,
    expected_rules,
    properties,
    render_rgba,
    save_pdf,
)
from corpusaudit.democorpus.scenario import ORGANISATION, DocumentPlan, ImagePlan, Placement

PAGE_W, PAGE_H = 595.0, 842.0  # A4 in points, rounded so layout coordinates stay simple
MARGIN = 60.0
BODY_PT, CAPTION_PT, TITLE_PT = 10.0, 9.0, 16.0
GAP = 10.0
FIXED_DATE = "D:20240301120000Z"
TRUNCATED_NAME = "deposit-incomplete.pdf"
TRUNCATED_FRACTION = 0.6
LINE_ART = frozenset({"bar", "pie", "line", "area", "scatter", "box", "histogram", "heatmap", "map"})


class RenderCache:
    """Rendered chart bytes keyed by spec and format, so repeated placements cost nothing.

    Rendering is idempotent (charts.draw freezes the layout), so one cache can serve every
    build in a process: the bytes are the same as a fresh render.
    """

    def __init__(self) -> None:
        self._pdf: dict[ChartSpec, bytes] = {}
        self._raster: dict[tuple, list[tuple[bytes, tuple[int, int]]]] = {}

    def pdf(self, spec: ChartSpec) -> bytes:
        if spec not in self._pdf:
            self._pdf[spec] = save_pdf(drawn(spec))
        return self._pdf[spec]

    def raster(self, spec: ChartSpec, fmt: str, dpi: int, tiles: int = 1) -> list[tuple[bytes, tuple[int, int]]]:
        """Encoded strips (top to bottom) with their pixel size (w, h)."""
        key = (spec, fmt, dpi, tiles)
        if key not in self._raster:
            pixels = render_rgba(drawn(spec), dpi)
            edges = np.linspace(0, pixels.shape[0], tiles + 1).round().astype(int)
            self._raster[key] = [
                (encode_raster(np.ascontiguousarray(pixels[a:b]), fmt, dpi), (int(pixels.shape[1]), int(b - a)))
                for a, b in zip(edges[:-1], edges[1:])
            ]
        return self._raster[key]


SHARED_CACHE = RenderCache()


def _round_box(rect: pymupdf.Rect) -> list[float]:
    return [round(v, 3) for v in (rect.x0, rect.y0, rect.x1, rect.y1)]


def _placement_truth(p: Placement, page: int, rect: pymupdf.Rect, caption: str, pixel_size) -> dict:
    spec = p.spec
    rules = set(expected_rules(spec, p.scale))
    props = properties(spec, p.scale) | {"scale": p.scale}
    if p.source == "raster":
        ppi = pixel_size[0] * 72.0 / rect.width
        props |= {"ppi": round(ppi, 6), "dpi": p.dpi, "format": "jpeg" if p.fmt == "jpeg" else "png",
                  "pixels": list(pixel_size), "tiles": p.tiles, "alpha": p.fmt == "png-alpha"}
        if ppi < 300:
            rules.add("raster-resolution")
        if p.fmt == "jpeg" and spec.chart_type in LINE_ART:
            rules.add("raster-compression")
    if not caption:
        rules.add("caption-missing")
    return {"page": page, "bbox": _round_box(rect), "source": p.source, "chart_type": spec.chart_type,
            "caption": caption, "expected_rules": sorted(rules), "properties": props, "notes": list(spec.notes)}


class _Writer:
    """Flows headings, paragraphs and figures down A4 pages, opening pages as needed."""

    def __init__(self, plan: DocumentPlan, cache: RenderCache) -> None:
        self.plan, self.cache = plan, cache
        self.doc = pymupdf.open()
        self.page: pymupdf.Page | None = None
        self.y = 0.0
        self.figures: list[dict] = []
        self.figure_number = 0

    def new_page(self) -> None:
        self.page = self.doc.new_page(width=PAGE_W, height=PAGE_H)
        self.y = MARGIN

    def text_block(self, text: str, size: float, font: str = "helv", align: int = 0) -> None:
        while True:
            if self.page is None or self.y > PAGE_H - MARGIN - 2 * size:
                self.new_page()
            box = pymupdf.Rect(MARGIN, self.y, PAGE_W - MARGIN, PAGE_H - MARGIN)
            left = self.page.insert_textbox(box, text, fontsize=size, fontname=font, align=align)
            if left >= 0:
                self.y += box.height - left + GAP * 0.6
                return
            if self.y == MARGIN:
                raise ValueError(f"text block does not fit on one page: {text[:40]!r}")
            self.new_page()

    def heading(self, text: str) -> None:
        if self.page is not None and self.y > PAGE_H - MARGIN - 120:
            self.new_page()  # keep a heading with what follows it
        self.y += GAP * 0.5
        self.text_block(text, 12.0, "hebo")

    def paragraph(self, text: str) -> None:
        self.text_block(text, BODY_PT)

    def figure(self, p: Placement) -> None:
        w = p.spec.size_in[0] * 72.0 * p.scale
        h = p.spec.size_in[1] * 72.0 * p.scale
        caption = ""
        if p.caption:
            self.figure_number += 1
            caption = f"Figure {self.figure_number}. {p.caption}"
        needed = h + (GAP + 2.6 * CAPTION_PT if caption else 0)
        if self.page is None or self.y + needed > PAGE_H - MARGIN:
            self.new_page()
        x0 = (PAGE_W - w) / 2
        rect = pymupdf.Rect(x0, self.y, x0 + w, self.y + h)
        pixel_size = None
        if p.source == "vector":
            with pymupdf.open("pdf", self.cache.pdf(p.spec)) as src:
                self.page.show_pdf_page(rect, src, 0, keep_proportion=False)
        elif p.source == "raster":
            strips = self.cache.raster(p.spec, p.fmt, p.dpi, p.tiles)
            total_h = sum(size[1] for _, size in strips)
            top = rect.y0
            for data, (sw, sh) in strips:
                strip = pymupdf.Rect(rect.x0, top, rect.x1, top + rect.height * sh / total_h)
                self.page.insert_image(strip, stream=data, keep_proportion=False)
                top = strip.y1
            pixel_size = (strips[0][1][0], total_h)
        else:
            raise ValueError(f"unknown placement source {p.source!r}")
        self.y = rect.y1 + GAP * 0.6
        if caption:
            box = pymupdf.Rect(rect.x0, self.y, rect.x1, self.y + 3 * CAPTION_PT * 1.3)
            left = self.page.insert_textbox(box, caption, fontsize=CAPTION_PT, fontname="helv")
            if left < 0:
                raise ValueError(f"caption too long: {caption!r}")
            self.y += box.height - left
        self.y += GAP * 1.5
        self.figures.append(_placement_truth(p, self.page.number + 1, rect, caption, pixel_size))

    def finish(self) -> bytes:
        total = self.doc.page_count
        for page in self.doc:
            footer = pymupdf.Rect(MARGIN, PAGE_H - MARGIN + 18, PAGE_W - MARGIN, PAGE_H - MARGIN + 34)
            page.insert_textbox(footer, f"{ORGANISATION} | {self.plan.title} | page {page.number + 1} of {total}",
                                fontsize=7.5, fontname="helv", color=(0.25, 0.25, 0.25), align=1)
        self.doc.set_metadata({
            "title": self.plan.title, "author": self.plan.author, "subject": self.plan.department,
            "creator": ORGANISATION, "producer": "corpusaudit democorpus", "keywords": "",
            "creationDate": FIXED_DATE, "modDate": FIXED_DATE,
        })
        data = self.doc.tobytes(garbage=3, deflate=True, no_new_id=True)
        self.doc.close()
        return data


def write_document(plan: DocumentPlan, cache: RenderCache) -> tuple[bytes, list[dict], int]:
    """The PDF bytes of a plan, its figure truth and its page count."""
    writer = _Writer(plan, cache)
    writer.new_page()
    writer.text_block(plan.title, TITLE_PT, "hebo")
    writer.text_block(f"{ORGANISATION} | {plan.department} | {plan.year} | {plan.author}", 9.0)
    for block in plan.blocks:
        if isinstance(block, Placement):
            writer.figure(block)
        elif isinstance(block, tuple) and block[0] == "h":
            writer.heading(block[1])
        else:
            writer.paragraph(block)
    pages = writer.doc.page_count
    return writer.finish(), writer.figures, pages


def _image_truth(plan: ImagePlan, cache: RenderCache) -> tuple[bytes, dict]:
    [(data, (w, h))] = cache.raster(plan.spec, plan.fmt, plan.dpi)
    props = properties(plan.spec) | {"dpi": plan.dpi, "format": "jpeg" if plan.fmt == "jpeg" else "png",
                                    "pixels": [w, h]}
    figure = {"page": 1, "bbox": [0, 0, w, h], "source": "image", "chart_type": plan.spec.chart_type,
              "caption": "", "expected_rules": sorted(expected_rules(plan.spec)), "properties": props,
              "notes": list(plan.spec.notes)}
    kind = "jpeg" if plan.fmt == "jpeg" else "png"
    return data, {"path": plan.name, "kind": kind, "expect_status": "ok", "department": plan.department,
                  "year": plan.year, "pages": 1, "figures": [figure]}


def _write_outputs(out_dir: Path, entries: list[dict]) -> Path:
    with open(out_dir / "manifest.csv", "w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh, lineterminator="\n")
        writer.writerow(["path", "department", "year"])
        for entry in entries:
            writer.writerow([entry["path"], entry["department"], entry["year"]])
    truth = out_dir / "truth.json"
    truth.write_text(json.dumps({"organisation": ORGANISATION, "documents": entries}, indent=1) + "\n",
                     encoding="utf-8")
    return truth


def _write_plans(out_dir: Path, plans: list[DocumentPlan], images: list[ImagePlan],
                 cache: RenderCache) -> tuple[list[dict], dict[str, bytes]]:
    entries: list[dict] = []
    written: dict[str, bytes] = {}
    for plan in plans:
        data, figures, pages = write_document(plan, cache)
        (out_dir / plan.name).write_bytes(data)
        written[plan.name] = data
        entries.append({"path": plan.name, "kind": "pdf", "expect_status": "ok", "department": plan.department,
                        "year": plan.year, "pages": pages, "figures": figures})
    for image in images:
        data, entry = _image_truth(image, cache)
        target = out_dir / image.name
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_bytes(data)
        entries.append(entry)
    return entries, written


def _write_truncated(out_dir: Path, written: dict[str, bytes]) -> dict:
    """An interrupted upload: the head of a report saved with object streams (PDF 1.5 layout).

    With object streams the page dictionaries sit in a compressed stream near the end of the
    file, so the head alone holds no readable page (a plainly laid-out PDF would be repaired).
    """
    source = scenario.TRUNCATED_FROM
    data = written.get(source)
    if data is None:
        data = write_document(next(p for p in scenario.sample_plans() if p.name == source), SHARED_CACHE)[0]
    with pymupdf.open("pdf", data) as pdf:
        layered = pdf.tobytes(garbage=3, deflate=True, no_new_id=True, use_objstms=1)
    (out_dir / TRUNCATED_NAME).write_bytes(layered[: int(len(layered) * TRUNCATED_FRACTION)])
    return {"path": TRUNCATED_NAME, "kind": "pdf", "expect_status": "error", "department": "Records",
            "year": 2023, "pages": 0, "figures": [],
            "note": f"first {TRUNCATED_FRACTION:.0%} of {source} saved with object streams"}


def build_sample_corpus(out_dir: Path, documents: list[str] | None = None) -> Path:
    """Write the curated sample corpus into out_dir and return the path of its truth.json.

    documents restricts the build to those file names (a quicker partial build for tests);
    None writes everything, including the truncated PDF.
    """
    out_dir = Path(out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    plans, images = scenario.sample_plans(), scenario.sample_images()
    if documents is not None:
        wanted = set(documents)
        plans = [p for p in plans if p.name in wanted]
        images = [i for i in images if i.name in wanted]
    entries, written = _write_plans(out_dir, plans, images, SHARED_CACHE)
    if documents is None or TRUNCATED_NAME in documents:
        entries.append(_write_truncated(out_dir, written))
    return _write_outputs(out_dir, entries)


def build_corpus(out_dir: Path, n_documents: int, seed: int = 0) -> Path:
    """Write n small sample-style PDFs (for throughput benchmarks) and return their truth.json.

    Each document has two to four figures drawn from the sample corpus' placements, so the
    charts are rendered once and reused; documents differ in text, choice and order.
    """
    out_dir = Path(out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    rng = np.random.default_rng(seed)
    pool = [b for plan in scenario.sample_plans() for b in plan.blocks if isinstance(b, Placement)]
    plans = []
    for i in range(n_documents):
        department = scenario.DEPARTMENTS[int(rng.integers(len(scenario.DEPARTMENTS)))]
        year = int(rng.integers(2019, 2025))
        blocks: list = [scenario.filler_paragraph(rng)]
        for k in rng.choice(len(pool), size=int(rng.integers(2, 5)), replace=False):
            chosen = pool[int(k)]
            captioned = rng.random() < 0.8
            blocks.append(replace(chosen, caption=chosen.caption or scenario.generic_caption(chosen.spec))
                          if captioned else replace(chosen, caption=""))
            blocks.append(scenario.filler_paragraph(rng))
        plans.append(DocumentPlan(name=f"doc-{i + 1:05d}.pdf", department=department, year=year,
                                  title=f"{department} working paper {year}-{i + 1:03d}",
                                  author=scenario.person(rng), blocks=tuple(blocks)))
    entries, _ = _write_plans(out_dir, plans, [], SHARED_CACHE)
    return _write_outputs(out_dir, entries)


