"""``calcdoc new DIR``: a small starter project that builds as it stands."""

from __future__ import annotations

import datetime
from pathlib import Path

from calcdoc.errors import InputError, InputErrors, Location

__all__ = ["write_starter", "STARTER_FILES"]

STARTER_FILES = {
    "project.yaml": """\
# A starter calculation package. Replace the example values with your project's.
project:
  number: "00-000"
  title: Example project
  client: Example client
  site: Example site
  organisation: Example organisation
package:
  number: CP-001
  title: Example calculation package
  sheets: [sheets/wall.yaml, sheets/loss.yaml]
revisions:
  - {rev: P1, date: {today}, purpose: For review, by: "", checked: "", approved: ""}
units: SI
precision: 3
""",
    "sheets/wall.yaml": """\
id: W1
title: External wall, fabric transmittance
signoff:
  prepared: {by: Your Name, date: {today}, rev: P1}
notes: |
  Build-up from the architect's wall detail (example). Inside is the heated room.
blocks:
  - id: wall
    kind: layered_wall
    title: Wall transmittance and inside surface condensation
    inputs:
      layers:
        - {name: Brick outer leaf, thickness: 102.5 mm, material: brick_clay}
        - {name: Mineral wool, thickness: 100 mm, material: mineral_wool}
        - {name: Dense block, thickness: 100 mm, material: concrete_block_dense}
        - {name: Plasterboard, thickness: 12.5 mm, material: gypsum_plasterboard}
      inside_temperature: 20 degC
      outside_temperature: -3 degC
      inside_relative_humidity: 55 %
      area: {value: 85 m^2, source: Elevation drawing (example)}
    checks:
      - {result: U, at_most: 0.35 W/(m^2*K), source: Example energy requirement}
""",
    "sheets/loss.yaml": """\
id: L1
title: Fabric heat loss
signoff:
  prepared: {by: Your Name, date: {today}, rev: P1}
blocks:
  - id: loss
    kind: formula
    title: Heat loss through the wall
    given:
      U: {ref: W1.wall.U}
      A: {value: 85 m^2, source: Elevation drawing (example)}
      dT: 23 K
    steps:
      - {name: Q, expr: "U * A * dT", unit: W, label: Fabric heat loss}
    checks:
      - {result: Q, at_most: 1 kW, source: Example heater capacity}
""",
}


def write_starter(folder: Path) -> list[Path]:
    """Write the starter project into an empty or new folder; return the files written."""
    if folder.exists() and (not folder.is_dir() or any(folder.iterdir())):
        raise InputErrors([InputError(Location(str(folder)), "new",
                                      "refusing to write into a folder that is not empty",
                                      "a new or empty folder", "a folder with files")])
    today = datetime.date.today().isoformat()
    written = []
    for name, text in STARTER_FILES.items():
        path = folder / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text.replace("{today}", today), encoding="utf-8")
        written.append(path)
    return written
