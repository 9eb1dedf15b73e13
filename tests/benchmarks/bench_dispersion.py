"""Benchmark: Monte Carlo dispersion and the robust ranking (issue 12).

Run by hand from the repository root:  python tests/benchmarks/bench_dispersion.py [--quick] [--workers K]

Prints:
1. 10,000 sampled flights of one airframe (the 41.6 mm demo with an F29), apogee only and with the
   descent (landing points), on 1 worker and on K workers (default: the cores); goal < 2 s.
2. ``match --robust`` work: 100 candidates (the sample motors that fly this airframe, repeated with
   a scaled thrust each, so that no two are alike) × 500 samples, apogee only; goal < 10 s.
3. The per-flight cost of a sampled flight against a flight of the nominal batched call
   (the same airframe and motor N times in one ``simulate``): the price of building per-flight
   airframes and scaled curves.
Each figure is the best of ``repeat`` runs, and the machine's load average is printed with them
(other processes slow every figure down).
"""

from __future__ import annotations

import os
import sys
import time
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from motorlib.files.airframe_toml import load_airframe  # noqa: E402
from motorlib.files.curvefiles import load_curve_file  # noqa: E402
from motorlib.flight.dispersion import DispersionSettings, Uncertainty, default_workers, run_samples  # noqa: E402
from motorlib.flight.integrate import MotorPack, simulate  # noqa: E402
from motorlib.matching.rank import MatchSettings  # noqa: E402
from motorlib.matching.robust import RobustSettings, robust_rank  # noqa: E402

SAMPLES = ROOT / "sample_curves"


def _best(call, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        call()
        times.append(time.perf_counter() - start)
    return min(times)


def main() -> None:
    quick = "--quick" in sys.argv
    workers = int(sys.argv[sys.argv.index("--workers") + 1]) if "--workers" in sys.argv else default_workers()
    repeat = 1 if quick else 2
    n = 2000 if quick else 10_000
    frame = load_airframe(SAMPLES / "airframes" / "quibble-41.toml")
    motor = load_curve_file(SAMPLES / "bramblewick-propulsion_f29-8.xml")
    settings = DispersionSettings(n_samples=n)
    u = [Uncertainty()]
    zeros, index = np.zeros(n, dtype=np.int64), np.arange(n)
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; workers = {workers}")
    print(f"1. {n} sampled flights of {frame.name} with {motor.designation} (goal < 2 s for 10,000)")
    figures = {}
    for descent in (False, True):
        for k in sorted({1, workers}):
            seconds = _best(lambda: run_samples(frame, [motor], u, zeros, index, settings, [8.0], descent=descent,
                                                workers=k), repeat)
            figures[(descent, k)] = seconds
            what = "with descent" if descent else "apogee only "
            print(f"   {what}, {k} worker(s): {seconds:6.2f} s  ({1e6 * seconds / n:6.1f} µs per flight)")
    # 3. the price of sampling: the same flights as one nominal batched call
    pack = MotorPack.from_records([motor] * n)
    for descent in (False, True):
        nominal = _best(lambda: simulate([frame] * n, pack, deploy_delay_s=np.full(n, 8.0), descent=descent), repeat)
        sampled = figures[(descent, 1)]
        what = "with descent" if descent else "apogee only "
        print(f"3. {what}: nominal batched flight {1e6 * nominal / n:6.1f} µs per flight, sampled {1e6 * sampled / n:6.1f}"
              f" µs per flight on 1 worker (x{sampled / nominal:.2f})")
    # 2. robust ranking: 100 distinct candidates x 500 samples
    fitting = [load_curve_file(p) for p in sorted(SAMPLES.glob("bramblewick-propulsion_*.xml"))]
    fitting = [m for m in fitting if m.diameter_m is not None and m.diameter_m <= 0.0295 and m.total_mass_kg]
    n_candidates = 20 if quick else 100
    candidates = []
    for i in range(n_candidates):
        base = fitting[i % len(fitting)]
        candidates.append(replace(base, designation=f"{base.designation}#{i}", thrust_n=base.thrust_n * (0.9 + 0.002 * i)))
    robust = RobustSettings(n_samples=500, altitude_window_m=(300.0, 700.0))
    seconds = _best(lambda: robust_rank(frame, candidates, MatchSettings(ceiling_m=1500.0), Uncertainty(), robust,
                                        workers=workers), 1)
    print(f"2. match --robust: {n_candidates} candidates x 500 samples, apogee only, {workers} worker(s): "
          f"{seconds:.2f} s (goal < 10 s for 100)")


if __name__ == "__main__":
    main()
