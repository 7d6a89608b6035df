"""A truth corpus for figure extraction: multi-page PDFs with known figure boxes and captions.

Two producers lay out the same kinds of pages: reportlab (its canvas draws text, tables,
captions, images and its own vector charts) and PyMuPDF (text, matplotlib PDF charts placed
as forms, images). Pages vary: one or two columns, margins, header logos, tables, rotated
(90, 180 and 270) and cropped pages, tiled images, images drawn twice, multi-panel figures (some
labelled (a) and (b)), bar charts clipped at a raised axis, and scanned-looking
pages (a page rendered to an image with light noise and re-embedded, sometimes with an
invisible OCR text layer). Everything is invented and built from a fixed seed.

Truth boxes are in displayed-page points, top-left origin (PyMuPDF's convention).
"""

from __future__ import annotations

import io
import json
from dataclasses import asdict, dataclass, field
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

import matplotlib.style
import numpy as np
import pymupdf
from matplotlib.figure import Figure as MplFigure
from PIL import Image

WORDS = ("basin survey river delta yield index sample station panel flux cohort measure regional "
         "annual growth northern coastal harvest rate variance model estimate trend observed "
         "segment baseline total median upper lower field plot report quarter sector").split()
MPL_STYLES = ("default", "ggplot", "seaborn-v0_8-whitegrid", "bmh", "classic", "grayscale", "fast")
CAPTION_STYLES = ("Figure {n}. ", "Fig. {n}: ", "Figure {n}: ", "Chart {n}. ", "Graph {n} - ", "FIGURE {n}. ")


@dataclass
class TruthFigure:
    box: tuple[float, float, float, float]  # displayed page points
    source: str  # raster | vector | scan
    caption_number: str = ""  # "" when the figure has no caption
    kind: str = ""


@dataclass
class TruthDocument:
    name: str
    producer: str
    pages: list[list[TruthFigure]] = field(default_factory=list)


# ---------------------------------------------------------------- content generators

def sentence(rng, words: int) -> str:
    text = " ".join(rng.choice(WORDS) for _ in range(words))
    return text[0].upper() + text[1:] + "."


def paragraph_lines(rng, width_pt: float, size: float, lines: int) -> list[str]:
    """Lines that fit width_pt in Helvetica/Times at size (measured, so text never crosses a column)."""
    out = []
    for _ in range(lines):
        line = rng.choice(WORDS)
        while True:
            longer = line + " " + rng.choice(WORDS)
            if pymupdf.get_text_length(longer, "helv", size) > width_pt - 4:
                break
            line = longer
        out.append(line)
    return out


def mpl_chart(rng, width_in: float, height_in: float, kind: str | None = None, heatmap: bool = False) -> MplFigure:
    style = MPL_STYLES[int(rng.integers(len(MPL_STYLES)))]
    with matplotlib.style.context(style):
        fig = MplFigure(figsize=(width_in, height_in))
        ax = fig.add_subplot(111)
        kind = kind or rng.choice(["bar", "line", "scatter", "pie", "hist", "box", "area", "barh"])
        n = int(rng.integers(3, 8))
        labels = [rng.choice(WORDS)[:6] + str(i) for i in range(n)]
        if heatmap:
            im = ax.imshow(rng.random((int(rng.integers(6, 20)), int(rng.integers(6, 20)))),
                           cmap=rng.choice(["viridis", "magma", "coolwarm"]), aspect="auto")
            fig.colorbar(im, ax=ax)
        elif kind == "bar":
            values = rng.uniform(1, 10, n)
            ax.bar(labels, values, color=f"C{int(rng.integers(6))}")
            if rng.random() < 0.3:  # a raised value axis: the bars are drawn from 0 and clipped at the axes
                ax.set_ylim(0.8 * float(values.min()), None)
        elif kind == "barh":
            ax.barh(labels, rng.uniform(1, 10, n))
        elif kind == "line":
            for s in range(int(rng.integers(1, 4))):
                ax.plot(np.arange(12), np.cumsum(rng.normal(0, 1, 12)), label=f"series {s}")
            ax.legend(loc=rng.choice(["upper left", "lower right", "best"]))
        elif kind == "scatter":
            ax.scatter(rng.normal(0, 1, 80), rng.normal(0, 1, 80), s=10)
        elif kind == "pie":
            ax.pie(rng.uniform(1, 5, n), labels=labels)
        elif kind == "hist":
            ax.hist(rng.normal(0, 1, 300), bins=int(rng.integers(8, 25)))
        elif kind == "box":
            ax.boxplot([rng.normal(i, 1, 40) for i in range(n)])
        else:
            ax.stackplot(np.arange(10), rng.uniform(1, 3, (3, 10)))
        if rng.random() < 0.5 and kind != "pie":
            ax.set_xlabel(rng.choice(WORDS))
            ax.set_ylabel(rng.choice(WORDS))
            for label in ax.get_xticklabels():
                label.set_rotation(float(rng.choice([0, 45, 90])))
        if rng.random() < 0.5:
            ax.set_title(sentence(rng, 3)[:-1])
    return fig


