"""The site in a real browser: headless Chromium from Debian, driven by selenium.

The demo project (projects/cold-store) is built with --no-pdf when it builds; otherwise a small
project written here. One browser session opens every page and checks what a reviewer relies on:
every link lands on an existing page and anchor, MathML formulas lay out (WHATWG/W3C MathML Core,
as Chromium implements it), nothing is fetched from outside the build folder (the site works
offline), the console stays free of errors, and every page has its contents sidebar and
previous/next links. Screenshots are saved under build/screenshots/ for people to look at.

Only Debian's /usr/bin/chromium and /usr/bin/chromedriver are used (the Makefile installs the
packages); nothing is ever downloaded.
"""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from pathlib import Path
from urllib.parse import unquote, urlsplit

import pytest

CHROMIUM = Path("/usr/bin/chromium")
CHROMEDRIVER = Path("/usr/bin/chromedriver")
REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "projects" / "cold-store"
SCREENSHOTS = REPO / "build" / "screenshots"

pytestmark = [
    pytest.mark.skipif(not CHROMIUM.is_file(),
                       reason="Debian's chromium is not installed (/usr/bin/chromium); "
                              "`make` installs it"),
    pytest.mark.skipif(not CHROMEDRIVER.is_file(),
                       reason="Debian's chromium-driver is not installed (/usr/bin/chromedriver)"),
]

SMALL_PROJECT = {
    "project.yaml": """\
project: {number: "T-301", title: Browser test store, client: Test client, site: Test site,
          organisation: Test engineers}
package: {number: TP-3, title: Browser test package}
revisions:
  - {rev: P1, date: 2026-11-10, purpose: For review, by: AE, checked: BC, approved: ""}
""",
    "sheets/w1.yaml": """\
id: W1
title: Wall W-1 heat loss
signoff:
  prepared: {by: A. Engineer, date: 2026-11-20, rev: P1}
  checked: {by: B. Checker, date: 2026-11-24, rev: P1}
notes: |
  Build-up per detail 5/A-301 (example).
blocks:
  - id: loss
    kind: formula
    title: Fabric heat loss
    given:
      U: {value: 0.25 W/(m^2*K), source: Wall U-value schedule (example)}
      A: {value: 100 m^2, source: Drawing A-101 (example)}
      theta_i: {value: 21 degC, source: Project brief (example)}
      theta_e: {value: -4 degC, source: Project brief (example)}
    steps:
      - {name: dT, expr: "theta_i - theta_e", unit: K, label: Temperature difference}
      - {name: Q, expr: "U * A * dT", unit: W, label: Heat loss}
    checks:
      - {result: Q, at_most: 400 W, source: Plant allowance (example)}
""",
    "sheets/w2.yaml": """\
id: W2
title: Wall W-2 heat loss from W-1
signoff:
  prepared: {by: A. Engineer, date: 2026-11-21, rev: P1}
blocks:
  - id: total
    kind: formula
    title: Two walls
    given:
      Q_1: {ref: W1.loss.Q}
      f: 2
    steps:
      - {name: Q_t, expr: "f * Q_1 / (1 + f) + sqrt(Q_1 * Q_1) / 3", unit: W, label: Total}
    checks:
      - {result: Q_t, at_most: 1000 W, source: Plant allowance (example)}
""",
    "review.yaml": """\
reviewer: R. Reviewer
comments:
  - {on: W1.loss, by: RR, date: 2026-11-26, text: Confirm the wall area, status: open,
     response: ""}
  - {on: W2, by: RR, date: 2026-11-26, text: Name the second wall, status: closed,
     response: Done}
""",
}


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    """Build the demo (or the small project) with --no-pdf; return the output folder."""
    from calcdoc.build import build
    from calcdoc.errors import CalcdocError
    out = tmp_path_factory.mktemp("site") / "out"
    if (DEMO / "project.yaml").is_file():
        try:
            build(DEMO, out, pdf=False)
            return out
        except CalcdocError:
            pass  # the demo is mid-edit; the small project still tests the site
    root = tmp_path_factory.mktemp("small") / "proj"
    for name, text in SMALL_PROJECT.items():
        (root / name).parent.mkdir(parents=True, exist_ok=True)
        (root / name).write_text(text)
    build(root, out, pdf=False)
    return out


@pytest.fixture(scope="module")
def browser():
    from selenium import webdriver
    from selenium.webdriver.chrome.options import Options
    from selenium.webdriver.chrome.service import Service
    profile = tempfile.mkdtemp(prefix="calcdoc-chromium-")
    options = Options()
    options.binary_location = str(CHROMIUM)
    for flag in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-quic",
                 "--no-first-run", "--disable-background-networking",
                 "--disable-component-update", "--disable-sync", "--window-size=1280,1600",
                 f"--user-data-dir={profile}"):
        options.add_argument(flag)
    options.set_capability("goog:loggingPrefs", {"browser": "ALL"})
    os.environ.setdefault("SE_OFFLINE", "true")  # selenium-manager must never download
    driver = webdriver.Chrome(service=Service(executable_path=str(CHROMEDRIVER)),
                              options=options)
    try:
        yield driver
    finally:
        driver.quit()
        shutil.rmtree(profile, ignore_errors=True)


