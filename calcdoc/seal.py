"""The digital seal of a calculation package: a PAdES signature added with pyHanko, and its check.

``calcdoc sign`` adds the signature as an incremental update: the package's bytes stay as they
were, followed by a new revision that holds an invisible signature field, so the PDF/A-3
structure and the attached inputs are untouched. ``calcdoc verify`` asks :func:`check_seal`
what the signatures of a PDF say: who signed (the certificate's subject common name), whether
each signed byte range is intact and what it covers, and whether anything appended after a
signature changes the document. A signed PDF is a stranger's file like any other: sizes are
bounded, and what cannot be read is refused (exit 2), never a traceback.

Trust is not checked: no certificate is compared with a trust list or checked for revocation
(that needs the firm's or the authority's list, and a network). A signature by a certificate
nobody vouches for is reported as information, with the signer's name as the certificate
states it.
"""

from __future__ import annotations

import datetime
import io
import logging
import os
import re
import struct
import tempfile
import zlib
from dataclasses import dataclass, field
from pathlib import Path

from calcdoc.errors import InputError, InputErrors, Location

__all__ = ["ENV_PASSPHRASE", "FIELD_NAME", "MAX_KEY_BYTES", "MAX_SIGNATURES", "Sealed",
           "SealReport", "passphrase_from_environment", "sign_package", "check_seal",
           "check_seal_data"]

ENV_PASSPHRASE = "CALCDOC_KEY_PASSPHRASE"
"""The environment variable that holds the signing key's passphrase (never an argument: the
command line of a process is visible to every user of the machine)."""

FIELD_NAME = "calcdoc-seal"
"""Name of the signature field ``calcdoc sign`` adds (``calcdoc-seal-2`` for a second one)."""

MAX_KEY_BYTES = 1024 * 1024
"""Largest signing key file (PKCS#12) read: a key with its certificate chain is a few KiB."""

MAX_SIGNATURES = 20
"""Most signatures of one PDF that verify checks."""

# A signature dictionary's /ByteRange must stand in the file as plain bytes (its offsets point
# into the file), so a PDF without it has no signature to check and verifies as before.
_SIGNATURE_MARK = re.compile(rb"/ByteRange\s*\[")

# What pyHanko, asn1crypto and zlib raise on a malformed file: such a file is unreadable (exit 2).
_UNREADABLE = (ValueError, KeyError, TypeError, AttributeError, IndexError, AssertionError,
               RecursionError, OverflowError, UnicodeError, zlib.error, struct.error,
               NotImplementedError, LookupError)


def _refuse(label: str, what: str, expected: str, got: str) -> InputErrors:
    return InputErrors([InputError(Location(label), "", what, expected, got)])


def _quiet() -> None:
    """pyHanko logs why it cannot build a certificate path (with a traceback) as a warning;
    calcdoc reports trust itself, so its log is not ours to print."""
    for name in ("pyhanko", "pyhanko_certvalidator"):
        logging.getLogger(name).setLevel(logging.CRITICAL)


def _printable(text: str, limit: int = 120) -> str:
    """A name from a stranger's certificate, safe to print on a terminal."""
    clean = "".join(ch if ch.isprintable() else "?" for ch in text).strip()
    return clean if len(clean) <= limit else clean[:limit - 1] + "…"


def _common_name(subject) -> str:
    """The subject's common name (asn1crypto Name), or the whole subject where it has none."""
    try:
        name = subject.native.get("common_name")
        if isinstance(name, list):
            name = name[0] if name else None
        return _printable(str(name) if name else subject.human_friendly) or "(no name)"
    except _UNREADABLE:
        return "(a name that cannot be read)"


# ----------------------------------------------------------------------------- sign


@dataclass(frozen=True)
class Sealed:
    """What ``calcdoc sign`` made: the signed copy, the signer's name and the field used."""

    out: Path
    signer: str
    field_name: str


def passphrase_from_environment(key: Path) -> str:
    """Return the passphrase from :data:`ENV_PASSPHRASE`; refuse when it is not set."""
    value = os.environ.get(ENV_PASSPHRASE)
    if value is None:
        raise _refuse(str(key), "no passphrase for the signing key",
                      f"the passphrase in the environment variable {ENV_PASSPHRASE}",
                      "the variable not set")
    return value