def mpl_pdf(fig: MplFigure, rng) -> bytes:
    buffer = io.BytesIO()
    with matplotlib.rc_context({"pdf.fonttype": int(rng.choice([3, 42]))}):
        fig.savefig(buffer, format="pdf", bbox_inches="tight", pad_inches=float(rng.uniform(0.02, 0.12)),
                    transparent=bool(rng.random() < 0.25))
    return buffer.getvalue()


def mpl_png(fig: MplFigure, dpi: int) -> bytes:
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=dpi, bbox_inches="tight", pad_inches=0.05, facecolor="white")
    return buffer.getvalue()


def photo(rng, width: int, height: int) -> np.ndarray:
    """A smooth, photo-like picture: blurred colour noise plus gradients."""
    small = rng.random((max(height // 16, 2), max(width // 16, 2), 3))
    image = np.asarray(Image.fromarray((small * 255).astype(np.uint8)).resize((width, height), Image.BICUBIC), float)
    ramp = np.linspace(0, 60, width)[None, :, None]
    return np.clip(image * 0.7 + ramp + rng.normal(0, 6, image.shape), 0, 255).astype(np.uint8)


def encode(pixels: np.ndarray, fmt: str, mode: str = "RGB") -> bytes:
    buffer = io.BytesIO()
    image = Image.fromarray(pixels)
    if mode != "RGB":
        image = image.convert(mode)
    image.save(buffer, fmt, **({"quality": 88} if fmt == "JPEG" else {}))
    return buffer.getvalue()


def png_size(data: bytes) -> tuple[int, int]:
    with Image.open(io.BytesIO(data)) as image:
        return image.size


# ---------------------------------------------------------------- page plan

@dataclass
class Item:
    kind: str  # text | caption | table | figure
    box: tuple[float, float, float, float]  # unrotated page points, top-left origin
    lines: list[str] = field(default_factory=list)
    size: float = 10.0
    figure: str = ""  # figure kind
    payload: dict = field(default_factory=dict)
    truth: TruthFigure | None = None


@dataclass
class PagePlan:
    width: float
    height: float
    items: list[Item] = field(default_factory=list)
    rotation: int = 0
    crop: tuple[float, float, float, float] | None = None
    logo: bool = False
    text_layer: bool = True  # False for a scan without an OCR layer: no caption can be read


FIGURE_KINDS_RL = ("raster_chart", "photo", "rl_vector", "rl_vector", "tiles", "alpha", "rl_mixed", "multipanel",
                   "twice", "cmyk", "grey")
FIGURE_KINDS_MU = ("raster_chart", "photo", "mpl_vector", "mpl_vector", "mpl_vector", "tiles", "alpha",
                   "mpl_mixed", "multipanel", "twice", "grey")


def plan_document(rng, producer: str, scan: bool) -> list[PagePlan]:
    pages = []
    count = int(rng.integers(2, 5))
    logo = producer == "rl" and count >= 3 and rng.random() < 0.7
    counter = [0]
    width, height = (612.0, 792.0) if rng.random() < 0.6 else (595.0, 842.0)
    for p in range(count):
        plan = PagePlan(width, height, logo=logo)
        margin = float(rng.uniform(50, 80))
        columns = 2 if rng.random() < 0.35 else 1
        gutter = float(rng.uniform(16, 28))
        col_w = (width - 2 * margin - (columns - 1) * gutter) / columns
        top = margin + (30 if logo else 0)
        for c in range(columns):
            x0 = margin + c * (col_w + gutter)
            y = top
            while True:
                roll = rng.random()
                if roll < 0.45:
                    kind = "figure"
                elif roll < 0.55 and not scan:
                    kind = "table"
                else:
                    kind = "text"
                added = _place(rng, plan, kind, x0, y, col_w, height - margin, producer, scan, counter)
                if added is None:
                    break
                y = added + float(rng.uniform(10, 20))
        if not scan and rng.random() < 0.15:
            plan.rotation = int(rng.choice([90, 180, 270]))
        elif not scan and producer == "mu" and rng.random() < 0.15:
            plan.crop = (20.0, 25.0, width - 15.0, height - 20.0)
        pages.append(plan)
    return pages


def _place(rng, plan: PagePlan, kind: str, x0: float, y: float, col_w: float, bottom: float, producer: str,
           scan: bool, counter: list[int]) -> float | None:
    if kind == "text":
        size = float(rng.uniform(9, 11))
        lines = paragraph_lines(rng, col_w, size, int(rng.integers(2, 7)))
        h = len(lines) * size * 1.3
        if y + h > bottom:
            return None
        plan.items.append(Item("text", (x0, y, x0 + col_w, y + h), lines, size))
        return y + h
    if kind == "table":
        rows, cols = int(rng.integers(3, 7)), int(rng.integers(3, 6))
        h = rows * 16.0
        w = min(col_w, cols * float(rng.uniform(50, 80)))
        if y + h > bottom:
            return None
        cells = [[rng.choice(WORDS)[:7] if r == 0 else f"{rng.uniform(0, 100):.1f}" for _ in range(cols)]
                 for r in range(rows)]
        plan.items.append(Item("table", (x0, y, x0 + w, y + h), payload={"cells": cells,
                                                                       "style": rng.choice(["grid", "shaded", "rules"])}))
        return y + h
    kinds = FIGURE_KINDS_RL if producer == "rl" else FIGURE_KINDS_MU
    if scan:
        kinds = ("raster_chart", "photo", "mpl_vector", "rl_vector") if producer == "mu" else ("raster_chart", "photo", "rl_vector")
    figure = kinds[int(rng.integers(len(kinds)))]
    w = float(min(col_w, rng.uniform(150, 380)))
    aspect = float(rng.uniform(0.5, 0.85))
    h = w * aspect
    captioned = rng.random() < 0.8
    cap_size = float(rng.uniform(8, 10))
    caption_lines = []
    if captioned:
        counter[0] += 1
        style = CAPTION_STYLES[int(rng.integers(len(CAPTION_STYLES)))]
        label = style.format(n=counter[0])
        caption_lines = paragraph_lines(rng, col_w - pymupdf.get_text_length(label, "helv", cap_size), cap_size,
                                        int(rng.integers(1, 3)))
        caption_lines[0] = label + caption_lines[0]
    cap_h = len(caption_lines) * cap_size * 1.25
    cap_gap = float(rng.uniform(7, 14))
    above = captioned and rng.random() < 0.15
    total = h + (cap_gap + cap_h if captioned else 0)
    if figure == "twice":
        total = 2 * h + 12 + (cap_gap + cap_h if captioned else 0)
    if y + total > bottom:
        return None
    fx0 = x0 + float(rng.uniform(0, max(col_w - w, 0)))
    fy = y + (cap_h + cap_gap if above else 0)
    number = str(counter[0]) if captioned else ""
    source = "scan" if scan else ("vector" if figure in ("mpl_vector", "rl_vector") else "raster")
    if figure == "twice":  # two figures; a caption above the pair is the upper copy's, one below the lower's
        first = Item("figure", (fx0, fy, fx0 + w, fy + h), figure=figure, payload={"copy": 0},
                     truth=TruthFigure((fx0, fy, fx0 + w, fy + h), source, number if above else "", figure))
        plan.items.append(first)
        fy += h + 12
        number = "" if above else number
    if figure == "multipanel" and not captioned:
        # two panels without a caption to tie them: two figures
        half = (w - 8) / 2
        plan.items.append(Item("figure", (fx0, fy, fx0 + w, fy + h), figure=figure, payload={"gap": 8.0},
                               truth=TruthFigure((fx0, fy, fx0 + half, fy + h), source, "", figure)))
        item = Item("truth", (fx0 + half + 8, fy, fx0 + w, fy + h),
                    truth=TruthFigure((fx0 + half + 8, fy, fx0 + w, fy + h), source, "", figure))
    elif figure == "multipanel":
        # one caption: one figure; half of them carry panel letters, and lettered panels may sit further apart
        lettered = rng.random() < 0.5
        gap = float(rng.uniform(8, 22)) if lettered else 8.0
        item = Item("figure", (fx0, fy, fx0 + w, fy + h), figure=figure, payload={"gap": gap, "letters": lettered},
                    truth=TruthFigure((fx0, fy, fx0 + w, fy + h), source, number, figure))
    else:
        item = Item("figure", (fx0, fy, fx0 + w, fy + h), figure=figure,
                    truth=TruthFigure((fx0, fy, fx0 + w, fy + h), source, number, figure))
    plan.items.append(item)
    if captioned:
        cy = y if above else fy + h + cap_gap
        plan.items.append(Item("caption", (x0, cy, x0 + col_w, cy + cap_h), caption_lines, cap_size))
    return y + total


# ---------------------------------------------------------------- figure payloads

def figure_payload(rng, item: Item) -> dict:
    """Bytes and geometry for one figure; sets the exact truth box where the producer decides it."""
    x0, y0, x1, y1 = item.box
    w, h = x1 - x0, y1 - y0
    kind = item.figure
    if kind in ("raster_chart", "twice", "multipanel", "tiles", "rl_mixed"):
        dpi = int(rng.choice([72, 110, 150, 220, 300]))
        data = mpl_png(mpl_chart(rng, w / 72, h / 72, heatmap=kind == "rl_mixed"), dpi)
        return {"png": data}
    if kind in ("photo", "cmyk", "grey", "alpha"):
        ppi = float(rng.choice([96, 150, 200, 300]))
        pixels = photo(rng, int(w / 72 * ppi), int(h / 72 * ppi))
        if kind == "cmyk":
            return {"jpeg": encode(pixels, "JPEG", "CMYK")}
        if kind == "grey":
            return {"png": encode(pixels, "PNG", "L")}
        if kind == "alpha":
            alpha = np.full(pixels.shape[:2], 255, np.uint8)
            alpha[: pixels.shape[0] // 6] = 120
            return {"png": encode(np.dstack([pixels, alpha]), "PNG")}
        return {"jpeg": encode(pixels, "JPEG")}
    if kind in ("mpl_vector", "mpl_mixed"):
        data = mpl_pdf(mpl_chart(rng, w / 72, h / 72, heatmap=kind == "mpl_mixed"), rng)
        with pymupdf.open("pdf", data) as src:
            sw, sh = src[0].rect.width, src[0].rect.height
        # keep the chart's own aspect: the truth is its placed box
        scale = min(w / sw, h / sh)
        box = (x0, y0, x0 + sw * scale, y0 + sh * scale)
        item.truth.box = box
        return {"pdf": data, "rect": box}
    raise ValueError(kind)


def rl_chart_drawing(rng, w: float, h: float):
    from reportlab.graphics.charts.barcharts import HorizontalBarChart, VerticalBarChart
    from reportlab.graphics.charts.legends import Legend
    from reportlab.graphics.charts.lineplots import LinePlot
    from reportlab.graphics.charts.piecharts import Pie
    from reportlab.graphics.shapes import Drawing, String
    from reportlab.lib import colors

    drawing = Drawing(w, h)
    kind = rng.choice(["vbar", "hbar", "line", "pie"])
    n = int(rng.integers(3, 8))
    palette = [colors.HexColor(c) for c in ("#3a6ea5", "#e07b39", "#5a9e4b", "#b84a62", "#7d5ba6", "#8c8c3e")]
    if kind == "pie":
        chart = Pie()
        size = min(w, h) * 0.7
        chart.x, chart.y, chart.width, chart.height = (w - size) / 2, (h - size) / 2, size, size
        chart.data = [float(v) for v in rng.uniform(1, 6, n)]
        chart.labels = [rng.choice(WORDS)[:6] for _ in range(n)]
        for i in range(n):
            chart.slices[i].fillColor = palette[i % len(palette)]
    elif kind == "line":
        chart = LinePlot()
        chart.x, chart.y, chart.width, chart.height = 40, 30, w - 60, h - 50
        chart.data = [[(i, float(v)) for i, v in enumerate(np.cumsum(rng.normal(0, 1, 10)))]
                      for _ in range(int(rng.integers(1, 4)))]
        for i in range(len(chart.data)):
            chart.lines[i].strokeColor = palette[i]
    else:
        chart = VerticalBarChart() if kind == "vbar" else HorizontalBarChart()
        chart.x, chart.y, chart.width, chart.height = 45, 30, w - 65, h - 50
        chart.data = [tuple(float(v) for v in rng.uniform(1, 10, n))]
        chart.categoryAxis.categoryNames = [rng.choice(WORDS)[:6] for _ in range(n)]
        chart.bars[0].fillColor = palette[int(rng.integers(len(palette)))]
        if kind == "vbar" and rng.random() < 0.5:
            chart.categoryAxis.labels.angle = 45
            chart.categoryAxis.labels.boxAnchor = "ne"
    drawing.add(chart)
    if rng.random() < 0.5:
        drawing.add(String(w / 2, h - 12, sentence(rng, 3)[:-1], textAnchor="middle", fontSize=9))
    if kind == "line" and rng.random() < 0.5:
        legend = Legend()
        legend.x, legend.y = w - 70, h - 25
        legend.colorNamePairs = [(palette[i], f"series {i}") for i in range(len(chart.data))]
        legend.fontSize = 7
        drawing.add(legend)
    return drawing


# ---------------------------------------------------------------- producers

def _tile_boxes(rng, box, pixel_size):
    """Split a picture into abutting tiles: rows x cols, both in points and in pixels."""
    rows, cols = (int(rng.integers(1, 4)), int(rng.integers(1, 3))) if rng.random() < 0.7 else (int(rng.integers(3, 8)), 1)
    rows = max(rows, 2) if cols == 1 else rows
    x0, y0, x1, y1 = box
    pw, ph = pixel_size
    tiles = []
    for r in range(rows):
        for c in range(cols):
            px = (pw * c // cols, ph * r // rows, pw * (c + 1) // cols, ph * (r + 1) // rows)
            pt = (x0 + (x1 - x0) * px[0] / pw, y0 + (y1 - y0) * px[1] / ph,
                  x0 + (x1 - x0) * px[2] / pw, y0 + (y1 - y0) * px[3] / ph)
            tiles.append((pt, px))
    return tiles


def _crop_png(data: bytes, px) -> bytes:
    with Image.open(io.BytesIO(data)) as image:
        buffer = io.BytesIO()
        image.convert("RGB").crop(px).save(buffer, "PNG")
        return buffer.getvalue()


LOGO = None


def logo_png() -> bytes:
    global LOGO
    if LOGO is None:
        pixels = np.full((60, 160, 3), 255, np.uint8)
        pixels[10:50, 10:50] = (30, 90, 160)
        pixels[20:40, 60:150] = (200, 120, 40)
        LOGO = encode(pixels, "PNG")
    return LOGO


def build_reportlab(path: Path, plans: list[PagePlan], rng) -> None:
    from reportlab.graphics import renderPDF
    from reportlab.lib import colors
    from reportlab.lib.utils import ImageReader
    from reportlab.pdfgen import canvas
    from reportlab.platypus import Table, TableStyle

    pdf = canvas.Canvas(str(path), pagesize=(plans[0].width, plans[0].height), invariant=1)
    logo = ImageReader(io.BytesIO(logo_png())) if plans[0].logo else None
    for plan in plans:
        H = plan.height

        def image(data: bytes, box, mask=None):
            x0, y0, x1, y1 = box
            pdf.drawImage(ImageReader(io.BytesIO(data)), x0, H - y1, x1 - x0, y1 - y0, mask=mask)

        pdf.setPageSize((plan.width, plan.height))
        if logo is not None:
            pdf.drawImage(logo, 50, H - 45, 64, 24)
            pdf.setLineWidth(0.5)
            pdf.line(50, H - 50, plan.width - 50, H - 50)
        pdf.setFont("Helvetica", 8)
        pdf.drawString(plan.width / 2, 25, str(pdf.getPageNumber()))
        for item in plan.items:
            x0, y0, x1, y1 = item.box
            if item.kind in ("text", "caption"):
                pdf.setFont("Times-Roman" if item.kind == "text" else "Helvetica", item.size)
                for i, line in enumerate(item.lines):
                    pdf.drawString(x0, H - (y0 + (i + 0.8) * item.size * (1.3 if item.kind == "text" else 1.25)), line)
            elif item.kind == "table":
                cells = item.payload["cells"]
                table = Table(cells, colWidths=[(x1 - x0) / len(cells[0])] * len(cells[0]), rowHeights=[16] * len(cells))
                style = [("FONTSIZE", (0, 0), (-1, -1), 8)]
                if item.payload["style"] == "grid":
                    style.append(("GRID", (0, 0), (-1, -1), 0.5, colors.black))
                elif item.payload["style"] == "shaded":
                    style += [("BACKGROUND", (0, r), (-1, r), colors.HexColor("#dde6f0")) for r in range(0, len(cells), 2)]
                else:
                    style += [("LINEABOVE", (0, 0), (-1, 0), 1, colors.black), ("LINEBELOW", (0, 0), (-1, 0), 0.5, colors.black),
                              ("LINEBELOW", (0, -1), (-1, -1), 1, colors.black)]
                table.setStyle(TableStyle(style))
                table.wrapOn(pdf, x1 - x0, y1 - y0)
                table.drawOn(pdf, x0, H - y1)
            elif item.kind == "figure":  # "truth" items only mark a second panel
                _rl_figure(pdf, item, rng, image, H, renderPDF)
        pdf.showPage()
    pdf.save()
    if any(plan.rotation for plan in plans):  # /Rotate set afterwards: the page content stays as drawn
        with pymupdf.open(path) as doc:
            for plan, page in zip(plans, doc):
                page.set_rotation(plan.rotation)
            doc.saveIncr()


_RL_TWICE: list[bytes] = []


def _rl_figure(pdf, item: Item, rng, image, H, renderPDF) -> None:
    x0, y0, x1, y1 = item.box
    w, h = x1 - x0, y1 - y0
    kind = item.figure
    if kind == "rl_vector":
        drawing = rl_chart_drawing(rng, w, h)
        bx0, by0, bx1, by1 = drawing.getBounds()
        renderPDF.draw(drawing, pdf, x0, H - y1)
        item.truth.box = (x0 + bx0, y1 - by1, x0 + bx1, y1 - by0)
        return
    if kind == "twice":  # reportlab stores identical image data once: one XObject drawn twice
        if item.payload.get("copy") == 0:
            _RL_TWICE[:] = [figure_payload(rng, item)["png"]]
        image(_RL_TWICE[0], item.box)
        return
    payload = figure_payload(rng, item)
    if kind == "rl_mixed":
        # a raster heatmap inside, reportlab axes, ticks and labels around it
        inner = (x0 + 40, y0 + 10, x1 - 10, y1 - 30)
        image(payload["png"], inner)
        pdf.setLineWidth(0.8)
        pdf.rect(inner[0], H - inner[3], inner[2] - inner[0], inner[3] - inner[1])
        pdf.setFont("Helvetica", 7)
        for i in range(5):
            tx = inner[0] + (inner[2] - inner[0]) * i / 4
            pdf.line(tx, H - inner[3], tx, H - inner[3] - 4)
            pdf.drawCentredString(tx, H - inner[3] - 12, str(i * 10))
            ty = inner[1] + (inner[3] - inner[1]) * i / 4
            pdf.line(inner[0], H - ty, inner[0] - 4, H - ty)
            pdf.drawRightString(inner[0] - 6, H - ty - 2, str(40 - i * 10))
        pdf.drawCentredString((inner[0] + inner[2]) / 2, H - inner[3] - 24, rng.choice(WORDS))
        return
    if kind == "tiles":
        size = png_size(payload["png"])
        for pt, px in _tile_boxes(rng, item.box, size):
            image(_crop_png(payload["png"], px), pt)
        return
    if kind == "multipanel":
        gap = item.payload["gap"]
        half = (w - gap) / 2
        second = figure_payload(rng, item)
        image(payload["png"], (x0, y0, x0 + half, y1))
        image(second["png"], (x0 + half + gap, y0, x1, y1))
        if item.payload.get("letters"):  # drawn over the panels' top-left corners
            pdf.setFont("Helvetica-Bold", 9)
            pdf.drawString(x0 + 3, H - (y0 + 10), "(a)")
            pdf.drawString(x0 + half + gap + 3, H - (y0 + 10), "(b)")
        return
    data = payload.get("png") or payload.get("jpeg")
    image(data, item.box, mask="auto" if kind == "alpha" else None)


def build_pymupdf(path: Path, plans: list[PagePlan], rng) -> None:
    doc = pymupdf.open()
    shared: dict[str, int] = {}
    for plan in plans:
        page = doc.new_page(width=plan.width, height=plan.height)
        _mu_items(doc, page, plan, rng, shared)
        if plan.rotation:
            page.set_rotation(plan.rotation)
        if plan.crop:
            page.set_cropbox(pymupdf.Rect(plan.crop))
    doc.save(path, garbage=3, deflate=True)
    doc.close()


def _mu_items(doc, page, plan: PagePlan, rng, shared: dict) -> None:
    for item in plan.items:
        x0, y0, x1, y1 = item.box
        if item.kind in ("text", "caption"):
            lead = 1.3 if item.kind == "text" else 1.25
            for i, line in enumerate(item.lines):
                page.insert_text((x0, y0 + (i + 0.8) * item.size * lead), line, fontsize=item.size,
                                 fontname="tiro" if item.kind == "text" else "helv")
        elif item.kind == "table":
            cells = item.payload["cells"]
            rows, cols = len(cells), len(cells[0])
            cw, rh = (x1 - x0) / cols, (y1 - y0) / rows
            shape = page.new_shape()
            if item.payload["style"] == "grid":
                for r in range(rows + 1):
                    shape.draw_line((x0, y0 + r * rh), (x1, y0 + r * rh))
                for c in range(cols + 1):
                    shape.draw_line((x0 + c * cw, y0), (x0 + c * cw, y1))
                shape.finish(color=(0, 0, 0), width=0.5)
            elif item.payload["style"] == "shaded":
                for r in range(0, rows, 2):
                    shape.draw_rect(pymupdf.Rect(x0, y0 + r * rh, x1, y0 + (r + 1) * rh))
                shape.finish(fill=(0.87, 0.9, 0.94), color=None)
            else:
                for yy in (y0, y0 + rh, y1):
                    shape.draw_line((x0, yy), (x1, yy))
                shape.finish(color=(0, 0, 0), width=0.7)
            shape.commit()
            for r in range(rows):
                for c in range(cols):
                    page.insert_text((x0 + c * cw + 3, y0 + r * rh + 11), cells[r][c], fontsize=8)
        elif item.kind == "figure":
            _mu_figure(doc, page, item, rng, shared)


def _mu_figure(doc, page, item: Item, rng, shared: dict) -> None:
    x0, y0, x1, y1 = item.box
    w = x1 - x0
    kind = item.figure
    if kind == "rl_vector":  # scans only: a reportlab chart rendered through a one-page reportlab PDF
        from reportlab.graphics import renderPDF
        drawing = rl_chart_drawing(rng, w, y1 - y0)
        data = renderPDF.drawToString(drawing)
        bx0, by0, bx1, by1 = drawing.getBounds()
        with pymupdf.open("pdf", data) as src:
            page.show_pdf_page(pymupdf.Rect(item.box), src, 0)
        item.truth.box = (x0 + bx0, y1 - by1, x0 + bx1, y1 - by0)
        return
    if kind == "twice":  # the same image object drawn a second time below the first
        if item.payload.get("copy") == 0:
            payload = figure_payload(rng, item)
            shared["twice"] = page.insert_image(pymupdf.Rect(item.box), stream=payload["png"], keep_proportion=False)
        else:
            page.insert_image(pymupdf.Rect(item.box), xref=shared.pop("twice"), keep_proportion=False)
        return
    payload = figure_payload(rng, item)
    if "pdf" in payload:
        with pymupdf.open("pdf", payload["pdf"]) as src:
            page.show_pdf_page(pymupdf.Rect(payload["rect"]), src, 0)
        return
    if kind == "tiles":
        for pt, px in _tile_boxes(rng, item.box, png_size(payload["png"])):
            page.insert_image(pymupdf.Rect(pt), stream=_crop_png(payload["png"], px), keep_proportion=False)
        return
    if kind == "multipanel":
        gap = item.payload["gap"]
        half = (w - gap) / 2
        second = figure_payload(rng, item)
        page.insert_image(pymupdf.Rect(x0, y0, x0 + half, y1), stream=payload["png"], keep_proportion=False)
        page.insert_image(pymupdf.Rect(x0 + half + gap, y0, x1, y1), stream=second["png"], keep_proportion=False)
        if item.payload.get("letters"):  # drawn over the panels' top-left corners
            page.insert_text((x0 + 3, y0 + 10), "(a)", fontsize=9, fontname="hebo")
            page.insert_text((x0 + half + gap + 3, y0 + 10), "(b)", fontsize=9, fontname="hebo")
        return
    data = payload.get("png") or payload.get("jpeg")
    page.insert_image(pymupdf.Rect(item.box), stream=data, keep_proportion=False)


def build_scan(path: Path, plans: list[PagePlan], rng, producer: str) -> None:
    """Pages laid out, rendered to noisy images and re-embedded as full-page pictures."""
    source = path.with_suffix(".src.pdf")
    (build_reportlab if producer == "rl" else build_pymupdf)(source, plans, rng)
    out = pymupdf.open()
    with pymupdf.open(source) as src:
        for plan, page in zip(plans, src):
            dpi = int(rng.choice([150, 200, 300]))
            pix = page.get_pixmap(dpi=dpi, colorspace=pymupdf.csRGB if rng.random() < 0.6 else pymupdf.csGRAY)
            pixels = np.frombuffer(pix.samples, np.uint8).reshape(pix.height, pix.width, pix.n).astype(float)
            pixels += rng.normal(0, float(rng.uniform(2, 7)), pixels.shape)
            speckle = rng.random(pixels.shape[:2]) < 0.0005
            pixels[speckle] = 0
            pixels = np.clip(pixels, 0, 255).astype(np.uint8)
            mode = "L" if pix.n == 1 else "RGB"
            image = Image.fromarray(pixels[:, :, 0] if pix.n == 1 else pixels, mode)
            buffer = io.BytesIO()
            image.save(buffer, "JPEG", quality=80)
            new = out.new_page(width=page.rect.width, height=page.rect.height)
            new.insert_image(new.rect, stream=buffer.getvalue())
            plan.text_layer = bool(rng.random() < 0.5)
            if plan.text_layer:  # an OCR layer: invisible text where the captions are
                for item in plan.items:
                    if item.kind == "caption":
                        for i, line in enumerate(item.lines):
                            new.insert_text((item.box[0], item.box[1] + (i + 0.8) * item.size * 1.25), line,
                                            fontsize=item.size, render_mode=3)
    out.save(path, garbage=3, deflate=True)
    out.close()
    source.unlink()


def displayed(box, plan: PagePlan) -> tuple[float, float, float, float]:
    """Unrotated top-left box -> displayed page box (CropBox origin, /Rotate applied)."""
    x0, y0, x1, y1 = box
    if plan.crop:
        x0, y0, x1, y1 = x0 - plan.crop[0], y0 - plan.crop[1], x1 - plan.crop[0], y1 - plan.crop[1]
    W = plan.crop[2] - plan.crop[0] if plan.crop else plan.width
    H = plan.crop[3] - plan.crop[1] if plan.crop else plan.height
    if plan.rotation == 90:  # the page turns clockwise: (x, y) -> (H - y, x)
        return (H - y1, x0, H - y0, x1)
    if plan.rotation == 180:
        return (W - x1, H - y1, W - x0, H - y0)
    if plan.rotation == 270:
        return (y0, W - x1, y1, W - x0)
    return (x0, y0, x1, y1)


def build_corpus(folder: Path, documents: int = 44, seed: int = 20240611) -> list[TruthDocument]:
    folder.mkdir(parents=True, exist_ok=True)
    truth = []
    for number in range(documents):
        rng = np.random.default_rng(seed + number)
        producer = "rl" if number % 2 == 0 else "mu"
        scan = number % 5 == 4
        plans = plan_document(rng, producer, scan)
        name = f"doc{number:02d}_{producer}{'_scan' if scan else ''}.pdf"
        path = folder / name
        if scan:
            build_scan(path, plans, rng, producer)
        elif producer == "rl":
            build_reportlab(path, plans, rng)
        else:
            build_pymupdf(path, plans, rng)
        doc_truth = TruthDocument(name, producer)
        for plan in plans:
            doc_truth.pages.append([TruthFigure(displayed(i.truth.box, plan), i.truth.source,
                                                i.truth.caption_number if plan.text_layer else "", i.truth.kind)
                                    for i in plan.items if i.truth is not None])
        truth.append(doc_truth)
    (folder / "truth.json").write_text(json.dumps([asdict(t) for t in truth], indent=1))
    return truth


def load_truth(folder: Path) -> list[TruthDocument]:
    data = json.loads((folder / "truth.json").read_text())
    return [TruthDocument(d["name"], d["producer"], [[TruthFigure(tuple(f["box"]), f["source"], f["caption_number"],
                                                                   f["kind"]) for f in page] for page in d["pages"]])
            for d in data]


def iou(a, b) -> float:
    ix = max(0.0, min(a[2], b[2]) - max(a[0], b[0]))
    iy = max(0.0, min(a[3], b[3]) - max(a[1], b[1]))
    inter = ix * iy
    union = (a[2] - a[0]) * (a[3] - a[1]) + (b[2] - b[0]) * (b[3] - b[1]) - inter
    return inter / union if union > 0 else 0.0

