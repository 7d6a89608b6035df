"""The compiled classifier against scikit-learn: models fitted here on random data with missing
values, exported, and compared with scikit-learn's own predict_proba bit for bit."""

from __future__ import annotations

import hashlib
import json
import warnings

import numpy as np
import pytest
from sklearn.calibration import CalibratedClassifierCV
from sklearn.ensemble import HistGradientBoostingClassifier
from sklearn.frozen import FrozenEstimator
from sklearn.linear_model import LogisticRegression
from sklearn.naive_bayes import GaussianNB

from corpusaudit.classify import ModelIntegrityError, load_classifier
from corpusaudit.classify import features
from corpusaudit.classify.compiled import (CompiledModel, MalformedModelError, UnsupportedModelError, export,
                                           temperature_scaled)
from corpusaudit.classify.model import save

N_FEATURES = 12


def _rows(rng: np.random.Generator, n: int) -> np.ndarray:
    """Features on different scales, some informative, about 8 % missing and a few infinities;
    one feature is only ever -inf or +inf, where scikit-learn learns a NaN threshold (the midpoint)."""
    X = rng.normal(size=(n, N_FEATURES)) * rng.choice([0.01, 1.0, 50.0], size=N_FEATURES)
    X[:, 3] = np.where(rng.random(n) < 0.5, -np.inf, np.inf)
    X[rng.random(X.shape) < 0.002] = np.inf
    X[rng.random(X.shape) < 0.002] = -np.inf
    X[rng.random(X.shape) < 0.08] = np.nan
    return X.astype(np.float32)  # as features.extract returns them


def _labels(rng: np.random.Generator, X: np.ndarray, n_classes: int) -> np.ndarray:
    # missing values carry information, so trees send them left in some nodes and right in others
    finite = np.nan_to_num(X, nan=3.0, posinf=3.0, neginf=-3.0)
    score = finite[:, 0] + np.isnan(X[:, 1]) * 2 + finite[:, 2] * 0.02 + finite[:, 3] * 0.5
    cuts = np.quantile(score, np.linspace(0, 1, n_classes + 1)[1:-1])
    noisy = np.digitize(score, cuts) + (rng.random(len(X)) < 0.15)
    return np.array([f"class_{k}" for k in noisy % n_classes])


def _calibrated(n_classes: int, seed: int, **boosting) -> CalibratedClassifierCV:
    """Fitted as corpusaudit train fits the shipped model: boosting, then temperature on held-out rows."""
    rng = np.random.default_rng(seed)
    X = _rows(rng, 900)
    y = _labels(rng, X, n_classes)
    params = dict(max_iter=25, learning_rate=0.2, max_leaf_nodes=15, random_state=seed) | boosting
    # numpy warns (in binning's threads) about the midpoints and percentiles of infinite values
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", "invalid value encountered", RuntimeWarning)
        fitted = HistGradientBoostingClassifier(**params).fit(X[:600], y[:600])
    return CalibratedClassifierCV(FrozenEstimator(fitted), method="temperature", cv=2).fit(X[600:], y[600:])


@pytest.fixture(scope="module")
def multiclass() -> CalibratedClassifierCV:
    # ten classes like the shipped model: numpy sums rows of eight or more in pairs, differently for
    # C- and Fortran-ordered arrays, so only the layout scikit-learn uses gives its bits
    return _calibrated(n_classes=10, seed=1)


@pytest.fixture(scope="module")
def test_rows() -> np.ndarray:
    return _rows(np.random.default_rng(99), 4000)


def test_multiclass_probabilities_equal_scikit_learn(multiclass, test_rows):
    compiled = export(multiclass)
    assert compiled.classes == tuple(multiclass.classes_)
    assert np.isnan(test_rows).any() and np.isinf(test_rows).any()
    # the cases a traversal can get wrong are there: missing values sent either way, and
    # thresholds scikit-learn learns as NaN or infinity (every value goes right, or left)
    splits = ~compiled.arrays["is_leaf"]
    assert set(compiled.arrays["missing_go_left"][splits]) == {False, True}
    assert np.isnan(compiled.arrays["threshold"][splits]).any() and np.isinf(compiled.arrays["threshold"][splits]).any()
    assert np.array_equal(compiled.predict_proba(test_rows), multiclass.predict_proba(test_rows))
    # the batch sizes of the pipeline: one document's figures, one at a time
    for start in range(0, 300, 3):
        batch = test_rows[start:start + 3]
        assert np.array_equal(compiled.predict_proba(batch), multiclass.predict_proba(batch))
    assert np.array_equal(compiled.predict_proba(test_rows[:1]), multiclass.predict_proba(test_rows[:1]))


def test_raw_scores_equal_the_decision_function(multiclass, test_rows):
    compiled = export(multiclass)
    assert np.array_equal(compiled.decision_function(test_rows), multiclass.estimator.decision_function(test_rows))


