"""Mutations of the demo sheets of the newer kinds, one change at a time, as a careless or hostile
user would make them, and a runner that puts each through ``calcdoc check``.

Used by tests/test_fuzz_kinds.py (a bounded sample) and run in full as a script:

    PYTHONPATH=$PWD python tests/kind_mutations.py [SHEET ...] [--jobs N] [--timeout S]

which prints one line per mutation (exit status, traceback, located, wall time) and a summary.
Each case runs in a forked child of a warm parent (imports done once), with a time limit, so that
a hang is reported as one rather than stopping the run.
"""

from __future__ import annotations

import contextlib
import copy
import io
import math
import re
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

import yaml

DEMO = Path(__file__).resolve().parent.parent / "projects" / "cold-store"

# sheet id -> (its file, the files of the sheets it takes references from)
TARGETS = {
    "IC1": ("ic1.yaml", ()),
    "SM1": ("sm1.yaml", ()),
    "PW1": ("pipework.yaml", ()),
    "SB1": ("sb1.yaml", ()),
    "TM1": ("tm1.yaml", ()),
    "TB1": ("tb1.yaml", ("ew1.yaml", "fw1.yaml")),
}

MISSING = object()  # a mutation that deletes the key


class _Dumper(yaml.SafeDumper):
    def ignore_aliases(self, data):  # a mutated copy must not share nodes through anchors
        return True


def dump(sheet: dict) -> str:
    return yaml.dump(sheet, Dumper=_Dumper, sort_keys=False, allow_unicode=True, width=200,
                     default_flow_style=None)


def demo_sheet(sheet_id: str) -> dict:
    return yaml.safe_load((DEMO / "sheets" / TARGETS[sheet_id][0]).read_text())


# --- value mutations ---------------------------------------------------------------------------

_QTY = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$")
_WRONG_UNIT = {"degC": "kg", "K": "kg", "mm": "kg", "m": "kg", "min": "kg", "%": "kg"}


def _swap_temperature(unit: str) -> str | None:
    """An absolute temperature written as a difference and the reverse."""
    if unit == "degC":
        return "K" if True else None
    if unit in ("K", "delta_degC"):
        return "degC"
    return None


def value_variants(text: str) -> list[tuple[str, object]]:
    """Replacements of one quantity text: zero, negative, huge, non-finite, a wrong unit, the
    other kind of temperature."""
    m = _QTY.match(text) if isinstance(text, str) else None
    if not m:
        return []
    number, unit = m.group(1), m.group(2).strip()
    u = f" {unit}" if unit else ""
    out = [("zero", f"0{u}"), ("negative", f"-{number.lstrip('-+')}{u}"),
           ("huge", f"1e300{u}"), ("nan", f"nan{u}"), ("inf", f"inf{u}"),
           ("no unit", number)]
    out.append(("wrong unit", f"{number} {_WRONG_UNIT.get(unit, 'kg') if unit != 'kg' else 'm'}"))
    swapped = _swap_temperature(unit)
    if swapped:
        out.append(("absolute/difference swapped", f"{number} {swapped}"))
    return out


WRONG_TYPES = [("list", ["a", "b"]), ("mapping", {"a": 1}), ("string", "abc"), ("bool", True),
               ("null", None), ("bare number", 7)]


# --- walking a sheet --------------------------------------------------------------------------

def _get(root, path):
    for p in path:
        root = root[p]
    return root


def _set(root, path, value):
    parent = _get(root, path[:-1])
    if value is MISSING:
        del parent[path[-1]]
    else:
        parent[path[-1]] = value


@dataclass
class Mutation:
    sheet: str
    name: str
    text: str


def _walk(node, path, out, first_only=True):
    """Yield (path, node) for every value under ``node``; of a list of records only the first
    item is walked (the others are alike), so that the count stays in proportion."""
    yield path, node
    if isinstance(node, dict):
        for k, v in node.items():
            yield from _walk(v, path + (k,), out, first_only)
    elif isinstance(node, list) and node and isinstance(node[0], dict):
        for i, v in enumerate(node[:1] if first_only else node):
            yield from _walk(v, path + (i,), out, first_only)


