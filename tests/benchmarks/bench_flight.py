"""Benchmark: batched flight against one solve_ivp per flight, and accuracy against a tight reference.

Run by hand from the repository root:  python tests/benchmarks/bench_flight.py [--quick]

For N = 100, 1,000, 5,000 and 20,000 synthetic flights (tests/synthetic.py, seed 7: impulse 0.6-10,000 N·s,
burn 0.2-6 s, five shapes, wind, tilted rails; --quick: 100 and 1,000) it prints, measured in one run:

Times are CPU time of this process (time.process_time), the figure that carries on a loaded machine; the runs of
both sides are interleaved (batched 15 or 6, loop 3 or 2), so that a slow spell hits both alike, and the ratio is
given twice: of the medians, and of the fastest runs (noise from other work on the machine only adds time; on this
shared 2-core machine the same batched call ranged over 86-127 ms within minutes).

- the batched time (median and fastest of the interleaved runs, ascent only, as a ranking flies) and its peak
  traced memory;
- the per-flight loop time: scipy solve_ivp RK45 at rtol 1e-6 per flight (tests/reference_flight.py, as a
  typical single-flight simulator; it restarts the solver at each thrust-curve sample, about 21 calls a flight,
  since one call through the curve's corners errs up to 9e-4 in apogee); at 20,000 the loop is timed on a random 2,000 of the flights and scaled
  (marked "est."), since the whole loop would take about 20 minutes;
- their ratio (of the medians, and of the fastest runs);
- the apogee error of the batched flights against solve_ivp DOP853 at rtol 1e-10 on the same motors (all of
  them up to 1,000; a random 1,000 above that): worst, 99th percentile and median.

Then the same for 1,000 and 5,000 (--quick: 1,000) in the conditions the issue measured in: no wind and constant
gravity (the same motors and airframes; the rails stay tilted), both sides and the reference alike.

Goals (issue "Speed"): ratio >= 100 at 1,000 and >= 150 at 5,000; worst apogee error <= 1e-4, median <= 1e-6.
Times depend on the machine's load: the ratio is what carries, since both sides run interleaved.
"""

from __future__ import annotations

import statistics
from dataclasses import replace
import sys
import time
import tracemalloc
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from motorlib.flight import Airframe, FlightSettings, MotorPack, simulate  # noqa: E402
from tests.synthetic import synthetic_flights  # noqa: E402

scipy_loaded_by_batched_path = "scipy" in sys.modules


def _batched(frames, pack, settings: FlightSettings) -> float:
    start = time.process_time()
    simulate(frames, pack, settings, descent=False)
    return time.process_time() - start


def _loop(frames, motors, settings: FlightSettings) -> float:
    from tests.reference_flight import reference_flight

    start = time.process_time()
    for frame, motor in zip(frames, motors):
        reference_flight(frame, motor, method="RK45", rtol=1e-6, atol=1e-6, vary_gravity=settings.vary_gravity)
    return time.process_time() - start


def _peak_mb(frames, pack, settings: FlightSettings) -> float:
    tracemalloc.start()
    simulate(frames, pack, settings, descent=False)
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    return peak / 1e6


def _errors(frames, motors, results, picks, settings: FlightSettings) -> np.ndarray:
    from tests.reference_flight import reference_flight

    errors = []
    for i in picks:
        ref = reference_flight(frames[i], motors[i], vary_gravity=settings.vary_gravity)  # DOP853, rtol 1e-10
        if np.isfinite(ref["apogee_m"]):
            errors.append(abs(results.apogee_m[i] / ref["apogee_m"] - 1.0))
    return np.array(errors)


def _calm(frames: list[Airframe]) -> list[Airframe]:
    """The same airframes without wind (the issue's measurement: no wind, constant gravity)."""
    return [replace(f, launch=replace(f.launch, wind_speed_m_s=0.0)) for f in frames]


def main() -> None:
    quick = "--quick" in sys.argv
    sizes = (100, 1000) if quick else (100, 1000, 5000, 20000)
    rng = np.random.default_rng(0)
    print(f"scipy imported by the batched path: {scipy_loaded_by_batched_path}")
    header = (f"{'N':>6} {'batched ms (min)':>16} {'peak MB':>8} {'loop s (min)':>14} {'ratio (min)':>12} "
              f"{'worst err':>10} {'p99 err':>9} {'median err':>10}")
    print("wind 0-6 m/s, tilted rails, gravity falling with height:")
    print(header)
    for n in sizes:
        frames, motors = synthetic_flights(n, seed=7)
        _row(n, frames, motors, FlightSettings(), rng)
    print("the issue's conditions: no wind, constant gravity (the same motors and airframes, rails still tilted):")
    print(header)
    for n in (1000,) if quick else (1000, 5000):
        frames, motors = synthetic_flights(n, seed=7)
        _row(n, _calm(frames), motors, FlightSettings(vary_gravity=False), rng)


def _row(n: int, frames, motors, settings: FlightSettings, rng: np.random.Generator) -> None:
    pack = MotorPack.from_records(motors)
    sample = None if n <= 5000 else rng.choice(n, 2000, replace=False)
    loop_frames = frames if sample is None else [frames[i] for i in sample]
    loop_motors = motors if sample is None else [motors[i] for i in sample]
    scale = 1.0 if sample is None else n / sample.size
    batched, loops = [], []
    loop_runs = 3 if n <= 1000 else 2  # several: one long run alone would take every slowdown of the machine
    for _ in range(loop_runs):  # interleave so that machine noise hits both alike
        batched.extend(_batched(frames, pack, settings) for _ in range(5 if n <= 1000 else 3))
        loops.append(_loop(loop_frames, loop_motors, settings) * scale)
    b, l_ = statistics.median(batched), statistics.median(loops)
    b_min, l_min = min(batched), min(loops)
    peak = _peak_mb(frames, pack, settings)
    results = simulate(frames, pack, settings, descent=False)
    picks = range(n) if n <= 1000 else rng.choice(n, 1000, replace=False)
    err = _errors(frames, motors, results, picks, settings)
    est = " est." if sample is not None else ""
    timing = f"{1e3 * b:>7.1f} ({1e3 * b_min:>6.1f}) {peak:>8.1f} {l_:>6.2f} ({l_min:>5.2f}){est} {l_ / b:>5.0f} ({l_min / b_min:>4.0f})"
    print(f"{n:>6} {timing} "
          f"{err.max():>10.2e} {np.quantile(err, 0.99):>9.2e} {np.median(err):>10.2e}", flush=True)


if __name__ == "__main__":
    main()
