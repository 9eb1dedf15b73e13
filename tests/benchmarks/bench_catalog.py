"""Benchmark: a synthetic catalog of 5,000 curves.

Run by hand from the repository root:  python tests/benchmarks/bench_catalog.py [N]

Prints: adding N curve files (parse, validate, check, atomic write, index) as wall-clock and CPU time (the
difference is mostly waiting for the disk); opening with a current index (median of repeats, in-process, no
file parsed); a filtered query; loading every curve's samples for the matcher (from the index blobs, no XML);
and a full rebuild of the index from the files. On a loaded machine compare the CPU figures, and run old and
new code alternately.
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from motorlib import write_record  # noqa: E402
from motorlib.catalog import Catalog, CatalogFilter  # noqa: E402
from tests.synthetic import synthetic_motors  # noqa: E402


def _median(fn, repeats: int = 7) -> float:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 5000
    with tempfile.TemporaryDirectory() as tmp:
        incoming = Path(tmp) / "incoming"
        incoming.mkdir()
        motors = synthetic_motors(n, seed=1)
        paths = [write_record(m, incoming / f"m{i}.xml") for i, m in enumerate(motors)]
        root = Path(tmp) / "catalog"
        catalog = Catalog(root)
        start, start_cpu = time.perf_counter(), time.process_time()
        results = catalog.add_files(paths)
        add_s, add_cpu_s = time.perf_counter() - start, time.process_time() - start_cpu
        assert sum(r.status == "added" for r in results) == n, {r.status for r in results}
        catalog.close()

        def open_catalog() -> None:
            Catalog(root).close()

        open_s = _median(open_catalog)
        catalog = Catalog(root)
        where = CatalogFilter(class_range=("E", "H"), impulse_range_ns=(30.0, 300.0), burn_range_s=(1.0, 4.0))
        query_s = _median(lambda: catalog.rows(where, sort="average_thrust_n"))
        n_rows = len(catalog.rows(where))
        rows = catalog.rows()
        ids = [r.motor_id for r in rows]
        samples_s = _median(lambda: catalog.samples(ids))
        pack_s = _median(lambda: catalog.motor_pack(rows))
        start = time.perf_counter()
        catalog.reindex()
        rebuild_s = time.perf_counter() - start
        catalog.close()
    print(f"synthetic catalog of {n} curves")
    print(f"  add all {n} files          {add_s:8.2f} s     (goal 10 s; CPU {add_cpu_s:.2f} s)")
    print(f"  open with current index    {1e3 * open_s:8.1f} ms    (goal 100 ms)")
    print(f"  filtered query ({n_rows} rows) {1e3 * query_s:8.1f} ms    (goal 20 ms)")
    print(f"  load all samples (blobs)   {1e3 * samples_s:8.1f} ms    (goal 100 ms)")
    print(f"  build the matcher's pack   {1e3 * pack_s:8.1f} ms")
    print(f"  full index rebuild         {rebuild_s:8.2f} s")


if __name__ == "__main__":
    main()