def _pretty(path) -> str:
    return ".".join(str(p) if not isinstance(p, int) else f"[{p}]" for p in path).replace(".[", "[")


def generic_mutations(sheet_id: str, sheet: dict, big: bool = True) -> list[tuple[str, dict]]:
    """Every one-change mutation of every block's inputs (``big``: with the lists of thousands
    of items, slow to write)."""
    cases: list[tuple[str, dict]] = []

    def add(name, path, value):
        s = copy.deepcopy(sheet)
        _set(s, path, value)
        cases.append((name, s))

    for b, block in enumerate(sheet["blocks"]):
        base = ("blocks", b, "inputs")
        for path, node in list(_walk(block["inputs"], base, None)):
            label = f"{block['id']}.{_pretty(path[3:])}"
            parent = _get(sheet, path[:-1]) if len(path) > 3 else None
            if isinstance(parent, dict) and path[-1] != "source":
                add(f"{label}: deleted", path, MISSING)
            if path[-1] == "source":
                add(f"{label}: list", path, ["a"])
                continue
            if len(path) > 3:
                for what, value in WRONG_TYPES:
                    add(f"{label}: {what}", path, copy.deepcopy(value))
            text = node.get("value") if isinstance(node, dict) and "value" in node else node
            vpath = path + ("value",) if isinstance(node, dict) and "value" in node else path
            for what, value in value_variants(text):
                add(f"{label}: {what} ({value})", vpath, value)
            if isinstance(node, dict):
                s = copy.deepcopy(sheet)
                _get(s, path)["colour"] = "blue"
                cases.append((f"{label}: unknown key", s))
            if isinstance(node, list) and len(path) > 3:
                if node and isinstance(node[0], dict):
                    add(f"{label}: empty list", path, [])
                    add(f"{label}: one item", path, copy.deepcopy(node[:1]))
                    many = []
                    for i in range(10_000 if big else 0):
                        item = copy.deepcopy(node[i % len(node)])
                        if "name" in item:
                            item["name"] = f"{item['name']} {i}"
                        many.append(item)
                    if big:
                        add(f"{label}: 10 000 items", path, many)
                    # as many as a sheet within the 1 MiB file limit holds, without sources
                    for item in many:
                        item.pop("source", None)
                    room = 900_000 // max(len(dump(many[:50])) // 50, 1)
                    if big:
                        add(f"{label}: {min(room, 10_000)} items (within the file limit)",
                            path, many[:room])
                    if "name" in node[0]:
                        add(f"{label}: duplicated name", path,
                            copy.deepcopy(node) + copy.deepcopy(node[:1]))
                elif node and not isinstance(node[0], (dict, list)):
                    add(f"{label}: one element", path, copy.deepcopy(node[:1]))
                    add(f"{label}: three elements", path, copy.deepcopy(node) + node[-1:])
                    add(f"{label}: elements reversed", path, list(reversed(node)))
                    for i, element in enumerate(node):
                        for what, value in value_variants(element)[:1] + \
                                [v for v in value_variants(element) if v[0] in
                                 ("huge", "nan", "wrong unit")]:
                            new = list(node)
                            new[i] = value
                            add(f"{label}[{i}]: {what} ({value})", path, new)
    return cases


# --- the mutations each kind invites ----------------------------------------------------------

