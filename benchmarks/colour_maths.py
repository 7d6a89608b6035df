"""Time the shared colour maths on a 1000x1000 chart-like image.

Run: python benchmarks/colour_maths.py
Target (design): srgb_to_lab + simulate_cvd (three deficiencies) + extract_palette under
200 ms together on one core; confusable_pairs on a 20-colour palette in milliseconds.
"""

from __future__ import annotations

import time

import numpy as np
from PIL import Image, ImageDraw

from corpusaudit.measure import colour as cm
from corpusaudit.workers import single_threaded_libraries

REPEATS = 5


def chart_image(size: int = 1000) -> np.ndarray:
    """Invented pie and bar shapes drawn at 2x and box-filtered: anti-aliased edges."""
    scale = 2
    image = Image.new("RGB", (size * scale, size * scale), "white")
    draw = ImageDraw.Draw(image)
    colours = ["#4e79a7", "#f28e2b", "#e15759", "#76b7b2", "#59a14f", "#edc948", "#b07aa1", "#ff9da7"]
    start = 0.0
    for colour, share in zip(colours, [0.22, 0.18, 0.15, 0.13, 0.12, 0.1, 0.06, 0.04]):
        end = start + 360.0 * share
        draw.pieslice([100 * scale, 100 * scale, 500 * scale, 500 * scale], start, end, fill=colour)
        start = end
    for i, colour in enumerate(colours):
        top = (900 - 60 * (i + 1)) * scale
        draw.rectangle([560 * scale + i * 50 * scale, top, 600 * scale + i * 50 * scale, 900 * scale], fill=colour)
    draw.line([(550 * scale, 900 * scale), (980 * scale, 900 * scale)], fill="black", width=3 * scale)
    for k in range(10):
        draw.text((560 * scale + k * 40 * scale, 920 * scale), f"G{k}", fill="black")
    return np.asarray(image.resize((size, size), Image.Resampling.BOX))


def best_time(function, *args) -> tuple[float, object]:
    """Best-of-N CPU time of this process in ms (less sensitive than wall time to other
    jobs sharing the machine)."""
    timings = []
    result = None
    for _ in range(REPEATS):
        started = time.process_time()
        result = function(*args)
        timings.append(time.process_time() - started)
    return min(timings) * 1000.0, result


def main() -> None:
    with single_threaded_libraries():  # as in the audit's workers: one core per document
        report()


def report() -> None:
    image = chart_image()
    lab_ms, _ = best_time(cm.srgb_to_lab, image)
    cvd_ms = {d: best_time(cm.simulate_cvd, image, d)[0] for d in cm.DEFICIENCIES}
    palette_ms, palette = best_time(cm.extract_palette, image)
    total = lab_ms + sum(cvd_ms.values()) + palette_ms
    print(f"image: {image.shape[1]}x{image.shape[0]}, best of {REPEATS} runs, process CPU time")
    print(f"srgb_to_lab            {lab_ms:8.1f} ms")
    for deficiency, ms in cvd_ms.items():
        print(f"simulate_cvd {deficiency:<9} {ms:8.1f} ms")
    print(f"extract_palette        {palette_ms:8.1f} ms  ({sum(not c.is_grey for c in palette)} colours, "
          f"{sum(c.is_grey for c in palette)} greys)")
    print(f"colour maths total     {total:8.1f} ms  (target < 200 ms)")

    rng = np.random.default_rng(7)
    palette20 = rng.integers(0, 256, size=(20, 3), dtype=np.uint8)
    pairs_ms, pairs = best_time(cm.confusable_pairs, palette20, 10.0)
    print(f"confusable_pairs (20)  {pairs_ms:8.2f} ms  ({len(pairs)} pairs at 10 dE00, 3 deficiencies)")


if __name__ == "__main__":
    main()