def sign_package(package: Path, key: Path, out: Path, passphrase: str) -> Sealed:
    """Sign the calcdoc package ``package`` with the PKCS#12 key file ``key`` and write the
    signed copy to ``out`` (a PAdES signature, ETSI.CAdES.detached, in an incremental update).

    Raise InputErrors, having written nothing, when the package is not a calcdoc PDF or is
    signed already by a signature that does not hold, ``out`` is the package itself or an
    existing file that calcdoc did not write, the key file cannot be read or opened with
    ``passphrase``, or its certificate is not valid now."""
    from calcdoc.archive import MAX_ARCHIVE_BYTES, _read_bounded, pdf_attachments

    _check_out(package, out)
    data = _read_bounded(package, MAX_ARCHIVE_BYTES, str(package))
    if "results.json" not in pdf_attachments(data, str(package)):
        raise _refuse(str(package), "not a calcdoc package", "a PDF with results.json attached",
                      "no results.json attached")
    earlier = check_seal_data(data, str(package))
    if earlier.differences:  # a second signature would seem to vouch for a broken first one
        raise _refuse(str(package), "a signed package whose signature does not hold",
                      "an unsigned package or one whose signatures verify",
                      earlier.differences[0].removeprefix("seal: "))
    key_data = _read_bounded(key, MAX_KEY_BYTES, str(key))
    signer, name = _load_signer(key_data, passphrase, str(key))
    signed, field_name = _sign(data, signer, str(package))
    report = check_seal_data(signed, str(out))
    if report.differences:  # pragma: no cover - a defect of calcdoc or pyHanko, never input
        raise RuntimeError("the signed copy does not verify: " + "; ".join(report.differences))
    _write_beside(out, signed)
    return Sealed(out, name, field_name)


def _check_out(package: Path, out: Path) -> None:
    label = str(out)
    if out.exists() or out.is_symlink():
        try:
            same = out.resolve() == package.resolve() or (package.exists()
                                                          and os.path.samefile(out, package))
        except OSError:
            same = False
        if same:
            raise _refuse(label, "the signed copy would replace the package",
                          "--out naming a new file beside the package", "the package itself")
        if out.is_symlink() or not out.is_file():
            raise _refuse(label, "cannot replace it with the signed copy",
                          "--out naming a new file or a PDF written by calcdoc",
                          "a link, a folder or a special file")
        if not _written_by_calcdoc(out):
            raise _refuse(label, "an existing file not written by calcdoc",
                          "--out naming a new file or a PDF written by calcdoc",
                          "another file, left as it is")
    if not out.parent.is_dir():
        raise _refuse(label, "no folder to write the signed copy in",
                      "--out in an existing folder", f"no folder {str(out.parent)!r}")


def _written_by_calcdoc(path: Path) -> bool:
    """A PDF calcdoc wrote (a package or a signed copy): its creator is calcdoc and it carries
    results.json. Anything else at --out is the user's, and stays."""
    from pypdf import PdfReader
    from pypdf.errors import PyPdfError

    from calcdoc.archive import MAX_ARCHIVE_BYTES, _read_bounded, pdf_attachments
    try:
        data = _read_bounded(path, MAX_ARCHIVE_BYTES, str(path))
        if "results.json" not in pdf_attachments(data, str(path)):
            return False
        creator = PdfReader(io.BytesIO(data), strict=False).metadata.creator
    except (InputErrors, PyPdfError, *_UNREADABLE):
        return False
    return isinstance(creator, str) and creator.startswith("calcdoc ")


