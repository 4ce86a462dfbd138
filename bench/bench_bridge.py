"""Benchmark: the two-dimensional thermal-bridge solver on a typical junction.

Case (invented for the benchmark; λ and R_s typical values): a 200 mm reinforced-concrete wall
(λ = 2.3 W/(m·K)) with 100 mm of external insulation (0.035) and 15 mm of plaster inside (0.57),
met by a 200 mm concrete slab that passes through the insulation to the outside face. The section
is 1.3 m × 2.2 m: the slab runs 1 m into the building from the wall's inside face and the wall
1 m above and below the slab, where the cut-off planes are (ISO 10211 §5.2: at least 1 m, from
memory). R_se = 0.04, R_si = 0.13 on the wall, 0.17 on the floor and 0.10 on the ceiling
(ISO 6946 Table 7, from memory); θ_i = 20 °C, θ_e = 0 °C.

Printed: the time of :func:`calcdoc.physics.bridge2d.thermal_bridge` to the mesh criterion
(L2D changes by less than 1 % on halving, f_Rsi by less than 0.005; the condensation solve with
R_si = 0.25 included), the meshes solved, the cell count, the peak memory, the results against a
reference on a mesh eight times finer, and the time of single solves on finer uniform meshes to
show how the solver scales. Target: under 1 s on a 2-core machine. No test asserts a time.

Then the demo sheet TB1 through the ``thermal_bridge`` kind: the evaluation of a copy of the
demo project listing EW1, FW1 and TB1, less the same without TB1 (the sheet's own evaluation:
input conversion, the solver, the steps and the figure data), the solver's share of it, and the
time to draw TB1's two section figures. Target: the kind adds little to the solver.

Run: ``.venv/bin/python bench/bench_bridge.py``
"""

from __future__ import annotations

import resource
import shutil
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from calcdoc.physics.bridge2d import (Region, Surface, prepare_section, psi,  # noqa: E402
                                      solve_section, thermal_bridge)

ZERO_CELSIUS = 273.15
THETA_I, THETA_E = ZERO_CELSIUS + 20.0, ZERO_CELSIUS
TARGET_SECONDS = 1.0
REPEATS = 5

REGIONS = [Region((0.0, 0.2), (-1.0, 1.2), 2.3),       # wall
           Region((0.2, 0.3), (-1.0, 1.2), 0.035),     # external insulation
           Region((-0.015, 0.0), (-1.0, 0.0), 0.57),   # plaster below the slab
           Region((-0.015, 0.0), (0.2, 1.2), 0.57),    # plaster above the slab
           Region((-1.0, 0.3), (0.0, 0.2), 2.3)]       # slab through the insulation
SURFACES = [Surface((0.3, -1.0), (0.3, 1.2), "outside", 0.04),
            Surface((-0.015, 1.2), (-0.015, 0.2), "inside", 0.13),
            Surface((-0.015, 0.2), (-1.0, 0.2), "inside", 0.17),
            Surface((-1.0, 0.0), (-0.015, 0.0), "inside", 0.10),
            Surface((-0.015, 0.0), (-0.015, -1.0), "inside", 0.13)]
# Flanking wall on internal dimensions: 1 m above and 1 m below the slab (the plaster face).
U_WALL = 1.0 / (0.13 + 0.015 / 0.57 + 0.2 / 2.3 + 0.1 / 0.035 + 0.04)


