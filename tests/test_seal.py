"""calcdoc sign and the signature check of calcdoc verify, with throw-away keys made in the test's
folder. What a signature must prove comes from PAdES (ETSI EN 319 142-1) and ISO 32000-1 §12.8:
the signed byte range covers the whole file except the signature value, any change inside it
breaks the digest, and an incremental update appended later is judged by what it changes.
pyHanko's own validator is the reference for the cryptography; the tests attack the file with
pypdf, a second, independent PDF library."""

from __future__ import annotations

import io
import json
import re
import shutil

import pytest
from pypdf import PdfReader, PdfWriter

from calcdoc.cli import main
from calcdoc.seal import ENV_PASSPHRASE
from conftest import write_project
from signing import PASSPHRASE, make_key

SHEET = """\
id: F1
title: Fabric loss
blocks:
  - id: loss
    kind: formula
    given:
      U: 0.25 W/(m^2*K)
      A: {value: 100 m^2, source: Drawing A-101 (example)}
      dT: 20 K
    steps:
      - {name: Q, expr: "U * A * dT", unit: kW, label: Fabric loss}
    checks:
      - {result: Q, at_most: 0.6 kW, source: Heater capacity (example)}
"""

SEAL_OK = ("signature calcdoc-seal: the signed byte range is intact and covers the whole file "
           "except the signature")


@pytest.fixture(scope="module")
def package_bytes(tmp_path_factory):
    folder = tmp_path_factory.mktemp("seal")
    root = write_project(folder / "proj", {"f1": SHEET})
    assert main(["build", str(root), "--out", str(folder / "out")]) == 0
    return (folder / "out" / "package.pdf").read_bytes()


@pytest.fixture(scope="module")
def key_folder(tmp_path_factory):
    folder = tmp_path_factory.mktemp("keys")
    make_key(folder)
    return folder


@pytest.fixture
def package(tmp_path, package_bytes):
    path = tmp_path / "package.pdf"
    path.write_bytes(package_bytes)
    return path


@pytest.fixture
def key(tmp_path, key_folder):
    return shutil.copy(key_folder / "engineer.p12", tmp_path / "engineer.p12")


@pytest.fixture
def passphrase(monkeypatch):
    monkeypatch.setenv(ENV_PASSPHRASE, PASSPHRASE)


@pytest.fixture
def signed(tmp_path, package, key, passphrase, capsys):
    out = tmp_path / "signed.pdf"
    assert main(["sign", str(package), "--key", str(key), "--out", str(out)]) == 0
    capsys.readouterr()
    return out


