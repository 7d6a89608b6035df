"""Chart-type classifier benchmark.

(a) a held-out split of the generated data (same generator, a seed never used for training);
(b) charts from a renderer the training data never uses: Vega-Lite specs rendered to PNG offline
    by vl-convert-python, plus scikit-image photos kept out of training for not_chart.
Prints macro-F1, per-class F1, the confusion matrix and ms per figure (features, inference).

  python benchmarks/classifier.py [--model FILE] [--per-class N] [--skip-a] [--b-start I]
  python benchmarks/classifier.py --write-fixtures   # regenerate tests/fixtures/classifier/
"""

from __future__ import annotations

import argparse
import io
import sys
import time
from pathlib import Path

import numpy as np
from PIL import Image

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from corpusaudit.classify import features, load_classifier, synth  # noqa: E402
from corpusaudit.classify.synth import common  # noqa: E402
from corpusaudit.model import CHART_TYPES  # noqa: E402

HELD_OUT_SEED = 900_001  # training uses small seeds; this one is never used for training
FIXTURE_DIR = ROOT / "tests" / "fixtures" / "classifier"
# scikit-image sample images that synth.not_chart.TRAIN_PHOTOS leaves out.
UNSEEN_PHOTOS = ("cat", "rocket", "clock", "hubble_deep_field", "retina", "horse", "page", "text",
                 "shepp_logan_phantom", "microaneurysms")
THEMES = (None, None, None, "dark", "excel", "fivethirtyeight", "ggplot2", "googlecharts", "latimes", "quartz",
          "urbaninstitute", "vox", "powerbi", "carbonwhite")
CAT_SCHEMES = ("category10", "tableau10", "set1", "set2", "dark2", "paired", "accent", "observable10")
SEQ_SCHEMES = ("viridis", "blues", "greens", "magma", "inferno", "plasma", "turbo", "rainbow", "greys",
               "orangered", "yellowgreenblue", "redblue", "spectral")


def _words(rng, n):
    return [common.label(rng) for _ in range(n)]


def _size(rng):
    w = int(rng.integers(160, 520))
    return w, int(w * rng.uniform(0.5, 1.2))


def _spec(rng, body: dict) -> dict:
    w, h = _size(rng)
    spec = {"$schema": "https://vega.github.io/schema/vega-lite/v5.json", "width": w, "height": h,
            "background": "white" if rng.random() < 0.8 else str(rng.choice(["#f7f7f2", "#eef2f7", "#fafafa"]))}
    if rng.random() < 0.5:
        spec["title"] = common.sentence(rng, 2, 5)
    spec.update(body)
    return spec


def _colour(rng, field, kind="nominal", legend=True):
    enc = {"field": field, "type": kind, "scale": {"scheme": str(rng.choice(CAT_SCHEMES if kind == "nominal"
                                                                              else SEQ_SCHEMES))}}
    if not legend or rng.random() < 0.2:
        enc["legend"] = None
    return enc