def _load_signer(key_data: bytes, passphrase: str, label: str):
    """Open the PKCS#12 file; return (pyHanko signer, signer's name)."""
    from asn1crypto import pkcs12 as asn1_pkcs12
    from cryptography.hazmat.primitives.asymmetric import ec, rsa
    from cryptography.hazmat.primitives.serialization import Encoding, PublicFormat, pkcs12
    from pyhanko.sign.signers import SimpleSigner

    try:
        structure = asn1_pkcs12.Pfx.load(key_data, strict=True)
        structure["auth_safe"]["content_type"].native  # noqa: B018 - parse now, not later
    except _UNREADABLE:
        raise _refuse(label, "not a signing key file", "a PKCS#12 file (.p12 or .pfx) with the "
                      "private key and its certificate", "a file that is not PKCS#12") from None
    secret = passphrase.encode("utf-8")
    try:
        private_key, certificate, _ = pkcs12.load_key_and_certificates(key_data, secret)
    except _UNREADABLE:
        raise _refuse(label, "wrong passphrase for the signing key",
                      f"the passphrase that opens the key file, in {ENV_PASSPHRASE}",
                      "one that does not open it") from None
    if private_key is None or certificate is None:
        raise _refuse(label, "no private key with its certificate in the key file",
                      "a PKCS#12 file with the private key and its certificate",
                      "no private key" if private_key is None else "no certificate")
    if not isinstance(private_key, (rsa.RSAPrivateKey, ec.EllipticCurvePrivateKey)):
        raise _refuse(label, "a kind of key calcdoc does not sign with", "an RSA or EC key",
                      type(private_key).__name__.lstrip("_"))

    def public(k):
        return k.public_bytes(Encoding.DER, PublicFormat.SubjectPublicKeyInfo)
    if public(private_key.public_key()) != public(certificate.public_key()):
        raise _refuse(label, "the certificate is not the private key's",
                      "the key's own certificate", "a certificate for another key")
    now = datetime.datetime.now(datetime.timezone.utc)
    start, end = certificate.not_valid_before_utc, certificate.not_valid_after_utc
    if not start <= now <= end:
        raise _refuse(label, "the certificate is not valid now",
                      f"a certificate valid on {now:%Y-%m-%d}",
                      f"one valid from {start:%Y-%m-%d} to {end:%Y-%m-%d}")
    signer = SimpleSigner.load_pkcs12_data(key_data, [], passphrase=secret)
    return signer, _common_name(signer.signing_cert.subject)


def _sign(data: bytes, signer, label: str) -> tuple[bytes, str]:
    """Return the signed PDF (``data`` followed by the signing revision) and the field used."""
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.pdf_utils.misc import PdfError
    from pyhanko.sign import fields, signers
    from pyhanko.sign.signers import constants

    class Pdf17Signer(signers.PdfSigner):
        """pyHanko declares PDF 2.0 (ISO/TS 32002) for ECDSA keys on the common curves, raising
        the catalog's /Version to 2.0; a PDF/A-3 file is PDF 1.7 and must not claim 2.0. Keep
        1.7 and register only the PAdES extension (ESIC) that signing a 1.7 file asks for."""

        def register_extensions(self, pdf_out, *, md_algorithm):
            pdf_out.ensure_output_version(version=(1, 7))
            pdf_out.register_extension(constants.ESIC_EXTENSION_1)

    _quiet()
    try:
        writer = IncrementalPdfFileWriter(io.BytesIO(data), strict=False)
        taken = {name for name, _, _ in fields.enumerate_sig_fields(writer)}
        field_name = next(name for name in
                          (FIELD_NAME if n == 1 else f"{FIELD_NAME}-{n}" for n in range(1, 10_000))
                          if name not in taken)
        meta = signers.PdfSignatureMetadata(field_name=field_name, md_algorithm="sha256",
                                            subfilter=fields.SigSeedSubFilter.PADES)
        output = io.BytesIO()
        Pdf17Signer(meta, signer=signer).sign_pdf(writer, output=output)
    except (PdfError, *_UNREADABLE) as exc:
        raise _refuse(label, "cannot sign this PDF", "a PDF package written by calcdoc",
                      f"{type(exc).__name__}: {str(exc)[:80]}") from None
    return output.getvalue(), field_name


def _write_beside(out: Path, data: bytes) -> None:
    """Write ``out`` whole or not at all: a temporary file beside it, then one rename."""
    handle, temporary = tempfile.mkstemp(prefix=f".{out.name}.", suffix=".part", dir=out.parent)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, out)
    except BaseException as exc:
        Path(temporary).unlink(missing_ok=True)
        if isinstance(exc, OSError):
            raise _refuse(str(out), "cannot write the signed copy", "a writable folder",
                          exc.strerror or type(exc).__name__) from None
        raise


# ----------------------------------------------------------------------------- check


@dataclass
class SealReport:
    """What the signatures of a PDF say. ``notes`` is information (who signed, what each
    signature covers); ``differences`` are reasons to refuse the PDF (verify exits 1)."""

    notes: list[str] = field(default_factory=list)
    differences: list[str] = field(default_factory=list)

    @property
    def signed(self) -> bool:
        return bool(self.notes or self.differences)


def check_seal(path: Path) -> SealReport:
    """Check the signatures of the PDF at ``path`` (an unsigned PDF: an empty report). Raise
    InputErrors for a file whose signatures cannot be read."""
    from calcdoc.archive import MAX_ARCHIVE_BYTES, _read_bounded
    label = str(path)
    return check_seal_data(_read_bounded(path, MAX_ARCHIVE_BYTES, label), label)


