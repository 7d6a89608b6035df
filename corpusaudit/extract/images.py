"""An image file is one figure: its first frame, alpha composited on white."""

from __future__ import annotations

import warnings

import numpy as np
from PIL import Image, UnidentifiedImageError

from corpusaudit.extract import ExtractConfig, ExtractError, ExtractResult
from corpusaudit.model import Document, Figure


def load_rgb(path: str, max_pixels: int) -> tuple[np.ndarray, dict]:
    """First frame as HxWx3 uint8 and what the file says of itself."""
    Image.MAX_IMAGE_PIXELS = max_pixels
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", Image.DecompressionBombWarning)
            with Image.open(path) as image:
                width, height = image.size
                if width * height > max_pixels:
                    raise ExtractError(f"image too large: {width}x{height} pixels declared")
                image.seek(0)
                info = {"format": image.format, "mode": image.mode, "dpi": image.info.get("dpi")}
                if image.mode in ("RGBA", "LA", "PA") or (image.mode == "P" and "transparency" in image.info):
                    rgba = image.convert("RGBA")
                    canvas = Image.new("RGBA", rgba.size, (255, 255, 255, 255))
                    canvas.alpha_composite(rgba)
                    rgb = canvas.convert("RGB")
                else:
                    rgb = image.convert("RGB")
                return np.asarray(rgb, dtype=np.uint8), info
    except (Image.DecompressionBombError, Image.DecompressionBombWarning) as exc:
        raise ExtractError(f"image refused as a decompression bomb: {exc}") from exc
    except UnidentifiedImageError as exc:
        raise ExtractError("unreadable image: format not recognised") from exc
    except (OSError, SyntaxError, ValueError) as exc:
        raise ExtractError(f"unreadable image: {exc}") from exc


def extract_image_file(doc: Document, config: ExtractConfig) -> ExtractResult:
    pixels, info = load_rgb(doc.local_path, config.max_image_pixels)
    height, width = pixels.shape[:2]
    figure = Figure(
        figure_id=f"{doc.document_id}-p1-0", document_id=doc.document_id, path=doc.path,
        page=1, index=0, bbox=(0.0, 0.0, float(width), float(height)), source="image",
        width_px=width, height_px=height, pixels=pixels, image_info=info,
    )
    return ExtractResult(figures=[figure], pages=1)