def main() -> None:
    thermal_bridge(REGIONS, SURFACES, THETA_I, THETA_E)  # warm-up: imports and caches
    times = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        result = thermal_bridge(REGIONS, SURFACES, THETA_I, THETA_E)
        times.append(time.perf_counter() - start)
    best, median = min(times), sorted(times)[len(times) // 2]

    tracemalloc.start()
    thermal_bridge(REGIONS, SURFACES, THETA_I, THETA_E)
    _, traced_peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss_peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # kB on Linux

    check = result.mesh_check
    print("Junction: wall with external insulation, slab through it; 1.3 m x 2.2 m section")
    print(f"  thermal_bridge to the mesh criterion: best {1000 * best:.1f} ms, median "
          f"{1000 * median:.1f} ms of {REPEATS} (target < {1000 * TARGET_SECONDS:.0f} ms: "
          f"{'met' if median < TARGET_SECONDS else 'NOT met'}, "
          f"{TARGET_SECONDS / median:.0f}x margin)")
    print(f"  meshes solved (refinement iterations): {len(check.levels)}, each solved twice "
          f"(design R_si and R_si = 0.25): {2 * len(check.levels)} sparse LU solves")
    for number, level in enumerate(check.levels):
        print(f"    mesh {number}: {level.cells:7d} cells, {1000 * level.smallest_cell:.3g} to "
              f"{1000 * level.largest_cell:.3g} mm, L2D = {level.L2D:.5f} W/(m·K), "
              f"f_Rsi = {level.f_Rsi:.4f}")
    print(f"  {check.statement()}")
    print(f"  peak memory: {traced_peak / 2**20:.1f} MiB traced by tracemalloc during one run; "
          f"process peak RSS {rss_peak:.0f} MiB (including Python, numpy and scipy)")
    print(f"  L2D = {result.L2D:.4f} W/(m·K), ψ (internal dimensions, U_wall = {U_WALL:.4f}) = "
          f"{psi(result.L2D, [(U_WALL, 1.0), (U_WALL, 1.0)]):.4f} W/(m·K), f_Rsi = "
          f"{result.f_Rsi:.4f} at ({result.x_si_min:.4f}, {result.y_si_min:.4f}) m, "
          f"imbalance {result.imbalance:.1e} W/m")

    # Accuracy of the criterion's answer: the same graded mesh halved three more times.
    section = prepare_section(REGIONS, SURFACES)
    mesh = result.design.mesh.halved().halved().halved()
    start = time.perf_counter()
    reference = solve_section(section, mesh, THETA_I, THETA_E)
    reference_f = solve_section(section, mesh, THETA_I, THETA_E, 0.25).f_Rsi
    seconds = time.perf_counter() - start
    print(f"  reference, 8x finer ({reference.cells} cells, {seconds:.1f} s for its two solves): "
          f"L2D = {reference.L2D:.4f} ({100 * (result.L2D / reference.L2D - 1):+.2f} %), "
          f"f_Rsi = {reference_f:.4f} ({result.f_Rsi - reference_f:+.4f})")

    print("  single solves on uniform meshes (how the sparse LU scales):")
    for size in (0.02, 0.01, 0.005):
        mesh = section.uniform_mesh(size)
        start = time.perf_counter()
        solution = solve_section(section, mesh, THETA_I, THETA_E)
        seconds = time.perf_counter() - start
        print(f"    cells <= {1000 * size:g} mm: {solution.cells:7d} cells, "
              f"{1000 * seconds:7.1f} ms, {1e6 * seconds / solution.cells:.2f} µs per cell, "
              f"L2D = {solution.L2D:.4f}")


def demo_sheet() -> None:
    """Time the demo sheet TB1 through the kind (see the module docstring)."""
    import calcdoc.kinds.bridge as kind
    from calcdoc.evaluate import evaluate_folder
    from calcdoc.render.plots import draw

    demo = Path(__file__).resolve().parents[1] / "projects" / "cold-store"
    solver_seconds = []
    solver = kind.thermal_bridge

    def timed(*args, **kwargs):
        start = time.perf_counter()
        try:
            return solver(*args, **kwargs)
        finally:
            solver_seconds.append(time.perf_counter() - start)

    with tempfile.TemporaryDirectory() as folder:
        projects = {}
        for name, sheets in (("without", ["ew1", "fw1"]), ("with", ["ew1", "fw1", "tb1"])):
            project = Path(folder) / name
            shutil.copytree(demo, project)
            (project / "review.yaml").unlink(missing_ok=True)
            text = (project / "project.yaml").read_text()
            start, end = text.index("  sheets:\n"), text.index("revisions:")
            (project / "project.yaml").write_text(
                text[:start] + "  sheets:\n" + "".join(f"    - sheets/{s}.yaml\n" for s in sheets)
                + text[end:])
            projects[name] = project
        warm = evaluate_folder(projects["with"])  # warm-up: imports, library, caches
        blocks_of = [b for s in warm.sheets if s.id == "TB1" for b in s.blocks]
        times = {"with": [], "without": []}
        kind.thermal_bridge = timed
        try:
            for _ in range(REPEATS):
                for name in ("without", "with"):
                    start = time.perf_counter()
                    package = evaluate_folder(projects[name])
                    times[name].append(time.perf_counter() - start)
        finally:
            kind.thermal_bridge = solver
    median = {name: sorted(t)[len(t) // 2] for name, t in times.items()}
    sheet = median["with"] - median["without"]
    per_run = sorted(sum(solver_seconds[i:i + len(blocks_of)]) for i in range(
        0, len(solver_seconds), len(blocks_of)))  # the solves of one evaluation of TB1
    solve = per_run[len(per_run) // 2]
    blocks = blocks_of
    start = time.perf_counter()
    for block in blocks:
        for figure in block.output.figures:
            draw(figure)
    drawing = time.perf_counter() - start
    print("Demo sheet TB1 (two junctions) through the thermal_bridge kind")
    print(f"  evaluation of EW1 + FW1 + TB1: {1000 * median['with']:.0f} ms, of EW1 + FW1: "
          f"{1000 * median['without']:.0f} ms (medians of {REPEATS}): TB1 takes "
          f"{1000 * sheet:.0f} ms, of which the solver {1000 * solve:.0f} ms for its two blocks")
    for block in blocks:
        check = block.output.results
        print(f"    {block.key}: L2D = {check['L2D'].value:.4f} W/(m·K), psi = "
              f"{check['psi'].value:.4f} W/(m·K), f_Rsi = {check['f_Rsi'].value:.3f}")
    print(f"  drawing its two section figures (the site and the PDF share them): "
          f"{1000 * drawing:.0f} ms")


if __name__ == "__main__":
    main()
    demo_sheet()
