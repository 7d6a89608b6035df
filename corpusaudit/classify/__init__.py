"""Chart-type classification: a small CPU model shipped in models/.

API used by the pipeline:
  load_classifier(path=None) -> Classifier | None   (None: no model file shipped yet)
  Classifier.predict(rgb: np.ndarray) -> Prediction
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

MODELS_DIR = Path(__file__).resolve().parents[2] / "models"


@dataclass(frozen=True)
class Prediction:
    label: str
    confidence: float
    top3: tuple[tuple[str, float], ...]


class Classifier:
    def predict(self, rgb: np.ndarray) -> Prediction:  # pragma: no cover - interface
        raise NotImplementedError


def load_classifier(path: str | Path | None = None) -> Classifier | None:
    """The shipped model, or None while models/ holds no model file."""
    return None
