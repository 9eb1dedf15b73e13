"""Benchmark (fault test): writers racing on a NEW catalog, and SIGKILL at many moments of an add.

Run by hand from the repository root:  python tests/benchmarks/bench_catalog_races.py [TRIALS]

Prints, for TRIALS trials (default 20) of 8 processes adding disjoint curves to a catalog with no index yet:
how many trials lost a curve, raised, or left an ``index.corrupt``; then, for 10 kill moments spread over
one ``catalog add`` of 300 curves: whether every curve file is complete (readable), whether the next open
removes the staged and temporary files, and whether the index then matches the files.
"""

from __future__ import annotations

import multiprocessing
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from motorlib import write_record  # noqa: E402
from motorlib.catalog import Catalog  # noqa: E402
from motorlib.files.motor_xml import read_record  # noqa: E402
from tests.synthetic import synthetic_motors  # noqa: E402


def _writer(root: str, files: list[str], queue: "multiprocessing.Queue[str]") -> None:
    try:
        Catalog(root).add_files(files)
        queue.put("ok")
    except BaseException as exc:  # noqa: BLE001
        queue.put(f"{type(exc).__name__}: {exc}")


def races(trials: int, incoming: list[str], tmp: Path) -> None:
    context = multiprocessing.get_context("fork")
    lost = raised = corrupt = 0
    for trial in range(trials):
        root = tmp / f"race-{trial}"
        queue = context.Queue()
        chunks = [incoming[i::8] for i in range(8)]
        procs = [context.Process(target=_writer, args=(str(root), c, queue)) for c in chunks]
        for p in procs:
            p.start()
        outcomes = [queue.get(timeout=300) for _ in procs]
        for p in procs:
            p.join()
        raised += any(o != "ok" for o in outcomes)
        corrupt += (root / ".motorlib" / "index.corrupt").exists()
        lost += len(Catalog(root)) != len(incoming)
    print(f"  {trials} trials of 8 writers on a new catalog: {lost} lost curves, {raised} raised, "
          f"{corrupt} left index.corrupt")


def kills(incoming: list[str], tmp: Path) -> None:
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "motorlib", "catalog", "add", "--catalog", str(tmp / "timing"),
                    *incoming], capture_output=True, cwd=ROOT, check=False)
    full = time.perf_counter() - start
    bad = 0
    for k in range(10):
        root = tmp / f"kill-{k}"
        proc = subprocess.Popen([sys.executable, "-m", "motorlib", "catalog", "add", "--catalog", str(root),
                                 *incoming], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, cwd=ROOT)
        time.sleep(full * (k + 0.5) / 10)
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        files = [p for p in root.rglob("*.xml") if ".motorlib" not in p.parts]
        partial = 0
        for path in files:
            try:
                read_record(path)
            except Exception:  # noqa: BLE001
                partial += 1
        if root.exists():
            catalog = Catalog(root)
            leftovers = [p for p in root.rglob("*.tmp")]
            in_step = len(catalog) == len(files) and not catalog.problems
        else:
            leftovers, in_step = [], True
        ok = not partial and not leftovers and in_step
        bad += not ok
        print(f"  kill at {100 * (k + 0.5) / 10:3.0f} % of an add: {len(files):3d} files, {partial} partial, "
              f"{len(leftovers)} temporary files after the next open, index in step: {in_step}")
    print(f"  {bad} of 10 kill moments left damage")


def main() -> None:
    trials = int(sys.argv[1]) if len(sys.argv) > 1 else 20
    with tempfile.TemporaryDirectory() as tmp_name:
        tmp = Path(tmp_name)
        src = tmp / "incoming"
        src.mkdir()
        incoming = []
        for i, record in enumerate(synthetic_motors(300, seed=7)):
            incoming.append(str(write_record(record, src / f"m{i}.xml")))
        races(trials, incoming[:80], tmp)
        kills(incoming, tmp)


if __name__ == "__main__":
    main()