def special_mutations(sheet_id: str, sheet: dict, big: bool = True) -> list[tuple[str, dict]]:
    cases: list[tuple[str, dict]] = []

    def variant(name, change):
        s = copy.deepcopy(sheet)
        change(s)
        cases.append((name, s))

    inp = lambda s, b=0: s["blocks"][b]["inputs"]  # noqa: E731

    if sheet_id == "IC1":
        months = sheet["blocks"][0]["inputs"]["climate"]
        variant("climate: 11 months", lambda s: inp(s)["climate"].pop())
        variant("climate: 13 months", lambda s: inp(s)["climate"].append(
            copy.deepcopy(months[0])))
        variant("climate: reversed", lambda s: inp(s)["climate"].reverse())
        variant("climate: two months swapped", lambda s: inp(s)["climate"].insert(
            1, inp(s)["climate"].pop(2)))
        variant("climate: starting in July", lambda s: inp(s).__setitem__(
            "climate", inp(s)["climate"][6:] + inp(s)["climate"][:6]))
        variant("climate: January twice", lambda s: inp(s)["climate"][1].__setitem__(
            "month", "January"))
        variant("climate: month by number", lambda s: inp(s)["climate"][0].__setitem__(
            "month", 1))
        variant("climate: month abbreviated", lambda s: inp(s)["climate"][0].__setitem__(
            "month", "Jan"))
        variant("climate: relative humidity 150 %", lambda s: inp(s)["climate"][0].__setitem__(
            "outside_relative_humidity", "150 %"))
        variant("climate: relative humidity 0.6 (a fraction)", lambda s: inp(s)["climate"][0]
                .__setitem__("inside_relative_humidity", "0.6"))
        variant("climate: outside -300 degC", lambda s: inp(s)["climate"][0].__setitem__(
            "outside_temperature", "-300 degC"))
        variant("climate: outside 200 degC", lambda s: inp(s)["climate"][0].__setitem__(
            "outside_temperature", "200 degC"))
        variant("layers: unknown material", lambda s: inp(s)["layers"][0].__setitem__(
            "material", "unobtainium"))
        variant("layers: conductivity and material", lambda s: inp(s)["layers"][0].__setitem__(
            "conductivity", "0.2 W/(m*K)"))
        variant("layers: mu and s_d", lambda s: inp(s)["layers"][4].__setitem__(
            "equivalent_air_thickness", "0.1 m"))
        variant("layers: mu below 1", lambda s: inp(s)["layers"][4].__setitem__(
            "vapour_resistance_factor", "0.5"))
        variant("layers: every mu 1e9", lambda s: [l.__setitem__("equivalent_air_thickness",
                                                                    "1e9 m")
                                                      for l in inp(s)["layers"]
                                                      if l.pop("material", None) and
                                                      l.__setitem__("conductivity",
                                                                    "0.5 W/(m*K)") is None])
        variant("layers: zero-thickness vapour barrier", lambda s: inp(s)["layers"].insert(
            1, {"name": "Barrier", "thickness": "0 mm", "conductivity": "0.2 W/(m*K)",
                "equivalent_air_thickness": "100 m"}))

    if sheet_id in ("SM1", "PW1"):
        curve = [["0 degC", "0.034 W/(m*K)"], ["100 degC", "0.045 W/(m*K)"],
                 ["200 degC", "0.061 W/(m*K)"]]

        def with_curve(points):
            def change(s):
                layer = inp(s)["layers"][-1]
                layer.pop("material", None)
                layer.pop("conductivity", None)
                layer["conductivity_curve"] = points
            return change

        variant("curve: as given", with_curve(curve))
        variant("curve: non-monotone", with_curve([curve[0], ["100 degC", "0.02 W/(m*K)"],
                                                   curve[2]]))
        variant("curve: one point", with_curve(curve[:1]))
        variant("curve: empty", with_curve([]))
        variant("curve: temperatures out of order", with_curve([curve[1], curve[0], curve[2]]))
        variant("curve: a temperature twice", with_curve([curve[0], curve[0], curve[2]]))
        variant("curve: a difference for a temperature", with_curve(
            [["0 K", "0.034 W/(m*K)"], ["100 K", "0.045 W/(m*K)"]]))
        variant("curve: negative conductivity", with_curve([curve[0], ["200 degC",
                                                                       "-0.1 W/(m*K)"]]))
        variant("curve: zero conductivity", with_curve([["0 degC", "0 W/(m*K)"],
                                                        ["200 degC", "0 W/(m*K)"]]))
        variant("curve: three-element point", with_curve([curve[0] + ["x"], curve[2]]))
        variant("curve: points as mappings", with_curve([{"t": "0 degC"}, {"t": "1 degC"}]))
        variant("curve: wrong units", with_curve([["0 degC", "0.034 kg"],
                                                  ["200 degC", "0.061 kg"]]))
        variant("curve: too narrow for the layer", with_curve([["20 degC", "0.034 W/(m*K)"],
                                                               ["30 degC", "0.035 W/(m*K)"]]))
        variant("curve: nan", with_curve([["0 degC", "nan W/(m*K)"], curve[2]]))
        if big:
            variant("curve: 10 000 points", with_curve(
                [[f"{i * 0.02:.2f} degC", "0.04 W/(m*K)"] for i in range(10_000)]))
        variant("curve and conductivity", lambda s: (with_curve(curve)(s),
                                                     inp(s)["layers"][-1].__setitem__(
                                                         "conductivity", "0.04 W/(m*K)")))
        variant("layers: unknown material", lambda s: inp(s)["layers"][-1].__setitem__(
            "material", "unobtainium"))
        size = {"layer": inp(sheet)["layers"][-1]["name"]}

        def sizing(**target):
            def change(s):
                inp(s)["size_layer"] = dict(size, **target)
            return change

        hot = sheet_id == "SM1"
        variant("size_layer: surface target unreachable", sizing(
            max_surface_temperature="25.5 degC" if hot else "19.9 degC"))
        variant("size_layer: surface target below ambient", sizing(
            max_surface_temperature="10 degC"))
        variant("size_layer: surface target met at zero thickness", sizing(
            max_surface_temperature="179 degC" if hot else "5 degC"))
        variant("size_layer: surface target above the fluid", sizing(
            max_surface_temperature="500 degC"))
        variant("size_layer: heat-loss target unreachable", sizing(max_q_per_length="0.001 W/m"))
        variant("size_layer: heat-loss target met at zero thickness", sizing(
            max_q_per_length="1e6 W/m"))
        variant("size_layer: heat-loss target zero", sizing(max_q_per_length="0 W/m"))
        variant("size_layer: heat-loss target negative", sizing(max_q_per_length="-10 W/m"))
        variant("size_layer: both targets", sizing(max_q_per_length="50 W/m",
                                                   max_surface_temperature="50 degC"))
        variant("size_layer: no target", sizing())
        variant("size_layer: unknown layer", lambda s: inp(s).__setitem__(
            "size_layer", {"layer": "Nonesuch", "max_q_per_length": "50 W/m"}))
        variant("size_layer: surface target as a difference", sizing(
            max_surface_temperature="50 K"))
        variant("size_layer: with a curve", lambda s: (with_curve(curve)(s), sizing(
            max_surface_temperature="50 degC" if hot else "19 degC")(s)))
        variant("size_layer: on a duplicated layer name", lambda s: (
            inp(s)["layers"].append(copy.deepcopy(inp(s)["layers"][-1])),
            sizing(max_q_per_length="50 W/m")(s)))
        variant("layers: 200", lambda s: inp(s).__setitem__(
            "layers", [dict(inp(s)["layers"][-1], name=f"L{i}", thickness="1 mm")
                       for i in range(200)]))
        variant("inside equals ambient", lambda s: inp(s).__setitem__(
            "inside_temperature", inp(s)["ambient_temperature"]))
        variant("inside -300 degC", lambda s: inp(s).__setitem__("inside_temperature",
                                                                  "-300 degC"))
        variant("inside 5000 degC", lambda s: inp(s).__setitem__("inside_temperature",
                                                                  "5000 degC"))

    if sheet_id == "SB1":
        variant("section: unknown profile", lambda s: inp(s).__setitem__(
            "section", {"profile": "UB 999x999x999"}))
        variant("section: profile near miss", lambda s: inp(s).__setitem__(
            "section", {"profile": "UB 356x171x52"}))
        variant("section: profile lower case", lambda s: inp(s).__setitem__(
            "section", {"profile": "ub 356x171x51"}))
        dims = {"shape": "i_section", "height": "355 mm", "width": "171.5 mm",
                "web_thickness": "7.4 mm", "flange_thickness": "11.5 mm",
                "root_radius": "10.2 mm"}
        variant("section: from dimensions", lambda s: inp(s).__setitem__("section", dict(dims)))
        for key in dims:
            if key == "shape":
                variant("section: unknown shape", lambda s: inp(s).__setitem__(
                    "section", dict(dims, shape="z_section")))
                continue
            for what, value in value_variants(dims[key]):
                variant(f"section.{key}: {what} ({value})", lambda s, k=key, v=value:
                        inp(s).__setitem__("section", dict(dims, **{k: v})))
            variant(f"section.{key}: deleted", lambda s, k=key: inp(s).__setitem__(
                "section", {kk: vv for kk, vv in dims.items() if kk != k}))
        variant("section: web thicker than the flange is wide", lambda s: inp(s).__setitem__(
            "section", dict(dims, web_thickness="200 mm")))
        variant("section: flanges deeper than the section", lambda s: inp(s).__setitem__(
            "section", dict(dims, flange_thickness="200 mm")))
        variant("section: root radius beyond the flange outstand", lambda s: inp(s).__setitem__(
            "section", dict(dims, root_radius="100 mm")))
        variant("section: profile and dimensions", lambda s: inp(s).__setitem__(
            "section", dict(dims, profile="UB 356x171x51")))
        variant("section and section_factor", lambda s: inp(s).__setitem__(
            "section_factor", "150 1/m"))
        variant("exposure: unknown", lambda s: inp(s).__setitem__("exposure", "five_sided"))
        variant("encasement: unknown", lambda s: inp(s).__setitem__("encasement", "sock"))
        variant("unprotected with encasement", lambda s: inp(s).pop("protection"))
        variant("unprotected", lambda s: (inp(s).pop("protection"), inp(s).pop("encasement")))
        variant("critical temperature 2000 degC", lambda s: inp(s).__setitem__(
            "critical_temperature", "2000 degC"))
        variant("critical temperature 10 degC", lambda s: inp(s).__setitem__(
            "critical_temperature", "10 degC"))
        variant("duration 10 years", lambda s: inp(s).__setitem__("duration", "3650 day"))
        variant("fire: unknown curve", lambda s: inp(s).__setitem__("fire", "lukewarm"))

    if sheet_id == "TM1":
        variant("timber: unknown", lambda s: inp(s).__setitem__("timber", "balsa"))
        variant("timber and charring rate", lambda s: inp(s).__setitem__(
            "notional_charring_rate", "0.7 mm/min"))
        variant("charring rate without k_fi", lambda s: (inp(s).pop("timber"), inp(s).__setitem__(
            "notional_charring_rate", "0.7 mm/min")))
        variant("charring rate with k_fi", lambda s: (inp(s).pop("timber"), inp(s).update(
            notional_charring_rate="0.7 mm/min", k_fi="1.15")))
        variant("charring rate 0", lambda s: (inp(s).pop("timber"), inp(s).update(
            notional_charring_rate="0 mm/min", k_fi="1.15")))
        variant("charring rate negative", lambda s: (inp(s).pop("timber"), inp(s).update(
            notional_charring_rate="-0.7 mm/min", k_fi="1.15")))
        variant("k_fi 0", lambda s: (inp(s).pop("timber"), inp(s).update(
            notional_charring_rate="0.7 mm/min", k_fi="0")))
        variant("k_fi with timber", lambda s: inp(s).__setitem__("k_fi", "1.15"))
        variant("exposure: unknown", lambda s: inp(s).__setitem__("exposure", "one_sided"))
        variant("burnt through at the duration", lambda s: inp(s).__setitem__(
            "duration", "300 min"))
        variant("burnt through, four sided", lambda s: inp(s).update(
            duration="120 min", exposure="four_sided"))
        variant("width 10 mm", lambda s: inp(s).__setitem__("width", "10 mm"))
        variant("duration 10 s", lambda s: inp(s).__setitem__("duration", "10 s"))
        variant("duration 10 years", lambda s: inp(s).__setitem__("duration", "3650 day"))
        variant("zero-strength layer 500 mm", lambda s: inp(s).__setitem__(
            "zero_strength_layer", "500 mm"))
        variant("zero-strength layer negative", lambda s: inp(s).__setitem__(
            "zero_strength_layer", "-7 mm"))
        variant("design moment zero", lambda s: inp(s).__setitem__("design_moment", "0 kN*m"))
        variant("design moment tiny", lambda s: inp(s).__setitem__("design_moment",
                                                                   "1e-9 kN*m"))

    if sheet_id == "TB1":
        def region(s, b, i):
            return inp(s, b)["regions"][i]

        variant("regions: overlapping (later wins)", lambda s: region(s, 0, 2).__setitem__(
            "x", ["-1062.5", "50 mm"]))
        variant("regions: lining lifted off the inner leaf (gap)", lambda s: region(
            s, 0, 5).__setitem__("x", ["-80", "-20 mm"]))
        variant("regions: body in two pieces", lambda s: region(s, 1, 1).__setitem__(
            "x", ["500", "651 mm"]))
        variant("regions: zero width", lambda s: region(s, 0, 4).__setitem__(
            "x", ["-25", "-25 mm"]))
        variant("regions: zero height", lambda s: region(s, 0, 4).__setitem__(
            "y", ["100", "100 mm"]))
        variant("regions: reversed x", lambda s: region(s, 0, 0).__setitem__(
            "x", ["100", "0 mm"]))
        variant("regions: one region", lambda s: inp(s, 0).__setitem__(
            "regions", inp(s, 0)["regions"][:1]))
        variant("regions: 1 µm sliver", lambda s: inp(s, 0)["regions"].append(
            {"name": "Sliver", "x": ["0", "0.001 mm"], "y": ["0", "1165 mm"],
             "conductivity": "200 W/(m*K)"}))
        variant("regions: 100 m section", lambda s: region(s, 0, 0).__setitem__(
            "y", ["-100000", "1165 mm"]))
        variant("regions: conductivity 1e-9", lambda s: region(s, 0, 5).__setitem__(
            "conductivity", "1e-9 W/(m*K)"))
        variant("regions: conductivity 1e9", lambda s: region(s, 0, 5).__setitem__(
            "conductivity", "1e9 W/(m*K)"))
        variant("regions: unknown material", lambda s: region(s, 0, 0).__setitem__(
            "material", "unobtainium"))
        variant("regions: x in kg", lambda s: region(s, 0, 0).__setitem__(
            "x", ["0", "100 kg"]))
        variant("regions: x mapping", lambda s: region(s, 0, 0).__setitem__(
            "x", {"from": 0, "to": "100 mm"}))
        variant("surfaces: off the section", lambda s: inp(s, 0)["surfaces"][0].update(
            {"from": ["5000", "5000 mm"], "to": ["5000", "6000 mm"]}))
        variant("surfaces: inside the body", lambda s: inp(s, 0)["surfaces"][0].update(
            {"from": ["50", "1165 mm"], "to": ["50", "165 mm"]}))
        variant("surfaces: diagonal", lambda s: inp(s, 0)["surfaces"][0].update(
            {"from": ["-62.5", "1165 mm"], "to": ["0", "165 mm"]}))
        variant("surfaces: zero length", lambda s: inp(s, 0)["surfaces"][0].update(
            {"from": ["-62.5", "1165 mm"], "to": ["-62.5", "1165 mm"]}))
        variant("surfaces: half off the end", lambda s: inp(s, 0)["surfaces"][0].update(
            {"from": ["-62.5", "3000 mm"], "to": ["-62.5", "165 mm"]}))
        variant("surfaces: overlapping inside and outside", lambda s: inp(s, 0)[
            "surfaces"].append(dict(inp(s, 0)["surfaces"][0], name="Also", side="outside")))
        variant("surfaces: no outside", lambda s: inp(s, 0).__setitem__(
            "surfaces", [x for x in inp(s, 0)["surfaces"] if x["side"] == "inside"]))
        variant("surfaces: no inside", lambda s: inp(s, 0).__setitem__(
            "surfaces", [x for x in inp(s, 0)["surfaces"] if x["side"] == "outside"]))
        variant("surfaces: side unknown", lambda s: inp(s, 0)["surfaces"][0].__setitem__(
            "side", "middle"))
        variant("surfaces: resistance zero", lambda s: inp(s, 0)["surfaces"][0].__setitem__(
            "surface_resistance", "0 m^2*K/W"))
        variant("temperatures equal", lambda s: inp(s, 0).__setitem__(
            "outside_temperature", "12 degC"))
        variant("temperatures reversed", lambda s: inp(s, 0).update(
            inside_temperature="-4 degC", outside_temperature="12 degC"))
        variant("cell_size 1 µm", lambda s: inp(s, 0).__setitem__("cell_size", "0.001 mm"))
        variant("cell_size 10 m", lambda s: inp(s, 0).__setitem__("cell_size", "10 m"))
        variant("cell_size 25 mm", lambda s: inp(s, 0).__setitem__("cell_size", "25 mm"))
        variant("condensation resistance zero", lambda s: inp(s, 0).__setitem__(
            "condensation_surface_resistance", "0 m^2*K/W"))
        variant("flanking: U ref to nothing", lambda s: inp(s, 0)["flanking"][0].__setitem__(
            "U", {"ref": "EW1.wall.nothing"}))
        variant("flanking: U ref to a sheet not there", lambda s: inp(s, 0)["flanking"][0]
                .__setitem__("U", {"ref": "ZZ9.wall.U"}))
        variant("flanking: 200 elements", lambda s: inp(s, 1).__setitem__(
            "flanking", [dict(inp(s, 1)["flanking"][0], name=f"F{i}") for i in range(200)]))
        variant("flanking: so large psi is hugely negative", lambda s: inp(s, 0)["flanking"][1]
                .__setitem__("length", "1000 m"))
    return cases


