"""Discover: turn command-line inputs into Documents, one per input file.

Directories are walked recursively (symbolic links to directories are not followed, so
link loops cannot trap the walk), .zip archives are opened member by member into a
scratch folder under caps, and the type of every file comes from its first bytes.
Every file seen yields exactly one Document; the ones that cannot be audited carry
status error or skipped with a one-line reason.
"""

from __future__ import annotations

import hashlib
import os
import shutil
import stat
import zipfile
from dataclasses import dataclass
from pathlib import Path, PurePosixPath

from corpusaudit.model import Document

AUDITABLE_KINDS = ("pdf", "png", "jpeg", "tiff", "webp", "gif")
KIND_EXTENSIONS = {
    ".pdf": "pdf", ".png": "png", ".jpg": "jpeg", ".jpeg": "jpeg", ".tif": "tiff",
    ".tiff": "tiff", ".webp": "webp", ".gif": "gif", ".zip": "zip",
}


@dataclass(frozen=True)
class ArchiveLimits:
    max_members: int = 10_000
    max_member_bytes: int = 512 * 1024**2
    max_total_bytes: int = 4 * 1024**3
    max_ratio: float = 200.0  # uncompressed / compressed: beyond this a member is a bomb


def sniff_kind(head: bytes) -> str:
    """File type from magic bytes."""
    if head.startswith(b"\x89PNG\r\n\x1a\n"):
        return "png"
    if head.startswith(b"\xff\xd8\xff"):
        return "jpeg"
    if head[:4] in (b"II*\x00", b"MM\x00*"):
        return "tiff"
    if head[:4] == b"RIFF" and head[8:12] == b"WEBP":
        return "webp"
    if head[:6] in (b"GIF87a", b"GIF89a"):
        return "gif"
    if head[:4] in (b"PK\x03\x04", b"PK\x05\x06"):
        return "zip"
    if b"%PDF-" in head[:1024]:  # the header may follow a few junk bytes
        return "pdf"
    return "unknown"


