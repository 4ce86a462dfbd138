"""Every derived status in one place: a sheet's sign-off state, and what stops a final issue.

The site, the PDF and ``build --final`` all ask these functions, so they cannot disagree (a
sheet "checked by its preparer" on the page is the same sheet ``--final`` refuses).
"""

from __future__ import annotations

from dataclasses import dataclass

from calcdoc.provenance import values_to_confirm

__all__ = ["SignoffState", "signoff_state", "same_person", "final_refusals"]


def same_person(a: str, b: str) -> bool:
    """Return whether two signatures name the same person: 'A. Engineer' = 'a engineer'
    (letters and digits only, case folded)."""
    def norm(name: str) -> str:
        return "".join(ch for ch in name.casefold() if ch.isalnum())
    return bool(norm(a)) and norm(a) == norm(b)


@dataclass(frozen=True)
class SignoffState:
    """A sheet's sign-off at the current revision: ``ok`` when checked at the current revision
    by someone other than its preparer; ``problems`` lists what is missing, each as a sentence
    about the sheet; ``words`` is the state as the index and the PDF print it."""

    ok: bool
    words: str
    problems: tuple = ()


def signoff_state(signoff: dict, current_rev: str) -> SignoffState:
    """Return the sign-off state of a sheet from its signatures (role → Signature)."""
    prepared, checked = signoff.get("prepared"), signoff.get("checked")
    problems = []  # (words for the page, sentence for --final)
    if prepared is None:
        problems.append(("not prepared", "has no preparer (signoff.prepared)"))
    if checked is None:
        problems.append(("not checked", "is not checked (signoff.checked)"))
    else:
        if checked.rev != current_rev:
            problems.append((f"checked at {checked.rev}, not at {current_rev}",
                             f"is checked at revision {checked.rev}, not at the current "
                             f"revision {current_rev}"))
        if prepared is not None and same_person(prepared.by, checked.by):
            problems.append(("checked by its preparer",
                             f"is checked by its preparer ({checked.by})"))
    if problems:
        return SignoffState(False, problems[0][0], tuple(p[1] for p in problems))
    return SignoffState(True, f"checked at {current_rev}")


_ROLE_ORDER = ("prepared", "checked", "approved")


def _order(signoff: dict) -> list[str]:
    """A sheet is checked on or after it was prepared, and approved on or after it was
    checked: signatures out of that order are refused with their dates."""
    problems = []
    for earlier, later in zip(_ROLE_ORDER, _ROLE_ORDER[1:]):
        a, b = signoff.get(earlier), signoff.get(later)
        if a is not None and b is not None and a.date and b.date and b.date < a.date:
            problems.append(f"is {later} ({b.date}) before it was {earlier} ({a.date})")
    return problems


def final_refusals(package, check_words) -> list[str]:
    """Return every reason the package may not be issued as final (empty: it may).

    Final means: the current revision has an approver, every sheet is checked at the current
    revision by someone other than its preparer, every check passes, no review comment is
    open (docs/format.md, Command line), every library value used is confirmed against its printed
    source, every input has a source or is stated as an assumption, and each sheet is checked
    on or after it was prepared. ``check_words(check)`` prints a failed check's value and
    limit as the package does."""
    project = package.project
    rev = project.revision
    reasons = []
    if not rev.approved.strip():
        reasons.append(f"revision {rev.rev} has no approver (project.yaml revisions: "
                       f"approved is empty)")
    for sheet in package.sheets:
        state = signoff_state(sheet.spec.signoff, rev.rev)
        reasons.extend(f"sheet {sheet.id} {problem}" for problem in state.problems)
        reasons.extend(f"sheet {sheet.id} {problem}" for problem in _order(sheet.spec.signoff))
        for block in sheet.blocks:
            for record in block.inputs:
                if record.origin == "given" and not record.source and isinstance(
                        record.si, (int, float)) and not isinstance(record.si, bool):
                    reasons.append(f"sheet {sheet.id}: input {block.key}.{record.path} "
                                   f"({record.written}) has no source: write {{value, "
                                   f"source}}, or {{value, assumption}} for the engineer's own "
                                   f"assumption ({record.loc})")
        for block in sheet.blocks:
            for c in block.checks:
                if not c.passed:
                    reasons.append(f"check {block.key}.{c.result} fails: {check_words(c)}")
    for n, c in enumerate(project.comments, start=1):
        if c.status == "open":
            reasons.append(f"review comment C{n} on {c.on} is open ({c.loc}): {c.text}")
    for item in values_to_confirm(package):
        if item.confirmation is None:
            reasons.append(f"value {item.key} ({item.what}) is not confirmed against its "
                           f"printed source ({item.against}): confirm it in project.yaml "
                           f"confirmations, or give the project's own value with its source")
    return reasons