def mutations(sheet_id: str, big: bool = True) -> list[Mutation]:
    sheet = demo_sheet(sheet_id)
    cases = generic_mutations(sheet_id, sheet, big) + special_mutations(sheet_id, sheet, big)
    return [Mutation(sheet_id, name, dump(s)) for name, s in cases]


# --- running a case ---------------------------------------------------------------------------

@dataclass
class Outcome:
    mutation: Mutation
    status: int | None  # None: timed out
    stderr: str
    seconds: float

    @property
    def traceback(self) -> bool:
        return "Traceback" in self.stderr or "internal error" in self.stderr

    def located(self) -> bool:
        """Every error names FILE:LINE:COL in the mutated sheet's file."""
        file = TARGETS[self.mutation.sheet][0]
        errors = [l for l in self.stderr.splitlines() if ": error: " in l]
        # The file-size limit is the one error about a whole file, refused before it is read.
        return bool(errors) and all(
            re.match(rf"^\S*sheets/{re.escape(file)}:\d+:\d+: error: ", l) or
            re.match(rf"^\S*sheets/{re.escape(file)}: error: file too large ", l)
            for l in errors)

    @property
    def verdict(self) -> str:
        if self.status is None:
            return "HANG"
        if self.traceback or self.status not in (0, 1, 2):
            return f"FAULT{self.status}"
        if self.status == 2 and not self.located():
            return "UNLOCATED"
        return "ok"


