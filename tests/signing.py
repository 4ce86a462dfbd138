"""Throw-away signing keys for the tests: a self-signed certificate that no trust list holds,
made with the ``cryptography`` package and saved as PKCS#12 in the test's own folder."""

from __future__ import annotations

import datetime
from pathlib import Path

from cryptography import x509
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import ec, rsa
from cryptography.hazmat.primitives.serialization import pkcs12
from cryptography.x509.oid import NameOID

PASSPHRASE = "correct horse battery staple"


def make_key(folder: Path, common_name: str = "A. Engineer", passphrase: str = PASSPHRASE,
             kind: str = "rsa", days_valid: tuple[int, int] = (-1, 30),
             name: str = "engineer.p12") -> Path:
    """Write a PKCS#12 file with a new private key and its self-signed certificate; return it.

    ``days_valid`` is the certificate's validity, in days from now (start, end)."""
    key = rsa.generate_private_key(public_exponent=65537, key_size=2048) if kind == "rsa" \
        else ec.generate_private_key(ec.SECP256R1())
    subject = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, common_name),
                         x509.NameAttribute(NameOID.ORGANIZATION_NAME, "Example Consulting")])
    now = datetime.datetime.now(datetime.timezone.utc)
    # key usage as for a signing certificate: digital signature and non-repudiation
    usage = x509.KeyUsage(digital_signature=True, content_commitment=True,
                          key_encipherment=False, data_encipherment=False, key_agreement=False,
                          key_cert_sign=False, crl_sign=False, encipher_only=False,
                          decipher_only=False)
    certificate = (x509.CertificateBuilder()
                   .subject_name(subject).issuer_name(subject).public_key(key.public_key())
                   .serial_number(x509.random_serial_number())
                   .not_valid_before(now + datetime.timedelta(days=days_valid[0]))
                   .not_valid_after(now + datetime.timedelta(days=days_valid[1]))
                   .add_extension(usage, critical=True)
                   .sign(key, hashes.SHA256()))
    data = pkcs12.serialize_key_and_certificates(
        b"calcdoc test key", key, certificate, None,
        serialization.BestAvailableEncryption(passphrase.encode()))
    path = folder / name
    path.write_bytes(data)
    return path
