"""``calcdoc serve``: a local preview of a project's site that rebuilds as its files change.

The site (no PDF) is built into an output folder and served from it on 127.0.0.1 only, by the
standard library's threaded HTTP server. The project's YAML files (its sheets, project.yaml,
review.yaml, materials.yaml) are watched with watchfiles; a change rebuilds the site and bumps
the build id. Every HTML page served carries a small script that polls ``/_calcdoc/build-id``
once a second and reloads the page when the id differs from the one it was served with.

A build that fails on the input serves, in place of every page, the located messages that
``calcdoc check`` prints (FILE:LINE:COL with the line and a caret); the server keeps running
and the next good build brings the package back. Builds run on the main thread (the one that
watches); the server answers from its own threads, reading the output folder that each build
replaces in one step.
"""

from __future__ import annotations

import html
import http.server
import os
import shutil
import signal
import tempfile
import threading
import time
from pathlib import Path

__all__ = ["serve", "Preview"]

BUILD_ID_PATH = "/_calcdoc/build-id"

_RELOAD = """<script>
(function () {{
  var served = "{build_id}";
  function poll() {{
    fetch("{path}", {{cache: "no-store"}})
      .then(function (r) {{ return r.text(); }})
      .then(function (id) {{ if (id !== served) {{ location.reload(); }} }})
      .catch(function () {{}})
      .then(function () {{ setTimeout(poll, 1000); }});
  }}
  setTimeout(poll, 1000);
}})();
</script>
"""

_ERROR_PAGE = """<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>{title}: input error</title>
<style>body {{ font-family: sans-serif; margin: 2em; }}
pre {{ background: #f4f4f4; padding: 1em; overflow-x: auto; }}</style></head>
<body><h1>{title}: the package cannot be built</h1>
<p>Fix the input below and save; this page reloads with the package when the build succeeds.</p>
<pre>{messages}</pre>
</body></html>
"""


class Preview:
    """The state the server shows: the last build's id, and its error text when it failed."""

    def __init__(self, project: Path, out: Path):
        self.project = project
        self.out = out
        self.lock = threading.Lock()
        self.count = 0
        self.error: str | None = None

    @property
    def build_id(self) -> str:
        with self.lock:
            return f"{self.count}-{'error' if self.error else 'ok'}"

    def rebuild(self) -> str:
        """Build the site once; return a one-line account for the console."""
        from calcdoc.build import build
        from calcdoc.errors import InputError, InputErrors, render
        start = time.perf_counter()
        error = None
        try:
            build(self.project, self.out, pdf=False)
        except InputErrors as errs:
            count = len(errs.errors)
            error = "\n".join(render(e) for e in errs.errors) + \
                f"\ncalcdoc: {count} error{'s' if count != 1 else ''}; nothing written"
        except InputError as err:
            error = render(err) + "\ncalcdoc: 1 error; nothing written"
        except Exception as exc:  # noqa: BLE001 - a defect must not stop the preview
            error = (f"calcdoc: internal error: {type(exc).__name__}: {exc}\ncalcdoc: this is a "
                     f"defect in calcdoc, not in your input; please report it")
        with self.lock:
            self.count += 1
            self.error = error
        seconds = time.perf_counter() - start
        if error:
            return f"build failed ({seconds:.1f} s):\n{error}"
        return f"built the site in {seconds:.1f} s"


def _handler(preview: Preview):
    class Handler(http.server.SimpleHTTPRequestHandler):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, directory=str(preview.out), **kwargs)

        def log_message(self, format, *args):  # noqa: A002 - the base class's name
            pass  # the console shows builds, not every request

        def end_headers(self):
            self.send_header("Cache-Control", "no-store")
            super().end_headers()

        def do_GET(self):
            path = self.path.split("?", 1)[0].split("#", 1)[0]
            if path == BUILD_ID_PATH:
                self._send(preview.build_id.encode(), "text/plain; charset=utf-8")
                return
            page = path.endswith("/") or path.endswith(".html")
            build_id = preview.build_id
            with preview.lock:
                error = preview.error
            if page and error is not None:
                title = html.escape(preview.project.resolve().name)
                body = _ERROR_PAGE.format(title=title, messages=html.escape(error))
                self._send(_with_reload(body, build_id).encode(), "text/html; charset=utf-8")
                return
            if page:
                file = Path(self.translate_path(path))
                if file.is_dir():
                    file = file / "index.html"
                try:
                    text = file.read_text("utf-8")
                except (OSError, UnicodeDecodeError):
                    self.send_error(404, "no such page in this build")
                    return
                self._send(_with_reload(text, build_id).encode(), "text/html; charset=utf-8")
                return
            super().do_GET()

        def _send(self, body: bytes, content_type: str):
            self.send_response(200)
            self.send_header("Content-Type", content_type)
            self.send_header("Content-Length", str(len(body)))
            self.end_headers()
            try:
                self.wfile.write(body)
            except (BrokenPipeError, ConnectionResetError):
                pass

    return Handler


