"""One updating line on stderr for the long stages (the PDF, time-stepping runs, many packages).

Shown only while a command holds a :func:`reporter` and stderr is a terminal: piped or
redirected, nothing is written at all, so logs and tests see only the command's own output.
Code deep in a stage asks for :func:`current` (a reporter that shows nothing when none is
active) instead of taking a stream through every call. A line is redrawn at most ten times a
second, overwritten in place with a carriage return, and cleared when the command's reporter
ends, before the command prints its result.
"""

from __future__ import annotations

import contextlib
import logging
import os
import shutil
import sys
import time

__all__ = ["Progress", "reporter", "current", "time_steps", "weasyprint_pages"]

_INTERVAL = 0.1  # seconds between redraws: a terminal redrawn faster only flickers


class Progress:
    """A one-line display on ``stream``; does nothing unless ``enabled``."""

    def __init__(self, stream=None, enabled: bool | None = None):
        self.stream = stream if stream is not None else sys.stderr
        if enabled is None:
            try:
                enabled = bool(self.stream.isatty())
            except (AttributeError, ValueError, OSError):
                enabled = False
        self.enabled = enabled
        # a forked worker inherits this object: only the process that made it draws
        self._pid = os.getpid()
        self._shown = 0
        self._last = 0.0

    @property
    def active(self) -> bool:
        return self.enabled and os.getpid() == self._pid

    def show(self, text: str, force: bool = False) -> None:
        """Draw ``text`` over the current line (at most every 0.1 s unless ``force``)."""
        if not self.active:
            return
        now = time.monotonic()
        if not force and now - self._last < _INTERVAL:
            return
        self._last = now
        width = max(shutil.get_terminal_size((80, 24)).columns - 1, 10)
        text = text if len(text) <= width else text[:width - 1] + "…"
        try:
            self.stream.write("\r" + text + " " * max(self._shown - len(text), 0))
            self.stream.flush()
        except (OSError, ValueError):
            self.enabled = False
            return
        self._shown = len(text)

    def clear(self) -> None:
        """Blank the line drawn, if any, and put the cursor back at its start."""
        if self.active and self._shown:
            try:
                self.stream.write("\r" + " " * self._shown + "\r")
                self.stream.flush()
            except (OSError, ValueError):
                pass
        self._shown = 0


_QUIET = Progress(enabled=False)
_current = _QUIET


def current() -> Progress:
    """Return the active reporter (one that shows nothing when no command holds one)."""
    return _current


@contextlib.contextmanager
def reporter(stream=None, enabled: bool | None = None):
    """Make a reporter on ``stream`` (stderr) the current one while the block runs; shown
    only on a terminal unless ``enabled`` says otherwise; cleared at the end."""
    global _current
    previous, _current = _current, Progress(stream, enabled)
    try:
        yield _current
    finally:
        _current.clear()
        _current = previous


def time_steps(label: str, duration: float):
    """Return a callback for a time-stepping solver, ``on_step(t)`` with the time reached [s],
    that shows how far ``label`` has come; None (no callback at all) when nothing is shown.
    A time smaller than the one before starts a new run (a convergence check runs twice)."""
    progress = current()
    if not progress.active:
        return None
    state = {"run": 1, "last": -1.0}

    def on_step(t: float) -> None:
        if t < state["last"]:
            state["run"] += 1
        state["last"] = t
        progress.show(f"{label}: run {state['run']}, {t / 60:.0f} of {duration / 60:.0f} min "
                      f"simulated")
    return on_step


_WEASYPRINT_STEPS = {"1": "reading the document", "2": "reading the stylesheet",
                     "3": "applying the stylesheet", "4": "building the boxes",
                     "5": "laying out", "6": "writing the PDF", "7": "adding the metadata"}


class _PageHandler(logging.Handler):
    """Turns WeasyPrint's progress records ('Step 5 - Creating layout - Page 12') into the
    line 'PDF: laying out page 12'."""

    def __init__(self, progress: Progress):
        super().__init__(logging.INFO)
        self.progress = progress

    def emit(self, record: logging.LogRecord) -> None:
        try:
            text = record.getMessage()
        except Exception:  # noqa: BLE001 - a malformed record is not worth a build
            return
        step = text.split()[1] if text.startswith("Step ") and len(text.split()) > 1 else ""
        words = _WEASYPRINT_STEPS.get(step, text)
        if "Repagination" in text:
            words = "laying out again (page numbers changed)"
        elif " Page " in text:
            words += " page " + text.rsplit(" Page ", 1)[1].split()[0]
        self.progress.show("PDF: " + words, force=step != "5")


@contextlib.contextmanager
def weasyprint_pages():
    """While the block runs, show WeasyPrint's own progress (its 'weasyprint.progress'
    logger) on the current reporter; nothing is changed when the reporter shows nothing."""
    progress = current()
    if not progress.active:
        yield
        return
    logger = logging.getLogger("weasyprint.progress")
    handler = _PageHandler(progress)
    level, propagate = logger.level, logger.propagate
    logger.addHandler(handler)
    logger.setLevel(logging.INFO)
    logger.propagate = False  # its INFO records are for this line only
    try:
        yield
    finally:
        logger.removeHandler(handler)
        logger.setLevel(level)
        logger.propagate = propagate