def write_case(root: Path, mutation: Mutation) -> None:
    file, deps = TARGETS[mutation.sheet]
    (root / "sheets").mkdir(parents=True)
    project = (DEMO / "project.yaml").read_text()
    listed = "".join(f"    - sheets/{f}\n" for f in (*deps, file))
    project = re.sub(r"(  sheets:\n)(    - .*\n)+", lambda m: m.group(1) + listed, project)
    (root / "project.yaml").write_text(project)
    for dep in deps:
        (root / "sheets" / dep).write_text((DEMO / "sheets" / dep).read_text())
    (root / "sheets" / file).write_text(mutation.text)


def check_in_process(mutation: Mutation) -> tuple[int, str]:
    from calcdoc.cli import main
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder) / "p"
        write_case(root, mutation)
        err = io.StringIO()
        with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
            status = main(["check", str(root)])
    return status, err.getvalue()


def run_all(cases: list[Mutation], jobs: int = 2, timeout: float = 60.0):
    """Run each case in a forked child of this (warm) process; yield Outcomes as they end."""
    import multiprocessing as mp
    ctx = mp.get_context("fork")

    def child(mutation, conn):
        try:
            conn.send(check_in_process(mutation))
        except BaseException as exc:  # noqa: BLE001 - reported as a fault
            import traceback
            conn.send((99, "Traceback (harness)\n" + "".join(traceback.format_exception(exc))))
        conn.close()

    pending = list(cases)
    running: list = []
    while pending or running:
        while pending and len(running) < jobs:
            m = pending.pop(0)
            recv, send = ctx.Pipe(duplex=False)
            p = ctx.Process(target=child, args=(m, send))
            p.start()
            send.close()
            running.append((m, p, recv, time.monotonic()))
        time.sleep(0.01)
        for item in list(running):
            m, p, recv, start = item
            elapsed = time.monotonic() - start
            if recv.poll():
                try:
                    status, err = recv.recv()
                except EOFError:
                    status, err = 98, "Traceback (child died)"
                p.join()
                running.remove(item)
                yield Outcome(m, status, err, elapsed)
            elif not p.is_alive():
                p.join()
                running.remove(item)
                yield Outcome(m, 97, f"Traceback (child exited {p.exitcode})", elapsed)
            elif elapsed > timeout:
                p.kill()
                p.join()
                running.remove(item)
                yield Outcome(m, None, "", elapsed)


