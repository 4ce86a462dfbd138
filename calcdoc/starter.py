"""``calcdoc new DIR``: a small starter project that builds as it stands."""

from __future__ import annotations

import datetime
import json
from pathlib import Path

from calcdoc.errors import InputError, InputErrors, Location

__all__ = ["write_starter", "STARTER_FILES"]

STARTER_FILES = {
    "project.yaml": """\
# yaml-language-server: $schema=schemas/project.json
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
# yaml-language-server: $schema=../schemas/sheet.json
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
        # from the inside (the heated room) outward, as the kind reads them
        - {name: Plasterboard, thickness: 12.5 mm, material: gypsum_plasterboard,
           source: Wall detail (example)}
        - {name: Dense block, thickness: 100 mm, material: concrete_block_dense,
           source: Wall detail (example)}
        - {name: Mineral wool, thickness: 100 mm, material: mineral_wool,
           source: Wall detail (example)}
        - {name: Brick outer leaf, thickness: 102.5 mm, material: brick_clay,
           source: Wall detail (example)}
      inside_temperature: {value: 20 degC, source: Heating design brief (example)}
      outside_temperature: {value: -3 degC, source: Winter design temperature (example)}
      inside_relative_humidity: {value: 55 %, assumption: Occupied dwelling (example)}
      area: {value: 85 m^2, source: Elevation drawing (example)}
    checks:
      - {result: U, at_most: 0.35 W/(m^2*K), source: Example energy requirement}
""",
    "sheets/loss.yaml": """\
# yaml-language-server: $schema=../schemas/sheet.json
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
      dT: {value: 23 K, assumption: "20 °C inside, −3 °C outside (example)"}
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
    from calcdoc.schema import project_schema, review_schema, sheet_schema
    today = datetime.date.today().isoformat()
    files = {name: text.replace("{today}", today) for name, text in STARTER_FILES.items()}
    # The schemas an editor completes keys from (the comment at the top of each file names
    # them for YAML language servers); `calcdoc schema` prints them again after an upgrade.
    for name, made in (("sheet", sheet_schema), ("project", project_schema),
                       ("review", review_schema)):
        files[f"schemas/{name}.json"] = json.dumps(made(), indent=1, ensure_ascii=False) + "\n"
    written = []
    for name, text in files.items():
        path = folder / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
        written.append(path)
    return written
