"""Synthesise the bundled demo curves in ``sample_curves/`` from shapes designed here.

Every maker, motor and curve is invented for demonstration: the thrust shapes are
simple piecewise-linear designs (ignition spike, progressive, regressive,
neutral, boost-sustain) scaled to a chosen total impulse and burn time; the masses
follow from an assumed specific impulse and propellant mass fraction. No real
motor's data were used. Each label is derived from the generated curve, so every
file passes ``motorlib check``.

Run from the repository root: ``python tools/make_sample_curves.py``.
"""

from __future__ import annotations

import datetime as dt
import math
import re
from pathlib import Path

import numpy as np

from motorlib import MotorRecord, Provenance, impulse_class_for, write_record
from motorlib.units import STANDARD_GRAVITY_M_S2

OUT = Path(__file__).resolve().parent.parent / "sample_curves"
DATE = dt.date(2026, 12, 1)
NOTE = "Invented demonstration motor; synthetic curve, not a real product and not certified."


def _decay(u0: float, u1: float, f0: float, f1: float, n: int = 6) -> list[tuple[float, float]]:
    """Exponential-looking decay from f0 to f1 between u0 and u1 (n points)."""
    pts = []
    for k in range(1, n + 1):
        s = k / n
        pts.append((u0 + (u1 - u0) * s, f1 + (f0 - f1) * (math.exp(-4 * s) - math.exp(-4)) / (1 - math.exp(-4))))
    return pts


SHAPES: dict[str, list[tuple[float, float]]] = {
    # (fraction of burn, fraction of peak); each starts and ends at zero thrust
    "spike": [(0.0, 0.0), (0.03, 0.35), (0.06, 0.85), (0.09, 1.0), *_decay(0.09, 0.26, 1.0, 0.36),
              (0.45, 0.34), (0.65, 0.33), (0.82, 0.31), (0.9, 0.22), (0.95, 0.09), (1.0, 0.0)],
    "progressive": [(0.0, 0.0), (0.02, 0.3), (0.05, 0.62), (0.2, 0.7), (0.4, 0.8), (0.6, 0.89),
                    (0.78, 0.97), (0.86, 1.0), (0.9, 0.8), (0.94, 0.4), (0.97, 0.15), (1.0, 0.0)],
    "regressive": [(0.0, 0.0), (0.02, 0.5), (0.04, 1.0), (0.15, 0.9), (0.3, 0.78), (0.5, 0.66),
                   (0.7, 0.56), (0.85, 0.47), (0.91, 0.35), (0.95, 0.17), (1.0, 0.0)],
    "neutral": [(0.0, 0.0), (0.02, 0.45), (0.05, 0.93), (0.15, 0.97), (0.35, 1.0), (0.55, 0.98),
                (0.75, 0.94), (0.87, 0.9), (0.92, 0.6), (0.96, 0.22), (1.0, 0.0)],
    "boost-sustain": [(0.0, 0.0), (0.02, 0.6), (0.04, 1.0), (0.12, 0.97), (0.2, 0.93), (0.24, 0.7),
                      (0.28, 0.36), (0.32, 0.3), (0.5, 0.3), (0.7, 0.29), (0.88, 0.28), (0.93, 0.18),
                      (0.97, 0.07), (1.0, 0.0)],
}