def test_binary_and_early_stopped_models_equal_scikit_learn(test_rows):
    for model in (_calibrated(n_classes=2, seed=2),
                  _calibrated(n_classes=3, seed=3, max_iter=200, early_stopping=True, n_iter_no_change=3)):
        assert np.array_equal(export(model).predict_proba(test_rows), model.predict_proba(test_rows))
    assert model.estimator.n_iter_ < 200  # early stopping did stop early


def test_probability_shaped_scores_are_read_as_scikit_learn_reads_them():
    # An estimator with predict_proba only (no decision function): calibration takes logs first.
    rng = np.random.default_rng(5)
    X, y = rng.normal(size=(400, 3)), rng.integers(0, 3, 400)
    bayes = GaussianNB().fit(X[:200], y[:200])
    calibrated = CalibratedClassifierCV(FrozenEstimator(bayes), method="temperature").fit(X[200:], y[200:])
    beta = calibrated.calibrated_classifiers_[0].calibrators[0].beta_
    assert np.array_equal(temperature_scaled(bayes.predict_proba(X), beta), calibrated.predict_proba(X))


def test_saved_model_loads_and_predicts_the_same(tmp_path, multiclass, test_rows):
    path = tmp_path / "model.npz"
    meta = save(export(multiclass), path, {"classes": list(multiclass.classes_),
                                           "feature_version": features.FEATURE_VERSION})
    assert meta["sha256"] == hashlib.sha256(path.read_bytes()).hexdigest()
    loaded = load_classifier(path)
    assert np.array_equal(loaded.probabilities(test_rows), multiclass.predict_proba(test_rows))
    # no time stamp in the archive: the same model gives the same bytes
    again = tmp_path / "again.npz"
    save(export(multiclass), again, {})
    assert again.read_bytes() == path.read_bytes()
    with np.load(path, allow_pickle=False) as archive:
        assert all(archive[name].dtype != object for name in archive.files)


def test_wrong_width_is_an_error(multiclass):
    with pytest.raises(ValueError, match=f"{N_FEATURES} features"):
        export(multiclass).predict_proba(np.zeros((2, N_FEATURES + 1)))


def test_unsupported_models_are_refused_by_name(multiclass):
    rng = np.random.default_rng(6)
    X, y = rng.normal(size=(200, 4)), rng.integers(0, 3, 200)
    linear = CalibratedClassifierCV(FrozenEstimator(LogisticRegression().fit(X, y)), method="temperature").fit(X, y)
    with pytest.raises(UnsupportedModelError, match="LogisticRegression"):
        export(linear)
    with pytest.raises(UnsupportedModelError, match="HistGradientBoostingClassifier"):
        export(multiclass.estimator.estimator)  # boosting without its calibration
    sigmoid = CalibratedClassifierCV(FrozenEstimator(HistGradientBoostingClassifier(max_iter=3).fit(X, y)),
                                     method="sigmoid").fit(X, y)
    with pytest.raises(UnsupportedModelError, match="sigmoid"):
        export(sigmoid)
    ensemble = CalibratedClassifierCV(HistGradientBoostingClassifier(max_iter=3), method="temperature", cv=2).fit(X, y)
    with pytest.raises(UnsupportedModelError, match="2 calibrated classifiers"):
        export(ensemble)


def test_categorical_splits_are_refused():
    rng = np.random.default_rng(7)
    X = np.c_[rng.integers(0, 5, 300), rng.normal(size=300)]
    y = (X[:, 0] % 2).astype(int)
    boosting = HistGradientBoostingClassifier(max_iter=3, categorical_features=[0]).fit(X, y)
    calibrated = CalibratedClassifierCV(FrozenEstimator(boosting), method="temperature").fit(X, y)
    with pytest.raises(UnsupportedModelError, match="categorical"):
        export(calibrated)


def test_malformed_arrays_are_refused(multiclass):
    good = export(multiclass).arrays
    with pytest.raises(MalformedModelError, match="missing arrays: value"):
        CompiledModel.from_arrays({k: v for k, v in good.items() if k != "value"})
    with pytest.raises(MalformedModelError, match="dtype"):
        CompiledModel.from_arrays(good | {"threshold": good["threshold"].astype(np.float32)})
    looping = good["left"].copy()
    looping[0] = 0  # the first root's left child is itself: a path that never ends
    with pytest.raises(MalformedModelError, match="before its parent"):
        CompiledModel.from_arrays(good | {"left": looping})
    with pytest.raises(MalformedModelError, match="feature index"):
        CompiledModel.from_arrays(good | {"feature": np.where(good["is_leaf"], 0, N_FEATURES)})


def test_metadata_with_other_classes_is_refused(tmp_path, multiclass):
    path = tmp_path / "model.npz"
    save(export(multiclass), path, {"classes": list("abcdefghij"), "feature_version": features.FEATURE_VERSION})
    with pytest.raises(ModelIntegrityError, match="predicts"):
        load_classifier(path)
    meta = json.loads(path.with_suffix(".json").read_text())
    path.with_suffix(".json").write_text(json.dumps(meta | {"classes": list(multiclass.classes_),
                                                            "feature_version": features.FEATURE_VERSION - 1}))
    with pytest.raises(ModelIntegrityError, match="feature version"):
        load_classifier(path)
