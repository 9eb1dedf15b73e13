"""Benchmark: the descent under recovery devices (issue 16): steps, landing accuracy, Monte Carlo time.

Run by hand from the repository root:
    python tests/benchmarks/bench_descent.py [--quick] [--workers K] [--cache FILE]

Prints:
1. The accepted steps under the parachute of the Monte Carlo flight (the 41.6 mm demo with an F29 on an 8 s
   delay, as tests/benchmarks/bench_dispersion.py): trajectory rows from the opening to landing, less one.
2. N varied descents (tests/synthetic.py ``descent_flights``, seed 5; N = 300, --quick: 60): steps per descent
   (median, 90th percentile, most) and landing errors against solve_ivp DOP853 at rtol 1e-10
   (tests/reference_descent.py), worst and median of the landing point [m] and time [s]: for the whole flight
   from liftoff (what a user sees: the ascent's own error carried down to the ground) and for the descent
   alone (the reference flown from the library's state at the first opening).
3. 10,000 sampled flights of that airframe, apogee only and with the descent (landing points), on 1 worker
   and on K (default: the cores); the median of 3 runs (--quick: 1) and every run, with the load average.
   Goal (issue 16): <= 2 s with the descent.

The reference takes about 0.1 s per flight; ``--cache FILE`` keeps its results in a JSON file between runs
(keyed by the flight, and for the descent alone by the opening state it starts from, so a changed library
is flown again from its own states).
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from motorlib.files.airframe_toml import load_airframe  # noqa: E402
from motorlib.files.curvefiles import load_curve_file  # noqa: E402
from motorlib.flight import OK, simulate  # noqa: E402
from motorlib.flight.dispersion import DispersionSettings, Uncertainty, default_workers, run_samples  # noqa: E402
from tests.reference_descent import opening_state, reference_descent  # noqa: E402
from tests.synthetic import descent_flights  # noqa: E402

SAMPLES = ROOT / "sample_curves"
SEED = 5


def _steps_under_devices(results, i: int) -> int:
    path = results.trajectories[i]
    return int(np.count_nonzero(path["descent"] & (path["time_s"] >= results.deploy_time_s[i]))) - 1


def _cached(cache: dict, key: str, fly) -> dict:
    if key not in cache:
        cache[key] = fly()
    return cache[key]


def _miss(results, i: int, ref: dict) -> tuple[float, float]:
    """Landing point [m] and time [s] of flight ``i`` off the reference's."""
    return (math.hypot(results.landing_east_m[i] - ref["landing_east_m"], results.landing_north_m[i] - ref["landing_north_m"]),
            abs(results.landing_time_s[i] - ref["landing_time_s"]))


def _varied(n: int, cache: dict) -> None:
    frames, motors, delays = descent_flights(n, SEED)
    results = simulate(frames, motors, deploy_delay_s=delays, trajectories=True)
    steps, whole, alone = [], [], []
    for i in range(n):
        if results.status[i] != OK or not np.isfinite(results.landing_time_s[i]):
            continue
        ref = _cached(cache, f"full/{SEED}/{i}", lambda: reference_descent(frames[i], motors[i], delays[i]))
        whole.append(_miss(results, i, ref))
        start = opening_state(results, i, frames[i])
        if start is None:  # nothing opened before landing
            continue
        steps.append(_steps_under_devices(results, i))
        digest = hashlib.sha1(json.dumps(start, sort_keys=True).encode()).hexdigest()[:16]
        ref = _cached(cache, f"from/{SEED}/{i}/{digest}",
                      lambda: reference_descent(frames[i], motors[i], delays[i], start=start))
        alone.append(_miss(results, i, ref))
    print(f"2. {n} varied descents ({len(steps)} under a device): steps per descent median {np.median(steps):.0f}, "
          f"90th percentile {np.quantile(steps, 0.9):.0f}, most {max(steps)}")
    for what, misses in (("whole flight ", whole), ("descent alone", alone)):
        miss = np.array(misses)
        print(f"   landing vs DOP853 rtol 1e-10, {what} ({len(miss)}): point worst {1e3 * miss[:, 0].max():.3g} mm, "
              f"median {1e3 * np.median(miss[:, 0]):.3g} mm; time worst {1e3 * miss[:, 1].max():.3g} ms, "
              f"median {1e3 * np.median(miss[:, 1]):.3g} ms")


def main() -> None:
    quick = "--quick" in sys.argv
    workers = int(sys.argv[sys.argv.index("--workers") + 1]) if "--workers" in sys.argv else default_workers()
    cache_path = Path(sys.argv[sys.argv.index("--cache") + 1]) if "--cache" in sys.argv else None
    cache = json.loads(cache_path.read_text()) if cache_path is not None and cache_path.exists() else {}
    frame = load_airframe(SAMPLES / "airframes" / "quibble-41.toml")
    motor = load_curve_file(SAMPLES / "bramblewick-propulsion_f29-8.xml")
    one = simulate(frame, [motor], deploy_delay_s=np.array([8.0]), trajectories=True)
    print(f"1. {frame.name} with {motor.designation}, 8 s delay: {_steps_under_devices(one, 0)} steps under the "
          f"parachute, from {one.deploy_altitude_m[0]:.0f} m, landing after {one.descent_time_s[0]:.1f} s", flush=True)
    try:
        _varied(60 if quick else 300, cache)
    finally:
        if cache_path is not None:
            cache_path.write_text(json.dumps(cache))
    n, repeat = 10_000, 1 if quick else 3
    settings = DispersionSettings(n_samples=n)
    zeros, index = np.zeros(n, dtype=np.int64), np.arange(n)
    print(f"3. {n} sampled flights (goal <= 2 s with the descent); load average {os.getloadavg()[0]:.1f} on "
          f"{os.cpu_count()} cores", flush=True)
    for descent in (False, True):
        for k in sorted({1, workers}):
            runs = []
            for _ in range(repeat):
                start = time.perf_counter()
                run_samples(frame, [motor], [Uncertainty()], zeros, index, settings, [8.0], descent=descent, workers=k)
                runs.append(time.perf_counter() - start)
            what = "with descent" if descent else "apogee only "
            print(f"   {what}, {k} worker(s): {statistics.median(runs):5.2f} s median "
                  f"(runs: {', '.join(f'{r:.2f}' for r in runs)})", flush=True)


if __name__ == "__main__":
    main()
