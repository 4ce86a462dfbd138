"""``calcdoc serve``: the starter project previewed on 127.0.0.1, rebuilt when a sheet is saved,
the located error of a broken sheet shown in the page (the message ``check`` prints), the
package back once it is fixed, and a clean stop (exit 0) on Ctrl-C sent to its PID.

Waits are bounded polls (every 0.2 s, up to a minute on a busy machine), never fixed sleeps."""

from __future__ import annotations

import html
import os
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from pathlib import Path

import pytest

from calcdoc.cli import main

ROOT = Path(__file__).resolve().parent.parent
AREA = "A: {value: 85 m^2, source: Elevation drawing (example)}"
STEP = '{name: Q, expr: "U * A * dT", unit: W, label: Fabric heat loss}'


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _get(url: str) -> str | None:
    try:
        with urllib.request.urlopen(url, timeout=5) as response:
            return response.read().decode("utf-8")
    except (urllib.error.URLError, ConnectionError, TimeoutError):
        return None


def _wait_for(what: str, fetch, test, timeout: float = 60.0):
    """Poll ``fetch()`` until ``test`` holds of its answer; return the answer."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        answer = fetch()
        if answer is not None and test(answer):
            return answer
        time.sleep(0.2)
    raise AssertionError(f"not seen within {timeout:.0f} s: {what}")


@pytest.fixture
def preview(tmp_path):
    assert main(["new", "proj"]) == 0
    port = _free_port()
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    process = subprocess.Popen([sys.executable, "-m", "calcdoc", "serve", "proj", "--port",
                                str(port)], cwd=tmp_path, env=env, stdin=subprocess.DEVNULL,
                               stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        yield process, f"http://127.0.0.1:{port}", tmp_path / "proj"
    finally:
        if process.poll() is None:
            process.kill()
            process.wait(timeout=30)


def test_serve__rebuilds_on_edit_shows_located_error_recovers_and_stops_cleanly(
        preview, capsys):
    process, url, project = preview
    sheet = project / "sheets" / "loss.yaml"
    original = sheet.read_text("utf-8")
    assert AREA in original and STEP in original

    page = _wait_for("the first build served", lambda: _get(url + "/sheet-L1.html"),
                     lambda text: "<mn>85</mn>" in text)
    assert "/_calcdoc/build-id" in page, "the page carries the reload script"
    assert "Example project" in _get(url + "/")
    first_id = _get(url + "/_calcdoc/build-id")

    sheet.write_text(original.replace(AREA, AREA.replace("85 m^2", "120 m^2")), "utf-8")
    page = _wait_for("the edited area in the page", lambda: _get(url + "/sheet-L1.html"),
                     lambda text: "<mn>120</mn>" in text)
    assert "<mn>85</mn>" not in page
    # open pages are told to reload: the id they poll changes (just after the swap)
    _wait_for("a new build id", lambda: _get(url + "/_calcdoc/build-id"),
              lambda build_id: build_id != first_id, timeout=10)

    broken = original.replace(STEP, STEP.replace('"U * A * dT"', '"U * A * dT +"'))
    sheet.write_text(broken, "utf-8")
    page = _wait_for("the error in the page", lambda: _get(url + "/sheet-L1.html"),
                     lambda text: "not a valid expression" in text)
    # the same located message, line and caret that `calcdoc check` prints for this sheet
    assert main(["check", "proj"]) == 2
    expected = capsys.readouterr().err.splitlines()
    assert expected[0].startswith("proj/sheets/loss.yaml:15:25: error: ")
    assert expected[-2].endswith("^")
    for line in expected:
        assert html.escape(line) in page
    assert process.poll() is None, "the server keeps running after a bad edit"

    sheet.write_text(original, "utf-8")
    _wait_for("the package back after the fix", lambda: _get(url + "/sheet-L1.html"),
              lambda text: "<mn>85</mn>" in text and "not a valid expression" not in text)

    os.kill(process.pid, signal.SIGINT)  # what Ctrl-C sends
    assert process.wait(timeout=60) == 0
    out = process.stdout.read()
    assert "serving proj at " + url + "/" in out
    assert out.rstrip().endswith("stopped")
    assert "Traceback" not in process.stderr.read()
    assert _get(url + "/") is None, "nothing listening once stopped"


def test_serve_of_a_folder_without_project_yaml__exit_2_nothing_served(tmp_path, capsys):
    (tmp_path / "empty").mkdir()
    assert main(["serve", "empty", "--port", str(_free_port())]) == 2
    assert capsys.readouterr().err.startswith("empty: error: not a project folder (expected a "
                                              "folder with project.yaml, got no project.yaml "
                                              "there)")
