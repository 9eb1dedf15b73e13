"""Synthetic motors and airframes for accuracy tests and benchmarks (invented, demo data only).

Impulses log-uniform from 0.6 to 10 000 N·s, burn times 0.2-6 s, five curve shapes
with random jitter; airframes sized so that average thrust-to-weight is 3-15;
:func:`descent_flights` adds sites, winds from any direction and recovery sequences.
"""

from __future__ import annotations

import numpy as np

from motorlib import MotorRecord
from motorlib.flight.airframe import Airframe, Launch, Recovery
from motorlib.flight.atmosphere import Site
from motorlib.units import STANDARD_GRAVITY_M_S2

_SHAPES = {
    "spike": [(0.0, 0.0), (0.04, 0.8), (0.09, 1.0), (0.2, 0.45), (0.3, 0.36), (0.85, 0.32), (0.95, 0.1), (1.0, 0.0)],
    "progressive": [(0.0, 0.0), (0.03, 0.6), (0.5, 0.8), (0.86, 1.0), (0.95, 0.35), (1.0, 0.0)],
    "regressive": [(0.0, 0.0), (0.03, 1.0), (0.5, 0.7), (0.88, 0.5), (0.95, 0.2), (1.0, 0.0)],
    "neutral": [(0.0, 0.0), (0.04, 0.95), (0.4, 1.0), (0.88, 0.92), (0.95, 0.3), (1.0, 0.0)],
    "boost-sustain": [(0.0, 0.0), (0.03, 1.0), (0.2, 0.95), (0.28, 0.32), (0.9, 0.28), (0.96, 0.08), (1.0, 0.0)],
}


def synthetic_motors(n: int, seed: int = 7) -> list[MotorRecord]:
    """n random motors: impulse 0.6-10 000 N·s (log-uniform), burn 0.2-6 s, 6-40 samples."""
    rng = np.random.default_rng(seed)
    names = list(_SHAPES)
    motors = []
    for i in range(n):
        impulse = float(np.exp(rng.uniform(np.log(0.6), np.log(10_000.0))))
        burn = float(rng.uniform(0.2, 6.0))
        knots = np.array(_SHAPES[names[i % len(names)]])
        n_extra = int(rng.integers(0, 30))
        u = np.unique(np.concatenate([knots[:, 0], rng.uniform(0.01, 0.99, n_extra)]))
        f = np.interp(u, knots[:, 0], knots[:, 1])
        f[1:-1] *= rng.uniform(0.9, 1.1, f.size - 2)
        t = u * burn
        thrust = f * impulse / np.trapezoid(f, t)
        isp = rng.uniform(80.0, 220.0)
        propellant = impulse / (isp * STANDARD_GRAVITY_M_S2)
        total = propellant / rng.uniform(0.3, 0.6)
        delays = tuple(float(d) for d in sorted(rng.choice(np.arange(2, 16), size=int(rng.integers(1, 4)), replace=False)))
        motors.append(MotorRecord(
            designation=f"SYN-{i}", maker="Synthetic (fictional)", time_s=t, thrust_n=thrust,
            diameter_m=0.029, length_m=0.1, total_mass_kg=total, propellant_mass_kg=propellant,
            delays_s=delays, delay_adjustable=bool(rng.random() < 0.3),
        ))
    return motors


def airframe_for(motor: MotorRecord, rng: np.random.Generator, *, wind: bool = True) -> Airframe:
    """An airframe sized for ``motor``: average thrust-to-weight at liftoff about 3-15."""
    average = motor.total_impulse_ns / motor.burn_time_s()
    liftoff_mass = average / (STANDARD_GRAVITY_M_S2 * rng.uniform(3.0, 15.0))
    dry = max(liftoff_mass - motor.total_mass_kg, 0.2 * liftoff_mass)
    diameter = float(np.clip(0.025 * (dry / 0.05) ** (1 / 3), 0.015, 0.3))
    return Airframe(
        name="synthetic", mass_kg=float(dry), diameter_m=diameter, drag_coefficient=float(rng.uniform(0.35, 0.8)),
        launch=Launch(rail_length_m=float(rng.uniform(0.9, 6.0)), rail_angle_rad=float(np.radians(rng.uniform(0, 10))),
                      site=Site(), wind_speed_m_s=float(rng.uniform(0.0, 6.0)) if wind else 0.0),
    )


