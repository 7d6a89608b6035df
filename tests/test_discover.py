"""Discovery: every file appears exactly once, typed by magic bytes, bad files get a reason."""

from __future__ import annotations

import zipfile

from corpusaudit.discover import discover, sniff_kind
from tests.conftest import pdf_with_rasters, png_bytes


def _by_name(docs):
    return {doc.path.split("/")[-1]: doc for doc in docs}


def test_magic_bytes_decide_the_type_not_the_extension(tmp_path):
    (tmp_path / "chart.pdf").write_bytes(png_bytes(20, 20))  # a PNG named .pdf
    (tmp_path / "report.bin").write_bytes(b"%PDF-1.7\n%junk")
    docs = _by_name(discover([str(tmp_path)], tmp_path / "scratch"))
    assert docs["chart.pdf"].kind == "png"
    assert docs["report.bin"].kind == "pdf"


def test_sniff_kind_signatures():
    # Signatures from the format specifications (PNG: RFC 2083; JPEG SOI marker; TIFF 6.0 header;
    # RIFF/WEBP container; GIF87a/89a; PDF 1.7 (ISO 32000-1) section 7.5.2 file header).
    assert sniff_kind(b"\x89PNG\r\n\x1a\nrest") == "png"
    assert sniff_kind(b"\xff\xd8\xff\xe0") == "jpeg"
    assert sniff_kind(b"II*\x00....") == "tiff"
    assert sniff_kind(b"MM\x00*....") == "tiff"
    assert sniff_kind(b"RIFF\x00\x00\x00\x00WEBPVP8 ") == "webp"
    assert sniff_kind(b"GIF89a") == "gif"
    assert sniff_kind(b"%PDF-1.4") == "pdf"
    assert sniff_kind(b"hello") == "unknown"


def test_bad_files_get_one_row_each_with_a_reason(tmp_path):
    good = pdf_with_rasters(tmp_path / "good.pdf", [150])
    (tmp_path / "empty.pdf").write_bytes(b"")
    (tmp_path / "notes.pdf").write_text("these are not PDF bytes")
    (tmp_path / "truncated.pdf").write_bytes(good.read_bytes()[:300])
    (tmp_path / "readme.txt").write_text("plain text")
    docs = discover([str(tmp_path)], tmp_path / "scratch")
    assert len(docs) == 5
    rows = _by_name(docs)
    assert rows["empty.pdf"].status == "error" and "empty" in rows["empty.pdf"].error
    assert rows["notes.pdf"].status == "error" and "not a PDF" in rows["notes.pdf"].error
    assert rows["readme.txt"].status == "skipped"
    assert rows["truncated.pdf"].kind == "pdf"  # typed as PDF; extraction reports it broken
    assert rows["good.pdf"].status == "ok" and len(rows["good.pdf"].sha256) == 64


def test_duplicates_are_reported_once_and_listed(tmp_path):
    data = png_bytes(30, 30)
    (tmp_path / "a.png").write_bytes(data)
    (tmp_path / "b.png").write_bytes(data)
    docs = discover([str(tmp_path)], tmp_path / "scratch")
    statuses = sorted((doc.status, doc.error.split(" of ")[0]) for doc in docs)
    assert statuses == [("ok", ""), ("skipped", "duplicate")]
    assert len({doc.document_id for doc in docs}) == 2


def test_zip_members_are_read_in_scratch_and_cannot_escape(tmp_path):
    archive = tmp_path / "deposit.zip"
    with zipfile.ZipFile(archive, "w") as zf:
        zf.writestr("figures/one.png", png_bytes(40, 40, 1))
        zf.writestr("../escape.png", png_bytes(40, 40, 2))
        zf.writestr("/abs/escape.png", png_bytes(40, 40, 3))
    scratch = tmp_path / "scratch"
    docs = discover([str(archive)], scratch)
    rows = {doc.path: doc for doc in docs}
    assert rows[f"{archive}!figures/one.png"].status == "ok"
    assert rows[f"{archive}!figures/one.png"].local_path.startswith(str(scratch))
    assert rows[f"{archive}!../escape.png"].status == "skipped"
    assert rows[f"{archive}!/abs/escape.png"].status == "skipped"
    assert not (tmp_path / "escape.png").exists()


def test_zip_bomb_member_is_refused(tmp_path):
    archive = tmp_path / "bomb.zip"
    with zipfile.ZipFile(archive, "w", compression=zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("zeros.pdf", b"\0" * (20 * 1024 * 1024))  # ~1000:1 compression
    docs = discover([str(archive)], tmp_path / "scratch")
    assert [d.status for d in docs] == ["skipped"]
    assert "compressed" in docs[0].error


def test_missing_input_and_symlink_loop(tmp_path):
    (tmp_path / "sub").mkdir()
    (tmp_path / "sub" / "loop").symlink_to(tmp_path / "sub", target_is_directory=True)
    (tmp_path / "dangling.pdf").symlink_to(tmp_path / "nowhere.pdf")
    docs = discover([str(tmp_path), str(tmp_path / "absent.pdf")], tmp_path / "scratch")
    rows = _by_name(docs)
    assert rows["absent.pdf"].status == "error"
    assert rows["dangling.pdf"].status == "error"
    assert "loop" not in rows  # directory links are not followed
