"""Benchmark: ranking synthetic catalogs of 1,000 and 5,000 motors, in-process and from a cold process.

Run by hand from the repository root:  python tests/benchmarks/bench_match.py [--baseline OTHER_CHECKOUT]

Prints the in-process time to rank (fit filter, one batched flight, delays, reasons) from an open catalog,
the pieces around it that a cold `motorlib match` also pays (opening the catalog with a current index, reading
the rows, building the motor pack, writing the JSON), the wall-clock time of `motorlib match` in a fresh process
for the 1,000- and 5,000-motor catalogs (table to a pipe, and --json) and for the bundled sample catalog (median
of seven runs, and the fastest: other work on this shared machine only adds time, and the same cold run has
ranged over 0.55-1.3 s within minutes), and the heaviest imports of the CLI's match path (`python -X importtime`).
Next to each wall-clock figure it prints the CPU time (of the child process for cold runs), the figure to compare
on a loaded machine.

With ``--baseline`` (the root of another checkout, e.g. ``git worktree add /tmp/base main``), each cold figure
is also taken for that checkout's code in the same run, the two alternating run by run, each on its own copy of
the catalog (the other's index format may differ), and the two outputs are compared byte for byte (the
catalog's path aside): the figure to compare on a shared machine, pair by pair.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import shutil
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from motorlib import write_record  # noqa: E402
from motorlib.flight.airframe import Airframe, Launch, Recovery  # noqa: E402
from motorlib.catalog import Catalog  # noqa: E402
from motorlib.matching import MatchSettings, rank  # noqa: E402
from tests.synthetic import synthetic_motors  # noqa: E402

AIRFRAME_TOML = """name = "Benchmark rocket (synthetic)"
[airframe]
mass = "1.2 kg"
diameter = "54 mm"
drag_coefficient = 0.5
mount_diameter = "29 mm"
mount_length = "300 mm"
[launch]
rail_length = "2 m"
rail_angle = "3 deg"
wind_speed = "3 m/s"
[recovery]
device = "parachute"
drag_coefficient = 0.8
diameter = "0.9 m"
"""


# A cold process with its bytecode compiled, as an installed program runs: Python may write its .pyc files
# (PYTHONDONTWRITEBYTECODE would make every run compile motorlib's sources again, ~0.2 s)
_COLD_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def _median_wall(args: list[str], repeats: int = 7) -> tuple[float, float, float]:
    """Median wall-clock and CPU (user + system) time of a fresh process running ``args``, and its fastest wall
    time (other work on a shared machine only adds time: the fastest run is the code's own cost).

    One unmeasured run first writes any bytecode that is missing.
    """
    (walls, cpus), = _paired_walls([(args, _COLD_ENV)], repeats).values()
    return statistics.median(walls), statistics.median(cpus), min(walls)


def _paired_walls(runs: list[tuple[list[str], dict[str, str]]], repeats: int,
                  cwd: Path | None = None) -> dict[int, tuple[list[float], list[float]]]:
    """Wall-clock and CPU times of fresh processes for each (args, environment) of ``runs``, taking them in turn
    ``repeats`` times (so that a load on the machine falls on all alike); one unmeasured run of each first.
    ``cwd``: where they run (``python -m`` imports from there first)."""
    for args, env in runs:
        subprocess.run(args, check=True, capture_output=True, env=env, cwd=cwd)
    out: dict[int, tuple[list[float], list[float]]] = {k: ([], []) for k in range(len(runs))}
    for _ in range(repeats):
        for k, (args, env) in enumerate(runs):
            before = resource.getrusage(resource.RUSAGE_CHILDREN)
            start = time.perf_counter()
            subprocess.run(args, check=True, capture_output=True, env=env, cwd=cwd)
            out[k][0].append(time.perf_counter() - start)
            after = resource.getrusage(resource.RUSAGE_CHILDREN)
            out[k][1].append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return out


def _against_baseline(baseline: Path, airframe: Path, catalog: Path, extra: list[str], repeats: int = 9) -> str:
    """This checkout against ``baseline`` for one cold ``motorlib match``: median wall and CPU of each, and
    whether the outputs are the same bytes (the catalog's path aside)."""
    copy = catalog.with_name(catalog.name + "-baseline")
    if not copy.exists():  # its own index: the baseline's format may differ from ours
        shutil.copytree(catalog, copy, ignore=shutil.ignore_patterns(".motorlib"))
    runs, outputs = [], []
    # run from the catalogs' folder: `python -m` imports from the working folder first, which must be neither
    # checkout (from this one's root, both runs would import this code)
    neutral = catalog.parent
    for tree, cat in ((ROOT, catalog), (baseline, copy)):
        args = [sys.executable, "-m", "motorlib", "match", str(airframe), "--catalog", str(cat), *extra]
        env = dict(_COLD_ENV, PYTHONPATH=str(tree))
        runs.append((args, env))
        done = subprocess.run(args, check=True, capture_output=True, env=env, cwd=neutral)
        where = subprocess.run([sys.executable, "-c", "import motorlib; print(motorlib.__file__)"], check=True,
                               capture_output=True, text=True, env=env, cwd=neutral).stdout.strip()
        if not Path(where).is_relative_to(tree):
            raise SystemExit(f"{tree}: its runs import motorlib from {where}")
        outputs.append(done.stdout.replace(str(cat).encode(), b"CATALOG"))
    times = _paired_walls(runs, repeats, cwd=neutral)
    (new_wall, new_cpu), (old_wall, old_cpu) = ((statistics.median(w), statistics.median(c)) for w, c in times.values())
    return (f"this {new_wall:.3f} s (CPU {new_cpu:.3f} s), baseline {old_wall:.3f} s (CPU {old_cpu:.3f} s), "
            f"ratio {new_wall / old_wall:.2f} (CPU {new_cpu / old_cpu:.2f}); output "
            + ("identical" if outputs[0] == outputs[1] else "DIFFERENT"))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--baseline", type=Path, help="root of another checkout to time the cold runs against")
    baseline = parser.parse_args().baseline
    motorlib_cli = [sys.executable, "-m", "motorlib"]
    with tempfile.TemporaryDirectory() as tmp:
        airframe_path = Path(tmp) / "rocket.toml"
        airframe_path.write_text(AIRFRAME_TOML)
        frame = Airframe("Benchmark rocket (synthetic)", 1.2, 0.054, 0.5, mount_diameter_m=0.029,
                         mount_length_m=0.3, launch=Launch(rail_length_m=2.0, rail_angle_rad=0.052, wind_speed_m_s=3.0),
                         # the parachute of AIRFRAME_TOML (Cd 0.8, 0.9 m): without one every motor fails no-recovery
                         recovery=Recovery(device="parachute", drag_area_m2=0.8 * math.pi * 0.45 ** 2))
        settings = MatchSettings(target_m=1000.0)
        print(f"{'motors':>7} {'rank in-process (ms)':>22}")
        pieces = {}
        for n in (1000, 5000):
            root = Path(tmp) / f"cat{n}"
            incoming = Path(tmp) / f"in{n}"
            incoming.mkdir()
            paths = [write_record(m, incoming / f"m{i}.xml") for i, m in enumerate(synthetic_motors(n, seed=n))]
            Catalog(root).add_files(paths)
            catalog = Catalog(root)
            rows = catalog.rows()
            times = []
            for _ in range(7):
                start = time.perf_counter()
                result = rank(frame, rows, catalog.motor_pack, settings)
                times.append(time.perf_counter() - start)
            rows_s = statistics.median([_time(lambda: catalog.rows()) for _ in range(5)])
            rank_cpu_s = statistics.median([_cpu(lambda: rank(frame, rows, catalog.motor_pack, settings))
                                            for _ in range(3)])
            print(f"{n:>7} {1e3 * statistics.median(times):>22.1f}   (CPU {1e3 * rank_cpu_s:.1f} ms; "
                  f"+ {1e3 * rows_s:.1f} ms to read the rows; {len(result.passing)} pass)")
            payload = {"airframe": result.airframe, "conditions": result.conditions,
                       "candidates": [c.as_dict() for c in result.candidates]}
            pieces[n] = {  # CPU time, median of 5
                "open (current index)": statistics.median([_cpu(lambda: Catalog(root).close()) for _ in range(5)]),
                "read the rows": statistics.median([_cpu(lambda: catalog.rows()) for _ in range(5)]),
                "motor pack, every row": statistics.median([_cpu(lambda: catalog.motor_pack(rows)) for _ in range(5)]),
                "json, indented": statistics.median([_cpu(lambda: json.dumps(payload, indent=2)) for _ in range(5)]),
                "json, compact": statistics.median([_cpu(lambda: json.dumps(payload)) for _ in range(5)]),
            }
            catalog.close()
        print("pieces of a cold match besides the flight (CPU time):")
        for name in pieces[1000]:
            print(f"  {name:<24}" + "".join(f"{1e3 * pieces[n][name]:>9.1f} ms ({n})" for n in pieces))
        for n, goal in ((1000, 0.5), (5000, 0.8)):
            args = motorlib_cli + ["match", str(airframe_path), "--catalog", str(Path(tmp) / f"cat{n}"), "--target", "1000"]
            table, table_cpu, table_min = _median_wall(args + ["--top", "10"])
            as_json, json_cpu, json_min = _median_wall(args + ["--json"])
            print(f"cold `motorlib match`, {n:,}-motor catalog: {table:.3f} s table (CPU {table_cpu:.3f} s, fastest "
                  f"{table_min:.3f} s), {as_json:.3f} s --json (CPU {json_cpu:.3f} s, fastest {json_min:.3f} s)  "
                  f"(goal {goal} s)")
            if baseline is not None:
                for extra in (["--top", "10"], ["--json"]):
                    print(f"  against {baseline}, {' '.join(extra)}: "
                          + _against_baseline(baseline, airframe_path, Path(tmp) / f"cat{n}", ["--target", "1000", *extra]))
        cold_bundled, bundled_cpu, bundled_min = _median_wall(
            motorlib_cli + ["match", str(ROOT / "sample_curves" / "airframes" / "quibble-41.toml"),
                            "--catalog", str(ROOT / "sample_curves"), "--target", "400"])
        print(f"cold `motorlib match`, bundled catalog:     {cold_bundled:.3f} s (CPU {bundled_cpu:.3f} s, fastest "
              f"{bundled_min:.3f} s)  (goal 0.5 s)")
        trace = subprocess.run([sys.executable, "-X", "importtime", "-m", "motorlib", "match",
                                str(ROOT / "sample_curves" / "airframes" / "quibble-41.toml"), "--catalog",
                                str(ROOT / "sample_curves"), "--target", "400"], capture_output=True, text=True, env=_COLD_ENV).stderr
    tops = {}
    for line in trace.splitlines():
        if not line.startswith("import time:") or "|" not in line:
            continue
        _, cumulative, name = (part.strip() for part in line.split(":", 1)[1].split("|"))
        if cumulative.isdigit() and not name.startswith(" "):
            top = name.strip().split(".")[0]
            tops[top] = max(tops.get(top, 0), int(cumulative))
    print("heaviest imports on the match path (cumulative, ms):",
          ", ".join(f"{k} {v / 1000:.0f}" for k, v in sorted(tops.items(), key=lambda kv: -kv[1])[:8]))
    for heavy in ("pandas", "scipy", "matplotlib"):
        print(f"  {heavy} imported: {heavy in tops}")


def _time(fn) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def _cpu(fn) -> float:
    start = time.process_time()
    fn()
    return time.process_time() - start


if __name__ == "__main__":
    main()
