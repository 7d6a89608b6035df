"""The classifier as plain arrays: gradient-boosted trees, their baseline and a temperature.

export() turns a fitted scikit-learn model (temperature-calibrated HistGradientBoostingClassifier,
as `corpusaudit train` fits it) into a CompiledModel; CompiledModel.predict_proba() reproduces
scikit-learn's predict_proba bit for bit with numpy alone:
- raw scores start at the baseline and add the trees one iteration at a time, in float64, in
  scikit-learn's order (HistGradientBoostingClassifier._raw_predict);
- the temperature is applied as in sklearn.calibration (_convert_to_logits, then softmax of
  beta * logits, then probabilities a hair above 1 set to 1), on arrays of the same memory
  layout, since numpy's row sums round differently on C- and Fortran-ordered arrays.
scikit-learn is imported only by export(): loading and predicting never need it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

FORMAT_VERSION = 1

# name -> dtype of every array a model file holds; nothing else is read from it
ARRAY_DTYPES = {
    "format_version": np.dtype(np.int64),
    "classes": np.dtype(np.str_),  # of any length
    "n_features": np.dtype(np.int64),
    "baseline": np.dtype(np.float64),  # (trees per iteration,)
    "tree_starts": np.dtype(np.int64),  # (trees + 1,): tree t holds nodes tree_starts[t]:tree_starts[t + 1]
    "feature": np.dtype(np.int64),
    "threshold": np.dtype(np.float64),
    "missing_go_left": np.dtype(np.bool_),
    "left": np.dtype(np.int64),  # child indices within the node's own tree, as scikit-learn keeps them
    "right": np.dtype(np.int64),
    "is_leaf": np.dtype(np.bool_),
    "value": np.dtype(np.float64),
    "temperature_beta": np.dtype(np.float64),  # () the inverse temperature
}
NODE_FIELDS = ("feature", "threshold", "missing_go_left", "left", "right", "is_leaf", "value")


class UnsupportedModelError(ValueError):
    """A fitted model the compiled format cannot represent exactly."""


class MalformedModelError(ValueError):
    """Arrays that do not form a valid compiled model."""


@dataclass(frozen=True)
class CompiledModel:
    arrays: dict[str, np.ndarray]
    # derived at construction for the traversal: node -> its right, left and missing-value child
    _children: np.ndarray
    _roots: np.ndarray
    _levels: int

    @property
    def classes(self) -> tuple[str, ...]:
        return tuple(str(c) for c in self.arrays["classes"])

    @property
    def n_features(self) -> int:
        return int(self.arrays["n_features"])

    @classmethod
    def from_arrays(cls, arrays: dict[str, np.ndarray]) -> CompiledModel:
        """Check names, dtypes, shapes and tree structure (MalformedModelError), then build the model."""
        missing = sorted(set(ARRAY_DTYPES) - set(arrays))
        if missing:
            raise MalformedModelError(f"missing arrays: {', '.join(missing)}")
        unknown = sorted(set(arrays) - set(ARRAY_DTYPES))
        if unknown:
            raise MalformedModelError(f"unknown arrays: {', '.join(unknown)}")
        for name, expected in ARRAY_DTYPES.items():
            actual = arrays[name].dtype
            if actual.kind != expected.kind or (expected.kind != "U" and actual != expected):
                raise MalformedModelError(f"array {name} has dtype {actual}, expected {expected}")
        a = arrays
        if a["format_version"].shape != () or int(a["format_version"]) != FORMAT_VERSION:
            raise MalformedModelError(f"format version {a['format_version']}, this code reads {FORMAT_VERSION}")
        scalars = ("n_features", "temperature_beta")
        vectors = ("classes", "baseline", "tree_starts", *NODE_FIELDS)
        if any(a[name].shape != () for name in scalars) or any(a[name].ndim != 1 for name in vectors):
            raise MalformedModelError("arrays of the wrong shape")
        n_nodes, per_iteration, starts = len(a["feature"]), len(a["baseline"]), a["tree_starts"]
        if any(len(a[name]) != n_nodes for name in NODE_FIELDS):
            raise MalformedModelError("node arrays of different lengths")
        # two classes share one tree per iteration (a score for the second); more have one tree each
        if per_iteration == 2 or len(a["classes"]) != (2 if per_iteration == 1 else per_iteration):
            raise MalformedModelError(f"{len(a['classes'])} classes for {per_iteration} trees per iteration")
        n_trees = len(starts) - 1
        if n_trees < 1 or n_trees % per_iteration or starts[0] != 0 or starts[-1] != n_nodes \
                or np.any(np.diff(starts) < 1):
            raise MalformedModelError("tree_starts does not split the nodes into whole iterations")
        beta = float(a["temperature_beta"])
        if not (np.isfinite(beta) and beta > 0) or not np.all(np.isfinite(a["baseline"])) \
                or not np.all(np.isfinite(a["value"])):
            raise MalformedModelError("non-finite or non-positive model parameters")
        children, levels = _traversal_table(a, int(a["n_features"]))
        return cls(dict(arrays), children, starts[:-1].copy(), levels)

    def decision_function(self, X: np.ndarray) -> np.ndarray:
        """Raw scores, (samples, trees per iteration) in Fortran order as scikit-learn returns them."""
        X = np.ascontiguousarray(X, dtype=np.float64)
        if X.ndim != 2 or X.shape[1] != self.n_features:
            raise ValueError(f"expected rows of {self.n_features} features, got an array of shape {X.shape}")
        a = self.arrays
        n_samples, n_trees, per_iteration = len(X), len(self._roots), len(a["baseline"])
        flat = X.ravel()
        row_starts = np.repeat(np.arange(n_samples) * X.shape[1], n_trees)
        missing_slot = np.isnan(flat) * 2  # a missing value takes the node's third child
        feature, threshold = a["feature"], a["threshold"]
        node = np.tile(self._roots, n_samples)
        # Every path takes the same number of steps: a leaf is its own child.
        for _ in range(self._levels):
            at = row_starts + feature[node]
            # "<=" as scikit-learn compares: a NaN threshold (which it can learn) sends every value right
            node = self._children[3 * node + (flat[at] <= threshold[node]) + missing_slot[at]]
        # Sums in scikit-learn's order: zeros plus the baseline, then one iteration after another
        # (accumulate adds strictly in sequence).
        steps = np.empty((n_samples, n_trees // per_iteration + 1, per_iteration))
        steps[:, 0] = 0.0
        steps[:, 0] += a["baseline"]
        steps[:, 1:] = a["value"][node].reshape(n_samples, -1, per_iteration)
        return np.asfortranarray(np.add.accumulate(steps, axis=1)[:, -1])

    def predict_proba(self, X: np.ndarray) -> np.ndarray:
        """Calibrated probabilities, (samples, classes), equal to scikit-learn's predict_proba."""
        # CalibratedClassifierCV then averages its calibrated classifiers into a new C-ordered
        # array: over one, adding to zeros and dividing by 1 change no bit.
        beta = self.arrays["temperature_beta"][()]
        return np.ascontiguousarray(temperature_scaled(self.decision_function(X), beta))