def vega_spec(label: str, rng: np.random.Generator) -> dict:
    if label == "bar":
        n, groups = int(rng.integers(3, 12)), int(rng.choice([1, 1, 2, 3]))
        cats, series = _words(rng, n), _words(rng, groups)
        values = [{"c": c, "g": g, "v": float(rng.uniform(1, 100))} for c in cats for g in series]
        cat = {"field": "c", "type": "nominal", "sort": None}
        val = {"field": "v", "type": "quantitative"}
        if groups > 1 and rng.random() < 0.5:
            val["stack"] = "zero"
        enc = {"x": cat, "y": val} if rng.random() < 0.65 else {"y": cat, "x": val}
        if groups > 1:
            enc["color"] = _colour(rng, "g")
            if "stack" not in val:
                enc["xOffset" if "field" in enc["x"] and enc["x"]["field"] == "c" else "yOffset"] = {"field": "g"}
        return _spec(rng, {"data": {"values": values}, "mark": {"type": "bar",
                          "cornerRadiusEnd": float(rng.choice([0, 0, 3]))}, "encoding": enc})
    if label == "histogram":
        data = rng.normal(rng.uniform(0, 50), rng.uniform(1, 20), int(rng.integers(200, 2000)))
        if rng.random() < 0.4:
            data = np.exp(data / (np.abs(data).max() + 1e-9) * 2)
        values = [{"x": float(v)} for v in data]
        return _spec(rng, {"data": {"values": values},
                           "mark": {"type": "bar", "binSpacing": int(rng.choice([0, 1, 1])),
                                    "color": str(rng.choice(["#4c78a8", "#e45756", "#54a24b", "#777777", "#f58518"]))},
                           "encoding": {"x": {"bin": {"maxbins": int(rng.integers(10, 60))}, "field": "x"},
                                        "y": {"aggregate": "count"}}})
    if label == "pie":
        n = int(rng.integers(2, 9))
        values = [{"c": c, "v": float(v)} for c, v in zip(_words(rng, n), rng.dirichlet(np.ones(n) * 2))]
        mark = {"type": "arc"}
        if rng.random() < 0.4:
            mark["innerRadius"] = int(rng.integers(20, 60))
        if rng.random() < 0.3:
            mark["stroke"] = "#fff"
        spec = _spec(rng, {"data": {"values": values}, "mark": mark,
                           "encoding": {"theta": {"field": "v", "type": "quantitative"}, "color": _colour(rng, "c")}})
        spec["height"] = spec["width"] = min(spec["width"], spec["height"])
        return spec
    if label in ("line", "area"):
        series, n = int(rng.choice([1, 1, 2, 3, 5])), int(rng.choice([10, 30, 80, 150]))
        values = []
        for s in _words(rng, series):
            y = np.abs(np.cumsum(rng.normal(0, 1, n)) + rng.uniform(2, 10))
            values += [{"t": t, "s": s, "v": float(v)} for t, v in enumerate(y)]
        enc = {"x": {"field": "t", "type": "quantitative"}, "y": {"field": "v", "type": "quantitative"}}
        if series > 1:
            enc["color"] = _colour(rng, "s")
        mark = {"type": label}
        if label == "line" and n <= 30 and rng.random() < 0.4:
            mark["point"] = True
        if label == "area":
            if series > 1 and rng.random() < 0.4:
                enc["y"]["stack"] = None
                mark["opacity"] = 0.5
            if rng.random() < 0.3:
                mark["line"] = True
        if rng.random() < 0.2:
            mark["interpolate"] = "monotone"
        return _spec(rng, {"data": {"values": values}, "mark": mark, "encoding": enc})
    if label == "scatter":
        n, groups = int(rng.choice([20, 80, 300, 1500])), int(rng.choice([1, 2, 3]))
        x = rng.normal(0, 1, n)
        values = [{"x": float(a), "y": float(a * 0.8 + rng.normal(0, 0.7)), "g": f"G{int(rng.integers(groups))}",
                   "s": float(rng.uniform(1, 100))} for a in x]
        enc = {"x": {"field": "x", "type": "quantitative"}, "y": {"field": "y", "type": "quantitative"}}
        if groups > 1:
            enc["color"] = _colour(rng, "g")
        if rng.random() < 0.3:
            enc["size"] = {"field": "s", "type": "quantitative"}
        mark = {"type": str(rng.choice(["point", "circle", "square"])), "filled": bool(rng.random() < 0.5)}
        return _spec(rng, {"data": {"values": values}, "mark": mark, "encoding": enc})
    if label == "box":
        groups = int(rng.integers(2, 9))
        values = [{"g": g, "v": float(v)} for g in _words(rng, groups)
                  for v in rng.normal(rng.uniform(0, 10), rng.uniform(0.5, 3), 60)]
        enc = {"x": {"field": "g", "type": "nominal"}, "y": {"field": "v", "type": "quantitative"}}
        if rng.random() < 0.3:
            enc = {"y": enc["x"], "x": enc["y"]}
        if rng.random() < 0.4:
            enc["color"] = _colour(rng, "g", legend=False)
        mark = {"type": "boxplot", "extent": 1.5 if rng.random() < 0.7 else "min-max"}
        return _spec(rng, {"data": {"values": values}, "mark": mark, "encoding": enc})
    if label == "heatmap":
        rows, cols = int(rng.integers(4, 25)), int(rng.integers(4, 25))
        values = [{"r": f"R{r}", "c": f"C{c}", "v": float(np.sin(r / 3) + np.cos(c / 4) + rng.normal(0, 0.3))}
                  for r in range(rows) for c in range(cols)]
        return _spec(rng, {"data": {"values": values}, "mark": "rect",
                           "encoding": {"x": {"field": "c", "type": "ordinal", "sort": None},
                                        "y": {"field": "r", "type": "ordinal", "sort": None},
                                        "color": _colour(rng, "v", "quantitative")}})
    if label == "map":
        from scipy.spatial import Voronoi

        pts = rng.uniform(0, 100, (int(rng.integers(10, 80)), 2))
        vor = Voronoi(np.vstack([pts, [[-500, -500], [-500, 600], [600, -500], [600, 600]]]))
        feats = []
        for i in range(len(pts)):
            region = vor.regions[vor.point_region[i]]
            if -1 in region:
                continue
            poly = np.clip(vor.vertices[region], 0, 100)  # cells on the edge end at a straight coast
            ring = [[float(x), float(y)] for x, y in poly] + [[float(poly[0, 0]), float(poly[0, 1])]]
            feats.append({"type": "Feature", "properties": {"v": float(rng.random())},
                          "geometry": {"type": "Polygon", "coordinates": [ring[::-1]]}})
        spec = _spec(rng, {"data": {"values": {"type": "FeatureCollection", "features": feats},
                                    "format": {"type": "json", "property": "features"}},
                           "projection": {"type": "identity", "reflectY": True},
                           "mark": {"type": "geoshape", "stroke": str(rng.choice(["white", "black", "#888"])),
                                    "strokeWidth": float(rng.uniform(0.3, 1.5))},
                           "encoding": {"color": _colour(rng, "properties.v", "quantitative")}})
        return spec
    raise ValueError(label)