def _with_reload(page: str, build_id: str) -> str:
    script = _RELOAD.format(build_id=build_id, path=BUILD_ID_PATH)
    at = page.lower().rfind("</body>")
    return page + script if at < 0 else page[:at] + script + page[at:]


def _watched(project: Path, out: Path):
    """watchfiles filter: the project's YAML files, not those in the output or hidden folders."""
    project, out = project.resolve(), out.resolve()

    def accept(change, path: str) -> bool:
        p = Path(path)
        try:
            parts = p.resolve().relative_to(project).parts
        except ValueError:
            return False
        if any(part.startswith(".") for part in parts):
            return False  # editors' swap files, a build's temporary folder
        if p.resolve() == out or out in p.resolve().parents:
            return False
        return p.suffix.lower() in (".yaml", ".yml")
    return accept


def serve(project: str | Path, port: int = 8000, out: str | Path | None = None) -> int:
    """Build and serve the preview until Ctrl-C (or SIGTERM); return the exit status 0.
    Raise InputErrors when the port cannot be had or ``out`` may not be replaced."""
    import watchfiles
    from calcdoc.build import check_output_folder
    from calcdoc.errors import InputError, InputErrors, Location
    project = Path(project)
    if not (project / "project.yaml").is_file():  # nothing to watch: say so before serving
        raise InputErrors([InputError(Location(str(project)), "", "not a project folder",
                                      "a folder with project.yaml",
                                      "a file" if project.is_file() else
                                      "no project.yaml there")])
    if out is not None:
        check_output_folder(Path(out))
    try:
        server = http.server.ThreadingHTTPServer(("127.0.0.1", port), None)
    except OSError as exc:
        raise InputErrors([InputError(Location("--port"), "", "cannot serve on this port",
                                      "a free port on 127.0.0.1",
                                      f"{port}: {exc.strerror or exc}")]) from None
    temporary = out is None
    out_dir = Path(tempfile.mkdtemp(prefix="calcdoc-serve-")) / "site" if temporary \
        else Path(out)
    preview = Preview(project, out_dir)
    server.RequestHandlerClass = _handler(preview)
    server.daemon_threads = True
    thread = threading.Thread(target=server.serve_forever, name="calcdoc-serve", daemon=True)

    def stop(signum, frame):
        raise KeyboardInterrupt
    # both set here: a shell starting the preview in the background leaves SIGINT ignored
    previous = {sig: signal.signal(sig, stop) for sig in (signal.SIGINT, signal.SIGTERM)}
    try:
        _say(preview.rebuild())
        thread.start()
        _say(f"serving {project} at http://127.0.0.1:{server.server_address[1]}/ "
             f"(Ctrl-C to stop)")
        for changes in watchfiles.watch(project, watch_filter=_watched(project, out_dir),
                                        debounce=300, step=50):
            names = sorted({os.path.relpath(path, project) for _, path in changes})
            _say(f"changed: {', '.join(names)}")
            _say(preview.rebuild())
    except KeyboardInterrupt:
        pass
    finally:
        for sig, handler in previous.items():
            signal.signal(sig, handler)
        if thread.is_alive():
            server.shutdown()
        server.server_close()
        if temporary:
            shutil.rmtree(out_dir.parent, ignore_errors=True)
    _say("stopped")
    return 0


def _say(text: str) -> None:
    print(text, flush=True)  # flushed: a console piped to a log sees each build as it ends