def main(argv: list[str]) -> int:
    jobs, timeout, sheets, verbose = 2, 60.0, [], "-v" in argv
    argv = [a for a in argv if a != "-v"]
    it = iter(argv)
    for a in it:
        if a == "--jobs":
            jobs = int(next(it))
        elif a == "--timeout":
            timeout = float(next(it))
        else:
            sheets.append(a)
    sheets = sheets or list(TARGETS)
    check_in_process(mutations("TM1")[0])  # warm: imports and caches before forking
    bad = 0
    counts: dict[str, dict[str, int]] = {}
    for sheet in sheets:
        for o in run_all(mutations(sheet), jobs, timeout):
            counts.setdefault(sheet, {}).setdefault(o.verdict, 0)
            counts[sheet][o.verdict] += 1
            first = next((l for l in o.stderr.splitlines() if l.strip()), "")
            if o.verdict != "ok":
                bad += 1
                last = o.stderr.strip().splitlines()[-1] if o.stderr.strip() else ""
                print(f"{o.verdict:9} {o.status} {o.seconds:6.1f}s {sheet} {o.mutation.name} | "
                      f"{first[:160]} | {last[:200]}", flush=True)
            elif o.seconds > 10 or verbose:
                print(f"{'SLOW' if o.seconds > 10 else 'ok':9} {o.status} {o.seconds:6.1f}s "
                      f"{sheet} {o.mutation.name} | {first[:200]}", flush=True)
    for sheet, c in counts.items():
        print(sheet, sum(c.values()), c)
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