def vega_not_chart(rng: np.random.Generator, index: int) -> np.ndarray:
    """Held-out photos (every other figure) or tables/paragraphs typeset by Vega-Lite text marks."""
    if index % 2 == 0:
        import skimage.data

        img = getattr(skimage.data, UNSEEN_PHOTOS[(index // 2) % len(UNSEEN_PHOTOS)])()
        img = np.repeat(img[..., None], 3, 2) if img.ndim == 2 else img[..., :3]
        h, w = img.shape[:2]
        ch, cw = int(h * rng.uniform(0.5, 1)), int(w * rng.uniform(0.5, 1))
        y, x = int(rng.integers(0, h - ch + 1)), int(rng.integers(0, w - cw + 1))
        return np.ascontiguousarray(img[y:y + ch, x:x + cw]).astype(np.uint8)
    if rng.random() < 0.5:
        rows, cols = int(rng.integers(4, 14)), int(rng.integers(2, 6))
        values = [{"r": r, "c": c, "t": common.label(rng) if r == 0 or c == 0 else f"{rng.uniform(0, 999):.1f}"}
                  for r in range(rows) for c in range(cols)]
        enc = {"x": {"field": "c", "type": "ordinal", "axis": None}, "y": {"field": "r", "type": "ordinal", "axis": None},
               "text": {"field": "t"}}
    else:
        rows = int(rng.integers(5, 20))
        values = [{"r": r, "c": 0, "t": common.sentence(rng, 6, 10)} for r in range(rows)]
        enc = {"y": {"field": "r", "type": "ordinal", "axis": None}, "text": {"field": "t"},
               "x": {"value": 0}}
    spec = _spec(rng, {"data": {"values": values}, "mark": {"type": "text", "align": "left",
                                                            "fontSize": int(rng.integers(9, 15))},
                       "encoding": enc, "config": {"view": {"stroke": None}}})
    return _render(spec, rng)


def _render(spec: dict, rng: np.random.Generator) -> np.ndarray:
    import vl_convert as vlc

    theme = THEMES[int(rng.integers(len(THEMES)))]
    png = vlc.vegalite_to_png(spec, scale=float(rng.choice([1.0, 1.5, 2.0])), **({"theme": theme} if theme else {}))
    with Image.open(io.BytesIO(png)) as im:
        rgba = im.convert("RGBA")
        flat = Image.new("RGBA", rgba.size, (255, 255, 255, 255))
        flat.alpha_composite(rgba)
        return np.asarray(flat.convert("RGB")).copy()


def unseen_figure(label: str, index: int) -> np.ndarray:
    """Figure `index` of chart type `label` from the unseen renderer (deterministic)."""
    rng = np.random.default_rng([CHART_TYPES.index(label), index, 77])
    if label == "not_chart":
        return vega_not_chart(rng, index)
    return _render(vega_spec(label, rng), rng)


def evaluate(classifier, figures, title: str) -> float:
    from sklearn.metrics import confusion_matrix, f1_score

    truth, predicted, t_feat, t_inf, cpu_feat, cpu_inf = [], [], [], [], [], []
    for label, rgb in figures:
        t0, c0 = time.perf_counter(), time.process_time()
        row = features.extract(rgb)
        t1, c1 = time.perf_counter(), time.process_time()
        pred = classifier.predict_features(row)
        t2, c2 = time.perf_counter(), time.process_time()
        truth.append(label)
        predicted.append(pred.label)
        t_feat.append(t1 - t0)
        t_inf.append(t2 - t1)
        cpu_feat.append(c1 - c0)
        cpu_inf.append(c2 - c1)
    labels = list(CHART_TYPES)
    macro = f1_score(truth, predicted, labels=labels, average="macro")
    per_class = f1_score(truth, predicted, labels=labels, average=None)
    cm = confusion_matrix(truth, predicted, labels=labels)
    print(f"\n== {title}: {len(truth)} figures ==")
    print(f"macro-F1 {macro:.4f}")
    print("per-class F1: " + ", ".join(f"{lab} {f:.3f}" for lab, f in zip(labels, per_class)))
    short = [lab[:7] for lab in labels]
    print("confusion (rows truth, columns predicted):")
    print(" " * 10 + " ".join(f"{s:>7}" for s in short))
    for lab, row in zip(labels, cm):
        print(f"{lab[:9]:>9} " + " ".join(f"{v:7d}" for v in row))
    # CPU time is what one figure costs; wall time also counts waiting for a shared machine's cores.
    print(f"ms per figure, CPU: features {np.mean(cpu_feat) * 1000:.1f} (median {np.median(cpu_feat) * 1000:.1f}), "
          f"inference {np.mean(cpu_inf) * 1000:.2f} (median {np.median(cpu_inf) * 1000:.2f})")
    print(f"ms per figure, wall: features {np.mean(t_feat) * 1000:.1f} (median {np.median(t_feat) * 1000:.1f}), "
          f"inference {np.mean(t_inf) * 1000:.2f} (median {np.median(t_inf) * 1000:.2f})")
    return macro


def write_fixtures(per_label: int = 3) -> None:
    """Small fixture PNGs from the unseen renderer for tests/test_classifier.py."""
    FIXTURE_DIR.mkdir(parents=True, exist_ok=True)
    for label in CHART_TYPES:
        for index in range(per_label):
            rgb = unseen_figure(label, 1000 + index)
            im = Image.fromarray(rgb)
            # photos compress badly as PNG: keep them smaller so the set stays under 300 KB
            im.thumbnail((150, 150) if label == "not_chart" and index % 2 == 0 else (256, 256))
            im = im.quantize(256)  # an adaptive 256-colour palette: visually the same, a third of the bytes
            im.save(FIXTURE_DIR / f"{label}_{index}.png", optimize=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--model", type=Path, default=None, help="model file (default: the shipped one)")
    parser.add_argument("--per-class", type=int, default=40, help="figures per label in each set")
    parser.add_argument("--skip-a", action="store_true", help="only the unseen-renderer set (b)")
    parser.add_argument("--b-start", type=int, default=0,
                        help="first figure index of set (b); another start gives a fresh unseen set")
    parser.add_argument("--write-fixtures", action="store_true")
    args = parser.parse_args()
    if args.write_fixtures:
        write_fixtures()
        return
    classifier = load_classifier(args.model)
    if classifier is None:
        raise SystemExit("no model: run `corpusaudit train --out models/chart_classifier.npz` first")
    if not args.skip_a:
        held_out = ((lab, synth.render(lab, seed)) for lab, seed in synth.sample_seeds(args.per_class, HELD_OUT_SEED))
        evaluate(classifier, held_out, "(a) held-out generated figures")
    unseen = ((lab, unseen_figure(lab, i)) for i in range(args.b_start, args.b_start + args.per_class)
              for lab in CHART_TYPES)
    evaluate(classifier, unseen, "(b) unseen renderer (Vega-Lite via vl-convert; unseen photos)")


if __name__ == "__main__":
    main()
