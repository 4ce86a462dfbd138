"""The PDF package as an archival file: the structure PDF/A-3b (ISO 19005-3:2012) asks for, read
with pypdf, on the package as built and on a signed copy (the signature is an incremental update
that must keep it).

No PDF/A validator could be run here: veraPDF is a Java program that neither PyPI nor Debian's
packages carry (the PyPI wrappers download it at run time). The tests check the clauses one by
one instead; the clause numbers are those of ISO 19005-3:2012 (which takes most of its rules from
ISO 19005-2:2011) as veraPDF's validation profiles name them, recalled from memory.
"""

from __future__ import annotations

import io
import xml.etree.ElementTree as ET

import pytest
from pypdf import PdfReader
from pypdf.generic import ArrayObject, DictionaryObject, IndirectObject, StreamObject

from calcdoc.cli import main
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

NS = {"rdf": "http://www.w3.org/1999/02/22-rdf-syntax-ns#",
      "pdfaid": "http://www.aiim.org/pdfa/ns/id/",
      "dc": "http://purl.org/dc/elements/1.1/",
      "xmp": "http://ns.adobe.com/xap/1.0/"}


@pytest.fixture(scope="module", params=["1", "2"], ids=["one document", "in parts"])
def built(request, tmp_path_factory):
    """The package typeset as one document (--jobs 1) and in parts joined (--jobs 2): the
    same clauses hold for both."""
    folder = tmp_path_factory.mktemp("pdfa")
    root = write_project(folder / "proj", {"f1": SHEET, "f2": SHEET.replace("F1", "F2")})
    assert main(["build", str(root), "--out", str(folder / "out"),
                 "--jobs", request.param]) == 0
    folder.joinpath("jobs").write_text(request.param)
    return folder


@pytest.fixture(scope="module", params=["as built", "signed"])
def pdf(request, built):
    """The package's bytes, as built or signed (the same checks hold for both)."""
    package = built / "out" / "package.pdf"
    if request.param == "as built":
        return package.read_bytes()
    from calcdoc.seal import sign_package
    signed = built / "signed.pdf"
    if not signed.exists():
        sign_package(package, make_key(built), signed, PASSPHRASE)
    return signed.read_bytes()


def reader_of(data: bytes) -> PdfReader:
    return PdfReader(io.BytesIO(data))


def reachable(reader: PdfReader) -> list[DictionaryObject]:
    """Every dictionary and stream reachable from the trailer of the last revision."""
    found, seen, stack = [], set(), [reader.trailer]
    while stack:
        item = stack.pop()
        if isinstance(item, IndirectObject):
            if (item.idnum, item.generation) in seen:
                continue
            seen.add((item.idnum, item.generation))
            item = item.get_object()
        if isinstance(item, DictionaryObject):
            found.append(item)
            stack.extend(item.values())
        elif isinstance(item, ArrayObject):
            stack.extend(item)
    return found


def test_header__pdf_1_7_with_a_binary_comment(pdf):
    # ISO 19005-2/-3 §6.1.2: header %PDF-1.n, then a comment of at least four bytes >= 128
    first, second = pdf.split(b"\n")[:2]
    assert first == b"%PDF-1.7"
    assert second.startswith(b"%") and sum(byte >= 128 for byte in second[1:5]) == 4
    # a PDF/A-3 file is PDF 1.7: the catalog may not claim a later version (ISO 32000-1 §7.7.2)
    assert reader_of(pdf).trailer["/Root"].get("/Version", "/1.7") == "/1.7"


def test_xmp__identifies_pdf_a_part_3_conformance_b(pdf):
    reader = reader_of(pdf)
    stream = reader.trailer["/Root"]["/Metadata"].get_object()
    # §6.6.2.1: a metadata stream of Type /Metadata, Subtype /XML, in the catalog
    assert stream["/Type"] == "/Metadata" and stream["/Subtype"] == "/XML"
    text = stream.get_data().decode("utf-8")  # §6.6.2.1: the packet is UTF-8
    header = text[:text.index("?>")]
    assert header.startswith("<?xpacket begin=")
    assert "bytes=" not in header and "encoding=" not in header  # §6.6.2.1
    rdf = ET.fromstring(text[text.index("<x:xmpmeta"):text.rindex("</x:xmpmeta>") + 12])

    def value(prefix, name):  # an RDF property, written as an attribute or as an element
        key = f"{{{NS[prefix]}}}{name}"
        for description in rdf.iter(f"{{{NS['rdf']}}}Description"):
            if key in description.attrib:
                return description.attrib[key]
            element = description.find(f"{prefix}:{name}", NS)
            if element is not None:
                return element.text
        return None
    # §6.6.4: pdfaid:part 3 and pdfaid:conformance B for a PDF/A-3b file
    assert value("pdfaid", "part") == "3"
    assert value("pdfaid", "conformance") == "B"
    # the revision's date from project.yaml, not the clock (a rebuild is byte-identical)
    assert value("xmp", "CreateDate").startswith("2026-11-10")
    title = rdf.find(".//dc:title/rdf:Alt/rdf:li", NS).text
    assert title == reader.metadata.title == "T-001 TP-001 Test package rev P1"