def _traversal_table(a: dict[str, np.ndarray], n_features: int) -> tuple[np.ndarray, int]:
    """Children of every node as global indices (3 * node: right, + 1: left, + 2: where missing
    values go), leaves pointing at themselves, and the number of steps from the roots to the
    deepest leaf. Children after their parent (as scikit-learn numbers them) make every path end."""
    starts = a["tree_starts"]
    sizes = np.diff(starts)
    tree_start = np.repeat(starts[:-1], sizes)
    local = np.arange(len(tree_start)) - tree_start
    own_size = np.repeat(sizes, sizes)
    split = ~a["is_leaf"]
    for side in ("left", "right"):
        child = a[side][split]
        if np.any(child <= local[split]) or np.any(child >= own_size[split]):
            raise MalformedModelError(f"a {side} child outside its tree or before its parent")
    if np.any(a["feature"] < 0) or np.any(a["feature"] >= n_features):  # leaves' too: every path reads one
        raise MalformedModelError("a feature index out of range")
    node = np.arange(len(tree_start))
    left = np.where(split, a["left"] + tree_start, node)
    right = np.where(split, a["right"] + tree_start, node)
    children = np.stack([right, left, np.where(a["missing_go_left"], left, right)], axis=1).ravel()
    levels, frontier = 0, starts[:-1]
    while True:
        frontier = frontier[split[frontier]]
        if not len(frontier):
            return children, levels
        frontier = np.concatenate([left[frontier], right[frontier]])
        levels += 1


