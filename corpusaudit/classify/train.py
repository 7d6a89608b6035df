"""Training entry points behind `corpusaudit train` and `corpusaudit classify`.

train(out, samples_per_class, seed, extra_dirs) generates labelled figures (synth), computes
features, picks a scikit-learn model by stratified cross-validation (macro-F1), calibrates its
probabilities (temperature scaling on a held-out split) and writes it compiled to plain arrays
(compiled.export) with its metadata: the scikit-learn objects never leave training.
"""

from __future__ import annotations

import logging
import platform
import time
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from PIL import Image, UnidentifiedImageError

from ..model import CHART_TYPES
from . import features, load_classifier, synth
from .compiled import export
from .model import save

log = logging.getLogger(__name__)

IMAGE_SUFFIXES = {".png", ".jpg", ".jpeg", ".tif", ".tiff", ".webp", ".gif", ".bmp"}
CLASSIFY_COLUMNS = ("path", "chart_type", "confidence", "low_confidence", "top3", "error")
CV_FOLDS = 3
CALIBRATION_SHARE = 0.2


@dataclass
class TrainReport:
    path: Path
    sha256: str
    bytes: int
    model: str  # the candidate chosen by cross-validation
    cv_macro_f1: float  # the chosen candidate's
    cv_scores: dict[str, float]  # every candidate's
    samples: int
    extra_samples: int
    seconds: float
    per_class_count: dict[str, int] = field(default_factory=dict)


# The candidates compiled.export can hold; the others are cross-validated as baselines only.
SHIPPABLE = ("gradient_boosting",)


def candidates(seed: int, n_samples: int) -> dict:
    """Models compared by cross-validation. Single-threaded: the machine is shared.
    Early stopping needs a validation split holding every class, so small sets train without it."""
    from sklearn.ensemble import HistGradientBoostingClassifier
    from sklearn.linear_model import LogisticRegression
    from sklearn.neural_network import MLPClassifier
    from sklearn.pipeline import make_pipeline
    from sklearn.preprocessing import StandardScaler

    return {
        "gradient_boosting": HistGradientBoostingClassifier(
            # 60 rounds x 10 classes keeps one prediction under 10 ms of CPU
            max_iter=60, learning_rate=0.2, max_leaf_nodes=31, l2_regularization=1.0,
            early_stopping=n_samples >= 1000, validation_fraction=0.1, n_iter_no_change=15, random_state=seed),
        "logistic_regression": make_pipeline(StandardScaler(), LogisticRegression(C=0.3, max_iter=3000)),
        "mlp": make_pipeline(StandardScaler(), MLPClassifier(
            hidden_layer_sizes=(128,), alpha=1e-2, early_stopping=True, max_iter=400, random_state=seed)),
    }


def read_rgb(path: Path) -> np.ndarray:
    with Image.open(path) as im:
        im.seek(0)
        return np.asarray(im.convert("RGB"))