def test_output_intent__srgb_with_its_icc_profile(pdf):
    from PIL import ImageCms
    intents = reader_of(pdf).trailer["/Root"]["/OutputIntents"]
    assert len(intents) == 1
    intent = intents[0].get_object()
    assert intent["/S"] == "/GTS_PDFA1"  # §6.2.3: the PDF/A output intent subtype
    profile = intent["/DestOutputProfile"].get_object()
    assert isinstance(profile, StreamObject) and profile["/N"] == 3
    icc = profile.get_data()
    # ICC.1:2010 §7.2 profile header (from memory): size, device class 'mntr' (display),
    # colour space 'RGB ', file signature 'acsp'
    assert int.from_bytes(icc[0:4], "big") == len(icc)
    assert icc[12:16] == b"mntr" and icc[16:20] == b"RGB " and icc[36:40] == b"acsp"
    # Pillow's LittleCMS reads it as an sRGB profile
    description = ImageCms.getProfileDescription(ImageCms.ImageCmsProfile(io.BytesIO(icc)))
    assert "sRGB" in description


def test_attachments__each_with_its_relationship_and_listed_once_in_af(pdf):
    catalog = reader_of(pdf).trailer["/Root"]
    tree = catalog["/Names"]["/EmbeddedFiles"].get_object()["/Names"]
    specs = {tree[i]: tree[i + 1] for i in range(0, len(tree), 2)}
    assert set(specs) == {"project.yaml", "sheets/f1.yaml", "sheets/f2.yaml", "results.json"}
    # §6.8: every embedded file is associated with the document (the catalog's /AF) ...
    listed = [ref.idnum for ref in catalog["/AF"]]
    assert sorted(listed) == sorted(ref.idnum for ref in specs.values())  # each once
    for name, ref in specs.items():
        spec = ref.get_object()
        # ... its file specification says how (/AFRelationship): results.json is the data the
        # document shows, each input file a source it was made from
        assert spec["/AFRelationship"] == ("/Data" if name == "results.json" else "/Source")
        assert spec["/Type"] == "/Filespec" and spec["/F"] == spec["/UF"] == name
        embedded = spec["/EF"]["/F"].get_object()
        assert embedded["/Type"] == "/EmbeddedFile"
        assert embedded["/Subtype"].startswith("/application")  # §6.8: a MIME type
        assert embedded["/Params"]["/ModDate"] == "D:20261110000000Z"  # §6.8, fixed date


def test_fonts__every_font_has_its_program_embedded(pdf):
    fonts = [d for d in reachable(reader_of(pdf)) if d.get("/Type") == "/Font"
             and d.get("/Subtype") != "/CIDFontType2" and d.get("/Subtype") != "/CIDFontType0"]
    assert fonts
    for font in fonts:
        if font["/Subtype"] == "/Type3":  # glyphs drawn by content streams in the file
            continue
        described = font["/DescendantFonts"][0].get_object() if font["/Subtype"] == "/Type0" \
            else font
        descriptor = described["/FontDescriptor"].get_object()
        # §6.2.11.4.1: the font program is embedded
        assert {"/FontFile", "/FontFile2", "/FontFile3"} & set(descriptor), font["/BaseFont"]


def test_no_encryption_javascript_actions_or_external_content(pdf):
    reader = reader_of(pdf)
    assert "/Encrypt" not in reader.trailer  # §6.1.3
    catalog = reader.trailer["/Root"]
    assert "/JavaScript" not in catalog.get("/Names", {})
    assert "/AcroForm" not in catalog or not catalog["/AcroForm"].get("/NeedAppearances")
    forbidden = {"/Launch", "/Sound", "/Movie", "/ResetForm", "/ImportData", "/JavaScript",
                 "/Hide", "/SetOCGState", "/Rendition", "/Trans", "/GoTo3DView", "/GoToR",
                 "/GoToE", "/SubmitForm"}  # §6.6.1 actions, and references to other files
    for item in reachable(reader):
        assert item.get("/S") not in forbidden
        assert "/JS" not in item and "/AA" not in item  # §6.6.2: no additional actions
        if isinstance(item, StreamObject):  # §6.1.7.1: no stream kept in an external file
            assert not {"/F", "/FFilter", "/FDecodeParams"} & set(item)
        assert not (item.get("/Subtype") == "/Form" and "/Ref" in item)  # §6.2.9.2


def test_annotations__printed_and_never_hidden(pdf):
    for page in reader_of(pdf).pages:
        for ref in page.get("/Annots", []):
            flags = ref.get_object()["/F"]
            # §6.3.2: the Print flag set; Invisible, Hidden and NoView clear
            assert flags & 4 and not flags & (1 | 2 | 32)


def test_rebuild__byte_identical_pdf_with_a_fixed_identifier(built, tmp_path):
    first = (built / "out" / "package.pdf").read_bytes()
    assert main(["build", str(built / "proj"), "--out", str(tmp_path / "again"),
                 "--jobs", (built / "jobs").read_text()]) == 0
    assert (tmp_path / "again" / "package.pdf").read_bytes() == first
    identifier = reader_of(first).trailer["/ID"]  # §6.1.3: the file identifier is present
    assert len(identifier) == 2 and all(len(part.original_bytes) >= 16 for part in identifier)
