"""Benchmark: batched flight against one solve_ivp per flight, and accuracy against a tight reference.

Run by hand from the repository root:  python tests/benchmarks/bench_flight.py [--quick]

Prints, for N = 100, 1,000 and 5,000 synthetic flights (impulse 0.6-10,000 N·s, burn 0.2-6 s, five shapes,
wind, tilted rails): the batched time (median of interleaved runs), the per-flight loop time (solve_ivp
RK45, rtol 1e-6, as a typical single-flight simulator), their ratio; then the worst errors of the batched
integrator against solve_ivp DOP853 (rtol 1e-10) over 1,000 flights; and whether the batched path
imported scipy.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from motorlib.flight import MotorPack, simulate  # noqa: E402
from tests.synthetic import synthetic_flights  # noqa: E402

scipy_loaded_by_batched_path = "scipy" in sys.modules


def _batched(frames, pack) -> float:
    start = time.perf_counter()
    simulate(frames, pack, descent=False)
    return time.perf_counter() - start


def _loop(frames, motors) -> float:
    from tests.reference_flight import reference_flight

    start = time.perf_counter()
    for frame, motor in zip(frames, motors):
        reference_flight(frame, motor, method="RK45", rtol=1e-6, atol=1e-6)
    return time.perf_counter() - start


def main() -> None:
    quick = "--quick" in sys.argv
    sizes = (100, 1000) if quick else (100, 1000, 5000)
    print(f"scipy imported by the batched path: {scipy_loaded_by_batched_path}")
    print(f"{'N':>6} {'batched median (ms)':>20} {'per-flight loop (s)':>20} {'ratio':>8}")
    for n in sizes:
        frames, motors = synthetic_flights(n, seed=7)
        pack = MotorPack.from_records(motors)
        batched, loops = [], []
        repeats = 5
        loop_runs = 1 if n >= 1000 else 2
        for k in range(repeats):  # interleave so that machine noise hits both alike
            batched.append(_batched(frames, pack))
            if k < loop_runs:
                loops.append(_loop(frames, motors))
        b, l_ = statistics.median(batched), statistics.median(loops)
        print(f"{n:>6} {1e3 * b:>20.1f} {l_:>20.2f} {l_ / b:>8.0f}")
    n_check = 300 if quick else 1000
    frames, motors = synthetic_flights(n_check, seed=21)
    results = simulate(frames, motors, descent=False)
    from tests.reference_flight import reference_flight

    apogee_err, time_err, rail_err, range_err = [], [], [], []
    for i, (frame, motor) in enumerate(zip(frames, motors)):
        ref = reference_flight(frame, motor)
        if not np.isfinite(ref["apogee_m"]):
            continue
        apogee_err.append(abs(results.apogee_m[i] / ref["apogee_m"] - 1))
        time_err.append(abs(results.apogee_time_s[i] - ref["apogee_time_s"]))
        rail_err.append(abs(results.rail_exit_speed_m_s[i] - ref["rail_exit_speed_m_s"]))
        range_err.append(abs(results.apogee_downrange_m[i] - ref["apogee_downrange_m"]))
    impulses = [m.total_impulse_ns for m in motors]
    print(f"accuracy over {len(apogee_err)} flights (impulse {min(impulses):.2g}-{max(impulses):.3g} N·s) "
          f"against solve_ivp DOP853 rtol 1e-10:")
    print(f"  worst apogee error      {100 * max(apogee_err):.5f} %   (goal 0.01 %)")
    print(f"  worst time-to-apogee    {1e3 * max(time_err):.3f} ms  (goal 5 ms)")
    print(f"  worst rail-exit speed   {max(rail_err):.5f} m/s (goal 0.01 m/s)")
    print(f"  worst apogee downrange  {max(range_err):.3f} m")


if __name__ == "__main__":
    main()
