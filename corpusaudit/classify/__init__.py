"""Chart-type classification: a small CPU model shipped in models/.

API used by the pipeline:
  load_classifier(path=None) -> Classifier | None   (None: no model file shipped yet)
  Classifier.predict(rgb: np.ndarray) -> Prediction
  Classifier.predict_many(images: list[np.ndarray]) -> list[Prediction]  (one document's figures)
A prediction whose confidence is below LOW_CONFIDENCE keeps its best label; callers mark the
figure low-confidence (Figure.low_confidence).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from . import features
from .compiled import CompiledModel
from .model import ModelIntegrityError, load

MODELS_DIR = Path(__file__).resolve().parents[2] / "models"
MODEL_FILE = MODELS_DIR / "chart_classifier.npz"
LOW_CONFIDENCE = 0.5

__all__ = ["Classifier", "LOW_CONFIDENCE", "MODEL_FILE", "ModelIntegrityError", "Prediction", "load_classifier"]


@dataclass(frozen=True)
class Prediction:
    label: str
    confidence: float
    top3: tuple[tuple[str, float], ...]

    @property
    def low_confidence(self) -> bool:
        return self.confidence < LOW_CONFIDENCE


class Classifier:
    """The compiled chart-type model (compiled.CompiledModel) over features.extract()."""

    def __init__(self, model: CompiledModel, metadata: dict):
        self.model = model
        self.metadata = metadata
        self.classes = model.classes

    def probabilities(self, feature_rows: np.ndarray) -> np.ndarray:
        return self.model.predict_proba(np.atleast_2d(feature_rows))

    def _prediction(self, proba: np.ndarray) -> Prediction:
        order = np.argsort(proba)[::-1][:3]
        top3 = tuple((self.classes[i], float(proba[i])) for i in order)
        return Prediction(label=top3[0][0], confidence=top3[0][1], top3=top3)

    def predict_features(self, feature_row: np.ndarray) -> Prediction:
        return self._prediction(self.probabilities(feature_row)[0])

    def predict(self, rgb: np.ndarray) -> Prediction:
        """Chart type of an HxWx3 uint8 RGB image (greyscale HxW accepted)."""
        return self.predict_many([rgb])[0]

    def predict_many(self, images: list[np.ndarray]) -> list[Prediction]:
        """Chart types of several images in one call: the trees are walked once for a whole document."""
        if not images:
            return []
        rows = np.stack([features.extract(rgb) for rgb in images])
        return [self._prediction(proba) for proba in self.probabilities(rows)]


def load_classifier(path: str | Path | None = None) -> Classifier | None:
    """The shipped model (None while models/ holds none), or the model at `path`.

    Either is checked against the sha256 in its metadata JSON and read as plain arrays (never
    unpickled); a changed, foreign or mismatched file raises ModelIntegrityError.
    """
    if path is None:
        if not MODEL_FILE.exists():
            return None
        path = MODEL_FILE
    loaded = load(Path(path))
    return Classifier(loaded.model, loaded.metadata)