def temperature_scaled(decision: np.ndarray, beta: np.float64) -> np.ndarray:
    """_TemperatureScaling.predict of scikit-learn, including its layout: the same operations on
    arrays of the same order give the same bits."""
    if decision.shape[1] == 1:  # binary: one score, logits (-x, x)
        logits = np.concatenate([-decision, decision], axis=1)
    elif np.all((decision >= 0) & (decision <= 1)) and np.all(np.isclose(decision.sum(axis=1), 1.0)):
        # _convert_to_logits reads a whole batch that looks like probabilities as probabilities
        logits = np.log(decision + 1e-12)
    else:
        logits = decision
    scaled = np.asarray(beta * logits, copy=True)
    scaled -= scaled.max(axis=1).reshape(-1, 1)
    np.exp(scaled, out=scaled)
    scaled /= scaled.sum(axis=1).reshape(-1, 1)
    scaled[(1.0 < scaled) & (scaled <= 1.0 + 1e-5)] = 1.0
    return scaled


def export(estimator) -> CompiledModel:
    """The CompiledModel of a fitted CalibratedClassifierCV(method="temperature") over one
    HistGradientBoostingClassifier (optionally inside FrozenEstimator); UnsupportedModelError
    for anything else, since the compiled format could not reproduce it."""
    from sklearn.calibration import CalibratedClassifierCV
    from sklearn.ensemble import HistGradientBoostingClassifier
    from sklearn.frozen import FrozenEstimator

    if not isinstance(estimator, CalibratedClassifierCV):
        raise UnsupportedModelError(f"cannot compile a {type(estimator).__name__}: the compiled format holds a "
                                    "CalibratedClassifierCV over a HistGradientBoostingClassifier")
    if estimator.method != "temperature":
        raise UnsupportedModelError(f"cannot compile calibration method {estimator.method!r}: only 'temperature'")
    if len(estimator.calibrated_classifiers_) != 1:
        raise UnsupportedModelError(f"cannot compile {len(estimator.calibrated_classifiers_)} calibrated "
                                    "classifiers: only one (ensemble=False or a FrozenEstimator)")
    calibrated = estimator.calibrated_classifiers_[0]
    boosted = calibrated.estimator
    if isinstance(boosted, FrozenEstimator):
        boosted = boosted.estimator
    if not isinstance(boosted, HistGradientBoostingClassifier):
        raise UnsupportedModelError(f"cannot compile a {type(boosted).__name__} under the calibration: "
                                    "only HistGradientBoostingClassifier")
    if boosted._preprocessor is not None or boosted.is_categorical_ is not None:
        raise UnsupportedModelError("cannot compile categorical features")
    if hasattr(boosted, "feature_names_in_"):
        raise UnsupportedModelError("cannot compile a model fitted on named columns (a DataFrame): "
                                    "it reorders its input by name")
    if list(calibrated.classes) != list(boosted.classes_) or list(estimator.classes_) != list(boosted.classes_):
        raise UnsupportedModelError("calibrated and boosted classes differ")
    trees = [predictor.nodes for iteration in boosted._predictors for predictor in iteration]
    if any(tree["is_categorical"].any() for tree in trees):
        raise UnsupportedModelError("cannot compile categorical splits")
    nodes = np.concatenate(trees)
    sizes = [len(tree) for tree in trees]
    arrays = {
        "format_version": np.array(FORMAT_VERSION, np.int64),
        "classes": np.array([str(c) for c in estimator.classes_]),
        "n_features": np.array(boosted.n_features_in_, np.int64),
        "baseline": np.asarray(boosted._baseline_prediction, np.float64).reshape(-1),
        "tree_starts": np.concatenate([[0], np.cumsum(sizes)]).astype(np.int64),
        "feature": nodes["feature_idx"].astype(np.int64),
        "threshold": nodes["num_threshold"].astype(np.float64),
        "missing_go_left": nodes["missing_go_to_left"].astype(bool),
        "left": nodes["left"].astype(np.int64),
        "right": nodes["right"].astype(np.int64),
        "is_leaf": nodes["is_leaf"].astype(bool),
        "value": nodes["value"].astype(np.float64),
        "temperature_beta": np.array(calibrated.calibrators[0].beta_, np.float64),
    }
    return CompiledModel.from_arrays(arrays)
