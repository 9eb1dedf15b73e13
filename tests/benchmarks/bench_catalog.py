"""Benchmark: a synthetic catalog of 5,000 curves.

Run by hand from the repository root:  python tests/benchmarks/bench_catalog.py [N]

Prints: adding N curve files (parse, validate, check, atomic write, index) as wall-clock and CPU time (the
difference is mostly waiting for the disk); opening with a current index (median of repeats, in-process, no
file parsed); a filtered query; loading every curve's samples for the matcher (from the index blobs, no XML);
and a full rebuild of the index from the files. On a loaded machine compare the CPU figures, and run old and
new code alternately. CPU is split into user (our Python, lxml, SQLite) and system time: the kernel's cost of
creating a file varies tenfold on some machines (0.05 to 0.7 ms a file here, with the state of the file
system), so the system time of an add says more about the disk than about the code.
"""

from __future__ import annotations

import resource
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


def _cpu_s() -> tuple[float, float]:
    """User and system CPU time [s] of this process so far."""
    usage = resource.getrusage(resource.RUSAGE_SELF)
    return usage.ru_utime, usage.ru_stime


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
        start, (user, system) = time.perf_counter(), _cpu_s()
        results = catalog.add_files(paths)
        add_s, add_cpu_s = time.perf_counter() - start, [b - a for a, b in zip((user, system), _cpu_s())]
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
        start, (user, system) = time.perf_counter(), _cpu_s()
        catalog.reindex()
        rebuild_s, rebuild_cpu_s = time.perf_counter() - start, [b - a for a, b in zip((user, system), _cpu_s())]
        catalog.close()
    print(f"synthetic catalog of {n} curves")
    print(f"  add all {n} files          {add_s:8.2f} s     (goal 10 s; CPU {sum(add_cpu_s):.2f} s: "
          f"user {add_cpu_s[0]:.2f}, system {add_cpu_s[1]:.2f})")
    print(f"  open with current index    {1e3 * open_s:8.1f} ms    (goal 100 ms)")
    print(f"  filtered query ({n_rows} rows) {1e3 * query_s:8.1f} ms    (goal 20 ms)")
    print(f"  load all samples (blobs)   {1e3 * samples_s:8.1f} ms    (goal 100 ms)")
    print(f"  build the matcher's pack   {1e3 * pack_s:8.1f} ms")
    print(f"  full index rebuild         {rebuild_s:8.2f} s     (CPU {sum(rebuild_cpu_s):.2f} s: "
          f"user {rebuild_cpu_s[0]:.2f}, system {rebuild_cpu_s[1]:.2f})")


if __name__ == "__main__":
    main()