PAGE_FACTS = """
const links = [...document.querySelectorAll('a[href]')].map(a => ({
  href: a.href, text: a.textContent.trim().slice(0, 60), inNotes: !!a.closest('.notes')}));
const ids = [...document.querySelectorAll('[id]')].map(e => e.id);
const maths = [...document.querySelectorAll('math')].map(m => {
  const r = m.getBoundingClientRect();
  return {w: r.width, h: r.height, mathml: m instanceof MathMLElement,
          alt: m.getAttribute('alttext') || ''};
});
const resources = performance.getEntriesByType('resource').map(r => r.name);
const sources = [...document.querySelectorAll('[src]')].map(e => e.getAttribute('src'))
  .concat([...document.querySelectorAll('link[href]')].map(e => e.getAttribute('href')));
return {links, ids, maths, resources, sources,
        sidebar: !!document.querySelector('nav.sidebar a[href="index.html"]'),
        pager: !!document.querySelector('nav.pager a[rel]'),
        scrollWidth: document.documentElement.scrollWidth,
        clientWidth: document.documentElement.clientWidth,
        title: document.title};
"""


@pytest.fixture(scope="module")
def visited(site, browser):
    """Open every page once; return (facts by page name, console entries by page name)."""
    facts, console = {}, {}
    browser.get_log("browser")  # drop anything from start-up
    for page in sorted(site.glob("*.html")):
        browser.get(page.as_uri())
        facts[page.name] = browser.execute_script(PAGE_FACTS)
        console[page.name] = browser.get_log("browser")
        if page.name == "index.html" or page.name == sorted(site.glob("sheet-*.html"))[0].name:
            SCREENSHOTS.mkdir(parents=True, exist_ok=True)
            browser.save_screenshot(str(SCREENSHOTS / page.name.replace(".html", ".png")))
    return facts, console


def test_every_link_resolves_to_an_existing_page_and_anchor(site, visited):
    facts, _ = visited
    broken = []
    checked = 0
    for page, f in facts.items():
        for link in f["links"]:
            parts = urlsplit(link["href"])
            if parts.scheme != "file":
                if not link["inNotes"]:  # authors may link out in their notes; we never do
                    broken.append(f"{page}: external link {link['href']}")
                continue
            target = Path(unquote(parts.path))
            checked += 1
            if not target.is_file() or site.resolve() not in target.resolve().parents:
                broken.append(f"{page}: {link['href']} (no such file in the site)")
                continue
            fragment = unquote(parts.fragment)
            if fragment and fragment not in facts.get(target.name, {}).get("ids", []):
                broken.append(f"{page}: {link['text']!r} → {target.name}#{fragment} "
                              "(no such anchor)")
    assert checked > 20
    assert broken == []


def test_mathml_formulas_lay_out_with_nonzero_size(visited):
    facts, _ = visited
    maths = [(page, m) for page, f in facts.items() for m in f["maths"]]
    assert maths, "the sheets show their formula steps as MathML"
    for page, m in maths:
        assert m["mathml"], f"{page}: <math> is a MathMLElement (MathML Core)"
        assert m["w"] > 0 and m["h"] > 0, f"{page}: {m['alt']} lays out ({m['w']}×{m['h']})"
        assert m["alt"], f"{page}: every formula carries its LaTeX as alttext"


def test_pages_log_no_console_errors(visited):
    _, console = visited
    errors = [f"{page}: {e['message']}" for page, entries in console.items() for e in entries
              if e.get("level") == "SEVERE"]
    assert errors == []


def test_site_fetches_nothing_from_outside_its_folder(site, visited):
    facts, _ = visited
    for page, f in facts.items():
        for url in f["resources"]:
            assert url.startswith(("file:", "data:")), f"{page}: fetched {url}"
        for src in f["sources"]:
            assert not urlsplit(src).scheme or src.startswith("data:"), f"{page}: {src}"


def test_every_page_has_the_contents_sidebar_and_previous_next_links(visited):
    facts, _ = visited
    for page, f in facts.items():
        assert f["sidebar"], f"{page}: contents sidebar"
        assert f["pager"], f"{page}: previous/next links"


def test_no_page_scrolls_sideways_in_a_1280_px_window(visited):
    # A reviewer reads down the page; a table or list value wider than the column hides its end.
    facts, _ = visited
    wide = {page: (f["scrollWidth"], f["clientWidth"]) for page, f in facts.items()
            if f["scrollWidth"] > f["clientWidth"]}
    assert wide == {}


def test_every_block_and_result_has_a_stable_anchor(site, visited):
    facts, _ = visited
    results = json.loads((site / "results.json").read_text("utf-8"))
    missing = []
    for sheet in results["sheets"]:
        ids = set(facts[f"sheet-{sheet['id']}.html"]["ids"])
        for block in sheet["blocks"]:
            key = f"{sheet['id']}.{block['id']}"
            for anchor in [key] + [f"{key}.{name}" for name in block["results"]]:
                if anchor not in ids:
                    missing.append(anchor)
    assert missing == []


def test_screenshots_are_saved_under_build(visited):
    assert (SCREENSHOTS / "index.png").stat().st_size > 10_000
