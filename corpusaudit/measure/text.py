"""Text of a figure: numbers in labels and, for rasters, text recognition of chosen strips.

Vector figures state their text exactly (figure.vector.texts). Rasters are read with
tesseract in-process (the tesserocr binding: no process start per strip, which cost more
than the recognition itself), only in the strips a measurement asks for. When the binding
or the English model (tesseract-ocr-eng) is missing, OCR raises MeasurementUnavailable so
the rules that need text are listed as unmeasured.
"""

from __future__ import annotations

import functools
import glob
import os
import re

# One thread per recognition: parallelism comes from the document workers (--jobs). Must be
# set before the library loads.
os.environ.setdefault("OMP_THREAD_LIMIT", "1")

import numpy as np  # noqa: E402

from corpusaudit.model import BBox, MeasurementUnavailable, TextSpan  # noqa: E402

OCR_UNAVAILABLE = "text recognition unavailable (install tesserocr and tesseract-ocr-eng)"
# Where Debian, Fedora, Homebrew and source builds put the models, newest first.
TESSDATA_GLOBS = ("/usr/share/tesseract-ocr/*/tessdata", "/usr/share/tesseract-ocr/tessdata", "/usr/share/tessdata",
                  "/usr/local/share/tessdata", "/opt/homebrew/share/tessdata")
_NUMBER = re.compile(r"^[(\[]?([-+]?)(\d{1,3}(?:[,\u202f\u2009 ]\d{3})+|\d*\.?\d+)(?:[eE]([-+]?\d+))?\s*(%|[kKMB])?[)\]]?$")
_SCALE = {"k": 1e3, "K": 1e3, "M": 1e6, "B": 1e9, "%": 1.0, None: 1.0}
BMP_RESOLUTION = 96  # dpi: Pillow's default for BMP, which tesserocr made of PIL images
_MINUS = str.maketrans({"\u2212": "-", "\u2013": "-", "\u2012": "-", "$": "", "€": "", "£": ""})


def parse_number(text: str) -> float | None:
    """The number a tick or slice label states ('−20', '1,000', '2.5k', '40%'), else None."""
    cleaned = text.strip().translate(_MINUS).replace(" ", "")
    match = _NUMBER.match(cleaned)
    if not match:
        return None
    sign, digits, exponent, suffix = match.groups()
    value = float(re.sub(r"[,\u202f\u2009 ]", "", digits)) * _SCALE[suffix]
    if exponent:
        value *= 10.0 ** int(exponent)
    return -value if sign == "-" else value


def parse_percentage(text: str) -> float | None:
    """The percentage of a label that ends in '%' ('23.5%', 'Alpha 12%'), else None."""
    match = re.search(r"(\d+(?:[.,]\d+)?)\s*%\s*$", text.strip())
    return float(match.group(1).replace(",", ".")) if match else None


def tessdata_dir() -> str | None:
    """The folder holding eng.traineddata: $TESSDATA_PREFIX first, then the usual install places."""
    candidates = [os.environ.get("TESSDATA_PREFIX", "")]
    for pattern in TESSDATA_GLOBS:
        candidates += sorted(glob.glob(pattern), reverse=True)
    for folder in candidates:
        if folder and os.path.isfile(os.path.join(folder, "eng.traineddata")):
            return folder
    return None


def ocr_available() -> bool:
    return _engine() is not None


@functools.cache
def _engine():
    """The process's recogniser, made on first use. Made before the pool forks its workers
    (run._warm_up_before_forking), each worker starts with a private copy of it, copy-on-write,
    instead of loading the English model again (about 0.1 s; a new worker every 25 documents).
    A made recogniser holds no thread or open file that a fork could break."""
    try:
        import tesserocr
    except ImportError:
        return None
    folder = tessdata_dir()
    if folder is None:
        return None
    try:
        return tesserocr.PyTessBaseAPI(path=folder, lang="eng")
    except RuntimeError:  # a model file tesseract cannot read
        return None


