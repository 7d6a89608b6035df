"""Saving and loading the classifier safely: skops format, an explicit list of trusted types,
and a JSON metadata file next to the model that records its sha256, classes and feature version.

Plain pickle is never used: a pickle runs arbitrary code when loaded.
"""

from __future__ import annotations

import hashlib
import json
import zipfile
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import skops.io as sio

from . import features

# Every non-builtin type the shipped estimator (temperature-calibrated gradient boosting) holds.
# Anything else inside a model file makes loading fail instead of running unknown code.
TRUSTED_TYPES = [
    "sklearn.calibration.CalibratedClassifierCV",
    "sklearn.calibration._CalibratedClassifier",
    "sklearn.calibration._TemperatureScaling",
    "sklearn.frozen._frozen.FrozenEstimator",
    "sklearn.ensemble._hist_gradient_boosting.gradient_boosting.HistGradientBoostingClassifier",
    "sklearn.ensemble._hist_gradient_boosting.binning._BinMapper",
    "sklearn.ensemble._hist_gradient_boosting.predictor.TreePredictor",
    "sklearn._loss.loss.HalfMultinomialLoss",
    "sklearn._loss.link.MultinomialLogit",
    "sklearn._loss.link.Interval",
    "sklearn._loss._loss.CyHalfMultinomialLoss",
    "sklearn.preprocessing._label.LabelEncoder",
    "sklearn.pipeline.Pipeline",
    "sklearn.preprocessing._data.StandardScaler",
    "sklearn.linear_model._logistic.LogisticRegression",
    "sklearn.neural_network._multilayer_perceptron.MLPClassifier",
    "sklearn.neural_network._stochastic_optimizers.AdamOptimizer",
    "sklearn.preprocessing._label.LabelBinarizer",
    "numpy.dtype",
    "numpy.ndarray",
    "numpy.float64",
    "numpy.int64",
    "numpy.random.mtrand.RandomState",
    "builtins.slice",
    "sklearn.utils._bunch.Bunch",
]


class ModelIntegrityError(RuntimeError):
    """A model file is missing its metadata, does not match its recorded hash, holds untrusted
    types, or was made for other features: it is refused rather than loaded."""


@dataclass(frozen=True)
class LoadedModel:
    estimator: Any
    metadata: dict


def sha256_of(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def metadata_path(model_path: Path) -> Path:
    return model_path.with_suffix(".json")


def save(estimator: Any, path: Path, metadata: dict) -> dict:
    """Write the model (skops) and its metadata (JSON with the file's sha256); return the metadata."""
    path.parent.mkdir(parents=True, exist_ok=True)
    sio.dump(estimator, path, compression=zipfile.ZIP_DEFLATED, compresslevel=9)
    untrusted = sorted(set(sio.get_untrusted_types(file=path)) - set(TRUSTED_TYPES))
    if untrusted:
        path.unlink()
        raise ModelIntegrityError(f"model holds types missing from TRUSTED_TYPES: {', '.join(untrusted)}")
    meta = dict(metadata, sha256=sha256_of(path), file=path.name, bytes=path.stat().st_size)
    metadata_path(path).write_text(json.dumps(meta, indent=2, sort_keys=True) + "\n")
    return meta


def load(path: Path) -> LoadedModel:
    """Load a model after checking its metadata, its hash and its types; ModelIntegrityError if any fails."""
    meta_file = metadata_path(path)
    if not path.is_file():
        raise ModelIntegrityError(f"model file not found: {path}")
    if not meta_file.is_file():
        raise ModelIntegrityError(f"no metadata file {meta_file.name} next to {path.name}: refusing to load it")
    try:
        meta = json.loads(meta_file.read_text())
    except (json.JSONDecodeError, UnicodeDecodeError) as exc:
        raise ModelIntegrityError(f"unreadable metadata {meta_file.name}: {exc}") from exc
    actual = sha256_of(path)
    if meta.get("sha256") != actual:
        raise ModelIntegrityError(
            f"{path.name} has sha256 {actual}, but its metadata records {meta.get('sha256')}: "
            "the file was changed or is not the model the metadata describes")
    if meta.get("feature_version") != features.FEATURE_VERSION:
        raise ModelIntegrityError(
            f"{path.name} was trained on feature version {meta.get('feature_version')}, "
            f"this code computes version {features.FEATURE_VERSION}: retrain it")
    if not zipfile.is_zipfile(path):
        raise ModelIntegrityError(f"{path.name} is not a skops model file")
    try:
        estimator = sio.load(path, trusted=TRUSTED_TYPES)
    except sio.exceptions.UntrustedTypesFoundException as exc:
        raise ModelIntegrityError(f"{path.name} holds types outside the trusted list: {exc}") from exc
    except Exception as exc:  # skops raises many kinds of error on a malformed archive
        raise ModelIntegrityError(f"{path.name} could not be read as a skops model: {exc}") from exc
    if not hasattr(estimator, "predict_proba") or not hasattr(estimator, "classes_"):
        raise ModelIntegrityError(f"{path.name} holds a {type(estimator).__name__}, not a fitted classifier")
    classes = [str(c) for c in estimator.classes_]
    if classes != list(meta.get("classes", [])):
        raise ModelIntegrityError(f"{path.name} predicts {classes}, its metadata says {meta.get('classes')}")
    return LoadedModel(estimator, meta)
