"""Saving and loading the classifier safely: a .npz of plain numeric and string arrays (the
compiled model, corpusaudit/classify/compiled.py) and a JSON metadata file next to it that
records the file's sha256, the classes and the feature version.

The arrays are read with allow_pickle=False, so loading a model file can never run code.
"""

from __future__ import annotations

import hashlib
import json
import zipfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from . import features
from .compiled import CompiledModel, MalformedModelError

# A fixed time stamp in the archive: the same model always gives the same bytes (and sha256).
ARCHIVE_TIME = (1980, 1, 1, 0, 0, 0)


class ModelIntegrityError(RuntimeError):
    """A model file is missing its metadata, does not match its recorded hash, is not a compiled
    model, or was made for other features: it is refused rather than loaded."""


@dataclass(frozen=True)
class LoadedModel:
    model: CompiledModel
    metadata: dict


def sha256_of(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def metadata_path(model_path: Path) -> Path:
    return model_path.with_suffix(".json")


def write_arrays(arrays: dict[str, np.ndarray], path: Path) -> None:
    """An .npz numpy.load reads, written entry by entry so that no time stamp enters the file."""
    with zipfile.ZipFile(path, "w") as archive:
        for name in sorted(arrays):
            entry = zipfile.ZipInfo(f"{name}.npy", date_time=ARCHIVE_TIME)
            entry.compress_type = zipfile.ZIP_DEFLATED
            with archive.open(entry, "w") as fh:
                np.lib.format.write_array(fh, np.asarray(arrays[name], order="C"), allow_pickle=False)


def save(model: CompiledModel, path: Path, metadata: dict) -> dict:
    """Write the compiled model (.npz) and its metadata (JSON with the file's sha256); return the metadata."""
    path.parent.mkdir(parents=True, exist_ok=True)
    write_arrays(model.arrays, path)
    meta = dict(metadata, sha256=sha256_of(path), file=path.name, bytes=path.stat().st_size)
    metadata_path(path).write_text(json.dumps(meta, indent=2, sort_keys=True) + "\n")
    return meta


def read_arrays(path: Path) -> dict[str, np.ndarray]:
    """Every array of an .npz, never unpickling; ModelIntegrityError for anything else."""
    if not zipfile.is_zipfile(path):
        raise ModelIntegrityError(f"{path.name} is not a compiled model file (.npz)")
    try:
        with np.load(path, allow_pickle=False) as archive:
            return {name: archive[name] for name in archive.files}
    except ValueError as exc:  # numpy refuses object arrays when pickling is off
        raise ModelIntegrityError(f"{path.name} holds an array that cannot be read as plain data: {exc}") from exc
    except (OSError, zipfile.BadZipFile, EOFError) as exc:
        raise ModelIntegrityError(f"{path.name} could not be read as an .npz: {exc}") from exc


def load(path: Path) -> LoadedModel:
    """Load a model after checking its metadata, its hash and its arrays; ModelIntegrityError if any fails."""
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
    arrays = read_arrays(path)
    try:
        model = CompiledModel.from_arrays(arrays)
    except MalformedModelError as exc:
        raise ModelIntegrityError(f"{path.name} is not a valid compiled model: {exc}") from exc
    if list(model.classes) != list(meta.get("classes", [])):
        raise ModelIntegrityError(
            f"{path.name} predicts {list(model.classes)}, its metadata says {meta.get('classes')}")
    if "feature_count" in meta and meta["feature_count"] != model.n_features:
        raise ModelIntegrityError(f"{path.name} reads {model.n_features} features, "
                                  f"its metadata says {meta['feature_count']}")
    return LoadedModel(model, meta)