def synthetic_flights(n: int, seed: int = 7) -> tuple[list[Airframe], list[MotorRecord]]:
    motors = synthetic_motors(n, seed)
    rng = np.random.default_rng(seed + 1)
    return [airframe_for(m, rng) for m in motors], motors


_RHO_SEA_KG_M3 = 1.225  # sea-level density of the U.S. Standard Atmosphere 1976, for sizing devices only


def descent_flights(n: int, seed: int = 5) -> tuple[list[Airframe], list[MotorRecord], np.ndarray]:
    """n varied flights to landing under recovery devices, and the ejection delay [s] each is flown with.

    Motors and airframes as :func:`synthetic_flights` (seed ``seed``), on sites 0-2,000 m high, in winds of
    0-8 m/s from any direction, on rails leaning 0-10° toward any azimuth (3-D flights), with one of four
    recovery sequences in turn: a parachute at the motor's charge (a delay drawn from the motor's: a short
    one opens while the rocket still climbs, a long one while it falls fast); a parachute or a streamer at
    apogee, or 1-3 s after it; a drogue at apogee and a main at 100-400 m on the way down; a drogue at apogee
    and, 5-20 s later, a main that replaces it. Devices are sized for sea-level descent rates of 3-8 m/s
    (parachutes and mains), 10-20 m/s (streamers) and 15-30 m/s (drogues).
    """
    motors = synthetic_motors(n, seed)
    rng = np.random.default_rng(seed + 1)
    frames, delays = [], np.empty(n)
    for i, motor in enumerate(motors):
        base = airframe_for(motor, rng, wind=False)
        mass = base.mass_kg + motor.total_mass_kg - motor.propellant_mass_kg

        def area(low: float, high: float) -> float:  # Cd·A for a descent rate drawn from [low, high] m/s
            return 2.0 * mass * STANDARD_GRAVITY_M_S2 / (_RHO_SEA_KG_M3 * rng.uniform(low, high) ** 2)

        kind = i % 4
        delays[i] = float(rng.choice(motor.delays_s))
        if kind == 0:
            devices = (Recovery("parachute", "ejection", area(3.0, 8.0)),)
        elif kind == 1:
            streamer = rng.random() < 0.3
            devices = (Recovery("streamer" if streamer else "parachute", "apogee",
                                area(10.0, 20.0) if streamer else area(3.0, 8.0),
                                delay_s=float(rng.choice([0.0, rng.uniform(1.0, 3.0)]))),)
        elif kind == 2:
            devices = (Recovery("drogue", "apogee", area(15.0, 30.0)),
                       Recovery("main", "altitude", area(3.0, 8.0), deploy_altitude_m=float(rng.uniform(100.0, 400.0))))
        else:
            devices = (Recovery("drogue", "apogee", area(15.0, 30.0)),
                       Recovery("main", "after", area(3.0, 8.0), delay_s=float(rng.uniform(5.0, 20.0)), replaces=True))
        launch = Launch(rail_length_m=base.launch.rail_length_m, rail_angle_rad=base.launch.rail_angle_rad,
                        site=Site(elevation_m=float(rng.uniform(0.0, 2000.0))),
                        wind_speed_m_s=float(rng.uniform(0.0, 8.0)),
                        wind_direction_rad=float(rng.uniform(0.0, 2.0 * np.pi)),
                        rail_azimuth_rad=float(rng.uniform(0.0, 2.0 * np.pi)))
        frames.append(Airframe(name=f"descent-{i}", mass_kg=base.mass_kg, diameter_m=base.diameter_m,
                               drag_coefficient=base.drag_coefficient, launch=launch, recovery_sequence=devices))
    return frames, motors, delays
