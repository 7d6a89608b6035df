"""Generators of broken and hostile inputs, each built in code (nothing downloaded)."""

from __future__ import annotations

import struct
import zipfile
import zlib
from pathlib import Path

import pymupdf

from tests.conftest import pdf_with_rasters


def _png_chunk(kind: bytes, data: bytes) -> bytes:
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)


def decompression_bomb_png(path: Path, side: int = 100_000) -> Path:
    """A valid-looking PNG header declaring side x side pixels (PNG spec, RFC 2083: IHDR layout)."""
    header = struct.pack(">IIBBBBB", side, side, 8, 2, 0, 0, 0)
    idat = zlib.compress(b"\0" * 1024)
    path.write_bytes(b"\x89PNG\r\n\x1a\n" + _png_chunk(b"IHDR", header) + _png_chunk(b"IDAT", idat)
                     + _png_chunk(b"IEND", b""))
    return path


def encrypted_pdf(path: Path, user_password: str) -> Path:
    source = pdf_with_rasters(path.with_suffix(".plain.pdf"), [200])
    doc = pymupdf.open(source)
    doc.save(path, encryption=pymupdf.PDF_ENCRYPT_AES_256, user_pw=user_password, owner_pw=user_password + "-owner")
    doc.close()
    source.unlink()
    return path


def broken_xref_pdf(path: Path) -> Path:
    good = pdf_with_rasters(path.with_suffix(".plain.pdf"), [200]).read_bytes()
    path.with_suffix(".plain.pdf").unlink()
    head, _, tail = good.rpartition(b"startxref")
    path.write_bytes(head + b"startxref\n99999999\n%%EOF\n")
    return path


def many_pages_pdf(path: Path, pages: int) -> Path:
    doc = pymupdf.open()
    for _ in range(pages):
        doc.new_page(width=200, height=200)
    doc.save(path)
    return path


def many_paths_pdf(path: Path, paths: int) -> Path:
    """One page drawing `paths` tiny filled rectangles, written straight into the content stream."""
    doc = pymupdf.open()
    page = doc.new_page()
    operators = b"".join(b"%d %d 0.5 0.5 re f\n" % (i % 500, (i // 500) % 800) for i in range(paths))
    xref = doc.get_new_xref()
    doc.update_object(xref, "<<>>")
    doc.update_stream(xref, operators)
    page.set_contents(xref)
    doc.save(path, deflate=True)
    return path


def zip_bomb(path: Path, megabytes: int = 64) -> Path:
    with zipfile.ZipFile(path, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("report.pdf", b"%PDF-1.7\n" + b"\0" * (megabytes * 2**20))
    return path


def escaping_zip(path: Path, member: bytes) -> Path:
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr("../../outside.pdf", member)
        archive.writestr("/etc/absolute.pdf", member)
        archive.writestr("inside/fine.pdf", member)
    return path