def _hash_file(path: Path) -> tuple[str, int]:
    digest = hashlib.sha256()
    size = 0
    with path.open("rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
            size += len(block)
    return digest.hexdigest(), size


def _id_for_path(display: str) -> str:
    return "x" + hashlib.sha256(display.encode("utf-8", "surrogateescape")).hexdigest()[:11]


def printable_path(name: str) -> str:
    """A path as text: bytes that are not UTF-8 (kept as surrogates by the OS layer) become \\xNN."""
    return os.fsencode(name).decode("utf-8", "backslashreplace")


def _problem(display: str, status: str, reason: str, size: int = 0, sha: str = "") -> Document:
    return Document(document_id=_id_for_path(display), path=display, sha256=sha, bytes=size,
                    kind="unknown", status=status, error=reason)


def _describe_file(local: Path, display: str) -> Document:
    """One Document for one regular file, typed by its magic bytes."""
    try:
        with local.open("rb") as handle:
            head = handle.read(1024)
        sha, size = _hash_file(local)
    except OSError as exc:
        return _problem(display, "error", f"unreadable: {exc.strerror or exc}")
    if size == 0:
        return _problem(display, "error", "empty file (0 bytes)", 0, sha)
    kind = sniff_kind(head)
    doc = Document(document_id=sha[:12], path=display, sha256=sha, bytes=size, kind=kind,
                   local_path=str(local))
    expected = KIND_EXTENSIONS.get(local.suffix.lower()) or KIND_EXTENSIONS.get(
        PurePosixPath(display).suffix.lower())
    if kind == "unknown":
        if expected:
            doc.status, doc.error = "error", f"not a {expected.upper()} file: unrecognised content"
        else:
            doc.status, doc.error = "skipped", "unsupported file type (not a PDF or image)"
    return doc


def _safe_member_name(name: str) -> str | None:
    """The member's path if it stays inside the archive folder, else None."""
    if "\x00" in name or name.startswith(("/", "\\")) or (len(name) > 1 and name[1] == ":"):
        return None
    parts = PurePosixPath(name.replace("\\", "/")).parts
    if any(part == ".." for part in parts) or not parts:
        return None
    return "/".join(parts)


def _open_archive(local: Path, display: str, scratch: Path, limits: ArchiveLimits) -> list[Document]:
    """Documents for the members of a zip archive, copied under scratch with capped sizes."""
    try:
        archive = zipfile.ZipFile(local)
    except (zipfile.BadZipFile, OSError) as exc:
        return [_problem(display, "error", f"unreadable zip archive: {exc}")]
    docs: list[Document] = []
    total = 0
    target_dir = scratch / f"zip-{_id_for_path(display)}"
    with archive:
        members = [info for info in archive.infolist() if not info.is_dir()]
        if len(members) > limits.max_members:
            return [_problem(display, "error",
                             f"zip archive has {len(members)} members (limit {limits.max_members})")]
        for number, info in enumerate(members):
            member_display = f"{display}!{info.filename}"
            safe = _safe_member_name(info.filename)
            if safe is None:
                docs.append(_problem(member_display, "skipped", "unsafe member path (escapes the archive folder)"))
                continue
            ratio = info.file_size / max(info.compress_size, 1)
            if info.file_size > limits.max_member_bytes or (ratio > limits.max_ratio and info.file_size > 1 << 20):
                docs.append(_problem(member_display, "skipped",
                                     f"member too large or too compressed ({info.file_size} bytes, ratio {ratio:.0f}:1)"))
                continue
            if total + info.file_size > limits.max_total_bytes:
                docs.append(_problem(member_display, "skipped", "archive size cap reached"))
                continue
            target_dir.mkdir(parents=True, exist_ok=True)
            target = target_dir / f"{number:05d}{PurePosixPath(safe).suffix[:8]}"
            try:
                with archive.open(info) as src, target.open("wb") as dst:
                    # Copy at most the declared size + 1 byte: a lying header cannot inflate past it.
                    copied = _copy_capped(src, dst, info.file_size + 1)
            except (zipfile.BadZipFile, OSError, RuntimeError, NotImplementedError) as exc:
                docs.append(_problem(member_display, "error", f"unreadable archive member: {exc}"))
                continue
            total += copied
            if copied > info.file_size:
                docs.append(_problem(member_display, "skipped", "member larger than its header states"))
                continue
            member = _describe_file(target, member_display)
            if member.kind == "zip":
                member.status, member.error = "skipped", "nested archive not opened"
            docs.append(member)
    return docs


def _copy_capped(src, dst, cap: int) -> int:
    copied = 0
    while copied < cap:
        block = src.read(min(1 << 20, cap - copied))
        if not block:
            break
        dst.write(block)
        copied += len(block)
    return copied


def _walk(root: Path, display_root: str, exclude: Path | None) -> list[tuple[Path, str]]:
    """Regular files under root (sorted), without following directory links or entering exclude."""
    found: list[tuple[Path, str]] = []
    for dirpath, dirnames, filenames in os.walk(root, followlinks=False):
        if exclude is not None:
            dirnames[:] = [d for d in dirnames if not _same_dir(Path(dirpath) / d, exclude)]
        dirnames.sort()
        for name in sorted(filenames):
            local = Path(dirpath) / name
            rel = os.path.relpath(local, root)
            found.append((local, printable_path(os.path.join(display_root, rel))))
    return found


def _same_dir(a: Path, b: Path) -> bool:
    try:
        return a.resolve() == b.resolve()
    except OSError:
        return False


def discover(inputs: list[str], scratch: Path, limits: ArchiveLimits = ArchiveLimits(),
             exclude: Path | None = None) -> list[Document]:
    """Documents for every file reachable from inputs; duplicates by sha256 are skipped rows.

    exclude is a folder never entered (the output folder, when it lies inside an input)."""
    candidates: list[tuple[Path, str]] = []
    docs: list[Document] = []
    for given in inputs:
        path = Path(given)
        if path.is_dir():
            candidates.extend(_walk(path, given, exclude))
        elif path.exists() or path.is_symlink():
            candidates.append((path, printable_path(given)))
        else:
            docs.append(_problem(printable_path(given), "error", "no such file or directory"))
    for local, display in candidates:
        try:
            mode = local.stat().st_mode
        except OSError as exc:
            docs.append(_problem(display, "error", f"unreadable: {exc.strerror or exc} (broken or looping link?)"))
            continue
        if not stat.S_ISREG(mode):
            docs.append(_problem(display, "skipped", "not a regular file"))
            continue
        doc = _describe_file(local, display)
        if doc.kind == "zip" and doc.status == "ok":
            docs.extend(_open_archive(local, display, scratch, limits))
        else:
            docs.append(doc)
    return _mark_duplicates(docs)


def _mark_duplicates(docs: list[Document]) -> list[Document]:
    first_by_sha: dict[str, Document] = {}
    for doc in docs:
        if doc.status != "ok":
            continue
        first = first_by_sha.setdefault(doc.sha256, doc)
        if first is not doc:
            doc.document_id = _id_for_path(doc.path)
            doc.status, doc.error = "skipped", f"duplicate of {first.path}"
    return docs


def clear_scratch(scratch: Path) -> None:
    shutil.rmtree(scratch, ignore_errors=True)