def check_seal_data(data: bytes, label: str) -> SealReport:
    """Check the signatures of a PDF held in memory; see :func:`check_seal`."""
    report = SealReport()
    if not _SIGNATURE_MARK.search(data):
        return report
    from pyhanko.pdf_utils.misc import PdfError
    from pyhanko.pdf_utils.reader import PdfFileReader

    _quiet()
    try:
        signatures = list(PdfFileReader(io.BytesIO(data), strict=False).embedded_signatures)
    except (PdfError, *_UNREADABLE) as exc:
        raise _refuse(label, "signatures that cannot be read", "a PDF signed as calcdoc sign "
                      "signs it", f"{type(exc).__name__}: {str(exc)[:80]}") from None
    if not signatures:
        report.differences.append(
            "seal: the file holds signature data, but no signature field of its last revision "
            "refers to it (a signature removed or hidden by a later update)")
        return report
    if len(signatures) > MAX_SIGNATURES:
        raise _refuse(label, "too many signatures", f"at most {MAX_SIGNATURES}",
                      str(len(signatures)))
    names = {s.field_name for s in signatures}
    for signature in signatures:
        try:
            _check_one(signature, names, report)
        except (PdfError, *_UNREADABLE) as exc:
            raise _refuse(label, "a signature that cannot be read",
                          "a PDF signed as calcdoc sign signs it",
                          f"{type(exc).__name__}: {str(exc)[:80]}") from None
    return report


def _check_one(signature, names: set[str], report: SealReport) -> None:
    from pyhanko.sign.diff_analysis import ModificationLevel
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko.sign.validation.status import SignatureCoverageLevel
    from pyhanko_certvalidator import ValidationContext

    field_name = _printable(str(signature.field_name))
    # No trust roots and no fetching: the check is offline and says nothing about trust.
    context = ValidationContext(trust_roots=[], allow_fetching=False)
    status = validate_pdf_signature(signature, signer_validation_context=context)
    signer = _common_name(status.signing_cert.subject)
    stated = status.signer_reported_dt
    when = f" on {stated.astimezone(datetime.timezone.utc):%Y-%m-%d %H:%M} UTC (the time the " \
           f"signer's computer stated)" if stated else ""
    report.notes.append(f"signature {field_name}: signed by {signer}{when}; the certificate is "
                        f"not checked against a trust list")
    if not status.intact:
        report.differences.append(
            f"seal: signature {field_name}: the signed byte range is not intact: the file was "
            f"changed inside it after signing")
        return
    if not status.valid:
        report.differences.append(
            f"seal: signature {field_name}: the signature value does not match the signed "
            f"bytes and the signer's certificate")
        return
    coverage = status.coverage
    if coverage == SignatureCoverageLevel.ENTIRE_FILE:
        report.notes.append(f"signature {field_name}: the signed byte range is intact and covers "
                            f"the whole file except the signature")
        return
    if coverage != SignatureCoverageLevel.ENTIRE_REVISION:
        report.differences.append(
            f"seal: signature {field_name}: the signed byte range does not cover its whole "
            f"revision of the file")
        return
    level = status.modification_level
    changed = set(getattr(status.diff_result, "changed_form_fields", ()) or ())
    if level in (ModificationLevel.NONE, ModificationLevel.LTA_UPDATES):
        report.notes.append(f"signature {field_name}: the signed byte range is intact and covers "
                            f"its revision; what follows it changes nothing in the document")
    elif level == ModificationLevel.FORM_FILLING and changed and changed <= names:
        later = ", ".join(sorted(_printable(str(n)) for n in changed))
        report.notes.append(f"signature {field_name}: the signed byte range is intact and covers "
                            f"its revision; what follows it only adds the signature(s) {later}")
    else:
        report.differences.append(
            f"seal: signature {field_name}: an update appended after the signature changes the "
            f"document{_what_changed(status.diff_result)}")


def _what_changed(diff_result) -> str:
    """Name the places pyHanko's difference analysis could not explain (pages, attachments)."""
    paths = re.findall(r"PathInRevision\('([^']{1,120})'\)", str(diff_result or ""))
    shown = list(dict.fromkeys(_printable(p) for p in paths))[:3]
    return f" (changed: {', '.join(shown)})" if shown else ""