def generated_features(samples_per_class: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    rows, labels = [], []
    started = time.perf_counter()
    for k, (label, rgb) in enumerate(synth.samples(samples_per_class, seed)):
        rows.append(features.extract(rgb))
        labels.append(label)
        if (k + 1) % 500 == 0:
            log.info("generated %d figures (%.0f s)", k + 1, time.perf_counter() - started)
    return np.array(rows, np.float32), np.array(labels)


def folder_features(folders: Iterable[Path]) -> tuple[np.ndarray, np.ndarray]:
    """Features of user images laid out as FOLDER/<chart type>/<image>."""
    rows, labels = [], []
    for folder in folders:
        folder = Path(folder)
        if not folder.is_dir():
            raise ValueError(f"extra training folder not found: {folder}")
        unknown = sorted(p.name for p in folder.iterdir() if p.is_dir() and p.name not in CHART_TYPES)
        if unknown:
            raise ValueError(f"{folder}: sub-folders {', '.join(unknown)} are not chart types "
                             f"({', '.join(CHART_TYPES)})")
        for label in CHART_TYPES:
            for path in sorted((folder / label).glob("*")) if (folder / label).is_dir() else []:
                if path.suffix.lower() not in IMAGE_SUFFIXES:
                    continue
                try:
                    rows.append(features.extract(read_rgb(path)))
                except (OSError, UnidentifiedImageError) as exc:
                    log.warning("skipping unreadable training image %s: %s", path, exc)
                    continue
                labels.append(label)
    width = len(features.feature_names())
    return np.array(rows, np.float32).reshape(-1, width), np.array(labels, dtype=str)


def library_versions() -> dict[str, str]:
    import cv2
    import sklearn

    return {"python": platform.python_version(), "numpy": np.__version__, "scikit-learn": sklearn.__version__,
            "opencv": cv2.__version__, "pillow": Image.__version__}


def train(out: Path, samples_per_class: int, seed: int, extra_dirs: Sequence[Path] = ()) -> TrainReport:
    """Generate data, select and calibrate a model, write `out` (compiled .npz) and its .json metadata."""
    started, cpu_started = time.perf_counter(), time.process_time()
    X, y = generated_features(samples_per_class, seed)
    X_extra, y_extra = folder_features(extra_dirs)
    timing = {"features_seconds": round(time.perf_counter() - started, 1),
              "features_cpu_seconds": round(time.process_time() - cpu_started, 1)}
    X, y = np.vstack([X, X_extra]), np.concatenate([y, y_extra])
    log.info("features for %d figures (%d from extra folders)", len(y), len(y_extra))
    generator = {"samples_per_class": samples_per_class, "seed": seed, "matplotlib_share": synth.MATPLOTLIB_SHARE}
    return fit_and_save(X, y, Path(out), seed, generator, len(y_extra), started, cpu_started, timing)


def fit_and_save(X: np.ndarray, y: np.ndarray, out: Path, seed: int, generator: dict, extra_samples: int,
                 started: float, cpu_started: float, timing: dict) -> TrainReport:
    """Cross-validate every candidate, fit and calibrate the best one the compiled format holds
    (SHIPPABLE), save it compiled. The others' scores go into the metadata as baselines."""
    from sklearn.calibration import CalibratedClassifierCV
    from sklearn.frozen import FrozenEstimator
    from sklearn.model_selection import StratifiedKFold, cross_val_score, train_test_split
    from threadpoolctl import threadpool_limits

    folds = StratifiedKFold(CV_FOLDS, shuffle=True, random_state=seed)
    scores: dict[str, float] = {}
    with threadpool_limits(1):
        models = candidates(seed, len(y))
        for name, estimator in models.items():
            scores[name] = float(cross_val_score(estimator, X, y, cv=folds, scoring="f1_macro", n_jobs=1).mean())
            log.info("cv macro-F1 %s: %.4f", name, scores[name])
        best = max(SHIPPABLE, key=scores.get)
        if max(scores.values()) > scores[best]:
            log.warning("cv macro-F1: %s scores higher than %s, which the compiled format cannot hold",
                        max(scores, key=scores.get), best)
        # Fit on most of the data, then learn one temperature on a split the model never saw:
        # one fit of the chosen model instead of one per calibration fold.
        n_classes = len(np.unique(y))
        share = max(CALIBRATION_SHARE, 2 * n_classes / len(y))  # two folds need two figures per class
        X_fit, X_cal, y_fit, y_cal = train_test_split(X, y, test_size=share, stratify=y, random_state=seed)
        fitted = models[best].fit(X_fit, y_fit)
        # A frozen model is never refitted: the folds only split the calibration set, two is enough.
        calibrated = CalibratedClassifierCV(FrozenEstimator(fitted), method="temperature", cv=2).fit(X_cal, y_cal)
    metadata = {
        "classes": [str(c) for c in calibrated.classes_],
        "feature_version": features.FEATURE_VERSION,
        "feature_count": int(X.shape[1]),
        "model": best,
        "calibration": f"temperature scaling on a held-out {CALIBRATION_SHARE:.0%} split (CalibratedClassifierCV)",
        "generator": generator,
        "extra_samples": int(extra_samples),
        "cv_macro_f1": scores,
        # wall time depends on what else the machine runs; CPU time is the cost of training itself
        "training_seconds": round(time.perf_counter() - started, 1),
        "training_cpu_seconds": round(time.process_time() - cpu_started, 1),
        **timing,
        "library_versions": library_versions(),
    }
    meta = save(export(calibrated), out, metadata)
    counts = {label: int((y == label).sum()) for label in CHART_TYPES}
    return TrainReport(out, meta["sha256"], meta["bytes"], best, scores[best], scores, int(len(y)), int(extra_samples),
                       time.perf_counter() - started, counts)


def classify_paths(paths: Iterable[str | Path], model_path: str | Path | None = None) -> list[dict[str, str]]:
    """One row per image (keys CLASSIFY_COLUMNS); an unreadable image gets an error row, not an exception."""
    classifier = load_classifier(model_path)
    if classifier is None:
        raise FileNotFoundError("no classifier model shipped in models/; run `corpusaudit train` first")
    rows = []
    for path in paths:
        row = dict.fromkeys(CLASSIFY_COLUMNS, "")
        row["path"] = str(path)
        try:
            pred = classifier.predict(read_rgb(Path(path)))
        except (OSError, UnidentifiedImageError, ValueError) as exc:
            row["error"] = f"{type(exc).__name__}: {exc}"
        else:
            row.update(chart_type=pred.label, confidence=f"{pred.confidence:.4f}",
                       low_confidence=str(pred.low_confidence).lower(),
                       top3=";".join(f"{label}:{p:.4f}" for label, p in pred.top3))
        rows.append(row)
    return rows