def verify(path, capsys) -> tuple[int, str]:
    status = main(["verify", str(path)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err
    return status, captured.out


def incremental_update(path, change) -> bytes:
    """Append an incremental update made by pypdf, in which ``change(writer)`` edits the
    document; return the new file (the signed bytes stay as they were, in front)."""
    original = path.read_bytes()
    writer = PdfWriter(io.BytesIO(original), incremental=True)
    change(writer)
    buffer = io.BytesIO()
    writer.write(buffer)
    data = buffer.getvalue()
    assert data.startswith(original)
    return data


def attached_stream(writer, name):
    tree = writer._root_object["/Names"]["/EmbeddedFiles"]["/Names"]
    index = list(tree).index(name)
    return tree[index + 1].get_object()["/EF"]["/F"].get_object()


# ----------------------------------------------------------------------------- sign and verify


def test_sign_then_verify__names_the_signer_and_the_whole_file_is_covered(
        tmp_path, package, key, passphrase, capsys):
    original = package.read_bytes()
    out = tmp_path / "signed.pdf"
    assert main(["sign", str(package), "--key", str(key), "--out", str(out)]) == 0
    assert capsys.readouterr().out == (f"signed {package} as A. Engineer (signature field "
                                       f"calcdoc-seal): wrote {out}\n")
    assert package.read_bytes() == original
    # an incremental update: the package's bytes, unchanged, then the signing revision
    assert out.read_bytes().startswith(original)
    status, text = verify(out, capsys)
    assert status == 0
    lines = text.splitlines()
    assert re.fullmatch(r"signature calcdoc-seal: signed by A\. Engineer on \d{4}-\d\d-\d\d "
                        r"\d\d:\d\d UTC \(the time the signer's computer stated\); the "
                        r"certificate is not checked against a trust list", lines[0])
    assert lines[1] == SEAL_OK
    assert lines[2] == (f"{out}: verified — the signatures hold (see above) and a fresh "
                        f"evaluation of the attached inputs gives the attached results")


def test_signed_copy__keeps_the_attachments_and_the_pdf_a_identification(package, signed):
    before, after = PdfReader(package), PdfReader(signed)
    assert after.attachments == before.attachments
    assert set(after.attachments) == {"project.yaml", "sheets/f1.yaml", "results.json"}
    xmp = after.trailer["/Root"]["/Metadata"].get_object().get_data().decode("utf-8")
    # ISO 19005-3 §6.6.4: PDF/A-3, conformance B, still declared after signing
    assert 'pdfaid:part="3"' in xmp and 'pdfaid:conformance="B"' in xmp
    signature = after.trailer["/Root"]["/AcroForm"]["/Fields"][0].get_object()["/V"]
    # PAdES (ETSI EN 319 142-1 §5.1): a CAdES detached signature
    assert signature["/SubFilter"] == "/ETSI.CAdES.detached"
    start, length, resume, rest = signature["/ByteRange"]
    # ISO 32000-1 §12.8.1: the range covers everything but the signature value itself
    assert start == 0 and resume + rest == signed.stat().st_size
    assert resume - length == len(signature["/Contents"]) * 2 + 2  # the hex string with <>


def test_verify_of_a_signed_pdf__still_re_evaluates_the_attached_inputs(
        tmp_path, package, key, passphrase, capsys):
    def change_results(writer):
        stream = attached_stream(writer, "results.json")
        doc = json.loads(stream.get_data())
        doc["sheets"][0]["blocks"][0]["results"]["Q"]["si"] = 400.0
        stream.set_data(json.dumps(doc).encode())
    # a package whose attached results were changed before it was signed: the signature holds,
    # the re-evaluation does not
    package.write_bytes(incremental_update(package, change_results))
    out = tmp_path / "signed.pdf"
    assert main(["sign", str(package), "--key", str(key), "--out", str(out)]) == 0
    capsys.readouterr()
    status, text = verify(out, capsys)
    assert status == 1
    assert SEAL_OK in text.splitlines()
    # 0.25 × 100 × 20 = 500 W (hand calculation)
    assert "~ F1.loss.Q: 400.0 → 500.0" in text.splitlines()


def test_unsigned_package__verifies_as_before(package, capsys):
    status, text = verify(package, capsys)
    assert status == 0
    assert text == (f"{package}: verified — a fresh evaluation of the attached inputs gives the "
                    f"attached results (the pages themselves are covered by no digest: verify "
                    f"the build folder's manifest for that)\n")


def test_second_signature__both_named_the_first_covers_its_revision(
        tmp_path, signed, passphrase, capsys):
    checker = make_key(tmp_path, "B. Checker", name="checker.p12")
    twice = tmp_path / "twice.pdf"
    assert main(["sign", str(signed), "--key", str(checker), "--out", str(twice)]) == 0
    assert "as B. Checker (signature field calcdoc-seal-2)" in capsys.readouterr().out
    status, text = verify(twice, capsys)
    assert status == 0
    assert "signed by A. Engineer" in text and "signed by B. Checker" in text
    assert ("signature calcdoc-seal: the signed byte range is intact and covers its revision; "
            "what follows it only adds the signature(s) calcdoc-seal-2") in text.splitlines()
    assert ("signature calcdoc-seal-2: the signed byte range is intact and covers the whole "
            "file except the signature") in text.splitlines()


def test_ec_key__the_signed_copy_stays_pdf_1_7(tmp_path, package, passphrase, capsys):
    key = make_key(tmp_path, kind="ec")
    out = tmp_path / "signed.pdf"
    assert main(["sign", str(package), "--key", str(key), "--out", str(out)]) == 0
    # PDF/A-3 is based on PDF 1.7 (ISO 19005-3 §6.1.2): the catalog may not claim 2.0
    assert PdfReader(out).trailer["/Root"].get("/Version", "/1.7") == "/1.7"
    assert verify(out, capsys)[0] == 0


# ----------------------------------------------------------------------------- tampering


def drawing_of(page):
    """The (reference to the) stream that draws a page: its /Contents, or, on a page of a
    package typeset in parts (calcdoc/render/parts.py: [save, drawing, restore and page
    number]), the part's own drawing."""
    contents = page.get_object().raw_get("/Contents")
    if isinstance(contents.get_object(), list):
        return contents.get_object()[1]
    return contents


def test_byte_changed_inside_the_signed_range__exit_1(signed, capsys):
    data = bytearray(signed.read_bytes())
    reader = PdfReader(signed)
    contents = drawing_of(reader.pages[0])
    offset = reader.xref[0][contents.idnum]  # a stream stands outside any object stream
    at = data.index(b"stream", offset) + 40
    assert at < reader.trailer["/Root"]["/AcroForm"]["/Fields"][0].get_object()["/V"][
        "/ByteRange"][1]
    data[at] ^= 0x01  # one bit of the first page's drawing
    signed.write_bytes(bytes(data))
    status, text = verify(signed, capsys)
    assert status == 1
    assert ("seal: signature calcdoc-seal: the signed byte range is not intact: the file was "
            "changed inside it after signing") in text.splitlines()
    assert text.splitlines()[-1] == f"{signed}: NOT verified — 1 difference(s) listed above"


def _change_page(writer):
    stream = drawing_of(writer.pages[0]).get_object()
    stream.set_data(stream.get_data().replace(b"T-001", b"T-002"))


def _change_attachment(writer):
    stream = attached_stream(writer, "sheets/f1.yaml")
    stream.set_data(stream.get_data().replace(b"dT: 20 K", b"dT: 10 K"))


@pytest.mark.parametrize("change, changed", [(_change_page, ".Root.Pages.Kids[0].Contents"),
                                             (_change_attachment, "EmbeddedFiles")])
def test_update_appended_after_signing_that_changes_a_page_or_an_attachment__exit_1(
        signed, capsys, change, changed):
    signed.write_bytes(incremental_update(signed, change))
    status, text = verify(signed, capsys)
    assert status == 1
    (line,) = [line for line in text.splitlines() if line.startswith("seal:")]
    assert line.startswith("seal: signature calcdoc-seal: an update appended after the "
                           "signature changes the document (changed: ")
    assert changed in line


def test_signature_removed_by_a_later_update__exit_1(signed, capsys):
    def remove(writer):
        del writer._root_object["/AcroForm"]
        del writer.pages[0]["/Annots"]
    signed.write_bytes(incremental_update(signed, remove))
    status, text = verify(signed, capsys)
    assert status == 1
    assert ("seal: the file holds signature data, but no signature field of its last revision "
            "refers to it (a signature removed or hidden by a later update)") in text.splitlines()


def test_bytes_appended_that_change_nothing__reported_not_refused(signed, capsys):
    signed.write_bytes(signed.read_bytes() + b"\n% a comment added after the signature\n")
    status, text = verify(signed, capsys)
    assert status == 0
    assert ("signature calcdoc-seal: the signed byte range is intact and covers its revision; "
            "what follows it changes nothing in the document") in text.splitlines()


def test_signer_name_with_terminal_control_characters__printed_harmlessly(
        tmp_path, package, passphrase, capsys):
    key = make_key(tmp_path, "Eve\x1b[2J\x07")
    out = tmp_path / "signed.pdf"
    assert main(["sign", str(package), "--key", str(key), "--out", str(out)]) == 0
    capsys.readouterr()
    status, text = verify(out, capsys)
    assert status == 0 and "\x1b" not in text and "\x07" not in text
    assert "signed by Eve?[2J?" in text


# ----------------------------------------------------------------------------- refused (exit 2)


def refused(args, capsys, tmp_path) -> str:
    before = {p: p.read_bytes() for p in tmp_path.rglob("*") if p.is_file()}
    assert main(args) == 2
    after = {p: p.read_bytes() for p in tmp_path.rglob("*") if p.is_file()}
    assert after == before  # nothing written, nothing changed
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    assert captured.err.endswith("calcdoc: 1 error; nothing written\n")
    return captured.err.splitlines()[0]


def test_wrong_passphrase__exit_2_nothing_written(tmp_path, package, key, monkeypatch, capsys):
    monkeypatch.setenv(ENV_PASSPHRASE, "not the passphrase")
    message = refused(["sign", str(package), "--key", str(key), "--out",
                       str(tmp_path / "signed.pdf")], capsys, tmp_path)
    assert message == (f"{key}: error: wrong passphrase for the signing key (expected the "
                       f"passphrase that opens the key file, in {ENV_PASSPHRASE}, got one that "
                       f"does not open it)")


def test_missing_passphrase__exit_2_nothing_written(tmp_path, package, key, monkeypatch, capsys):
    monkeypatch.delenv(ENV_PASSPHRASE, raising=False)
    message = refused(["sign", str(package), "--key", str(key), "--out",
                       str(tmp_path / "signed.pdf")], capsys, tmp_path)
    assert message == (f"{key}: error: no passphrase for the signing key (expected the "
                       f"passphrase in the environment variable {ENV_PASSPHRASE}, got the "
                       f"variable not set)")


@pytest.mark.parametrize("content, message", [
    (b"not a key at all", "not a signing key file (expected a PKCS#12 file (.p12 or .pfx) with "
                          "the private key and its certificate, got a file that is not PKCS#12)"),
    (None, "not a regular file (expected a file, got a link, a folder or nothing)"),
])
def test_unreadable_key__exit_2_nothing_written(tmp_path, package, passphrase, capsys,
                                                content, message):
    key = tmp_path / "broken.p12"
    if content is not None:
        key.write_bytes(content)
    text = refused(["sign", str(package), "--key", str(key), "--out",
                    str(tmp_path / "signed.pdf")], capsys, tmp_path)
    assert text == f"{key}: error: {message}"


def test_expired_certificate__exit_2_nothing_written(tmp_path, package, passphrase, capsys):
    key = make_key(tmp_path, days_valid=(-60, -30), name="old.p12")
    text = refused(["sign", str(package), "--key", str(key), "--out",
                    str(tmp_path / "signed.pdf")], capsys, tmp_path)
    assert text.startswith(f"{key}: error: the certificate is not valid now (expected a "
                           f"certificate valid on ")


def test_out_is_the_package__exit_2_nothing_written(tmp_path, package, key, passphrase, capsys):
    text = refused(["sign", str(package), "--key", str(key), "--out", str(package)],
                   capsys, tmp_path)
    assert text == (f"{package}: error: the signed copy would replace the package (expected "
                    f"--out naming a new file beside the package, got the package itself)")


def test_out_is_a_file_not_written_by_calcdoc__exit_2_file_kept(
        tmp_path, package, key, passphrase, capsys):
    mine = tmp_path / "report.pdf"
    mine.write_bytes(b"%PDF-1.4 the engineer's own file")
    text = refused(["sign", str(package), "--key", str(key), "--out", str(mine)],
                   capsys, tmp_path)
    assert text == (f"{mine}: error: an existing file not written by calcdoc (expected --out "
                    f"naming a new file or a PDF written by calcdoc, got another file, left as "
                    f"it is)")


def test_out_is_an_earlier_signed_copy__replaced(tmp_path, package, key, signed, capsys):
    assert main(["sign", str(package), "--key", str(key), "--out", str(signed)]) == 0
    assert verify(signed, capsys)[0] == 0


def test_sign_of_a_pdf_that_is_no_calcdoc_package__exit_2(tmp_path, key, passphrase, capsys):
    writer = PdfWriter()
    writer.add_blank_page(100, 100)
    other = tmp_path / "other.pdf"
    with open(other, "wb") as handle:
        writer.write(handle)
    text = refused(["sign", str(other), "--key", str(key), "--out", str(tmp_path / "s.pdf")],
                   capsys, tmp_path)
    assert text == (f"{other}: error: not a calcdoc package (expected a PDF with results.json "
                    f"attached, got no results.json attached)")


def test_verify_of_a_signature_value_overwritten_with_zeros__exit_2(signed, capsys):
    data = signed.read_bytes()
    start = data.rindex(b"/Contents <") + len(b"/Contents <")
    end = data.index(b">", start)
    signed.write_bytes(data[:start] + b"0" * (end - start) + data[end:])
    before = set(signed.parent.iterdir())
    assert main(["verify", str(signed)]) == 2
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err and set(signed.parent.iterdir()) == before
    assert captured.err.startswith(f"{signed}: error: ")
    assert "(expected a PDF signed as calcdoc sign signs it, got " in captured.err


def test_sign_of_a_signed_copy_changed_after_signing__exit_2(tmp_path, signed, key, capsys):
    signed.write_bytes(incremental_update(signed, _change_page))
    text = refused(["sign", str(signed), "--key", str(key), "--out", str(tmp_path / "s2.pdf")],
                   capsys, tmp_path)
    assert text.startswith(f"{signed}: error: a signed package whose signature does not hold "
                           f"(expected an unsigned package or one whose signatures verify, got "
                           f"signature calcdoc-seal: an update appended after the signature "
                           f"changes the document (changed: ")