def _recognise(rgb: np.ndarray, region: BBox, psm: int, whitelist: str,
               upscale: float) -> list[tuple[str, BBox, float]]:
    """(text, box in image pixels, confidence 0..100) of every word tesseract reads inside region.

    The strip is upscaled (tesseract reads glyphs of ~20 px best) and turned to grey.
    Raises MeasurementUnavailable when text recognition is not installed.
    """
    if not ocr_available():
        raise MeasurementUnavailable(OCR_UNAVAILABLE)
    engine = _engine()
    import cv2
    import tesserocr

    h, w = rgb.shape[:2]
    x0, y0 = max(0, int(region[0])), max(0, int(region[1]))
    x1, y1 = min(w, int(np.ceil(region[2]))), min(h, int(np.ceil(region[3])))
    if x1 - x0 < 4 or y1 - y0 < 4:
        return []
    grey = cv2.cvtColor(np.ascontiguousarray(rgb[y0:y1, x0:x1]), cv2.COLOR_RGB2GRAY)
    if np.median(grey) < 128:  # light text on a dark background: tesseract wants dark on light
        grey = 255 - grey
    grey = cv2.resize(grey, None, fx=upscale, fy=upscale, interpolation=cv2.INTER_CUBIC)
    grey = cv2.copyMakeBorder(grey, 10, 10, 10, 10, cv2.BORDER_REPLICATE)
    engine.SetPageSegMode(psm)
    engine.SetVariable("tessedit_char_whitelist", whitelist)
    # The grey bytes as they are: handing tesserocr a PIL image costs a BMP encoding and
    # decoding per strip. BMP_RESOLUTION is what that BMP's header stated, and tesseract
    # reads the resolution, so it is stated here too. The bytes are held until recognised.
    image_bytes = grey.tobytes()
    engine.SetImageBytes(image_bytes, grey.shape[1], grey.shape[0], 1, grey.shape[1])
    engine.SetSourceResolution(BMP_RESOLUTION)
    engine.Recognize()
    words = []
    level = tesserocr.RIL.WORD
    iterator = engine.GetIterator()
    if iterator is None:  # nothing recognised
        return words
    for word in tesserocr.iterate_level(iterator, level):
        if word.Empty(level):
            continue
        text = (word.GetUTF8Text(level) or "").strip()
        box = word.BoundingBox(level)
        if not text or box is None:
            continue
        left, top, right, bottom = box
        bx0, by0 = x0 + (left - 10) / upscale, y0 + (top - 10) / upscale
        words.append((text, (bx0, by0, bx0 + (right - left) / upscale, by0 + (bottom - top) / upscale),
                      float(word.Confidence(level))))
    return words


def ocr_words(rgb: np.ndarray, region: BBox, *, psm: int = 11, whitelist: str = "",
              upscale: float = 2.0, min_confidence: float = 30.0) -> list[TextSpan]:
    """Words tesseract reads inside region of an RGB image, with boxes in image pixels.

    Raises MeasurementUnavailable when text recognition is not installed.
    """
    return [TextSpan(text=text, bbox=box, size_pt=0.0, angle=0.0, font="ocr")
            for text, box, confidence in _recognise(rgb, region, psm, whitelist, upscale)
            if confidence >= min_confidence]


def ocr_line(rgb: np.ndarray, upscale: float = 2.0, min_confidence: float = 30.0) -> tuple[str, float]:
    """The one line of text an image holds, read as a line (its words left to right), and
    tesseract's confidence in it: the lowest of its words' (0..100; 0 when nothing is read).

    The lowest, not the mean: one doubtful word makes the whole label doubtful.
    """
    words = [w for w in _recognise(rgb, (0, 0, rgb.shape[1], rgb.shape[0]), 7, "", upscale)
             if w[2] >= min_confidence]
    if not words:
        return "", 0.0
    words.sort(key=lambda w: w[1][0])
    return " ".join(w[0] for w in words), min(w[2] for w in words)


def merge_words_into_lines(words: list[TextSpan], gap_factor: float = 0.8) -> list[TextSpan]:
    """Join horizontally adjacent OCR words of one line ('Alpha' 'Beta' -> 'Alpha Beta')."""
    ordered = sorted(words, key=lambda s: (s.bbox[1], s.bbox[0]))
    lines: list[TextSpan] = []
    for word in sorted(ordered, key=lambda s: s.bbox[0]):
        height = word.bbox[3] - word.bbox[1]
        for index, line in enumerate(lines):
            lh = line.bbox[3] - line.bbox[1]
            same_row = abs((line.bbox[1] + line.bbox[3]) - (word.bbox[1] + word.bbox[3])) / 2 < 0.5 * max(lh, height)
            if same_row and 0 <= word.bbox[0] - line.bbox[2] < gap_factor * max(lh, height):
                lines[index] = TextSpan(text=f"{line.text} {word.text}",
                                        bbox=(line.bbox[0], min(line.bbox[1], word.bbox[1]),
                                              word.bbox[2], max(line.bbox[3], word.bbox[3])),
                                        size_pt=0.0, angle=0.0, font="ocr")
                break
        else:
            lines.append(word)
    return lines