# maker, target impulse N·s, target average N, diameter mm, length mm, delays s, adjustable, shape,
# assumed Isp s, propellant mass fraction, label style ("plain" or "impulse-prefix")
TEAKETTLE = "Teakettle Thrust Co. (fictional)"
BRAMBLEWICK = "Bramblewick Propulsion (fictional)"
MARMALADE = "Marmalade Moon Motors (fictional)"
SPECS = [
    (TEAKETTLE, 0.55, 2.5, 10.5, 38, (2, 3), False, "spike", 70, 0.28, "plain"),
    (TEAKETTLE, 1.1, 3.0, 13, 45, (2, 4), False, "spike", 72, 0.32, "plain"),
    (TEAKETTLE, 2.3, 3.2, 13, 45, (3, 5), False, "spike", 75, 0.36, "plain"),
    (TEAKETTLE, 2.2, 8.0, 18, 70, (3, 5), False, "spike", 78, 0.2, "plain"),
    (TEAKETTLE, 4.5, 5.0, 18, 70, (2, 4, 6), False, "spike", 80, 0.3, "plain"),
    (TEAKETTLE, 4.4, 6.0, 18, 70, (), False, "spike", 80, 0.3, "booster"),
    (TEAKETTLE, 9.2, 6.0, 18, 70, (3, 5, 7), False, "spike", 82, 0.5, "plain"),
    (TEAKETTLE, 17.0, 12.0, 24, 70, (3, 5, 7), False, "spike", 82, 0.5, "plain"),
    (TEAKETTLE, 28.0, 9.0, 24, 95, (4, 6, 8), False, "spike", 85, 0.5, "plain"),
    (BRAMBLEWICK, 35.0, 25.0, 24, 70, (7,), True, "progressive", 170, 0.42, "plain"),
    (BRAMBLEWICK, 52.0, 30.0, 24, 95, (8,), True, "neutral", 175, 0.45, "plain"),
    (BRAMBLEWICK, 72.0, 52.0, 29, 98, (10,), True, "regressive", 180, 0.45, "plain"),
    (BRAMBLEWICK, 110.0, 60.0, 29, 124, (10,), True, "neutral", 185, 0.48, "plain"),
    (BRAMBLEWICK, 120.0, 25.0, 29, 124, (4, 7, 10), False, "regressive", 165, 0.5, "plain"),
    (BRAMBLEWICK, 150.0, 100.0, 29, 152, (14,), True, "boost-sustain", 190, 0.5, "plain"),
    (BRAMBLEWICK, 235.0, 160.0, 29, 194, (14,), True, "progressive", 195, 0.52, "impulse-prefix"),
    (BRAMBLEWICK, 300.0, 125.0, 38, 156, (), False, "boost-sustain", 195, 0.52, "plugged"),
    (BRAMBLEWICK, 420.0, 210.0, 38, 191, (14,), True, "neutral", 200, 0.54, "impulse-prefix"),
    (BRAMBLEWICK, 600.0, 300.0, 38, 250, (14,), True, "regressive", 200, 0.55, "impulse-prefix"),
    (MARMALADE, 900.0, 350.0, 54, 236, (14,), True, "neutral", 205, 0.55, "impulse-prefix"),
    (MARMALADE, 1200.0, 600.0, 54, 326, (), False, "progressive", 205, 0.56, "plugged"),
    (MARMALADE, 1800.0, 700.0, 54, 403, (14,), True, "boost-sustain", 205, 0.57, "impulse-prefix"),
    (MARMALADE, 2400.0, 1100.0, 75, 350, (), False, "regressive", 210, 0.57, "plugged"),
    (MARMALADE, 3500.0, 1300.0, 75, 497, (), False, "neutral", 210, 0.58, "plugged"),
    (MARMALADE, 4800.0, 1600.0, 75, 665, (), False, "progressive", 212, 0.58, "plugged"),
    (MARMALADE, 7000.0, 2200.0, 98, 548, (), False, "neutral", 215, 0.6, "plugged"),
    (MARMALADE, 9500.0, 2600.0, 98, 702, (), False, "boost-sustain", 215, 0.6, "plugged"),
]


def _curve(shape: str, impulse_ns: float, average_n: float) -> tuple[np.ndarray, np.ndarray]:
    knots = np.array(SHAPES[shape])
    u = np.unique(np.concatenate([knots[:, 0], np.linspace(0.0, 1.0, 25)]))
    f = np.interp(u, knots[:, 0], knots[:, 1])
    duration_s = impulse_ns / average_n / 0.97  # the 5 % window is about 97 % of the whole burn
    time_s = np.round(u * duration_s, 4)
    thrust = f * impulse_ns / np.trapezoid(f, time_s)
    thrust_n = np.array([float(f"{x:.4g}") for x in thrust])
    return time_s, thrust_n


def _slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower()


def main() -> None:
    OUT.mkdir(exist_ok=True)
    for old in OUT.glob("*.xml"):
        old.unlink()
    for maker, impulse, average, dia, length, delays, adjustable, shape, isp, fraction, style in SPECS:
        time_s, thrust_n = _curve(shape, impulse, average)
        draft = MotorRecord("draft", time_s, thrust_n)
        letter = impulse_class_for(draft.total_impulse_ns).letter
        avg = int(math.floor(draft.average_thrust_n() + 0.5))
        tail = {"booster": "-0", "plugged": "-P"}.get(style, "-" + ",".join(str(d) for d in delays))
        prefix = f"{round(draft.total_impulse_ns)}" if style == "impulse-prefix" else ""
        label = f"{prefix}{letter}{avg}{tail}"
        propellant_kg = round(draft.total_impulse_ns / (isp * STANDARD_GRAVITY_M_S2), 4)
        total_kg = round(propellant_kg / fraction, 4)
        record = MotorRecord(
            designation=label, maker=maker, time_s=time_s, thrust_n=thrust_n,
            diameter_m=dia / 1000, length_m=length / 1000, total_mass_kg=total_kg,
            propellant_mass_kg=propellant_kg, delays_s=tuple(float(d) for d in delays),
            delay_adjustable=adjustable, no_ejection_charge=style in ("booster", "plugged"),
            provenance=Provenance("demo", DATE, f"{NOTE} Shape: {shape}."),
        )
        path = OUT / f"{_slug(maker.split('(')[0])}_{_slug(label)}.xml"
        write_record(record, path)
        print(f"{path.name:48s} {label:14s} {record.total_impulse_ns:9.2f} N·s  {record.average_thrust_n():8.1f} N  "
              f"{record.burn_time_s():5.2f} s")


if __name__ == "__main__":
    main()
